package sampling

import (
	"context"
	"fmt"

	"mixdepth/circuits"
	"mixdepth/sim"
)

// Circuit is one random circuit instance as it is run: its two-qubit gates,
// step by step, then an optional final layer of single-qubit gates, then a
// computational-basis measurement of every qubit.
type Circuit struct {
	// Instance is the instance id whose streams drew the circuit.
	Instance int
	// Qubits is the number of qubits n.
	Qubits int
	// Steps[t] lists the gates of step t in the order they are applied: a
	// layer of disjoint gates for a layered schedule, one gate for the
	// random-edge schedule. len(Steps) is the depth.
	Steps [][]circuits.Gate
	// Final is the final single-qubit layer, Final[q] on qubit q (row-major
	// 2×2), or nil when the gate set has none.
	Final [][4]complex128
}

// Build draws instance id at depth depth of the run with seed seed: step t's
// gates come from circuits.NewBuilder's stream circuits.Stream(seed, id),
// and the final layer, when the ensemble is a circuits.Finisher, from
// circuits.FinalStream(seed, id, depth). These are the gates, in the same
// order, that scan.Run applies to instance id when it reads out depth depth,
// so the circuit's Probabilities reproduce that readout to rounding. It
// panics if depth < 1 or qubits < 2.
func Build(s circuits.Schedule, e circuits.Ensemble, qubits int, seed uint64, id, depth int) *Circuit {
	if depth < 1 || qubits < 2 {
		panic(fmt.Sprintf("sampling: Build with depth %d on %d qubits", depth, qubits))
	}
	b := circuits.NewBuilder(s, e, seed, id)
	c := &Circuit{Instance: id, Qubits: qubits, Steps: make([][]circuits.Gate, depth)}
	for t := range c.Steps {
		c.Steps[t] = b.Next(nil)
	}
	if final, ok := circuits.FinalLayer(e, qubits, seed, id, depth, nil); ok {
		c.Final = final
	}
	return c
}

// Depth returns the number of steps.
func (c *Circuit) Depth() int { return len(c.Steps) }

// GateCount returns the number of two-qubit gates.
func (c *Circuit) GateCount() int {
	g := 0
	for _, step := range c.Steps {
		g += len(step)
	}
	return g
}

// Apply runs the circuit on st in place (st is not reset first). It panics
// if st has another number of qubits.
func (c *Circuit) Apply(st *sim.State, workers int) {
	c.ApplyWithErrors(st, nil, workers)
}

// ApplyWithErrors runs the circuit on st with a Pauli after each two-qubit
// gate: paulis[k], for the k-th gate in order, is 0 for none or 1..15 for
// the two-qubit Pauli 4·p_A + p_B (0 = I, 1 = X, 2 = Y, 3 = Z) on the gate's
// qubits (A, B). A nil paulis means no errors. It panics if st has another
// number of qubits or paulis has a length other than GateCount.
func (c *Circuit) ApplyWithErrors(st *sim.State, paulis []uint8, workers int) {
	c.run(context.Background(), st, paulis, workers)
}

// run is ApplyWithErrors that checks ctx before every step; it returns false,
// leaving st part-way, when ctx is cancelled.
func (c *Circuit) run(ctx context.Context, st *sim.State, paulis []uint8, workers int) bool {
	return c.runFrom(ctx, st, 0, paulis, workers, nil)
}

// runFrom is run from step from on, st holding the state after the steps
// before it; paulis still covers every gate of the circuit. after, when
// non-nil, is called after each step t with t+1, the number of steps done.
func (c *Circuit) runFrom(ctx context.Context, st *sim.State, from int, paulis []uint8, workers int, after func(done int)) bool {
	return c.runNoisy(ctx, st, from, paulis, nil, workers, after)
}

// Probabilities resets st, runs the noiseless circuit and writes the 2^n
// output probabilities into dst (allocated when nil or short); it returns
// dst.
func (c *Circuit) Probabilities(st *sim.State, dst []float64, workers int) []float64 {
	st.Reset()
	c.Apply(st, workers)
	return st.Probabilities(dst, workers)
}
