package stats

import (
	"math"
	"math/rand/v2"
	"sync"
	"testing"
)

// blockPass returns a ProbabilityPass over p that hands out blocks of the
// given size, split across workers goroutines in interleaved order (block b
// to worker b mod workers), and counts its calls.
func blockPass(p []float64, block, workers int, calls *int) ProbabilityPass {
	return func(visit func(w int, p []float64)) {
		*calls++
		var wg sync.WaitGroup
		for w := 0; w < workers; w++ {
			wg.Add(1)
			go func() {
				defer wg.Done()
				buf := make([]float64, block)
				for off := w * block; off < len(p); off += workers * block {
					b := buf[:copy(buf, p[off:min(off+block, len(p))])]
					visit(w, b)
				}
			}()
		}
		wg.Wait()
	}
}

// TestKSHaarPassesExact compares the streamed statistic with the sort-based
// KSHaar (itself checked against the O(D²) definition in ks_test.go) on
// Haar states (Porter & Thomas 1956: the law the bins are tuned for), on
// the χ²_1 outputs of real Gaussian states (far from Beta(1, D−1), a large
// supremum), on a uniform superposition over a subset (stabiliser-like
// outputs: many exact ties and zeros), on |0…0⟩ and on values rounded to a
// coarse grid. Both evaluate the same terms i/D − F(x_(i)) and
// F(x_(i)) − (i−1)/D with F = HaarProb.CDF; the streamed one drops only
// bins whose upper bound is below a proven lower bound, so the results agree
// to rounding: 1e−15 allows a few ulps from the grouping of ties. Small
// budgets force one, two or more refinement passes.
func TestKSHaarPassesExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(41, 42))
	type input struct {
		name string
		p    []float64
	}
	var inputs []input
	for _, d := range []int{1, 2, 5, 1 << 10, 3000, 1 << 16} {
		inputs = append(inputs, input{"haar", haarProbs(rng, d)})
	}
	inputs = append(inputs, input{"real", realGaussianProbs(rng, 1<<14)})
	subset := make([]float64, 1<<14)
	for i := 0; i < len(subset); i += 4 {
		subset[i] = 1.0 / float64(len(subset)/4)
	}
	inputs = append(inputs, input{"subset", subset})
	point := make([]float64, 1<<12)
	point[0] = 1
	inputs = append(inputs, input{"point", point})
	grid := haarProbs(rng, 1<<13)
	for i := range grid {
		grid[i] = math.Round(grid[i]*float64(len(grid))*4) / (float64(len(grid)) * 4)
	}
	inputs = append(inputs, input{"grid", grid})
	for _, in := range inputs {
		want := KSHaar(in.p, nil)
		for _, tc := range []struct{ budget, block, workers int }{
			{0, 4096, 1}, {64, 1000, 3}, {4, 512, 2}, {1, 7, 2},
		} {
			calls := 0
			got, passes := KSHaarPasses(len(in.p), tc.workers, tc.budget, blockPass(in.p, tc.block, tc.workers, &calls))
			if math.Abs(got-want) > 1e-15 {
				t.Errorf("%s D=%d budget=%d workers=%d: streamed %.17g, KSHaar %.17g", in.name, len(in.p), tc.budget, tc.workers, got, want)
			}
			if passes != calls {
				t.Errorf("%s D=%d: reported %d passes, pass was called %d times", in.name, len(in.p), passes, calls)
			}
		}
	}
}

// TestKSHaarPassesLarge checks a Haar state of 2^20 outputs with the default
// budget against KSHaar, and that the bins leave few values to sort: the
// statistic of a Haar state is of order 1/√D (Kolmogorov 1933), and only
// bins within their width (≲ 2^−12 of the mass) of the supremum survive, so
// two to four passes suffice. The expected size of the statistic gives an
// independent sanity check: for D = 2^20 the Kolmogorov law puts
// √D·KS between 0.3 and 2.5 with probability above 0.999 (Kolmogorov
// distribution quantiles, from memory: P(K ≤ 0.3) ≈ 1e−5, P(K > 2.5) ≈ 1e−5).
func TestKSHaarPassesLarge(t *testing.T) {
	rng := rand.New(rand.NewPCG(43, 44))
	p := haarProbs(rng, 1<<20)
	want := KSHaar(p, nil)
	calls := 0
	got, passes := KSHaarPasses(len(p), 2, 0, blockPass(p, 4096, 2, &calls))
	if math.Abs(got-want) > 1e-15 {
		t.Errorf("streamed %.17g, KSHaar %.17g", got, want)
	}
	if passes < 2 || passes > 4 {
		t.Errorf("%d passes, want 2 to 4 for a Haar state", passes)
	}
	if s := math.Sqrt(float64(len(p))) * got; s < 0.3 || s > 2.5 {
		t.Errorf("√D·KS = %g outside the Kolmogorov law's bulk", s)
	}
}

// TestKSHaarPassesNaN: a NaN probability makes the statistic NaN, as for
// KSHaar.
func TestKSHaarPassesNaN(t *testing.T) {
	p := []float64{0.5, math.NaN(), 0.5}
	calls := 0
	if got, _ := KSHaarPasses(3, 1, 0, blockPass(p, 2, 1, &calls)); !math.IsNaN(got) {
		t.Errorf("got %g, want NaN", got)
	}
	if !mustPanic(func() { KSHaarPasses(0, 1, 0, blockPass(nil, 1, 1, &calls)) }) {
		t.Error("no panic for dim 0")
	}
}

func TestKSKeyOrder(t *testing.T) {
	// ksKey must be strictly increasing over the floats (IEEE 754 ordering,
	// common practice) and ksValue its inverse.
	vals := []float64{math.Inf(-1), -2, -1e-300, math.Copysign(0, -1), 0, 5e-324, 1e-300, 0.5, 1, math.Inf(1)}
	for i := 1; i < len(vals); i++ {
		if vals[i] == 0 && vals[i-1] == 0 {
			continue
		}
		if ksKey(vals[i-1]) >= ksKey(vals[i]) {
			t.Errorf("ksKey(%g) ≥ ksKey(%g)", vals[i-1], vals[i])
		}
	}
	for _, v := range vals {
		if got := ksValue(ksKey(v)); got != v || math.Signbit(got) != math.Signbit(v) {
			t.Errorf("ksValue(ksKey(%g)) = %g", v, got)
		}
	}
}

// TestHaarKSReuse runs one HaarKS per dimension over several states in a
// row, as the scan does at each read-out depth, and compares every result
// with the sort of KSHaar to 1e−15 (the same terms; see
// TestKSHaarPassesExact): Haar states of 2^10 to 2^20 outputs, a uniform
// superposition over a quarter of the basis (a stabiliser state's output:
// many equal probabilities), a state whose small probabilities underflow to
// subnormals and zeros, and a Haar state again (the counters of the earlier
// states must be gone). It also checks that a Porter–Thomas state needs one
// refinement pass after the counting pass (two passes in all) at 2^20: the
// bins near the mode then hold about 2^−10 of the mass each, against a
// statistic of order 2^−10, so only some hundreds of bins (≲ D/16 values)
// can hold the supremum.
func TestHaarKSReuse(t *testing.T) {
	rng := rand.New(rand.NewPCG(45, 46))
	for _, d := range []int{1 << 10, 1 << 14, 1 << 20} {
		h := NewHaarKS(d, 2, 0)
		subset := make([]float64, d)
		for i := 0; i < d; i += 4 {
			subset[i] = 4 / float64(d)
		}
		under := haarProbs(rng, d)
		for i := range under {
			if i%3 == 0 {
				under[i] *= 1e-310 // subnormal, or 0 once squared away
			}
			if i%7 == 0 {
				under[i] = 0
			}
		}
		for k, p := range [][]float64{haarProbs(rng, d), subset, under, haarProbs(rng, d)} {
			want := KSHaar(p, nil)
			calls := 0
			pass := blockPass(p, 4096, 2, &calls)
			pass(h.Count)
			got, more := h.Finish(pass)
			if math.Abs(got-want) > 1e-15 {
				t.Errorf("D=%d state %d: HaarKS %.17g, KSHaar %.17g", d, k, got, want)
			}
			if more != calls-1 {
				t.Errorf("D=%d state %d: Finish reported %d passes, pass was called %d times after the count", d, k, more, calls-1)
			}
			if d == 1<<20 && (k == 0 || k == 3) && more != 1 {
				t.Errorf("D=%d Haar state: %d refinement passes, want 1", d, more)
			}
		}
	}
}

// TestCountAmplitudes: the fused first pass over amplitudes returns the
// collision sum of Collision bit for bit (the same squares re·re + im·im
// added in the same pairwise order) and fills the same histogram as Count
// does from the probabilities, so the statistic, finished over the
// probabilities (Finish) or over the amplitudes (FinishAmplitudes), equals
// the sort of KSHaar to 1e−15 (see TestKSHaarPassesExact). The amplitudes: complex Gaussian
// (Haar states; Porter & Thomas 1956), block lengths that are not multiples
// of the leaf or of four, a state with exact zeros and subnormal squares,
// and a uniform superposition over a quarter of the basis (many equal
// probabilities, as a stabiliser state's output).
func TestCountAmplitudes(t *testing.T) {
	rng := rand.New(rand.NewPCG(47, 48))
	for _, d := range []int{1, 3, 130, 1 << 12, 5000, 1 << 16} {
		for kind := 0; kind < 3; kind++ {
			a := make([]float64, 2*d)
			s := math.Sqrt(0.5 / float64(d))
			for i := range a {
				a[i] = s * rng.NormFloat64()
			}
			switch kind {
			case 1:
				for i := 0; i < d; i += 3 {
					a[2*i], a[2*i+1] = 1e-160*a[2*i], 0 // squares subnormal or 0
				}
				for i := 0; i < d; i += 7 {
					a[2*i], a[2*i+1] = 0, 0
				}
			case 2:
				for i := 0; i < d; i++ {
					a[2*i], a[2*i+1] = 0, 0
					if i%4 == 0 {
						a[2*i] = math.Sqrt(4 / float64(d))
					}
				}
			}
			p := make([]float64, d)
			for i := range p {
				p[i] = float64(a[2*i]*a[2*i]) + float64(a[2*i+1]*a[2*i+1])
			}
			// A budget of 16 values forces refinement passes before the collect.
			h := NewHaarKS(d, 2, []int{16, 0, 0}[kind])
			// Blocks of 4096 amplitudes, alternating between two workers.
			const block = 4096
			for off, w := 0, 0; off < d; off, w = off+block, 1-w {
				end := min(off+block, d)
				if z, want := h.CountAmplitudes(w, a[2*off:2*end]), Collision(p[off:end]); z != want {
					t.Errorf("D=%d kind %d block at %d: CountAmplitudes sum %.17g, Collision %.17g", d, kind, off, z, want)
				}
			}
			calls := 0
			var got float64
			if kind == 1 {
				got, _ = h.Finish(blockPass(p, block, 2, &calls))
			} else {
				got, _ = h.FinishAmplitudes(AmplitudePass(blockPass(a, 2*block, 2, &calls)))
			}
			if kind == 0 && d >= 1<<12 && calls < 2 {
				t.Errorf("D=%d kind %d: %d refinement passes with a budget of 16, want a split before the collect", d, kind, calls)
			}
			if want := KSHaar(p, nil); math.Abs(got-want) > 1e-15 {
				t.Errorf("D=%d kind %d: HaarKS %.17g, KSHaar %.17g", d, kind, got, want)
			}
		}
	}
	if !mustPanic(func() { NewHaarKS(4, 1, 0).CountAmplitudes(0, make([]float64, 3)) }) {
		t.Error("no panic for an odd number of floats")
	}
}
