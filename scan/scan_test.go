package scan

import (
	"context"
	"errors"
	"math"
	"testing"

	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/stats"
)

func config(t *testing.T, spec, schedule, gates string, depths []int, instances int) *Config {
	t.Helper()
	g, err := circuits.ParseGraph(spec)
	if err != nil {
		t.Fatal(err)
	}
	s, err := circuits.NewSchedule(circuits.ScheduleKind(schedule), g)
	if err != nil {
		t.Fatal(err)
	}
	e, err := circuits.NewEnsemble(gates)
	if err != nil {
		t.Fatal(err)
	}
	ids := make([]int, instances)
	for i := range ids {
		ids[i] = i
	}
	return &Config{Graph: g, Schedule: s, Ensemble: e, Depths: depths, Instances: ids, Seed: 3, Workers: 2}
}

// TestRunMatchesExact: the Monte Carlo mean collision probability agrees with
// the exact second-moment engine (an independent derivation: Hunter-Jones 2019, arXiv:1905.12053)
// within 4 standard errors, on line, ring, grid and star graphs, for both
// schedules and for an entangler gate set with its final single-qubit layer.
// Four standard errors leave a false-alarm rate of about 6e-5 per comparison
// (normal tail), and the seed is fixed.
func TestRunMatchesExact(t *testing.T) {
	cases := []struct {
		graph, schedule, gates string
		depths                 []int
	}{
		{"line:6", "layered", "haar", []int{1, 2, 4, 8}},
		{"ring:5", "layered", "haar", []int{1, 2, 3, 6}},
		{"grid:2x3", "layered", "haar", []int{1, 3, 6}},
		{"star:5", "layered", "haar", []int{1, 4, 8}},
		{"line:5", "random-edge", "haar", []int{1, 3, 10, 30}},
		{"line:5", "layered", "cz+haar1", []int{1, 2, 5, 10}},
		{"grid:2x2", "layered", "iswap+haar1", []int{1, 3, 6}},
		{"ring:4", "layered", "clifford", []int{1, 2, 6}},
		{"line:4", "random-edge", "cz+haar1", []int{1, 2, 5, 12}},
		{"complete:5", "random-edge", "sqrt-iswap+haar1", []int{1, 3, 8}},
	}
	for _, c := range cases {
		t.Run(c.graph+"/"+c.schedule+"/"+c.gates, func(t *testing.T) {
			cfg := config(t, c.graph, c.schedule, c.gates, c.depths, 3000)
			recs, done, err := Run(context.Background(), cfg)
			if err != nil || len(done) != 3000 {
				t.Fatalf("Run: %v (%d done)", err, len(done))
			}
			sum := Estimate(cfg.Graph.Qubits, recs, stats.DefaultCriteria(0.05, 0.95))
			exact, err := moments.Exact(context.Background(), cfg.Graph, cfg.Schedule, cfg.Ensemble, c.depths, moments.ExactWorkers(1), moments.ExactCurveOnly())
			if err != nil {
				t.Fatal(err)
			}
			for k, row := range sum.Rows {
				dev := (row.Collision.Mean - exact.Collision[k]) / row.Collision.StdErr
				if math.Abs(dev) > 4 {
					t.Errorf("depth %d: Monte Carlo %.6g ± %.2g vs exact %.6g (%.1f s.e.)",
						row.Depth, row.Collision.Mean, row.Collision.StdErr, exact.Collision[k], dev)
				}
			}
		})
	}
}

// TestRunWorkersAndDepths: the records of an instance depend only on
// (seed, instance) — not on the worker count — and reading out an extra
// depth (which applies and undoes a final single-qubit layer) leaves later
// depths unchanged up to rounding (each instance draws only from the stream of (seed, i)).
func TestRunWorkersAndDepths(t *testing.T) {
	for _, gates := range []string{"haar", "cz+haar1"} {
		a := config(t, "grid:2x3", "layered", gates, []int{2, 4, 7}, 10)
		a.Workers = 1
		b := config(t, "grid:2x3", "layered", gates, []int{2, 4, 7}, 10)
		b.Workers = 3
		c := config(t, "grid:2x3", "layered", gates, []int{7}, 10)
		ra, _, _ := Run(context.Background(), a)
		rb, _, _ := Run(context.Background(), b)
		rc, _, _ := Run(context.Background(), c)
		for i := range ra {
			if ra[i] != rb[i] {
				t.Fatalf("%s: workers 1 and 3 differ at %d: %+v vs %+v", gates, i, ra[i], rb[i])
			}
		}
		// rc holds depth 7 only; it is the last third of ra.
		for i, r := range rc {
			q := ra[20+i]
			// Rounding of the undo: each of 6 single-qubit passes and its
			// inverse perturbs amplitudes by a few ulp, far below 1e-12.
			if q.Instance != r.Instance || math.Abs(q.Collision-r.Collision) > 1e-12*r.Collision || math.Abs(q.KS-r.KS) > 1e-9 {
				t.Errorf("%s instance %d: depth 7 depends on the other depths read: %v vs %v", gates, r.Instance, q, r)
			}
		}
	}
}

// TestRunCancelled: a cancelled run returns only whole instances and
// context.Canceled.
func TestRunCancelled(t *testing.T) {
	cfg := config(t, "line:8", "layered", "haar", []int{1, 5}, 50)
	ctx, cancel := context.WithCancel(context.Background())
	calls := 0
	cfg.Workers = 1
	cfg.Progress = func() {
		calls++
		if calls == 7 {
			cancel()
		}
	}
	recs, done, err := Run(ctx, cfg)
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("err = %v, want context.Canceled", err)
	}
	if len(done) < 7 || len(done) == 50 || len(recs) != 2*len(done) {
		t.Fatalf("%d done, %d records", len(done), len(recs))
	}
	for k, r := range recs {
		if r.Instance != done[k%len(done)] {
			t.Fatalf("records not ordered by depth then instance: %+v", r)
		}
	}
}

// TestEstimate checks the per-depth summary on hand-made records.
func TestEstimate(t *testing.T) {
	// Two qubits: Z_H = 2/5. Depth 3 listed before depth 1 must come out
	// sorted; depth 2 has too few instances for an interval.
	var recs []Record
	for i := range stats.MinIntervalValues {
		recs = append(recs, Record{Depth: 3, GateCount: 3, Instance: i, Collision: 0.40, KS: 0.1})
	}
	recs = append(recs, Record{Depth: 2, GateCount: 2, Collision: 0.40, KS: 0.1}, Record{Depth: 2, GateCount: 2, Instance: 1, Collision: 0.40, KS: 0.1})
	for i := range stats.MinIntervalValues {
		recs = append(recs, Record{Depth: 1, GateCount: 1, Instance: i, Collision: 0.5 + 0.2*float64(i%2), KS: 0.2 + 0.2*float64(i%2)})
	}
	s := Estimate(2, recs, stats.DefaultCriteria(0.05, 0.95))
	if s.HaarCollision != 0.4 || len(s.Rows) != 3 || s.Rows[0].Depth != 1 || s.Rows[2].Depth != 3 {
		t.Fatalf("summary %+v", s)
	}
	if r := s.Rows[0]; math.Abs(r.Ratio-1.5) > 1e-15 || math.Abs(r.KSMean-0.3) > 1e-15 || r.Spread || r.Verdict != stats.VerdictShallow {
		t.Errorf("depth 1 row %+v", r)
	}
	if r := s.Rows[1]; r.HasInterval || r.Verdict != stats.VerdictUnresolved {
		t.Errorf("depth 2 row %+v", r)
	}
	// Depth 3: zero spread, so the interval collapses onto R = 1, and the
	// PT distance 0.1 is below the baseline of D = 4 (about 0.31). The mean
	// of ten equal values is exact to rounding (1e-15).
	if r := s.Rows[2]; math.Abs(r.Upper-1) > 1e-15 || math.Abs(r.Lower-1) > 1e-15 || !r.Spread || !s.Found || s.Depth != 3 {
		t.Errorf("depth 3 row %+v, found %v depth %d, baseline %+v", r, s.Found, s.Depth, s.PTBaseline)
	}
}
