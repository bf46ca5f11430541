package stats

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestHaarCollisionVarianceByHand checks D = 2 worked by hand: a Haar qubit
// state's p(0) is uniform on [0, 1] (Beta(1, 1)), Z = p² + (1 − p)², so
// E[Z] = 2/3 and E[Z²] = E[p⁴] + 2E[p²(1−p)²] + E[(1−p)⁴] = 1/5 + 1/15 + 1/5
// = 7/15, and Var Z = 7/15 − 4/9 = 1/45.
func TestHaarCollisionVarianceByHand(t *testing.T) {
	if got := HaarCollisionVariance(2); math.Abs(got-1.0/45) > 1e-16 {
		t.Errorf("D = 2: %v, want 1/45", got)
	}
	if got := HaarCollisionVariance(1); got != 0 {
		t.Errorf("D = 1: %v, want 0 (one outcome, Z = 1)", got)
	}
}

// TestHaarCollisionVarianceMonteCarlo draws Haar-random states (fixed seed)
// and compares the sample variance of Z with the formula within 4 standard
// errors of the sample variance, sqrt((m4 − s⁴)/N) with m4 the fourth
// central moment (the large-sample variance of a sample variance; e.g.
// Cramér, Mathematical Methods of Statistics, 1946, §27.4).
func TestHaarCollisionVarianceMonteCarlo(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	for _, d := range []int{4, 32, 256} {
		const n = 4000
		z := make([]float64, n)
		var mean float64
		for i := range z {
			z[i] = Collision(haarProbs(rng, d))
			mean += z[i] / n
		}
		var m2, m4 float64
		for _, v := range z {
			dv := v - mean
			m2 += dv * dv / n
			m4 += dv * dv * dv * dv / n
		}
		se := math.Sqrt((m4 - m2*m2) / n)
		if want := HaarCollisionVariance(float64(d)); math.Abs(m2-want) > 4*se {
			t.Errorf("D = %d: sample variance %.4g ± %.2g, formula %.4g", d, m2, se, want)
		}
	}
}
