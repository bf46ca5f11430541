package main

import (
	"bufio"
	"context"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"runtime"
	"slices"
	"strings"
	"sync"
	"time"

	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/scan"
	"mixdepth/sim"
	"mixdepth/stats"
)

// benchConfig holds the settings of a full measurement run (see the flags
// in run).
type benchConfig struct {
	from, to         int    // state sizes of the gate benchmark
	moments          string // comma-separated qubit counts of the moment engine
	mpsBonds         string // comma-separated bond dimensions of the MPS update
	grid             string // RxC of the end-to-end scan
	depth, instances int    // of the end-to-end scan
	numpy            bool   // run the numpy baseline when python3 has numpy
	targets          int    // rounds of each target of measureTargets; 0 skips them
	workers          int
}

// measure runs every measurement of cfg, logging progress to log. It stops
// between measurements when ctx is cancelled and returns ctx.Err().
func measure(ctx context.Context, log io.Writer, cfg benchConfig) (*report, error) {
	logf := func(format string, args ...any) { fmt.Fprintf(log, format+"\n", args...) }
	// begin logs the start of a measurement, or returns ctx.Err() when the
	// run has been cancelled.
	begin := func(format string, args ...any) error {
		if err := ctx.Err(); err != nil {
			return err
		}
		logf(format, args...)
		return nil
	}
	workers := cfg.workers
	r := &report{Machine: cpuModel(), Cores: runtime.NumCPU(), GoVersion: runtime.Version(), BlockQubits: sim.BlockQubits()}
	logf("triad bandwidth on %d goroutines…", workers)
	r.Load = loadAverage()
	r.Bandwidth = triad(workers, 10)
	// Each row alternates rounds of the triad and of its own measurement and
	// keeps the best of each, so that both see the same load from other
	// users of the machine; bandwidth_gbs is the best triad of the run.
	note := func(bw float64) { r.Bandwidth = max(r.Bandwidth, bw) }
	for n := cfg.from; n <= cfg.to; n++ {
		if err := begin("gates at n = %d…", n); err != nil {
			return nil, err
		}
		row, err := gates(n, workers, false)
		if err != nil {
			return nil, err
		}
		f, err := fused(ctx, n, workers)
		if err != nil {
			return nil, err
		}
		note(row.Triad)
		r.Gates, r.Fused = append(r.Gates, row), append(r.Fused, f)
	}
	for _, n := range []int{24, 26} {
		if n < cfg.from || n > cfg.to {
			continue
		}
		if err := begin("single precision at n = %d…", n); err != nil {
			return nil, err
		}
		row, err := gates(n, workers, true)
		if err != nil {
			return nil, err
		}
		note(row.Triad)
		r.Single = append(r.Single, row)
	}
	for _, f := range strings.Split(cfg.moments, ",") {
		var n int
		if _, err := fmt.Sscan(f, &n); err != nil || n < 2 {
			continue
		}
		if err := begin("moment engine at n = %d…", n); err != nil {
			return nil, err
		}
		row, err := momentEngine(n, workers)
		if err != nil {
			return nil, err
		}
		note(row.Triad)
		r.Moments = append(r.Moments, row)
	}
	for _, f := range strings.Split(cfg.mpsBonds, ",") {
		var b int
		if _, err := fmt.Sscan(f, &b); err != nil || b < 2 || b > moments.MPSMaxBond {
			continue
		}
		if err := begin("MPS update at bond %d…", b); err != nil {
			return nil, err
		}
		r.MPS = append(r.MPS, mpsUpdate(b))
	}
	if cfg.targets > 0 {
		t, err := measureTargets(ctx, logf, workers, cfg.targets)
		if err != nil {
			return nil, err
		}
		r.Targets = t
	}
	var rows, cols int
	if _, err := fmt.Sscanf(cfg.grid, "%dx%d", &rows, &cols); err != nil || cfg.depth <= 0 || cfg.instances <= 0 {
		return r, nil
	}
	logf("scan of grid:%s, depths 1..%d, %d instances…", cfg.grid, cfg.depth, cfg.instances)
	sr, err := scanBench(ctx, rows, cols, cfg.depth, cfg.instances, workers)
	if err != nil {
		if ctx.Err() != nil {
			return nil, err
		}
		logf("scan: %v", err)
		return r, nil
	}
	r.Scan = sr
	if !cfg.numpy {
		return r, nil
	}
	py := findNumpy()
	if py == "" {
		r.Notes = append(r.Notes, "numpy not installed (apt-get install python3-numpy): no numpy_ratio")
		return r, nil
	}
	logf("numpy baseline with %s…", py)
	secs, last, blas, err := numpyScan(ctx, log, py, rows, cols, cfg.depth, cfg.instances)
	if err != nil {
		logf("numpy: %v", err)
		r.Notes = append(r.Notes, "numpy baseline failed: "+err.Error())
		return r, nil
	}
	sr.NumpySeconds, sr.NumpyRatio, sr.Python, sr.NumpyBLAS = &secs, &last, py, blas
	ratio := secs / sr.GoSeconds
	r.Ratio = &ratio
	return r, nil
}

// cpuModel returns the processor's model name from /proc/cpuinfo.
func cpuModel() string {
	f, err := os.Open("/proc/cpuinfo")
	if err != nil {
		return runtime.GOARCH
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if k, v, ok := strings.Cut(sc.Text(), ":"); ok && strings.TrimSpace(k) == "model name" {
			return strings.TrimSpace(v)
		}
	}
	return runtime.GOARCH
}

// loadAverage returns the first three fields of /proc/loadavg: how busy the
// shared machine was when the run started.
func loadAverage() string {
	b, err := os.ReadFile("/proc/loadavg")
	if err != nil {
		return ""
	}
	f := strings.Fields(string(b))
	return strings.Join(f[:min(3, len(f))], " ")
}

// parallel runs body(w, lo, hi) over [0, n) in workers contiguous blocks.
func parallel(n, workers int, body func(lo, hi int)) {
	var wg sync.WaitGroup
	chunk := (n + workers - 1) / workers
	for lo := 0; lo < n; lo += chunk {
		wg.Add(1)
		go func(lo, hi int) { defer wg.Done(); body(lo, hi) }(lo, min(lo+chunk, n))
	}
	wg.Wait()
}

// triad returns the best of reps runs of a[i] = b[i] + s·c[i] over three
// arrays of 2^25 float64 (256 MiB each, far beyond the last-level cache),
// counting 24 bytes per element as STREAM does (McCalpin 1995, IEEE TCCA
// Newsletter, "Memory bandwidth and machine balance").
func triad(workers, reps int) float64 {
	const n = 1 << 25
	a, b, c := make([]float64, n), make([]float64, n), make([]float64, n)
	parallel(n, workers, func(lo, hi int) {
		for i := lo; i < hi; i++ {
			a[i], b[i], c[i] = 0, 1, 2
		}
	})
	best := 0.0
	for range reps {
		start := time.Now()
		parallel(n, workers, func(lo, hi int) {
			x, y, z := a[lo:hi], b[lo:hi], c[lo:hi]
			y, z = y[:len(x)], z[:len(x)]
			for i := range x {
				x[i] = y[i] + 3*z[i]
			}
		})
		best = max(best, 24*n/time.Since(start).Seconds()/1e9)
	}
	return best
}

// randomFill sets s to a random normalised state, so that no amplitude is
// zero or subnormal.
func randomFill(amp []complex128, workers int) {
	parallel(len(amp), workers, func(lo, hi int) {
		rng := rand.New(rand.NewPCG(uint64(lo), 1))
		for i := lo; i < hi; i++ {
			amp[i] = complex(rng.NormFloat64(), rng.NormFloat64()) * complex(math.Sqrt(0.5/float64(len(amp))), 0)
		}
	})
}

// timeGate returns the median seconds of reps applications of f.
func timeGate(reps int, f func()) float64 {
	ts := make([]float64, reps)
	for i := range ts {
		start := time.Now()
		f()
		ts[i] = time.Since(start).Seconds()
	}
	slices.Sort(ts)
	return ts[reps/2]
}

// interleaved runs rounds of one triad and of each case's timing (the median
// of reps runs), and returns the best triad and each case's best time: the
// figures of the calmest moments, seen alike by both.
func interleaved(workers, rounds, reps int, cases map[string]func()) (bw float64, best map[string]float64) {
	best = map[string]float64{}
	for range rounds {
		bw = max(bw, triad(workers, 1))
		for name, f := range cases {
			f() // warm up
			t := timeGate(reps, f)
			if old, ok := best[name]; !ok || t < old {
				best[name] = t
			}
		}
	}
	return bw, best
}

// meanOf returns the mean of the values of m.
func meanOf(m map[string]float64) float64 {
	var sum float64
	for _, v := range m {
		sum += v
	}
	return sum / float64(len(m))
}

// millis returns m with every value in milliseconds.
func millis(m map[string]float64) map[string]float64 {
	out := map[string]float64{}
	for k, v := range m {
		out[k] = v * 1e3
	}
	return out
}

// gatePairs are the position classes of the gate benchmark: both qubits low
// (inside a cache line), one low and one high, both high.
func gatePairs(n int) map[string][2]int {
	return map[string][2]int{
		"low-low":   {0, 1},
		"low-high":  {0, n - 1},
		"mid-mid":   {n/2 - 1, n / 2},
		"high-high": {n - 2, n - 1},
		"mixed":     {2, n - 3},
	}
}

// applier is the part of sim.State and sim.State64 that the gate
// benchmark times.
type applier interface {
	Apply2(a, b int, m *[16]complex128, workers int)
}

// gates measures Apply2 of a Haar gate at n qubits for each position class,
// on complex128 amplitudes (effective traffic 32·2^n bytes per gate) or, if
// single, on complex64 (16·2^n bytes); ms_per_gate is the mean over the
// classes.
func gates(n, workers int, single bool) (gateRow, error) {
	var s applier
	bytesPerGate := 32 * math.Ldexp(1, n)
	reps := max(3, min(100, (1<<27)>>n))
	if single {
		s64, err := sim.NewState64(n, 0)
		if err != nil {
			return gateRow{}, err
		}
		for i := range s64.Amp {
			s64.Amp[i] = complex(float32(1/math.Sqrt(float64(len(s64.Amp)))), 0)
		}
		s, bytesPerGate, reps = s64, bytesPerGate/2, 3
	} else {
		s128, err := sim.NewState(n, 0)
		if err != nil {
			return gateRow{}, err
		}
		randomFill(s128.Amp, workers)
		s = s128
	}
	var m [16]complex128
	circuits.HaarUnitary(rand.New(rand.NewPCG(2, 3)), 4, m[:])
	cases := map[string]func(){}
	for kind, p := range gatePairs(n) {
		cases[kind] = func() { s.Apply2(p[0], p[1], &m, workers) }
	}
	bw, best := interleaved(workers, 3, reps, cases)
	t := meanOf(best)
	eff := bytesPerGate / t / 1e9
	return gateRow{Qubits: n, MsPerGate: t * 1e3, Effective: eff, Triad: bw, Fraction: eff / bw, Kinds: millis(best)}, nil
}

// fused measures a 20-layer brickwork on a line of n qubits run as one fused
// sequence (sim.State.Run) and gate by gate (Apply2), per gate, in
// alternating rounds.
func fused(ctx context.Context, n, workers int) (fusedRow, error) {
	rng := rand.New(rand.NewPCG(4, 5))
	var ops []sim.Op
	for layer := 0; layer < 20; layer++ {
		for a := layer % 2; a+1 < n; a += 2 {
			op := sim.Op{A: a, B: a + 1}
			circuits.HaarUnitary(rng, 4, op.M[:])
			ops = append(ops, op)
		}
	}
	return timeFused(ctx, n, ops, workers, 2)
}

// timeFused times ops on a random n-qubit state as one fused sequence
// (sim.State.Run) and gate by gate (Apply2), in rounds alternating the two.
func timeFused(ctx context.Context, n int, ops []sim.Op, workers, rounds int) (fusedRow, error) {
	s, err := sim.NewState(n, 0)
	if err != nil {
		return fusedRow{}, err
	}
	randomFill(s.Amp, workers)
	_, best := interleaved(workers, rounds, 1, map[string]func(){
		"fused": func() { _ = s.Run(ctx, ops, workers) },
		"one-by-one": func() {
			for i := range ops {
				s.Apply2(ops[i].A, ops[i].B, &ops[i].M, workers)
			}
		},
	})
	ms := best["fused"] * 1e3 / float64(len(ops))
	return fusedRow{Qubits: n, Gates: len(ops), MsPerGate: ms, OneByOneMsPerGate: best["one-by-one"] * 1e3 / float64(len(ops)), Speedup: best["one-by-one"] / best["fused"]}, ctx.Err()
}

// momentEngine times pair updates of the exact engine: 16·2^n bytes each.
func momentEngine(n, workers int) (momentRow, error) {
	e, err := moments.NewEngine(n, workers)
	if err != nil {
		return momentRow{}, err
	}
	for q := range n {
		e.Apply(q, (q+1)%n, &moments.HaarTransfer)
	}
	// The pairs of BenchmarkMomentEngine (moments).
	cases := map[string]func(){}
	for _, p := range [][2]int{{0, 1}, {n / 2, n/2 + 1}, {n - 2, n - 1}, {1, n - 1}, {3, n / 2}} {
		cases[fmt.Sprintf("%d-%d", p[0], p[1])] = func() { e.Apply(p[0], p[1], &moments.HaarTransfer) }
	}
	bw, best := interleaved(workers, 3, 3, cases)
	t := meanOf(best)
	eff := 16 * math.Ldexp(1, n) / t / 1e9
	return momentRow{Qubits: n, MsPerUpdate: t * 1e3, Effective: eff, Triad: bw, Fraction: eff / bw, Pairs: millis(best)}, nil
}

// mpsUpdate times one two-site update of the MPS engine (a gate between
// neighbours in the order: a contraction, an SVD of a 2χ×2χ block and the
// split) at bond dimension bond, on a 2·log2(bond)+8-qubit brickwork line
// whose bonds have saturated.
func mpsUpdate(bond int) mpsRow {
	n := 8
	for b := 1; b < bond; b *= 2 {
		n += 2
	}
	order := make([]int, n)
	for i := range order {
		order[i] = i
	}
	m := moments.NewMPS(n, order, bond)
	layer := func(p int) {
		for q := p; q+1 < n; q += 2 {
			m.Apply(q, q+1, &moments.HaarTransfer)
		}
	}
	for d := range n {
		layer(d % 2)
	}
	const rounds = 4
	start := time.Now()
	updates := 0
	for d := range rounds {
		layer(d % 2)
		updates += (n - d%2) / 2
	}
	ms := time.Since(start).Seconds() * 1e3 / float64(updates)
	return mpsRow{Bond: bond, BondUsed: m.MaxBondUsed(), MsPerUpdate: ms}
}

// haarScan is the configuration of a layered Haar scan of the graph spec
// with seed 1.
func haarScan(spec string, workers int) (*scan.Config, error) {
	g, err := circuits.ParseGraph(spec)
	if err != nil {
		return nil, err
	}
	sch, err := circuits.NewSchedule("layered", g)
	if err != nil {
		return nil, err
	}
	ens, err := circuits.NewEnsemble("haar")
	if err != nil {
		return nil, err
	}
	return &scan.Config{Graph: g, Schedule: sch, Ensemble: ens, Seed: 1, Workers: workers}, nil
}

// scanBench runs the end-to-end scan in process, as `mixdepth scan` would.
func scanBench(ctx context.Context, rows, cols, depth, instances, workers int) (*scanResult, error) {
	spec := fmt.Sprintf("grid:%dx%d", rows, cols)
	cfg, err := haarScan(spec, workers)
	if err != nil {
		return nil, err
	}
	for d := 1; d <= depth; d++ {
		cfg.Depths = append(cfg.Depths, d)
	}
	for i := 0; i < instances; i++ {
		cfg.Instances = append(cfg.Instances, i)
	}
	start := time.Now()
	recs, _, err := scan.Run(ctx, cfg)
	if err != nil {
		return nil, err
	}
	secs := time.Since(start).Seconds()
	sum := scan.Estimate(cfg.Graph.Qubits, recs, stats.Criteria{Eps: 0.05, Confidence: 0.95, Rule: stats.RuleCollision})
	return &scanResult{Graph: spec, Depths: depth, Instances: instances, GoSeconds: secs,
		GoRatio: sum.Rows[len(sum.Rows)-1].Ratio}, nil
}

// largeScan runs one instance of a layered Haar scan of the graph spec at the
// given depths and precision, and prints each record with the elapsed time.
func largeScan(ctx context.Context, w io.Writer, spec string, depths []int, precision scan.Precision, workers int) error {
	cfg, err := haarScan(spec, workers)
	if err != nil {
		return err
	}
	cfg.Instances, cfg.Precision, cfg.Depths = []int{0}, precision, depths
	start := time.Now()
	recs, _, err := scan.Run(ctx, cfg)
	if err != nil {
		return err
	}
	fmt.Fprintf(w, "%s (%d qubits), %s precision, %d workers: %.1f s\n", spec, cfg.Graph.Qubits, precision, workers, time.Since(start).Seconds())
	for _, r := range recs {
		fmt.Fprintf(w, "depth %d: gates %d, Z/Z_H %.6f, PT KS %.6g\n", r.Depth, r.GateCount, r.Ratio, r.KS)
	}
	return nil
}
