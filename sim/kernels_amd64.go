package sim

// The AVX2/FMA kernels of kernels_amd64.s. They apply canonical gates (see
// canonical2) to complex128 amplitudes with split coefficients built by
// splitRuns, splitQ0, split1 and split1Q0.

//go:noescape
func cpuid(eaxIn, ecxIn uint32) (eax, ebx, ecx, edx uint32)

//go:noescape
func xgetbv0() (eax uint32)

//go:noescape
func apply2RunsAVX(x *complex128, lo, hi uint, from, to int, c *coef2)

//go:noescape
func apply2RunsAVX512(x *complex128, lo, hi uint, from, to int, c *coef2z)

//go:noescape
func apply2RunsAVX512x2(x *complex128, lo, hi uint, from, to int, c *coef2z)

//go:noescape
func apply2Q0AVX(x *complex128, hi uint, from, to int, c *coef2)

//go:noescape
func apply2Q0AVX512(x *complex128, hi uint, from, to int, c *coef2z)

//go:noescape
func apply2Q0AVX512x2(x *complex128, hi uint, from, to int, c *coef2z)

//go:noescape
func apply2RunsAVXx2(x *complex128, lo, hi uint, from, to int, c *coef2)

//go:noescape
func apply2Q0AVXx2(x *complex128, hi uint, from, to int, c *coef2)

//go:noescape
func apply2Runs64AVX(x *complex64, lo, hi uint, from, to int, c *coef2s)

//go:noescape
func apply2Runs64AVX512(x *complex64, lo, hi uint, from, to int, c *coef2sz)

//go:noescape
func apply2Q064AVX(x *complex64, hi uint, from, to int, c *coef2s)

//go:noescape
func apply1AVX(x *complex128, q uint, from, to int, c *coef1)

//go:noescape
func apply1Q0AVX(x *complex128, from, to int, c *coef1)

// detectAVX reports whether the processor and the operating system support
// AVX2, FMA and BMI2 (CPUID leaves 1 and 7; XCR0 bits 1 and 2 for the SSE
// and AVX register state, Intel SDM vol. 1 §14.3).
func detectAVX() bool {
	maxLeaf, _, _, _ := cpuid(0, 0)
	if maxLeaf < 7 {
		return false
	}
	_, _, ecx1, _ := cpuid(1, 0)
	const fma, osxsave, avx = 1 << 12, 1 << 27, 1 << 28
	if ecx1&(fma|osxsave|avx) != fma|osxsave|avx {
		return false
	}
	if xgetbv0()&6 != 6 {
		return false
	}
	_, ebx7, _, _ := cpuid(7, 0)
	const avx2, bmi2 = 1 << 5, 1 << 8
	return ebx7&(avx2|bmi2) == avx2|bmi2
}

// detectAVX512 reports whether AVX-512F and AVX-512VL are there and the
// operating system saves the opmask and ZMM registers (XCR0 bits 5–7). VL
// is needed by the 256-bit x2 kernels, which use the EVEX-only registers
// Y16–Y31; every AVX-512 processor but the Xeon Phi has it.
func detectAVX512() bool {
	if !detectAVX() {
		return false
	}
	_, ebx7, _, _ := cpuid(7, 0)
	const avx512f, avx512vl = 1 << 16, 1 << 31
	return ebx7&(avx512f|avx512vl) == avx512f|avx512vl && xgetbv0()&0xe6 == 0xe6
}

// useAVX selects the assembly kernels and useAVX512 the 512-bit form of the
// streaming kernel; tests switch them off to check the others.
var (
	useAVX    = detectAVX()
	useAVX512 = detectAVX512()
)
