package sampling

import (
	"math"
	"testing"

	"mixdepth/circuits"
)

// TestDigitalFidelityUniform checks circuits.ChipNoise.DigitalFidelity with
// the same rates everywhere against ErrorModel.Predict of CountGates, the
// uniform digital model (Arute et al. 2019, Nature 574, 505), for the cases
// of TestCountGates.
func TestDigitalFidelityUniform(t *testing.T) {
	for _, c := range []struct {
		graph    string
		schedule circuits.ScheduleKind
		gates    string
		depth    int
	}{
		{"line:4", circuits.KindLayered, "haar", 4},
		{"line:4", circuits.KindLayered, "cz+haar1", 4},
		{"grid:3x3", circuits.KindLayered, "iswap+haar1", 7},
		{"ring:5", circuits.KindRandomEdge, "haar", 30},
		{"ring:5", circuits.KindRandomEdge, "iswap+haar1", 30},
	} {
		g, err := circuits.ParseGraph(c.graph)
		if err != nil {
			t.Fatal(err)
		}
		s, err := circuits.NewSchedule(c.schedule, g)
		if err != nil {
			t.Fatal(err)
		}
		e, err := circuits.NewEnsemble(c.gates)
		if err != nil {
			t.Fatal(err)
		}
		m := ErrorModel{TwoQubitError: 0.007, SingleQubitError: 0.001, Depolarizing: 0.9, Readout01: 0.02, Readout10: 0.05}
		want := m.Predict(CountGates(s, e, g.Qubits, c.depth)).Fidelity
		chip := circuits.UniformNoise(g, m.TwoQubitError, m.SingleQubitError, m.Readout01, m.Readout10, m.Depolarizing)
		if got := chip.DigitalFidelity(s, e, c.depth); math.Abs(got-want) > 1e-14*want {
			t.Errorf("%s %s %s depth %d: DigitalFidelity %.17g, Predict %.17g", c.graph, c.schedule, c.gates, c.depth, got, want)
		}
	}
}

// TestDigitalFidelityByHand checks per-element rates on line:3, counted by
// hand: the layered line rule applies (0,1) then (1,2), so depth 3 applies
// (0,1) twice and (1,2) once. With cz+haar1 each gate carries the
// single-qubit errors of its two qubits, and the final layer one per qubit.
// Random-edge on the same line draws each edge with probability 1/2.
func TestDigitalFidelityByHand(t *testing.T) {
	g, err := circuits.ParseGraph("line:3")
	if err != nil {
		t.Fatal(err)
	}
	chip := circuits.UniformNoise(g, 0, 0, 0, 0, 1)
	chip.Pair = []float64{0.01, 0.03} // edges (0,1), (1,2)
	chip.Single = []float64{0.001, 0.002, 0.004}
	chip.Readout01 = []float64{0.02, 0, 0}
	chip.Readout10 = []float64{0.04, 0, 0.1}
	layered, _ := circuits.NewSchedule(circuits.KindLayered, g)
	haar, _ := circuits.NewEnsemble("haar")
	cz, _ := circuits.NewEnsemble("cz+haar1")
	readout := (1 - 0.03) * 1 * (1 - 0.05)
	if got, want := chip.DigitalFidelity(layered, haar, 3), 0.99*0.99*0.97*readout; math.Abs(got-want) > 1e-15 {
		t.Errorf("haar: %.17g, want %.17g", got, want)
	}
	g01 := 0.99 * 0.999 * 0.998
	g12 := 0.97 * 0.998 * 0.996
	final := 0.999 * 0.998 * 0.996
	if got, want := chip.DigitalFidelity(layered, cz, 3), g01*g01*g12*final*readout; math.Abs(got-want) > 1e-15 {
		t.Errorf("cz+haar1: %.17g, want %.17g", got, want)
	}
	random, _ := circuits.NewSchedule(circuits.KindRandomEdge, g)
	if got, want := chip.DigitalFidelity(random, haar, 4), math.Pow((0.99+0.97)/2, 4)*readout; math.Abs(got-want) > 1e-15 {
		t.Errorf("random-edge: %.17g, want %.17g", got, want)
	}
}
