package sim_test

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"mixdepth/circuits"
	"mixdepth/sim"
)

func newState(t testing.TB, n int) *sim.State {
	t.Helper()
	s, err := sim.NewState(n, 0)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func haarGate(rng *rand.Rand) *[16]complex128 {
	var m [16]complex128
	circuits.HaarUnitary(rng, 4, m[:])
	return &m
}

// randomState fills s with a random, unnormalised complex Gaussian vector, so
// that every amplitude takes part in a comparison.
func randomState(rng *rand.Rand, s *sim.State) {
	for i := range s.Amp {
		s.Amp[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
}

func TestNewState(t *testing.T) {
	s := newState(t, 3)
	if s.Qubits != 3 || len(s.Amp) != 8 || s.Amp[0] != 1 || s.Norm() != 1 {
		t.Fatalf("NewState(3) = %+v", s)
	}
	for _, v := range s.Amp[1:] {
		if v != 0 {
			t.Fatalf("NewState(3) is not |000⟩: %v", s.Amp)
		}
	}
	s.Amp[5] = 2
	s.Reset()
	if s.Amp[0] != 1 || s.Amp[5] != 0 {
		t.Errorf("Reset left %v", s.Amp)
	}
}

func TestNewStateErrors(t *testing.T) {
	for _, n := range []int{0, -1} {
		if _, err := sim.NewState(n, 0); err == nil || !strings.HasPrefix(err.Error(), "sim: ") {
			t.Errorf("NewState(%d): error %v, want a sim: error", n, err)
		}
	}
	// n qubits need 16·2^n bytes = 2^(n−26) GiB (exact arithmetic): 40 qubits
	// 2^14 = 16384 GiB (16 TiB), 41 qubits 2^15, 64 qubits 2^38 GiB.
	if sim.AvailableMemory() >= 1<<44 {
		t.Skip("this machine has 16 TiB available; a 40-qubit state would fit")
	}
	for _, tc := range []struct {
		n   int
		gib string
	}{{40, "16384.0 GiB"}, {41, "32768.0 GiB"}, {64, "274877906944.0 GiB"}} {
		_, err := sim.NewState(tc.n, 0)
		if !errors.Is(err, sim.ErrTooLarge) {
			t.Errorf("NewState(%d): error %v does not wrap ErrTooLarge", tc.n, err)
			continue
		}
		if !strings.Contains(err.Error(), tc.gib) || !strings.HasPrefix(err.Error(), "sim: ") {
			t.Errorf("NewState(%d): error %q does not state %s", tc.n, err, tc.gib)
		}
	}
}

// TestNormPreserved: unitary gates preserve the norm. 200 Haar gates on
// random pairs of 8 qubits; each gate adds rounding of order 1e-16 per
// amplitude, so 1e-12 leaves a margin of about 50 over the worst case.
func TestNormPreserved(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	s := newState(t, 8)
	for range 200 {
		a := rng.IntN(8)
		b := (a + 1 + rng.IntN(7)) % 8
		s.Apply2(a, b, haarGate(rng), 1)
	}
	if d := math.Abs(s.Norm() - 1); d > 1e-12 {
		t.Errorf("|norm − 1| = %g after 200 gates", d)
	}
	// Probabilities sum to the norm, and are |amp|² exactly.
	p := s.Probabilities(nil, 1)
	sum := 0.0
	for i, v := range p {
		sum += v
		if a := s.Amp[i]; v != float64(real(a)*real(a))+float64(imag(a)*imag(a)) {
			t.Fatalf("p[%d] = %g, |amp|² = %g", i, v, cmplx.Abs(a)*cmplx.Abs(a))
		}
	}
	if d := math.Abs(sum - 1); d > 1e-12 {
		t.Errorf("probabilities sum to 1 + %g", sum-1)
	}
	// A long enough buffer is reused.
	buf := make([]float64, 300)
	if q := s.Probabilities(buf, 1); len(q) != 256 || &q[0] != &buf[0] {
		t.Error("Probabilities did not reuse a long enough dst")
	}
}

// denseOperator builds the 2^n × 2^n matrix of gate m on qubits (a, b) as
// a sum of Kronecker products, independently of the simulator's index
// arithmetic: with the basis convention x = Σ b_q 2^q (qubit q is bit q) the
// leftmost Kronecker factor is qubit n−1, and
//
//	O = Σ_{r,s,t,u} m[2r+s][2t+u] · ⊗_{q=n−1..0} F_q,
//	F_a = |r⟩⟨t|, F_b = |s⟩⟨u|, F_q = I otherwise.
func denseOperator(n, a, b int, m *[16]complex128) *mat.CDense {
	dim := 1 << n
	op := mat.NewCDense(dim, dim, nil)
	for r := range 2 {
		for s := range 2 {
			for tt := range 2 {
				for u := range 2 {
					term := mat.NewCDense(1, 1, []complex128{m[(2*r+s)*4+2*tt+u]})
					for q := n - 1; q >= 0; q-- {
						f := mat.NewCDense(2, 2, []complex128{1, 0, 0, 1})
						switch q {
						case a:
							f = outer(r, tt)
						case b:
							f = outer(s, u)
						}
						term = kron(term, f)
					}
					for i := range dim {
						for j := range dim {
							op.Set(i, j, op.At(i, j)+term.At(i, j))
						}
					}
				}
			}
		}
	}
	return op
}

// outer returns |i⟩⟨j| on one qubit.
func outer(i, j int) *mat.CDense {
	f := mat.NewCDense(2, 2, nil)
	f.Set(i, j, 1)
	return f
}

// kron returns the Kronecker product x ⊗ y.
func kron(x, y *mat.CDense) *mat.CDense {
	xr, xc := x.Dims()
	yr, yc := y.Dims()
	out := mat.NewCDense(xr*yr, xc*yc, nil)
	for i := range xr {
		for j := range xc {
			for k := range yr {
				for l := range yc {
					out.Set(i*yr+k, j*yc+l, x.At(i, j)*y.At(k, l))
				}
			}
		}
	}
	return out
}

// TestApply2AgainstDense compares Apply2 with the dense operator product for
// every ordered pair (a, b) on n = 2..6. Amplitudes are O(1) and each output
// sums four products, so the two differ only by rounding (≲ 1e-15); 1e-12
// leaves a wide margin while any index or ordering error gives O(1).
func TestApply2AgainstDense(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	for n := 2; n <= 6; n++ {
		for a := range n {
			for b := range n {
				if a == b {
					continue
				}
				m := haarGate(rng)
				op := denseOperator(n, a, b, m)
				s := newState(t, n)
				randomState(rng, s)
				in := append([]complex128(nil), s.Amp...)
				s.Apply2(a, b, m, 1)
				for i := range in {
					var want complex128
					for j, v := range in {
						want += op.At(i, j) * v
					}
					if d := cmplx.Abs(s.Amp[i] - want); d > 1e-12 {
						t.Fatalf("n=%d (a, b)=(%d, %d): amp[%d] = %v, dense gives %v", n, a, b, i, s.Amp[i], want)
					}
				}
			}
		}
	}
}

// TestApply2Convention pins the basis convention with a gate whose action is
// known by hand: CNOT with control a and target b, in the basis |b_a b_b⟩
// (index 2·b_a + b_b), maps |x⟩ to |x ⊕ 2^b⟩ when bit a of x is 1.
func TestApply2Convention(t *testing.T) {
	cnot := [16]complex128{
		1, 0, 0, 0,
		0, 1, 0, 0,
		0, 0, 0, 1,
		0, 0, 1, 0,
	}
	const n = 4
	for a := range n {
		for b := range n {
			if a == b {
				continue
			}
			for x := range 1 << n {
				s := newState(t, n)
				s.Amp[0], s.Amp[x] = 0, 1
				s.Apply2(a, b, &cnot, 1)
				want := x
				if x>>a&1 == 1 {
					want ^= 1 << b
				}
				if s.Amp[want] != 1 {
					t.Fatalf("CNOT(%d→%d)|%d⟩: amplitude of |%d⟩ is %v", a, b, x, want, s.Amp[want])
				}
			}
		}
	}
}

// TestApply2Parallel: with workers > 1 every amplitude is computed by the
// same arithmetic as with one worker, so the results must be bit-identical.
func TestApply2Parallel(t *testing.T) {
	for _, tc := range []struct{ n, workers int }{
		{sim.ParallelQubits, 2},
		{sim.ParallelQubits + 1, 3}, // blocks of unequal size
	} {
		rng := rand.New(rand.NewPCG(31, uint64(tc.n)))
		serial := newState(t, tc.n)
		randomState(rng, serial)
		par := newState(t, tc.n)
		copy(par.Amp, serial.Amp)
		n := tc.n
		for _, p := range [][2]int{{0, 1}, {1, 0}, {0, n - 1}, {n - 1, 0}, {n/2 - 1, n / 2}, {n - 2, 3}, {5, n - 1}} {
			m := haarGate(rng)
			serial.Apply2(p[0], p[1], m, 1)
			par.Apply2(p[0], p[1], m, tc.workers)
		}
		for i := range serial.Amp {
			if serial.Amp[i] != par.Amp[i] {
				t.Fatalf("n=%d workers=%d: amp[%d] = %v, one worker gives %v", tc.n, tc.workers, i, par.Amp[i], serial.Amp[i])
			}
		}
		ps, pp := serial.Probabilities(nil, 1), par.Probabilities(nil, tc.workers)
		for i := range ps {
			if ps[i] != pp[i] {
				t.Fatalf("n=%d workers=%d: p[%d] = %g, one worker gives %g", tc.n, tc.workers, i, pp[i], ps[i])
			}
		}
	}
}

func TestApply2Panics(t *testing.T) {
	s := newState(t, 3)
	var m [16]complex128
	for _, p := range [][2]int{{1, 1}, {-1, 0}, {0, 3}, {3, 0}} {
		func() {
			defer func() {
				r := recover()
				if r == nil {
					t.Errorf("Apply2(%d, %d) on 3 qubits did not panic", p[0], p[1])
				} else if msg := fmt.Sprint(r); !strings.HasPrefix(msg, "sim: ") {
					t.Errorf("panic %q lacks the sim: prefix", msg)
				}
			}()
			s.Apply2(p[0], p[1], &m, 1)
		}()
	}
}
