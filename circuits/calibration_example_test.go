package circuits_test

import (
	"fmt"
	"strings"

	"mixdepth/circuits"
)

// ExampleReadCalibration reads the calibration of a four-qubit line of our
// own (invented rates) over uniform rates, and predicts the fidelity of a
// cz+haar1 circuit by the digital error model, element by element.
func ExampleReadCalibration() {
	g, err := circuits.ParseGraph("line:4")
	if err != nil {
		panic(err)
	}
	file := `# line:4, invented rates
qubit,coupled_to,pair_error,single_error,readout_01,readout_10
1,2,0.012,,,
0,,,0.0004,0.015,0.03
2,,,,,0.05
`
	base := circuits.UniformNoise(g, 0.005, 0.001, 0.02, 0.03, 1)
	c, err := circuits.ReadCalibration("line4.csv", strings.NewReader(file), g, base)
	if err != nil {
		panic(err)
	}
	s, err := circuits.NewSchedule(circuits.KindLayered, g)
	if err != nil {
		panic(err)
	}
	e, err := circuits.NewEnsemble("cz+haar1")
	if err != nil {
		panic(err)
	}
	fmt.Printf("coupler 1-2: %g, coupler 0-1: %g\n", c.PairError(1, 2), c.PairError(0, 1))
	fmt.Printf("qubit 2 reads 1 as 0 with probability %g\n", c.Readout10[2])
	fmt.Printf("digital model at depth 8: %.4f\n", c.DigitalFidelity(s, e, 8))
	// Output:
	// coupler 1-2: 0.012, coupler 0-1: 0.005
	// qubit 2 reads 1 as 0 with probability 0.05
	// digital model at depth 8: 0.8006
}
