// Command benchmain measures, in one run and on the same cores, the memory
// bandwidth of the machine (a triad loop), the throughput of two-qubit gates
// on the state vector, the exact moment engine, an end-to-end scan, and —
// when Debian's python3-numpy is installed — the plain-numpy scan of
// scripts/numpy_scan.py doing the same work. It prints a table, or one JSON
// document with --json. Run it as scripts/bench.
//
// Absolute times are not stable on a shared machine; the ratios measured in
// the same run are the figures to compare (bandwidth_fraction, numpy_ratio).
package main

import (
	"bufio"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"runtime"
	"runtime/pprof"
	"slices"
	"strings"
	"sync"
	"time"

	"github.com/spf13/pflag"

	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/scan"
	"mixdepth/sim"
)

// report is the --json document. Field names are an interface.
type report struct {
	Machine   string      `json:"machine"`
	Cores     int         `json:"cores"`
	GoVersion string      `json:"go_version"`
	Bandwidth float64     `json:"bandwidth_gbs"`
	Load      string      `json:"load_average"`
	Gates     []gateRow   `json:"gates"`
	Moments   []momentRow `json:"moments"`
	Scan      *scanResult `json:"scan,omitempty"`
	Ratio     *float64    `json:"numpy_ratio"`
	Notes     []string    `json:"notes,omitempty"`
	Single    []singleRow `json:"single_precision,omitempty"`
	Fused     []fusedRow  `json:"fused,omitempty"`
}

type gateRow struct {
	Qubits    int     `json:"n"`
	MsPerGate float64 `json:"ms_per_gate"`
	Effective float64 `json:"effective_gbs"`
	Fraction  float64 `json:"bandwidth_fraction"`
	// Triad is the triad bandwidth measured just before this row, the
	// reference of Fraction: on a shared machine it sees the same load.
	Triad float64 `json:"triad_gbs"`
	// Kinds holds ms per gate for each position class.
	Kinds map[string]float64 `json:"ms_per_gate_by_positions"`
}

type fusedRow struct {
	Qubits    int     `json:"n"`
	Gates     int     `json:"gates"`
	MsPerGate float64 `json:"ms_per_gate"`
	Speedup   float64 `json:"speedup_over_one_by_one"`
}

type singleRow struct {
	Qubits    int     `json:"n"`
	MsPerGate float64 `json:"ms_per_gate"`
	Effective float64 `json:"effective_gbs"`
	Fraction  float64 `json:"bandwidth_fraction"`
	Triad     float64 `json:"triad_gbs"`
	// Kinds holds ms per gate for each position class.
	Kinds map[string]float64 `json:"ms_per_gate_by_positions"`
}

type momentRow struct {
	Qubits      int     `json:"n"`
	MsPerUpdate float64 `json:"ms_per_update"`
	Effective   float64 `json:"effective_gbs"`
	Fraction    float64 `json:"bandwidth_fraction"`
	Triad       float64 `json:"triad_gbs"`
	// Pairs holds ms per update for each pair of the engine's benchmark.
	Pairs map[string]float64 `json:"ms_per_update_by_pair"`
}

type scanResult struct {
	Graph        string   `json:"graph"`
	Depths       int      `json:"depths"`
	Instances    int      `json:"instances"`
	GoSeconds    float64  `json:"go_seconds"`
	NumpySeconds *float64 `json:"numpy_seconds"`
	Python       string   `json:"python,omitempty"`
	NumpyBLAS    string   `json:"numpy_blas,omitempty"`
	GoRatio      float64  `json:"go_collision_ratio_last"`
	NumpyRatio   *float64 `json:"numpy_collision_ratio_last"`
}

func main() {
	fs := pflag.NewFlagSet("bench", pflag.ContinueOnError)
	asJSON := fs.Bool("json", false, "print one JSON document instead of the table")
	from := fs.Int("from", 20, "smallest state size (qubits) for gate throughput")
	to := fs.Int("to", 26, "largest state size (qubits) for gate throughput")
	grid := fs.String("scan-grid", "4x6", "grid of the end-to-end scan (RxC)")
	depth := fs.Int("scan-depth", 20, "the scan reads out depths 1..this")
	instances := fs.Int("scan-instances", 2, "instances of the scan")
	numpy := fs.String("numpy", "auto", "auto: run the numpy baseline when python3 has numpy; off: skip it")
	momentN := fs.String("moments", "24,26", "qubit counts for the moment engine")
	workers := fs.Int("workers", runtime.NumCPU(), "goroutines for every measurement")
	large := fs.String("large", "", "only run a one-instance scan of GRAPH (e.g. grid:5x6, line:31) at --large-depths and report its time")
	largeDepths := fs.String("large-depths", "1", "depths of the --large scan: a list like 1,2,4")
	precision := fs.String("precision", "double", "precision of the --large scan: double or single")
	profile := fs.String("cpuprofile", "", "write a CPU profile (go tool pprof) of the whole run to FILE")
	if err := fs.Parse(os.Args[1:]); err != nil {
		if errors.Is(err, pflag.ErrHelp) {
			return
		}
		os.Exit(2)
	}
	if *profile != "" {
		f, err := os.Create(*profile)
		if err != nil {
			fmt.Fprintln(os.Stderr, "bench:", err)
			os.Exit(1)
		}
		if err := pprof.StartCPUProfile(f); err != nil {
			fmt.Fprintln(os.Stderr, "bench:", err)
			os.Exit(1)
		}
		defer func() {
			pprof.StopCPUProfile()
			f.Close()
		}()
	}
	log := func(format string, args ...any) { fmt.Fprintf(os.Stderr, format+"\n", args...) }
	if *large != "" {
		if err := largeScan(os.Stdout, *large, *largeDepths, *precision, *workers); err != nil {
			log("bench: %v", err)
		}
		return
	}

	r := &report{Machine: cpuModel(), Cores: runtime.NumCPU(), GoVersion: runtime.Version()}
	log("triad bandwidth on %d goroutines…", *workers)
	r.Load = loadAverage()
	r.Bandwidth = triad(*workers, 10)
	// Each row alternates rounds of the triad and of its own measurement and
	// keeps the best of each, so that both see the same load from other
	// users of the machine; bandwidth_gbs is the best triad of the run.
	note := func(bw float64) { r.Bandwidth = max(r.Bandwidth, bw) }
	for n := *from; n <= *to; n++ {
		log("gates at n = %d…", n)
		row := gates(n, *workers)
		note(row.Triad)
		r.Gates = append(r.Gates, row)
		r.Fused = append(r.Fused, fused(n, *workers))
	}
	for _, n := range []int{24, 26} {
		if n < *from || n > *to {
			continue
		}
		log("single precision at n = %d…", n)
		row := single(n, *workers)
		note(row.Triad)
		r.Single = append(r.Single, row)
	}
	for _, f := range strings.Split(*momentN, ",") {
		var n int
		if _, err := fmt.Sscan(f, &n); err != nil || n < 2 {
			continue
		}
		log("moment engine at n = %d…", n)
		row := momentEngine(n, *workers)
		note(row.Triad)
		r.Moments = append(r.Moments, row)
	}
	var rows, cols int
	if _, err := fmt.Sscanf(*grid, "%dx%d", &rows, &cols); err == nil && *depth > 0 && *instances > 0 {
		log("scan of grid:%s, depths 1..%d, %d instances…", *grid, *depth, *instances)
		sr, err := scanBench(rows, cols, *depth, *instances, *workers)
		if err != nil {
			log("scan: %v", err)
		} else {
			r.Scan = sr
			if *numpy != "off" {
				if py := findNumpy(); py != "" {
					log("numpy baseline with %s…", py)
					secs, last, blas, err := numpyScan(py, rows, cols, *depth, *instances)
					if err != nil {
						log("numpy: %v", err)
						r.Notes = append(r.Notes, "numpy baseline failed: "+err.Error())
					} else {
						sr.NumpySeconds, sr.NumpyRatio, sr.Python, sr.NumpyBLAS = &secs, &last, py, blas
						ratio := secs / sr.GoSeconds
						r.Ratio = &ratio
					}
				} else {
					r.Notes = append(r.Notes, "numpy not installed (apt-get install python3-numpy): no numpy_ratio")
				}
			}
		}
	}
	if *asJSON {
		enc := json.NewEncoder(os.Stdout)
		enc.SetIndent("", "  ")
		_ = enc.Encode(r)
		return
	}
	printTable(os.Stdout, r)
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

// gates measures Apply2 of a Haar gate at n qubits for each position class;
// ms_per_gate is their mean, effective traffic 32·2^n bytes per gate.
func gates(n, workers int) gateRow {
	s, err := sim.NewState(n, 0)
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	randomFill(s.Amp, workers)
	var m [16]complex128
	circuits.HaarUnitary(rand.New(rand.NewPCG(2, 3)), 4, m[:])
	cases := map[string]func(){}
	for kind, p := range gatePairs(n) {
		cases[kind] = func() { s.Apply2(p[0], p[1], &m, workers) }
	}
	bw, best := interleaved(workers, 3, max(3, min(100, (1<<27)>>n)), cases)
	t := meanOf(best)
	eff := 32 * math.Ldexp(1, n) / t / 1e9
	return gateRow{Qubits: n, MsPerGate: t * 1e3, Effective: eff, Triad: bw, Fraction: eff / bw, Kinds: millis(best)}
}

// single measures State64.Apply2 (8 bytes per amplitude read and written).
func single(n, workers int) singleRow {
	s, err := sim.NewState64(n, 0)
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	for i := range s.Amp {
		s.Amp[i] = complex(float32(1/math.Sqrt(float64(len(s.Amp)))), 0)
	}
	var m [16]complex128
	circuits.HaarUnitary(rand.New(rand.NewPCG(2, 3)), 4, m[:])
	cases := map[string]func(){}
	for kind, p := range gatePairs(n) {
		cases[kind] = func() { s.Apply2(p[0], p[1], &m, workers) }
	}
	bw, best := interleaved(workers, 3, 3, cases)
	t := meanOf(best)
	eff := 16 * math.Ldexp(1, n) / t / 1e9
	return singleRow{Qubits: n, MsPerGate: t * 1e3, Effective: eff, Triad: bw, Fraction: eff / bw, Kinds: millis(best)}
}

// fused measures a 20-layer brickwork on a line of n qubits run as one fused
// sequence (sim.State.Run) and gate by gate (Apply2), per gate, in
// alternating rounds.
func fused(n, workers int) fusedRow {
	s, err := sim.NewState(n, 0)
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	randomFill(s.Amp, workers)
	rng := rand.New(rand.NewPCG(4, 5))
	var ops []sim.Op
	for layer := 0; layer < 20; layer++ {
		for a := layer % 2; a+1 < n; a += 2 {
			op := sim.Op{A: a, B: a + 1}
			circuits.HaarUnitary(rng, 4, op.M[:])
			ops = append(ops, op)
		}
	}
	_, best := interleaved(workers, 2, 1, map[string]func(){
		"fused": func() { _ = s.Run(context.Background(), ops, workers) },
		"one-by-one": func() {
			for i := range ops {
				s.Apply2(ops[i].A, ops[i].B, &ops[i].M, workers)
			}
		},
	})
	ms := best["fused"] * 1e3 / float64(len(ops))
	return fusedRow{Qubits: n, Gates: len(ops), MsPerGate: ms, Speedup: best["one-by-one"] / best["fused"]}
}

// momentEngine times pair updates of the exact engine: 16·2^n bytes each.
func momentEngine(n, workers int) momentRow {
	e, err := moments.NewEngine(n, workers)
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
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
	return momentRow{Qubits: n, MsPerUpdate: t * 1e3, Effective: eff, Triad: bw, Fraction: eff / bw, Pairs: millis(best)}
}

// scanBench runs the end-to-end scan in process, as `mixdepth scan` would.
func scanBench(rows, cols, depth, instances, workers int) (*scanResult, error) {
	spec := fmt.Sprintf("grid:%dx%d", rows, cols)
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
	cfg := &scan.Config{Graph: g, Schedule: sch, Ensemble: ens, Seed: 1, Workers: workers}
	for d := 1; d <= depth; d++ {
		cfg.Depths = append(cfg.Depths, d)
	}
	for i := 0; i < instances; i++ {
		cfg.Instances = append(cfg.Instances, i)
	}
	start := time.Now()
	recs, _, err := scan.Run(context.Background(), cfg)
	if err != nil {
		return nil, err
	}
	secs := time.Since(start).Seconds()
	sum := scan.Estimate(g.Qubits, recs, 0.95, 0.05)
	return &scanResult{Graph: spec, Depths: depth, Instances: instances, GoSeconds: secs,
		GoRatio: sum.Rows[len(sum.Rows)-1].Ratio}, nil
}

// largeScan runs one instance of a layered Haar scan of the graph spec at the
// given depths and precision, and prints each record with the elapsed time.
func largeScan(w io.Writer, spec, depths, precision string, workers int) error {
	g, err := circuits.ParseGraph(spec)
	if err != nil {
		return err
	}
	sch, err := circuits.NewSchedule("layered", g)
	if err != nil {
		return err
	}
	ens, err := circuits.NewEnsemble("haar")
	if err != nil {
		return err
	}
	cfg := &scan.Config{Graph: g, Schedule: sch, Ensemble: ens, Seed: 1, Workers: workers, Instances: []int{0}, Precision: scan.Precision(precision)}
	for _, f := range strings.Split(depths, ",") {
		var d int
		if _, err := fmt.Sscan(f, &d); err != nil {
			return fmt.Errorf("--large-depths %q: %w", depths, err)
		}
		cfg.Depths = append(cfg.Depths, d)
	}
	start := time.Now()
	recs, _, err := scan.Run(context.Background(), cfg)
	if err != nil {
		return err
	}
	fmt.Fprintf(w, "%s (%d qubits), %s precision, %d workers: %.1f s\n", spec, g.Qubits, precision, workers, time.Since(start).Seconds())
	for _, r := range recs {
		fmt.Fprintf(w, "depth %d: gates %d, Z/Z_H %.6f, PT KS %.6g\n", r.Depth, r.GateCount, r.Ratio, r.KS)
	}
	return nil
}

// findNumpy returns a python3 that imports numpy: Debian's /usr/bin/python3
// first (python3-numpy), then python3 on PATH; "" when there is none.
func findNumpy() string {
	for _, py := range []string{"/usr/bin/python3", "python3"} {
		if exec.Command(py, "-c", "import numpy").Run() == nil {
			return py
		}
	}
	return ""
}

// numpyScan runs scripts/numpy_scan.py and returns its elapsed seconds (its
// own timer, which excludes the interpreter's start) and its collision ratio
// at the last depth. OPENBLAS_CORETYPE and OPENBLAS_L2_SIZE are removed from
// its environment: they pin an old OpenBLAS kernel on this machine and would
// slow numpy (see the environment notes); numpy's tensordot calls BLAS.
func numpyScan(py string, rows, cols, depth, instances int) (secs, last float64, blas string, err error) {
	cmd := exec.Command(py, "scripts/numpy_scan.py", "--rows", fmt.Sprint(rows), "--cols", fmt.Sprint(cols),
		"--depth", fmt.Sprint(depth), "--instances", fmt.Sprint(instances))
	for _, kv := range os.Environ() {
		if !strings.HasPrefix(kv, "OPENBLAS_CORETYPE=") && !strings.HasPrefix(kv, "OPENBLAS_L2_SIZE=") {
			cmd.Env = append(cmd.Env, kv)
		}
	}
	cmd.Stderr = os.Stderr
	out, err := cmd.Output()
	if err != nil {
		return 0, 0, "", err
	}
	var res struct {
		Seconds float64           `json:"seconds"`
		Ratio   []float64         `json:"collision_ratio"`
		Numpy   string            `json:"numpy"`
		BLAS    []json.RawMessage `json:"blas"`
	}
	if err := json.Unmarshal(out, &res); err != nil {
		return 0, 0, "", fmt.Errorf("numpy_scan.py output: %w", err)
	}
	if len(res.Ratio) == 0 {
		return 0, 0, "", fmt.Errorf("numpy_scan.py reported no depths")
	}
	blas = "numpy " + res.Numpy
	for _, b := range res.BLAS {
		blas += " " + string(b)
	}
	return res.Seconds, res.Ratio[len(res.Ratio)-1], blas, nil
}

func printTable(w io.Writer, r *report) {
	fmt.Fprintf(w, "machine: %s, %d cores, %s\n", r.Machine, r.Cores, r.GoVersion)
	fmt.Fprintf(w, "load average at start: %s\n", r.Load)
	fmt.Fprintf(w, "triad bandwidth: %.1f GB/s (STREAM convention, 24 bytes per element; best of the run)\n", r.Bandwidth)
	fmt.Fprintf(w, "fraction = effective GB/s / the row's own triad (best of rounds alternating with the row's timings)\n\n")
	fmt.Fprintf(w, "two-qubit gates, complex128 (32·2^n bytes per gate), mean over position classes\n")
	fmt.Fprintf(w, "%4s %10s %8s %8s %9s %14s %8s\n", "n", "ms/gate", "GB/s", "triad", "fraction", "fused ms/gate", "speedup")
	for i, g := range r.Gates {
		f := r.Fused[i]
		fmt.Fprintf(w, "%4d %10.3f %8.1f %8.1f %9.2f %14.3f %8.2f\n", g.Qubits, g.MsPerGate, g.Effective, g.Triad, g.Fraction, f.MsPerGate, f.Speedup)
	}
	if len(r.Single) > 0 {
		fmt.Fprintf(w, "\ntwo-qubit gates, complex64 (16·2^n bytes per gate)\n")
		fmt.Fprintf(w, "%4s %10s %8s %8s %9s\n", "n", "ms/gate", "GB/s", "triad", "fraction")
		for _, g := range r.Single {
			fmt.Fprintf(w, "%4d %10.3f %8.1f %8.1f %9.2f\n", g.Qubits, g.MsPerGate, g.Effective, g.Triad, g.Fraction)
		}
	}
	fmt.Fprintf(w, "\nmoment engine (16·2^n bytes per pair update)\n")
	fmt.Fprintf(w, "%4s %10s %8s %8s %9s\n", "n", "ms/update", "GB/s", "triad", "fraction")
	for _, m := range r.Moments {
		fmt.Fprintf(w, "%4d %10.3f %8.1f %8.1f %9.2f\n", m.Qubits, m.MsPerUpdate, m.Effective, m.Triad, m.Fraction)
	}
	if s := r.Scan; s != nil {
		fmt.Fprintf(w, "\nscan %s, depths 1..%d, %d instances, haar: Go %.2f s (R at the last depth %.3f)\n", s.Graph, s.Depths, s.Instances, s.GoSeconds, s.GoRatio)
		if s.NumpySeconds != nil {
			fmt.Fprintf(w, "numpy (%s; %s): %.2f s (R %.3f); ratio %.1f×\n", s.Python, s.NumpyBLAS, *s.NumpySeconds, *s.NumpyRatio, *r.Ratio)
		}
	}
	for _, n := range r.Notes {
		fmt.Fprintf(w, "note: %s\n", n)
	}
}
