package stats

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestLinearXEBUniform checks that samples with ideal probability exactly
// 1/D score F_lin = D·(1/D) − 1 = 0 with zero spread (Boixo et al. 2018,
// Nature Physics 14, 595: a uniform sampler scores 0). 1/D is a power of two,
// so every step is exact.
func TestLinearXEBUniform(t *testing.T) {
	const d = 1024
	p := make([]float64, 1000)
	for i := range p {
		p[i] = 1.0 / d
	}
	if f, se := LinearXEB(p, d); f != 0 || se != 0 {
		t.Errorf("LinearXEB(uniform) = %g ± %g, want 0 ± 0", f, se)
	}
}

// TestXEBMonteCarlo samples from one Haar-random state (fixed seed) with an
// ideal sampler, a depolarized one and a uniform one, and checks the
// benchmarks against their published expectations within 4 standard errors
// (two-sided 4σ band, false-alarm probability about 6e-5).
//
// Conditional on the state the expectations are exact: an ideal sampler has
// E[F_lin] = D·Z − 1 and E[F_log] = ln D + γ + Σ_x p ln p; the global
// depolarizing model q = f·p + (1−f)/D has E[F_lin] = f(D·Z − 1) (Boixo et
// al. 2018; Arute et al. 2019, Nature 574, 505); a
// uniform sampler has E[F_log] = ln D + γ + mean_x ln p.
//
// Over Haar states these tend to the Porter–Thomas values: F_lin → 1 and
// F_log → ψ(2) + γ = 1 for ideal sampling, F_log → −γ + γ = 0 for uniform
// sampling (E ln X = −γ for X ~ Exp(1); Boixo et al. 2018). Each conditional
// mean is an average over the D outcomes of a function g(X) of X = D·p, so it
// spreads from state to state by about √(Var g(X)/D), with the variance
// worked out below from Exp(1) moments; for those checks that spread is added
// in quadrature to the standard error.
func TestXEBMonteCarlo(t *testing.T) {
	rng := rand.New(rand.NewPCG(71, 72))
	const d, n = 4096, 20000
	df := float64(d)
	p := haarProbs(rng, d)
	z := Collision(p)
	var plogp, meanLog float64
	for _, v := range p {
		plogp += v * math.Log(v)
		meanLog += math.Log(v) / df
	}

	// Ideal sampler.
	ideal := sampleProbs(rng, p, n)
	f, se := LinearXEB(ideal, df)
	if want := df*z - 1; math.Abs(f-want) > 4*se {
		t.Errorf("ideal F_lin = %.4f ± %.4f, want D·Z − 1 = %.4f", f, se, want)
	}
	// Haar spread of D·Z − 1: Var(D·Σp²) ≈ D·Var(X²)/D² = 20/D for
	// X ~ Exp(1) (E X² = 2, E X⁴ = 24).
	if want, spread := (df-1)/(df+1), math.Sqrt(20/df); math.Abs(f-want) > 4*math.Hypot(se, spread) {
		t.Errorf("ideal F_lin = %.4f, want (D−1)/(D+1) = %.4f", f, want)
	}
	fl, sel := LogXEB(ideal, df)
	if want := math.Log(df) + EulerGamma + plogp; math.Abs(fl-want) > 4*sel {
		t.Errorf("ideal F_log = %.4f ± %.4f, want %.4f", fl, sel, want)
	}
	// Haar spread of Σ_x p ln(D p) ≈ √(Var(X ln X)/D): by hand from the
	// Gamma log-moments E[X^a ln² X] = Γ(a+1)(ψ(a+1)² + ψ'(a+1)) with
	// ψ(3) = 3/2 − γ and ψ'(3) = π²/6 − 5/4, E[X² ln² X] = 2(0.85153 +
	// 0.39493) = 2.49293, and E[X ln X] = ψ(2) = 1 − γ = 0.42278, so
	// Var(X ln X) = 2.49293 − 0.17875 = 2.31418.
	if spread := math.Sqrt(2.31418 / df); math.Abs(fl-1) > 4*math.Hypot(sel, spread) {
		t.Errorf("ideal F_log = %.4f, want ≈ 1", fl)
	}

	// Depolarized sampler with fidelity 0.3: with probability f draw from p,
	// otherwise uniformly.
	const fid = 0.3
	pool := sampleProbs(rng, p, n)
	dep := make([]float64, n)
	for i := range dep {
		if rng.Float64() < fid {
			dep[i] = pool[i]
		} else {
			dep[i] = p[rng.IntN(d)]
		}
	}
	f, se = LinearXEB(dep, df)
	if want := fid * (df*z - 1); math.Abs(f-want) > 4*se {
		t.Errorf("depolarized F_lin = %.4f ± %.4f, want f(D·Z − 1) = %.4f", f, se, want)
	}

	// Uniform sampler.
	uni := make([]float64, n)
	for i := range uni {
		uni[i] = p[rng.IntN(d)]
	}
	f, se = LinearXEB(uni, df)
	if want := df*(1/df) - 1; math.Abs(f-want) > 4*se { // Σ_x p/D·D − 1 = 0 exactly
		t.Errorf("uniform F_lin = %.4f ± %.4f, want 0", f, se)
	}
	fl, sel = LogXEB(uni, df)
	if want := math.Log(df) + EulerGamma + meanLog; math.Abs(fl-want) > 4*sel {
		t.Errorf("uniform F_log = %.4f ± %.4f, want %.4f", fl, sel, want)
	}
	// Haar spread of mean_x ln(D p) ≈ √(Var(ln X)/D) = √(π²/(6D)), since
	// Var(ln X) = ψ'(1) = π²/6 for X ~ Exp(1) (Abramowitz & Stegun 6.4.2,
	// from memory).
	if spread := math.Sqrt(math.Pi * math.Pi / 6 / df); math.Abs(fl) > 4*math.Hypot(sel, spread) {
		t.Errorf("uniform F_log = %.4f, want ≈ 0", fl)
	}
}

// TestLogXEBEdges checks the documented edge cases.
func TestLogXEBEdges(t *testing.T) {
	// All samples at p = 1/D give ln D + γ + ln(1/D) = γ exactly up to the
	// rounding of ln D − ln D, and no spread (by hand from the definition).
	p := []float64{0.25, 0.25, 0.25}
	if f, se := LogXEB(p, 4); relDiff(f, EulerGamma) > 1e-15 || se != 0 {
		t.Errorf("LogXEB(1/D) = %g ± %g, want γ ± 0", f, se)
	}
	if f, se := LogXEB([]float64{0.1, 0, 0.2}, 8); !math.IsInf(f, -1) || !math.IsNaN(se) {
		t.Errorf("LogXEB with p = 0 = %g ± %g, want −Inf ± NaN", f, se)
	}
	if f, se := LogXEB(nil, 8); !math.IsNaN(f) || !math.IsNaN(se) {
		t.Errorf("LogXEB(nil) = %g ± %g", f, se)
	}
	if f, se := LinearXEB([]float64{0.5}, 2); f != 0 || !math.IsNaN(se) {
		t.Errorf("LinearXEB(one sample) = %g ± %g, want 0 ± NaN", f, se)
	}
	if !mustPanic(func() { LogXEB([]float64{-0.1}, 8) }) {
		t.Error("negative probability did not panic")
	}
}

// TestXEBSamples checks the sample-count formulas for the linear XEB under
// global depolarization (per-sample variance 1+2f−f²), N = z²(1+2f−f²)/f² and N = (1+2f−f²)/(r f)², against values worked by hand:
//
//	f = 0.002, z = 5:  1 + 0.004 − 0.000004 = 1.003996; /4e-6 = 250999;
//	                   ×25 = 6274975.
//	f = 1, z = 1:      (1 + 2 − 1)/1 = 2.
//	f = 0.5, z = 3:    9·1.75/0.25 = 63.
//	f = 0.5, r = 0.1:  1.75/0.05² = 1.75/0.0025 = 700.
//	f = 0.01, r = 0.2: 1.0199/0.002² = 1.0199/4e-6 = 254975.
//
// 1e-12 relative allows the few roundings of the evaluation.
func TestXEBSamples(t *testing.T) {
	for _, c := range []struct{ f, z, want float64 }{
		{0.002, 5, 6274975},
		{1, 1, 2},
		{0.5, 3, 63},
	} {
		if got := XEBSamples(c.f, c.z); relDiff(got, c.want) > 1e-12 {
			t.Errorf("XEBSamples(%g, %g) = %.17g, want %g", c.f, c.z, got, c.want)
		}
	}
	for _, c := range []struct{ f, r, want float64 }{
		{0.5, 0.1, 700},
		{0.01, 0.2, 254975},
	} {
		if got := XEBSamplesRelative(c.f, c.r); relDiff(got, c.want) > 1e-12 {
			t.Errorf("XEBSamplesRelative(%g, %g) = %.17g, want %g", c.f, c.r, got, c.want)
		}
	}
	if !math.IsInf(XEBSamples(0, 2), 1) || !math.IsInf(XEBSamplesRelative(0, 0.1), 1) {
		t.Error("f = 0 should need infinitely many samples")
	}
	for _, f := range []func(){
		func() { XEBSamples(-0.1, 2) },
		func() { XEBSamples(1.1, 2) },
		func() { XEBSamples(0.5, 0) },
		func() { XEBSamplesRelative(0.5, -1) },
	} {
		if !mustPanic(f) {
			t.Error("invalid arguments did not panic")
		}
	}
}

// TestXEBSampleVariance checks the per-sample variance 1 + 2f − f² of D·p(x)
// for Porter–Thomas outputs under global depolarization q = f·p + (1−f)/D
// by Monte Carlo: x = D·p is drawn as Exp(1) size-biased with probability f
// (that is Gamma(2, 1), the law of D·p(x) for an ideal sample) and as Exp(1)
// otherwise. With 200000 fixed-seed draws the sample variance has a relative
// standard error of about √((κ−1)/n), κ the kurtosis: by hand from the raw
// moments (E X^k = k! for Exp(1), (k+1)! for Gamma(2, 1)) κ ≈ 7.6 at f = 0.3
// and 9 at f = 0, so √(8/200000) ≈ 0.6%, and 5% relative is over 4 standard
// errors. A wrong sign, 1 + 2f + f², would be 12% off at f = 0.3.
func TestXEBSampleVariance(t *testing.T) {
	rng := rand.New(rand.NewPCG(81, 82))
	for _, f := range []float64{0, 0.3, 1} {
		const n = 200000
		x := make([]float64, n)
		for i := range x {
			if rng.Float64() < f {
				x[i] = rng.ExpFloat64() + rng.ExpFloat64() // Gamma(2, 1)
			} else {
				x[i] = rng.ExpFloat64()
			}
		}
		s := Summarize(x)
		if got, want := s.StdDev*s.StdDev, XEBSampleVariance(f); relDiff(got, want) > 0.05 {
			t.Errorf("f=%g: sample variance %.4f, formula %.4f", f, got, want)
		}
	}
}
