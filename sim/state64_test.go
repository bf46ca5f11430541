package sim_test

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"mixdepth/sim"
)

// TestState64MatchesState: single-precision gates agree with the double
// precision ones to float32 rounding. One gate rounds each amplitude with
// relative error ≲ 4·2^−24 ≈ 2.4e−7 (four products and three sums, unit
// roundoff 2^−24; Higham 2002, Accuracy and Stability of Numerical
// Algorithms, §3.1) plus the rounding of the matrix itself, so 2e−6 on O(1)
// amplitudes after one gate leaves a margin of about 8.
func TestState64MatchesState(t *testing.T) {
	rng := rand.New(rand.NewPCG(71, 72))
	for n := 2; n <= 6; n++ {
		for a := range n {
			for b := range n {
				if a == b {
					continue
				}
				s := newState(t, n)
				randomState(rng, s)
				s64 := &sim.State64{Qubits: n, Amp: make([]complex64, len(s.Amp))}
				for i, v := range s.Amp {
					s64.Amp[i] = complex64(v)
					s.Amp[i] = complex128(s64.Amp[i]) // the same start
				}
				m := haarGate(rng)
				var u [4]complex128
				copy(u[:], m[:4]) // any 2×2 matrix will do
				s.Apply2(a, b, m, 1)
				s64.Apply2(a, b, m, 1)
				s.Apply1(a, &u, 1)
				s64.Apply1(a, &u, 1)
				for i := range s.Amp {
					if d := cmplxAbs(s.Amp[i] - complex128(s64.Amp[i])); d > 2e-6*(1+cmplxAbs(s.Amp[i])) {
						t.Fatalf("n=%d (%d, %d): amp[%d] single %v, double %v", n, a, b, i, s64.Amp[i], s.Amp[i])
					}
				}
			}
		}
	}
}

// TestState64Accuracy measures the accuracy stated in the State64 doc: a
// 14-qubit random circuit of 400 Haar gates (a fused run of the kind the scan
// performs) in single and in double precision. Rounding errors of the gates
// add like a random walk, so the amplitudes drift by ~√G·2^−24 relative
// (G = 400: ~1.2e−6); the collision probability Σp² averages them, so its
// relative error is smaller still. Checked: collision to 1e−5 relative and
// the norm to 1e−5; the measured values are logged.
func TestState64Accuracy(t *testing.T) {
	rng := rand.New(rand.NewPCG(73, 74))
	const n = 14
	ops := randomOps(rng, n, 400)
	s := newState(t, n)
	s64, err := sim.NewState64(n, 0)
	if err != nil {
		t.Fatal(err)
	}
	if err := s.Run(context.Background(), ops, 1); err != nil {
		t.Fatal(err)
	}
	if err := s64.Run(context.Background(), ops, 1); err != nil {
		t.Fatal(err)
	}
	p, p64 := s.Probabilities(nil, 1), s64.Probabilities(nil, 1)
	var z, z64, worst float64
	for i := range p {
		z += p[i] * p[i]
		z64 += p64[i] * p64[i]
		worst = max(worst, math.Abs(p64[i]-p[i])*float64(len(p)))
	}
	rel := math.Abs(z64-z) / z
	t.Logf("n=%d, %d gates: collision relative error %.2g, max |Δp|·D %.2g, norm−1 %.2g", n, len(ops), rel, worst, s64.Norm()-1)
	if rel > 1e-5 {
		t.Errorf("single-precision collision off by %g relative", rel)
	}
	if d := math.Abs(s64.Norm() - 1); d > 1e-5 {
		t.Errorf("single-precision norm off by %g", d)
	}
}

// TestProbabilityBlocks: the chunks cover every amplitude once, start at
// multiples of ProbabilityChunk, and hold |amp|² exactly as Probabilities
// does, for one and for several workers.
func TestProbabilityBlocks(t *testing.T) {
	rng := rand.New(rand.NewPCG(75, 76))
	for _, n := range []int{3, 12, sim.ParallelQubits + 1} {
		s := newState(t, n)
		randomState(rng, s)
		want := s.Probabilities(nil, 1)
		for _, workers := range []int{1, 3} {
			got := make([]float64, len(want))
			seen := make([]int, len(want))
			s.ProbabilityBlocks(workers, func(w, off int, p []float64) {
				if off%sim.ProbabilityChunk != 0 || w < 0 || w >= workers {
					t.Errorf("chunk at %d from worker %d", off, w)
				}
				for i, v := range p {
					got[off+i] = v
					seen[off+i]++
				}
			})
			for i := range want {
				if seen[i] != 1 || got[i] != want[i] {
					t.Fatalf("n=%d workers=%d: p[%d] = %g seen %d times, want %g once", n, workers, i, got[i], seen[i], want[i])
				}
			}
		}
	}
}

func cmplxAbs(v complex128) float64 { return math.Hypot(real(v), imag(v)) }

// TestAmplitudeBlocks: the chunks of AmplitudeBlocks are those of
// ProbabilityBlocks, and each holds the state's amplitudes as (real,
// imaginary) pairs, read in place.
func TestAmplitudeBlocks(t *testing.T) {
	rng := rand.New(rand.NewPCG(77, 78))
	for _, n := range []int{1, 3, 12, sim.ParallelQubits + 1} {
		s := newState(t, n)
		randomState(rng, s)
		for _, workers := range []int{1, 3} {
			seen := make([]int, len(s.Amp))
			s.AmplitudeBlocks(workers, func(w, off int, a []float64) {
				if off%sim.ProbabilityChunk != 0 || w < 0 || w >= workers || len(a)%2 != 0 {
					t.Errorf("chunk at %d from worker %d, %d floats", off, w, len(a))
				}
				for i := 0; i < len(a)/2; i++ {
					if v := s.Amp[off+i]; a[2*i] != real(v) || a[2*i+1] != imag(v) {
						t.Errorf("n=%d: amplitude %d read as (%g, %g), want %v", n, off+i, a[2*i], a[2*i+1], v)
					}
					seen[off+i]++
				}
			})
			for i, c := range seen {
				if c != 1 {
					t.Fatalf("n=%d workers=%d: amplitude %d seen %d times", n, workers, i, c)
				}
			}
		}
	}
}
