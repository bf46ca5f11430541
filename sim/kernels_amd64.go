package sim

import "golang.org/x/sys/cpu"

// The AVX2/FMA kernels of kernels_amd64.s. They apply canonical gates (see
// canonical2) to complex128 amplitudes with split coefficients built by
// splitRuns, splitQ0, split1 and split1Q0.

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
func apply2R1AVX512x2(x *complex128, hi uint, from, to int, c *coef2z)

//go:noescape
func apply2Q01AVX512x2(x *complex128, from, to int, c *coef2z)

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
// AVX2, FMA and BMI2 (golang.org/x/sys/cpu reads CPUID and, for the AVX
// register state, XCR0).
func detectAVX() bool {
	return cpu.X86.HasAVX2 && cpu.X86.HasFMA && cpu.X86.HasBMI2
}

// detectAVX512 reports whether AVX-512F and AVX-512VL are there and the
// operating system saves the opmask and ZMM registers. VL is needed by the
// 256-bit x2 kernels, which use the EVEX-only registers Y16–Y31; every
// AVX-512 processor but the Xeon Phi has it.
func detectAVX512() bool {
	return detectAVX() && cpu.X86.HasAVX512F && cpu.X86.HasAVX512VL
}

// useAVX selects the assembly kernels and useAVX512 the 512-bit form of the
// streaming kernel; tests switch them off to check the others.
var (
	useAVX    = detectAVX()
	useAVX512 = detectAVX512()
)

//go:noescape
func apply2RunsAVX512x4(x *complex128, lo, hi uint, from, to int, c *coef2z)
