package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"

	"mixdepth/plots"
	"mixdepth/runs"
	"mixdepth/sampling"
	"mixdepth/scan"
	"mixdepth/sim"
	"mixdepth/stats"
	"mixdepth/tables"
)

func init() {
	register(command{name: "pt-plot", summary: "plot the output probabilities of a scan's circuits against the Porter–Thomas law", run: runPTPlot})
}

// ptRelTol is the relative difference allowed between a collision
// probability re-simulated by pt-plot and the one its table records. The
// gates are the same, applied in the same order; but scan reads out several
// depths from one run, applying the final single-qubit layer (if any) for
// each readout and undoing it, which perturbs the state by rounding, about
// 1e-16 per readout, and the sums may split differently across goroutines.
// 1e-12 is far above that and far below any real mismatch (another seed or
// circuit changes Z in the first digits).
const ptRelTol = 1e-12

func runPTPlot(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("pt-plot", "mixdepth pt-plot FILE --out PLOT.png|PLOT.svg: FILE is a per-instance scan table.\n\nRebuilds the circuits of a per-instance scan table from its metadata, simulates some of its\ninstances again to one depth, and draws the histogram of the rescaled output probabilities D·p\nagainst the Porter–Thomas density e^(−x) and the exact finite-D Haar law. Each re-simulated\ninstance is checked against the collision probability the table records.",
		"mixdepth pt-plot scan.parquet --depth 8 --instances 20 --out pt-depth8.png", stdout)
	depth := fs.Int("depth", 0, "depth to simulate (default: the table's anti-concentration depth, else its deepest depth)")
	instances := fs.Int("instances", 20, "number of the run's instances to simulate (the lowest ids)")
	out := fs.String("out", "", "plot file, FILE.png or FILE.svg (required)")
	workers := fs.Int("workers", defaultWorkers(), "worker goroutines for large states")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() != 1 {
		return badInput("pt-plot takes one table file (got %d arguments): mixdepth pt-plot FILE --out PLOT.png", fs.NArg())
	}
	if *out == "" {
		return badInput("pt-plot: --out PLOT.png or --out PLOT.svg is required")
	}
	var files ioCheck
	files.input("table", fs.Arg(0))
	files.output("out", *out)
	if err := files.check(fs); err != nil {
		return err
	}
	if err := plots.CheckPath(*out); err != nil {
		return usageError{fmt.Errorf("--out: %w", err)}
	}
	if *instances < 1 {
		return badInput("--instances %d: must be at least 1", *instances)
	}
	if *depth < 0 || *depth == 0 && fs.Changed("depth") {
		return badInput("--depth %d: must be positive", *depth)
	}
	if *workers < 1 {
		return badInput("--workers %d: must be at least 1", *workers)
	}
	path := fs.Arg(0)
	t, err := tables.Read(path)
	if err != nil {
		return usageError{err}
	}
	s, err := setupFromMeta(t.Meta)
	if err != nil {
		return usageError{fmt.Errorf("%s: %w", path, err)}
	}
	seed, err := metaUint(t.Meta, "seed")
	if err != nil {
		return usageError{fmt.Errorf("%s: %w", path, err)}
	}
	var records []scan.Record
	if cmd, _ := t.Meta.Get("command"); cmd == "scan" {
		if records, err = runs.ScanRecords(t); err != nil {
			return badInput("%s: a scan table without the scan columns: %v", path, err)
		}
	}
	d := *depth
	if d == 0 {
		if len(records) == 0 {
			return badInput("%s holds no scan rows to choose a depth from: give --depth D", path)
		}
		d = defaultPTDepth(t.Meta, s.graph.Qubits, records)
	}
	if err := checkCircuitDepth(s, d); err != nil {
		return err
	}
	ids, err := tableInstances(t)
	if err != nil {
		return usageError{fmt.Errorf("%s: %w", path, err)}
	}
	if len(ids) == 0 {
		return badInput("%s lists no finished instances", path)
	}
	if len(ids) > *instances {
		ids = ids[:*instances]
	}
	recorded := map[int]float64{}
	for _, r := range records {
		if r.Depth == d {
			recorded[r.Instance] = r.Collision
		}
	}

	n := s.graph.Qubits
	dim := 1 << n
	st, err := sim.NewState(n, float64(len(ids))*float64(dim)*8)
	if err != nil {
		if errors.Is(err, sim.ErrTooLarge) {
			return usageError{err}
		}
		return err
	}
	probs := make([][]float64, len(ids))
	scratch := make([]float64, dim)
	ks := make([]float64, len(ids))
	checked := 0
	for k, id := range ids {
		if ctx.Err() != nil {
			return errInterrupted
		}
		probs[k] = instanceProbabilities(st, s, seed, id, d, *workers, make([]float64, dim))
		ks[k] = stats.KSHaar(probs[k], scratch)
		if want, ok := recorded[id]; ok {
			got := stats.Collision(probs[k])
			if math.Abs(got-want) > ptRelTol*math.Abs(want) {
				return badInput("%s: instance %d at depth %d simulates to Z = %.17g but the table records %.17g: its metadata does not rebuild its circuits (an edited table, or one from another mixdepth version)", path, id, d, got, want)
			}
			checked++
		}
	}
	title := fmt.Sprintf("%s, %s schedule, %s gates: depth %d (D = %d)", s.graph.Name, s.schedule.Kind(), s.ensemble.Name(), d, dim)
	if err := plots.SavePorterThomasPlot(*out, probs, d, title); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "Porter–Thomas plot of %d instance(s) × %d outcomes at depth %d: mean KS distance to Beta(1, D−1) %.4f; %d instance(s) matched the table's collision probability → %s\n",
		len(ids), dim, d, stats.Summarize(ks).Mean, checked, *out)
	return nil
}

// defaultPTDepth is the anti-concentration depth of the table's summary at
// its own eps and confidence, or its deepest depth when none qualifies.
func defaultPTDepth(meta tables.Meta, qubits int, records []scan.Record) int {
	eps, conf := metaFloatOr(meta, "eps", fallbackEps), metaFloatOr(meta, "confidence", fallbackConfidence)
	sum := scan.Estimate(qubits, records, conf, eps)
	if sum.Found {
		return sum.Depth
	}
	return sum.Rows[len(sum.Rows)-1].Depth
}

// instanceProbabilities simulates instance id of the run described by s and
// seed to the given depth as scan does, final single-qubit layer included
// (sampling.Build), and returns the output probabilities in dst.
func instanceProbabilities(st *sim.State, s *setup, seed uint64, id, depth, workers int, dst []float64) []float64 {
	return sampling.Build(s.schedule, s.ensemble, s.graph.Qubits, seed, id, depth).Probabilities(st, dst, workers)
}

// tableInstances returns the finished instance ids of a table
// (runs.TableInstances).
func tableInstances(t *tables.Table) ([]int, error) { return runs.TableInstances(t) }

// setupFromMeta rebuilds the circuits of a run from the metadata of a table
// it wrote (runs.FromMeta). Errors name the key at fault.
func setupFromMeta(meta tables.Meta) (*setup, error) {
	sp, err := runs.FromMeta(meta)
	if err != nil {
		return nil, err
	}
	return newSetup(sp), nil
}

// metaInt, metaUint and metaFloatOr read metadata values (runs.MetaInt,
// runs.MetaUint, runs.MetaFloatOr).
func metaInt(meta tables.Meta, key string) (int, error)     { return runs.MetaInt(meta, key) }
func metaUint(meta tables.Meta, key string) (uint64, error) { return runs.MetaUint(meta, key) }
func metaFloatOr(meta tables.Meta, key string, def float64) float64 {
	return runs.MetaFloatOr(meta, key, def)
}
