package sampling

import (
	"context"
	"math"
	"math/rand/v2"
	"syscall"
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

// BenchmarkNoisyReplayAB (TEMPORARY) alternates the table per trajectory
// (old) and the replay (new), with saved states and from |0…0⟩.
func BenchmarkNoisyReplayAB(b *testing.B) {
	for range 4 {
		for _, v := range []struct {
			name  string
			off   bool
			saved int64
		}{{"saved-table", true, 0}, {"saved-replay", false, 0}, {"start-table", true, -1}, {"start-replay", false, -1}} {
			b.Run(v.name, func(b *testing.B) {
				replayOff = v.off
				defer func() { replayOff = false }()
				c := demoNoisyConfig(1)
				c.SavedStateBytes = v.saved
				t0 := cpuNow()
				for b.Loop() {
					if _, err := Run(context.Background(), c, func(*Result) error { return nil }); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric((cpuNow()-t0)/float64(b.N), "cpu-s/op")
			})
		}
	}
}

// cpuNow (TEMPORARY) is the process's user+system CPU seconds.
func cpuNow() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return math.NaN()
	}
	return float64(ru.Utime.Nano()+ru.Stime.Nano()) / 1e9
}

// BenchmarkTrajectoryShotsAB (TEMPORARY): 10 shots from 2^16 Porter–Thomas
// weights, table then draws against the replay, alternated.
func BenchmarkTrajectoryShotsAB(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	w := make([]float64, 1<<16)
	for i := range w {
		w[i] = rng.ExpFloat64()
	}
	var a Alias
	var r aliasReplay
	dst := make([]uint64, 0, 16)
	for range 3 {
		b.Run("table", func(b *testing.B) {
			t0 := cpuNow()
			for b.Loop() {
				a.Reset(w)
				dst = DrawShots(dst[:0], rng, &a, 16, 10, Ideal)
			}
			b.ReportMetric((cpuNow()-t0)/float64(b.N)*1e6, "cpu-µs/op")
		})
		b.Run("replay", func(b *testing.B) {
			t0 := cpuNow()
			for b.Loop() {
				dst = r.drawShots(dst[:0], rng, w, &a, 16, 10, Ideal)
			}
			b.ReportMetric((cpuNow()-t0)/float64(b.N)*1e6, "cpu-µs/op")
		})
	}
}
