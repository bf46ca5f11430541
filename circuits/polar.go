package circuits

import (
	"fmt"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// NearestUnitary returns the unitary factor U of the polar decomposition
// M = U·H of the d×d row-major matrix m, the unitary nearest to M in every
// unitarily invariant norm (Higham, Functions of Matrices, SIAM 2008, §8.1,
// Theorem 8.4), and the largest entry change max |U − M|. U = W·Vᴴ from the
// singular value decomposition M = W·Σ·Vᴴ, computed with gonum's real SVD on
// the 2d×2d real form [[Re M, −Im M], [Im M, Re M]]: that form maps products
// and adjoints to products and transposes, so by uniqueness of the polar
// factor of a non-singular matrix its orthogonal polar factor is the real
// form of U. It returns an error for a singular or non-finite m, which has
// no unique nearest unitary; it panics if len(m) != d·d.
func NearestUnitary(m []complex128, d int) ([]complex128, float64, error) {
	if len(m) != d*d {
		panic(fmt.Sprintf("circuits: NearestUnitary of %d entries as a %d×%d matrix", len(m), d, d))
	}
	r := mat.NewDense(2*d, 2*d, nil)
	for i := 0; i < d; i++ {
		for j := 0; j < d; j++ {
			re, im := real(m[i*d+j]), imag(m[i*d+j])
			r.Set(i, j, re)
			r.Set(i, j+d, -im)
			r.Set(i+d, j, im)
			r.Set(i+d, j+d, re)
		}
	}
	var svd mat.SVD
	if !svd.Factorize(r, mat.SVDFull) {
		return nil, 0, fmt.Errorf("circuits: the singular value decomposition failed (a non-finite entry?)")
	}
	vals := svd.Values(nil)
	// Singular values come in pairs; the smallest pair, relative to the
	// largest, says how far from singular m is.
	if !(vals[len(vals)-1] > 1e-8*vals[0]) {
		return nil, 0, fmt.Errorf("circuits: the matrix is singular (smallest singular value %.3g), so it has no unique nearest unitary", vals[len(vals)-1])
	}
	var w, v, q mat.Dense
	svd.UTo(&w)
	svd.VTo(&v)
	q.Mul(&w, v.T())
	u := make([]complex128, d*d)
	change := 0.0
	for i := 0; i < d; i++ {
		for j := 0; j < d; j++ {
			u[i*d+j] = complex(q.At(i, j), q.At(i+d, j))
			change = max(change, cmplx.Abs(u[i*d+j]-m[i*d+j]))
		}
	}
	return u, change, nil
}
