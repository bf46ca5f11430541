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
