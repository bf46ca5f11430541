package stats

import "golang.org/x/sys/cpu"

// The AVX-512 kernels of readout_avx512_amd64.s for the collect pass of
// HaarKS over amplitudes: ksFilterAVX512 keeps the values whose fine bin
// lies in the intervals of a ksFilter (a superset of the active bins when
// they had to be merged; ksFilterPairs then drops the others), and
// ksFilterAVX512x4 does so for four streams of a block at once.
//
// The interval test costs the same for every value, where the AVX2
// kernel's span test sends every group with a lane in the span of the
// active bins down its scalar path, and that span is wide when the
// candidate bins lie apart (it held from under 1% to 76% of the values of
// Porter–Thomas states of 2^12 to 2^24 amplitudes, three seeds each). On
// one core of the 2-core Intel Xeon (Sapphire Rapids class) KVM guest this
// project was measured on, BenchmarkReadoutCPU/n=*/filter, CPU time of the
// thread per amplitude, medians of 6 alternating runs, for the Go loop,
// AVX2, AVX-512 reading one stream and AVX-512 reading four: n = 16: 2.12,
// 2.40, 1.36, 1.16 ns; n = 20: 2.80, 2.39, 2.27, 1.54 ns; n = 24: 3.29,
// 2.33, 2.25, 1.72 ns. One stream is bound by the bandwidth one core
// draws from memory, which four streams raise; at n = 16 the state is in
// the second-level cache and they change little.

// ksFilterAVX512 writes to out the probabilities of the 8·groups pairs at a
// that lie in the intervals iv, in order, and returns their number; see
// readout_avx512_amd64.s.
//
//go:noescape
func ksFilterAVX512(a *float64, groups int, pos, shift uint64, iv *[2 * ksFilterIntervals]uint64, out *float64) int

// ksUseAVX512 selects the AVX-512 kernel of the collect pass (before the
// AVX2 one); tests switch it off to check the others. The kernel needs
// AVX-512 F alone (the 512-bit arithmetic, VPCMPUQ, KORW, KMOVW,
// VCOMPRESSPD and VPERMT2PD) and
// the operating system's saving of the opmask and ZMM registers, which
// golang.org/x/sys/cpu checks in XCR0 before it reports HasAVX512F; POPCNT
// comes with every AVX-512 processor.
var ksUseAVX512 = cpu.X86.HasAVX512F && cpu.X86.HasPOPCNT

// ksFilterAVX512x4 filters four streams of groups groups of eight pairs,
// stride bytes apart from a, into four regions of out ostride bytes apart,
// and stores their counts in n; see readout_avx512_amd64.s.
//
//go:noescape
func ksFilterAVX512x4(a *float64, groups, stride int, pos, shift uint64, iv *[2 * ksFilterIntervals]uint64, out *float64, ostride int, n *[4]int)
