package circuits

import (
	"errors"
	"fmt"
	"math"
)

// ChipNoise is the error model of a chip, element by element: one rate per
// coupler and per qubit of a Graph. The exact engines (package moments) and
// the sampler (package sampling) read the same values, so that an exact
// prediction and a simulated run model the same chip. Every rate keeps the
// meaning it has in the sampler:
//
//   - Pair[i] is the Pauli error rate of coupler g.Edges[i]: after every
//     two-qubit gate on it, with probability Pair[i] a Pauli drawn uniformly
//     from the 15 non-identity two-qubit Paulis acts on its two qubits.
//   - Single[q] is the Pauli error rate of qubit q's single-qubit gates:
//     after each one, with probability Single[q] one of X, Y, Z, uniformly,
//     acts on q. Gate sets without single-qubit gates never apply it.
//   - Readout01[q] is the probability that qubit q's 0 is read as 1, and
//     Readout10[q] that its 1 is read as 0.
//   - Fidelity is the global depolarizing fidelity f: the output law is
//     f·p + (1 − f)/D.
//
// Build one with UniformNoise and change entries, or read a calibration
// file. The zero ChipNoise is not usable.
type ChipNoise struct {
	Pair                 []float64
	Single               []float64
	Readout01, Readout10 []float64
	Fidelity             float64
	// edges maps a coupler (smaller qubit first) to its index in Pair.
	edges map[[2]int]int
}

// ErrNoiseRate is wrapped by the error of ChipNoise.Validate.
var ErrNoiseRate = errors.New("noise rate outside [0, 1]")

// UniformNoise returns the noise of g with the same rates on every element:
// pair on every coupler, single and the readout flips p01, p10 on every
// qubit, and the global depolarizing fidelity f. It does not validate the
// rates (see Validate). It panics if g is nil.
func UniformNoise(g *Graph, pair, single, p01, p10, f float64) *ChipNoise {
	if g == nil {
		panic("circuits: UniformNoise with a nil graph")
	}
	fill := func(n int, v float64) []float64 {
		s := make([]float64, n)
		for i := range s {
			s[i] = v
		}
		return s
	}
	c := &ChipNoise{
		Pair:      fill(len(g.Edges), pair),
		Single:    fill(g.Qubits, single),
		Readout01: fill(g.Qubits, p01),
		Readout10: fill(g.Qubits, p10),
		Fidelity:  f,
		edges:     make(map[[2]int]int, len(g.Edges)),
	}
	for i, e := range g.Edges {
		c.edges[key(e)] = i
	}
	return c
}

// Qubits returns the number of qubits c describes.
func (c *ChipNoise) Qubits() int { return len(c.Single) }

// PairError returns the Pauli error rate of the coupler (a, b), in either
// orientation. It panics if a and b are not coupled.
func (c *ChipNoise) PairError(a, b int) float64 {
	i, ok := c.edges[key(Edge{a, b})]
	if !ok {
		panic(fmt.Sprintf("circuits: PairError of (%d, %d), which are not coupled", a, b))
	}
	return c.Pair[i]
}

// PairIndex returns the index in Pair of the coupler (a, b), in either
// orientation, and false when a and b are not coupled.
func (c *ChipNoise) PairIndex(a, b int) (int, bool) {
	i, ok := c.edges[key(Edge{a, b})]
	return i, ok
}

// Uncovered returns a gate of s on a pair that has no rate in c (a pair
// that is not a coupler of the graph c was built for) and true, or false
// when every gate of s has its rate. A layered schedule's gates are its
// classes' and a random-edge schedule's its edges.
func (c *ChipNoise) Uncovered(s Schedule) (Edge, bool) {
	var edges []Edge
	switch s := s.(type) {
	case *Layered:
		for _, cl := range s.Classes {
			edges = append(edges, cl...)
		}
	case *RandomEdge:
		edges = s.Edges
	}
	for _, e := range edges {
		if _, ok := c.PairIndex(e.A, e.B); !ok {
			return e, true
		}
	}
	return Edge{}, false
}

// Noiseless reports whether c has no error at all: every rate 0 and
// Fidelity 1.
func (c *ChipNoise) Noiseless() bool {
	if c.Fidelity != 1 {
		return false
	}
	for _, s := range [][]float64{c.Pair, c.Single, c.Readout01, c.Readout10} {
		for _, v := range s {
			if v != 0 {
				return false
			}
		}
	}
	return true
}

// Uniform reports whether every coupler has the same rate and every qubit
// the same three rates, so that an engine relying on the symmetry of the
// graph (the complete-graph reduction) may use them.
func (c *ChipNoise) Uniform() bool {
	for _, s := range [][]float64{c.Pair, c.Single, c.Readout01, c.Readout10} {
		for _, v := range s {
			if v != s[0] {
				return false
			}
		}
	}
	return true
}

// Validate returns an error wrapping ErrNoiseRate, naming the element, for
// the first rate or fidelity outside [0, 1] (NaN included), and an error for
// slices whose lengths do not match the graph c was built for.
func (c *ChipNoise) Validate(g *Graph) error {
	if len(c.Pair) != len(g.Edges) || len(c.Single) != g.Qubits || len(c.Readout01) != g.Qubits || len(c.Readout10) != g.Qubits {
		return fmt.Errorf("circuits: noise for %d couplers and %d qubits on a graph with %d couplers and %d qubits", len(c.Pair), len(c.Single), len(g.Edges), g.Qubits)
	}
	bad := func(v float64) bool { return !(v >= 0 && v <= 1) }
	if bad(c.Fidelity) {
		return fmt.Errorf("circuits: global depolarizing fidelity %v: %w", c.Fidelity, ErrNoiseRate)
	}
	for i, v := range c.Pair {
		if bad(v) {
			return fmt.Errorf("circuits: Pauli error rate %v of coupler %s: %w", v, g.EdgeLabel(g.Edges[i]), ErrNoiseRate)
		}
	}
	for q := range g.Qubits {
		for _, r := range []struct {
			what string
			v    float64
		}{{"single-qubit error rate", c.Single[q]}, {"readout error 0→1", c.Readout01[q]}, {"readout error 1→0", c.Readout10[q]}} {
			if bad(r.v) {
				return fmt.Errorf("circuits: %s %v of qubit %s: %w", r.what, r.v, g.Label(q), ErrNoiseRate)
			}
		}
	}
	return nil
}

// DigitalFidelity returns the fidelity that the digital error model
// predicts for a circuit of depth steps of schedule s and ensemble e under
// the noise c: the product of the fidelities of its operations (Arute et
// al. 2019, "Quantum supremacy using a programmable superconducting
// processor", Nature 574, 505),
//
//	F = f · Π_gates (1 − Pair_e) · Π_single-qubit gates (1 − Single_q) · Π_q (1 − (Readout01_q + Readout10_q)/2).
//
// The single-qubit gates are those the sampler applies: two per two-qubit
// gate for a gate set G·(u_a ⊗ u_b) (*GateSet), one per qubit in the final
// layer of a Finisher, none for Haar and Clifford two-qubit gates. A
// deterministic schedule's gates are its own; for a random-edge schedule,
// whose edges are independent uniform draws, F is the expectation over the
// draws, each step contributing the mean over the edges of its factor. With
// uniform rates this is sampling's ErrorModel.Predict of CountGates. It
// panics if depth < 1.
func (c *ChipNoise) DigitalFidelity(s Schedule, e Ensemble, depth int) float64 {
	if depth < 1 {
		panic(fmt.Sprintf("circuits: DigitalFidelity at depth %d", depth))
	}
	_, dressed := e.(*GateSet)
	gate := func(ed Edge) float64 {
		f := 1 - c.PairError(ed.A, ed.B)
		if dressed {
			f *= (1 - c.Single[ed.A]) * (1 - c.Single[ed.B])
		}
		return f
	}
	f := c.Fidelity
	if r, ok := s.(*RandomEdge); ok {
		var mean float64
		for _, ed := range r.Edges {
			mean += gate(ed)
		}
		f *= math.Pow(mean/float64(len(r.Edges)), float64(depth))
	} else {
		var step []Edge
		for t := range depth {
			step = s.Step(t, nil, step[:0])
			for _, ed := range step {
				f *= gate(ed)
			}
		}
	}
	_, final := e.(Finisher)
	for q := range c.Qubits() {
		if final {
			f *= 1 - c.Single[q]
		}
		f *= 1 - (c.Readout01[q]+c.Readout10[q])/2
	}
	return f
}

// DigitalParts are the factors of DigitalFidelity: the two-qubit gates
// alone, the single-qubit gates alone, the readout alone, and Fidelity, the
// whole (with the global fidelity).
type DigitalParts struct {
	TwoQubit, SingleQubit, Readout, Fidelity float64
}

// DigitalParts returns the factors of c.DigitalFidelity(s, e, depth), each
// computed by DigitalFidelity with the other rates zero and no global
// depolarizing.
func (c *ChipNoise) DigitalParts(s Schedule, e Ensemble, depth int) DigitalParts {
	zero := make([]float64, c.Qubits())
	only := func(pair bool, single, r01, r10 []float64) float64 {
		d := *c // shares the coupler index, read only
		d.Fidelity = 1
		if !pair {
			d.Pair = make([]float64, len(c.Pair))
		}
		d.Single, d.Readout01, d.Readout10 = single, r01, r10
		return d.DigitalFidelity(s, e, depth)
	}
	return DigitalParts{
		TwoQubit:    only(true, zero, zero, zero),
		SingleQubit: only(false, c.Single, zero, zero),
		Readout:     only(false, zero, c.Readout01, c.Readout10),
		Fidelity:    c.DigitalFidelity(s, e, depth),
	}
}
