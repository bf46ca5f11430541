package circuits

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// maxUnitarityError returns max_ij |(U†U − I)_ij| for a row-major d×d u.
func maxUnitarityError(u []complex128, d int) float64 {
	worst := 0.0
	for i := 0; i < d; i++ {
		for j := 0; j < d; j++ {
			var s complex128
			for k := 0; k < d; k++ {
				s += cmplx.Conj(u[k*d+i]) * u[k*d+j]
			}
			if i == j {
				s--
			}
			worst = max(worst, cmplx.Abs(s))
		}
	}
	return worst
}

// TestHaarUnitarity checks U†U = I for many draws of several sizes. The
// tolerance 1e-12 is about 5000 ulp of 1: Gram–Schmidt with a second
// orthogonalisation pass is orthogonal to a small multiple of machine
// epsilon ("twice is enough"; from memory: Giraud, Langou, Rozložník, "The
// loss of orthogonality in the Gram–Schmidt orthogonalization process",
// Comput. Math. Appl. 50, 1069, 2005).
func TestHaarUnitarity(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, d := range []int{1, 2, 3, 4, 8} {
		u := make([]complex128, d*d)
		for range 2000 {
			HaarUnitary(rng, d, u)
			if e := maxUnitarityError(u, d); e > 1e-12 {
				t.Fatalf("d=%d: |U†U − I| = %g > 1e-12", d, e)
			}
		}
	}
	var m [16]complex128
	for range 5000 {
		Haar{}.Gate(rng, &m)
		if e := maxUnitarityError(m[:], 4); e > 1e-12 {
			t.Fatalf("Haar.Gate: |U†U − I| = %g > 1e-12", e)
		}
	}
}

func TestHaarUnitaryPanicsOnLength(t *testing.T) {
	defer func() {
		if recover() == nil {
			t.Fatal("HaarUnitary with len(u) != d*d did not panic")
		}
	}()
	HaarUnitary(rand.New(rand.NewPCG(1, 1)), 4, make([]complex128, 15))
}

// meanSE returns the sample mean and its standard error sd/√N.
func meanSE(xs []float64) (mean, se float64) {
	n := float64(len(xs))
	for _, x := range xs {
		mean += x
	}
	mean /= n
	var ss float64
	for _, x := range xs {
		ss += (x - mean) * (x - mean)
	}
	return mean, math.Sqrt(ss / (n - 1) / n)
}

// TestHaarMoments compares Monte Carlo moments of Haar.Gate with exact Haar
// values. Every tolerance is 4 standard errors, estimated from the sample
// (N = 40 000, fixed seed): a correct sampler fails one given check with
// probability about 6e-5.
func TestHaarMoments(t *testing.T) {
	const N = 40000
	const d = 4
	rng := rand.New(rand.NewPCG(20260101, 7))
	var m [16]complex128
	tr2 := make([]float64, N)    // |Tr U|²
	tr4 := make([]float64, N)    // |Tr U|⁴
	reTr := make([]float64, N)   // Re Tr U
	imTr := make([]float64, N)   // Im Tr U
	reTrSq := make([]float64, N) // Re Tr U²
	imTrSq := make([]float64, N) // Im Tr U²
	var ent2, ent4 [16][]float64 // |U_ij|², |U_ij|⁴
	for k := range ent2 {
		ent2[k] = make([]float64, N)
		ent4[k] = make([]float64, N)
	}
	for s := range N {
		Haar{}.Gate(rng, &m)
		var tr, trSq complex128
		for i := 0; i < d; i++ {
			tr += m[i*d+i]
			for k := 0; k < d; k++ {
				trSq += m[i*d+k] * m[k*d+i]
			}
		}
		a := real(tr)*real(tr) + imag(tr)*imag(tr)
		tr2[s], tr4[s] = a, a*a
		reTr[s], imTr[s] = real(tr), imag(tr)
		reTrSq[s], imTrSq[s] = real(trSq), imag(trSq)
		for k, v := range m {
			p := real(v)*real(v) + imag(v)*imag(v)
			ent2[k][s], ent4[k][s] = p, p*p
		}
	}
	check := func(name string, xs []float64, want float64) {
		t.Helper()
		mean, se := meanSE(xs)
		if math.Abs(mean-want) > 4*se {
			t.Errorf("%s = %.5f ± %.5f, want %g (|diff| > 4 s.e.)", name, mean, se, want)
		}
	}
	// E|Tr U|^(2k) = k! for U(d) with d ≥ k (Diaconis & Shahshahani, "On the
	// eigenvalues of random matrices", J. Appl. Probab. 31A, 49, 1994).
	check("E|Tr U|²", tr2, 1)
	check("E|Tr U|⁴", tr4, 2)
	// Haar eigenvalue phases are uniform, so E[Tr U^j] = 0 for j ≥ 1; a QR
	// without R's diagonal phases divided out biases them (Mezzadri, "How to
	// generate random matrices from the classical compact groups", Notices
	// AMS 54, 592, 2007).
	check("Re E[Tr U]", reTr, 0)
	check("Im E[Tr U]", imTr, 0)
	check("Re E[Tr U²]", reTrSq, 0)
	check("Im E[Tr U²]", imTrSq, 0)
	// A column of a Haar unitary is a Haar-random unit vector in C^d, so
	// |U_ij|² ~ Beta(1, d−1) with E[p] = 1/d (common practice) and
	// E[p²] = 2/(d(d+1)) = 1/10 (moments k!/(d(d+1)…(d+k−1)) of Beta(1, d−1), common practice).
	for k := range ent2 {
		check("E|U_ij|²", ent2[k], 1.0/d)
		check("E|U_ij|⁴", ent4[k], 2.0/(d*(d+1)))
	}
}
