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
//     worker counts or shards.
//
// Errors in graph and layout files are *ParseError values that carry the file
// and line and wrap one of the Err… sentinels; check them with errors.Is.
package circuits
