package sampling

import (
	"errors"
	"math"
	"testing"

	"mixdepth/circuits"
)

// TestCountGates checks the gate counts on circuits counted by hand. line:4
// layered has class A = (0,1), (2,3) and class B = (1,2) (the line rule: i even, then i odd), so
// depth 4 is A, B, A, B: 6 two-qubit gates. A gate set G·(u_a ⊗ u_b) with a
// final layer adds 2 single-qubit gates per two-qubit gate and one per
// qubit; Haar and Clifford gates are native two-qubit gates. The random-edge
// schedule applies one gate per step.
func TestCountGates(t *testing.T) {
	cases := []struct {
		graph    string
		schedule circuits.ScheduleKind
		gates    string
		depth    int
		want     GateCounts
	}{
		{"line:4", circuits.KindLayered, "haar", 4, GateCounts{TwoQubit: 6, SingleQubit: 0, Qubits: 4}},
		{"line:4", circuits.KindLayered, "clifford", 4, GateCounts{TwoQubit: 6, SingleQubit: 0, Qubits: 4}},
		{"line:4", circuits.KindLayered, "cz+haar1", 4, GateCounts{TwoQubit: 6, SingleQubit: 2*6 + 4, Qubits: 4}},
		{"line:4", circuits.KindLayered, "cz+haar1", 1, GateCounts{TwoQubit: 2, SingleQubit: 2*2 + 4, Qubits: 4}},
		{"ring:5", circuits.KindRandomEdge, "haar", 30, GateCounts{TwoQubit: 30, SingleQubit: 0, Qubits: 5}},
		{"ring:5", circuits.KindRandomEdge, "iswap+haar1", 30, GateCounts{TwoQubit: 30, SingleQubit: 2*30 + 5, Qubits: 5}},
	}
	for _, c := range cases {
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
		if got := CountGates(s, e, g.Qubits, c.depth); got != c.want {
			t.Errorf("%s %s %s depth %d: %+v, want %+v", c.graph, c.schedule, c.gates, c.depth, got, c.want)
		}
	}
}

// TestPredictByHand checks Predict against the digital error model written
// out by hand (Arute et al. 2019, Nature 574, 505: the fidelity is the
// product of the gate and readout fidelities), to 1e-14 relative: four
// float64 powers and products, each correct to about 1e-16.
func TestPredictByHand(t *testing.T) {
	m := ErrorModel{TwoQubitError: 0.01, SingleQubitError: 0.001, Depolarizing: 0.8, Readout01: 0.02, Readout10: 0.04}
	p := m.Predict(GateCounts{TwoQubit: 6, SingleQubit: 16, Qubits: 4})
	near := func(got, want float64) bool { return math.Abs(got-want) <= 1e-14*want }
	want := []struct {
		name      string
		got, want float64
	}{
		{"two-qubit", p.TwoQubit, 0.99 * 0.99 * 0.99 * 0.99 * 0.99 * 0.99},
		{"single-qubit", p.SingleQubit, math.Pow(0.999, 16)},
		{"depolarizing", p.Depolarizing, 0.8},
		{"readout", p.Readout, 0.97 * 0.97 * 0.97 * 0.97}, // 1 − (0.02 + 0.04)/2 per qubit
		{"fidelity", p.Fidelity, math.Pow(0.99, 6) * math.Pow(0.999, 16) * 0.8 * math.Pow(0.97, 4)},
	}
	for _, w := range want {
		if !near(w.got, w.want) {
			t.Errorf("%s factor %.17g, want %.17g", w.name, w.got, w.want)
		}
	}
	// A perfect device predicts 1 for any circuit; the zero model is a
	// uniform sampler (depolarizing fidelity 0).
	c := GateCounts{TwoQubit: 100, SingleQubit: 300, Qubits: 20}
	if f := NoErrors.Predict(c).Fidelity; f != 1 {
		t.Errorf("NoErrors predicts %v, want 1", f)
	}
	if f := (ErrorModel{}).Predict(c).Fidelity; f != 0 {
		t.Errorf("the zero model predicts %v, want 0", f)
	}
}

// TestNoiseErrorModel: a Pauli error rate e after each two-qubit gate
// leaves the gate fidelity 1 − e, and the depolarizing and readout
// parameters carry over unchanged; Noise simulates no single-qubit errors.
func TestNoiseErrorModel(t *testing.T) {
	nz := Noise{Fidelity: 0.9, GateError: 0.005, Readout01: 0.01, Readout10: 0.03}
	want := ErrorModel{TwoQubitError: 0.005, SingleQubitError: 0, Depolarizing: 0.9, Readout01: 0.01, Readout10: 0.03}
	if got := nz.ErrorModel(); got != want {
		t.Errorf("ErrorModel() = %+v, want %+v", got, want)
	}
	if got := Ideal.ErrorModel(); got != NoErrors {
		t.Errorf("Ideal.ErrorModel() = %+v, want NoErrors", got)
	}
}

func TestErrorModelValidate(t *testing.T) {
	bad := map[string]ErrorModel{
		"two-qubit":    {TwoQubitError: 1.5, Depolarizing: 1},
		"single-qubit": {SingleQubitError: -0.1, Depolarizing: 1},
		"depolarizing": {Depolarizing: math.NaN()},
		"readout":      {Depolarizing: 1, Readout10: 2},
	}
	for name, m := range bad {
		if err := m.Validate(); !errors.Is(err, ErrNoiseRange) {
			t.Errorf("%s: Validate() = %v, want ErrNoiseRange", name, err)
		}
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("%s: Predict of an invalid model did not panic", name)
				}
			}()
			m.Predict(GateCounts{TwoQubit: 1, Qubits: 2})
		}()
	}
	if err := NoErrors.Validate(); err != nil {
		t.Errorf("NoErrors: %v", err)
	}
}
