package sim

import (
	"fmt"
	"mixdepth/internal/crash"
	"unsafe"

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
		return nil, fmt.Errorf("sim: a %d-qubit state vector needs %s: %w; this machine holds at most %d qubits", n, GiB(need), ErrTooLarge, FittingQubits(16))
	}
	if err := CheckMemory(need, fmt.Sprintf("a %d-qubit state vector", n)); err != nil {
		return nil, err
	}
	s := &State{Qubits: n, Amp: make([]complex128, 1<<n)}
	adviseHugePages(s.Amp)
	s.Amp[0] = 1
	return s, nil
}

// NewAmplitudes returns a zeroed buffer of 2^n amplitudes allocated as a
// state vector's are (on Linux, with the advice to back it with
// transparent huge pages), for copies of a state that may later become the
// state's own vector. It does not check the memory; NewState does.
func NewAmplitudes(n int) []complex128 {
	amp := make([]complex128, 1<<n)
	adviseHugePages(amp)
	return amp
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
		sum += float64(real(v)*real(v)) + float64(imag(v)*imag(v))
	}
	return sum
}

// Apply2 applies the two-qubit gate m to qubits (a, b) in place; m is
// row-major in the basis |b_a b_b⟩ with index 2·b_a + b_b. With workers > 1
// and at least ParallelQubits qubits the work is split across goroutines in
// contiguous blocks. It panics if a == b or either is out of range.
//
// The kernel is chosen by the positions: both qubits above 0 stream pairs of
// adjacent amplitudes, qubit 0 keeps its pair inside one vector register
// (kernels.go; AVX2 assembly on amd64 processors that have it).
func (s *State) Apply2(a, b int, m *[16]complex128, workers int) {
	n := s.Qubits
	if a == b || a < 0 || b < 0 || a >= n || b >= n {
		panic(fmt.Sprintf("sim: Apply2 on qubits (%d, %d) of a %d-qubit state", a, b, n))
	}
	k := newKernel2(a, b, m)
	parallelFor(1<<(n-2), workers, n >= ParallelQubits, func(lo, hi int) {
		apply2Kernel(s.Amp, &k, lo, hi)
	})
}

// Probabilities writes |amp|² into dst (allocated when nil or short) and
// returns it, splitting the work like Apply2.
func (s *State) Probabilities(dst []float64, workers int) []float64 {
	if len(dst) < len(s.Amp) {
		dst = make([]float64, len(s.Amp))
	}
	dst = dst[:len(s.Amp)]
	fill := func(lo, hi int) {
		// float64(…) rounds each square on its own: no platform may fuse
		// it into the add (arm64 and GOAMD64=v3 would), so a probability
		// is the same value on every machine and in every read-out path.
		for i, v := range s.Amp[lo:hi] {
			dst[lo+i] = float64(real(v)*real(v)) + float64(imag(v)*imag(v))
		}
	}
	parallelFor(len(s.Amp), workers, s.Qubits >= ParallelQubits, fill)
	return dst
}

// parallelFor runs body over [0, n) in contiguous blocks, on workers
// goroutines when parallel is true. Block boundaries are multiples of
// parallelAlign (or n), so vector kernels that take two items at a time
// never see a split pair.
func parallelFor(n, workers int, parallel bool, body func(lo, hi int)) {
	if workers <= 1 || !parallel || n <= parallelAlign {
		body(0, n)
		return
	}
	var g errgroup.Group
	var carry crash.Carrier
	chunk := (n + workers - 1) / workers
	chunk = (chunk + parallelAlign - 1) &^ (parallelAlign - 1)
	for lo := 0; lo < n; lo += chunk {
		hi := min(lo+chunk, n)
		g.Go(func() error { defer carry.Catch(); body(lo, hi); return nil })
	}
	_ = g.Wait()
	carry.Rethrow()
}

// parallelAlign is the granularity of parallelFor's blocks: 64 items, so
// blocks also start on cache-line boundaries.
const parallelAlign = 64

// ProbabilityChunk is the length of the chunks ProbabilityBlocks visits
// (the last one of a state smaller than a chunk is the whole state).
const ProbabilityChunk = 1 << probabilityChunkQubits

// probabilityChunkQubits is log2(ProbabilityChunk): a chunk is one setting
// of the qubits from this one up.
const probabilityChunkQubits = 12

// ProbabilityBlocks computes the probabilities |amp|² chunk by chunk, in a
// buffer of ProbabilityChunk values per worker, and calls visit(w, off, p)
// with p[i] = |amp[off+i]|². Chunks start at multiples of ProbabilityChunk
// whatever the worker count. Calls with distinct w in [0, workers) may run
// concurrently; p is reused once visit returns. No array of 2^n
// probabilities is needed.
func (s *State) ProbabilityBlocks(workers int, visit func(w, off int, p []float64)) {
	probabilityBlocks(s.Amp, s.Qubits, workers, visit)
}

func probabilityBlocks[T amplitude](amp []T, n, workers int, visit func(w, off int, p []float64)) {
	chunks := (len(amp) + ProbabilityChunk - 1) / ProbabilityChunk
	if workers <= 1 || n < ParallelQubits || chunks < 2 {
		workers = 1
	}
	workers = min(workers, chunks)
	var g errgroup.Group
	per := (chunks + workers - 1) / workers
	for w := 0; w < workers; w++ {
		from, to := w*per, min((w+1)*per, chunks)
		body := func() error {
			buf := make([]float64, min(ProbabilityChunk, len(amp)))
			for c := from; c < to; c++ {
				off := c * ProbabilityChunk
				src := amp[off:min(off+ProbabilityChunk, len(amp))]
				p := buf[:len(src)]
				squares(src, p)
				visit(w, off, p)
			}
			return nil
		}
		if workers == 1 {
			_ = body()
		} else {
			g.Go(body)
		}
	}
	_ = g.Wait()
}

// AmplitudeBlocks calls visit(w, off, a) for the chunks of ProbabilityBlocks,
// with a the chunk's amplitudes amp[off:off+len(a)/2] as (real, imaginary)
// float64 pairs: the state's own memory, read in place, so that a caller
// that squares, sums and bins in one loop passes over the amplitudes once
// with no buffer. visit must not modify a. Calls with distinct w in
// [0, workers) may run concurrently, split as ProbabilityBlocks splits.
func (s *State) AmplitudeBlocks(workers int, visit func(w, off int, a []float64)) {
	visitChunks(s.Amp, s.Qubits, workers, func(w, off int, x []complex128) {
		visit(w, off, floatPairs(x))
	})
}

// floatPairs returns the amplitudes x as (real, imaginary) float64 pairs,
// in x's own memory.
func floatPairs(x []complex128) []float64 {
	return unsafe.Slice((*float64)(unsafe.Pointer(&x[0])), 2*len(x))
}

// visitChunks calls visit(w, off, amp[off:off+ProbabilityChunk]) for the
// chunks of the n-qubit state amp (one chunk when it is smaller), split
// into contiguous ranges of chunks across workers goroutines from
// ParallelQubits qubits on, w the range's index.
func visitChunks[T amplitude](amp []T, n, workers int, visit chunkVisit[T]) {
	chunks := (len(amp) + ProbabilityChunk - 1) / ProbabilityChunk
	if workers <= 1 || n < ParallelQubits || chunks < 2 {
		workers = 1
	}
	workers = min(workers, chunks)
	var g errgroup.Group
	var carry crash.Carrier
	per := (chunks + workers - 1) / workers
	for w := 0; w < workers; w++ {
		from, to := w*per, min((w+1)*per, chunks)
		body := func() {
			for c := from; c < to; c++ {
				off := c * ProbabilityChunk
				visit(w, off, amp[off:min(off+ProbabilityChunk, len(amp))])
			}
		}
		if workers == 1 {
			body()
		} else {
			g.Go(func() error { defer carry.Catch(); body(); return nil })
		}
	}
	_ = g.Wait()
	carry.Rethrow()
}

// squares writes |src[i]|² (in float64) into p.
func squares[T amplitude](src []T, p []float64) {
	p = p[:len(src)]
	switch v := any(src).(type) {
	case []complex128:
		for i, a := range v {
			p[i] = float64(real(a)*real(a)) + float64(imag(a)*imag(a))
		}
	case []complex64:
		for i, a := range v {
			re, im := float64(real(a)), float64(imag(a))
			p[i] = float64(re*re) + float64(im*im)
		}
	}
}
