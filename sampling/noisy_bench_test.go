package sampling

import (
	"context"
	"testing"

	"mixdepth/circuits"
	"mixdepth/fixtures"
)

// demoNoisyConfig is the configuration of mixbench's target
// noisy_sampling_over_from_start: the demo chip (16 qubits, its layout) at
// depth 16, 10 instances × 1000 shots, gate error 0.005, 100 trajectories.
func demoNoisyConfig(workers int) *Config {
	g, l := fixtures.DemoChip()
	e, err := circuits.NewEnsemble("haar")
	if err != nil {
		panic(err)
	}
	c := &Config{Schedule: l.Schedule(), Ensemble: e, Qubits: g.Qubits, Depth: 16, Seed: 20261201,
		Shots: 1000, Noise: Noise{Fidelity: 1, GateError: 0.005}, Trajectories: 100, Workers: workers}
	for i := range 10 {
		c.Instances = append(c.Instances, i)
	}
	return c
}

// BenchmarkNoisySampling runs the target's configuration with saved ideal
// states (the default budget) and from |0…0⟩ (SavedStateBytes = −1), one
// worker, so that the two can be compared as a ratio in one run; three
// rounds alternate them, as the machine's load drifts.
func BenchmarkNoisySampling(b *testing.B) {
	for range 3 {
		noisySamplingRound(b)
	}
}

func noisySamplingRound(b *testing.B) {
	for _, v := range []struct {
		name  string
		saved int64
	}{{"saved", 0}, {"from-start", -1}} {
		b.Run(v.name, func(b *testing.B) {
			c := demoNoisyConfig(1)
			c.SavedStateBytes = v.saved
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Run(context.Background(), c, func(*Result) error { return nil }); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
