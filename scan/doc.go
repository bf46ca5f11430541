// Package scan runs the Monte Carlo depth scan: it simulates seeded random
// circuit instances exactly, takes the collision probability and the
// Porter–Thomas distance of the output distribution at each requested depth,
// and summarises them per depth against the Haar values.
//
// Each instance is simulated once: its layers are applied incrementally and
// the statistics are read off at every requested depth on the way. The gates
// between two readouts, with the final single-qubit layer and its undo, run
// as one fused sequence (sim.State.Run), so a pass over memory applies many
// gates. The Porter–Thomas distance comes from stats.HaarKS: a histogram
// and usually one more pass that collects the few bins that can hold the
// supremum. The readout keeps no array of probabilities: the collision
// probability and the histogram come from one loop over the amplitudes,
// and the collect pass goes over them again. Config.Precision PrecisionSingle
// keeps complex64 amplitudes (31 qubits in 16 GiB).
package scan
