package scan

import (
	"context"
	"testing"

	"mixdepth/circuits"
	"mixdepth/fixtures"
	"mixdepth/moments"
	"mixdepth/stats"
)

// TestCliffordNeverRecommended: random Clifford circuits prepare stabilizer
// states, whose output distribution is uniform on an affine subspace
// (Aaronson & Gottesman 2004, PRA 70, 052328), so their probabilities take
// only the values 0 and 2^−k and the Porter–Thomas distance stays far above
// the Haar baseline at any depth, whatever R does. On the demo chip no depth
// may be spread, and the distance must stay at least ten times the
// baseline (measured 0.56–0.65 against 0.0029 for D = 2^16, 12 instances).
func TestCliffordNeverRecommended(t *testing.T) {
	g, l := fixtures.DemoChip()
	ids := make([]int, 12)
	for i := range ids {
		ids[i] = i
	}
	cfg := &Config{Graph: g, Schedule: l.Schedule(), Ensemble: circuits.Clifford{}, Depths: []int{8, 20, 40},
		Instances: ids, Seed: 5, Workers: 2}
	recs, _, err := Run(context.Background(), cfg)
	if err != nil {
		t.Fatal(err)
	}
	c := Estimate(g.Qubits, recs, stats.DefaultCriteria(0.05, 0.95))
	for _, r := range c.Rows {
		t.Logf("depth %d: R %.4f [%.4f, %.4f], PT %.4f (Haar %.4f): %s", r.Depth, r.Ratio, r.Lower, r.Upper, r.KSMean, c.PTBaseline.Mean, r.Verdict)
		if r.Spread || r.KSMean < 10*c.PTBaseline.Mean {
			t.Errorf("Clifford depth %d: %s with PT distance %.4f (Haar %.4f)", r.Depth, r.Verdict, r.KSMean, c.PTBaseline.Mean)
		}
	}
	if c.Found {
		t.Errorf("Clifford circuits recommended at depth %d", c.Depth)
	}
}

// TestHaarLine8Depth: for Haar circuits on line:8 the recommended depth is
// the depth that the exact E[Z] gives (the first depth from which the exact
// R stays ≤ 1+eps; identity/swap engine, Hunter-Jones 2019,
// arXiv:1905.12053) within one step. 400 instances make the half-width of
// R's interval about 0.01 near R = 1.05, less than the step in R between
// neighbouring depths there (about 0.02, exact).
func TestHaarLine8Depth(t *testing.T) {
	depths := []int{6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 18, 20}
	cfg := config(t, "line:8", "layered", "haar", depths, 400)
	recs, _, err := Run(context.Background(), cfg)
	if err != nil {
		t.Fatal(err)
	}
	c := Estimate(cfg.Graph.Qubits, recs, stats.DefaultCriteria(0.05, 0.95))
	exact, err := moments.Exact(context.Background(), cfg.Graph, cfg.Schedule, cfg.Ensemble, depths, moments.ExactWorkers(1), moments.ExactCurveOnly())
	if err != nil {
		t.Fatal(err)
	}
	want := 0
	for k := len(depths) - 1; k >= 0 && exact.Ratio[k] <= 1.05; k-- {
		want = k
	}
	if !c.Found {
		t.Fatalf("no recommended depth: %+v", c.Rows)
	}
	got := 0
	for k, d := range depths {
		if d == c.Depth {
			got = k
		}
	}
	t.Logf("recommended depth %d, exact %d (exact R %.4f there)", c.Depth, depths[want], exact.Ratio[want])
	if got < want-1 || got > want+1 {
		t.Errorf("recommended depth %d, exact E[Z] gives %d", c.Depth, depths[want])
	}
}
