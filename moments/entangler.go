package moments

import (
	"cmp"
	"fmt"
	"math/cmplx"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// wgQubit is the inverse of the Gram matrix Tr(V_σ V_τ) = [[4, 2], [2, 4]] of
// {I, S} on two copies of one qubit: the single-qubit Weingarten function,
// U(2), k = 2, Wg(e) = 1/(d²−1) = 1/3, Wg(swap) = −1/(d(d²−1)) = −1/6
// (Collins, "Moments and cumulants of polynomial random variables on unitary
// groups", IMRN 2003).
var wgQubit = [2][2]float64{{1.0 / 3, -1.0 / 6}, {-1.0 / 6, 1.0 / 3}}

// EntanglerTransfer returns the Transfer of the ensemble "Haar U(2) gates
// on both qubits, then the fixed gate G" (G row-major 4×4 in the basis
// 2·b_a + b_b, unitary), as the identity/swap engine uses it.
//
// On each qubit the input lies in span{I, S}, because every qubit's earlier
// history ends with a single-qubit Haar twirl (or the qubit is fresh and its
// gate's own twirl maps |0⟩⟨0|^⊗2 to (I+S)/6). The gate's own Haar layer
// u_a ⊗ u_b fixes every V_σ, so it acts as the identity there. G^⊗2 then
// leaves span{I, S}², but every operation that follows on qubit a (and on
// b) begins with an independent single-qubit Haar twirl — the Haar layer of
// the next gate on that qubit, or the final layer of the circuit — and that
// twirl projects each qubit back onto span{I, S}:
//
//	E_u u^⊗2 X u^†⊗2 = Σ_{σ,τ} Wg(στ) Tr(V_τ X) V_σ,  Wg = wgQubit,
//
// (Weingarten calculus; Collins 2003). Twirls of distinct qubits commute
// with gates elsewhere, so the projection may be placed right after G, and
// the twirl is idempotent, so the next gate's transfer treats its own layer
// as the identity. Hence, with σ, τ, τ' ∈ {I, S}² and V_σ = V_σa ⊗ V_σb,
//
//	T[τ][σ] = Σ_τ' Wg(τ_a τ'_a) Wg(τ_b τ'_b) · Tr(V_τ' G^⊗2 V_σ G^†⊗2),
//
// the coefficient of V_τ in the projection of G^⊗2 V_σ G^†⊗2. The
// identity gives the identity Transfer; II and SS are fixed for every
// unitary G (G^⊗2 commutes with both); averaging T over Haar-random G gives
// HaarTransfer, since T is a polynomial of degree (2, 2) in (G, Ḡ). The
// readout E[Z] = Σ c(σ) Π_q 2 is exact only when the circuit ends with the
// Haar single-qubit layer (circuits.Finisher): without it the last gates'
// outputs are not projected. EntanglerTransfer does not check that G is
// unitary.
func EntanglerTransfer(g *[16]complex128) Transfer {
	// B = G ⊗ G on two copies, basis 4·x1 + x2 with x = 2·b_a + b_b.
	var gg [16][16]complex128
	for r1 := 0; r1 < 4; r1++ {
		for r2 := 0; r2 < 4; r2++ {
			for c1 := 0; c1 < 4; c1++ {
				for c2 := 0; c2 < 4; c2++ {
					gg[4*r1+r2][4*c1+c2] = g[4*r1+c1] * g[4*r2+c2]
				}
			}
		}
	}
	// tr[τ'][σ] = Tr(V_τ' B V_σ B†) = Σ_i (B V_σ B†)[π_τ'(i)][i], with
	// (B V_σ)[r][k] = B[r][π_σ(k)] for the permutation matrix V_σ|k⟩ = |π_σ(k)⟩
	// (an involution).
	var tr [4][4]float64
	for s := 0; s < 4; s++ {
		for tp := 0; tp < 4; tp++ {
			var sum complex128
			for i := 0; i < 16; i++ {
				r := copyPermute(tp, i)
				for k := 0; k < 16; k++ {
					sum += gg[r][copyPermute(s, k)] * cmplx.Conj(gg[i][k])
				}
			}
			tr[tp][s] = real(sum) // Tr(V X) is real: X is Hermitian for σ an involution
		}
	}
	var t Transfer
	for tau := 0; tau < 4; tau++ {
		for s := 0; s < 4; s++ {
			var sum float64
			for tp := 0; tp < 4; tp++ {
				sum += wgQubit[tau>>1][tp>>1] * wgQubit[tau&1][tp&1] * tr[tp][s]
			}
			t[tau][s] = sum
		}
	}
	return t
}

// copyPermute applies V_σ, σ = 2·σ_a + σ_b, to the two-copy basis index
// i = 4·x1 + x2 (x = 2·b_a + b_b): σ_a = S exchanges the two copies' bits
// of qubit a, σ_b = S those of qubit b.
func copyPermute(sigma, i int) int {
	x1, x2 := i>>2, i&3
	if sigma>>1 == 1 {
		x1, x2 = x1&1|x2&2, x2&1|x1&2
	}
	if sigma&1 == 1 {
		x1, x2 = x1&2|x2&1, x2&2|x1&1
	}
	return 4*x1 + x2
}

// WallDecay returns the largest modulus among the eigenvalues of t other
// than the two fixed ones, II and SS (eigenvalue 1 for every unitary
// ensemble): the factor by which one gate shrinks a domain wall between I and
// S regions at worst. It is 0 for Haar U(4) gates. The two fixed eigenvalues
// come first in Eigenvalues' order of decreasing modulus.
func (t *Transfer) WallDecay() float64 {
	sub := 0.0
	for _, v := range t.Eigenvalues()[2:] {
		sub = max(sub, cmplx.Abs(v))
	}
	return sub
}

// Eigenvalues returns the four eigenvalues of t, computed by gonum's
// mat.Eigen, in decreasing order of modulus (ties: real part, then
// imaginary part, decreasing). Complex eigenvalues come in conjugate
// pairs. It panics if the factorisation fails, which does not happen for
// finite entries.
func (t *Transfer) Eigenvalues() []complex128 {
	a := mat.NewDense(4, 4, nil)
	for r := 0; r < 4; r++ {
		for c := 0; c < 4; c++ {
			a.Set(r, c, t[r][c])
		}
	}
	var e mat.Eigen
	if !e.Factorize(a, mat.EigenNone) {
		panic(fmt.Sprintf("moments: eigenvalue factorisation of the transfer %v failed", *t))
	}
	v := e.Values(nil)
	slices.SortStableFunc(v, func(x, y complex128) int {
		if c := cmp.Compare(cmplx.Abs(y), cmplx.Abs(x)); c != 0 {
			return c
		}
		if c := cmp.Compare(real(y), real(x)); c != 0 {
			return c
		}
		return cmp.Compare(imag(y), imag(x))
	})
	return v
}
