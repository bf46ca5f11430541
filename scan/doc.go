// Package scan runs the Monte Carlo depth scan: it simulates seeded random
// circuit instances exactly, takes the collision probability and the
// Porter–Thomas distance of the output distribution at each requested depth,
// and summarises them per depth against the Haar values.
//
// Each instance is simulated once: its layers are applied incrementally and
// the statistics are read off at every requested depth on the way.
package scan
