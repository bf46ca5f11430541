package sim_test

import (
	"fmt"
	"math/rand/v2"
	"runtime"
	"testing"
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
