package stats

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestLevel0Layout checks the level-0 bins that the count pass's fine bins
// are summed into, for dimensions from 2^4 to 2^24: the nodes tile the keys
// from −∞ to +∞ in order with no gap; every node in the octaves is a run of
// whole fine bins, in one octave; bin0 and fine0 agree with the nodes'
// ranges (checked to tile the keys) at both ends and the middle of every
// node and one key beyond it; and no level-0 bin holds more Beta(1, D−1) mass than the heaviest
// fine bin of the octaves of the mode, times 1.01. The mass is taken from
// the published CDF 1 − (1 − t)^(D−1) (design.md §3), computed here as
// −expm1((D−1)·log1p(−t)); the 1% allows for the Porter–Thomas
// approximation e^−x of the density that ksOctaveBits uses (relative error
// O(x²/D) ≲ 2^12/D in the octaves up to 2^6, at most 1/4 at D = 2^14; the
// octaves of large x, where it is largest, hold bins far below the bound).
func TestLevel0Layout(t *testing.T) {
	for _, n := range []int{4, 8, 10, 14, 16, 17, 20, 24} {
		dim := 1 << n
		r := newKSRefiner(dim, 1)
		nodes := r.nodes[:r.n0]
		if nodes[0].lo != ksKey(math.Inf(-1)) || nodes[r.n0-1].hi != ksKey(math.Inf(1))+1 {
			t.Fatalf("n=%d: level-0 nodes span [%#x, %#x)", n, nodes[0].lo, nodes[r.n0-1].hi)
		}
		for i := 1; i < r.n0; i++ {
			if nodes[i].lo != nodes[i-1].hi || nodes[i].lo >= nodes[i].hi {
				t.Fatalf("n=%d: node %d [%#x, %#x) after [%#x, %#x)", n, i, nodes[i].lo, nodes[i].hi, nodes[i-1].lo, nodes[i-1].hi)
			}
		}
		fw := uint64(1) << r.shift
		if nodes[3].lo != r.lo0 || nodes[2+r.nb0].hi != r.lo0+uint64(r.nbf)*fw {
			t.Fatalf("n=%d: octave nodes span [%#x, %#x), fine bins [%#x, %#x)", n, nodes[3].lo, nodes[2+r.nb0].hi, r.lo0, r.lo0+uint64(r.nbf)*fw)
		}
		for i := 3; i < 3+r.nb0; i++ {
			nd := nodes[i]
			if (nd.lo-r.lo0)%fw != 0 || (nd.hi-r.lo0)%fw != 0 || (nd.lo-r.lo0)>>52 != (nd.hi-1-r.lo0)>>52 {
				t.Fatalf("n=%d: node %d [%#x, %#x) is not a run of fine bins in one octave", n, i, nd.lo, nd.hi)
			}
		}
		for i, nd := range nodes {
			for _, k := range []uint64{nd.lo, nd.hi - 1, nd.lo + (nd.hi-nd.lo)/2} {
				if got := r.bin0(k); got != i {
					t.Fatalf("n=%d: bin0(%#x) = %d, want %d", n, k, got, i)
				}
				f := r.fine0(k)
				switch {
				case i < 3 && f != i, i == r.n0-1 && f != 3+r.nbf:
					t.Fatalf("n=%d: fine0(%#x) = %d in node %d", n, k, f, i)
				case i >= 3 && i < r.n0-1 && (f < 3+int((nd.lo-r.lo0)/fw) || f >= 3+int((nd.hi-r.lo0)/fw)):
					t.Fatalf("n=%d: fine0(%#x) = %d outside node %d's fine bins", n, k, f, i)
				}
			}
			if nd.hi <= ksKey(math.Inf(1)) && r.bin0(nd.hi) != i+1 {
				t.Fatalf("n=%d: key %#x after node %d is in node %d", n, nd.hi, i, r.bin0(nd.hi))
			}
		}
		// The mass of a bin [t, u] of keys.
		d := float64(dim)
		cdf := func(x float64) float64 { return -math.Expm1((d - 1) * math.Log1p(-x)) }
		mass := func(lo, hi uint64) float64 { return cdf(ksValue(hi)) - cdf(ksValue(lo)) }
		var fineMax float64
		for j := 0; j < r.nbf; j++ {
			lo := r.lo0 + uint64(j)*fw
			fineMax = max(fineMax, mass(lo, lo+fw))
		}
		for i := 3; i < 3+r.nb0; i++ {
			if m := mass(nodes[i].lo, nodes[i].hi); m > 1.01*fineMax {
				t.Errorf("n=%d: node %d holds mass %.3g, the heaviest fine bin %.3g", n, i, m, fineMax)
			}
		}
		// The layout's point: fewer level-0 bins than fine bins, about
		// 5.3·2^b for 18·2^b (ksOctaveBits) once b ≥ 4 keeps every rule's
		// octave at one bin or more.
		if b := 52 - r.shift; b >= 8 && float64(r.nb0) > 5.5*float64(uint64(1)<<b) {
			t.Errorf("n=%d: %d level-0 bins in the octaves for 2^%d fine bins per octave", n, r.nb0, b)
		}
	}
}

// TestKSHaarPassesEdges compares the streamed statistic with the
// sort-based KSHaar (checked against the O(D²) definition in ks_test.go) on
// states whose probabilities sit exactly on the edges of the level-0 bins
// and of the fine bins (the first and the last value of each, and the
// first value past it), mixed with zeros, subnormals, the smallest normal
// value, values above the octaves and Porter–Thomas values; and checks
// that one NaN among them gives NaN. The values are not normalised: the
// statistic is defined for any values (ks.go), and the bins must route
// each to the bin of its key. 1e−15 as in TestKSHaarPassesExact.
func TestKSHaarPassesEdges(t *testing.T) {
	rng := rand.New(rand.NewPCG(61, 62))
	for _, n := range []int{10, 14, 16} {
		dim := 1 << n
		r := newKSRefiner(dim, 1)
		var edges []float64
		for i := 2; i < r.n0; i++ {
			nd := r.nodes[i]
			edges = append(edges, ksValue(nd.lo), ksValue(nd.hi-1))
		}
		fw := uint64(1) << r.shift
		for j := 0; j <= r.nbf; j += 1 + rng.IntN(7) {
			k := r.lo0 + uint64(j)*fw
			edges = append(edges, ksValue(k-1), ksValue(k), ksValue(k+1))
		}
		special := []float64{0, math.SmallestNonzeroFloat64, 0x1p-1040, 0x1p-1022, 4 / float64(dim) * 64, 1}
		p := make([]float64, dim)
		for i := range p {
			switch u := rng.IntN(10); {
			case u < 5:
				p[i] = edges[rng.IntN(len(edges))]
			case u < 6:
				p[i] = special[rng.IntN(len(special))]
			default:
				p[i] = rng.ExpFloat64() / float64(dim)
			}
		}
		want := KSHaar(p, nil)
		for _, tc := range []struct{ budget, block, workers int }{{0, 4096, 1}, {64, 1000, 2}, {1, 7, 2}} {
			calls := 0
			got, _ := KSHaarPasses(dim, tc.workers, tc.budget, blockPass(p, tc.block, tc.workers, &calls))
			if math.Abs(got-want) > 1e-15 {
				t.Errorf("n=%d budget=%d workers=%d: streamed %.17g, KSHaar %.17g", n, tc.budget, tc.workers, got, want)
			}
		}
		// The same values as amplitudes (√p, 0): CountAmplitudes squares
		// them back, to p or to a neighbour of it; the reference takes the
		// squares the passes see.
		a := make([]float64, 2*dim)
		q := make([]float64, dim)
		for i, v := range p {
			a[2*i] = math.Sqrt(v)
			q[i] = float64(a[2*i] * a[2*i])
		}
		want = KSHaar(q, nil)
		h := NewHaarKS(dim, 2, 0)
		apass := func(visit func(w int, a []float64)) {
			for off, blk := 0, 0; off < len(a); off, blk = off+8192, blk+1 {
				visit(blk%2, a[off:min(off+8192, len(a))])
			}
		}
		apass(func(w int, b []float64) { h.CountAmplitudes(w, b) })
		if got, _ := h.FinishAmplitudes(apass); math.Abs(got-want) > 1e-15 {
			t.Errorf("n=%d amplitudes: streamed %.17g, KSHaar %.17g", n, got, want)
		}
		p[rng.IntN(dim)] = math.NaN()
		calls := 0
		if got, _ := KSHaarPasses(dim, 2, 0, blockPass(p, 4096, 2, &calls)); !math.IsNaN(got) {
			t.Errorf("n=%d: one NaN gave %g, want NaN", n, got)
		}
	}
}

// TestKSHaarPassesAnyDim: for D not a power of two the level-0 runs fall off
// the octaves, and the statistic must still equal the sort-based KSHaar (the
// definition of the Kolmogorov–Smirnov distance: common practice) to 1e-15.
func TestKSHaarPassesAnyDim(t *testing.T) {
	for _, dim := range []int{3, 1000, 3000, 65537, 100000} {
		rng := rand.New(rand.NewPCG(uint64(dim), 1))
		p := make([]float64, dim)
		var s float64
		for i := range p {
			p[i] = rng.ExpFloat64() // Porter–Thomas shape
			s += p[i]
		}
		for i := range p {
			p[i] /= s
		}
		want := KSHaar(append([]float64(nil), p...), nil)
		for _, workers := range []int{1, 2} {
			got, _ := KSHaarPasses(dim, workers, 0, func(visit func(w int, p []float64)) {
				visit(0, p[:dim/2])
				visit(workers-1, p[dim/2:])
			})
			if math.Abs(got-want) > 1e-15 {
				t.Errorf("D = %d, %d workers: %v, the sort gives %v", dim, workers, got, want)
			}
		}
	}
}
