package stats

import (
	"math"
	"testing"
)

// TestAnticoncentrationDepth checks the project's depth rule: the smallest depth whose upper confidence bound of R is ≤ 1+ε.
func TestAnticoncentrationDepth(t *testing.T) {
	inf := math.Inf(1)
	for _, c := range []struct {
		name   string
		depths []int
		upper  []float64
		eps    float64
		depth  int
		ok     bool
	}{
		{"empty", nil, nil, 0.05, 0, false},
		{"first qualifies", []int{1, 2, 3}, []float64{1.01, 1.0, 0.99}, 0.05, 1, true},
		{"decreasing", []int{2, 4, 6, 8}, []float64{3.1, 1.6, 1.08, 1.02}, 0.05, 8, true},
		{"boundary counts", []int{2, 4, 6}, []float64{1.5, 1.25, 1.1}, 0.25, 4, true},
		{"none", []int{1, 2}, []float64{2, 1.2}, 0.1, 0, false},
		{"unbounded and NaN skipped", []int{1, 3, 5}, []float64{inf, math.NaN(), 1.0}, 0, 5, true},
		{"non-monotone: first hit", []int{1, 2, 3}, []float64{1.5, 1.04, 1.2}, 0.05, 2, true},
		{"below one", []int{10, 20}, []float64{0.7, 0.9}, 0, 10, true},
	} {
		d, ok := AnticoncentrationDepth(c.depths, c.upper, c.eps)
		if d != c.depth || ok != c.ok {
			t.Errorf("%s: got (%d, %v), want (%d, %v)", c.name, d, ok, c.depth, c.ok)
		}
	}
	for _, f := range []func(){
		func() { AnticoncentrationDepth([]int{1, 2}, []float64{1}, 0.1) },
		func() { AnticoncentrationDepth([]int{2, 1}, []float64{1, 1}, 0.1) },
		func() { AnticoncentrationDepth([]int{1, 1}, []float64{1, 1}, 0.1) },
		func() { AnticoncentrationDepth([]int{1}, []float64{1}, -0.1) },
	} {
		if !mustPanic(f) {
			t.Error("invalid arguments did not panic")
		}
	}
}

// TestPaleyZygmund checks the bound Pr[p ≥ β/D] ≥ α(1−β)² with
// α = 1/(D·E[Z]) (Dalzell, Hunter-Jones, Brandão 2022, PRX Quantum 3, 010333).
func TestPaleyZygmund(t *testing.T) {
	for _, d := range []float64{2, 4, 1024, 1 << 20} {
		zh := HaarCollision(d)
		// At E[Z] = Z_H: α = (D+1)/(2D), so β = 0 gives (D+1)/(2D) and
		// β = 1/2 gives (D+1)/(8D) (by hand).
		if got, want := PaleyZygmund(zh, d, 0), (d+1)/(2*d); relDiff(got, want) > 1e-15 {
			t.Errorf("D=%g β=0: %g, want (D+1)/(2D) = %g", d, got, want)
		}
		if got, want := PaleyZygmund(zh, d, 0.5), (d+1)/(8*d); relDiff(got, want) > 1e-15 {
			t.Errorf("D=%g β=1/2: %g, want (D+1)/(8D) = %g", d, got, want)
		}
		if got := PaleyZygmund(zh, d, 1); got != 0 {
			t.Errorf("D=%g β=1: %g, want 0", d, got)
		}
		// E[Z] = 1/D (the minimum, uniform outputs) gives α = 1; below it
		// α is clamped to 1.
		if got := PaleyZygmund(0.5/d, d, 0.2); relDiff(got, 0.64) > 1e-15 {
			t.Errorf("D=%g clamped: %g, want 0.64", d, got)
		}
		// The bound must hold for the exact Haar law: the survival function
		// (1 − β/D)^(D−1) of Beta(1, D−1) lies above it for every β.
		h := HaarProb{Dim: d}
		for b := 0.0; b <= 1; b += 0.05 {
			if pz, exact := PaleyZygmund(zh, d, b), h.Survival(b/d); exact < pz {
				t.Errorf("D=%g β=%g: Paley–Zygmund %g above exact Haar %g", d, b, pz, exact)
			}
		}
	}
	for _, f := range []func(){
		func() { PaleyZygmund(0, 4, 0.5) },
		func() { PaleyZygmund(0.4, 0.5, 0.5) },
		func() { PaleyZygmund(0.4, 4, -0.1) },
		func() { PaleyZygmund(0.4, 4, 1.1) },
	} {
		if !mustPanic(f) {
			t.Error("invalid arguments did not panic")
		}
	}
}
