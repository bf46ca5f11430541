// Package sim simulates circuits exactly on a complex128 state vector.
//
// A State holds the 2^n amplitudes of an n-qubit state, amplitude x at
// Amp[x] with x = Σ b_q 2^q. Gates are applied in place. Large states split
// each gate's work across goroutines in contiguous blocks; small states are
// meant to be simulated one per goroutine, several instances at once.
//
// Memory is checked before a state is allocated: NewState returns an error
// wrapping ErrTooLarge that says how many GiB the state would need.
package sim
