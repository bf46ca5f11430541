package sampling

import (
	"fmt"
	"math"

	"mixdepth/circuits"
)

// GateCounts are the operations of one circuit that the digital error model
// charges for (see ErrorModel).
type GateCounts struct {
	// TwoQubit and SingleQubit are the numbers of two- and single-qubit
	// gates.
	TwoQubit, SingleQubit int
	// Qubits is the number of qubits read out.
	Qubits int
}

// CountGates returns the gates that the digital error model counts in a
// circuit of depth steps of schedule s and ensemble e on qubits qubits:
// s.GateCount(depth) two-qubit gates; as single-qubit gates, two per
// two-qubit gate for a gate set G·(u_a ⊗ u_b) (*circuits.GateSet), plus the
// final layer of qubits gates when e is a circuits.Finisher. Haar and
// Clifford gates count as native two-qubit gates, with no single-qubit
// gates. Every qubit is read out. It panics if depth < 1 or qubits < 1.
func CountGates(s circuits.Schedule, e circuits.Ensemble, qubits, depth int) GateCounts {
	if depth < 1 || qubits < 1 {
		panic(fmt.Sprintf("sampling: CountGates with depth %d on %d qubits", depth, qubits))
	}
	c := GateCounts{TwoQubit: s.GateCount(depth), Qubits: qubits}
	if _, ok := e.(*circuits.GateSet); ok {
		c.SingleQubit += 2 * c.TwoQubit
	}
	if _, ok := e.(circuits.Finisher); ok {
		c.SingleQubit += qubits
	}
	return c
}

// ErrorModel holds the error rates of the digital error model, in which the
// fidelity of a circuit is the product of the fidelities of its gates and of
// its readout (Arute et al. 2019, "Quantum supremacy using a programmable
// superconducting processor", Nature 574, 505):
//
//	F = (1 − e2)^g2 · (1 − e1)^g1 · f · (1 − (p01 + p10)/2)^n
//
// for g2 two-qubit gates of error e2, g1 single-qubit gates of error e1, a
// global depolarizing fidelity f, and n qubits read out, each with its
// readout error averaged over the two outcomes (p01 the probability that 0
// is read as 1, p10 that 1 is read as 0). The zero ErrorModel predicts 0
// (its Depolarizing fidelity is 0); NoErrors predicts 1.
type ErrorModel struct {
	// TwoQubitError e2 and SingleQubitError e1 are the errors per gate.
	TwoQubitError, SingleQubitError float64
	// Depolarizing is the global depolarizing fidelity f (Noise.Fidelity).
	Depolarizing float64
	// Readout01 and Readout10 are the readout flip probabilities p01, p10.
	Readout01, Readout10 float64
}

// NoErrors is the error model of a perfect device: Depolarizing 1 and no
// gate or readout errors.
var NoErrors = ErrorModel{Depolarizing: 1}

// ErrorModel returns the digital error model of the noise n: its Pauli
// error rate as the two-qubit gate error (a Pauli error rate e leaves a
// gate's fidelity 1 − e), its global depolarizing fidelity, its readout
// flips, and no single-qubit gate errors. It panics for a noise with a
// Chip, whose rates differ element by element: its digital model is
// Chip.DigitalFidelity.
func (n Noise) ErrorModel() ErrorModel {
	if n.Chip != nil {
		panic("sampling: ErrorModel of a noise with a Chip; use Chip.DigitalFidelity")
	}
	return ErrorModel{TwoQubitError: n.GateError, Depolarizing: n.Fidelity, Readout01: n.Readout01, Readout10: n.Readout10}
}

// Validate returns an error wrapping ErrNoiseRange, naming the parameter,
// unless every rate and the depolarizing fidelity lie in [0, 1].
func (m ErrorModel) Validate() error {
	return checkUnitRange([]namedValue{{"two-qubit gate error", m.TwoQubitError}, {"single-qubit gate error", m.SingleQubitError},
		{"depolarizing fidelity", m.Depolarizing}, {"readout error 0→1", m.Readout01}, {"readout error 1→0", m.Readout10}})
}

// Prediction is the digital error model's fidelity of one circuit and its
// factors; Fidelity is their product.
type Prediction struct {
	// TwoQubit is (1 − e2)^g2 and SingleQubit is (1 − e1)^g1.
	TwoQubit, SingleQubit float64
	// Depolarizing is the global depolarizing fidelity f.
	Depolarizing float64
	// Readout is (1 − (p01 + p10)/2)^n.
	Readout float64
	// Fidelity is TwoQubit · SingleQubit · Depolarizing · Readout.
	Fidelity float64
}

// Predict returns the fidelity that the digital error model m predicts for
// a circuit with the gate counts c (see ErrorModel). It panics if m is
// invalid (see Validate) or a count is negative.
func (m ErrorModel) Predict(c GateCounts) Prediction {
	if err := m.Validate(); err != nil {
		panic(err.Error())
	}
	if c.TwoQubit < 0 || c.SingleQubit < 0 || c.Qubits < 0 {
		panic(fmt.Sprintf("sampling: negative gate counts %+v", c))
	}
	p := Prediction{
		TwoQubit:     math.Pow(1-m.TwoQubitError, float64(c.TwoQubit)),
		SingleQubit:  math.Pow(1-m.SingleQubitError, float64(c.SingleQubit)),
		Depolarizing: m.Depolarizing,
		Readout:      math.Pow(1-(m.Readout01+m.Readout10)/2, float64(c.Qubits)),
	}
	p.Fidelity = p.TwoQubit * p.SingleQubit * p.Depolarizing * p.Readout
	return p
}
