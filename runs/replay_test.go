package runs_test

import (
	"context"
	"errors"
	"math"
	"testing"

	"mixdepth/runs"
	"mixdepth/scan"
)

// TestReplayMatchesScan: instances simulated again by Spec.Replay give the
// collision probabilities that scan.Run recorded for them (the same
// per-instance streams keyed by (seed, instance)), including the final
// single-qubit layer of a "+haar1" gate set, and a recorded value that no
// circuit of the run produces is reported as a mismatch, not accepted.
func TestReplayMatchesScan(t *testing.T) {
	for _, gates := range []string{"haar", "cz+haar1"} {
		spec, err := runs.NewSpec(runs.Options{Graph: "ring:6", Schedule: "layered", Gates: gates, Seed: 41})
		if err != nil {
			t.Fatal(err)
		}
		depths, ids := []int{3, 7}, []int{0, 1, 2, 5}
		recs, _, err := scan.Run(context.Background(), &scan.Config{Graph: spec.Graph, Schedule: spec.Schedule,
			Ensemble: spec.Ensemble, Depths: depths, Instances: ids, Seed: spec.Seed, Workers: 1})
		if err != nil {
			t.Fatal(err)
		}
		for _, d := range depths {
			recorded := map[int]float64{}
			for _, r := range recs {
				if r.Depth == d {
					recorded[r.Instance] = r.Collision
				}
			}
			rep, err := spec.Replay(context.Background(), ids, d, recorded, 1)
			if err != nil {
				t.Fatalf("%s depth %d: %v", gates, d, err)
			}
			if rep.Matched != len(ids) || len(rep.Probabilities) != len(ids) || len(rep.Probabilities[0]) != 64 {
				t.Fatalf("%s depth %d: matched %d of %d, %d×%d probabilities", gates, d, rep.Matched, len(ids), len(rep.Probabilities), len(rep.Probabilities[0]))
			}
			for k, p := range rep.Probabilities {
				sum := 0.0
				for _, v := range p {
					sum += v
				}
				// Unitary evolution keeps the norm to rounding: 64 terms of
				// size ~1/64, so 1e-12 is far above the error.
				if math.Abs(sum-1) > 1e-12 || !(rep.KS[k] > 0 && rep.KS[k] < 1) {
					t.Errorf("%s depth %d instance %d: Σp = %.17g, KS %v", gates, d, ids[k], sum, rep.KS[k])
				}
			}
			recorded[ids[1]] *= 1 + 1e-9
			_, err = spec.Replay(context.Background(), ids, d, recorded, 1)
			var mm *runs.ReplayMismatchError
			if !errors.As(err, &mm) || mm.Instance != ids[1] || mm.Depth != d {
				t.Errorf("%s depth %d: a perturbed record gave %v, want a mismatch at instance %d", gates, d, err, ids[1])
			}
		}
	}
}
