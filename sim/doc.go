// Package sim simulates circuits exactly on a state vector of complex128
// amplitudes (State) or complex64 ones (State64).
//
// A State holds the 2^n amplitudes of an n-qubit state, amplitude x at
// Amp[x] with x = Σ b_q 2^q. Gates are applied in place. Large states split
// each gate's work across goroutines in contiguous blocks; small states are
// meant to be simulated one per goroutine, several instances at once.
//
// Kernels (kernels.go) are specialised by the gate's qubit positions: both
// above qubit 0 stream adjacent amplitude pairs, qubit 0 keeps its pair in
// one vector register; on amd64 with AVX2 and FMA they are assembly
// (kernels_amd64.s, with 512-bit forms where AVX-512 is present), elsewhere
// portable Go. Run fuses a gate sequence into passes over cache-sized blocks
// (fusion.go) and folds single-qubit gates into their neighbours. State64
// holds complex64 amplitudes for states twice as large.
//
// Memory is checked before a state is allocated: NewState returns an error
// wrapping ErrTooLarge that says how many GiB the state would need.
package sim
