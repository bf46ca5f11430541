package stats

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"
)

// ulp returns the spacing of float64 values at |x|.
func ulp(x float64) float64 {
	x = math.Abs(x)
	return math.Nextafter(x, math.Inf(1)) - x
}

// TestHaarProbMatchesGonumBeta checks the closed forms of HaarProb against
// gonum's general Beta(1, D−1) (reference library: gonum stat/distuv.Beta;
// the law is from Porter & Thomas 1956 / Dalzell, Hunter-Jones, Brandão 2022).
func TestHaarProbMatchesGonumBeta(t *testing.T) {
	xs := []float64{1e-9, 1e-4, 0.01, 0.1, 0.3, 0.5, 0.9, 1, 1.5, 2, 3, 5, 8, 13, 20}
	for _, d := range []float64{2, 3, 4, 5, 8, 16, 17, 64, 100, 1024, 1 << 14, 1 << 20} {
		b := distuv.Beta{Alpha: 1, Beta: d - 1}
		h := HaarProb{Dim: d}
		// gonum evaluates the Beta normaliser as lgamma(D) − lgamma(D−1), which
		// loses about one ulp of lgamma(D) to cancellation; that, not
		// HaarProb, limits the agreement at large D. 1e-12 covers D ≤ 1024;
		// above, four ulps of lgamma(D) are allowed.
		lg, _ := math.Lgamma(d)
		tol := 1e-12 + 4*ulp(lg)
		for _, x := range xs {
			// A grid in units of the mean 1/D, where the law has its mass,
			// plus a grid on the whole of [0, 1].
			for _, tt := range []float64{x / d, x / 20} {
				if tt > 1 {
					continue
				}
				if got, want := h.CDF(tt), b.CDF(tt); relDiff(got, want) > tol {
					t.Errorf("D=%g CDF(%g) = %.17g, gonum Beta %.17g", d, tt, got, want)
				}
				if tt == 1 {
					continue // gonum's density at the endpoint is 0/0 for D = 2.
				}
				if got, want := h.Prob(tt), b.Prob(tt); want > 1e-300 && relDiff(got, want) > tol {
					t.Errorf("D=%g Prob(%g) = %.17g, gonum Beta %.17g", d, tt, got, want)
				}
				if got, want := h.LogProb(tt), b.LogProb(tt); math.Abs(got-want) > tol*math.Max(1, math.Abs(want)) {
					t.Errorf("D=%g LogProb(%g) = %.17g, gonum Beta %.17g", d, tt, got, want)
				}
				if w := b.Survival(tt); w > 1e-300 {
					if got := h.Survival(tt); relDiff(got, w) > tol {
						t.Errorf("D=%g Survival(%g) = %.17g, gonum Beta %.17g", d, tt, got, w)
					}
				}
			}
		}
		if got, want := h.Mean(), b.Mean(); relDiff(got, want) > 1e-15 {
			t.Errorf("D=%g Mean = %g, gonum Beta %g", d, got, want)
		}
		if got, want := h.Variance(), b.Variance(); relDiff(got, want) > 1e-14 {
			t.Errorf("D=%g Variance = %g, gonum Beta %g", d, got, want)
		}
		// Quantile: gonum inverts the incomplete beta function iteratively,
		// good to about 1e-10 relative here (observed; its own tolerance).
		// The lgamma cancellation above enters it at the same relative size.
		for _, u := range []float64{0.001, 0.1, 0.5, 0.9, 0.999} {
			if got, want := h.Quantile(u), b.Quantile(u); relDiff(got, want) > 1e-9+tol {
				t.Errorf("D=%g Quantile(%g) = %.17g, gonum Beta %.17g", d, u, got, want)
			}
		}
	}
}

// TestHaarProbEdges checks the clamping outside [0, 1] and the endpoint
// values of 1 − (1−t)^(D−1) and its density (the Beta(1, D−1) law of Haar
// output probabilities, evaluated by hand at t = 0 and t = 1).
func TestHaarProbEdges(t *testing.T) {
	for _, d := range []float64{1, 2, 3, 1024} {
		h := HaarProb{Dim: d}
		if h.CDF(-0.5) != 0 || h.CDF(0) != 0 || h.CDF(1) != 1 || h.CDF(2) != 1 {
			t.Errorf("D=%g CDF not clamped: %g %g %g %g", d, h.CDF(-0.5), h.CDF(0), h.CDF(1), h.CDF(2))
		}
		if h.Survival(-0.5) != 1 || h.Survival(1) != 0 || h.Survival(2) != 1-h.CDF(2) {
			t.Errorf("D=%g Survival not clamped", d)
		}
		if h.Prob(-0.1) != 0 || h.Prob(1.1) != 0 {
			t.Errorf("D=%g Prob nonzero outside [0,1]", d)
		}
	}
	// D = 2 is the uniform law on [0, 1]: density 1, CDF t (to the two
	// roundings of −expm1(log1p(−t))).
	h2 := HaarProb{Dim: 2}
	for _, tt := range []float64{0, 0.25, 0.5, 1} {
		if h2.Prob(tt) != 1 || relDiff(h2.CDF(tt), tt) > 4e-16 {
			t.Errorf("D=2 at %g: Prob %g CDF %g, want 1 and %g", tt, h2.Prob(tt), h2.CDF(tt), tt)
		}
	}
	// D = 1: the single probability is 1.
	h1 := HaarProb{Dim: 1}
	if h1.CDF(0.999) != 0 || h1.Quantile(0.3) != 1 || h1.Mean() != 1 {
		t.Errorf("D=1 not the point mass at 1")
	}
	// Quantile inverts CDF (definition), also for small u where the
	// expm1/log1p forms matter.
	h := HaarProb{Dim: 1 << 24}
	for _, u := range []float64{1e-15, 1e-8, 0.3, 0.99} {
		if got := h.CDF(h.Quantile(u)); relDiff(got, u) > 1e-9 {
			t.Errorf("CDF(Quantile(%g)) = %g", u, got)
		}
	}
	if !mustPanic(func() { h.Quantile(1.5) }) {
		t.Error("Quantile(1.5) did not panic")
	}
}

// TestPorterThomasMatchesGonumExponential checks PorterThomas against gonum's
// Exp(1) (reference library: gonum stat/distuv.Exponential; the law is from
// Porter & Thomas 1956).
func TestPorterThomasMatchesGonumExponential(t *testing.T) {
	e := distuv.Exponential{Rate: 1}
	var pt PorterThomas
	for _, x := range []float64{0, 1e-12, 1e-3, 0.5, 1, 2, 10, 50} {
		for _, pair := range [][2]float64{
			{pt.CDF(x), e.CDF(x)},
			{pt.Survival(x), e.Survival(x)},
			{pt.Prob(x), e.Prob(x)},
			{pt.LogProb(x), e.LogProb(x)},
		} {
			if relDiff(pair[0], pair[1]) > 1e-14 {
				t.Errorf("x=%g: %.17g vs gonum %.17g", x, pair[0], pair[1])
			}
		}
	}
	// gonum's Exp quantile is −log(1−u), which loses digits for small u, so
	// it is the reference only for moderate u; below, the series
	// −log1p(−u) = u + u²/2 + u³/3 + … (by hand) is.
	for _, u := range []float64{0.1, 0.5, 0.99} {
		if got, want := pt.Quantile(u), e.Quantile(u); relDiff(got, want) > 1e-14 {
			t.Errorf("Quantile(%g) = %g, gonum %g", u, got, want)
		}
	}
	for _, u := range []float64{1e-10, 1e-6} {
		if got, want := pt.Quantile(u), u+u*u/2+u*u*u/3; relDiff(got, want) > 1e-15 {
			t.Errorf("Quantile(%g) = %.17g, series %.17g", u, got, want)
		}
	}
	if pt.CDF(-1) != 0 || pt.Prob(-1) != 0 || pt.Survival(-1) != 1 || !math.IsInf(pt.LogProb(-1), -1) {
		t.Error("PorterThomas not zero below 0")
	}
	if pt.Mean() != e.Mean() || pt.Variance() != e.Variance() {
		t.Error("PorterThomas mean/variance differ from gonum Exp(1)")
	}
	// Large-D limit (Porter & Thomas 1956): the Beta(1, D−1) law of D·p tends
	// to Exp(1). |(D−1)·ln(1−x/D) + x| ≤ x/D + x²/D for x ≤ D/2 (Taylor
	// bound, by hand), so the survival functions agree to that relative order.
	d := float64(1 << 20)
	h := HaarProb{Dim: d}
	for _, x := range []float64{0.1, 1, 5, 20} {
		got, want := h.Survival(x/d), pt.Survival(x)
		if relDiff(got, want) > 2*(x+x*x)/d {
			t.Errorf("D=%g: Survival(%g/D) = %g, Porter–Thomas %g", d, x, got, want)
		}
	}
}

// TestHaarMoment checks E[p^k] = k!/(D(D+1)…(D+k−1)), the moments of
// Beta(1, D−1) (common practice).
func TestHaarMoment(t *testing.T) {
	for _, d := range []float64{1, 2, 3, 4, 16, 1024, 1 << 30} {
		// k = 0, 1, 2 written out by hand from the formula.
		if got := HaarMoment(0, d); got != 1 {
			t.Errorf("D=%g: E[p^0] = %g", d, got)
		}
		if got, want := HaarMoment(1, d), 1/d; relDiff(got, want) > 1e-15 {
			t.Errorf("D=%g: E[p] = %g, want 1/D = %g", d, got, want)
		}
		if got, want := HaarMoment(2, d), 2/(d*(d+1)); relDiff(got, want) > 1e-15 {
			t.Errorf("D=%g: E[p²] = %g, want 2/(D(D+1)) = %g", d, got, want)
		}
		// D·E[p²] = Z_H = 2/(D+1) (the k = 2 moment above).
		if got, want := d*HaarMoment(2, d), HaarCollision(d); relDiff(got, want) > 2e-16*4 {
			t.Errorf("D=%g: D·E[p²] = %g, Z_H = %g", d, got, want)
		}
		// Moments of Beta(1, D−1) from gonum: E[p²] = Var + Mean².
		if d > 1 {
			b := distuv.Beta{Alpha: 1, Beta: d - 1}
			if got, want := HaarMoment(2, d), b.Variance()+b.Mean()*b.Mean(); relDiff(got, want) > 1e-14 {
				t.Errorf("D=%g: E[p²] = %g, gonum Beta Var+Mean² = %g", d, got, want)
			}
		}
	}
	// Numerical integration of t^k against the Beta(1, D−1) density with
	// gonum's Gauss–Legendre rule. The integrand is a polynomial of degree
	// k + D − 2, which an n-point rule integrates exactly when
	// 2n − 1 ≥ k + D − 2 (Gauss quadrature, common practice), so only
	// rounding remains: 1e-12 relative.
	for _, d := range []float64{2, 3, 5, 16, 40} {
		h := HaarProb{Dim: d}
		for k := 1; k <= 6; k++ {
			n := (k+int(d))/2 + 2
			f := func(x float64) float64 { return math.Pow(x, float64(k)) * h.Prob(x) }
			want := quad.Fixed(f, 0, 1, n, quad.Legendre{}, 0)
			if got := HaarMoment(k, d); relDiff(got, want) > 1e-12 {
				t.Errorf("D=%g k=%d: E[p^k] = %.17g, quadrature %.17g", d, k, got, want)
			}
		}
	}
	// Porter–Thomas limit: D^k E[p^k] → k! (moments of Exp(1)), from below,
	// with 1 − D^k E[p^k]/k! = 1 − Π_j (1+j/D)^(−1) ≤ Σ_j j/D = k(k−1)/(2D)
	// (by hand).
	d := float64(1 << 20)
	for k := 1; k <= 8; k++ {
		kf := math.Gamma(float64(k + 1))
		r := math.Pow(d, float64(k)) * HaarMoment(k, d) / kf
		if bound := float64(k*(k-1)) / (2 * d); r > 1+1e-14 || 1-r > bound+1e-14 {
			t.Errorf("k=%d: D^k E[p^k]/k! = %.17g, want within [1−%g, 1]", k, r, bound)
		}
	}
	// Stability: large k and D neither overflow nor underflow to garbage;
	// compare with the log-gamma form exp(lgamma(k+1) + lgamma(D) − lgamma(D+k)).
	for _, c := range []struct {
		k int
		d float64
	}{{50, 1 << 10}, {170, 200}, {300, 4}} {
		lk, _ := math.Lgamma(float64(c.k + 1))
		ld, _ := math.Lgamma(c.d)
		ldk, _ := math.Lgamma(c.d + float64(c.k))
		want := math.Exp(lk + ld - ldk)
		// The log-gamma reference loses about ulp(lgamma(D+k))·(log terms)
		// to cancellation; 1e-11 relative covers it for these sizes.
		if got := HaarMoment(c.k, c.d); relDiff(got, want) > 1e-11 {
			t.Errorf("k=%d D=%g: %g, lgamma form %g", c.k, c.d, got, want)
		}
	}
	if !mustPanic(func() { HaarMoment(-1, 4) }) || !mustPanic(func() { HaarMoment(2, 0.5) }) {
		t.Error("HaarMoment accepted invalid arguments")
	}
}

// TestHaarCollision checks Z_H = 2/(D+1) at hand-computed values
// (Dalzell, Hunter-Jones, Brandão 2022, PRX Quantum 3, 010333: one Haar gate
// on two qubits gives 2/5).
func TestHaarCollision(t *testing.T) {
	for _, c := range []struct{ d, want float64 }{
		{1, 1}, {2, 2.0 / 3}, {4, 0.4}, {1024, 2.0 / 1025},
	} {
		if got := HaarCollision(c.d); relDiff(got, c.want) > 1e-16 {
			t.Errorf("Z_H(%g) = %g, want %g", c.d, got, c.want)
		}
	}
	for _, d := range []float64{0, -1, math.NaN(), math.Inf(1)} {
		if !mustPanic(func() { HaarCollision(d) }) {
			t.Errorf("HaarCollision(%g) did not panic", d)
		}
	}
}

// TestEulerGamma checks γ = H_n − ψ(n+1) with the asymptotic series
// ψ(z) = ln z − 1/(2z) − 1/(12z²) + 1/(120z⁴) − 1/(252z⁶) + 1/(240z⁸) − …
// (Abramowitz & Stegun 1964, 6.3.18, from memory). At z = 101 the first
// omitted term is below 1e-22; the float64 cancellation in H_100 − ln 101
// (both about 5) leaves a few ulps of 5, i.e. a few 1e-15, hence 1e-14.
// (gonum mathext.Digamma(1) is only good to about 1e-10, too coarse here.)
func TestEulerGamma(t *testing.T) {
	const n = 100
	var h float64
	for i := n; i >= 1; i-- {
		h += 1 / float64(i)
	}
	z := float64(n + 1)
	z2 := z * z
	psi := math.Log(z) - 1/(2*z) - 1/(12*z2) + 1/(120*z2*z2) - 1/(252*z2*z2*z2) + 1/(240*z2*z2*z2*z2)
	if g := h - psi; relDiff(EulerGamma, g) > 1e-14 {
		t.Errorf("EulerGamma = %.17g, H_n − ψ(n+1) = %.17g", EulerGamma, g)
	}
	// And roughly against gonum's digamma, ψ(1) = −γ, at its own precision.
	if got := -mathext.Digamma(1); math.Abs(got-EulerGamma) > 1e-9 {
		t.Errorf("−ψ(1) = %.17g, EulerGamma = %.17g", got, EulerGamma)
	}
}
