package moments

import "math"

// Transfer is the action of a two-qubit gate ensemble on the two-copy local
// states of its pair (a, b), in the basis {I, S}² with index 2·σ_a + σ_b
// (I = 0, S = 1, a the first qubit of the edge). The column is the input
// state and the row the output state:
//
//	E[G^⊗2 V_col G^†⊗2] = Σ_row T[row][col] V_row,
//
// V_σ the product over the pair of the identity or swap of the two copies.
type Transfer [4][4]float64

// HaarTransfer is the Transfer of a Haar-random U(4) gate: II → II, SS → SS,
// IS → (2/5)(II + SS) and SI → (2/5)(II + SS). By the Weingarten calculus
// for U(d), d = 4, k = 2 (Collins, "Moments and cumulants of polynomial
// random variables on unitary groups", IMRN 2003),
//
//	E[U^⊗2 X U^†⊗2] = Σ_{π,τ} Wg(πτ⁻¹) Tr(X V_π) V_τ,  Wg(e) = 1/15, Wg(swap) = −1/60,
//
// and Tr(V_IS) = Tr(V_IS V_SS) = 8, so IS has weight 8(1/15 − 1/60) = 2/5
// on each of II and SS.
var HaarTransfer = Transfer{
	{1, 0.4, 0.4, 0},
	{0, 0, 0, 0},
	{0, 0, 0, 0},
	{0, 0.4, 0.4, 1},
}

// transferSwap maps a local pair state 2·σ_a + σ_b to 2·σ_b + σ_a.
var transferSwap = [4]int{0, 2, 1, 3}

// swapped returns the transfer of the same ensemble with the roles of the
// two qubits exchanged.
func (t *Transfer) swapped() Transfer {
	var s Transfer
	for r := range 4 {
		for c := range 4 {
			s[transferSwap[r]][transferSwap[c]] = t[r][c]
		}
	}
	return s
}

// symmetric reports whether t is unchanged, to within tol times its largest
// entry, when the two qubits exchange roles. Transfers of ensembles built
// from a fixed two-qubit gate dressed with single-qubit Haar gates are
// symmetric, since every two-qubit gate is locally equivalent to its
// conjugate by the swap gate (the Cartan, or KAK, decomposition).
func (t *Transfer) symmetric(tol float64) bool {
	s := t.swapped()
	scale := 0.0
	for r := range 4 {
		for c := range 4 {
			scale = max(scale, math.Abs(t[r][c]))
		}
	}
	for r := range 4 {
		for c := range 4 {
			if math.Abs(t[r][c]-s[r][c]) > tol*scale {
				return false
			}
		}
	}
	return true
}

// transferFresh is the readout-weighted map of a fresh qubit into a gate:
// F, with weight 1, enters as (I+S)/6, whose coefficients carry weight 2.
const transferFresh = 1.0 / 3

// withFresh returns t·(P_a ⊗ P_b) for the two-state engine, where P_q is
// the identity for a touched qubit and, for a fresh one (stored at σ_q = I),
// sends I to (I+S)/3. A fresh qubit has no S component, so P_q's S column is
// zero.
func (t *Transfer) withFresh(freshA, freshB bool) Transfer {
	p := func(fresh bool) [2][2]float64 {
		if fresh {
			return [2][2]float64{{transferFresh, 0}, {transferFresh, 0}}
		}
		return [2][2]float64{{1, 0}, {0, 1}}
	}
	pa, pb := p(freshA), p(freshB)
	var out Transfer
	for r := range 4 {
		for x := range 2 {
			for y := range 2 {
				var sum float64
				for xi := range 2 {
					for yi := range 2 {
						sum += t[r][2*xi+yi] * pa[xi][x] * pb[yi][y]
					}
				}
				out[r][2*x+y] = sum
			}
		}
	}
	return out
}

// Local states of the three-state maps (threeState): the identity and the
// swap of the two copies, and a fresh qubit, |0⟩⟨0|^⊗2, that no gate has
// touched.
const (
	transferI = 0
	transferS = 1
	transferF = 2
)

// threeState returns the 4×9 readout-weighted map on three local states
// used by the complete-graph reduction: the input column 3·x + y has local
// states x, y ∈ {I, S, F} (0, 1, 2), F entering as (I+S)/3; the output row
// 2·p + q has p, q ∈ {I, S}. Every entry is multiplied by scale.
func (t *Transfer) threeState(scale float64) [4][9]float64 {
	// p3[x'][x]: weight of two-state x' in three-state x.
	p3 := [2][3]float64{{1, 0, transferFresh}, {0, 1, transferFresh}}
	var out [4][9]float64
	for r := range 4 {
		for x := range 3 {
			for y := range 3 {
				var sum float64
				for xi := range 2 {
					for yi := range 2 {
						sum += t[r][2*xi+yi] * p3[xi][x] * p3[yi][y]
					}
				}
				out[r][3*x+y] = scale * sum
			}
		}
	}
	return out
}
