//go:build !amd64

package stats

// Without the amd64 assembly the read-out passes take the Go loops.

var ksUseAVX2 = false

func ksFilterAVX2(a *float64, groups int, pos, shift uint64, act *uint8, nb, lo, hi uint64, out *float64) int {
	panic("stats: no AVX2 kernels on this architecture")
}

var ksUseAVX512 = false

func ksFilterAVX512(a *float64, groups int, pos, shift uint64, iv *[2 * ksFilterIntervals]uint64, out *float64) int {
	panic("stats: no AVX-512 kernels on this architecture")
}

func ksFilterAVX512x4(a *float64, groups, stride int, pos, shift uint64, iv *[2 * ksFilterIntervals]uint64, out *float64, ostride int, n *[4]int) {
	panic("stats: no AVX-512 kernels on this architecture")
}
