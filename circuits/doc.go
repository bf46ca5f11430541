// Package circuits describes random circuits: coupling graphs, the schedules
// that place two-qubit gates on their edges, the gate ensembles the gates are
// drawn from, and the seeded circuit instances built from all three.
//
// Conventions (shared by every package of mixdepth):
//
//   - Qubits are 0..n-1 and basis index x = Σ b_q 2^q.
//   - A two-qubit gate on edge (a, b) is a 4×4 row-major matrix in the basis
//     |b_a b_b⟩ with index 2·b_a + b_b.
//   - A layered schedule splits the edges into classes of disjoint edges and
//     cycles through them; a random-edge schedule draws one edge uniformly per
//     gate.
//   - Instance i of a run with seed s draws every random choice from its own
//     stream, derived only from (s, i) by Stream, so results do not depend on
//     worker counts or parts.
//
// Gate sets (NewEnsemble specs): "haar" (Haar U(4)), "clifford" (uniform on
// the two-qubit Clifford group modulo phases), "NAME+haar1" (Haar U(2) on
// both qubits, then the entangler NAME) and gate-set files (a fixed
// entangler after single-qubit gates that are Haar or drawn from a finite
// set; see ReadGateSet). Convention: circuits of the "…+haar1" sets and of
// gate-set files end with one layer of single-qubit gates on every qubit
// before measurement (Haar, or drawn from the file's finite set), as
// random-circuit experiments commonly do; with Haar single-qubit gates this
// makes the whole ensemble invariant under single-qubit rotations. Such
// ensembles implement Finisher, and the final layer of instance i at depth d
// draws from FinalStream(s, i, d), so reading out more depths never changes
// the gate layers. SecondMoments tells the exact second-moment engine
// whether an ensemble's two-copy average stays in span{I, S} per qubit and
// which transfer applies: Haar U(4)'s (Haar, Clifford) or that of an
// entangler dressed by Haar U(2) gates.
//
// Errors in graph and layout files are *ParseError values that carry the file
// and line and wrap one of the Err… sentinels; check them with errors.Is.
// Gate-set specs and files fail with *ParseError values wrapping
// ErrUnknownGateSet or ErrGateSet.
//
// Noise. ChipNoise holds a chip's error rates per coupler and per qubit,
// shared by the exact engines and the sampler; ReadCalibration reads them
// from a calibration file (CSV of this project's own design), whose errors
// are *ParseError values wrapping ErrCalibration.
package circuits
