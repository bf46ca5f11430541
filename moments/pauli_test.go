package moments

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"mixdepth/circuits"
)

func pauliTestSchedules(t *testing.T, g *circuits.Graph) map[circuits.ScheduleKind]circuits.Schedule {
	t.Helper()
	out := map[circuits.ScheduleKind]circuits.Schedule{}
	for _, kind := range circuits.Schedules {
		s, err := circuits.NewSchedule(kind, g)
		if err != nil {
			t.Fatal(err)
		}
		out[kind] = s
	}
	return out
}

// TestPauliOneGate: one Haar gate on two qubits leaves a Haar-random state,
// whose collision probability is Z_H = 2/(D+1) = 2/5 for D = 4 (Dalzell, Hunter-Jones, Brandão 2022;
// the Haar moments E[p²] = 2/(D(D+1))). Any number of gates on the same
// pair is again Haar. Depth 0 is |00⟩, Z = 1.
func TestPauliOneGate(t *testing.T) {
	g := denseGraph(t, "line:2")
	for kind, s := range pauliTestSchedules(t, g) {
		got, err := PauliCollisionCurve(context.Background(), g, s, []int{0, 1, 2, 7})
		if err != nil {
			t.Fatal(err)
		}
		for i, want := range []float64{1, 0.4, 0.4, 0.4} {
			// Tolerance: a handful of rounded operations on numbers ≤ 1.
			if math.Abs(got[i]-want) > 1e-15 {
				t.Errorf("%s: E[Z] at depth index %d = %v, want %v", kind, i, got[i], want)
			}
		}
	}
}

// TestPauliUntouchedByHand checks the readout of untouched qubits on
// line:3 against values derived by hand from the chain's rules.
//   - Layered, one layer: gate (0,1) only; qubit 2 is still |0⟩, so
//     E[Z] = Z_H(4)·1 = 2/5.
//   - Random-edge, one gate: either edge leaves one qubit at |0⟩: 2/5.
//   - Random-edge, two gates: the same edge twice is again Haar on a pair
//     (2/5); gates (0,1) then (1,2) give masses w(∅)=1, w{0}=3/5,
//     w{1}=w{2}=w{1,2}/3=11/25, w{0,1}=w{0,2}=w{0,1,2}/3=21/25, so
//     8·E[Z] = 1 + 3·11/75 + 1/5 + 3·7/75 = 48/25 and E[Z] = 6/25, likewise
//     for the mirror order; the mean is (2/5+2/5+6/25+6/25)/4 = 8/25.
//
// The naive readout D⁻¹ Σ_A w(A)/3^|A| of the averaged chain would give
// other values at these depths (4/15 after one random-edge gate).
func TestPauliUntouchedByHand(t *testing.T) {
	g := denseGraph(t, "line:3")
	ss := pauliTestSchedules(t, g)
	cases := []struct {
		kind  circuits.ScheduleKind
		depth int
		want  float64
	}{
		{"layered", 1, 2.0 / 5},
		{"layered", 2, 6.0 / 25},
		{"random-edge", 1, 2.0 / 5},
		{"random-edge", 2, 8.0 / 25},
	}
	for _, c := range cases {
		got, err := PauliCollisionCurve(context.Background(), g, ss[c.kind], []int{c.depth})
		if err != nil {
			t.Fatal(err)
		}
		// Tolerance: tens of rounded operations on numbers ≤ 1.
		if math.Abs(got[0]-c.want) > 1e-15 {
			t.Errorf("%s depth %d: E[Z] = %.17g, want %.17g", c.kind, c.depth, got[0], c.want)
		}
	}
}

// TestPauliVsDense compares the chain with the dense 16^n Weingarten
// operator (Collins 2003) on every graph of at most three qubits, at every
// depth up to 8 including those shorter than one layered cycle, and on an
// explicit three-layer layout.
func TestPauliVsDense(t *testing.T) {
	type run struct {
		name string
		g    *circuits.Graph
		s    circuits.Schedule
	}
	var runs []run
	for _, spec := range []string{"line:2", "line:3", "ring:3", "star:3"} {
		g := denseGraph(t, spec)
		for kind, s := range pauliTestSchedules(t, g) {
			runs = append(runs, run{spec + " " + string(kind), g, s})
		}
	}
	tri := denseGraph(t, "ring:3")
	runs = append(runs, run{"layout (1,2) (0,2) (0,1)", tri, &circuits.Layered{Classes: [][]circuits.Edge{{{A: 1, B: 2}}, {{A: 2, B: 0}}, {{A: 0, B: 1}}}}})
	depths := []int{0, 1, 2, 3, 4, 5, 6, 7, 8}
	for _, r := range runs {
		got, err := PauliCollisionCurve(context.Background(), r.g, r.s, depths)
		if err != nil {
			t.Fatal(err)
		}
		for i, d := range depths {
			var want float64
			switch s := r.s.(type) {
			case *circuits.Layered:
				want = denseLayeredCollision(r.g.Qubits, s, d)
			case *circuits.RandomEdge:
				want = denseRandomCollision(r.g.Qubits, s.Edges, d)
			}
			// Tolerance: both are exact evaluations; rounding of a few
			// hundred operations on numbers ≤ 1.
			if !scalar.EqualWithinAbsOrRel(got[i], want, 1e-14, 1e-13) {
				t.Errorf("%s depth %d: chain %.17g, dense %.17g", r.name, d, got[i], want)
			}
		}
	}
}

// TestPauliDeepHaar: deep circuits are 2-designs, so E[Z] tends to the Haar
// value 2/(D+1) (Dalzell, Hunter-Jones, Brandão 2022; Harrow & Low 2009). The distance decays as
// λ₂^t: for the random-edge schedule on these graphs λ₂ ≤ 0.94 (the values
// of SpectralGap, which gap_test.go checks against EigenSym), so after 1500
// gates it is below 0.94^1500 ≈ 1e-40 times a prefactor of order D; a layer
// of a layered schedule contracts faster still. The tolerance, 1e-12
// relative, is then rounding only.
func TestPauliDeepHaar(t *testing.T) {
	for _, spec := range []string{"line:6", "ring:5", "grid:2x3", "star:5", "complete:4"} {
		g := denseGraph(t, spec)
		zh := 2 / (math.Ldexp(1, g.Qubits) + 1)
		for kind, s := range pauliTestSchedules(t, g) {
			depth := 120
			if kind == "random-edge" {
				depth = 1500
			}
			got, err := PauliCollisionCurve(context.Background(), g, s, []int{depth})
			if err != nil {
				t.Fatal(err)
			}
			if !scalar.EqualWithinRel(got[0], zh, 1e-12) {
				t.Errorf("%s %s depth %d: E[Z] = %.17g, want 2/(D+1) = %.17g", spec, kind, depth, got[0], zh)
			}
		}
	}
}

// TestPauliRandomMonotone: on random connected graphs the random-edge
// average lies between the Haar value and 1 and does not increase with
// depth. Derived by hand: the initial two-copy state is r/2^n plus
// off-diagonal two-copy Paulis (r the diagonal readout vector, 1 on (I,I)
// and (Z,Z) per qubit), and the averaged channel M never maps those onto the
// diagonal, so E[Z](t) = 2^−n ⟨r, M^t r⟩ with M a mean of orthogonal
// projectors, 0 ≤ M ≤ 1 (Collins 2003): non-increasing in t, and at least
// its value on the fixed space, Z_H.
func TestPauliRandomMonotone(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for _, n := range []int{4, 6, 8} {
		g := denseRandomGraph(t, rng, n, n/2)
		depths := []int{0, 2, 4, 8, 16, 32}
		got, err := PauliCollisionCurve(context.Background(), g, &circuits.RandomEdge{Edges: g.Edges}, depths)
		if err != nil {
			t.Fatal(err)
		}
		zh := 2 / (math.Ldexp(1, n) + 1)
		for i := range got {
			if got[i] < zh*(1-1e-12) || got[i] > 1+1e-12 {
				t.Errorf("n=%d depth %d: E[Z] = %v outside [Z_H, 1]", n, depths[i], got[i])
			}
			if i > 0 && got[i] > got[i-1]*(1+1e-12) {
				t.Errorf("n=%d: E[Z] rose from %v to %v between depths %d and %d", n, got[i-1], got[i], depths[i-1], depths[i])
			}
		}
	}
}

// TestPauliErrors covers the data errors.
func TestPauliErrors(t *testing.T) {
	g := denseGraph(t, "line:3")
	ctx := context.Background()
	if _, err := PauliCollisionCurve(ctx, g, &circuits.RandomEdge{Edges: g.Edges}, []int{2, 1}); err == nil {
		t.Error("descending depths: no error")
	}
	if _, err := PauliCollisionCurve(ctx, g, &circuits.RandomEdge{Edges: g.Edges}, []int{-1}); err == nil {
		t.Error("negative depth: no error")
	}
	if _, err := PauliCollisionCurve(ctx, g, &circuits.Layered{Classes: [][]circuits.Edge{{{A: 0, B: 3}}}}, []int{1}); err == nil {
		t.Error("gate outside the graph: no error")
	}
	cancelled, cancel := context.WithCancel(ctx)
	cancel()
	if _, err := PauliCollisionCurve(cancelled, g, &circuits.RandomEdge{Edges: g.Edges}, []int{3}); err == nil {
		t.Error("cancelled context: no error")
	}
}
