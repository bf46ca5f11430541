package sim

import (
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// kronReference returns the dense 2^n × 2^n real and imaginary parts of
// I_{2^(n−1−q)} ⊗ m ⊗ I_{2^q}, built with gonum's Kronecker product. With
// x = Σ b_q 2^q, qubit n−1 is the most significant factor; the identities are
// real, so the real and imaginary parts factor separately.
func kronReference(n, q int, m *[4]complex128) (re, im *mat.Dense) {
	part := func(f func(complex128) float64) *mat.Dense {
		g := mat.NewDense(2, 2, []float64{f(m[0]), f(m[1]), f(m[2]), f(m[3])})
		var left, out mat.Dense
		left.Kronecker(eye(1<<(n-1-q)), g)
		out.Kronecker(&left, eye(1<<q))
		return &out
	}
	return part(func(v complex128) float64 { return real(v) }), part(func(v complex128) float64 { return imag(v) })
}

func eye(d int) *mat.Dense {
	e := mat.NewDense(d, d, nil)
	for i := 0; i < d; i++ {
		e.Set(i, i, 1)
	}
	return e
}

// TestApply1Kron compares Apply1 with the dense product (I ⊗ m ⊗ I)·ψ computed
// by gonum, (A + iB)(x + iy) = (Ax − By) + i(Ay + Bx), for every qubit of
// random states on n ≤ 5 qubits and random (non-unitary, so that no
// structure hides an error) matrices m. Tolerance 1e-12: both sides add at
// most 2^5 products of O(1) numbers, errors ~1e-15.
func TestApply1Kron(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for n := 1; n <= 5; n++ {
		for q := 0; q < n; q++ {
			var m [4]complex128
			for i := range m {
				m[i] = complex(rng.NormFloat64(), rng.NormFloat64())
			}
			d := 1 << n
			s := &State{Qubits: n, Amp: make([]complex128, d)}
			x, y := make([]float64, d), make([]float64, d)
			for i := range s.Amp {
				s.Amp[i] = complex(rng.NormFloat64(), rng.NormFloat64())
				x[i], y[i] = real(s.Amp[i]), imag(s.Amp[i])
			}
			re, im := kronReference(n, q, &m)
			var ax, by, ay, bx mat.VecDense
			ax.MulVec(re, mat.NewVecDense(d, x))
			by.MulVec(im, mat.NewVecDense(d, y))
			ay.MulVec(re, mat.NewVecDense(d, y))
			bx.MulVec(im, mat.NewVecDense(d, x))
			s.Apply1(q, &m, 1)
			for i := 0; i < d; i++ {
				want := complex(ax.AtVec(i)-by.AtVec(i), ay.AtVec(i)+bx.AtVec(i))
				if cmplx.Abs(s.Amp[i]-want) > 1e-12 {
					t.Fatalf("n=%d q=%d: amp[%d] = %v, want %v", n, q, i, s.Amp[i], want)
				}
			}
		}
	}
}

// TestApply1Parallel checks that splitting the work across goroutines gives
// bit-identical amplitudes: every pair is computed by the same arithmetic.
func TestApply1Parallel(t *testing.T) {
	n := ParallelQubits
	rng := rand.New(rand.NewPCG(3, 5))
	a := &State{Qubits: n, Amp: make([]complex128, 1<<n)}
	for i := range a.Amp {
		a.Amp[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	b := &State{Qubits: n, Amp: append([]complex128(nil), a.Amp...)}
	m := [4]complex128{0.6, 0.8i, 0.8i, 0.6}
	for _, q := range []int{0, 7, n - 1} {
		a.Apply1(q, &m, 1)
		b.Apply1(q, &m, 3)
	}
	for i := range a.Amp {
		if a.Amp[i] != b.Amp[i] {
			t.Fatalf("amp[%d]: serial %v, parallel %v", i, a.Amp[i], b.Amp[i])
		}
	}
}

// TestApply1Panics checks the programmer-error panics.
func TestApply1Panics(t *testing.T) {
	s := &State{Qubits: 3, Amp: make([]complex128, 8)}
	var m [4]complex128
	for _, q := range []int{-1, 3} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("Apply1(%d) on 3 qubits did not panic", q)
				}
			}()
			s.Apply1(q, &m, 1)
		}()
	}
}
