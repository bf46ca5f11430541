package moments

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/mat"

	"mixdepth/circuits"
)

// The dense reference: the two-copy moment operator on all 16^n two-copy
// Pauli strings, built from the Weingarten formula for the Haar twirl on
// U(4) (Collins, "Moments and cumulants of polynomial random variables on
// unitary groups", IMRN 2003):
//
//	Φ(X) = Σ_{π,τ ∈ S₂} Wg(πτ⁻¹, 4) Tr(X V_π) V_τ,  Wg(e) = 1/15, Wg(swap) = −1/60,
//
// in the orthonormal Hermitian basis (P⊗Q)/D, P acting on copy 1 and Q on
// copy 2 of the n qubits. Nothing here uses the support chain: Φ is computed
// numerically on 16×16 complex matrices and expanded by traces, so it checks
// the chain's rules as well as the code.

// denseWg are the U(4) Weingarten values for k = 2 (Collins 2003).
const (
	denseWgIdentity = 1.0 / 15
	denseWgSwap     = -1.0 / 60
)

// densePauli are I, X, Y, Z.
var densePauli = [4][4]complex128{
	{1, 0, 0, 1},
	{0, 1, 1, 0},
	{0, -1i, 1i, 0},
	{1, 0, 0, -1},
}

// denseKron returns the Kronecker product of the square matrices a (p×p) and
// b (q×q), row-major.
func denseKron(a []complex128, p int, b []complex128, q int) []complex128 {
	out := make([]complex128, p*q*p*q)
	for i := range p {
		for j := range p {
			for k := range q {
				for l := range q {
					out[(i*q+k)*p*q+j*q+l] = a[i*p+j] * b[k*q+l]
				}
			}
		}
	}
	return out
}

// denseTwoQubit returns the 4×4 Pauli σ_p ⊗ σ_q on the pair (a, b), index
// 2·b_a + b_b.
func denseTwoQubit(p, q int) []complex128 {
	return denseKron(densePauli[p][:], 2, densePauli[q][:], 2)
}

// denseTwoCopy returns X = R1 ⊗ R2 on two copies of a pair, labels l = 4p+q
// per qubit: copy 1 carries the p letters, copy 2 the q letters.
func denseTwoCopy(la, lb int) []complex128 {
	return denseKron(denseTwoQubit(la/4, lb/4), 4, denseTwoQubit(la%4, lb%4), 4)
}

// denseLocal returns the 256×256 real matrix of the Haar pair twirl in the
// basis of labels (l_a, l_b), index l_a + 16·l_b, entry [out][in].
func denseLocal() [][]float64 {
	swap := make([]complex128, 256) // V_swap |i1 i2⟩ = |i2 i1⟩ on 4⊗4
	for i1 := range 4 {
		for i2 := range 4 {
			swap[(4*i2+i1)*16+4*i1+i2] = 1
		}
	}
	id := make([]complex128, 256)
	for i := range 16 {
		id[i*16+i] = 1
	}
	trace := func(a, b []complex128) complex128 { // Tr(ab)
		var s complex128
		for i := range 16 {
			for j := range 16 {
				s += a[i*16+j] * b[j*16+i]
			}
		}
		return s
	}
	basis := make([][]complex128, 256)
	for l := range 256 {
		basis[l] = denseTwoCopy(l%16, l/16)
	}
	m := make([][]float64, 256)
	for i := range m {
		m[i] = make([]float64, 256)
	}
	for in := range 256 {
		x := basis[in]
		te, ts := trace(x, id), trace(x, swap)
		// Φ(X) = Wg(e)[Tr(X) I + Tr(XS) S] + Wg(swap)[Tr(X) S + Tr(XS) I].
		ci := denseWgIdentity*te + denseWgSwap*ts
		cs := denseWgIdentity*ts + denseWgSwap*te
		phi := make([]complex128, 256)
		for k := range phi {
			phi[k] = ci*id[k] + cs*swap[k]
		}
		for out := range 256 {
			c := trace(basis[out], phi) / 16 // basis elements are Hermitian
			if cmplx.Abs(c) < 1e-14 {
				continue
			}
			if math.Abs(imag(c)) > 1e-12 {
				panic(fmt.Sprintf("dense: complex coefficient %v", c))
			}
			m[out][in] = real(c)
		}
	}
	return m
}

var denseLocalCache = denseLocal()

// denseEntry is one non-zero of a sparse operator.
type denseEntry struct {
	row, col int
	val      float64
}

// denseOp is a sparse real operator on the 16^n two-copy Pauli strings.
type denseOp []denseEntry

func (o denseOp) apply(x []float64) []float64 {
	return o.applyTo(make([]float64, len(x)), x)
}

// applyTo sets y = op·x and returns y.
func (o denseOp) applyTo(y, x []float64) []float64 {
	clear(y)
	for _, e := range o {
		y[e.row] += e.val * x[e.col]
	}
	return y
}

func densePow16(k int) int { return 1 << (4 * k) }

// denseEdge returns M_e for the gate on (a, b) of n qubits, scaled by s.
func denseEdge(n, a, b int, s float64) denseOp {
	var op denseOp
	pa, pb := densePow16(a), densePow16(b)
	for base := range densePow16(n) {
		if base/pa%16 != 0 || base/pb%16 != 0 {
			continue
		}
		for in := range 256 {
			for out := range 256 {
				if v := denseLocalCache[out][in]; v != 0 {
					op = append(op, denseEntry{
						row: base + out%16*pa + out/16*pb,
						col: base + in%16*pa + in/16*pb,
						val: s * v,
					})
				}
			}
		}
	}
	return op
}

// denseMean returns mean_e M_e over edges.
func denseMean(n int, edges []circuits.Edge) denseOp {
	var op denseOp
	for _, e := range edges {
		op = append(op, denseEdge(n, e.A, e.B, 1/float64(len(edges)))...)
	}
	return op
}

// denseInitial returns E[ρ⊗ρ] for ρ = |0…0⟩⟨0…0|: per qubit 1/2 on each of
// the letter pairs (I,I), (I,Z), (Z,I), (Z,Z), since ρ_q = (I+Z)/2.
func denseInitial(n int) []float64 {
	x := make([]float64, densePow16(n))
	for i := range x {
		v := 1.0
		for q := range n {
			l := i / densePow16(q) % 16
			if p, r := l/4, l%4; (p == 0 || p == 3) && (r == 0 || r == 3) {
				v *= 0.5
			} else {
				v = 0
			}
		}
		x[i] = v
	}
	return x
}

// denseCollision reads Z = Tr(X Σ_x |xx⟩⟨xx|) with Σ_x |xx⟩⟨xx| =
// ⊗_q (I⊗I + Z⊗Z)/2: per qubit 1 on (I,I) and (Z,Z), 0 elsewhere.
func denseCollision(n int, x []float64) float64 {
	var z float64
	for i, v := range x {
		ok := true
		for q := range n {
			if l := i / densePow16(q) % 16; l != 0 && l != 15 {
				ok = false
				break
			}
		}
		if ok {
			z += v
		}
	}
	return z
}

// denseLayeredCollision returns E[Z] after depth layers of l.
func denseLayeredCollision(n int, l *circuits.Layered, depth int) float64 {
	x := denseInitial(n)
	for d := range depth {
		for _, e := range l.Step(d, nil, nil) {
			x = denseEdge(n, e.A, e.B, 1).apply(x)
		}
	}
	return denseCollision(n, x)
}

// denseRandomCollision returns E[Z] after depth random-edge gates.
func denseRandomCollision(n int, edges []circuits.Edge, depth int) float64 {
	m := denseMean(n, edges)
	x := denseInitial(n)
	for range depth {
		x = m.apply(x)
	}
	return denseCollision(n, x)
}

// denseLayeredFrame returns ‖Φ_d‖²_F for the product channels Φ_d of the
// first d layers of l, d = 0..depth, column by column.
func denseLayeredFrame(n int, l *circuits.Layered, depth int) []float64 {
	layers := make([][]denseOp, depth)
	for d := range depth {
		for _, e := range l.Step(d, nil, nil) {
			layers[d] = append(layers[d], denseEdge(n, e.A, e.B, 1))
		}
	}
	f := make([]float64, depth+1)
	x, y := make([]float64, densePow16(n)), make([]float64, densePow16(n))
	for j := range densePow16(n) {
		clear(x)
		x[j] = 1
		f[0]++
		for d, ops := range layers {
			for _, op := range ops {
				x, y = op.applyTo(y, x), x
			}
			for _, v := range x {
				f[d+1] += v * v
			}
		}
	}
	return f
}

// denseSpectrum returns all 16^n eigenvalues of the symmetric op, in
// descending order, by gonum's EigenSym on the blocks of its sparsity
// pattern (a permutation similarity: no structure is assumed).
func denseSpectrum(n int, op denseOp) []float64 {
	dim := densePow16(n)
	parent := make([]int, dim)
	for i := range parent {
		parent[i] = i
	}
	var find func(int) int
	find = func(i int) int {
		for parent[i] != i {
			parent[i] = parent[parent[i]]
			i = parent[i]
		}
		return i
	}
	vals := map[[2]int]float64{}
	for _, e := range op {
		vals[[2]int{e.row, e.col}] += e.val
		if ra, rb := find(e.row), find(e.col); ra != rb {
			parent[ra] = rb
		}
	}
	blocks := map[int][]int{}
	for i := range dim {
		r := find(i)
		blocks[r] = append(blocks[r], i)
	}
	var spec []float64
	for _, members := range blocks {
		pos := map[int]int{}
		for k, i := range members {
			pos[i] = k
		}
		b := mat.NewDense(len(members), len(members), nil)
		for k, i := range members {
			for l, j := range members {
				b.Set(k, l, vals[[2]int{i, j}])
			}
		}
		if !mat.EqualApprox(b, b.T(), 1e-14) {
			panic("dense: moment operator is not symmetric")
		}
		s := mat.NewSymDense(len(members), nil)
		for k := range members {
			for l := k; l < len(members); l++ {
				s.SetSym(k, l, b.At(k, l))
			}
		}
		var es mat.EigenSym
		if !es.Factorize(s, false) {
			panic("dense: EigenSym failed")
		}
		spec = append(spec, es.Values(nil)...)
	}
	slices.Sort(spec)
	slices.Reverse(spec)
	return spec
}

// denseChainSpectrum returns the eigenvalues, ascending, of the random-edge
// support chain on the non-empty supports, built densely from the rule
// (01, 10, 11) → (1/5, 1/5, 3/5) and symmetrised with π(A) = 3^|A|.
func denseChainSpectrum(n int, edges []circuits.Edge) []float64 {
	dim := 1 << n
	c := mat.NewDense(dim, dim, nil) // c[B][A]: mass moved from A to B
	for _, e := range edges {
		ma, mb := 1<<e.A, 1<<e.B
		for a := range dim {
			s := 1 / float64(len(edges))
			if a&(ma|mb) == 0 {
				c.Set(a, a, c.At(a, a)+s)
				continue
			}
			rest := a &^ (ma | mb)
			c.Set(rest|ma, a, c.At(rest|ma, a)+s/5)
			c.Set(rest|mb, a, c.At(rest|mb, a)+s/5)
			c.Set(rest|ma|mb, a, c.At(rest|ma|mb, a)+3*s/5)
		}
	}
	weight := func(a int) float64 {
		k := 0
		for ; a != 0; a &= a - 1 {
			k++
		}
		return math.Pow(3, float64(k))
	}
	sym := mat.NewSymDense(dim-1, nil)
	for b := 1; b < dim; b++ {
		for a := 1; a < dim; a++ {
			v := c.At(b, a) * math.Sqrt(weight(a)/weight(b))
			if w := c.At(a, b) * math.Sqrt(weight(b)/weight(a)); math.Abs(v-w) > 1e-14 {
				panic("dense: support chain is not reversible for 3^|A|")
			}
			if a >= b {
				sym.SetSym(b-1, a-1, v)
			}
		}
	}
	var es mat.EigenSym
	if !es.Factorize(sym, false) {
		panic("dense: EigenSym failed")
	}
	return es.Values(nil)
}

// denseRandomGraph returns a connected graph on n qubits: a random spanning
// tree plus extra random edges.
func denseRandomGraph(t *testing.T, rng *rand.Rand, n, extra int) *circuits.Graph {
	t.Helper()
	var edges []circuits.Edge
	seen := map[[2]int]bool{}
	add := func(a, b int) {
		k := [2]int{min(a, b), max(a, b)}
		if a != b && !seen[k] {
			seen[k] = true
			edges = append(edges, circuits.Edge{A: a, B: b})
		}
	}
	perm := rng.Perm(n)
	for i := 1; i < n; i++ {
		add(perm[i], perm[rng.IntN(i)])
	}
	for range extra {
		add(rng.IntN(n), rng.IntN(n))
	}
	g, err := circuits.NewGraph(fmt.Sprintf("random:%d", n), n, edges)
	if err != nil {
		t.Fatal(err)
	}
	return g
}

// denseGraph parses a graph spec or fails the test.
func denseGraph(t *testing.T, spec string) *circuits.Graph {
	t.Helper()
	g, err := circuits.ParseGraph(spec)
	if err != nil {
		t.Fatal(err)
	}
	return g
}

// TestDenseOperator checks the reference itself: each M_e is a symmetric
// orthogonal projector of rank 2·16^(n−2) (the twirl projects the pair's
// two-copy space onto span{I, S}: Collins 2003), and one gate on two qubits
// gives E[Z] = 2/(D+1) = 2/5 (the Haar collision probability; Dalzell, Hunter-Jones, Brandão 2022).
func TestDenseOperator(t *testing.T) {
	var tr float64
	for i := range 256 {
		tr += denseLocalCache[i][i]
		for j := range 256 {
			var sq float64
			for k := range 256 {
				sq += denseLocalCache[i][k] * denseLocalCache[k][j]
			}
			if math.Abs(sq-denseLocalCache[i][j]) > 1e-14 || math.Abs(denseLocalCache[i][j]-denseLocalCache[j][i]) > 1e-14 {
				t.Fatalf("local twirl is not a symmetric projector at (%d, %d)", i, j)
			}
		}
	}
	// Tolerance: 256 rounded terms of size ≤ 1.
	if math.Abs(tr-2) > 1e-13 {
		t.Errorf("rank of the pair twirl = %v, want 2 = dim span{I, S}", tr)
	}
	l := &circuits.Layered{Classes: [][]circuits.Edge{{{A: 0, B: 1}}}}
	if z := denseLayeredCollision(2, l, 1); math.Abs(z-0.4) > 1e-14 {
		t.Errorf("dense E[Z] after one gate = %v, want 2/5", z)
	}
}
