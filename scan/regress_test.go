package scan

import (
	"context"
	"flag"
	"fmt"
	"math"
	"path/filepath"
	"testing"

	"mixdepth/internal/golden"
)

var update = flag.Bool("update", false, "rewrite testdata/regress.json from the current code")

// regressRun is one small scan as stored in the golden file: the
// per-instance collision probability Z_U = Σ_x p_U(x)² of every record, in
// the order Run returns them.
type regressRun struct {
	Name      string
	Records   []string // "instance i, depth d" of each value, for the messages
	Collision []float64
}

// regressRuns runs the scans that TestRegress pins.
func regressRuns(t *testing.T) []regressRun {
	var runs []regressRun
	for _, c := range []struct {
		graph, schedule, gates string
		depths                 []int
	}{
		{"line:4", "layered", "haar", []int{1, 2, 4, 8}},
		{"grid:2x3", "layered", "clifford", []int{1, 3, 6}},
		{"ring:5", "layered", "cz+haar1", []int{1, 2, 5}},
		{"ring:5", "random-edge", "haar", []int{3, 10, 30}},
	} {
		cfg := config(t, c.graph, c.schedule, c.gates, c.depths, 1)
		cfg.Seed, cfg.Instances, cfg.Workers = 20261201, []int{0, 1, 7, 1000}, 2
		recs, _, err := Run(context.Background(), cfg)
		if err != nil {
			t.Fatal(err)
		}
		r := regressRun{Name: fmt.Sprintf("%s %s %s seed %d instances %v depths %v", c.graph, c.schedule, c.gates, cfg.Seed, cfg.Instances, c.depths)}
		for _, rec := range recs {
			r.Records = append(r.Records, fmt.Sprintf("instance %d, depth %d", rec.Instance, rec.Depth))
			r.Collision = append(r.Collision, rec.Collision)
		}
		runs = append(runs, r)
	}
	return runs
}

// TestRegress pins the collision probabilities of a few small scans at a
// fixed seed and instances, for the haar, clifford and cz+haar1 gate sets
// under both schedules, to 1e-12. It is a regression pin, in the manner of
// math/rand/v2's regress_test.go: the values in testdata/regress.json were
// produced by this code on purpose. It guards the whole path from seed to
// number (the random streams, the gate draws, the simulation and the
// readout): a change there would silently change every --resume of an older
// table, every merge of old and new parts and every pt-plot of an older
// table. circuits.TestRegress pins the streams and gates alone. Regenerate
// with go test ./scan/ -run TestRegress -update only for a deliberate,
// announced change.
//
// The tolerance: Z lies in [1/D, 1] with D ≤ 64 here; the golden file
// stores each value in its shortest round-trip form, and another compiler or
// architecture may reorder or fuse the floating-point operations of the
// simulation (errors of order 1e-15 after at most 30 gates), while a changed
// circuit moves Z by far more than 1e-12.
func TestRegress(t *testing.T) {
	got := regressRuns(t)
	var want []regressRun
	if !golden.Load(t, filepath.Join("testdata", "regress.json"), *update, got, &want) {
		return
	}
	if len(want) != len(got) {
		t.Fatalf("golden file has %d runs, the test computes %d: regenerate with -update after checking why", len(want), len(got))
	}
	for i, w := range want {
		g := got[i]
		if g.Name != w.Name || fmt.Sprint(g.Records) != fmt.Sprint(w.Records) {
			t.Errorf("run %q with records %v, pinned %q with %v", g.Name, g.Records, w.Name, w.Records)
			continue
		}
		for k, z := range w.Collision {
			if math.Abs(g.Collision[k]-z) > 1e-12 {
				t.Errorf("%s, %s: Z = %.17g, pinned %.17g", g.Name, g.Records[k], g.Collision[k], z)
			}
		}
	}
}
