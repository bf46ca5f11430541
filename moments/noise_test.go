package moments

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"testing"

	"mixdepth/circuits"
)

// The dense reference for the noisy benchmark: bruteRho (brute_test.go)
// holds E[ρ_noisy ⊗ ρ_ideal] as a 4^n × 4^n operator, copy 1 at bits 0..n−1.
// Gates are the Weingarten twirls and real conjugations of brute_test.go;
// the noise is an explicit superoperator on copy 1 (a Pauli channel as the
// sum of its Kraus conjugations), the readout an explicit 2^n × 2^n
// stochastic matrix, and global depolarizing replaces copy 1 by I/D with
// probability 1 − f before the readout, in the sampler's order
// (sampling.DrawShots). Nothing here uses the identity/swap rules of
// noise.go.

// brutePaulis are I, X, iY (real: Y = i·[[0, −1], [1, 0]], and Y·X·Y† is the
// conjugation by this real matrix) and Z.
var brutePaulis = [4][2][2]float64{{{1, 0}, {0, 1}}, {{0, 1}, {1, 0}}, {{0, -1}, {1, 0}}, {{1, 0}, {0, -1}}}

// bruteLocal1 returns K X K^T for the real 2×2 K on index bit `bit` of
// both the rows and the columns of X.
func bruteLocal1(x []float64, dim, bit int, k [2][2]float64) []float64 {
	out := make([]float64, len(x))
	m := 1 << bit
	for r := range dim {
		for c := range dim {
			v := x[r*dim+c]
			if v == 0 {
				continue
			}
			rb, cb := r>>bit&1, c>>bit&1
			for ro := range 2 {
				kr := k[ro][rb]
				if kr == 0 {
					continue
				}
				for co := range 2 {
					kc := k[co][cb]
					if kc == 0 {
						continue
					}
					out[(r&^m|ro<<bit)*dim+(c&^m|co<<bit)] += kr * kc * v
				}
			}
		}
	}
	return out
}

// pauliChannel applies the Pauli channel of rate e on copy 1 of the qubits
// qs: with probability 1 − e nothing, otherwise one of the 4^k − 1
// non-identity Paulis, uniformly.
func (r *bruteRho) pauliChannel(qs []int, e float64) {
	k := len(qs)
	total := 1<<(2*k) - 1
	acc := make([]float64, len(r.x))
	for i, v := range r.x {
		acc[i] = (1 - e) * v
	}
	for p := 1; p <= total; p++ {
		y := r.x
		for j, q := range qs {
			y = bruteLocal1(y, r.dim, q, brutePaulis[p>>(2*j)&3])
		}
		for i, v := range y {
			acc[i] += e / float64(total) * v
		}
	}
	r.x = acc
}

// bruteXEB returns E[F_lin] = D·Σ_y E[q(y)p(y)] − 1 for the two-copy state
// r: copy 1 depolarized to fidelity f, then read out through the
// stochastic matrix R[y][x] = Π_q r_q(y_q | x_q).
func bruteXEB(r *bruteRho, nz *circuits.ChipNoise) float64 {
	n, dim := r.n, r.dim
	d := 1 << n
	// Y2 = Tr_1 X on copy 2, diagonal only (the readout needs no more).
	y2 := make([]float64, d)
	for y := range d {
		for x := range d {
			i := x | y<<n
			y2[y] += r.x[i*dim+i]
		}
	}
	rr := func(y, x int) float64 {
		p := 1.0
		for q := range n {
			xb, yb := x>>q&1, y>>q&1
			switch {
			case xb == 0 && yb == 0:
				p *= 1 - nz.Readout01[q]
			case xb == 0:
				p *= nz.Readout01[q]
			case yb == 1:
				p *= 1 - nz.Readout10[q]
			default:
				p *= nz.Readout10[q]
			}
		}
		return p
	}
	f := nz.Fidelity
	var sum float64
	for y := range d { // copy 1's read outcome
		for y2i := range d { // copy 2's ideal outcome must equal it
			if y2i != y {
				continue
			}
			for x := range d { // copy 1's true outcome
				i := x | y<<n
				diag := f*r.x[i*dim+i] + (1-f)*y2[y]/float64(d)
				sum += rr(y, x) * diag
			}
		}
	}
	return float64(d)*sum - 1
}

// bruteNoisyLayered returns E[F_lin] after each depth 1..maxDepth of the
// layered schedule s under nz: a Haar gate is the pair twirl, then the
// pair's Pauli channel; a gate set's gate is the single-qubit twirls, the
// single-qubit channels, G, then the pair's channel; a Finisher's final
// layer is a twirl and the single-qubit channel on every qubit.
func bruteNoisyLayered(n int, g *circuits.Graph, s *circuits.Layered, e circuits.Ensemble, nz *circuits.ChipNoise, maxDepth int) []float64 {
	gs, dressed := e.(*circuits.GateSet)
	_, final := e.(circuits.Finisher)
	var gate [16]float64 // the entangler, real for the gate sets used here
	if dressed {
		for i, v := range gs.G {
			gate[i] = real(v)
		}
	}
	rho := newBruteRho(n)
	var out []float64
	for d := range maxDepth {
		for _, ed := range s.Step(d, nil, nil) {
			a, b := ed.A, ed.B
			if dressed {
				rho.twirl([]int{a})
				rho.twirl([]int{b})
				rho.pauliChannel([]int{a}, nz.Single[a])
				rho.pauliChannel([]int{b}, nz.Single[b])
				rho.conj(&gate, a, b)
			} else {
				rho.twirl([]int{a, b})
			}
			rho.pauliChannel([]int{a, b}, nz.PairError(a, b))
		}
		end := rho.clone()
		if final {
			for q := range n {
				end.twirl([]int{q})
				end.pauliChannel([]int{q}, nz.Single[q])
			}
		}
		out = append(out, bruteXEB(end, nz))
	}
	return out
}

// heteroNoise returns a ChipNoise of g with a different rate on every
// element (an invented chip for the checks, large rates so that every
// rule weighs in the result).
func heteroNoise(g *circuits.Graph) *circuits.ChipNoise {
	c := circuits.UniformNoise(g, 0, 0, 0, 0, 0.83)
	for i := range c.Pair {
		c.Pair[i] = 0.04 + 0.03*float64(i)
	}
	for q := range c.Single {
		c.Single[q] = 0.02 + 0.015*float64(q)
		c.Readout01[q] = 0.05 + 0.01*float64(q)
		c.Readout10[q] = 0.12 - 0.02*float64(q)
	}
	return c
}

// TestXEBCurveBruteForce: XEBCurve against the dense two-copy computation
// above for n = 3 (line:3 layered), Haar gates and cz+haar1 (single-qubit
// errors before the entangler and in the final layer), under a
// heterogeneous ChipNoise with global depolarizing, at depths 1..6; and
// the random-edge average on line:3 against the dense operator averaged
// over all |E|^t edge sequences. Tolerance 1e-12: both sides are exact,
// and the values are O(1) sums of a few thousand products.
func TestXEBCurveBruteForce(t *testing.T) {
	ctx := context.Background()
	g, err := circuits.ParseGraph("line:3")
	if err != nil {
		t.Fatal(err)
	}
	nz := heteroNoise(g)
	lay := &circuits.Layered{Classes: circuits.LayeredClasses(g)}
	depths := []int{1, 2, 3, 4, 5, 6}
	for _, name := range []string{"haar", "cz+haar1"} {
		e, err := circuits.NewEnsemble(name)
		if err != nil {
			t.Fatal(err)
		}
		got, err := XEBCurve(ctx, g, lay, e, nz, depths, 1)
		if err != nil {
			t.Fatal(err)
		}
		want := bruteNoisyLayered(3, g, lay, e, nz, 6)
		for i := range depths {
			if math.Abs(got[i]-want[i]) > 1e-12 {
				t.Errorf("%s layered depth %d: engine %.15g, dense %.15g", name, depths[i], got[i], want[i])
			}
		}
		// Random edges: enumerate every sequence of edges.
		re := &circuits.RandomEdge{Edges: g.Edges}
		rdepths := []int{0, 1, 2, 3, 4}
		rgot, err := XEBCurve(ctx, g, re, e, nz, rdepths, 2)
		if err != nil {
			t.Fatal(err)
		}
		for i, d := range rdepths {
			want := bruteNoisyRandom(g, e, nz, d)
			if math.Abs(rgot[i]-want) > 1e-12 {
				t.Errorf("%s random-edge depth %d: engine %.15g, dense %.15g", name, d, rgot[i], want)
			}
		}
	}
}

// bruteNoisyRandom averages the dense noisy XEB over every edge sequence of
// length depth.
func bruteNoisyRandom(g *circuits.Graph, e circuits.Ensemble, nz *circuits.ChipNoise, depth int) float64 {
	var seqs [][]circuits.Edge
	var build func(prefix []circuits.Edge)
	build = func(prefix []circuits.Edge) {
		if len(prefix) == depth {
			seqs = append(seqs, append([]circuits.Edge(nil), prefix...))
			return
		}
		for _, ed := range g.Edges {
			build(append(prefix, ed))
		}
	}
	build(nil)
	var sum float64
	for _, seq := range seqs {
		// A layout of one gate per layer replays the sequence.
		if depth == 0 {
			sum += bruteDepth0(g.Qubits, e, nz)
			continue
		}
		classes := make([][]circuits.Edge, len(seq))
		for i, ed := range seq {
			classes[i] = []circuits.Edge{ed}
		}
		v := bruteNoisyLayered(g.Qubits, g, &circuits.Layered{Classes: classes}, e, nz, depth)
		sum += v[depth-1]
	}
	return sum / float64(len(seqs))
}

// bruteDepth0 is the dense XEB of the circuit with no gate.
func bruteDepth0(n int, e circuits.Ensemble, nz *circuits.ChipNoise) float64 {
	rho := newBruteRho(n)
	if _, final := e.(circuits.Finisher); final {
		for q := range n {
			rho.twirl([]int{q})
			rho.pauliChannel([]int{q}, nz.Single[q])
		}
	}
	return bruteXEB(rho, nz)
}

// TestXEBOneHaarGate: one Haar gate on two qubits with Pauli rate e. The
// noisy copy is (1 − 16e/15)ρ + (16e/15)·I/4 (a uniform non-identity
// Pauli with probability e, and the 16 Paulis averaged together give I/4:
// ρ → (1−e)ρ + (e/15)(4·Tr ρ·I − ρ)), and for a Haar state on D = 4,
// E[Σp²] = 2/(D+1) = 2/5 (design.md §3), while I/4 gives D·Σ_y p/4 = 1. So
// E[F_lin] = λ(4·2/5) + (1−λ) − 1 = (3/5)(1 − 16e/15). Tolerance 1e-15:
// a handful of operations on numbers of order 1.
func TestXEBOneHaarGate(t *testing.T) {
	g, err := circuits.ParseGraph("line:2")
	if err != nil {
		t.Fatal(err)
	}
	s := &circuits.Layered{Classes: circuits.LayeredClasses(g)}
	for _, e := range []float64{0, 0.01, 0.1, 0.5, 15.0 / 16, 1} {
		got, err := XEBCurve(context.Background(), g, s, circuits.Haar{}, circuits.UniformNoise(g, e, 0, 0, 0, 1), []int{1}, 1)
		if err != nil {
			t.Fatal(err)
		}
		if want := 0.6 * (1 - 16*e/15); math.Abs(got[0]-want) > 1e-15 {
			t.Errorf("e = %g: E[F_lin] = %.17g, want (3/5)(1 − 16e/15) = %.17g", e, got[0], want)
		}
	}
}

// TestNoiseRules: the 4×4 rules of noise.go against the dense channel on two
// qubits: PairNoise(e) applied to V_σ (brute_test.go's bruteV) equals the
// explicit Pauli channel on copy 1 of V_σ, expanded back on {V_τ} by the
// Gram inverse; SingleNoise likewise on one qubit of the pair.
// Tolerance 1e-13: sums of 256 entries of order 1.
func TestNoiseRules(t *testing.T) {
	const e, e1 = 0.3, 0.2
	p := PairNoise(e)
	n1 := SingleNoise(e1)
	for sigma := range 4 {
		v := bruteV(sigma)
		pc := v.clone()
		pc.pauliChannel([]int{0, 1}, e)
		sc := v.clone()
		sc.pauliChannel([]int{0}, e1)
		// The Gram matrix of {V_τ} is the tensor square of [[4, 2], [2, 4]].
		for _, c := range []struct {
			name string
			x    *bruteRho
			want func(tau int) float64
		}{
			{"pair", pc, func(tau int) float64 { return p[tau][sigma] }},
			{"single", sc, func(tau int) float64 {
				// N1 on qubit a (the high bit of σ) and identity on b.
				if tau&1 != sigma&1 {
					return 0
				}
				return n1[tau>>1][sigma>>1]
			}},
		} {
			var tr [4]float64
			for tau := range 4 {
				tr[tau] = bruteTrace(bruteV(tau), c.x)
			}
			for tau := range 4 {
				var coef float64
				for k := range 4 {
					coef += wgQubit[tau>>1][k>>1] * wgQubit[tau&1][k&1] * tr[k]
				}
				if math.Abs(coef-c.want(tau)) > 1e-13 {
					t.Errorf("%s noise on V_%d: coefficient of V_%d %.15g, rule %.15g", c.name, sigma, tau, coef, c.want(tau))
				}
			}
		}
	}
}

// TestXEBCompleteAgainstRandomEdge: the complete-graph reduction with
// uniform noise against the general random-edge average (each edge's own
// transfer, subsets of untouched qubits) on the same complete graphs,
// N = 4..8: two exact methods, so 1e-12.
func TestXEBCompleteAgainstRandomEdge(t *testing.T) {
	ctx := context.Background()
	for n := 4; n <= 8; n++ {
		g, err := circuits.ParseGraph(fmt.Sprintf("complete:%d", n))
		if err != nil {
			t.Fatal(err)
		}
		re := &circuits.RandomEdge{Edges: g.Edges}
		for _, name := range []string{"haar", "cz+haar1"} {
			e, _ := circuits.NewEnsemble(name)
			nz := circuits.UniformNoise(g, 0.03, 0.01, 0.02, 0.05, 0.9)
			depths := []int{0, 1, 5, 20, 60}
			got, err := XEBCurve(ctx, g, re, e, nz, depths, 2)
			if err != nil {
				t.Fatal(err)
			}
			// The general engine, forced.
			tr, final, _ := TransferFor(e)
			cfg := collisionConfig{final: final}
			x := &xebNoise{chip: nz, read: xebReadout(nz, final), final: final}
			_, x.dressed = e.(*circuits.GateSet)
			cfg.noise = x
			cfg.edges = noisyEdgeTransfers(g, &tr, nil, x)
			sums, err := randomEdgeCurve(ctx, n, g.Edges, &tr, depths, 2, &cfg)
			if err != nil {
				t.Fatal(err)
			}
			for i := range sums {
				sums[i] = math.Ldexp(sums[i], n)
			}
			want := xebAssemble(g, re, nz, final, depths, sums)
			// The uniform part of the reduction is the closed form; check it
			// against the subset sum too.
			c := make([]float64, n)
			for q := range c {
				c[q] = xebUntouched(nz, q, final)
			}
			for i, d := range depths {
				if math.Abs(got[i]-want[i]) > 1e-12*math.Max(1, math.Abs(want[i])) {
					t.Errorf("complete:%d %s depth %d: reduction %.15g, random-edge %.15g", n, name, d, got[i], want[i])
				}
			}
			if !final {
				closed := xebUniformComplete(n, c[0], depths)
				sub := xebUniformRandomEdgeSubsets(n, g.Edges, c, depths)
				for i := range depths {
					if math.Abs(closed[i]-sub[i]) > 1e-12 {
						t.Errorf("complete:%d depth %d: uniform part closed form %.15g, subset sum %.15g", n, depths[i], closed[i], sub[i])
					}
				}
			}
		}
	}
}

// BenchmarkXEBCurve compares the vector engine's noiseless curve
// (CollisionCurve) with the noisy one (XEBCurve, a heterogeneous chip) on
// line:24, three layers (69 gates) and a readout at each depth, on all
// cores: the noise changes the 4×4 matrices and the readout sum only, so
// the target is at most 10% extra. Run with
// go test -run '^$' -bench XEBCurve -benchtime 3x ./moments/
func BenchmarkXEBCurve(b *testing.B) {
	g, err := circuits.ParseGraph("line:24")
	if err != nil {
		b.Fatal(err)
	}
	s := &circuits.Layered{Classes: circuits.LayeredClasses(g)}
	depths := []int{1, 2, 3}
	nz := heteroNoise3(g)
	workers := runtime.GOMAXPROCS(0)
	b.Run("noiseless", func(b *testing.B) {
		for b.Loop() {
			if _, err := CollisionCurve(context.Background(), g, s, &HaarTransfer, depths, workers); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("noisy", func(b *testing.B) {
		for b.Loop() {
			if _, err := XEBCurve(context.Background(), g, s, circuits.Haar{}, nz, depths, workers); err != nil {
				b.Fatal(err)
			}
		}
	})
}

// BenchmarkXEBReadout isolates the one pass that noise adds per depth on
// the vector engine: the weighted readout sum against the plain sum
// (Engine.Collision) on 24 qubits, all cores. The gate passes are the same
// 4×4 updates with other numbers.
func BenchmarkXEBReadout(b *testing.B) {
	const n = 24
	e, err := NewEngine(n, runtime.GOMAXPROCS(0))
	if err != nil {
		b.Skip(err)
	}
	for q := range n {
		e.Apply(q, (q+1)%n, &HaarTransfer)
	}
	g, _ := circuits.ParseGraph("line:24")
	read := xebReadout(heteroNoise3(g), false)
	b.Run("plain", func(b *testing.B) {
		b.SetBytes(8 << n)
		for b.Loop() {
			_ = e.Collision()
		}
	})
	b.Run("weighted", func(b *testing.B) {
		b.SetBytes(8 << n)
		for b.Loop() {
			_ = e.weightedCollision(read)
		}
	})
}

// heteroNoise3 is a heterogeneous chip with small rates for any graph.
func heteroNoise3(g *circuits.Graph) *circuits.ChipNoise {
	c := circuits.UniformNoise(g, 0, 0, 0, 0, 0.99)
	for i := range c.Pair {
		c.Pair[i] = 0.003 + 0.0005*float64(i%5)
	}
	for q := range c.Single {
		c.Readout01[q] = 0.01 + 0.001*float64(q%3)
		c.Readout10[q] = 0.02
	}
	return c
}

// TestXEBCompleteHeterogeneous: heterogeneous noise on a complete graph
// cannot use the permutation-symmetric reduction; it falls back to the
// random-edge average, checked against the dense brute force over every
// edge sequence on complete:4 (tolerance as in TestXEBCurveBruteForce),
// and beyond CollisionRandomEdgeMaxQubits it is refused with ErrTooLarge.
func TestXEBCompleteHeterogeneous(t *testing.T) {
	ctx := context.Background()
	g, err := circuits.ParseGraph("complete:4")
	if err != nil {
		t.Fatal(err)
	}
	nz := heteroNoise(g)
	re := &circuits.RandomEdge{Edges: g.Edges}
	depths := []int{0, 1, 2}
	got, err := XEBCurve(ctx, g, re, circuits.Haar{}, nz, depths, 2)
	if err != nil {
		t.Fatal(err)
	}
	for i, d := range depths {
		if want := bruteNoisyRandom(g, circuits.Haar{}, nz, d); math.Abs(got[i]-want) > 1e-12 {
			t.Errorf("complete:4 depth %d: engine %.15g, dense %.15g", d, got[i], want)
		}
	}
	big, err := circuits.ParseGraph(fmt.Sprintf("complete:%d", CollisionRandomEdgeMaxQubits+1))
	if err != nil {
		t.Fatal(err)
	}
	hn := circuits.UniformNoise(big, 0.01, 0, 0, 0, 1)
	hn.Pair[0] = 0.02
	if _, err := XEBCurve(ctx, big, &circuits.RandomEdge{Edges: big.Edges}, circuits.Haar{}, hn, []int{5}, 1); !errors.Is(err, ErrTooLarge) {
		t.Errorf("heterogeneous noise on %s: %v, want ErrTooLarge", big.Name, err)
	}
}
