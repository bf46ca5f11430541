package sim

import (
	"context"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// TestKernelsPortableMatchVector: the portable Go kernels and the AVX2
// kernels compute the same products (the vector ones with fused
// multiply-adds), so they agree to rounding: 1e-13 on O(1) amplitudes after
// a handful of gates, while an index or coefficient error is O(1). Every
// ordered pair of positions on n = 2..7 qubits and every single-qubit
// position are covered, directly and through fused passes, with the 512-bit
// and with the 256-bit streaming kernel.
func TestKernelsPortableMatchVector(t *testing.T) {
	if !useAVX {
		t.Skip("no AVX2/FMA on this processor: only the portable kernels run")
	}
	has512 := useAVX512
	defer func() { useAVX, useAVX512 = true, has512 }()
	rng := rand.New(rand.NewPCG(61, 62))
	// Each comparison runs the 512-bit streaming kernel (where the processor
	// has it) and the 256-bit one against the portable code.
	var wide bool
	run := func(avx bool, n int, amp []complex128, f func(s *State)) []complex128 {
		useAVX, useAVX512 = avx, avx && wide && has512
		s := &State{Qubits: n, Amp: append([]complex128(nil), amp...)}
		f(s)
		return s.Amp
	}
	for _, wide = range []bool{true, false} {
		kernelsMatch(t, rng, run)
	}
}

func kernelsMatch(t *testing.T, rng *rand.Rand, run func(avx bool, n int, amp []complex128, f func(s *State)) []complex128) {
	for n := 2; n <= 7; n++ {
		amp := make([]complex128, 1<<n)
		for i := range amp {
			amp[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		var m [16]complex128
		var u [4]complex128
		for i := range m {
			m[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		for i := range u {
			u[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		for a := range n {
			f1 := func(s *State) { s.Apply1(a, &u, 1) }
			if d := diff(run(true, n, amp, f1), run(false, n, amp, f1)); d > 1e-13 {
				t.Errorf("n=%d Apply1(%d): vector and portable kernels differ by %g", n, a, d)
			}
			for b := range n {
				if a == b {
					continue
				}
				f2 := func(s *State) { s.Apply2(a, b, &m, 1) }
				if d := diff(run(true, n, amp, f2), run(false, n, amp, f2)); d > 1e-13 {
					t.Errorf("n=%d Apply2(%d, %d): vector and portable kernels differ by %g", n, a, b, d)
				}
			}
		}
	}
	// A fused circuit on blocks (n > BlockQubits), normalised amplitudes.
	defer func(v int) { fuseMinQubits = v }(fuseMinQubits)
	fuseMinQubits = BlockQubits + 1
	n := BlockQubits + 2
	amp := make([]complex128, 1<<n)
	amp[0] = 1
	var ops []Op
	for i := 0; i < 60; i++ {
		op := Op{A: rng.IntN(n)}
		op.B = (op.A + 1 + rng.IntN(n-1)) % n
		for j := range op.M {
			op.M[j] = complex(rng.NormFloat64(), rng.NormFloat64()) / 4
		}
		ops = append(ops, op)
	}
	f := func(s *State) { _ = s.Run(context.Background(), ops, 2) }
	x, y := run(true, n, amp, f), run(false, n, amp, f)
	var scale float64
	for _, v := range y {
		scale = max(scale, cmplx.Abs(v))
	}
	if d := diff(x, y) / scale; d > 1e-12 {
		t.Errorf("fused passes: vector and portable kernels differ by %g (relative)", d)
	}
}

func diff(x, y []complex128) float64 {
	var d float64
	for i := range x {
		d = max(d, cmplx.Abs(x[i]-y[i]))
	}
	return d
}

// TestKernels64PortableMatchVector: the complex64 vector kernels (AVX2 for
// runs of four, AVX-512 for runs of eight) agree with the portable complex64
// code to single-precision rounding: both round each product and sum to
// 2^−24 relative, the vector ones with fused multiply-adds, so on O(1)
// amplitudes they differ by ≲ 1e−6 after one gate; 1e−5 allows for it
// while any index or coefficient error is O(1).
func TestKernels64PortableMatchVector(t *testing.T) {
	if !useAVX {
		t.Skip("no AVX2/FMA on this processor: only the portable kernels run")
	}
	has512 := useAVX512
	defer func() { useAVX, useAVX512 = true, has512 }()
	rng := rand.New(rand.NewPCG(63, 64))
	run := func(avx, wide bool, n int, amp []complex64, f func(s *State64)) []complex64 {
		useAVX, useAVX512 = avx, avx && wide && has512
		s := &State64{Qubits: n, Amp: append([]complex64(nil), amp...)}
		f(s)
		return s.Amp
	}
	diff64 := func(x, y []complex64) float64 {
		var d float64
		for i := range x {
			d = max(d, cmplx.Abs(complex128(x[i]-y[i])))
		}
		return d
	}
	for _, wide := range []bool{true, false} {
		for n := 2; n <= 7; n++ {
			amp := make([]complex64, 1<<n)
			for i := range amp {
				amp[i] = complex(float32(rng.NormFloat64()), float32(rng.NormFloat64()))
			}
			var m [16]complex128
			for i := range m {
				m[i] = complex(rng.NormFloat64(), rng.NormFloat64()) / 2
			}
			for a := range n {
				for b := range n {
					if a == b {
						continue
					}
					f := func(s *State64) { s.Apply2(a, b, &m, 1) }
					if d := diff64(run(true, wide, n, amp, f), run(false, false, n, amp, f)); d > 1e-5 {
						t.Errorf("wide=%v n=%d Apply2(%d, %d): vector and portable complex64 kernels differ by %g", wide, n, a, b, d)
					}
				}
			}
		}
		defer func(v int) { fuseMinQubits = v }(fuseMinQubits)
		fuseMinQubits = BlockQubits + 1
		n := BlockQubits + 2
		amp := make([]complex64, 1<<n)
		amp[0] = 1
		ops := make([]Op, 0, 40)
		for range 40 {
			op := Op{A: rng.IntN(n)}
			op.B = (op.A + 1 + rng.IntN(n-1)) % n
			for j := range op.M {
				op.M[j] = complex(rng.NormFloat64(), rng.NormFloat64()) / 4
			}
			ops = append(ops, op)
		}
		f := func(s *State64) { _ = s.Run(context.Background(), ops, 2) }
		x, y := run(true, wide, n, amp, f), run(false, false, n, amp, f)
		var scale float64
		for _, v := range y {
			scale = max(scale, cmplx.Abs(complex128(v)))
		}
		if d := diff64(x, y) / scale; d > 1e-4 {
			t.Errorf("wide=%v fused passes: complex64 vector and portable kernels differ by %g (relative)", wide, d)
		}
	}
}
