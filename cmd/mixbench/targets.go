package main

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"sync"
	"time"

	"mixdepth/circuits"
	"mixdepth/runs"
	"mixdepth/sampling"
	"mixdepth/scan"
	"mixdepth/sim"
)

// target is one performance target of issue 16: a ratio measured in one
// run, repeats times in alternating rounds, with its goal.
type target struct {
	Name string `json:"name"`
	// Ratios holds the ratio of each round; Ratio is their median.
	Ratios []float64 `json:"ratios"`
	Ratio  float64   `json:"ratio"`
	// Goal is the target bound; Below tells whether the ratio must be at
	// most (true) or at least (false) the goal.
	Goal  float64 `json:"goal"`
	Below bool    `json:"goal_is_upper_bound"`
	Met   bool    `json:"met"`
	// Detail says what was timed, with the seconds of the last round.
	Detail string `json:"detail"`
}

// newTarget summarises the rounds of a target.
func newTarget(name string, ratios []float64, goal float64, below bool, detail string) target {
	s := slices.Clone(ratios)
	slices.Sort(s)
	med := s[len(s)/2]
	met := med <= goal
	if !below {
		met = med >= goal
	}
	return target{Name: name, Ratios: ratios, Ratio: med, Goal: goal, Below: below, Met: met, Detail: detail}
}

// seconds returns the wall time of f.
func seconds(f func() error) (float64, error) {
	start := time.Now()
	err := f()
	return time.Since(start).Seconds(), err
}

// scanTime runs cfg with the given depths and returns its seconds.
func scanTime(ctx context.Context, cfg scan.Config, depths []int) (float64, error) {
	cfg.Depths = depths
	return seconds(func() error { _, _, err := scan.Run(ctx, &cfg); return err })
}

// gatePasses returns the sweeps over the state that the gates of instance 0
// of cfg take when the scan reads out the given depths: the gates between
// two read-out depths run as one sequence (sim.Passes), as scan.Run runs
// them. cfg's ensemble must have no final single-qubit layer (haar).
func gatePasses(cfg *scan.Config, depths []int) int {
	b := circuits.NewBuilder(cfg.Schedule, cfg.Ensemble, cfg.Seed, 0)
	var gates []circuits.Gate
	var ops []sim.Op
	passes := 0
	for step, next := 1, 0; next < len(depths); step++ {
		gates = b.Next(gates[:0])
		for _, g := range gates {
			ops = append(ops, sim.Op{A: g.A, B: g.B, M: g.M})
		}
		if step == depths[next] {
			passes += sim.Passes(cfg.Graph.Qubits, ops)
			ops = ops[:0]
			next++
		}
	}
	return passes
}

// depthsFrom returns from, from+step, …, to.
func depthsFrom(from, to, step int) []int {
	var d []int
	for x := from; x <= to; x += step {
		d = append(d, x)
	}
	return d
}

// scanRatio returns the rounds of T(all depths)/T(last depth alone) for cfg.
func scanRatio(ctx context.Context, cfg scan.Config, depths []int, rounds int) (ratios []float64, all, last float64, err error) {
	for range rounds {
		if all, err = scanTime(ctx, cfg, depths); err != nil {
			return nil, 0, 0, err
		}
		if last, err = scanTime(ctx, cfg, depths[len(depths)-1:]); err != nil {
			return nil, 0, 0, err
		}
		ratios = append(ratios, all/last)
	}
	return ratios, all, last, nil
}

// measureTargets measures the targets of issue 16 in rounds rounds each.
func measureTargets(ctx context.Context, logf func(string, ...any), workers, rounds int) ([]target, error) {
	var out []target
	// Scan of grid:4x6, 2 instances, depths 1:20 over depth 20 alone.
	logf("target: scan grid:4x6 depths 1:20 over depth 20…")
	cfg, err := haarScan("grid:4x6", workers)
	if err != nil {
		return nil, err
	}
	cfg.Instances = []int{0, 1}
	r, all, last, err := scanRatio(ctx, *cfg, depthsFrom(1, 20, 1), rounds)
	if err != nil {
		return nil, err
	}
	pAll, pLast := gatePasses(cfg, depthsFrom(1, 20, 1)), gatePasses(cfg, []int{20})
	out = append(out, newTarget("scan_depths_1_20_over_20", r, 1.3, true,
		fmt.Sprintf("grid:4x6, 2 instances, haar: depths 1:20 %.2f s, depth 20 alone %.2f s; gate passes over the state per instance %d and %d (sim.Passes: each read-out depth ends a fused pass)", all, last, pAll, pLast)))

	// Read-out at n = 24 over one triad pass over the state's bytes.
	logf("target: read-out at n = 24 over a triad pass…")
	const n = 24
	st, err := sim.NewState(n, 0)
	if err != nil {
		return nil, err
	}
	randomFill(st.Amp, workers)
	rd := scan.NewReader(n, workers)
	r = nil
	var read, pass float64
	for range rounds {
		bw := triad(workers, 1)
		rd.Read(st) // warm up
		read = timeGate(3, func() { rd.Read(st) })
		pass = 16 * math.Ldexp(1, n) / (bw * 1e9)
		r = append(r, read/pass)
	}
	out = append(out, newTarget("readout_over_triad_pass_n24", r, 2, true,
		fmt.Sprintf("random state: read-out %.1f ms, one triad pass over 256 MiB %.1f ms", read*1e3, pass*1e3)))
	st = nil

	// Brickwork of 20 layers: one-by-one time over fused time (gates per pass).
	for _, spec := range []string{"line:26", "grid:5x5"} {
		logf("target: fused brickwork on %s…", spec)
		r = nil
		var f fusedRow
		var ceiling float64
		for range rounds {
			if f, err = fusedOn(ctx, spec, workers); err != nil {
				return nil, err
			}
			ceiling = math.Ldexp(cacheBound(ctx, workers), f.Qubits) * 1e3
			r = append(r, f.Speedup)
		}
		out = append(out, newTarget("fused_speedup_"+spec, r, 2, false,
			fmt.Sprintf("%d gates, fused %.3f ms per gate, one by one %.3f; compute ceiling %.3f ms per gate (the fused kernels on states in cache), so the speed-up cannot exceed %.2f here",
				f.Gates, f.MsPerGate, f.OneByOneMsPerGate, ceiling, f.OneByOneMsPerGate/ceiling)))
	}

	// The demo over its last depth alone.
	logf("target: the demo over its last depth…")
	sp, err := runs.NewSpec(runs.Options{Seed: 20261201})
	if err != nil {
		return nil, err
	}
	demo := scan.Config{Graph: sp.Graph, Schedule: sp.Schedule, Ensemble: sp.Ensemble, Seed: sp.Seed, Workers: workers}
	for i := range 200 {
		demo.Instances = append(demo.Instances, i)
	}
	r, all, last, err = scanRatio(ctx, demo, depthsFrom(2, 24, 2), rounds)
	if err != nil {
		return nil, err
	}
	out = append(out, newTarget("demo_over_last_depth", r, 2.5, true,
		fmt.Sprintf("demo (200 instances, depths 2:24:2) %.2f s, depth 24 alone %.2f s", all, last)))

	// Noisy sampling: trajectories from saved ideal states over
	// trajectories from |0…0⟩ (the method before), same outcomes required.
	logf("target: noisy sampling on the demo chip…")
	sc := sampling.Config{Schedule: sp.Schedule, Ensemble: sp.Ensemble, Qubits: sp.Graph.Qubits, Depth: 16,
		Seed: sp.Seed, Shots: 1000, Noise: sampling.Noise{Fidelity: 1, GateError: 0.005}, Trajectories: 100,
		Workers: workers}
	for i := range 10 {
		sc.Instances = append(sc.Instances, i)
	}
	r = nil
	var saved, scratch float64
	same := true
	for range rounds {
		var a, b [][]uint64
		if saved, err = sampleTime(ctx, sc, &a); err != nil {
			return nil, err
		}
		old := sc
		old.SavedStateBytes = -1
		if scratch, err = sampleTime(ctx, old, &b); err != nil {
			return nil, err
		}
		same = same && slices.EqualFunc(a, b, slices.Equal)
		r = append(r, saved/scratch)
	}
	t := newTarget("noisy_sampling_over_from_start", r, 0.6, true,
		fmt.Sprintf("demo chip, depth 16, 10 instances × 1000 shots, gate error 0.005, 100 trajectories: %.2f s, from |0…0⟩ %.2f s; outcomes identical: %v", saved, scratch, same))
	t.Met = t.Met && same
	return append(out, t), nil
}

// sampleTime runs c, appends each instance's outcomes to outcomes and
// returns the seconds.
func sampleTime(ctx context.Context, c sampling.Config, outcomes *[][]uint64) (float64, error) {
	return seconds(func() error {
		_, err := sampling.Run(ctx, &c, func(r *sampling.Result) error {
			*outcomes = append(*outcomes, r.Outcomes)
			return nil
		})
		return err
	})
}

// fusedOn measures a 20-layer layered brickwork of Haar gates on the graph
// spec run as one fused sequence and gate by gate, as fused does for a line.
func fusedOn(ctx context.Context, spec string, workers int) (fusedRow, error) {
	g, err := circuits.ParseGraph(spec)
	if err != nil {
		return fusedRow{}, err
	}
	sch, err := circuits.NewSchedule("layered", g)
	if err != nil {
		return fusedRow{}, err
	}
	rng := rand.New(rand.NewPCG(4, 5))
	var ops []sim.Op
	var edges []circuits.Edge
	for layer := 0; layer < 20; layer++ {
		edges = sch.Step(layer, nil, edges[:0])
		for _, e := range edges {
			op := sim.Op{A: e.A, B: e.B}
			circuits.HaarUnitary(rng, 4, op.M[:])
			ops = append(ops, op)
		}
	}
	return timeFused(ctx, g.Qubits, ops, workers, 1) // the target's own rounds repeat it
}

// cacheBound returns the seconds per gate per amplitude of the fused
// kernels when memory costs nothing: every worker runs a brickwork on its
// own state of sim.BlockQubits() qubits, which stays in its core's cache (one
// pass over the whole state, the fused kernels of sim.State.Run), all at
// once. A fused pass over a large state cannot beat this rate, so
// one-by-one time over it bounds the fused speed-up on this machine.
func cacheBound(ctx context.Context, workers int) float64 {
	n := sim.BlockQubits()
	rng := rand.New(rand.NewPCG(6, 7))
	var ops []sim.Op
	for layer := range 20 {
		for a := layer % 2; a+1 < n; a += 2 {
			op := sim.Op{A: a, B: a + 1}
			circuits.HaarUnitary(rng, 4, op.M[:])
			ops = append(ops, op)
		}
	}
	states := make([]*sim.State, workers)
	for w := range states {
		var err error
		if states[w], err = sim.NewState(n, 0); err != nil {
			panic(err) // 2^16 amplitudes (1 MiB) at most always fit
		}
		randomFill(states[w].Amp, 1)
	}
	const reps = 20
	run := func() {
		var wg sync.WaitGroup
		for _, st := range states {
			wg.Go(func() {
				for range reps {
					_ = st.Run(ctx, ops, 1)
				}
			})
		}
		wg.Wait()
	}
	run() // warm up
	best := math.Inf(1)
	for range 3 {
		t := timeGate(1, run)
		best = math.Min(best, t)
	}
	return best / (reps * float64(len(ops)) * math.Ldexp(float64(workers), n))
}
