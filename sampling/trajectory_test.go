package sampling

import (
	"context"
	"math/rand/v2"
	"slices"
	"testing"

	"mixdepth/circuits"
	"mixdepth/sim"
)

// rerunCost is the definition checkpointsFor minimises, written out
// directly: each trajectory with a first error f ≥ 0 re-runs f − c gates,
// c the largest checkpoint ≤ f (0 without one).
func rerunCost(firsts, at []int) int {
	cost := 0
	for _, f := range firsts {
		if f < 0 {
			continue
		}
		c := 0
		for _, a := range at {
			if a <= f {
				c = max(c, a)
			}
		}
		cost += f - c
	}
	return cost
}

// TestCheckpointsForBruteForce checks checkpointsFor against brute force
// (every subset of at most m of the distinct positive first errors, the
// only useful checkpoints: moving one up to the next first error never
// costs more): its choice has the least re-run cost, at most m ascending
// distinct entries, all of them first errors; with room for all it keeps
// every distinct positive first error.
func TestCheckpointsForBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for trial := range 300 {
		firsts := make([]int, 1+rng.IntN(14))
		for i := range firsts {
			firsts[i] = rng.IntN(30) - 3 // some −1 (no error), 0 and repeats
			if firsts[i] < -1 {
				firsts[i] = -1
			}
		}
		var cand []int
		for _, f := range firsts {
			if f > 0 && !slices.Contains(cand, f) {
				cand = append(cand, f)
			}
		}
		slices.Sort(cand)
		m := rng.IntN(len(cand) + 2)
		at := checkpointsFor(firsts, m)
		if len(at) > m || !slices.IsSorted(at) || len(slices.Compact(slices.Clone(at))) != len(at) {
			t.Fatalf("trial %d: checkpoints %v for m = %d", trial, at, m)
		}
		for _, a := range at {
			if !slices.Contains(cand, a) {
				t.Fatalf("trial %d: checkpoint %d is no first error of %v", trial, a, firsts)
			}
		}
		if m >= len(cand) && !slices.Equal(at, cand) && len(cand) > 0 {
			t.Fatalf("trial %d: room for %d, kept %v of %v", trial, m, at, cand)
		}
		best := rerunCost(firsts, nil)
		for mask := 0; mask < 1<<len(cand); mask++ {
			var sub []int
			for i, c := range cand {
				if mask>>i&1 == 1 {
					sub = append(sub, c)
				}
			}
			if len(sub) <= m {
				best = min(best, rerunCost(firsts, sub))
			}
		}
		if got := rerunCost(firsts, at); got != best {
			t.Fatalf("trial %d: firsts %v, m %d: checkpoints %v re-run %d gates, brute force %d", trial, firsts, m, at, got, best)
		}
	}
}

// TestTrajectoryBranchesSameShots: the outcomes with saved ideal states
// equal, bit for bit, those of every trajectory run from |0…0⟩
// (SavedStateBytes = −1, the definition), over uniform gate errors with and
// without readout flips and depolarizing, per-element noise with
// single-qubit errors (dressed gates and a final layer), depths from 1 to
// 12, one to four instances, one and two workers, and budgets from one
// state to all. The high rates put first errors on most gates.
func TestTrajectoryBranchesSameShots(t *testing.T) {
	type tc struct {
		name   string
		config func(t *testing.T) *Config
	}
	uniform := func(spec, gates string, depth, instances int, nz Noise) func(t *testing.T) *Config {
		return func(t *testing.T) *Config { return testConfig(t, spec, gates, depth, instances, 90, nz) }
	}
	chip := func(spec, gates string, depth, instances int) func(t *testing.T) *Config {
		return func(t *testing.T) *Config {
			return chipConfig(t, spec, gates, depth, instances, 90, func(g *circuits.Graph) *circuits.ChipNoise {
				ch := circuits.UniformNoise(g, 0.02, 0.01, 0.02, 0.05, 0.9)
				ch.Pair[0] = 0.06
				ch.Single[1] = 0
				return ch
			})
		}
	}
	cases := []tc{
		{"haar line:6 depth 1", uniform("line:6", "haar", 1, 2, Noise{Fidelity: 1, GateError: 0.1})},
		{"haar ring:5 depth 7 readout", uniform("ring:5", "haar", 7, 3, Noise{Fidelity: 0.8, GateError: 0.04, Readout01: 0.02, Readout10: 0.05})},
		{"haar grid:3x3 depth 12", uniform("grid:3x3", "haar", 12, 1, Noise{Fidelity: 1, GateError: 0.02})},
		{"cz+haar1 grid:2x3 depth 5", uniform("grid:2x3", "cz+haar1", 5, 4, Noise{Fidelity: 1, GateError: 0.05})},
		{"chip iswap+haar1 line:6 depth 8", chip("line:6", "iswap+haar1", 8, 3)},
		{"chip cz+haar1 grid:2x3 depth 3", chip("grid:2x3", "cz+haar1", 3, 2)},
	}
	for _, k := range cases {
		for _, workers := range []int{1, 2} {
			c := k.config(t)
			c.Workers = workers
			c.Trajectories = 30
			c.SavedStateBytes = -1
			want := runAll(t, c)
			for _, budget := range []float64{1, 3, 1000} {
				c.SavedStateBytes = int64(budget * sim.StateBytes(c.Qubits))
				got := runAll(t, c)
				for i := range want {
					if !slices.Equal(got[i].Outcomes, want[i].Outcomes) || !slices.Equal(got[i].PIdeal, want[i].PIdeal) ||
						got[i].Collision != want[i].Collision {
						t.Errorf("%s, %d workers, budget %g states, instance %d: outcomes differ from trajectories run from the start",
							k.name, workers, budget, i)
					}
				}
			}
		}
	}
}

// trajectoryAmplitudes runs every trajectory with an error of c's instances
// twice, from its saved branch point (runTrajectory) and from |0…0⟩
// (Circuit.runNoisy, the definition), and returns how many it compared and
// how many final states differ in any bit of any amplitude.
func trajectoryAmplitudes(t *testing.T, c *Config) (checked, differ int) {
	t.Helper()
	w, err := newWorker(c, 1)
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	for _, id := range c.Instances {
		circ := Build(c.Schedule, c.Ensemble, c.Qubits, c.Seed, id, c.Depth)
		trajectories := c.TrajectoriesPerInstance()
		rates := w.gateRates(circ)
		var singles *singleErrors
		if w.dressing != nil {
			singles = w.dressing.errors(circ)
		}
		w.pairs = w.pairs[:0]
		for _, step := range circ.Steps {
			for _, g := range step {
				w.pairs = append(w.pairs, [2]int{g.A, g.B})
			}
		}
		w.setCheckpoints(w.branchPoints(circ, rates, singles, id, trajectories), 1000)
		w.runIdeal(ctx, circ)
		errs := ErrorStream(c.Seed, id, c.Depth)
		singleRng := SingleErrorStream(c.Seed, id, c.Depth)
		paulis := make([]uint8, circ.GateCount())
		for range trajectories {
			first := drawTrajectory(errs, singleRng, rates, singles, paulis)
			if first < 0 {
				continue
			}
			w.runTrajectory(ctx, circ, first, paulis, singles)
			got := slices.Clone(w.st.Amp)
			w.st.Reset()
			circ.runNoisy(ctx, w.st, 0, paulis, singles, 1, nil)
			checked++
			if !slices.Equal(got, w.st.Amp) {
				differ++
				t.Logf("instance %d, first error at gate %d, branch point %d: the states differ", id, first, w.branchPoint(first, paulis, singles))
			}
		}
	}
	return checked, differ
}

// TestTrajectoryAmplitudesBitIdentical checks the claim behind the branch
// points on the states themselves, where a last-bit difference shows (drawn
// shots would almost never reveal one): every trajectory started from its
// saved branch point ends in exactly (==) the state of the same trajectory
// run from |0…0⟩, for Haar, cz+haar1 and iswap+haar1 gates, uniform Pauli
// noise and a chip with single-qubit and readout errors. The reference is
// the definition of a trajectory (common practice: quantum trajectories as
// the circuit with its sampled Pauli errors inserted).
func TestTrajectoryAmplitudesBitIdentical(t *testing.T) {
	for _, gates := range []string{"haar", "cz+haar1", "iswap+haar1"} {
		c := testConfig(t, "grid:3x4", gates, 14, 3, 400, Noise{Fidelity: 1, GateError: 0.03})
		c.Trajectories = 200
		n1, d1 := trajectoryAmplitudes(t, c)
		chip := chipConfig(t, "grid:3x4", gates, 10, 2, 300, func(g *circuits.Graph) *circuits.ChipNoise {
			return circuits.UniformNoise(g, 0.02, 0.01, 0.02, 0.05, 0.9)
		})
		chip.Trajectories = 150
		n2, d2 := trajectoryAmplitudes(t, chip)
		if n1 == 0 || n2 == 0 {
			t.Fatalf("%s: no trajectory with an error was compared (%d, %d)", gates, n1, n2)
		}
		if d1+d2 > 0 {
			t.Errorf("%s: %d of %d trajectories (uniform noise) and %d of %d (chip noise) end in another state than from |0…0⟩", gates, d1, n1, d2, n2)
		}
	}
}
