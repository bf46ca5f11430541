//go:build !amd64

package stats

// Without the amd64 assembly the count pass takes the Go loop.

var ksCountAVX512On = false

func ksCountAVX512(a *float64, groups int, leafStride, groupStride uintptr, pos, shift uint64, u *uint32, nb uint64, sums *float64, outer *float64) int {
	panic("stats: no AVX-512 kernels on this architecture")
}
