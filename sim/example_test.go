package sim_test

import (
	"fmt"
	"math"

	"mixdepth/sim"
)

// AmplitudeBlocks hands out the amplitudes in place as (re, im) pairs,
// chunk by chunk: here (|00⟩ + i·|11⟩)/√2, one chunk; the pair of |11⟩ is
// (0, 1/√2).
func ExampleState_AmplitudeBlocks() {
	s, err := sim.NewState(2, 0)
	if err != nil {
		fmt.Println(err)
		return
	}
	s.Amp[0], s.Amp[3] = complex(math.Sqrt(0.5), 0), complex(0, math.Sqrt(0.5))
	s.AmplitudeBlocks(1, func(w, off int, a []float64) {
		fmt.Printf("chunk at %d: %.4f\n", off, a)
	})
	// Output: chunk at 0: [0.7071 0.0000 0.0000 0.0000 0.0000 0.0000 0.0000 0.7071]
}

// Passes counts the sweeps over memory that Run makes, without running:
// on 22 qubits a staircase of gates (0,1), (1,2), …, (20,21) takes two
// fused passes, while the same gates run one at a time on 10 qubits (below
// the fused sizes) take one sweep each.
func ExamplePasses() {
	var stairs []sim.Op
	for q := 0; q+1 < 22; q++ {
		stairs = append(stairs, sim.Op{A: q, B: q + 1})
	}
	fmt.Println(sim.Passes(22, stairs), sim.Passes(10, stairs[:9]))
	// Output: 2 9
}
