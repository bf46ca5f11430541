package moments

import (
	"context"
	"fmt"
	"math"
	"math/bits"
	"math/rand/v2"
	"mixdepth/internal/crash"
	"slices"
	"sync"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"

	"mixdepth/circuits"
	"mixdepth/sim"
)

// GapTolerance bounds the residual ‖Ku − θu‖ (‖u‖ = 1) at which SpectralGap
// accepts a Ritz value θ. For a symmetric K some eigenvalue then lies within
// GapTolerance of θ (Parlett, "The Symmetric Eigenvalue Problem", 1980,
// chapter 4; from memory; common practice).
const GapTolerance = 1e-10

const (
	gapBasis    = 24      // Lanczos vectors kept before a restart
	gapKeep     = 8       // Ritz vectors kept across a restart
	gapRestarts = 2000    // restarts before giving up
	gapParallel = 1 << 14 // smallest vector split across workers
	gapSeed     = 0x6d6f6d656e7473
)

// Gap is the spectral gap of the second-moment operator of the random-edge
// schedule with Haar U(4) gates, M = mean_e M_e (Brandão, Harrow, Horodecki 2016).
type Gap struct {
	// SecondEigenvalue is λ₂, the largest eigenvalue of M below 1 once the
	// fixed space is removed. The eigenvalue 1 has multiplicity 2, spanned by
	// the identity and the swap of the two copies on all qubits (the Haar
	// commutant, Collins 2003); λ₂ is the largest eigenvalue on the
	// orthogonal complement of that span.
	SecondEigenvalue float64
	// DiagEigenvalue is λ_diag, the second eigenvalue of the Pauli-support
	// chain restricted to non-empty supports.
	DiagEigenvalue float64
	// HamiltonianGap is Δ = |E|(1 − λ₂), the gap of the frustration-free
	// H = Σ_e (1 − M_e).
	HamiltonianGap float64
	// MinDegree is δ, the smallest qubit degree, and Edges is |E|.
	MinDegree, Edges int
}

// SpectralGap returns the spectral gap of M = mean_e M_e for the random-edge
// schedule on g with Haar U(4) gates (Brandão, Harrow, Horodecki 2016, Commun. Math. Phys. 346, 397):
//
//	λ₂ = max(λ_diag, 1 − δ/|E|),  Δ = |E|(1 − λ₂).
//
// M is a mean of orthogonal projectors, so 0 ≤ M ≤ 1. A qubit whose
// two-copy Pauli is off-diagonal, or a traceless mix of diagonal letters, is
// frozen: killed by every gate on it and kept by the others. The block of
// a frozen set X has top eigenvalue |E ∖ E(X)|/|E|, the fraction of edges
// avoiding X, largest, 1 − δ/|E|, for one qubit of minimum degree. The
// block without frozen qubits is the support chain, reversible for
// π(A) ∝ 3^|A| (Harrow & Low, Commun. Math. Phys. 291, 257, 2009). λ_diag is found by thick-restart Lanczos with full
// reorthogonalisation (Wu & Simon, SIAM J. Matrix Anal. Appl. 22, 602, 2000)
// on the chain symmetrised with π^(1/2), deflated of the empty support and
// of π^(1/2), matrix-free on a 2^n vector: its residual is at most
// GapTolerance. workers bounds the goroutines per pass over the vector
// (values below 1 mean 1); the result does not depend on it. The memory,
// about 29·8·2^n bytes (232 MiB at n = 20), is checked first. Cancelling
// ctx stops the work. It panics if g is nil.
func SpectralGap(ctx context.Context, g *circuits.Graph, workers int) (Gap, error) {
	if g == nil {
		panic("moments: SpectralGap with a nil graph")
	}
	n := g.Qubits
	if err := pauliCheckEdges(n, g.Edges); err != nil {
		return Gap{}, err
	}
	// The basis, its next vector, the deflated pair and the final residual.
	if err := sim.CheckMemory(float64(gapBasis+5)*8*math.Ldexp(1, n), fmt.Sprintf("Lanczos vectors for the %d-qubit support chain", n)); err != nil {
		return Gap{}, err
	}
	dim := 1 << n
	basis := min(gapBasis, dim-2) // the empty support and π^(1/2) are deflated
	op := newGapOperator(g, workers)
	// π^(1/2) on the non-empty supports, normalised: Σ_{A≠∅} 3^|A| = 4^n − 1.
	// The empty support is an exact eigenvector of K (only it maps to
	// itself), so a start vector without it keeps none.
	root := pauliPowers(n, math.Sqrt(3))
	norm := 1 / math.Sqrt(math.Pow(4, float64(n))-1)
	phi := make([]float64, dim)
	empty := make([]float64, dim)
	empty[0] = 1
	for a := 1; a < dim; a++ {
		phi[a] = root[bits.OnesCount(uint(a))] * norm
	}
	res, err := gapLanczos(ctx, dim, basis, workers, op.apply, [][]float64{empty, phi})
	if err != nil {
		return Gap{}, err
	}
	diag := min(max(res.value, 0), 1)
	edges, delta := len(g.Edges), g.MinDegree()
	frozen := 1 - float64(delta)/float64(edges)
	second := max(diag, frozen)
	return Gap{
		SecondEigenvalue: second,
		DiagEigenvalue:   diag,
		HamiltonianGap:   float64(edges) * (1 - second),
		MinDegree:        delta,
		Edges:            edges,
	}, nil
}

// DesignDepthBound returns the number of random-edge gates after which the
// circuit is an ε-approximate k-design by the spectral-gap argument of
// Brandão, Harrow and Horodecki ("Local random quantum circuits are
// approximate polynomial-designs", Commun. Math. Phys. 346, 397, 2016):
// ‖M^t − P_Haar‖ ≤ λ₂^t ≤ exp(−tΔ/|E|), and the factor D^(2k) = 2^(2nk)
// between that norm and the design distance must be overcome,
//
//	t = ⌈|E| (2nk ln 2 + ln(1/ε)) / Δ⌉.
//
// gap must describe the k-th moment operator; SpectralGap computes it for
// k = 2. It panics unless gap.Edges ≥ 1, gap.HamiltonianGap > 0, qubits ≥ 1,
// k ≥ 1 and 0 < eps < 1, or if the bound exceeds the int range.
func DesignDepthBound(gap Gap, qubits, k int, eps float64) int {
	if gap.Edges < 1 || !(gap.HamiltonianGap > 0) || qubits < 1 || k < 1 || !(eps > 0 && eps < 1) {
		panic(fmt.Sprintf("moments: DesignDepthBound(edges %d, gap %g, qubits %d, k %d, eps %g): need edges ≥ 1, gap > 0, qubits ≥ 1, k ≥ 1, 0 < eps < 1",
			gap.Edges, gap.HamiltonianGap, qubits, k, eps))
	}
	t := math.Ceil(float64(gap.Edges) * (2*float64(qubits*k)*math.Ln2 + math.Log(1/eps)) / gap.HamiltonianGap)
	if t >= math.MaxInt {
		panic(fmt.Sprintf("moments: DesignDepthBound of %g gates overflows int", t))
	}
	return int(t)
}

// gapOperator applies the symmetrised support chain K = |E|⁻¹ Σ_e P_e
// matrix-free. The edges are grouped into tilings: each tiling owns a set T
// of at most gapTileBits qubits holding all of its edges, and visits the
// vector in tiles, the 2^|T| indices that share the bits outside T. A tile is
// gathered into a small buffer, every edge of the tiling is applied there,
// and the result is added back, so each tiling is one pass over memory
// instead of one per edge. Tiles are disjoint, so workers need no locks; an
// entry always receives the same terms in the same order.
type gapOperator struct {
	n       int
	inv     float64
	workers int
	tilings []gapTiling
}

// gapTileBits is the tile size, 2^12 entries: two buffers fit in L2.
const gapTileBits = 12

// gapTiling is one group of edges and its tile qubits.
type gapTiling struct {
	off   []int    // off[l]: offset of local index l, bit k of l on qubit tile[k]
	rest  []int    // the qubits outside the tile, ascending
	edges [][2]int // the tiling's edges, as local bits (low, high)
}

// newGapOperator groups the edges of g into tilings greedily, in edge order.
func newGapOperator(g *circuits.Graph, workers int) *gapOperator {
	n := g.Qubits
	o := &gapOperator{n: n, inv: 1 / float64(len(g.Edges)), workers: max(workers, 1)}
	size := min(n, gapTileBits)
	left := slices.Clone(g.Edges)
	for len(left) > 0 {
		// The low qubits always join the tile, so its gathers read whole
		// cache lines.
		mask := 1<<min(3, size) - 1
		var mine, later []circuits.Edge
		for _, e := range left {
			if m := mask | 1<<e.A | 1<<e.B; bits.OnesCount(uint(m)) <= size {
				mask = m
				mine = append(mine, e)
			} else {
				later = append(later, e)
			}
		}
		for q := 0; bits.OnesCount(uint(mask)) < size; q++ {
			mask |= 1 << q
		}
		var t gapTiling
		var tile []int
		local := make([]int, n)
		for q := range n {
			if mask>>q&1 == 1 {
				local[q] = len(tile)
				tile = append(tile, q)
			} else {
				t.rest = append(t.rest, q)
			}
		}
		t.off = make([]int, 1<<len(tile))
		for l := range t.off {
			for k, q := range tile {
				t.off[l] |= (l >> k & 1) << q
			}
		}
		for _, e := range mine {
			a, b := local[e.A], local[e.B]
			t.edges = append(t.edges, [2]int{min(a, b), max(a, b)})
		}
		o.tilings = append(o.tilings, t)
		left = later
	}
	return o
}

// apply sets y = K x.
func (o *gapOperator) apply(y, x []float64) {
	for k, t := range o.tilings {
		tiles := 1 << len(t.rest)
		first, last := k == 0, k == len(o.tilings)-1
		body := func(from, to int) {
			xt := make([]float64, len(t.off))
			yt := make([]float64, len(t.off))
			for tile := from; tile < to; tile++ {
				base := 0
				for j, q := range t.rest {
					base |= (tile >> j & 1) << q
				}
				for l, off := range t.off {
					xt[l] = x[base|off]
				}
				if first {
					clear(yt)
				} else {
					for l, off := range t.off {
						yt[l] = y[base|off]
					}
				}
				for _, e := range t.edges {
					gapProjectAdd(yt, xt, e[0], e[1], 0, len(xt)/4)
				}
				if last {
					for l, off := range t.off {
						y[base|off] = yt[l] * o.inv
					}
				} else {
					for l, off := range t.off {
						y[base|off] = yt[l]
					}
				}
			}
		}
		w := o.workers
		if len(x) < gapParallel {
			w = 1
		}
		w = min(w, tiles)
		if w == 1 {
			body(0, tiles)
			continue
		}
		var wg sync.WaitGroup
		var carry crash.Carrier
		for i := range w {
			wg.Go(func() { defer carry.Catch(); body(tiles*i/w, tiles*(i+1)/w) })
		}
		wg.Wait()
		carry.Rethrow()
	}
}

// gapProjectAdd adds P_e x to y on the groups from..to−1 of edge bits
// la < lb; group r has base index r with zero bits inserted at la and lb.
func gapProjectAdd(y, x []float64, la, lb, from, to int) {
	ma, mb := 1<<la, 1<<lb
	for r := from; r < to; r++ {
		i := (r>>la)<<(la+1) | r&(ma-1)
		i = (i>>lb)<<(lb+1) | i&(mb-1)
		d := (x[i|ma]+x[i|mb])*frameU1 + x[i|ma|mb]*frameU2
		y[i] += x[i]
		y[i|ma] += d * frameU1
		y[i|mb] += d * frameU1
		y[i|ma|mb] += d * frameU2
	}
}

// gapResult is the top Ritz pair's value and its explicit residual norm.
type gapResult struct {
	value, residual float64
	applies         int
}

// gapChunk is the block of entries over which partial inner products are
// summed. It is fixed, so sums do not depend on the worker count.
const gapChunk = 1 << 12

// gapOrtho orthogonalises vectors against sets of orthonormal ones, split
// into fixed chunks shared out among workers.
type gapOrtho struct {
	workers int
	part    []float64
}

// run removes from w its components along the vectors of against, adding
// the coefficients to coef (len(coef) ≥ len(against)): classical
// Gram–Schmidt, one pass for the inner products, one for the update.
func (g *gapOrtho) run(w []float64, against [][]float64, coef []float64) {
	k := len(against)
	chunks := (len(w) + gapChunk - 1) / gapChunk
	if need := chunks * k; len(g.part) < need {
		g.part = make([]float64, need)
	}
	part := g.part[:chunks*k]
	g.parallel(chunks, func(c int) {
		lo, hi := c*gapChunk, min((c+1)*gapChunk, len(w))
		for i, v := range against {
			part[c*k+i] = floats.Dot(v[lo:hi], w[lo:hi])
		}
	})
	c := make([]float64, k)
	for ch := range chunks {
		for i := range k {
			c[i] += part[ch*k+i]
		}
	}
	g.parallel(chunks, func(ch int) {
		lo, hi := ch*gapChunk, min((ch+1)*gapChunk, len(w))
		for i, v := range against {
			floats.AddScaled(w[lo:hi], -c[i], v[lo:hi])
		}
	})
	for i := range k {
		coef[i] += c[i]
	}
}

// parallel calls f(c) for c in 0..chunks−1 on up to g.workers goroutines.
func (g *gapOrtho) parallel(chunks int, f func(c int)) {
	w := min(g.workers, chunks)
	if chunks*gapChunk < gapParallel {
		w = 1
	}
	if w <= 1 {
		for c := range chunks {
			f(c)
		}
		return
	}
	var wg sync.WaitGroup
	var carry crash.Carrier
	for i := range w {
		wg.Go(func() {
			defer carry.Catch()
			for c := chunks * i / w; c < chunks*(i+1)/w; c++ {
				f(c)
			}
		})
	}
	wg.Wait()
	carry.Rethrow()
}

// gapLanczos returns the largest eigenvalue of the symmetric operator apply
// on the orthogonal complement of the orthonormal vectors deflate (apply
// must map that complement into itself up to rounding), by thick-restart
// Lanczos with full reorthogonalisation (Wu & Simon 2000): a basis of at
// most basis vectors, H = VᵀKV built from the projections, and on restart
// the gapKeep top Ritz vectors plus the residual direction. It stops when
// the top Ritz pair's residual is at most GapTolerance, or exactly when the
// Krylov space becomes invariant.
func gapLanczos(ctx context.Context, dim, basis, workers int, apply func(y, x []float64), deflate [][]float64) (gapResult, error) {
	orth := &gapOrtho{workers: max(workers, 1)}
	scratch := make([]float64, len(deflate))
	v := make([][]float64, basis+1)
	for i := range v {
		v[i] = make([]float64, dim)
	}
	rng := rand.New(rand.NewPCG(gapSeed, 1))
	for i := range v[0] {
		v[0][i] = rng.NormFloat64()
	}
	orth.run(v[0], deflate, scratch)
	if nrm := floats.Norm(v[0], 2); nrm > 0 {
		floats.Scale(1/nrm, v[0])
	} else {
		return gapResult{}, fmt.Errorf("moments: Lanczos start vector vanished on the deflated subspace")
	}
	h := make([]float64, basis*basis) // H[i][j] at h[i*basis+j]
	hs := mat.NewSymDense(basis, nil)
	var es mat.EigenSym
	var y mat.Dense
	res := gapResult{}
	coef := make([]float64, basis)
	locked := 0
	for restart := 0; restart <= gapRestarts; restart++ {
		m, beta, invariant := basis, 0.0, false
		for j := locked; j < basis; j++ {
			if err := ctx.Err(); err != nil {
				return gapResult{}, fmt.Errorf("moments: spectral gap stopped after %d operator applications: %w", res.applies, err)
			}
			w := v[j+1]
			apply(w, v[j])
			res.applies++
			clear(coef[:j+1])
			for range 2 { // classical Gram–Schmidt twice (common practice)
				orth.run(w, deflate, scratch)
				orth.run(w, v[:j+1], coef)
			}
			for i := 0; i <= j; i++ {
				h[i*basis+j], h[j*basis+i] = coef[i], coef[i]
			}
			beta = floats.Norm(w, 2)
			// A Krylov vector this small relative to ‖K‖ ≤ 1 means the space
			// is invariant up to rounding: its Ritz values are eigenvalues.
			if beta < 1e-12 {
				m, invariant = j+1, true
				break
			}
			floats.Scale(1/beta, w)
		}
		// Rayleigh–Ritz on span v[0..m−1].
		hm := hs
		if m < basis {
			hm = mat.NewSymDense(m, nil)
		}
		for i := range m {
			for j := i; j < m; j++ {
				hm.SetSym(i, j, h[i*basis+j])
			}
		}
		if !es.Factorize(hm, true) {
			return gapResult{}, fmt.Errorf("moments: the %d×%d Rayleigh–Ritz eigenproblem did not converge", m, m)
		}
		theta := es.Values(nil) // ascending
		es.VectorsTo(&y)
		top := m - 1
		est := math.Abs(beta * y.At(m-1, top))
		if invariant || est <= GapTolerance || restart == gapRestarts {
			u := make([]float64, dim)
			for i := range m {
				floats.AddScaled(u, y.At(i, top), v[i])
			}
			ku := make([]float64, dim)
			apply(ku, u)
			res.applies++
			orth.run(ku, deflate, scratch)
			floats.AddScaled(ku, -theta[top], u)
			res.value, res.residual = theta[top], floats.Norm(ku, 2)
			if res.residual <= GapTolerance || invariant {
				return res, nil
			}
			if restart == gapRestarts {
				return res, fmt.Errorf("moments: Lanczos did not converge in %d restarts: residual %.3g above %g", gapRestarts, res.residual, GapTolerance)
			}
		}
		// Thick restart: keep the top Ritz vectors, then the residual vector.
		keep := min(gapKeep, m-1)
		gapRotate(v[:m], &y, m-keep, m)
		slices.Reverse(v[:keep]) // largest first; order is immaterial
		v[keep], v[basis] = v[basis], v[keep]
		clear(h)
		for i := range keep {
			h[i*basis+i] = theta[m-1-i]
		}
		locked = keep
	}
	panic("moments: unreachable")
}

// gapRotate replaces v[0..hi−lo−1] with the Ritz vectors Σ_i y[i][c] v[i]
// for the columns c = lo..hi−1, working on blocks of rows.
func gapRotate(v [][]float64, y *mat.Dense, lo, hi int) {
	m, dim, k := len(v), len(v[0]), hi-lo
	cols := make([]float64, k*m) // cols[c*m+i] = y[i][lo+c]
	for c := range k {
		for i := range m {
			cols[c*m+i] = y.At(i, lo+c)
		}
	}
	const block = 256
	rows := make([]float64, block*m) // rows[r*m+i] = v[i][r0+r]
	for r0 := 0; r0 < dim; r0 += block {
		nr := min(block, dim-r0)
		for i := range m {
			for r, x := range v[i][r0 : r0+nr] {
				rows[r*m+i] = x
			}
		}
		for c := range k {
			col := cols[c*m : (c+1)*m]
			dst := v[c][r0 : r0+nr]
			for r := range dst {
				dst[r] = floats.Dot(rows[r*m:(r+1)*m], col)
			}
		}
	}
}
