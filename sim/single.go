package sim

import "fmt"

// Apply1 applies the single-qubit gate m (row-major 2×2 in the basis |b_q⟩)
// to qubit q in place. With workers > 1 and at least ParallelQubits qubits
// the work is split across goroutines in contiguous blocks, as in Apply2. It
// panics if q is out of range.
func (s *State) Apply1(q int, m *[4]complex128, workers int) {
	n := s.Qubits
	if q < 0 || q >= n {
		panic(fmt.Sprintf("sim: Apply1 on qubit %d of a %d-qubit state", q, n))
	}
	parallelFor(1<<(n-1), workers, n >= ParallelQubits, func(lo, hi int) {
		apply1Range(s.Amp, q, m, lo, hi)
	})
}

// apply1Range applies m to the amplitude pairs with base index k in
// [from, to): k enumerates the indices whose bit q is zero.
func apply1Range(amp []complex128, q int, m *[4]complex128, from, to int) {
	bit, mask := 1<<q, 1<<q-1
	m00, m01, m10, m11 := m[0], m[1], m[2], m[3]
	for k := from; k < to; k++ {
		i := (k>>q)<<(q+1) | k&mask
		j := i | bit
		v0, v1 := amp[i], amp[j]
		amp[i] = m00*v0 + m01*v1
		amp[j] = m10*v0 + m11*v1
	}
}
