package stats

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// TestSummarizeWorked checks Summarize on worked examples. {2,4,4,4,5,5,7,9}
// has mean 5 and Σ(x−5)² = 32, so the unbiased standard deviation is
// √(32/7) and the standard error √(32/7)/√8 = √(4/7) (common textbook
// example, e.g. the "Standard deviation" article of Wikipedia, from memory).
// {1, 2, 3, 4} has mean 2.5, Σ(x−2.5)² = 5, sd √(5/3), stderr √(5/12) (by
// hand).
func TestSummarizeWorked(t *testing.T) {
	for _, c := range []struct {
		x              []float64
		mean, sd, serr float64
	}{
		{[]float64{2, 4, 4, 4, 5, 5, 7, 9}, 5, math.Sqrt(32.0 / 7), math.Sqrt(4.0 / 7)},
		{[]float64{1, 2, 3, 4}, 2.5, math.Sqrt(5.0 / 3), math.Sqrt(5.0 / 12)},
		{[]float64{3, 3, 3}, 3, 0, 0},
	} {
		s := Summarize(c.x)
		if s.N != len(c.x) || relDiff(s.Mean, c.mean) > 1e-15 || relDiff(s.StdDev, c.sd) > 1e-15 || relDiff(s.StdErr, c.serr) > 1e-15 {
			t.Errorf("Summarize(%v) = %+v, want mean %g sd %g stderr %g", c.x, s, c.mean, c.sd, c.serr)
		}
	}
}

// TestSummarizeDirect compares Summarize with a direct two-pass evaluation
// of mean and Σ(x−mean)²/(n−1) (the textbook definitions, common practice)
// on random data with a large offset, where a one-pass formula would lose
// digits. At offset 1e6 both evaluations round the mean to about
// 1e-16·1e6 = 1e-10, which enters the deviations (size 1) directly: hence
// 1e-12 relative for the mean and 1e-9 for the standard deviation.
// (Summarize delegates to gonum stat.MeanStdDev, so comparing with gonum
// directly would test nothing.)
func TestSummarizeDirect(t *testing.T) {
	rng := rand.New(rand.NewPCG(51, 52))
	x := make([]float64, 10001)
	for i := range x {
		x[i] = 1e6 + rng.NormFloat64()
	}
	var sum float64
	for _, v := range x {
		sum += v
	}
	mean := sum / float64(len(x))
	var ss float64
	for _, v := range x {
		ss += (v - mean) * (v - mean)
	}
	sd := math.Sqrt(ss / float64(len(x)-1))
	s := Summarize(x)
	if relDiff(s.Mean, mean) > 1e-12 || relDiff(s.StdDev, sd) > 1e-9 || relDiff(s.StdErr, sd/math.Sqrt(float64(len(x)))) > 1e-9 {
		t.Errorf("Summarize = %+v, direct mean %.17g sd %.17g", s, mean, sd)
	}
}

// TestSummarizeSmall checks the documented N = 0 and N = 1 behaviour and the
// unbounded intervals that follow from it.
func TestSummarizeSmall(t *testing.T) {
	s0 := Summarize(nil)
	if s0.N != 0 || !math.IsNaN(s0.Mean) || !math.IsNaN(s0.StdDev) || !math.IsNaN(s0.StdErr) {
		t.Errorf("Summarize(nil) = %+v", s0)
	}
	s1 := Summarize([]float64{0.7})
	if s1.N != 1 || s1.Mean != 0.7 || !math.IsNaN(s1.StdDev) || !math.IsNaN(s1.StdErr) {
		t.Errorf("Summarize({0.7}) = %+v", s1)
	}
	r, lo, hi := RatioInterval(s1, 0.5, 0.95)
	if r != 1.4 || !math.IsInf(lo, -1) || !math.IsInf(hi, 1) {
		t.Errorf("RatioInterval(N=1) = %g, [%g, %g], want 1.4, (−Inf, +Inf)", r, lo, hi)
	}
	if lo, hi := MeanInterval(s0, 0.9); !math.IsInf(lo, -1) || !math.IsInf(hi, 1) {
		t.Errorf("MeanInterval(N=0) = [%g, %g]", lo, hi)
	}
}

// TestRatioIntervalStudentT checks the half-width against Student's t
// quantiles t_{q,ν} from standard tables (Student 1908, Biometrika 6, 1;
// values as in any t table: t_{0.975,9} = 2.262157, t_{0.975,1} = 12.706205,
// t_{0.995,4} = 4.604095, t_{0.95,29} = 1.699127; from memory, confirmed to
// more digits with mpmath). The tables give 7 significant digits, hence
// 5e-7 relative. The level is also checked with gonum's StudentsT CDF
// (reference library) to 1e-9.
func TestRatioIntervalStudentT(t *testing.T) {
	for _, c := range []struct {
		n    int
		conf float64
		tq   float64
	}{
		{10, 0.95, 2.262157},
		{2, 0.95, 12.706205},
		{5, 0.99, 4.604095},
		{30, 0.90, 1.699127},
	} {
		s := Summary{N: c.n, Mean: 0.8, StdDev: 0.3, StdErr: 0.3 / math.Sqrt(float64(c.n))}
		const zh = 0.4
		r, lo, hi := RatioInterval(s, zh, c.conf)
		if relDiff(r, 2) > 1e-15 {
			t.Errorf("ratio = %g, want 0.8/0.4 = 2", r)
		}
		tq := (hi - lo) * zh / 2 / s.StdErr
		if relDiff(tq, c.tq) > 5e-7 {
			t.Errorf("N=%d conf=%g: t quantile %.9g, table %g", c.n, c.conf, tq, c.tq)
		}
		if relDiff((lo+hi)/2, r) > 1e-15 {
			t.Errorf("interval [%g, %g] not centred on %g", lo, hi, r)
		}
		st := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(c.n - 1)}
		if got := st.CDF(tq); math.Abs(got-(1+c.conf)/2) > 1e-9 {
			t.Errorf("N=%d: CDF(t) = %.12g, want %g", c.n, got, (1+c.conf)/2)
		}
	}
}

// TestMeanIntervalCoverage checks the defining property of the t interval:
// for normal data it covers the true mean with probability conf exactly
// (Student 1908). 20000 fixed-seed repetitions of N = 5 normal draws; the
// coverage must lie within 4 binomial standard deviations of 0.95.
func TestMeanIntervalCoverage(t *testing.T) {
	rng := rand.New(rand.NewPCG(61, 62))
	const reps, n, conf = 20000, 5, 0.95
	x := make([]float64, n)
	var cover int
	for r := 0; r < reps; r++ {
		for i := range x {
			x[i] = 3 + 2*rng.NormFloat64()
		}
		lo, hi := MeanInterval(Summarize(x), conf)
		if lo <= 3 && 3 <= hi {
			cover++
		}
	}
	got := float64(cover) / reps
	if tol := 4 * math.Sqrt(conf*(1-conf)/reps); math.Abs(got-conf) > tol {
		t.Errorf("coverage %.4f, want %.2f ± %.4f", got, conf, tol)
	}
}

// TestIntervalPanics checks the documented panics.
func TestIntervalPanics(t *testing.T) {
	s := Summary{N: 3, Mean: 1, StdDev: 1, StdErr: 1}
	for _, f := range []func(){
		func() { MeanInterval(s, 0) },
		func() { MeanInterval(s, 1) },
		func() { MeanInterval(s, math.NaN()) },
		func() { RatioInterval(s, 0, 0.9) },
		func() { RatioInterval(s, -1, 0.9) },
	} {
		if !mustPanic(f) {
			t.Error("invalid interval arguments did not panic")
		}
	}
}
