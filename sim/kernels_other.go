//go:build !amd64

package sim

// Without the amd64 assembly every gate takes the portable kernels.

var useAVX, useAVX512 = false, false

func apply2RunsAVX512(x *complex128, lo, hi uint, from, to int, c *coef2z) {
	panic("sim: no AVX kernels on this architecture")
}

func apply2RunsAVX(x *complex128, lo, hi uint, from, to int, c *coef2) {
	panic("sim: no AVX kernels on this architecture")
}

func apply2RunsAVX512x2(x *complex128, lo, hi uint, from, to int, c *coef2z) {
	panic("sim: no AVX kernels on this architecture")
}

func apply2RunsAVX512x4(x *complex128, lo, hi uint, from, to int, c *coef2z) {
	panic("sim: no AVX kernels on this architecture")
}

func apply2Q0AVX(x *complex128, hi uint, from, to int, c *coef2) {
	panic("sim: no AVX kernels on this architecture")
}

func apply2Q0AVX512(x *complex128, hi uint, from, to int, c *coef2z) {
	panic("sim: no AVX kernels on this architecture")
}

func apply2Q0AVX512x2(x *complex128, hi uint, from, to int, c *coef2z) {
	panic("sim: no AVX kernels on this architecture")
}

func apply2R1AVX512x2(x *complex128, hi uint, from, to int, c *coef2z) {
	panic("sim: no AVX kernels on this architecture")
}

func apply2Q01AVX512x2(x *complex128, from, to int, c *coef2z) {
	panic("sim: no AVX kernels on this architecture")
}

func apply2RunsAVXx2(x *complex128, lo, hi uint, from, to int, c *coef2) {
	panic("sim: no AVX kernels on this architecture")
}

func apply2Q0AVXx2(x *complex128, hi uint, from, to int, c *coef2) {
	panic("sim: no AVX kernels on this architecture")
}

func apply2Runs64AVX(x *complex64, lo, hi uint, from, to int, c *coef2s) {
	panic("sim: no AVX kernels on this architecture")
}

func apply2Runs64AVX512(x *complex64, lo, hi uint, from, to int, c *coef2sz) {
	panic("sim: no AVX kernels on this architecture")
}

func apply2Q064AVX(x *complex64, hi uint, from, to int, c *coef2s) {
	panic("sim: no AVX kernels on this architecture")
}

func apply1AVX(x *complex128, q uint, from, to int, c *coef1) {
	panic("sim: no AVX kernels on this architecture")
}

func apply1Q0AVX(x *complex128, from, to int, c *coef1) {
	panic("sim: no AVX kernels on this architecture")
}
