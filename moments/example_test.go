package moments_test

import (
	"context"
	"fmt"

	"mixdepth/circuits"
	"mixdepth/moments"
)

// ExampleExact computes the exact anti-concentration curve of a brickwork of
// Haar gates on eight qubits in a line, with no sampling: E[Z]/Z_H and the
// second frame potential F2 (Haar value 2) at each depth, and the first depth
// with E[Z]/Z_H ≤ 1 + ε.
func ExampleExact() {
	g, _ := circuits.ParseGraph("line:8")
	s, _ := circuits.NewSchedule(circuits.KindLayered, g)
	r, err := moments.Exact(context.Background(), g, s, circuits.Haar{}, []int{2, 4, 8, 12, 16}, moments.ExactEps(0.05))
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("Z_H = %.6f\n", r.HaarCollision)
	for i, d := range r.Depths {
		fmt.Printf("depth %2d (%2d gates): E[Z]/Z_H = %.6f, F2 = %.4f\n", d, r.GateCounts[i], r.Ratio[i], r.Frame[i])
	}
	fmt.Println("anti-concentration depth:", r.Depth, r.Found)
	// Output:
	// Z_H = 0.007782
	// depth  2 ( 7 gates): E[Z]/Z_H = 2.398118, F2 = 4.4648
	// depth  4 (14 gates): E[Z]/Z_H = 1.627378, F2 = 2.4042
	// depth  8 (28 gates): E[Z]/Z_H = 1.172153, F2 = 2.0297
	// depth 12 (42 gates): E[Z]/Z_H = 1.050924, F2 = 2.0026
	// depth 16 (56 gates): E[Z]/Z_H = 1.015183, F2 = 2.0002
	// anti-concentration depth: 16 true
}
