package moments_test

import (
	"context"
	"fmt"

	"mixdepth/circuits"
	"mixdepth/moments"
)

// ExampleExact_extrapolate predicts the anti-concentration curve of a
// brickwork of Haar gates on a 60-qubit line from the exact curves of
// line:10..16, with the uncertainty of the fit in TruncationError.
func ExampleExact_extrapolate() {
	g, _ := circuits.ParseGraph("line:60")
	s, _ := circuits.NewSchedule(circuits.KindLayered, g)
	r, err := moments.Exact(context.Background(), g, s, circuits.Haar{}, []int{10, 20, 30, 40},
		moments.ExactEngine(moments.EngineExtrapolate), moments.ExactExtrapolateQubits(16), moments.ExactCurveOnly())
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("from", r.ExtrapolatedFrom)
	for i, d := range r.Depths {
		fmt.Printf("depth %d: E[Z]/Z_H = %.5f ± %.1e%s\n", d, r.Ratio[i], r.TruncationError[i], map[bool]string{true: " ?"}[r.Uncertain(i)])
	}
	fmt.Println("anti-concentration depth:", r.Depth, r.Found, "uncertain:", r.DepthUncertain())
	// Output:
	// from [line:10 line:12 line:14 line:16]
	// depth 10: E[Z]/Z_H = 6.89933 ± 5.7e-02
	// depth 20: E[Z]/Z_H = 1.24339 ± 1.1e-02
	// depth 30: E[Z]/Z_H = 1.02229 ± 2.2e-03
	// depth 40: E[Z]/Z_H = 1.00215 ± 3.4e-04
	// anti-concentration depth: 30 true uncertain: false
}
