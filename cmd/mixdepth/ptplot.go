package main

import (
	"context"
	"errors"
	"fmt"
	"io"

	"mixdepth/plots"
	"mixdepth/runs"
	"mixdepth/scan"
	"mixdepth/stats"
	"mixdepth/tables"
)

func init() {
	register(command{name: "pt-plot", summary: "plot the output probabilities of a scan's circuits against the Porter–Thomas law", run: runPTPlot})
}

func runPTPlot(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("pt-plot FILE --out PLOT.png|PLOT.svg", "FILE is a per-instance scan table.\n\nRebuilds the circuits of a per-instance scan table from its metadata, simulates some of its\ninstances again to one depth, and draws the histogram of the rescaled output probabilities D·p\nagainst the Porter–Thomas density e^(−x) and the exact finite-D Haar law. Each re-simulated\ninstance is checked against the collision probability the table records.",
		"mixdepth pt-plot scan.parquet --depth 8 --instances 20 --out pt-depth8.png", stdout)
	depth := fs.Int("depth", 0, "depth to simulate (default: the table's recommended depth, else its deepest depth)")
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
		d = defaultPTDepth(t.Meta, s.spec, records)
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

	rep, err := s.spec.Replay(ctx, ids, d, recorded, *workers)
	var mismatch *runs.ReplayMismatchError
	switch {
	case errors.As(err, &mismatch):
		return usageError{fmt.Errorf("%s: %w", path, err)}
	case errors.Is(err, context.Canceled):
		return errInterrupted
	case err != nil:
		return err
	}
	dim := 1 << s.graph.Qubits
	title := fmt.Sprintf("%s, %s schedule, %s gates: depth %d (D = %d)", s.graph.Name, s.schedule.Kind(), s.ensemble.Name(), d, dim)
	if err := plots.SavePorterThomasPlot(*out, rep.Probabilities, d, title); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "Porter–Thomas plot of %d instance(s) × %d outcomes at depth %d: mean KS distance to Beta(1, D−1) %.4f; %d instance(s) matched the table's collision probability → %s\n",
		len(ids), dim, d, stats.Summarize(rep.KS).Mean, rep.Matched, *out)
	return nil
}

// defaultPTDepth is the recommended depth of the table's summary under
// its own criteria, or its deepest depth when there is none.
func defaultPTDepth(meta tables.Meta, sp *runs.Spec, records []scan.Record) int {
	sum := sp.Estimate(records, recordedCriteria(meta))
	if sum.Found {
		return sum.Depth
	}
	return sum.Rows[len(sum.Rows)-1].Depth
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
