package stats

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestPTBaselineScaling measures the finite-D Porter–Thomas baseline's
// scaling: the Kolmogorov–Smirnov distance of D values to their law falls
// as 1/√D (Kolmogorov's limit law, Kolmogorov 1933; any statistics text),
// and the normalisation Σp = 1 of a state's probabilities changes the
// constant, not the power. The slope of log(mean) against log(D) between
// D = 2^6 and 2^12 must be −1/2 within 0.03: 400 states per dimension give
// each mean to about 1.4% (sd/mean ≈ 0.27 over √400), so the log ratio to
// about 0.02 and the slope (divided by ln 64 ≈ 4.2) to about 0.005; the
// finite-D drift of the constant √D·mean (0.72 at D = 64, 0.73 at 4096,
// measured) moves it by about 0.003.
func TestPTBaselineScaling(t *testing.T) {
	lo, hi := haarPTBaseline(1<<6, 400), haarPTBaseline(1<<12, 400)
	slope := math.Log(hi.Mean/lo.Mean) / math.Log(hi.Dim/lo.Dim)
	t.Logf("√D·mean: %.4f at D = 64, %.4f at D = 4096; slope %.4f", lo.Mean*8, hi.Mean*64, slope)
	if math.Abs(slope+0.5) > 0.03 {
		t.Errorf("slope of log KS against log D = %.4f, want −0.5 ± 0.03", slope)
	}
	// Above PTBaselineMaxDim the baseline is scaled by the same law.
	b := HaarPTBaseline(4 * PTBaselineMaxDim)
	if m := HaarPTBaseline(PTBaselineMaxDim).Mean / 2; !b.Scaled || math.Abs(b.Mean-m) > 1e-15*m {
		t.Errorf("scaled baseline %+v, want mean %g", b, m)
	}
}

// TestPTBaselineAgainstGaussianStates checks the construction of the
// baseline (normalised Exp(1) values, uniform on the simplex) against Haar
// states drawn another way: normalised complex Gaussian vectors
// (haarProbs, common practice). At D = 64 the two means of 2000 states
// agree within 4 standard errors of their difference.
func TestPTBaselineAgainstGaussianStates(t *testing.T) {
	b := HaarPTBaseline(64)
	rng := rand.New(rand.NewPCG(5, 6))
	ks := make([]float64, 2000)
	for i := range ks {
		ks[i] = KSHaar(haarProbs(rng, 64), nil)
	}
	g := Summarize(ks)
	se := math.Hypot(g.StdErr, b.StdDev/math.Sqrt(float64(b.States)))
	if math.Abs(g.Mean-b.Mean) > 4*se {
		t.Errorf("baseline %.5f vs Gaussian states %.5f (se of the difference %.2g)", b.Mean, g.Mean, se)
	}
}

// TestMeanIntervalBCa checks the interval's defining properties on
// hand-made data: no interval below MinIntervalValues, a point interval for
// equal values, positive bounds for positive skewed data where the
// Student-t interval goes negative, and, for large symmetric samples,
// agreement with the Student-t interval (both are first-order correct:
// Efron & Tibshirani 1993, ch. 14) within 5% of the half-width, the
// bootstrap's Monte Carlo error with 2000 resamples being about 2%.
func TestMeanIntervalBCa(t *testing.T) {
	if _, _, ok := MeanIntervalBCa([]float64{1, 2, 3}, 0.95); ok {
		t.Error("interval from 3 values")
	}
	eq := []float64{2, 2, 2, 2, 2, 2, 2, 2, 2, 2}
	if lo, hi, ok := MeanIntervalBCa(eq, 0.95); !ok || lo != 2 || hi != 2 {
		t.Errorf("equal values: [%g, %g] %v", lo, hi, ok)
	}
	skewed := []float64{0.01, 0.01, 0.01, 0.01, 0.01, 0.01, 0.01, 0.01, 0.01, 5}
	tlo, _ := MeanInterval(Summarize(skewed), 0.95)
	lo, hi, ok := MeanIntervalBCa(skewed, 0.95)
	if !ok || !(lo > 0) || !(hi > lo) || tlo >= 0 {
		t.Errorf("skewed: BCa [%g, %g], t lower %g", lo, hi, tlo)
	}
	rng := rand.New(rand.NewPCG(1, 2))
	x := make([]float64, 400)
	for i := range x {
		x[i] = 10 + rng.NormFloat64()
	}
	s := Summarize(x)
	tl, tu := MeanInterval(s, 0.95)
	bl, bu, _ := MeanIntervalBCa(x, 0.95)
	half := (tu - tl) / 2
	if math.Abs(bl-tl) > 0.05*half || math.Abs(bu-tu) > 0.05*half {
		t.Errorf("normal data: BCa [%g, %g] vs t [%g, %g]", bl, bu, tl, tu)
	}
}

// TestJudge walks the verdict rule through each of its states.
func TestJudge(t *testing.T) {
	both := DefaultCriteria(0.05, 0.95)
	r := both
	r.Rule = RuleCollision
	cases := []struct {
		c          Criteria
		lo, hi     float64
		ok         bool
		pt         float64
		want       Verdict
		whatItTest string
	}{
		{both, 0.98, 1.03, true, 0.05, VerdictSpread, "inside the band, PT within margin"},
		{both, 0.98, 1.06, true, 0.05, VerdictShallow, "upper end above 1+eps"},
		{both, 0.93, 1.03, true, 0.05, VerdictFlat, "lower end below 1−eps"},
		{both, 0.93, 1.07, true, 0.05, VerdictUnresolved, "both ends outside"},
		{both, 0.98, 1.03, false, 0.05, VerdictUnresolved, "no interval"},
		{both, 0.98, 1.03, true, 0.5, VerdictDistorted, "PT distance far above Haar"},
		{both, 0.80, 1.20, true, 0.5, VerdictDistorted, "PT distance far above Haar, R unresolved"},
		{both, 1.10, 1.20, true, 0.5, VerdictShallow, "whole interval above 1+eps"},
		{both, 0.98, 1.03, true, math.NaN(), VerdictDistorted, "no PT distance"},
		{r, 0.80, 1.03, true, 0.5, VerdictSpread, "collision rule: only the upper end"},
		{r, 0.80, 1.06, true, 0.05, VerdictShallow, "collision rule, upper end above"},
	}
	for _, c := range cases {
		got := c.c.Judge(c.lo, c.hi, c.ok, c.pt, 0.045)
		if got != c.want {
			t.Errorf("%s: %s, want %s", c.whatItTest, got, c.want)
		}
		// Spread is exactly both criteria (the collision rule: the first).
		both := c.c.RWithin(c.lo, c.hi, c.ok) && (c.c.Rule == RuleCollision || c.c.PTNear(c.pt, 0.045))
		if (got == VerdictSpread) != both {
			t.Errorf("%s: verdict %s but criteria %v", c.whatItTest, got, both)
		}
	}
	if !mustPanic(func() { Criteria{Eps: 0.05, Confidence: 0.95, Rule: "r"}.Check() }) {
		t.Error("unknown rule accepted")
	}
}

// TestRecommendedDepth: the first depth from which every later depth is
// spread; a spread depth followed by a failing one does not count.
func TestRecommendedDepth(t *testing.T) {
	s, h := VerdictSpread, VerdictShallow
	cases := []struct {
		v    []Verdict
		want int
		ok   bool
	}{
		{[]Verdict{h, s, s, s}, 2, true},
		{[]Verdict{h, s, h, s}, 4, true},
		{[]Verdict{s, s, s, h}, 0, false},
		{[]Verdict{s, s, s, s}, 1, true},
	}
	for _, c := range cases {
		d, ok := RecommendedDepth([]int{1, 2, 3, 4}, c.v)
		if d != c.want || ok != c.ok {
			t.Errorf("%v: %d %v, want %d %v", c.v, d, ok, c.want, c.ok)
		}
	}
}
