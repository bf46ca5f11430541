package circuits

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// round4 rounds the real and imaginary parts of every entry to 4 decimal
// digits, as a matrix copied from a calibration sheet is.
func round4(m []complex128) []complex128 {
	out := make([]complex128, len(m))
	for i, v := range m {
		out[i] = complex(math.Round(real(v)*1e4)/1e4, math.Round(imag(v)*1e4)/1e4)
	}
	return out
}

// TestNearestUnitaryRounded: a Haar-random unitary (Mezzadri 2007) rounded
// to 4 digits is unitary only to about 1e-4; its polar factor is unitary to
// 1e-12 (round-off of an 8×8 SVD) and within 1e-4 of the original (the
// polar factor moves a perturbed unitary by about the size of the
// perturbation, here at most 0.5e-4·√2 per entry; Higham 2008, §8.1).
func TestNearestUnitaryRounded(t *testing.T) {
	rng := rand.New(rand.NewPCG(2008, 8))
	for _, d := range []int{2, 4} {
		for range 50 {
			u := make([]complex128, d*d)
			HaarUnitary(rng, d, u)
			m := round4(u)
			got, change, err := NearestUnitary(m, d)
			if err != nil {
				t.Fatal(err)
			}
			if dev := UnitaryDeviation(got, d); dev > 1e-12 {
				t.Errorf("d=%d: polar factor unitary only to %g", d, dev)
			}
			far := 0.0
			for i := range u {
				far = max(far, cmplx.Abs(got[i]-u[i]))
			}
			if far > 1e-4 || change > 1e-4 {
				t.Errorf("d=%d: polar factor %g from the original, %g from the rounded matrix", d, far, change)
			}
		}
	}
	// A unitary is its own polar factor (to round-off).
	cz, _ := Entangler("cz")
	got, change, err := NearestUnitary(cz[:], 4)
	if err != nil || change > 1e-15 || cmplx.Abs(got[15]+1) > 1e-15 {
		t.Errorf("NearestUnitary(CZ) moved it by %g (%v)", change, err)
	}
	if _, _, err := NearestUnitary(make([]complex128, 4), 2); err == nil {
		t.Error("the zero matrix has a nearest unitary")
	}
}
