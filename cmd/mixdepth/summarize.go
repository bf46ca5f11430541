package main

import (
	"context"
	"fmt"
	"io"

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
	fs := newFlags("summarize", "mixdepth summarize FILE...: each FILE is a per-instance scan table.\n\nReads one or more per-instance scan tables of one run (a whole run, or its shards) and prints\nthe per-depth summary that scan prints: R = mean(Z)/Z_H with its confidence interval, the\nPorter–Thomas distance and the anti-concentration depth. --json prints the scan --json document.",
		"mixdepth summarize shard-0.parquet shard-1.parquet --eps 0.02", stdout)
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
	first := run.tables[0]
	if cmd, _ := first.t.Meta.Get("command"); cmd != "scan" {
		return badInput("%s was written by %q, not scan: summarize reads per-instance scan tables", first.path, cmd)
	}
	if !fs.Changed("eps") {
		*eps = metaFloatOr(first.t.Meta, "eps", fallbackEps)
	}
	if !fs.Changed("confidence") {
		*conf = metaFloatOr(first.t.Meta, "confidence", fallbackConfidence)
	}
	if err := checkUnit("eps", *eps); err != nil {
		return err
	}
	if err := checkUnit("confidence", *conf); err != nil {
		return err
	}
	s, err := setupFromMeta(first.t.Meta)
	if err != nil {
		return usageError{fmt.Errorf("%s: %w", first.path, err)}
	}
	seed, err := metaUint(first.t.Meta, "seed")
	if err != nil {
		return usageError{fmt.Errorf("%s: %w", first.path, err)}
	}
	var records []scan.Record
	for _, rt := range run.tables {
		recs, err := scanRecords(rt.t)
		if err != nil {
			return badInput("%s: not a per-instance scan table: %v", rt.path, err)
		}
		records = append(records, recs...)
	}
	if len(records) == 0 {
		return badInput("the tables hold no rows: nothing to summarize")
	}
	if err := checkComplete(records, len(run.done)); err != nil {
		return err
	}
	// In scan's order, (depth, instance), so that the sums are added in the
	// same order and the summary agrees with scan's to the last bit.
	records = mergeRecords(records, nil)
	if missing := run.missing(); len(missing) > 0 {
		fmt.Fprintf(stderr, "mixdepth: note: summarizing %d of the run's %d instances (missing %s)\n", len(run.done), run.instances, briefIDs(missing))
	}
	sum := scan.Estimate(s.graph.Qubits, records, *conf, *eps)
	if *asJSON {
		return writeJSON(stdout, scanDocument(s, seed, len(run.done), *eps, *conf, sum))
	}
	printScan(stdout, s, &circuitFlags{seed: seed}, instancesNote(len(run.done), shardSpec{0, 1}, len(run.done)), *eps, *conf, sum)
	return nil
}

// checkComplete checks that every depth has one record per instance, as a
// scan writes them, so that each depth's mean is over the same instances.
func checkComplete(records []scan.Record, instances int) error {
	perDepth := map[int]int{}
	seen := map[[2]int]bool{}
	var order []int
	for _, r := range records {
		key := [2]int{r.Depth, r.Instance}
		if seen[key] {
			return badInput("depth %d, instance %d appears twice: the tables are not whole per-instance scan tables", r.Depth, r.Instance)
		}
		seen[key] = true
		if perDepth[r.Depth] == 0 {
			order = append(order, r.Depth)
		}
		perDepth[r.Depth]++
	}
	for _, d := range order {
		if perDepth[d] != instances {
			return badInput("depth %d has %d rows for %d instances: the tables are not whole per-instance scan tables", d, perDepth[d], instances)
		}
	}
	return nil
}
