package stats

import "golang.org/x/sys/cpu"

// The AVX2 kernel of readout_amd64.s for the collect pass of HaarKS over
// amplitudes, used where the AVX-512 one (readout_avx512_amd64.s) cannot
// run: ksFilterAVX2 keeps the values of the active bins (ksFilterPairs).
// The count pass has an AVX-512 kernel of its own (count_amd64.s) and
// otherwise runs in Go (see leafCount).

//go:noescape
func ksFilterAVX2(a *float64, groups int, pos, shift uint64, act *uint8, nb, lo, hi uint64, out *float64) int

// ksUseAVX2 selects the AVX2 kernel of the collect pass; tests switch it
// off to check the Go loop against it.
var ksUseAVX2 = cpu.X86.HasAVX2 // golang.org/x/sys/cpu: CPUID, and XCR0 for the AVX register state
