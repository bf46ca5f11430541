package scan_test

import (
	"context"
	"fmt"

	"mixdepth/circuits"
	"mixdepth/scan"
	"mixdepth/stats"
)

// ExampleRun scans a six-qubit line with Haar gates: 200 seeded instances,
// each simulated once and read off at depths 2, 4, 8 and 16, then summarised
// per depth against the Haar collision probability 2/(D+1). The instances
// depend only on (seed, instance), so the numbers are the same for any
// worker count.
func ExampleRun() {
	g, _ := circuits.ParseGraph("line:6")
	s, _ := circuits.NewSchedule(circuits.KindLayered, g)
	ids := make([]int, 200)
	for i := range ids {
		ids[i] = i
	}
	cfg := &scan.Config{Graph: g, Schedule: s, Ensemble: circuits.Haar{},
		Depths: []int{2, 4, 8, 16}, Instances: ids, Seed: 7, Workers: 2}
	records, _, err := scan.Run(context.Background(), cfg)
	if err != nil {
		fmt.Println(err)
		return
	}
	curve := scan.Estimate(g.Qubits, records, stats.DefaultCriteria(0.05, 0.95))
	for _, row := range curve.Rows {
		fmt.Printf("depth %d (%2d gates): R = %.3f, 95%% interval [%.3f, %.3f], PT distance %.3f: %s\n",
			row.Depth, row.GateCount, row.Ratio, row.Lower, row.Upper, row.KSMean, row.Verdict)
	}
	fmt.Printf("Haar PT distance %.3f; recommended depth: %d %v\n", curve.PTBaseline.Mean, curve.Depth, curve.Found)
	// Output:
	// depth 2 ( 5 gates): R = 1.627, 95% interval [1.545, 1.728], PT distance 0.192: shallow
	// depth 4 (10 gates): R = 1.300, 95% interval [1.254, 1.354], PT distance 0.133: shallow
	// depth 8 (20 gates): R = 1.047, 95% interval [1.029, 1.071], PT distance 0.095: shallow
	// depth 16 (40 gates): R = 1.002, 95% interval [0.986, 1.023], PT distance 0.089: spread
	// Haar PT distance 0.089; recommended depth: 16 true
}
