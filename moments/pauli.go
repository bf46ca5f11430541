package moments

import (
	"context"
	"fmt"
	"math"
	"math/bits"

	"mixdepth/circuits"
	"mixdepth/sim"
)

// The Pauli-support chain (Harrow & Low, "Random quantum
// circuits are approximate 2-designs", Commun. Math. Phys. 291, 257, 2009).
// Expand ρ = U|0⟩⟨0|U† = D⁻¹ Σ_P c_P P over Pauli strings. For an ensemble
// invariant under single-qubit unitaries only the diagonal terms E[c_P²] of
// E[ρ⊗ρ] survive, and a Haar U(4) twirl on (a, b) sends every non-identity
// pair Pauli to the uniform mixture of the 15 non-identity ones (Weingarten
// calculus, Collins 2003). The chain tracks w(A), the mass Σ E[c_P²] over the
// strings P with support A: on a gate the pattern 00 of (a, b) stays and the
// mass m of {01, 10, 11} goes m/5, m/5, 3m/5 to them. Since
// Z = Σ_x p(x)² = D⁻¹ Σ_{P ∈ {I,Z}^n} c_P², a support A is read out with the
// chance that its letters are all Z: 1/3 per touched qubit (its letter is
// uniform over X, Y, Z) and 1 per untouched one (its letter is still Z).
const (
	pauliToOne  = 1.0 / 5 // share of m sent to 01 and to 10
	pauliToBoth = 3.0 / 5 // share of m sent to 11
	// pauliFreshRead is what the difference Δ = Z_untouched − N reads out,
	// 1 − 1/3: see pauliRandomEdge.
	pauliFreshRead = 2.0 / 3
)

// PauliCollisionCurve returns the exact expected collision probability
// E[Z] = E Σ_x p_U(x)² of Haar U(4) random circuits after each of depths
// (ascending) steps of s on g, computed with the Pauli-support chain: a
// derivation independent of the identity/swap engine of CollisionCurve, for
// checking it. A layered schedule (*circuits.Layered) evolves the 2^n
// support masses gate by gate; a random-edge schedule (*circuits.RandomEdge)
// is averaged exactly over the edge of every gate, untouched qubits
// included (see pauliRandomEdge), which costs about 3^n·|E| operations per
// gate with at most two 2^n vectors in memory. Depth 0 gives 1. Cancelling
// ctx stops the work. It panics if g or s is nil.
//
// Readout, with T the touched qubits (Harrow & Low 2009):
//
//	E[Z] = D⁻¹ Σ_A w(A) 3^−|A∩T|
func PauliCollisionCurve(ctx context.Context, g *circuits.Graph, s circuits.Schedule, depths []int) ([]float64, error) {
	if g == nil || s == nil {
		panic("moments: PauliCollisionCurve with a nil graph or schedule")
	}
	n := g.Qubits
	if err := collisionCheckDepths(depths); err != nil {
		return nil, err
	}
	switch s := s.(type) {
	case *circuits.Layered:
		if err := pauliCheckLayered(n, s); err != nil {
			return nil, err
		}
		if err := sim.CheckMemory(8*math.Ldexp(1, n), fmt.Sprintf("the Pauli-support chain of %d qubits", n)); err != nil {
			return nil, err
		}
		return pauliLayered(ctx, n, s, depths)
	case *circuits.RandomEdge:
		if err := pauliCheckEdges(n, s.Edges); err != nil {
			return nil, err
		}
		if err := sim.CheckMemory(16*math.Ldexp(1, n), fmt.Sprintf("the Pauli-support chain of %d qubits", n)); err != nil {
			return nil, err
		}
		return pauliRandomEdge(ctx, n, s.Edges, depths)
	default:
		return nil, fmt.Errorf("moments: the Pauli-support chain has no method for schedule kind %q (%T)", s.Kind(), s)
	}
}

// pauliCheckEdges returns an error unless edges is non-empty and every edge
// joins two distinct qubits of 0..n−1.
func pauliCheckEdges(n int, edges []circuits.Edge) error {
	if len(edges) == 0 {
		return fmt.Errorf("moments: the schedule has no edges")
	}
	return collisionCheckEdges(n, edges)
}

// pauliCheckLayered returns an error unless l has at least one class and
// every gate is on a valid pair.
func pauliCheckLayered(n int, l *circuits.Layered) error {
	if len(l.Classes) == 0 {
		return fmt.Errorf("moments: the layered schedule has no layers")
	}
	for _, cl := range l.Classes {
		for _, e := range cl {
			if err := pauliCheckEdges(n, []circuits.Edge{e}); err != nil {
				return err
			}
		}
	}
	return nil
}

// pauliMaxDepth returns the last of the ascending depths, or 0.
func pauliMaxDepth(depths []int) int {
	if len(depths) == 0 {
		return 0
	}
	return depths[len(depths)-1]
}

// pauliLayered runs the chain along a layered schedule: the touched set is
// the same for every circuit, so the readout is exact with one 2^n vector.
func pauliLayered(ctx context.Context, n int, l *circuits.Layered, depths []int) ([]float64, error) {
	w := make([]float64, 1<<n)
	for i := range w {
		w[i] = 1 // |0…0⟩: c_P = 1 for each of the 2^n strings in {I,Z}^n
	}
	third := pauliPowers(n, 1.0/3)
	steps := pauliMaxDepth(depths)
	out := make([]float64, 0, len(depths))
	touched := 0
	var layer []circuits.Edge
	for d := 0; ; d++ {
		for len(out) < len(depths) && depths[len(out)] == d {
			var sum float64
			for a, v := range w {
				sum += v * third[bits.OnesCount(uint(a&touched))]
			}
			out = append(out, math.Ldexp(sum, -n))
		}
		if d == steps {
			return out, nil
		}
		if err := ctx.Err(); err != nil {
			return nil, fmt.Errorf("moments: Pauli-support chain stopped at layer %d of %d: %w", d, steps, err)
		}
		layer = l.Step(d, nil, layer[:0])
		for _, e := range layer {
			pauliGate(w, e.A, e.B)
			touched |= 1<<e.A | 1<<e.B
		}
	}
}

// pauliRandomEdge averages the chain exactly over a uniformly drawn edge per
// gate. The touched set is then random and correlated with the masses, so
// the readout of one averaged 2^n vector would not be exact. Instead, split
// the initial state of every qubit, I + Z with Z not yet spread, as
// I + N + Δ, where N is a touched non-identity letter (read out 1/3) and
// Δ = Z − N: a twirl treats Z and N alike, so any gate on a qubit kills its
// Δ part, which otherwise stays and reads out 1 − 1/3 = 2/3. Expanding the
// product over qubits, the terms with Δ on the set S survive exactly the
// gates that avoid S:
//
//	D·E[Z] = Σ_S (2/3)^|S| Σ_A 3^−|A| (K_S^t 1)(A),  K_S = |E|⁻¹ Σ_{e∩S=∅} C_e,
//
// with C_e the gate's map on the supports A ⊆ V∖S, all started at mass 1.
// This needs Σ_S 2^(n−|S|) = 3^n entries per averaged gate but only two 2^n
// vectors at a time. Qubits of V∖S that no surviving edge reaches keep their
// masses (I: 1, N: 1) and factor out as 1 + 1/3 each.
func pauliRandomEdge(ctx context.Context, n int, edges []circuits.Edge, depths []int) ([]float64, error) {
	steps := pauliMaxDepth(depths)
	out := make([]float64, len(depths))
	inv := 1 / float64(len(edges))
	third := pauliPowers(n, 1.0/3)
	fresh := pauliPowers(n, pauliFreshRead)
	idle := pauliPowers(n, 4.0/3)
	local := make([]int, n)
	var sub []circuits.Edge
	w := make([]float64, 0, 1<<n)
	y := make([]float64, 0, 1<<n)
	full := 1<<n - 1
	for set := 0; set <= full; set++ {
		if err := ctx.Err(); err != nil {
			return nil, fmt.Errorf("moments: Pauli-support chain stopped at Δ set %d of %d: %w", set, full+1, err)
		}
		// Qubits of V∖S on a surviving edge, renumbered 0..m−1.
		sub = sub[:0]
		reach := 0
		for _, e := range edges {
			if set>>e.A&1 == 0 && set>>e.B&1 == 0 {
				reach |= 1<<e.A | 1<<e.B
			}
		}
		m := 0
		for q := range n {
			if reach>>q&1 == 1 {
				local[q] = m
				m++
			}
		}
		for _, e := range edges {
			if reach>>e.A&1 == 1 && reach>>e.B&1 == 1 && set>>e.A&1 == 0 && set>>e.B&1 == 0 {
				sub = append(sub, circuits.Edge{A: local[e.A], B: local[e.B]})
			}
		}
		k := bits.OnesCount(uint(set))
		weight := fresh[k] * idle[n-k-m]
		if len(sub) == 0 {
			// Every gate touches S: the term lives only at depth 0, where the
			// m = 0 reachable qubits leave all n−k idle.
			for i, d := range depths {
				if d == 0 {
					out[i] += weight
				}
			}
			continue
		}
		w = w[:1<<m]
		y = y[:1<<m]
		for i := range w {
			w[i] = 1
		}
		next := 0
		for d := 0; ; d++ {
			for next < len(depths) && depths[next] == d {
				var sum float64
				for a, v := range w {
					sum += v * third[bits.OnesCount(uint(a))]
				}
				out[next] += weight * sum
				next++
			}
			if d == steps {
				break
			}
			if d%256 == 255 {
				if err := ctx.Err(); err != nil {
					return nil, fmt.Errorf("moments: Pauli-support chain stopped at Δ set %d of %d: %w", set, full+1, err)
				}
			}
			clear(y)
			for _, e := range sub {
				pauliGateAdd(y, w, e.A, e.B)
			}
			for i := range y {
				w[i] = y[i] * inv // gates touching S contribute 0
			}
		}
	}
	for i := range out {
		out[i] = math.Ldexp(out[i], -n)
	}
	return out, nil
}

// pauliPowers returns x^0, …, x^n.
func pauliPowers(n int, x float64) []float64 {
	p := make([]float64, n+1)
	p[0] = 1
	for i := 1; i <= n; i++ {
		p[i] = p[i-1] * x
	}
	return p
}

// pauliGate applies the Haar twirl on (a, b) to the support masses w in place.
func pauliGate(w []float64, a, b int) {
	ma, mb := 1<<a, 1<<b
	lo, hi := min(ma, mb), max(ma, mb)
	for base := 0; base < len(w); base += 2 * hi {
		for mid := base; mid < base+hi; mid += 2 * lo {
			for i := mid; i < mid+lo; i++ {
				m := w[i|ma] + w[i|mb] + w[i|ma|mb]
				w[i|ma] = m * pauliToOne
				w[i|mb] = m * pauliToOne
				w[i|ma|mb] = m * pauliToBoth
			}
		}
	}
}

// pauliGateAdd adds the Haar twirl on (a, b) of the masses w to y.
func pauliGateAdd(y, w []float64, a, b int) {
	ma, mb := 1<<a, 1<<b
	lo, hi := min(ma, mb), max(ma, mb)
	for base := 0; base < len(w); base += 2 * hi {
		for mid := base; mid < base+hi; mid += 2 * lo {
			for i := mid; i < mid+lo; i++ {
				m := w[i|ma] + w[i|mb] + w[i|ma|mb]
				y[i] += w[i]
				y[i|ma] += m * pauliToOne
				y[i|mb] += m * pauliToOne
				y[i|ma|mb] += m * pauliToBoth
			}
		}
	}
}
