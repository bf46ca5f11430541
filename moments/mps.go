package moments

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"mixdepth/circuits"
)

// The MPS engine stores the identity/swap coefficients u(σ) of the package
// documentation as a matrix product state over a linear order of the
// qubits, in a local gauge chosen so that plain SVD truncation is safe.
//
// # The gauge
//
// Per qubit, the coordinates (u_I, u_S) are replaced by
//
//	ψ = G·u,  G = [[1, 1/2], [0, √3/2]].
//
// This is the Pauli-support chain of the package documentation (Z, and the
// swap S = ½ Σ_P P⊗P, written on Pauli supports: mass w_0 = u_I + u_S/2 on
// the identity and w_1 = (3/2)·u_S on the three non-identity Paulis) scaled
// by the square root of its stationary weight π ∝ 3^|A|, ψ_1 = w_1/√3. In
// these coordinates a Haar U(4) gate is an orthogonal projector (the chain
// is reversible for π, so its symmetrised matrix is symmetric, and it is
// idempotent): II → II, and the other three pair states onto the unit vector
// (1, 1, √3)/√5. Every Haar layer is therefore a contraction of the 2-norm,
// an SVD truncation removes a piece that no later Haar gate can enlarge, and
// both ends of the curve are products: the fresh state (1/2, 1/(2√3)) per
// qubit at shallow depth and the Haar limit (∝ (1, √3) per qubit plus the
// identity pattern) at large depth. The readout Σ_σ u(σ) is the product
// functional f = (1, 1/√3) per qubit, and f is parallel to the fresh state:
// the norm of the state follows its sum.
//
// What we measured before choosing it (line:20 brickwork, Haar gates, bond
// dimension 16, depths 1..60, against the vector engine): in the {I, S}
// basis of the vector engine plain 2-norm truncation ends at R = 1.018
// instead of 1.000004 (the diffuse product (1/3, 1/3)^n has a sum 2^(n/2)
// times its norm, so SVD discards it early); in the Hadamard basis
// (u_I + u_S, u_I − u_S) the early state is fine but the Haar limit
// all-I + all-S spreads over every string with an even number of minus
// signs, with the same 2^(n/2) mismatch at large depth. The gauge above has
// neither mismatch, and its Haar gate is a projector; see TestMPSGauge for
// the checks.
//
// # Gates between qubits far apart in the order
//
// A gate on qubits at sites i < j of the order first moves the qubit at j
// to site i+1 by adjacent swaps (each a two-site update with SVD), applies
// the gate there, and moves it back, so the order is the same after every
// gate. This costs 2(j−i)−1 two-site updates; an MPO for the gate would have
// bond dimension 4 across the j−i bonds between and its compression costs
// the same order of SVDs, so the swap network is the simpler choice. The
// order (see QubitOrder) keeps j−i at most the bandwidth of the graph.

// mpsGauge is G and mpsGaugeInv is G⁻¹ (see the comment above).
var (
	mpsGauge    = [2][2]float64{{1, 0.5}, {0, math.Sqrt(3) / 2}}
	mpsGaugeInv = [2][2]float64{{1, -1 / math.Sqrt(3)}, {0, 2 / math.Sqrt(3)}}
	// mpsReadout is the readout functional (1, 1)·G⁻¹ per qubit: Σ_σ u(σ)
	// in the gauged coordinates. An untouched qubit, stored at (1, 0),
	// reads out 1 with it, as in Engine.
	mpsReadout = [2]float64{1, 1 / math.Sqrt(3)}
)

// MPSCutoff is the relative singular value below which every SVD of an MPS
// drops a direction even when the bond dimension allows it: a direction
// with σ < MPSCutoff·σ_max changes the state by less than the rounding of
// the two-site update that produced it.
const MPSCutoff = 1e-15

// MPS is the matrix product state of the gauged identity/swap coefficients
// of a deterministic gate sequence (see the comment at the top of mps.go).
// Site k holds qubit Order()[k]. The zero MPS is not usable; call NewMPS.
type MPS struct {
	n       int
	maxBond int
	order   []int // order[site] = qubit
	site    []int // site[qubit] = position in order
	touched []bool
	// a[k] is the tensor of site k with shape bond[k] × 2 × bond[k+1],
	// stored row-major: element (l, s, r) at (l·2+s)·bond[k+1] + r.
	a    [][]float64
	bond []int
	// center is the orthogonality centre: every site left of it is left
	// orthonormal, every site right of it right orthonormal, so the norm of
	// the state is the norm of a[center].
	center int
	// logScale is the log of the factor that multiplies the stored state;
	// the stored state keeps norm 1.
	logScale float64
	// maxUsed is the largest bond reached; discarded sums the squared
	// relative norms of the pieces that truncation removed.
	maxUsed   int
	discarded float64
}

// NewMPS returns an MPS for n qubits in the state |0…0⟩ (every qubit
// untouched) over the given order of the qubits (a permutation of
// 0..n−1), with bonds capped at maxBond. It panics if n < 2, maxBond < 1
// or order is not a permutation of 0..n−1.
func NewMPS(n int, order []int, maxBond int) *MPS {
	if n < 2 || maxBond < 1 || len(order) != n {
		panic(fmt.Sprintf("moments: NewMPS with %d qubits, an order of %d and bond dimension %d", n, len(order), maxBond))
	}
	m := &MPS{n: n, maxBond: maxBond, order: append([]int(nil), order...), site: make([]int, n),
		touched: make([]bool, n), a: make([][]float64, n), bond: make([]int, n+1), maxUsed: 1}
	for i := range m.site {
		m.site[i] = -1
	}
	for k, q := range order {
		if q < 0 || q >= n || m.site[q] >= 0 {
			panic(fmt.Sprintf("moments: NewMPS with an order that is not a permutation of 0..%d", n-1))
		}
		m.site[q] = k
	}
	for k := range m.a {
		m.a[k] = []float64{1, 0}
	}
	for k := range m.bond {
		m.bond[k] = 1
	}
	return m
}

// Qubits returns n.
func (m *MPS) Qubits() int { return m.n }

// Order returns the qubit at each site (a copy).
func (m *MPS) Order() []int { return append([]int(nil), m.order...) }

// Touched reports whether a gate has acted on qubit q.
func (m *MPS) Touched(q int) bool { return m.touched[q] }

// MaxBondUsed returns the largest bond dimension the state has reached.
func (m *MPS) MaxBondUsed() int { return m.maxUsed }

// Discarded returns the sum, over every truncation so far, of the squared
// norm of the removed piece relative to the state's norm squared. Since the
// Haar gates are contractions in this gauge, the square root of the sum of
// the removed norms bounds the 2-norm distance to the untruncated state
// (see the comment at the top of mps.go).
func (m *MPS) Discarded() float64 { return m.discarded }

// Apply averages a gate on the pair (a, b) drawn from the ensemble with
// transfer t, as Engine.Apply does. It panics if a == b, either is out of
// range, or t is nil.
func (m *MPS) Apply(a, b int, t *Transfer) {
	if a == b || a < 0 || b < 0 || a >= m.n || b >= m.n {
		panic(fmt.Sprintf("moments: Apply on qubits (%d, %d) of a %d-qubit MPS", a, b, m.n))
	}
	if t == nil {
		panic("moments: Apply with a nil Transfer")
	}
	u := *t
	if !m.touched[a] || !m.touched[b] {
		u = t.withFresh(!m.touched[a], !m.touched[b])
	}
	m.touched[a], m.touched[b] = true, true
	g := mpsGauged(&u)
	// Move b next to a, apply, move it back.
	home := m.site[b]
	step := 1
	if m.site[a] < home {
		step = -1
	}
	for m.site[b]-m.site[a] != -step {
		m.swapSites(min(m.site[b], m.site[b]+step), step < 0)
	}
	i := min(m.site[a], m.site[b])
	if m.site[a] > m.site[b] {
		g = g.swapped()
	}
	m.update(i, &g, step < 0)
	for m.site[b] != home {
		m.swapSites(min(m.site[b], m.site[b]-step), step > 0)
	}
}

// mpsGauged returns (G⊗G)·t·(G⁻¹⊗G⁻¹).
func mpsGauged(t *Transfer) Transfer {
	var out Transfer
	for r := range 4 {
		for c := range 4 {
			var s float64
			for x := range 4 {
				gl := mpsGauge[r>>1][x>>1] * mpsGauge[r&1][x&1]
				if gl == 0 {
					continue
				}
				for y := range 4 {
					s += gl * t[x][y] * mpsGaugeInv[y>>1][c>>1] * mpsGaugeInv[y&1][c&1]
				}
			}
			out[r][c] = s
		}
	}
	return out
}

// mpsSwap exchanges the two sites of a pair.
var mpsSwap = Transfer{{1, 0, 0, 0}, {0, 0, 1, 0}, {0, 1, 0, 0}, {0, 0, 0, 1}}

// swapSites exchanges the qubits at sites k and k+1, leaving the centre at
// k when left is true and at k+1 otherwise.
func (m *MPS) swapSites(k int, left bool) {
	m.update(k, &mpsSwap, left)
	qa, qb := m.order[k], m.order[k+1]
	m.order[k], m.order[k+1] = qb, qa
	m.site[qa], m.site[qb] = k+1, k
}

// update applies the 4×4 matrix g (index 2·s_k + s_{k+1}) to sites k, k+1,
// splits the result by SVD truncated to maxBond, and leaves the centre at k
// when left is true and at k+1 otherwise.
func (m *MPS) update(k int, g *Transfer, left bool) {
	m.moveCenter(k)
	l, mid, r := m.bond[k], m.bond[k+1], m.bond[k+2]
	ak, ak1 := m.a[k], m.a[k+1]
	// θ(l, s1, s2, r) = Σ_m a_k(l, s1, m) a_{k+1}(m, s2, r).
	theta := make([]float64, l*4*r)
	for li := range l {
		for s1 := range 2 {
			row := ak[(li*2+s1)*mid : (li*2+s1+1)*mid]
			for mi, v := range row {
				if v == 0 {
					continue
				}
				src := ak1[mi*2*r : (mi+1)*2*r]
				dst := theta[(li*2+s1)*2*r : (li*2+s1+1)*2*r]
				for j, w := range src {
					dst[j] += v * w
				}
			}
		}
	}
	// Apply g on (s1, s2): X(l·2+p1, p2·r+ri) = Σ_q g[p][q] θ(l, q, ri).
	x := mat.NewDense(2*l, 2*r, nil)
	xd := x.RawMatrix().Data
	for li := range l {
		base := li * 4 * r
		for p := range 4 {
			dst := xd[base+p*r : base+(p+1)*r]
			for q := range 4 {
				c := g[p][q]
				if c == 0 {
					continue
				}
				src := theta[base+q*r : base+(q+1)*r]
				for j, w := range src {
					dst[j] += c * w
				}
			}
		}
	}
	var svd mat.SVD
	if !svd.Factorize(x, mat.SVDThin) {
		panic("moments: SVD of a two-site MPS update did not converge")
	}
	sv := svd.Values(nil)
	var total float64
	for _, v := range sv {
		total += v * v
	}
	keep := 0
	for keep < len(sv) && keep < m.maxBond && sv[keep] > MPSCutoff*sv[0] {
		keep++
	}
	keep = max(keep, 1)
	var kept float64
	for _, v := range sv[:keep] {
		kept += v * v
	}
	if total > 0 {
		m.discarded += (total - kept) / total
	}
	norm := math.Sqrt(kept)
	if norm == 0 {
		panic("moments: an MPS update produced the zero state")
	}
	m.logScale += math.Log(norm)
	var u, v mat.Dense
	svd.UTo(&u)
	svd.VTo(&v)
	newK := make([]float64, l*2*keep)
	newK1 := make([]float64, keep*2*r)
	for i := range 2 * l {
		for j := range keep {
			w := u.At(i, j)
			if left {
				w *= sv[j] / norm
			}
			newK[i*keep+j] = w
		}
	}
	for j := range keep {
		sc := 1.0
		if !left {
			sc = sv[j] / norm
		}
		for c := range 2 * r {
			newK1[j*2*r+c] = sc * v.At(c, j)
		}
	}
	m.a[k], m.a[k+1] = newK, newK1
	m.bond[k+1] = keep
	m.maxUsed = max(m.maxUsed, keep)
	if left {
		m.center = k
	} else {
		m.center = k + 1
	}
}

// moveCenter moves the orthogonality centre to site k (or k+1, whichever
// is nearer, when the centre is already at one of them it stays).
func (m *MPS) moveCenter(k int) {
	for m.center < k {
		m.shiftRight()
	}
	for m.center > k+1 {
		m.shiftLeft()
	}
}

// shiftRight moves the centre from c to c+1 by a QR factorisation of site
// c (reshaped to (bond·2) × bond'), or an SVD when that matrix is wide.
func (m *MPS) shiftRight() {
	c := m.center
	l, r, r2 := m.bond[c], m.bond[c+1], m.bond[c+2]
	a := mat.NewDense(2*l, r, m.a[c])
	var q, rr *mat.Dense
	if 2*l >= r {
		var qr mat.QR
		qr.Factorize(a)
		var qf, rf mat.Dense
		qr.QTo(&qf)
		qr.RTo(&rf)
		q = mat.DenseCopyOf(qf.Slice(0, 2*l, 0, r))
		rr = mat.DenseCopyOf(rf.Slice(0, r, 0, r))
	} else {
		q, rr = mpsSplitSVD(a)
	}
	k := q.RawMatrix().Cols
	next := mat.NewDense(r, 2*r2, m.a[c+1])
	var prod mat.Dense
	prod.Mul(rr, next)
	m.a[c] = q.RawMatrix().Data
	m.a[c+1] = mpsData(&prod)
	m.bond[c+1] = k
	m.center = c + 1
}

// shiftLeft moves the centre from c to c−1 by a QR factorisation of the
// transpose of site c (reshaped to bond × (2·bond')).
func (m *MPS) shiftLeft() {
	c := m.center
	l0, l, r := m.bond[c-1], m.bond[c], m.bond[c+1]
	a := mat.NewDense(l, 2*r, m.a[c])
	var q, rr *mat.Dense
	if 2*r >= l {
		var qr mat.QR
		qr.Factorize(a.T())
		var qf, rf mat.Dense
		qr.QTo(&qf)
		qr.RTo(&rf)
		q = mat.DenseCopyOf(qf.Slice(0, 2*r, 0, l))
		rr = mat.DenseCopyOf(rf.Slice(0, l, 0, l))
	} else {
		q, rr = mpsSplitSVD(a.T())
	}
	// a = rrᵀ·qᵀ: site c becomes qᵀ, site c−1 absorbs rrᵀ.
	k := q.RawMatrix().Cols
	prev := mat.NewDense(2*l0, l, m.a[c-1])
	var prod mat.Dense
	prod.Mul(prev, rr.T())
	m.a[c-1] = mpsData(&prod)
	m.a[c] = mpsData(mat.DenseCopyOf(q.T()))
	m.bond[c] = k
	m.center = c - 1
}

// mpsSplitSVD factors a = q·rr with q having orthonormal columns, by an SVD
// (q = U, rr = Σ·Vᵀ), for a matrix with fewer rows than columns.
func mpsSplitSVD(a mat.Matrix) (q, rr *mat.Dense) {
	var svd mat.SVD
	if !svd.Factorize(a, mat.SVDThin) {
		panic("moments: SVD of an MPS site did not converge")
	}
	sv := svd.Values(nil)
	var u, v mat.Dense
	svd.UTo(&u)
	svd.VTo(&v)
	_, cols := v.Dims()
	rr = mat.NewDense(cols, v.RawMatrix().Rows, nil)
	rr.Mul(mat.NewDiagDense(len(sv), sv), v.T())
	return &u, rr
}

// mpsData returns the row-major data of d with no padding.
func mpsData(d *mat.Dense) []float64 {
	raw := d.RawMatrix()
	if raw.Stride == raw.Cols {
		return raw.Data[:raw.Rows*raw.Cols]
	}
	return mat.DenseCopyOf(d).RawMatrix().Data
}

// mpsContract returns ln|⟨f, ψ⟩| and the sign of ⟨f, ψ⟩ for the product
// functional f(q) per qubit, including the scale of the stored state. The
// environment is renormalised at every site, so no intermediate overflows.
func (m *MPS) mpsContract(f func(q int) [2]float64) (logAbs, sign float64) {
	env := []float64{1}
	logAbs = m.logScale
	for k := range m.n {
		r := m.bond[k+1]
		next := make([]float64, r)
		ak := m.a[k]
		fk := f(m.order[k])
		for l, e := range env {
			for s := range 2 {
				w := e * fk[s]
				if w == 0 {
					continue
				}
				row := ak[(l*2+s)*r : (l*2+s+1)*r]
				for j, v := range row {
					next[j] += w * v
				}
			}
		}
		big := 0.0
		for _, v := range next {
			big = max(big, math.Abs(v))
		}
		if big == 0 {
			return math.Inf(-1), 0
		}
		for j := range next {
			next[j] /= big
		}
		logAbs += math.Log(big)
		env = next
	}
	return logAbs, math.Copysign(1, env[0])
}

// mpsValue returns ⟨f, ψ⟩ as a float64 (it may underflow to 0 or
// overflow to ±Inf only when the value itself is beyond float64).
func (m *MPS) mpsValue(f func(q int) [2]float64) float64 {
	l, s := m.mpsContract(f)
	return s * math.Exp(l)
}

// Invariants returns the two conserved quantities of the stored state,
// Tr X and Tr(S X) for the two-copy operator X it represents (S the swap of
// the two copies of all n qubits). Every unitary gate keeps both (U⊗U
// commutes with S), and both are 1 for |0…0⟩^⊗2, so the difference from 1 is
// what truncation has removed from them. Per qubit, Tr reads (2, 1) and
// Tr(S·) reads (1, 2) on the readout-weighted (u_I, u_S), and 1 on an
// untouched qubit; in the gauge of mps.go these are (2, 0) and (1, √3): the
// identity pattern and the total mass of the Pauli-support chain.
func (m *MPS) Invariants() (tr, trS float64) {
	tr = m.mpsValue(func(q int) [2]float64 {
		if m.touched[q] {
			return [2]float64{2, 0}
		}
		return [2]float64{1, 0}
	})
	trS = m.mpsValue(func(q int) [2]float64 {
		if m.touched[q] {
			return [2]float64{1, math.Sqrt(3)}
		}
		return [2]float64{1, 0}
	})
	return tr, trS
}

// Ratio returns E[Z]/Z_H, Z_H = 2/(2^n+1), for the gates applied so far,
// with the weights truncation removed from the two conserved quantities
// restored on the two states every gate fixes: X = Y + α·I^⊗n + β·S^⊗n,
// Y the stored state, with α, β chosen so that Tr X = Tr(S X) = 1 (see
// Invariants). A piece removed by truncation relaxes, under later mixing
// gates, to exactly this combination of I^⊗n and S^⊗n, so the restored
// weights are what the removed pieces would have contributed once they
// relaxed; without them a truncation at shallow depth moves the Haar limit
// itself. With final true every untouched qubit reads out 2/3 instead of 1
// (see CollisionFinalLayer).
func (m *MPS) Ratio(final bool) float64 {
	n := m.n
	lz, sz := m.mpsContract(func(q int) [2]float64 {
		if final && !m.touched[q] {
			return [2]float64{2.0 / 3, 0}
		}
		return mpsReadout
	})
	tr, trS := m.Invariants()
	// With A = α·4^n, B = β·4^n: A + 2^−n·B = 1 − Tr Y, 2^−n·A + B = 1 − Tr(S Y);
	// I^⊗n and S^⊗n read out 2^n each, and 2^−n/Z_H = (1 + 2^−n)/2.
	h := math.Ldexp(1, -n)
	d1, d2 := 1-tr, 1-trS
	det := 1 - h*h
	a := (d1 - h*d2) / det
	b := (d2 - h*d1) / det
	lzh := math.Log(2) - math.Log1p(math.Ldexp(1, n)) // ln Z_H, exact enough for n ≤ 1000
	if n < 60 {
		lzh = math.Log(2 / (math.Ldexp(1, n) + 1))
	} else {
		lzh = math.Log(2) - float64(n)*math.Ln2 - math.Log1p(h)
	}
	return sz*math.Exp(lz-lzh) + (a+b)*(1+h)/2
}

// xebSum returns D·Σ_σ u(σ) Π_q w_q(σ_q), the noisy readout of XEBCurve
// (X in the comment at the top of noise.go), for the gates applied so far,
// with the trace that truncation removed restored on I^⊗n. Under noise only
// the total trace Tr X is conserved: every gate and every channel on copy 1
// is trace preserving, but Tr(S X) = Tr(ρ_noisy ρ_ideal) decays, and S^⊗n
// is no longer fixed (SS → λ·SS + ((1−λ)/4)·II). The one state every noisy
// gate fixes is I^⊗n, so X = Y + α·I^⊗n with α·4^n = 1 − Tr Y; I^⊗n reads
// out w_I = 1 per qubit, that is 2^n, and D·α·2^n = 1 − Tr Y. A removed
// piece relaxes under later noisy gates to that multiple of I^⊗n, which is
// the analogue of Ratio's restoration.
func (m *MPS) xebSum(r []qubitReadout) float64 {
	lz, sz := m.mpsContract(func(q int) [2]float64 {
		w := r[q]
		if !m.touched[q] {
			return [2]float64{w.f, 0}
		}
		// (w_I, w_S)·G⁻¹ in the gauge of mps.go.
		return [2]float64{w.i * mpsGaugeInv[0][0], w.i*mpsGaugeInv[0][1] + w.s*mpsGaugeInv[1][1]}
	})
	tr, _ := m.Invariants()
	return sz*math.Exp(lz+float64(m.n)*math.Ln2) + (1 - tr)
}

// MPSMaxBond is the largest bond dimension the MPS engine accepts: its
// two-site SVD is (2χ)×(2χ), about 1 s per update at χ = 2048 on one core.
const MPSMaxBond = 2048

// mpsSecondsPerFlop is the time per (2χ)³ of one two-site update; it
// scales the run-time estimate of MPSEstimate. The first value, 1e-9 from
// single updates on grid:5x5 (2.2 ms per update at χ = 64, 8.6 ms at
// χ = 128), predicted whole runs about 4.8 times too fast: `mixdepth exact
// --engine mps --graph grid:10x20 --depths 1:30` took 322 s of CPU against
// 67 s predicted, and fixtures/fenwick120.edges at depths 1:30 74 s against
// 16 s (the moves of the swap network and the bookkeeping around each SVD
// cost more than the update timed alone). 5e-9 keeps the estimate an upper
// bound on those runs.
const mpsSecondsPerFlop = 5e-9

// MPSEstimate returns the bytes and seconds that a run of the MPS engine
// needs at most on g with schedule s up to depth steps and bond dimension
// bond, over order: n·2·bond² coefficients (three copies: the state, the
// two-site block and its SVD), and (2·bond)³ work per two-site update,
// 2·(distance)−1 updates per gate, for the run at bond and the one at
// bond/2 that gives the error estimate. Both are upper bounds: the bonds
// stay below the cap when the state needs less.
func MPSEstimate(g *circuits.Graph, s *circuits.Layered, order []int, steps, bond int) (bytes, seconds float64) {
	site := make([]int, g.Qubits)
	for k, q := range order {
		site[q] = k
	}
	updates := 0.0
	var layer []circuits.Edge
	for d := range min(steps, len(s.Classes)) {
		layer = s.Step(d, nil, layer[:0])
		for _, e := range layer {
			updates += float64(2*abs(site[e.A]-site[e.B]) - 1)
		}
	}
	if len(s.Classes) > 0 {
		updates *= float64(steps) / float64(min(steps, len(s.Classes)))
	}
	c := 2 * float64(bond)
	bytes = 3 * 8 * 2 * float64(g.Qubits) * float64(bond) * float64(bond)
	seconds = updates * mpsSecondsPerFlop * (c*c*c + c*c*c/8)
	return bytes, seconds
}

// mpsCurve runs the layered schedule s on an MPS over order with bond cap
// bond and returns E[Z]/Z_H (see MPS.Ratio) and the largest bond reached up
// to each of depths.
//
// With cfg.edges each gate takes its coupler's transfer, and with cfg.noise
// the curve holds the noisy readout D·Σ u·w (see MPS.xebSum) instead of the
// ratio.
func mpsCurve(ctx context.Context, n int, s *circuits.Layered, t *Transfer, depths []int, order []int, bond int, cfg *collisionConfig, progress func(done int)) (ratio []float64, used []int, err error) {
	m := NewMPS(n, order, bond)
	var layer []circuits.Edge
	steps := depths[len(depths)-1]
	out, err := collisionRun(ctx, depths, steps, &collisionConfig{}, func() float64 {
		used = append(used, m.MaxBondUsed())
		if cfg.noise != nil {
			return m.xebSum(cfg.noise.read)
		}
		return m.Ratio(cfg.final)
	}, func(d int) {
		layer = s.Step(d, nil, layer[:0])
		for _, e := range layer {
			if cfg.edges != nil {
				m.Apply(e.A, e.B, cfg.edges.For(e.A, e.B))
				continue
			}
			m.Apply(e.A, e.B, t)
		}
		if progress != nil {
			progress(d + 1)
		}
	})
	return out, used, err
}

// MPSCurve is the MPS engine's CollisionCurve for a layered schedule: it
// returns E[Z]/Z_H at each of depths (ascending) on an MPS over order
// with bonds capped at bond, the error estimate for each ratio, and the
// largest bond reached up to each depth. The estimate is the difference to
// the same run at bond/2 (at least 1), plus the rounding of the
// contraction, 64·n·2^−52 times the ratio: the error shrinks with the bond
// (TestMPSTruncation measures by how much), so the difference bounds the
// error of the larger bond. Options as for CollisionCurve; with
// CollisionEdgeTransfers each gate takes its coupler's transfer. It panics if g,
// s or t is nil or order is not a permutation of g's qubits.
func MPSCurve(ctx context.Context, g *circuits.Graph, s *circuits.Layered, t *Transfer, depths []int, order []int, bond int, opts ...CollisionOption) (ratio, errEst []float64, used []int, err error) {
	if g == nil || s == nil || t == nil {
		panic("moments: MPSCurve with a nil graph, schedule or transfer")
	}
	if err := CheckOrder(g, order); err != nil {
		panic(err.Error())
	}
	if bond < 1 {
		panic(fmt.Sprintf("moments: MPSCurve with bond dimension %d", bond))
	}
	if err := collisionCheckDepths(depths); err != nil {
		return nil, nil, nil, err
	}
	if len(depths) == 0 {
		return []float64{}, []float64{}, []int{}, nil
	}
	if len(s.Classes) == 0 {
		return nil, nil, nil, fmt.Errorf("moments: the layered schedule has no layers")
	}
	for _, cl := range s.Classes {
		if err := collisionCheckEdges(g.Qubits, cl); err != nil {
			return nil, nil, nil, err
		}
	}
	cfg := collisionConfigure(opts)
	return mpsEstimate(ctx, g.Qubits, s, t, depths, order, bond, &cfg)
}

// mpsEstimate is MPSCurve after its checks: the run at bond and the error
// estimate from the run at bond/2.
func mpsEstimate(ctx context.Context, n int, s *circuits.Layered, t *Transfer, depths []int, order []int, bond int, cfg *collisionConfig) (ratio, errEst []float64, used []int, err error) {
	steps := depths[len(depths)-1]
	half := max(bond/2, 1)
	// Progress counts the steps of both runs; the half-bond run costs about
	// an eighth, so it is counted as such.
	total := steps + (steps+7)/8
	var coarse []float64
	coarse, _, err = mpsCurve(ctx, n, s, t, depths, order, half, cfg, func(d int) { cfg.report((d+7)/8, total) })
	if err != nil {
		return nil, nil, nil, err
	}
	ratio, used, err = mpsCurve(ctx, n, s, t, depths, order, bond, cfg, func(d int) { cfg.report((steps+7)/8+d, total) })
	if err != nil {
		return nil, nil, nil, err
	}
	errEst = make([]float64, len(ratio))
	for i, r := range ratio {
		errEst[i] = math.Abs(r-coarse[i]) + 64*float64(n)*0x1p-52*math.Abs(r)
	}
	return ratio, errEst, used, nil
}
