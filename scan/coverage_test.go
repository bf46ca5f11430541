package scan

import (
	"context"
	"fmt"
	"math"
	"testing"

	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/sim"
	"mixdepth/stats"
)

// collisions returns Z_U at depth d of instances 0..count−1 of cfg, gate by
// gate with sim.State.Apply2: the same circuits as Run for an ensemble
// without a final layer (TestRunMatchesExact checks Run itself), without
// Run's per-instance buffers, so that many thousand small scans stay fast.
func collisions(t *testing.T, cfg *Config, d, count int) []float64 {
	t.Helper()
	st, err := sim.NewState(cfg.Graph.Qubits, 0)
	if err != nil {
		t.Fatal(err)
	}
	z := make([]float64, count)
	var gates []circuits.Gate
	var probs []float64
	for id := range z {
		st.Reset()
		b := circuits.NewBuilder(cfg.Schedule, cfg.Ensemble, cfg.Seed, id)
		for range d {
			gates = b.Next(gates[:0])
			for i := range gates {
				st.Apply2(gates[i].A, gates[i].B, &gates[i].M, 1)
			}
		}
		probs = st.Probabilities(probs, 1)
		z[id] = stats.Collision(probs)
	}
	return z
}

// TestIntervalCoverage measures the coverage of R's interval (the BCa
// bootstrap of stats.MeanIntervalBCa) over many independent small scans of
// graphs whose exact E[Z] is known (moments.Exact, the identity/swap engine:
// Hunter-Jones 2019, arXiv:1905.12053). The scans are disjoint blocks of
// instance ids of one run: instance streams depend only on (seed, id), so
// the blocks are independent scans. A 95% interval must cover the exact
// value in 95% of the scans; with reps repetitions the measured coverage
// has a binomial standard error √(0.95·0.05/reps), 0.69 points at 1000
// repetitions, so the 3-point tolerance of the issue is more than 4
// standard errors of the measurement and a failure is the interval's.
func TestIntervalCoverage(t *testing.T) {
	const conf = 0.95
	depths := []int{4} // R ≈ 1.3 on both graphs: Z is skewed across instances
	sizes := []int{10, 30, 200}
	reps := []int{1000, 1000, 500}
	tol := 3.0
	if raceEnabled {
		reps = []int{100, 100, 50} // standard error up to 3.1 points: the race run checks the plumbing, with a 10-point tolerance
		tol = 10
	}
	for _, graph := range []string{"line:6", "grid:2x3"} {
		total := 0
		for j, n := range sizes {
			total += n * reps[j]
		}
		cfg := config(t, graph, "layered", "haar", depths, 1)
		cfg.Seed = 11
		exact, err := moments.Exact(context.Background(), cfg.Graph, cfg.Schedule, cfg.Ensemble, depths, moments.ExactWorkers(1), moments.ExactCurveOnly())
		if err != nil {
			t.Fatal(err)
		}
		for k, d := range depths {
			z := collisions(t, cfg, d, total)
			off := 0
			for j, n := range sizes {
				covered := 0
				for range reps[j] {
					lo, hi, ok := stats.MeanIntervalBCa(z[off:off+n], conf)
					if !ok {
						t.Fatalf("no interval with %d instances", n)
					}
					if lo <= exact.Collision[k] && exact.Collision[k] <= hi {
						covered++
					}
					off += n
				}
				pct := 100 * float64(covered) / float64(reps[j])
				msg := fmt.Sprintf("%s depth %d, %d instances: coverage %.1f%% over %d scans (exact R %.4f)", graph, d, n, pct, reps[j], exact.Ratio[k])
				t.Log(msg)
				if math.Abs(pct-100*conf) > tol {
					t.Error(msg)
				}
			}
		}
	}
}
