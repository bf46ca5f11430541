// Package moments computes exact ensemble averages of second moments of
// random circuits, with no sampling: the expected collision probability
//
//	E[Z] = E Σ_x p_U(x)²,  p_U(x) = |⟨x|U|0…0⟩|²,
//
// after each depth of a schedule of random two-qubit gates.
//
// # Representation
//
// For a gate ensemble invariant under single-qubit unitaries, the two-copy
// average E[(U|0⟩⟨0|U†)^⊗2] lies, on every qubit touched by a gate, in
// span{I, S}, the identity and the swap of the two copies (Hunter-Jones,
// "Unitary designs from statistical mechanics in random quantum circuits",
// arXiv 1905.12053, 2019; Dalzell, Hunter-Jones, Brandão, PRX Quantum 3,
// 010333, 2022). The average is then a vector of coefficients c(σ),
// σ ∈ {I, S}^n, and a gate on the pair (a, b) acts by a 4×4 Transfer on
// the local states of a and b. A qubit no gate has touched is still in
// |0⟩⟨0|^⊗2 = F, which is not in span{I, S}: in a later twirl it acts like
// (I+S)/6 (the same Tr and Tr(·S)), and at readout it contributes 1 while
// I and S contribute Σ_x ⟨xx|σ|xx⟩ = 2. The readout is
//
//	E[Z] = Σ_σ c(σ) Π_q t_q(σ_q),  t(I) = t(S) = 2, t(F) = 1.
//
// Every engine here stores the readout-weighted coefficients
// u(σ) = c(σ) Π_q t_q(σ_q), so that E[Z] = Σ_σ u(σ). In these coordinates a
// Transfer is unchanged (I and S carry the same weight) and a fresh qubit
// enters a gate as F → (I+S)/3.
//
// # Engines
//
//   - Engine holds the 2^n vector for a deterministic gate sequence, such as
//     a layered schedule or a layout file, with a mask of the touched qubits;
//     an untouched qubit sits at σ_q = I with weight 1, meaning F. It needs
//     8·2^n bytes: about 30 qubits on a 24 GiB machine.
//
//   - The random-edge schedule is averaged exactly over the edge drawn at
//     each step, M = mean_e M_e. The set of untouched qubits is then random
//     and correlated with the rest of the state. Writing an untouched qubit
//     as (I+S)/6 + Δ, where Δ is killed by any gate and reads out 1/3, splits
//     the average into one identity/swap chain per subset A of qubits in Δ,
//     running only the gates that avoid A (the derivation is in random.go).
//     This is
//     exact with 2^n coefficients per worker, where a chain over the three
//     local states {I, S, F} would need 3^n; the work is |E|·3^(n−2)
//     four-coefficient updates per gate either way, which limits it to
//     CollisionRandomEdgeMaxQubits = 20 and in practice to about 14 qubits at depths of
//     thousands of gates (grid:3x4 takes about 2 ms per gate on two cores,
//     and each added qubit multiplies that by about 3).
//
//   - On the complete graph the random-edge average commutes with every
//     permutation of the qubits (for a transfer symmetric under exchanging
//     the two qubits of a gate), so the state reduces to the numbers
//     (n_I, n_S, n_F) of qubits in each local state: (N+1)(N+2)/2 weights,
//     which handles hundreds of qubits (3000 gates on 300 qubits take about
//     a second). The same reduction holds for any graph whose random-edge
//     average is permutation symmetric; among the graphs here only the
//     complete graph is.
//
//   - MPS holds the same coefficients as a matrix product state over a
//     linear order of the qubits (QubitOrder), in the Pauli-support gauge
//     where a Haar gate is an orthogonal projector, with SVD truncation to a
//     bond cap and the two conserved traces restored after truncation (see
//     mps.go). MPSCurve runs it on layered schedules of hundreds of qubits,
//     with an error estimate from a rerun at half the bond.
//
// # Noise
//
// XEBCurve and ExactNoise compute the expected linear cross-entropy
// benchmark under a circuits.ChipNoise: the same two-copy average with the
// noise on copy 1 only. Each channel keeps span{I, S}: a Pauli error after a
// gate is PairNoise(e)·T, single-qubit errors before a gate set's entangler
// are T·(SingleNoise ⊗ SingleNoise), and the readout becomes the weighted
// sum Σ_σ u(σ) Π_q w_q(σ_q) (the rules are derived in noise.go). Per-coupler
// rates make per-coupler transfers (EdgeTransfers), which every engine
// takes: the layered engine and the MPS per gate, the random-edge average
// per edge, and the complete-graph reduction when every coupler has the
// same one. Under noise the MPS restores only the total trace after
// truncation, the one invariant left.
//
// CollisionCurve picks the engine from the schedule; Exact picks between
// the vector and the MPS engine by ExactEngine.
//
// # Assumptions
//
// A Transfer describes a gate ensemble invariant under single-qubit unitaries
// on its inputs (so a fresh qubit may be replaced by (I+S)/6) and whose
// output lies in span{I, S}² (for instance a fixed entangler dressed with
// Haar-random single-qubit gates on both sides). Its entries may be negative;
// nothing here assumes HaarTransfer except where it says so.
//
// Memory is checked with sim.CheckMemory before a vector is allocated; an
// impossible size is an error wrapping sim.ErrTooLarge that states the GiB.
package moments
