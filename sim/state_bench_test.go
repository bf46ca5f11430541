package sim_test

import (
	"context"
	"fmt"
	"math/rand/v2"
	"runtime"
	"testing"

	"mixdepth/circuits"
	"mixdepth/sim"
)

// BenchmarkApplyGate times one Haar gate on qubits (n/2−1, n/2) of an n-qubit
// state with runtime.NumCPU() workers. SetBytes counts 32 bytes per
// amplitude, the read and the write of each complex128, as the effective
// memory traffic of a gate.
func BenchmarkApplyGate(b *testing.B) {
	workers := runtime.NumCPU()
	for _, n := range []int{16, 18, 20, 22, 24} {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			s := newState(b, n)
			m := haarGate(rand.New(rand.NewPCG(1, uint64(n))))
			b.SetBytes(32 << n)
			b.ReportAllocs()
			for b.Loop() {
				s.Apply2(n/2-1, n/2, m, workers)
			}
		})
	}
}

// brickwork returns layers of Haar gates on a line of n qubits.
func brickwork(n, layers int) []sim.Op {
	rng := rand.New(rand.NewPCG(4, 5))
	var ops []sim.Op
	for layer := 0; layer < layers; layer++ {
		for a := layer % 2; a+1 < n; a += 2 {
			op := sim.Op{A: a, B: a + 1}
			circuits.HaarUnitary(rng, 4, op.M[:])
			ops = append(ops, op)
		}
	}
	return ops
}

// BenchmarkRun times a 20-layer brickwork on a line, fused (Run) and gate by
// gate (Apply2), per circuit; SetBytes counts 32·2^n bytes per gate, the
// traffic of the gate-by-gate circuit.
func BenchmarkRun(b *testing.B) {
	workers := runtime.NumCPU()
	for _, n := range []int{18, 20, 22, 24} {
		ops := brickwork(n, 20)
		s := newState(b, n)
		b.Run(fmt.Sprintf("fused/n=%d", n), func(b *testing.B) {
			b.SetBytes(int64(len(ops)) * 32 << n)
			for b.Loop() {
				_ = s.Run(context.Background(), ops, workers)
			}
		})
		b.Run(fmt.Sprintf("one-by-one/n=%d", n), func(b *testing.B) {
			b.SetBytes(int64(len(ops)) * 32 << n)
			for b.Loop() {
				for i := range ops {
					s.Apply2(ops[i].A, ops[i].B, &ops[i].M, workers)
				}
			}
		})
	}
}
