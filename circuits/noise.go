package circuits

import (
	"errors"
	"fmt"
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
