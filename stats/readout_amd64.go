package stats

// The AVX2 kernel of readout_amd64.s for the collect pass of HaarKS over
// amplitudes: ksFilterAVX2 keeps the values of the active bins
// (ksFilterPairs). The count pass stays in Go (see leafCount).

//go:noescape
func ksCPUID(eaxIn, ecxIn uint32) (eax, ebx, ecx, edx uint32)

//go:noescape
func ksXGETBV0() (eax uint32)

//go:noescape
func ksFilterAVX2(a *float64, groups int, pos, shift uint64, act *uint8, nb, lo, hi uint64, out *float64) int

// ksDetectAVX2 reports whether the processor and the operating system
// support AVX and AVX2 (CPUID leaves 1 and 7; XCR0 bits 1 and 2 for the
// SSE and AVX register state, Intel SDM vol. 1 §14.3).
func ksDetectAVX2() bool {
	maxLeaf, _, _, _ := ksCPUID(0, 0)
	if maxLeaf < 7 {
		return false
	}
	_, _, ecx1, _ := ksCPUID(1, 0)
	const osxsave, avx = 1 << 27, 1 << 28
	if ecx1&(osxsave|avx) != osxsave|avx {
		return false
	}
	if ksXGETBV0()&6 != 6 {
		return false
	}
	_, ebx7, _, _ := ksCPUID(7, 0)
	const avx2 = 1 << 5
	return ebx7&avx2 != 0
}

// ksUseAVX2 selects the assembly kernels of the read-out passes; tests
// switch it off to check the Go loops against them.
var ksUseAVX2 = ksDetectAVX2()
