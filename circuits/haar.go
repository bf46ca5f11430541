package circuits

import (
	"math"
	"math/cmplx"
	"math/rand/v2"

	"mixdepth/internal/pinned"
)

// HaarUnitary fills u (row-major d×d, len(u) == d*d) with a Haar-random
// unitary drawn from rng, by Mezzadri's method ("How to generate random
// matrices from the classical compact groups", Notices AMS 54, 592, 2007):
// the QR decomposition of a complex Ginibre matrix with the phases of R's
// diagonal divided out. Gram–Schmidt with the columns normalised to positive
// real R_jj yields exactly that Q; a second orthogonalisation pass keeps it
// unitary to machine precision even for ill-conditioned draws. It panics if
// len(u) != d*d.
func HaarUnitary(rng *rand.Rand, d int, u []complex128) {
	if len(u) != d*d {
		panic("circuits: HaarUnitary: len(u) != d*d")
	}
	s := 1 / math.Sqrt2
	for i := range u {
		u[i] = complex(rng.NormFloat64()*s, rng.NormFloat64()*s)
	}
	// Columns j = 0..d-1 of u, orthonormalised in place.
	for j := 0; j < d; j++ {
		for pass := 0; pass < 2; pass++ {
			for k := 0; k < j; k++ {
				var dot complex128 // ⟨q_k, a_j⟩
				for i := 0; i < d; i++ {
					dot += pinned.Mul(cmplx.Conj(u[i*d+k]), u[i*d+j])
				}
				for i := 0; i < d; i++ {
					u[i*d+j] -= pinned.Mul(dot, u[i*d+k])
				}
			}
		}
		var norm float64
		for i := 0; i < d; i++ {
			norm += pinned.Abs2(u[i*d+j])
		}
		inv := complex(1/math.Sqrt(norm), 0)
		for i := 0; i < d; i++ {
			u[i*d+j] = pinned.Mul(u[i*d+j], inv)
		}
	}
}
