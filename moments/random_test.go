package moments

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"mixdepth/circuits"
)

// bruteEnsembles are the gate ensembles of the brute-force checks: Haar
// U(4), and CNOT and a partial entangler dressed with single-qubit Haar
// gates on both sides, whose transfers have negative entries. The engine's
// transfer of a dressed gate is derived from dense traces (bruteTransfer),
// the brute force applies the gate itself.
func bruteEnsembles(t *testing.T) []struct {
	name  string
	gate  bruteGate
	trans Transfer
} {
	cnot := bruteDressed(&bruteCNOT)
	givens := bruteDressed(bruteGivens(0.7))
	return []struct {
		name  string
		gate  bruteGate
		trans Transfer
	}{
		{"haar", bruteHaar, HaarTransfer},
		{"cnot", cnot, bruteTransfer(t, cnot)},
		{"givens", givens, bruteTransfer(t, givens)},
	}
}

// TestCollisionLayeredBruteForce compares the layered engine with the dense
// two-copy operator evolved by Weingarten twirls (Collins, IMRN 2003) for
// n ≤ 4, including depths shorter than one cycle of the classes, where some
// qubits are still untouched. Tolerance 1e-12: both sides round about 1e4
// operations on numbers of order 1.
func TestCollisionLayeredBruteForce(t *testing.T) {
	layout := &circuits.Layered{Classes: [][]circuits.Edge{{{A: 1, B: 2}}, {{A: 3, B: 0}, {A: 1, B: 2}}, {{A: 2, B: 0}}}}
	for _, ens := range bruteEnsembles(t) {
		for _, tc := range []struct {
			spec  string
			sched *circuits.Layered
			max   int
		}{
			{"line:3", nil, 3},
			{"ring:3", nil, 3},
			{"line:4", nil, 3},
			{"star:4", nil, 4},
			{"complete:4", nil, 3},
			{"grid:2x2", nil, 3},
			{"layout", layout, 4},
		} {
			var g *circuits.Graph
			var s *circuits.Layered
			if tc.sched != nil {
				var err error
				g, err = circuits.NewGraph("layout", 4, []circuits.Edge{{A: 1, B: 2}, {A: 3, B: 0}, {A: 2, B: 0}})
				if err != nil {
					t.Fatal(err)
				}
				s = tc.sched
			} else {
				g = engineGraph(t, tc.spec)
				s = &circuits.Layered{Classes: circuits.LayeredClasses(g)}
			}
			depths := make([]int, tc.max+1)
			for d := range depths {
				depths[d] = d
			}
			got, err := CollisionCurve(context.Background(), g, s, &ens.trans, depths, 1)
			if err != nil {
				t.Fatal(err)
			}
			for d := range depths {
				want := bruteLayered(g.Qubits, s, ens.gate, d)
				if math.Abs(got[d]-want) > 1e-12 {
					t.Errorf("%s %s depth %d: engine %.15g, brute force %.15g", ens.name, tc.spec, d, got[d], want)
				}
			}
		}
	}
}

// TestCollisionRandomEdgeBruteForce compares the three-state random-edge
// engine with the exact average over all |E|^t equally likely edge
// sequences, each evolved densely by Weingarten twirls (Collins, IMRN 2003).
// Tolerance 1e-12 as for the layered check.
func TestCollisionRandomEdgeBruteForce(t *testing.T) {
	for _, ens := range bruteEnsembles(t) {
		for _, tc := range []struct {
			spec string
			max  int
		}{
			{"line:3", 4},
			{"line:4", 3},
			{"star:4", 3},
			{"ring:4", 3},
		} {
			g := engineGraph(t, tc.spec)
			depths := make([]int, tc.max+1)
			for d := range depths {
				depths[d] = d
			}
			got, err := CollisionCurve(context.Background(), g, &circuits.RandomEdge{Edges: g.Edges}, &ens.trans, depths, 1)
			if err != nil {
				t.Fatal(err)
			}
			for d := range depths {
				want := bruteRandomEdge(g.Qubits, g.Edges, ens.gate, d)
				if math.Abs(got[d]-want) > 1e-12 {
					t.Errorf("%s %s depth %d: engine %.15g, brute force %.15g", ens.name, tc.spec, d, got[d], want)
				}
			}
		}
	}
	// The complete graph through the reduction, and a reversed edge list
	// through the three-state engine with an asymmetric orientation.
	g := engineGraph(t, "complete:3")
	got, err := CollisionCurve(context.Background(), g, &circuits.RandomEdge{Edges: g.Edges}, &HaarTransfer, []int{0, 1, 2, 3, 4}, 1)
	if err != nil {
		t.Fatal(err)
	}
	for d, v := range got {
		if want := bruteRandomEdge(3, g.Edges, bruteHaar, d); math.Abs(v-want) > 1e-12 {
			t.Errorf("complete:3 depth %d: reduction %.15g, brute force %.15g", d, v, want)
		}
	}
}

// TestCollisionRandomEdgeThreeState compares the subset decomposition used
// by CollisionCurve with the three-state reference engine, a different
// exact derivation (local states {I, S, F}), on graphs of 5 to 7 qubits, for
// Haar, dressed CNOT and an arbitrary asymmetric transfer with negative
// entries. Tolerance 1e-12: both round about 1e4 operations per coefficient
// on values at most 1.
func TestCollisionRandomEdgeThreeState(t *testing.T) {
	cnot := bruteTransfer(t, bruteDressed(&bruteCNOT))
	asym := Transfer{{0.9, 0.3, -0.2, 0.1}, {0.05, -0.1, 0.2, 0.3}, {0.1, 0.2, 0.15, -0.05}, {0.02, 0.4, 0.3, 0.8}}
	depths := []int{0, 1, 2, 5, 10, 30, 60}
	for _, tc := range []struct {
		spec string
		name string
		tr   *Transfer
	}{
		{"line:6", "haar", &HaarTransfer},
		{"ring:5", "cnot", &cnot},
		{"grid:2x3", "asym", &asym},
		{"star:6", "haar", &HaarTransfer},
		{"complete:5", "asym", &asym},
		{"grid:2x3", "haar", &HaarTransfer},
		{"ring:7", "haar", &HaarTransfer},
	} {
		g := engineGraph(t, tc.spec)
		got, err := CollisionCurve(context.Background(), g, &circuits.RandomEdge{Edges: g.Edges}, tc.tr, depths, 2)
		if err != nil {
			t.Fatal(err)
		}
		r, err := newThreeState(g.Qubits, g.Edges, tc.tr, 1)
		if err != nil {
			t.Fatal(err)
		}
		d := 0
		for i, depth := range depths {
			for ; d < depth; d++ {
				r.step()
			}
			if want := r.collision(); math.Abs(got[i]-want) > 1e-12 {
				t.Errorf("%s %s depth %d: subsets %.15g, three-state %.15g", tc.spec, tc.name, depth, got[i], want)
			}
		}
	}
}

// TestCollisionRandomEdgeWorkers: the subset sums are kept in fixed blocks,
// so the result is bit-for-bit the same for any worker count; so is the
// three-state reference split across goroutines (3^11 coefficients).
func TestCollisionRandomEdgeWorkers(t *testing.T) {
	g := engineGraph(t, "grid:3x4")
	s := &circuits.RandomEdge{Edges: g.Edges}
	var calls, last, total int
	a, err := CollisionCurve(context.Background(), g, s, &HaarTransfer, []int{3, 8}, 1,
		CollisionProgress(func(done, all int) { calls++; last, total = done, all }))
	if err != nil {
		t.Fatal(err)
	}
	if calls == 0 || last != total {
		t.Errorf("progress: %d calls, last %d of %d", calls, last, total)
	}
	b, err := CollisionCurve(context.Background(), g, s, &HaarTransfer, []int{3, 8}, 3)
	if err != nil {
		t.Fatal(err)
	}
	if a[0] != b[0] || a[1] != b[1] {
		t.Errorf("1 worker %v, 3 workers %v", a, b)
	}
	gl := engineGraph(t, "line:11")
	var z [2]float64
	for i, w := range []int{1, 3} {
		r, err := newThreeState(11, gl.Edges, &HaarTransfer, w)
		if err != nil {
			t.Fatal(err)
		}
		for range 3 {
			r.step()
		}
		z[i] = r.collision()
	}
	if z[0] != z[1] {
		t.Errorf("three-state: serial %v, parallel %v", z[0], z[1])
	}
}

// TestCollisionCurveErrors: bad data gives errors with the package prefix;
// a cancelled context stops the work.
func TestCollisionCurveErrors(t *testing.T) {
	g := engineGraph(t, "line:4")
	ctx := context.Background()
	for name, tc := range map[string]struct {
		s      circuits.Schedule
		depths []int
	}{
		"descending": {&circuits.RandomEdge{Edges: g.Edges}, []int{3, 1}},
		"negative":   {&circuits.RandomEdge{Edges: g.Edges}, []int{-1}},
		"range":      {&circuits.RandomEdge{Edges: []circuits.Edge{{A: 0, B: 4}}}, []int{1}},
		"self-loop":  {&circuits.Layered{Classes: [][]circuits.Edge{{{A: 2, B: 2}}}}, []int{1}},
		"no layers":  {&circuits.Layered{}, []int{1}},
		"no edges":   {&circuits.RandomEdge{}, []int{1}},
		"kind":       {otherSchedule{&circuits.RandomEdge{Edges: g.Edges}}, []int{1}},
	} {
		_, err := CollisionCurve(ctx, g, tc.s, &HaarTransfer, tc.depths, 1)
		if err == nil || !strings.HasPrefix(err.Error(), "moments: ") {
			t.Errorf("%s: error %v, want a moments: error", name, err)
		}
	}
	cctx, cancel := context.WithCancel(ctx)
	cancel()
	for _, kind := range circuits.Schedules {
		_, err := CollisionCurve(cctx, g, engineSchedule(t, kind, g), &HaarTransfer, []int{5}, 1)
		if !errors.Is(err, context.Canceled) {
			t.Errorf("%s with a cancelled context: %v, want context.Canceled", kind, err)
		}
	}
	gc := engineGraph(t, "complete:6")
	if _, err := CollisionCurve(cctx, gc, engineSchedule(t, "random-edge", gc), &HaarTransfer, []int{5}, 1); !errors.Is(err, context.Canceled) {
		t.Errorf("complete graph with a cancelled context: %v, want context.Canceled", err)
	}
	var calls, last int
	progress := CollisionProgress(func(done, total int) { calls++; last = done; _ = total })
	if _, err := CollisionCurve(ctx, g, engineSchedule(t, "layered", g), &HaarTransfer, []int{2, 7}, 1, progress); err != nil {
		t.Fatal(err)
	}
	if calls != 7 || last != 7 {
		t.Errorf("progress called %d times, last done %d; want 7, 7", calls, last)
	}
}

type otherSchedule struct{ *circuits.RandomEdge }

func (otherSchedule) Kind() circuits.ScheduleKind { return "other" }
