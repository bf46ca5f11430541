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
	k := newKernel1(q, m)
	parallelFor(1<<(n-1), workers, n >= ParallelQubits, func(lo, hi int) {
		apply1Kernel(s.Amp, &k, lo, hi)
	})
}
