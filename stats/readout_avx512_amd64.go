package stats

import "golang.org/x/sys/cpu"

// The AVX-512 kernel of readout_avx512_amd64.s for the collect pass of
// HaarKS over amplitudes: ksFilterAVX512 keeps the values whose fine bin
// lies in the intervals of a ksFilter (a superset of the active bins when
// they had to be merged; ksFilterPairs then drops the others).

//go:noescape
func ksFilterAVX512(a *float64, groups int, pos, shift uint64, iv *[2 * ksFilterIntervals]uint64, out *float64) int

// ksUseAVX512 selects the AVX-512 kernel of the collect pass (before the
// AVX2 one); tests switch it off to check the others. The kernel needs
// AVX-512 F (the 512-bit arithmetic, masks, VCOMPRESSPD and VPERMT2PD) and
// the operating system's saving of the opmask and ZMM registers, which
// golang.org/x/sys/cpu checks in XCR0 before it reports HasAVX512F; POPCNT
// comes with every AVX-512 processor.
var ksUseAVX512 = cpu.X86.HasAVX512F && cpu.X86.HasPOPCNT

//go:noescape
func ksFilterAVX512x4(a *float64, groups, stride int, pos, shift uint64, iv *[2 * ksFilterIntervals]uint64, out *float64, ostride int, n *[4]int)
