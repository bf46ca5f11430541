package main

import (
	"context"
	"fmt"
	"io"

	"mixdepth/runs"
	"mixdepth/scan"
)

func init() {
	register(command{name: "summarize", summary: "recompute a scan's per-depth summary from its per-instance tables", run: runSummarize})
}

// The eps and confidence of a table written before scan recorded them: the
// defaults of scan's --eps and --confidence.
const (
	fallbackEps        = 0.05
	fallbackConfidence = 0.95
)

func runSummarize(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("summarize", "mixdepth summarize FILE...: each FILE is a per-instance scan table.\n\nReads one or more per-instance scan tables of one run (a whole run, or its parts) and prints\nthe per-depth summary that scan prints: R = mean(Z)/Z_H with its confidence interval, the\nPorter–Thomas distance and the anti-concentration depth. --json prints the scan --json document.",
		"mixdepth summarize part-0.parquet part-1.parquet --eps 0.02", stdout)
	eps := fs.Float64("eps", fallbackEps, "anti-concentration threshold; the fallback when the table records none")
	conf := fs.Float64("confidence", fallbackConfidence, "confidence level of the interval for R; the fallback when the table records none")
	asJSON := fs.Bool("json", false, "print one JSON document instead of the text report")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() == 0 {
		return badInput("summarize needs at least one scan table: mixdepth summarize FILE...")
	}
	run, err := readRun(fs.Args())
	if err != nil {
		return err
	}
	first := run.Members[0]
	if cmd, _ := first.Table.Meta.Get("command"); cmd != "scan" {
		return badInput("%s was written by %q, not scan: summarize reads per-instance scan tables", first.Path, cmd)
	}
	if !fs.Changed("eps") {
		*eps = metaFloatOr(first.Table.Meta, "eps", fallbackEps)
	}
	if !fs.Changed("confidence") {
		*conf = metaFloatOr(first.Table.Meta, "confidence", fallbackConfidence)
	}
	if err := checkUnit("eps", *eps); err != nil {
		return err
	}
	if err := checkUnit("confidence", *conf); err != nil {
		return err
	}
	s, err := setupFromMeta(first.Table.Meta)
	if err != nil {
		return usageError{fmt.Errorf("%s: %w", first.Path, err)}
	}
	// In scan's order, (depth, instance), so that the sums are added in the
	// same order and the summary agrees with scan's to the last bit.
	records, err := run.ScanRecords()
	if err != nil {
		return usageError{err}
	}
	if missing := run.Missing(); len(missing) > 0 {
		fmt.Fprintf(stderr, "mixdepth: note: summarizing %d of the run's %d instances (missing %s)\n", len(run.Done), run.Instances, briefIDs(missing))
	}
	sum := scan.Estimate(s.graph.Qubits, records, *conf, *eps)
	if *asJSON {
		return writeJSON(stdout, scanDocument(s, s.spec.Seed, len(run.Done), *eps, *conf, sum))
	}
	printScan(stdout, s, &circuitFlags{seed: s.spec.Seed}, instancesNote(len(run.Done), runs.Whole, len(run.Done)), *eps, *conf, sum)
	return nil
}
