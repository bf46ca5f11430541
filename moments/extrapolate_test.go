package moments

import (
	"context"
	"errors"
	"math"
	"os"
	"slices"
	"testing"

	"mixdepth/circuits"
)

// extrapolateCheck predicts spec from members of at most maxQ qubits and
// checks, at every depth, that the stated uncertainty covers the exact
// value of the vector engine on spec itself (the independent method: the
// 2^n identity/swap vector, checked against brute force and published
// values in engine_test.go). It returns the prediction.
func extrapolateCheck(t *testing.T, spec string, maxQ int, depths []int) *Result {
	t.Helper()
	g, err := circuits.ParseGraph(spec)
	if err != nil {
		t.Fatal(err)
	}
	s, _ := circuits.NewSchedule(circuits.KindLayered, g)
	ctx := context.Background()
	p, err := Exact(ctx, g, s, circuits.Haar{}, depths, ExactCurveOnly(), ExactEngine(EngineExtrapolate), ExactExtrapolateQubits(maxQ))
	if err != nil {
		t.Fatal(err)
	}
	x, err := Exact(ctx, g, s, circuits.Haar{}, depths, ExactCurveOnly(), ExactEngine(EngineVector))
	if err != nil {
		t.Fatal(err)
	}
	if p.Engine != EngineExtrapolate || len(p.ExtrapolatedFrom) != 4 {
		t.Fatalf("%s: engine %q from %v", spec, p.Engine, p.ExtrapolatedFrom)
	}
	for i, d := range depths {
		dev := math.Abs(p.Ratio[i] - x.Ratio[i])
		if !(dev <= p.TruncationError[i]) {
			t.Errorf("%s depth %d: predicted %.8g ± %.2g, exact %.8g: off by %.2g", spec, d, p.Ratio[i], p.TruncationError[i], x.Ratio[i], dev)
		}
		if math.Abs(p.Collision[i]/p.HaarCollision-p.Ratio[i]) > 1e-12*p.Ratio[i] {
			t.Errorf("%s depth %d: Collision %g is not Ratio·Z_H", spec, d, p.Collision[i])
		}
	}
	t.Logf("%s from %v", spec, p.ExtrapolatedFrom)
	for i, d := range depths {
		t.Logf("depth %2d: predicted %.8f ± %.1e, exact %.8f, |error|/(R−1) %.1e", d, p.Ratio[i], p.TruncationError[i], x.Ratio[i], math.Abs(p.Ratio[i]-x.Ratio[i])/(x.Ratio[i]-1))
	}
	return p
}

// TestExtrapolateCovers: the stated uncertainty of the extrapolation
// covers the exact ratio at every depth 1..24 (the check of the engine's
// claim) on line:22 from line:12..18 and on the strip grid:3x7 from
// grid:3x3..3x6 (at most 18 qubits), the smaller analogues of the line:28
// check, which TestExtrapolateLarge makes outside the default run.
func TestExtrapolateCovers(t *testing.T) {
	depths := make([]int, 24)
	for i := range depths {
		depths[i] = i + 1
	}
	p := extrapolateCheck(t, "line:22", 18, depths)
	if want := []string{"line:12", "line:14", "line:16", "line:18"}; !slices.Equal(p.ExtrapolatedFrom, want) {
		t.Errorf("line:22 members %v, want %v", p.ExtrapolatedFrom, want)
	}
	extrapolateCheck(t, "grid:3x7", 18, depths)
}

// TestExtrapolateLarge is the check on line:28 predicted from
// members of at most 24 qubits, against the vector engine on 28 qubits
// (2 GiB, minutes on two cores), so it runs only with MIXDEPTH_HEAVY=1 and
// without -short. grid:5x6 is refused from 24 qubits (TestExtrapolateRefuses).
func TestExtrapolateLarge(t *testing.T) {
	if testing.Short() || os.Getenv("MIXDEPTH_HEAVY") == "" {
		t.Skip("set MIXDEPTH_HEAVY=1 (and no -short) for line:28 against the vector engine")
	}
	depths := make([]int, 24)
	for i := range depths {
		depths[i] = i + 1
	}
	extrapolateCheck(t, "line:28", 24, depths)
}

// TestExtrapolateMPS: two independent routes to a chain too long for the
// vector engine, the extrapolation from line:10..18 and the MPS at its
// default bond, agree on line:40 within the sum of their stated errors at
// every depth 1..30.
func TestExtrapolateMPS(t *testing.T) {
	g, _ := circuits.ParseGraph("line:40")
	s, _ := circuits.NewSchedule(circuits.KindLayered, g)
	depths := make([]int, 30)
	for i := range depths {
		depths[i] = i + 1
	}
	ctx := context.Background()
	p, err := Exact(ctx, g, s, circuits.Haar{}, depths, ExactCurveOnly(), ExactEngine(EngineExtrapolate), ExactExtrapolateQubits(18))
	if err != nil {
		t.Fatal(err)
	}
	m, err := Exact(ctx, g, s, circuits.Haar{}, depths, ExactCurveOnly(), ExactEngine(EngineMPS))
	if err != nil {
		t.Fatal(err)
	}
	for i, d := range depths {
		dev := math.Abs(p.Ratio[i] - m.Ratio[i])
		if !(dev <= p.TruncationError[i]+m.TruncationError[i]) {
			t.Errorf("depth %d: extrapolated %.8g ± %.2g, MPS %.8g ± %.2g", d, p.Ratio[i], p.TruncationError[i], m.Ratio[i], m.TruncationError[i])
		}
	}
}

// TestExtrapolateRefuses: graphs with no sequence of members, schedules the
// members do not share, per-coupler gate files and graphs too small to fit
// give an error wrapping ErrEngine.
func TestExtrapolateRefuses(t *testing.T) {
	ctx := context.Background()
	run := func(g *circuits.Graph, s circuits.Schedule, e circuits.Ensemble) error {
		maxQ := 12
		if g.Family == "grid" {
			maxQ = 24
		}
		_, err := Exact(ctx, g, s, e, []int{1, 2}, ExactCurveOnly(), ExactEngine(EngineExtrapolate), ExactExtrapolateQubits(maxQ))
		return err
	}
	layered := func(g *circuits.Graph) circuits.Schedule {
		s, _ := circuits.NewSchedule(circuits.KindLayered, g)
		return s
	}
	file, _ := circuits.NewGraph("chip.edges", 4, []circuits.Edge{{A: 0, B: 1}, {A: 1, B: 2}, {A: 2, B: 3}})
	random, _ := circuits.ParseGraph("regular:10,3")
	line, _ := circuits.ParseGraph("line:14")
	small, _ := circuits.ParseGraph("line:7")
	wide, _ := circuits.ParseGraph("grid:5x6")
	ring, _ := circuits.ParseGraph("ring:16")
	gs, err := circuits.NewGateSet("calibrated", complexGate(bruteGivens(0.3)), nil)
	if err != nil {
		t.Fatal(err)
	}
	gs.Couplers = []circuits.CouplerGate{{A: "1", B: "0", G: complexGate(&bruteCNOT)}}
	bound, err := gs.Bind(line)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name string
		g    *circuits.Graph
		s    circuits.Schedule
		e    circuits.Ensemble
	}{
		{"graph file", file, layered(file), circuits.Haar{}},
		{"random family", random, layered(random), circuits.Haar{}},
		{"random-edge schedule", line, &circuits.RandomEdge{Edges: line.Edges}, circuits.Haar{}},
		{"layout", line, &circuits.Layered{Classes: [][]circuits.Edge{line.Edges[:1], line.Edges[1:2]}}, circuits.Haar{}},
		{"per-coupler gates", line, layered(line), bound},
		{"too small", small, layered(small), circuits.Haar{}},
		// A strip of width 5 at least 5 long has 25 qubits: no members.
		{"grid:5x6 from 24 qubits", wide, layered(wide), circuits.Haar{}},
		{"ring", ring, layered(ring), circuits.Haar{}},
	} {
		if err := run(c.g, c.s, c.e); !errors.Is(err, ErrEngine) {
			t.Errorf("%s: %v, want an error wrapping ErrEngine", c.name, err)
		}
	}
}
