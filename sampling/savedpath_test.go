package sampling

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"mixdepth/circuits"
	"mixdepth/sim"
)

// TestSavedStatesSweep runs configurations across seeds, gate errors
// 0.001–0.05, 1 to 200 trajectories, depolarizing fidelities, readout
// errors (both rates set, which the replay draws ahead, and one rate only,
// which leaves the shots to the table), a chip with single-qubit rates, and
// 1 or 2 workers on a 16-qubit grid (where saved states are copied by
// both), and requires the outcomes and ideal probabilities of the default
// saved states to equal those of every trajectory run from |0…0⟩
// (SavedStateBytes = −1, the reference: common practice, a trajectory is the
// circuit with its sampled Pauli errors inserted).
func TestSavedStatesSweep(t *testing.T) {
	type run struct {
		name string
		c    *Config
	}
	var runs []run
	for i, v := range []struct {
		seed         uint64
		gates        string
		e, f         float64
		r01, r10     float64
		trajectories int
	}{
		{1, "haar", 0.001, 1, 0, 0, 200},
		{2, "haar", 0.005, 1, 0, 0, 100},
		{3, "haar", 0.02, 0.9, 0.01, 0.03, 37},
		{4, "cz+haar1", 0.05, 1, 0, 0.02, 200},
		{5, "iswap+haar1", 0.01, 0.95, 0.02, 0.02, 1},
		{6, "haar", 0.05, 1, 0.01, 0.01, 7},
	} {
		c := testConfig(t, "grid:3x4", v.gates, 10, 2, 400, Noise{Fidelity: v.f, GateError: v.e, Readout01: v.r01, Readout10: v.r10})
		c.Seed, c.Trajectories, c.Workers = v.seed, v.trajectories, 1+i%2
		runs = append(runs, run{fmt.Sprintf("case %d (%s, e %g, T %d)", i, v.gates, v.e, v.trajectories), c})
	}
	chip := chipConfig(t, "grid:3x4", "cz+haar1", 10, 2, 300, func(g *circuits.Graph) *circuits.ChipNoise {
		ch := circuits.UniformNoise(g, 0.01, 0.004, 0.01, 0.02, 0.97)
		ch.Pair[2] = 0.04
		return ch
	})
	chip.Trajectories = 150
	runs = append(runs, run{"chip with single-qubit rates", chip})
	for _, workers := range []int{1, 2} {
		big := testConfig(t, "grid:4x4", "haar", 8, 2, 300, Noise{Fidelity: 1, GateError: 0.01, Readout01: 0.01, Readout10: 0.02})
		big.Trajectories, big.Workers, big.Seed = 30, workers, 77
		runs = append(runs, run{fmt.Sprintf("16 qubits, %d workers", workers), big})
	}
	for _, r := range runs {
		c := *r.c
		c.SavedStateBytes = -1
		want := runAll(t, &c)
		c.SavedStateBytes = 0
		got := runAll(t, &c)
		if c.savedStates() == 0 {
			t.Fatalf("%s: no saved states", r.name)
		}
		for i := range want {
			if !slices.Equal(got[i].Outcomes, want[i].Outcomes) || !slices.Equal(got[i].PIdeal, want[i].PIdeal) {
				t.Errorf("%s, instance %d: outcomes differ from trajectories run from the start", r.name, i)
			}
		}
	}
}

// TestWeightsOfMatchesProbabilities checks that weightsOf writes exactly
// (bit for bit) the probabilities sim.State.Probabilities writes and the
// totals totalsOf gives, on a random state and on a circuit's output, since
// the trajectories' shots are drawn from them in place of the two passes
// (from memory: the squares rounded on their own, then added).
func TestWeightsOfMatchesProbabilities(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	st, err := sim.NewState(10, 0)
	if err != nil {
		t.Fatal(err)
	}
	for i := range st.Amp {
		st.Amp[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	c := testConfig(t, "grid:2x5", "haar", 6, 1, 1, Ideal)
	circ := Build(c.Schedule, c.Ensemble, c.Qubits, c.Seed, 0, c.Depth)
	out, err := sim.NewState(10, 0)
	if err != nil {
		t.Fatal(err)
	}
	circ.Apply(out, 1)
	for _, s := range []*sim.State{st, out} {
		want := s.Probabilities(nil, 1)
		got, tot := weightsOf(s.Amp, make([]float64, 3))
		if len(got) != len(want) {
			t.Fatalf("%d weights for %d amplitudes", len(got), len(want))
		}
		for i := range want {
			if math.Float64bits(got[i]) != math.Float64bits(want[i]) {
				t.Fatalf("weight %d: %v, Probabilities %v", i, got[i], want[i])
			}
		}
		if tot != totalsOf(want) {
			t.Fatalf("totals %+v, totalsOf %+v", tot, totalsOf(want))
		}
	}
}
