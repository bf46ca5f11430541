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

// ExampleExactNoise predicts what a cross-entropy benchmark of a small
// invented chip would read (a line of eight qubits, Haar gates, 0.5% Pauli
// error per coupler, 1% and 2% readout flips): the exact expected E[F_lin],
// its ratio to the noiseless value, and that ratio over the digital error
// model, which tends to 1 as the circuit deepens.
func ExampleExactNoise() {
	g, _ := circuits.ParseGraph("line:8")
	s, _ := circuits.NewSchedule(circuits.KindLayered, g)
	nz := circuits.UniformNoise(g, 0.005, 0, 0.01, 0.02, 1)
	r, err := moments.Exact(context.Background(), g, s, circuits.Haar{}, []int{4, 12, 40}, moments.ExactCurveOnly(), moments.ExactNoise(nz))
	if err != nil {
		fmt.Println(err)
		return
	}
	for i, d := range r.Depths {
		fmt.Printf("depth %2d: E[F_lin] = %.4f, ideal %.4f, normalized %.4f, digital %.4f, ratio %.4f\n",
			d, r.XEBExpected[i], r.XEBIdeal[i], r.XEBNormalized[i], r.DigitalFidelity[i], r.XEBOverDigital[i])
	}
	// Output:
	// depth  4: E[F_lin] = 1.9726, ideal 2.2421, normalized 0.8798, digital 0.8261, ratio 1.0651
	// depth 12: E[F_lin] = 0.8130, ideal 1.0937, normalized 0.7434, digital 0.7179, ratio 1.0355
	// depth 40: E[F_lin] = 0.4447, ideal 0.9922, normalized 0.4481, digital 0.4393, ratio 1.0202
}
