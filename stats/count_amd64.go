package stats

import "golang.org/x/sys/cpu"

// ksCountAVX512 is the AVX-512 count kernel of count_amd64.s over groups
// of eight leaves (see leavesCount).
//
//go:noescape
func ksCountAVX512(a *float64, groups int, leafStride, groupStride uintptr, pos, shift uint64, u *uint32, nb uint64, sums *float64, outer *float64) int

// ksCountAVX512On selects the AVX-512 count kernel; tests switch it off to
// check the Go loop against it.
var ksCountAVX512On = cpu.X86.HasAVX512F // golang.org/x/sys/cpu: CPUID, and XCR0 for the ZMM and opmask state
