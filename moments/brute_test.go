package moments

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"

	"mixdepth/circuits"
)

// bruteRho is the two-copy operator X of an n-qubit state, stored densely:
// row and column indices have 2n bits, copy 1's qubit q at bit q and copy
// 2's at bit n+q. It is the independent route to the second moment used to
// check the engines: gates act on it by the Weingarten twirl and by
// conjugation, with no identity/swap bookkeeping.
type bruteRho struct {
	n, dim int
	x      []float64 // row-major dim × dim; every operator here is real
}

// newBruteRho returns (|0…0⟩⟨0…0|)^⊗2.
func newBruteRho(n int) *bruteRho {
	dim := 1 << (2 * n)
	r := &bruteRho{n: n, dim: dim, x: make([]float64, dim*dim)}
	r.x[0] = 1
	return r
}

func (r *bruteRho) clone() *bruteRho {
	return &bruteRho{n: r.n, dim: r.dim, x: append([]float64(nil), r.x...)}
}

// bits returns the 2n-bit index of the subsystem configuration p of the
// qubits qs: bit j of p (j < k) is copy 1's qubit qs[j], bit k+j copy 2's.
func (r *bruteRho) bits(qs []int, p int) int {
	k := len(qs)
	idx := 0
	for j, q := range qs {
		idx |= (p >> j & 1) << q
		idx |= (p >> (k + j) & 1) << (r.n + q)
	}
	return idx
}

// twirl replaces X by E[W^⊗2 X W^†⊗2] over Haar-random W ∈ U(2^k) on the
// qubits qs, by the Weingarten formula for k = 2 copies (Collins, IMRN 2003):
//
//	E[W^⊗2 X W^†⊗2] = Σ_{π,τ} Wg(πτ⁻¹) Tr_qs(X V_π) V_τ,
//	Wg(e) = 1/(d²−1), Wg(swap) = −1/(d(d²−1)), d = 2^k,
//
// which gives 1/15, −1/60 for d = 4 and 1/3, −1/6 for d = 2.
func (r *bruteRho) twirl(qs []int) {
	k := len(qs)
	d := float64(int(1) << k)
	wgE, wgS := 1/(d*d-1), -1/(d*(d*d-1))
	np := 1 << (2 * k)
	sw := func(p int) int { return p>>k | (p&(1<<k-1))<<k }
	off := make([]int, np)
	offSw := make([]int, np)
	mask := 0
	for p := range np {
		off[p] = r.bits(qs, p)
		offSw[p] = r.bits(qs, sw(p))
		mask |= off[p]
	}
	dim := r.dim
	for r0 := 0; r0 < dim; r0++ {
		if r0&mask != 0 {
			continue
		}
		for c0 := 0; c0 < dim; c0++ {
			if c0&mask != 0 {
				continue
			}
			var re, rs float64 // Tr_qs(X V_e), Tr_qs(X V_swap) at (r0, c0)
			for p := range np {
				re += r.x[(r0|off[p])*dim+c0|off[p]]
				rs += r.x[(r0|off[p])*dim+c0|offSw[p]]
			}
			ce, cs := wgE*re+wgS*rs, wgS*re+wgE*rs
			for p := range np {
				for q := range np {
					r.x[(r0|off[p])*dim+c0|off[q]] = 0
				}
			}
			for p := range np {
				r.x[(r0|off[p])*dim+c0|off[p]] += ce
				r.x[(r0|off[p])*dim+c0|offSw[p]] += cs
			}
		}
	}
}

// conj replaces X by (G⊗G) X (G⊗G)^T for a real gate G (row-major 4×4 in
// the basis |b_a b_b⟩, index 2·b_a + b_b) on qubits (a, b) of both copies.
func (r *bruteRho) conj(g *[16]float64, a, b int) {
	dim := r.dim
	vec := make([]float64, dim)
	apply := func(v []float64, pa, pb int) {
		for i := range v {
			if i>>pa&1 != 0 || i>>pb&1 != 0 {
				continue
			}
			idx := [4]int{i, i | 1<<pb, i | 1<<pa, i | 1<<pa | 1<<pb}
			var in, out [4]float64
			for s := range 4 {
				in[s] = v[idx[s]]
			}
			for s := range 4 {
				for t := range 4 {
					out[s] += g[4*s+t] * in[t]
				}
			}
			for s := range 4 {
				v[idx[s]] = out[s]
			}
		}
	}
	// Left: every column; right (X K^T = (K X^T)^T): every row.
	for c := range dim {
		for i := range dim {
			vec[i] = r.x[i*dim+c]
		}
		apply(vec, a, b)
		apply(vec, r.n+a, r.n+b)
		for i := range dim {
			r.x[i*dim+c] = vec[i]
		}
	}
	for i := range dim {
		row := r.x[i*dim : (i+1)*dim]
		apply(row, a, b)
		apply(row, r.n+a, r.n+b)
	}
}

// dressed applies the gate (W_a ⊗ W_b) G (W'_a ⊗ W'_b) averaged over
// Haar-random single-qubit W, W'.
func (r *bruteRho) dressed(g *[16]float64, a, b int) {
	r.twirl([]int{a})
	r.twirl([]int{b})
	r.conj(g, a, b)
	r.twirl([]int{a})
	r.twirl([]int{b})
}

// collision returns Σ_x ⟨xx|X|xx⟩, which is E[Σ_x p(x)²] for X the
// two-copy average.
func (r *bruteRho) collision() float64 {
	var sum float64
	for x := 0; x < 1<<r.n; x++ {
		i := x | x<<r.n
		sum += r.x[i*r.dim+i]
	}
	return sum
}

// bruteGate applies one gate of an ensemble to a bruteRho.
type bruteGate func(r *bruteRho, a, b int)

func bruteHaar(r *bruteRho, a, b int) { r.twirl([]int{a, b}) }

func bruteDressed(g *[16]float64) bruteGate {
	return func(r *bruteRho, a, b int) { r.dressed(g, a, b) }
}

// bruteLayered returns E[Z] after depth layers of s.
func bruteLayered(n int, s *circuits.Layered, gate bruteGate, depth int) float64 {
	r := newBruteRho(n)
	for d := range depth {
		for _, e := range s.Step(d, nil, nil) {
			gate(r, e.A, e.B)
		}
	}
	return r.collision()
}

// bruteRandomEdge returns E[Z] after depth random-edge gates on edges by
// enumerating all |E|^depth edge sequences, each equally likely.
func bruteRandomEdge(n int, edges []circuits.Edge, gate bruteGate, depth int) float64 {
	var walk func(r *bruteRho, left int) float64
	walk = func(r *bruteRho, left int) float64 {
		if left == 0 {
			return r.collision()
		}
		var sum float64
		for _, e := range edges {
			c := r.clone()
			gate(c, e.A, e.B)
			sum += walk(c, left-1)
		}
		return sum / float64(len(edges))
	}
	return walk(newBruteRho(n), depth)
}

// bruteV returns the two-qubit two-copy operator V_σ, σ = 2·σ_a + σ_b with
// a = qubit 0 and b = qubit 1: the product of the identity (0) or swap (1)
// of the copies of each qubit.
func bruteV(sigma int) *bruteRho {
	r := newBruteRho(2)
	r.x[0] = 0
	sa, sb := sigma>>1&1, sigma&1
	for c := range r.dim {
		row := c
		if sa == 1 { // swap bits 0 and 2
			b0, b2 := row&1, row>>2&1
			row = row&^5 | b2 | b0<<2
		}
		if sb == 1 { // swap bits 1 and 3
			b1, b3 := row>>1&1, row>>3&1
			row = row&^10 | b3<<1 | b1<<3
		}
		r.x[row*r.dim+c] = 1
	}
	return r
}

// bruteTrace returns Tr(A B) of two-qubit two-copy operators.
func bruteTrace(a, b *bruteRho) float64 {
	var sum float64
	for i := range a.dim {
		for j := range a.dim {
			sum += a.x[i*a.dim+j] * b.x[j*a.dim+i]
		}
	}
	return sum
}

// bruteTransfer derives the Transfer of the ensemble gate from its action
// on the operators V_σ: with Y_σ = gate(V_σ) in span{V_τ}, the coefficients
// solve Σ_τ Tr(V_τ' V_τ) T[τ][σ] = Tr(V_τ' Y_σ) (Weingarten calculus, Collins 2003: a transfer
// computed from traces of G^⊗2 V_σ G^†⊗2 V_τ). The 4×4 Gram solve uses gonum.
func bruteTransfer(t *testing.T, gate bruteGate) Transfer {
	t.Helper()
	var vs [4]*bruteRho
	for s := range 4 {
		vs[s] = bruteV(s)
	}
	gram := mat.NewDense(4, 4, nil)
	rhs := mat.NewDense(4, 4, nil)
	for s := range 4 {
		y := vs[s].clone()
		gate(y, 0, 1)
		for tp := range 4 {
			rhs.Set(tp, s, bruteTrace(vs[tp], y))
			gram.Set(tp, s, bruteTrace(vs[tp], vs[s]))
		}
	}
	var sol mat.Dense
	if err := sol.Solve(gram, rhs); err != nil {
		t.Fatalf("Gram solve: %v", err)
	}
	var out Transfer
	for r := range 4 {
		for c := range 4 {
			out[r][c] = sol.At(r, c)
		}
	}
	return out
}

// bruteCNOT is the controlled-NOT with control a, row-major in |b_a b_b⟩.
var bruteCNOT = [16]float64{
	1, 0, 0, 0,
	0, 1, 0, 0,
	0, 0, 0, 1,
	0, 0, 1, 0,
}

// bruteGivens returns the real rotation by θ in the span of |01⟩, |10⟩, a
// partial entangler: exp(θ(|10⟩⟨01| − |01⟩⟨10|)).
func bruteGivens(theta float64) *[16]float64 {
	c, s := math.Cos(theta), math.Sin(theta)
	return &[16]float64{
		1, 0, 0, 0,
		0, c, -s, 0,
		0, s, c, 0,
		0, 0, 0, 1,
	}
}
