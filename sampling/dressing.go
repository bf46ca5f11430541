package sampling

import (
	"context"
	"fmt"
	"math/cmplx"
	"math/rand/v2"
	"slices"

	"mixdepth/circuits"
	"mixdepth/sim"
)

// dressing holds what a run needs to place single-qubit Pauli errors
// (Noise.Chip's Single rates): for a *circuits.GateSet, whose gate is
// G·(u_a ⊗ u_b), a Pauli P_a ⊗ P_b after u_a and u_b and before G, that
// is the gate followed by G·(P_a ⊗ P_b)·G†; for a circuits.Finisher, a
// Pauli after each final-layer gate.
type dressing struct {
	single  []float64
	dressed bool // errors after the dressing of each two-qubit gate
	final   bool // errors after the final layer
	// base[p] is G·P·G† for the two-qubit Pauli p = 4·p_A + p_B and the
	// set's entangler G; bound holds the same for calibrated couplers.
	base  *[pauliCount][16]complex128
	bound map[[2]int]*[pauliCount][16]complex128
}

// newDressing returns the dressing of c, or nil when c's noise puts no
// single-qubit error in its circuits.
func newDressing(c *Config) *dressing {
	ch := c.Noise.Chip
	if ch == nil || !hasSingleGates(c.Ensemble) {
		return nil
	}
	if !slices.ContainsFunc(ch.Single, nonZero) {
		return nil
	}
	d := &dressing{single: ch.Single}
	_, d.final = c.Ensemble.(circuits.Finisher)
	if gs, ok := c.Ensemble.(*circuits.GateSet); ok {
		d.dressed = true
		d.base = conjugatedPaulis(&gs.G)
		if es := gs.EdgeEntanglers(); len(es) > 0 {
			d.bound = make(map[[2]int]*[pauliCount][16]complex128, len(es))
			for k, g := range es {
				d.bound[k] = conjugatedPaulis(&g)
			}
		}
	}
	return d
}

// conjugatedPaulis returns G·P·G† for the 16 two-qubit Paulis P.
func conjugatedPaulis(g *[16]complex128) *[pauliCount][16]complex128 {
	var out [pauliCount][16]complex128
	for p := range pauliCount {
		var gp [16]complex128
		mul4(&gp, g, &pauliMatrices[p])
		for i := range 4 {
			for j := range 4 {
				var s complex128
				for k := range 4 {
					s += gp[4*i+k] * cmplx.Conj(g[4*j+k])
				}
				out[p][4*i+j] = s
			}
		}
	}
	return &out
}

// mul4 sets dst = a·b for row-major 4×4 matrices.
func mul4(dst, a, b *[16]complex128) {
	for i := range 4 {
		for j := range 4 {
			var s complex128
			for k := range 4 {
				s += a[4*i+k] * b[4*k+j]
			}
			dst[4*i+j] = s
		}
	}
}

// singleErrors are the single-qubit errors of one trajectory of a circuit:
// gate[k] = 4·p_A + p_B after the dressing of gate k (0 for none), final[q]
// = p after qubit q's final gate.
type singleErrors struct {
	d     *dressing
	circ  *Circuit
	gate  []uint8
	final []uint8
	mats  []*[pauliCount][16]complex128 // mats[k]: the table of gate k's entangler
	pairs [][2]int                      // pairs[k]: gate k's qubits (A, B)
}

// errors returns the buffers of circ's single-qubit errors.
func (d *dressing) errors(circ *Circuit) *singleErrors {
	s := &singleErrors{d: d, circ: circ}
	if d.dressed {
		s.gate = make([]uint8, circ.GateCount())
		for _, step := range circ.Steps {
			for _, g := range step {
				m := d.base
				if b, ok := d.bound[[2]int{g.A, g.B}]; ok {
					m = b
				}
				s.mats = append(s.mats, m)
				s.pairs = append(s.pairs, [2]int{g.A, g.B})
			}
		}
	}
	if d.final && circ.Final != nil {
		s.final = make([]uint8, len(circ.Final))
	}
	return s
}

// draw draws the single-qubit errors of one trajectory from rng (see
// SingleErrorStream for the order) and returns the index of the first gate
// with one, GateCount when only the final layer has one, or −1 for none.
func (s *singleErrors) draw(rng *rand.Rand) int {
	first := -1
	for k, g := range s.pairs {
		pa := drawSingle(rng, s.d.single[g[0]])
		pb := drawSingle(rng, s.d.single[g[1]])
		s.gate[k] = 4*pa + pb
		if first < 0 && s.gate[k] != 0 {
			first = k
		}
	}
	for q := range s.final {
		s.final[q] = drawSingle(rng, s.d.single[q])
		if first < 0 && s.final[q] != 0 {
			first = s.circ.GateCount()
		}
	}
	return first
}

// gateRates returns the Pauli error rate of each gate of circ, in order:
// Noise.GateError, or the coupler's rate with a Chip.
func (w *worker) gateRates(circ *Circuit) []float64 {
	rates := make([]float64, 0, circ.GateCount())
	ch := w.c.Noise.Chip
	for _, step := range circ.Steps {
		for _, g := range step {
			if ch == nil {
				rates = append(rates, w.c.Noise.GateError)
				continue
			}
			i, ok := ch.PairIndex(g.A, g.B)
			if !ok {
				panic(fmt.Sprintf("sampling: chip noise has no rate for the coupler %d-%d", g.A, g.B))
			}
			rates = append(rates, ch.Pair[i])
		}
	}
	return rates
}

// runNoisy is runFrom with, besides the two-qubit Paulis, the single-qubit
// errors s (nil for none).
func (c *Circuit) runNoisy(ctx context.Context, st *sim.State, from int, paulis []uint8, s *singleErrors, workers int, after func(done int)) bool {
	if st.Qubits != c.Qubits {
		panic(fmt.Sprintf("sampling: %d-qubit circuit on a %d-qubit state", c.Qubits, st.Qubits))
	}
	if paulis != nil && len(paulis) != c.GateCount() {
		panic(fmt.Sprintf("sampling: %d Pauli errors for %d gates", len(paulis), c.GateCount()))
	}
	k := 0
	for _, step := range c.Steps[:from] {
		k += len(step)
	}
	for t, step := range c.Steps[from:] {
		if ctx.Err() != nil {
			return false
		}
		for i := range step {
			g := &step[i]
			st.Apply2(g.A, g.B, &g.M, workers)
			if s != nil && s.gate != nil && s.gate[k] != 0 {
				st.Apply2(g.A, g.B, &s.mats[k][s.gate[k]], workers)
			}
			if paulis != nil && paulis[k] != 0 {
				st.Apply2(g.A, g.B, &pauliMatrices[paulis[k]], workers)
			}
			k++
		}
		if after != nil {
			after(from + t + 1)
		}
	}
	for q := range c.Final {
		st.Apply1(q, &c.Final[q], workers)
		if s != nil && s.final != nil && s.final[q] != 0 {
			st.Apply1(q, &onePauli[s.final[q]], workers)
		}
	}
	return true
}
