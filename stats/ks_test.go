package stats

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// ksBrute evaluates sup_t |F_emp(t) − F(t)| directly in O(n²): at every
// value x_j it counts the values ≤ x_j and < x_j, giving the empirical CDF
// at and just below the jump, and compares both with F(x_j). Between jumps
// F_emp is constant and F monotone, so the supremum is at these points
// (definition of the Kolmogorov–Smirnov statistic; Massey 1951, JASA 46, 68).
func ksBrute(x []float64, cdf func(float64) float64) float64 {
	n := float64(len(x))
	var d float64
	for _, xj := range x {
		var le, lt int
		for _, xi := range x {
			if xi <= xj {
				le++
			}
			if xi < xj {
				lt++
			}
		}
		f := cdf(xj)
		d = math.Max(d, math.Max(math.Abs(float64(le)/n-f), math.Abs(f-float64(lt)/n)))
	}
	return d
}

// TestKSHaarBruteForce compares KSHaar and KSPorterThomas with the direct
// O(D²) evaluation on random inputs: Haar states, arbitrary values in [0, 1),
// and values rounded to a coarse grid so that ties occur.
func TestKSHaarBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	for _, d := range []int{1, 2, 3, 7, 16, 50, 200} {
		h := HaarProb{Dim: float64(d)}
		for rep := 0; rep < 20; rep++ {
			var p []float64
			switch rep % 3 {
			case 0:
				p = haarProbs(rng, d)
			case 1:
				p = make([]float64, d)
				for i := range p {
					p[i] = rng.Float64()
				}
			case 2:
				p = haarProbs(rng, d)
				for i := range p {
					p[i] = math.Round(p[i]*float64(d)*2) / (float64(d) * 2)
				}
			}
			orig := slices.Clone(p)
			// Ties and rounding make the two evaluation orders differ by a few ulps.
			if got, want := KSHaar(p, nil), ksBrute(p, h.CDF); math.Abs(got-want) > 1e-15 {
				t.Errorf("D=%d rep=%d: KSHaar %.17g, brute force %.17g", d, rep, got, want)
			}
			scaled := make([]float64, d)
			for i, v := range p {
				scaled[i] = float64(d) * v
			}
			if got, want := KSPorterThomas(p, make([]float64, d+3)), ksBrute(scaled, PorterThomas{}.CDF); math.Abs(got-want) > 1e-15 {
				t.Errorf("D=%d rep=%d: KSPorterThomas %.17g, brute force %.17g", d, rep, got, want)
			}
			if !slices.Equal(p, orig) {
				t.Fatalf("D=%d: input modified", d)
			}
		}
	}
}

// TestKSHaarUniform checks the statistic of the uniform vector p = 1/D, all
// values tied at 1/D. F_emp jumps from 0 to 1 at t = 1/D, so the supremum is
// max(F(1/D), 1 − F(1/D)) with F(1/D) = 1 − (1 − 1/D)^(D−1) (by hand from the
// Beta(1, D−1) CDF of the Haar output law, F(t) = 1 − (1−t)^(D−1)):
//
//	D = 2:    1 − 1/2 = 1/2
//	D = 4:    1 − (3/4)³ = 1 − 27/64 = 37/64 = 0.578125
//	D = 1024: 1 − exp(1023·ln(1023/1024)) = 1 − 0.368059172196619462…
//	          = 0.631940827803380538 (bc -l, scale = 30), → 1 − 1/e ≈ 0.632.
//
// These are far above the 5% critical value 1.36/√D (Massey 1951).
func TestKSHaarUniform(t *testing.T) {
	for _, c := range []struct {
		d    int
		want float64
	}{
		{2, 0.5},
		{4, 0.578125},
		{1024, 0.631940827803380538},
	} {
		p := make([]float64, c.d)
		for i := range p {
			p[i] = 1 / float64(c.d)
		}
		// A few ulps of the expm1/log1p evaluation of F(1/D).
		if got := KSHaar(p, nil); math.Abs(got-c.want) > 1e-15 {
			t.Errorf("D=%d: KSHaar(uniform) = %.17g, want %.17g", c.d, got, c.want)
		}
		if crit := 1.36 / math.Sqrt(float64(c.d)); c.d >= 64 && KSHaar(p, nil) < 10*crit {
			t.Errorf("D=%d: uniform vector not rejected", c.d)
		}
	}
}

// TestKSHaarMonteCarlo draws Haar-random states (fixed seed) and checks that
// their KS distance from Beta(1, D−1) is small. The reference is Kolmogorov's
// asymptotic 5% critical value 1.36/√D for D i.i.d. values (Massey 1951, JASA
// 46, 68). The D probabilities of one state are exchangeable rather than
// independent (they sum to 1), which only shrinks the empirical-process
// fluctuations (normalised spacings; Pyke 1965, JRSS B 27, 395, from memory),
// so the test is conservative: the mean over states must be below the
// critical value (the Kolmogorov mean is ≈ 0.87/√D) and at most
// 5% + 4 binomial standard deviations of the states may exceed it.
func TestKSHaarMonteCarlo(t *testing.T) {
	rng := rand.New(rand.NewPCG(31, 32))
	const n = 200
	for _, d := range []int{64, 1024} {
		crit := 1.36 / math.Sqrt(float64(d))
		scratch := make([]float64, d)
		var sumKS, sumPT float64
		var over int
		for i := 0; i < n; i++ {
			p := haarProbs(rng, d)
			ks := KSHaar(p, scratch)
			sumKS += ks
			sumPT += KSPorterThomas(p, scratch)
			if ks > crit {
				over++
			}
		}
		maxOver := 0.05*n + 4*math.Sqrt(n*0.05*0.95)
		if mean := sumKS / n; mean >= crit || float64(over) > maxOver {
			t.Errorf("D=%d: mean KSHaar %.4g (critical %.4g), %d of %d over (max %.1f)", d, mean, crit, over, n, maxOver)
		}
		// Against Exp(1) the finite-D law differs by O(1/D) (the Beta(1, D−1)
		// law of D·p tends to Exp(1)), small next to 1/√D, so the same bound holds.
		if mean := sumPT / n; mean >= crit {
			t.Errorf("D=%d: mean KSPorterThomas %.4g (critical %.4g)", d, mean, crit)
		}
	}
}

// TestKSRealStates checks that KSPorterThomas detects a non-Haar law: the
// output probabilities of random real states follow χ²_1 in D·p (Porter &
// Thomas 1956), whose distance from Exp(1) is
// sup_x |erf(√(x/2)) − (1 − e^−x)|. By the triangle inequality the sample
// statistic lies within the sample's own KS distance from its true law, below
// the 1% critical value 1.63/√D (Massey 1951) and smaller still for
// exchangeable values (Pyke 1965).
func TestKSRealStates(t *testing.T) {
	var dist float64
	for x := 0.0; x < 20; x += 1e-4 {
		dist = math.Max(dist, math.Abs(math.Erf(math.Sqrt(x/2))+math.Expm1(-x)))
	}
	rng := rand.New(rand.NewPCG(41, 42))
	const d = 1 << 14
	p := realGaussianProbs(rng, d)
	got := KSPorterThomas(p, nil)
	if tol := 1.63 / math.Sqrt(d); math.Abs(got-dist) > tol {
		t.Errorf("KSPorterThomas(real state) = %.4g, want %.4g ± %.4g", got, dist, tol)
	}
	if crit := 1.36 / math.Sqrt(d); got < 5*crit {
		t.Errorf("real state not rejected: %.4g", got)
	}
}

// TestKSPanics checks the documented panics.
func TestKSPanics(t *testing.T) {
	if !mustPanic(func() { KSHaar(nil, nil) }) {
		t.Error("KSHaar(nil) did not panic")
	}
	if !mustPanic(func() { KSHaar([]float64{0.5, 0.5}, make([]float64, 1)) }) {
		t.Error("short scratch did not panic")
	}
	if got := KSHaar([]float64{0.5, math.NaN()}, nil); !math.IsNaN(got) {
		t.Errorf("NaN input gave %g", got)
	}
}

func BenchmarkKSHaar(b *testing.B) {
	for _, n := range []int{1 << 10, 1 << 16, 1 << 20} {
		p := haarProbs(rand.New(rand.NewPCG(1, 2)), n)
		scratch := make([]float64, n)
		b.Run(benchName(n), func(b *testing.B) {
			b.SetBytes(int64(8 * n))
			b.ReportAllocs()
			for b.Loop() {
				KSHaar(p, scratch)
			}
		})
	}
}
