package sim

import (
	"fmt"

	"golang.org/x/sync/errgroup"
)

// MaxQubits is the largest qubit count a State accepts before memory checks.
const MaxQubits = 40

// ParallelQubits is the smallest state size (in qubits) whose gates are split
// across goroutines; smaller states are faster on one core.
const ParallelQubits = 16

// State is an n-qubit pure state as 2^n complex128 amplitudes.
type State struct {
	Qubits int
	Amp    []complex128
}

// NewState allocates the n-qubit state |0…0⟩ after checking that the machine
// has the memory for it (and for extra bytes the caller needs alongside,
// such as probability buffers).
func NewState(n int, extra float64) (*State, error) {
	if n < 1 {
		return nil, fmt.Errorf("sim: %d qubits: a state needs at least 1", n)
	}
	need := StateBytes(n) + extra
	if n > MaxQubits {
		return nil, fmt.Errorf("sim: a %d-qubit state vector needs %s: %w; use at most %d qubits", n, GiB(need), ErrTooLarge, MaxQubits)
	}
	if err := CheckMemory(need, fmt.Sprintf("a %d-qubit state vector", n)); err != nil {
		return nil, err
	}
	s := &State{Qubits: n, Amp: make([]complex128, 1<<n)}
	s.Amp[0] = 1
	return s, nil
}

// Reset sets the state to |0…0⟩.
func (s *State) Reset() {
	clear(s.Amp)
	s.Amp[0] = 1
}

// Norm returns Σ |amp|².
func (s *State) Norm() float64 {
	var sum float64
	for _, v := range s.Amp {
		sum += real(v)*real(v) + imag(v)*imag(v)
	}
	return sum
}

// Apply2 applies the two-qubit gate m to qubits (a, b) in place; m is
// row-major in the basis |b_a b_b⟩ with index 2·b_a + b_b. With workers > 1
// and at least ParallelQubits qubits the work is split across goroutines in
// contiguous blocks. It panics if a == b or either is out of range.
func (s *State) Apply2(a, b int, m *[16]complex128, workers int) {
	n := s.Qubits
	if a == b || a < 0 || b < 0 || a >= n || b >= n {
		panic(fmt.Sprintf("sim: Apply2 on qubits (%d, %d) of a %d-qubit state", a, b, n))
	}
	parallelFor(1<<(n-2), workers, n >= ParallelQubits, func(lo, hi int) {
		apply2Range(s.Amp, a, b, m, lo, hi)
	})
}

// apply2Range applies m to the amplitude quadruples with base index k in
// [from, to): k enumerates the indices whose bits a and b are zero.
func apply2Range(amp []complex128, a, b int, m *[16]complex128, from, to int) {
	lo, hi := min(a, b), max(a, b)
	la, lb := 1<<a, 1<<b
	loMask, hiMask := 1<<lo-1, 1<<hi-1
	m00, m01, m02, m03 := m[0], m[1], m[2], m[3]
	m10, m11, m12, m13 := m[4], m[5], m[6], m[7]
	m20, m21, m22, m23 := m[8], m[9], m[10], m[11]
	m30, m31, m32, m33 := m[12], m[13], m[14], m[15]
	for k := from; k < to; k++ {
		i := (k>>lo)<<(lo+1) | k&loMask
		i = (i>>hi)<<(hi+1) | i&hiMask
		i1, i2, i3 := i|lb, i|la, i|la|lb
		v0, v1, v2, v3 := amp[i], amp[i1], amp[i2], amp[i3]
		amp[i] = m00*v0 + m01*v1 + m02*v2 + m03*v3
		amp[i1] = m10*v0 + m11*v1 + m12*v2 + m13*v3
		amp[i2] = m20*v0 + m21*v1 + m22*v2 + m23*v3
		amp[i3] = m30*v0 + m31*v1 + m32*v2 + m33*v3
	}
}

// Probabilities writes |amp|² into dst (allocated when nil or short) and
// returns it, splitting the work like Apply2.
func (s *State) Probabilities(dst []float64, workers int) []float64 {
	if len(dst) < len(s.Amp) {
		dst = make([]float64, len(s.Amp))
	}
	dst = dst[:len(s.Amp)]
	fill := func(lo, hi int) {
		for i, v := range s.Amp[lo:hi] {
			dst[lo+i] = real(v)*real(v) + imag(v)*imag(v)
		}
	}
	parallelFor(len(s.Amp), workers, s.Qubits >= ParallelQubits, fill)
	return dst
}

// parallelFor runs body over [0, n) in contiguous blocks, on workers
// goroutines when parallel is true.
func parallelFor(n, workers int, parallel bool, body func(lo, hi int)) {
	if workers <= 1 || !parallel {
		body(0, n)
		return
	}
	var g errgroup.Group
	chunk := (n + workers - 1) / workers
	for lo := 0; lo < n; lo += chunk {
		hi := min(lo+chunk, n)
		g.Go(func() error { body(lo, hi); return nil })
	}
	_ = g.Wait()
}
