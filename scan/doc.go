// Package scan runs the Monte Carlo depth scan: it simulates seeded random
// circuit instances exactly, takes the collision probability and the
// Porter–Thomas distance of the output distribution at each requested depth,
// and summarises them per depth against the Haar values.
//
// Each instance is simulated once: its layers are applied incrementally and
// the statistics are read off at every requested depth on the way. The gates
// between two readouts, with the final single-qubit layer and its undo, run
// as one fused sequence (sim.State.Run), so a pass over memory applies many
// gates. Up to ExactKSQubits qubits the readout uses the array of
// probabilities; above, it keeps none: the collision probability and the
// Porter–Thomas histogram come from one pass over the amplitudes and
// stats.KSHaarPasses finishes the same statistic. Config.Precision PrecisionSingle
// keeps complex64 amplitudes (31 qubits in 16 GiB).
package scan
