package runs

import (
	"context"
	"fmt"
	"math"

	"mixdepth/sampling"
	"mixdepth/sim"
	"mixdepth/stats"
)

// ReplayRelTol is the relative difference allowed between a collision
// probability re-simulated by Replay and the one a table records. The gates
// are the same, applied in the same order; but a scan reads out several
// depths from one run, applying the final single-qubit layer (if any) for
// each readout and undoing it, which perturbs the state by rounding, about
// 1e-16 per readout, and the sums may split differently across goroutines.
// 1e-12 is far above that and far below any real mismatch (another seed or
// circuit changes Z in the first digits).
const ReplayRelTol = 1e-12

// Replay holds instances of a recorded run simulated again to one depth.
type Replay struct {
	Depth     int
	Instances []int
	// Probabilities[k] are the 2^n output probabilities of Instances[k].
	Probabilities [][]float64
	// KS[k] is the Porter–Thomas distance of Instances[k]: the
	// Kolmogorov–Smirnov statistic against Beta(1, D−1).
	KS []float64
	// Matched counts the instances whose recorded collision probability the
	// replay reproduced.
	Matched int
}

// ReplayMismatchError reports an instance whose re-simulated collision
// probability differs from the recorded one by more than ReplayRelTol: the
// metadata does not rebuild the circuits that produced the table.
type ReplayMismatchError struct {
	Instance, Depth int
	Got, Want       float64
}

func (e *ReplayMismatchError) Error() string {
	return fmt.Sprintf("runs: instance %d at depth %d simulates to Z = %.17g but the table records %.17g: its metadata does not rebuild its circuits (an edited table, or one from another mixdepth version)",
		e.Instance, e.Depth, e.Got, e.Want)
}

// Replay simulates the instances ids of the run s to depth exactly as a scan
// does (final single-qubit layer included, sampling.Build), and checks each
// against recorded[id], the collision probability a table holds for it, when
// present. It returns a *ReplayMismatchError on the first mismatch, a
// sim.ErrTooLarge error when the probabilities do not fit in memory, and
// ctx.Err() when ctx is cancelled between instances.
func (s *Spec) Replay(ctx context.Context, ids []int, depth int, recorded map[int]float64, workers int) (*Replay, error) {
	n := s.Graph.Qubits
	st, err := sim.NewState(n, float64(len(ids))*math.Ldexp(8, n))
	if err != nil {
		return nil, err
	}
	dim := 1 << n
	r := &Replay{Depth: depth, Instances: ids, Probabilities: make([][]float64, len(ids)), KS: make([]float64, len(ids))}
	scratch := make([]float64, dim)
	for k, id := range ids {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		p := sampling.Build(s.Schedule, s.Ensemble, n, s.Seed, id, depth).Probabilities(st, make([]float64, dim), workers)
		r.Probabilities[k], r.KS[k] = p, stats.KSHaar(p, scratch)
		if want, ok := recorded[id]; ok {
			if got := stats.Collision(p); math.Abs(got-want) > ReplayRelTol*math.Abs(want) {
				return nil, &ReplayMismatchError{Instance: id, Depth: depth, Got: got, Want: want}
			}
			r.Matched++
		}
	}
	return r, nil
}
