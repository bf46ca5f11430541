package sim

import (
	"context"
	"fmt"
)

// State64 is an n-qubit pure state as 2^n complex64 amplitudes: half the
// memory of State, so 31 qubits fit in 16 GiB. Gates are rounded to single
// precision and applied in single precision; probabilities are accumulated
// in float64. Each gate adds a relative rounding error of order 2^−24 ≈ 6e−8
// per amplitude, so after G gates the probabilities carry relative errors of
// order √G·1e−7 (see TestState64Accuracy for the measured size).
type State64 struct {
	Qubits int
	Amp    []complex64
}

// State64Bytes returns the bytes of an n-qubit complex64 state vector.
func State64Bytes(n int) float64 { return StateBytes(n) / 2 }

// NewState64 allocates the n-qubit state |0…0⟩ in single precision after
// checking that the machine has the memory for it and for extra bytes.
func NewState64(n int, extra float64) (*State64, error) {
	if n < 1 {
		return nil, fmt.Errorf("sim: %d qubits: a state needs at least 1", n)
	}
	need := State64Bytes(n) + extra
	if n > MaxQubits {
		return nil, fmt.Errorf("sim: a %d-qubit single-precision state vector needs %s: %w; use at most %d qubits", n, GiB(need), ErrTooLarge, MaxQubits)
	}
	if err := CheckMemory(need, fmt.Sprintf("a %d-qubit single-precision state vector", n)); err != nil {
		return nil, err
	}
	s := &State64{Qubits: n, Amp: make([]complex64, 1<<n)}
	adviseHugePages(s.Amp)
	s.Amp[0] = 1
	return s, nil
}

// Reset sets the state to |0…0⟩.
func (s *State64) Reset() {
	clear(s.Amp)
	s.Amp[0] = 1
}

// Norm returns Σ |amp|², accumulated in float64.
func (s *State64) Norm() float64 {
	var sum float64
	for _, v := range s.Amp {
		re, im := float64(real(v)), float64(imag(v))
		sum += float64(re*re) + float64(im*im)
	}
	return sum
}

// Apply2 applies the two-qubit gate m, rounded to complex64, to qubits
// (a, b) as State.Apply2 does. It panics if a == b or either is out of
// range.
func (s *State64) Apply2(a, b int, m *[16]complex128, workers int) {
	n := s.Qubits
	if a == b || a < 0 || b < 0 || a >= n || b >= n {
		panic(fmt.Sprintf("sim: Apply2 on qubits (%d, %d) of a %d-qubit state", a, b, n))
	}
	k := newKernel2s(a, b, m)
	parallelFor(1<<(n-2), workers, n >= ParallelQubits, func(from, to int) {
		apply2Kernel64(s.Amp, &k, from, to)
	})
}

// Apply1 applies the single-qubit gate m, rounded to complex64, to qubit q
// as State.Apply1 does. It panics if q is out of range.
func (s *State64) Apply1(q int, m *[4]complex128, workers int) {
	n := s.Qubits
	if q < 0 || q >= n {
		panic(fmt.Sprintf("sim: Apply1 on qubit %d of a %d-qubit state", q, n))
	}
	var m64 [4]complex64
	for i, v := range m {
		m64[i] = complex64(v)
	}
	parallelFor(1<<(n-1), workers, n >= ParallelQubits, func(from, to int) {
		apply1Single(s.Amp, q, &m64, from, to)
	})
}

// Run applies ops in fused passes as State.Run does, in single precision.
func (s *State64) Run(ctx context.Context, ops []Op, workers int) error {
	return runOps(ctx, s.Qubits, s.Amp, ops, workers)
}

// Probabilities writes |amp|² (in float64) into dst, allocated when nil or
// short, and returns it.
func (s *State64) Probabilities(dst []float64, workers int) []float64 {
	if len(dst) < len(s.Amp) {
		dst = make([]float64, len(s.Amp))
	}
	dst = dst[:len(s.Amp)]
	parallelFor(len(s.Amp), workers, s.Qubits >= ParallelQubits, func(lo, hi int) {
		for i, v := range s.Amp[lo:hi] {
			re, im := float64(real(v)), float64(imag(v))
			dst[lo+i] = float64(re*re) + float64(im*im)
		}
	})
	return dst
}

// ProbabilityBlocks visits the probabilities in chunks as
// State.ProbabilityBlocks does.
func (s *State64) ProbabilityBlocks(workers int, visit func(w, off int, p []float64)) {
	probabilityBlocks(s.Amp, s.Qubits, workers, visit)
}
