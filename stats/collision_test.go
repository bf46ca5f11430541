package stats

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats"
)

// TestCollisionSmall checks Σ p² on distributions worked by hand: a point
// mass has Z = 1 and the uniform law on D outcomes Z = 1/D, the extremes of
// the collision probability (common practice).
func TestCollisionSmall(t *testing.T) {
	for _, c := range []struct {
		p    []float64
		want float64
	}{
		{nil, 0},
		{[]float64{1}, 1},
		{[]float64{0, 0, 1, 0}, 1},
		{[]float64{0.5, 0.5}, 0.5},
		{[]float64{0.25, 0.25, 0.25, 0.25}, 0.25},
		{[]float64{0.1, 0.2, 0.3, 0.4}, 0.30}, // 0.01+0.04+0.09+0.16
	} {
		if got := Collision(c.p); relDiff(got, c.want) > 1e-15 {
			t.Errorf("Collision(%v) = %.17g, want %g", c.p, got, c.want)
		}
	}
}

// TestCollisionMatchesDot compares with gonum's floats.Dot(p, p) (reference
// library) on random vectors of awkward lengths around the pairwise block
// size. Both are accurate to a few 1e-16·len relative for positive terms;
// 1e-13 allows the sequential Dot its n·ε.
func TestCollisionMatchesDot(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	for _, n := range []int{1, 3, 4, 5, 127, 128, 129, 255, 256, 257, 1000, 4099} {
		p := haarProbs(rng, n)
		if got, want := Collision(p), floats.Dot(p, p); relDiff(got, want) > 1e-13 {
			t.Errorf("n=%d: Collision %.17g, floats.Dot %.17g", n, got, want)
		}
	}
}

// TestCollisionAccurateLarge checks the pairwise sum on 2^22 terms against an
// exact reference. With p_i = i·2^−40 (i = 1..n) every square i²·2^−80 is
// exact in float64, and Σ i² = n(n+1)(2n+1)/6 (Faulhaber, common practice) is
// exact in big.Int, so the only error is Collision's summation. The pairwise
// bound is about (block/4 + log2(n/block) + 1)·ε ≈ 48·1.1e-16 ≈ 5e-15
// relative (Higham 2002, Accuracy and Stability of Numerical Algorithms,
// section 4.2, from memory); a sequential sum's bound n·ε ≈ 5e-10 is far
// looser.
func TestCollisionAccurateLarge(t *testing.T) {
	const n = 1 << 22
	p := make([]float64, n)
	for i := range p {
		p[i] = math.Ldexp(float64(i+1), -40)
	}
	nb := big.NewInt(n)
	s := new(big.Int).Mul(nb, new(big.Int).Add(nb, big.NewInt(1)))
	s.Mul(s, new(big.Int).Add(new(big.Int).Mul(nb, big.NewInt(2)), big.NewInt(1)))
	s.Div(s, big.NewInt(6))
	want, _ := new(big.Float).SetMantExp(new(big.Float).SetInt(s), -80).Float64()
	got := Collision(p)
	if r := relDiff(got, want); r > 5.3e-15 {
		t.Errorf("Collision of 2^22 terms: %.17g, exact %.17g (relative %.2g)", got, want, r)
	}
}

// TestCollisionHaarMonteCarlo draws Haar-random states (fixed seed) and checks
// that the mean collision probability matches Z_H = 2/(D+1) (Dalzell,
// Hunter-Jones, Brandão 2022, PRX Quantum 3, 010333) within 4 standard errors
// of the sample mean (a two-sided 4σ band: a false alarm has probability
// about 6e-5 per seed, and with the seed fixed the outcome is deterministic).
func TestCollisionHaarMonteCarlo(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, d := range []int{2, 16, 256} {
		z := make([]float64, 2000)
		for i := range z {
			z[i] = Collision(haarProbs(rng, d))
		}
		s := Summarize(z)
		if want := HaarCollision(float64(d)); math.Abs(s.Mean-want) > 4*s.StdErr {
			t.Errorf("D=%d: mean Z = %.6g ± %.2g, Z_H = %.6g", d, s.Mean, s.StdErr, want)
		}
	}
}

func BenchmarkCollision(b *testing.B) {
	for _, n := range []int{1 << 10, 1 << 16, 1 << 20, 1 << 24} {
		p := haarProbs(rand.New(rand.NewPCG(1, 2)), n)
		b.Run(benchName(n), func(b *testing.B) {
			b.SetBytes(int64(8 * n))
			b.ReportAllocs()
			for b.Loop() {
				Collision(p)
			}
		})
	}
}

// benchName names a benchmark size as a power of two when it is one.
func benchName(n int) string {
	for k := 0; k < 63; k++ {
		if n == 1<<k {
			return "2^" + itoa(k)
		}
	}
	return itoa(n)
}

func itoa(n int) string { return big.NewInt(int64(n)).String() }
