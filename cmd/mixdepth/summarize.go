package main

import (
	"context"
	"fmt"
	"io"

	"github.com/spf13/pflag"

	"mixdepth/plots"
	"mixdepth/runs"
	"mixdepth/scan"
	"mixdepth/stats"
	"mixdepth/tables"
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

// recorded says, in summarize --help, where a verdict flag's default comes
// from.
const recorded = "; unless given, the value the tables record (the default shown is for tables that record none)"

// recordedCriteria returns the verdict criteria a scan table records, with
// scan's defaults for the keys it lacks (tables written before scan
// recorded them) or holds out of range.
func recordedCriteria(meta tables.Meta) stats.Criteria {
	in := func(key string, def, lo, hi float64) float64 {
		if v := metaFloatOr(meta, key, def); v > lo && v < hi {
			return v
		}
		return def
	}
	c := stats.Criteria{
		Eps: in("eps", fallbackEps, 0, 1), Confidence: in("confidence", fallbackConfidence, 0, 1),
		PTMargin: in("pt_margin", stats.DefaultPTMargin, -1e-300, 1), Rule: stats.RuleBoth,
	}
	if r, _ := meta.Get("rule"); r == string(stats.RuleCollision) {
		c.Rule = stats.RuleCollision
	}
	return c
}

func runSummarize(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("summarize FILE...", "Each FILE is a per-instance scan table.\n\nReads one or more per-instance scan tables of one run (a whole run, or its parts) and prints\nthe per-depth summary that scan prints: R = mean(Z)/Z_H with its confidence interval, the\nPorter–Thomas distance beside the Haar value, each depth's verdict and the recommended depth.\n--json prints the scan --json document; --plot draws the chart of scan --plot.",
		"mixdepth summarize part-0.parquet part-1.parquet --eps 0.02 --plot sweep.png", stdout)
	vf := addRecordedVerdictFlags(fs)
	plot := fs.String("plot", "", "draw R − 1 against depth with its confidence band to FILE.png or FILE.svg, as scan --plot does")
	asJSON := fs.Bool("json", false, "print one JSON document instead of the text report")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() == 0 {
		return badInput("summarize needs at least one scan table: mixdepth summarize FILE...")
	}
	if *plot != "" {
		if err := plots.CheckPath(*plot); err != nil {
			return usageError{fmt.Errorf("--plot: %w", err)}
		}
	}
	sc, err := loadScan(fs, vf, fs.Args(), "summarize")
	if err != nil {
		return err
	}
	s, run, sum := sc.setup, sc.run, sc.curve
	if missing := run.Missing(); len(missing) > 0 {
		fmt.Fprintf(stderr, "mixdepth: note: summarizing %d of the run's %d instances (missing %s)\n", len(run.Done), run.Instances, briefIDs(missing))
	}
	if *plot != "" {
		if err := saveScanPlot(*plot, s, sum, run.ExactRatios(s.spec.Limit())); err != nil {
			return err
		}
	}
	if *asJSON {
		return writeJSON(stdout, scanDocument(s, s.spec.Seed, len(run.Done), sum))
	}
	printScan(stdout, s, &circuitFlags{seed: s.spec.Seed}, instancesNote(len(run.Done), runs.Whole, len(run.Done)), sum)
	if *plot != "" {
		fmt.Fprintf(stdout, "Plot: %s\n", *plot)
	}
	return nil
}

// addRecordedVerdictFlags adds the verdict flags of a command that reads
// scan tables, whose defaults are the values the tables record.
func addRecordedVerdictFlags(fs *pflag.FlagSet) *verdictFlags {
	vf := addVerdictFlags(fs)
	for _, name := range []string{"eps", "confidence", "pt-margin", "rule"} {
		fs.Lookup(name).Usage += recorded
	}
	return vf
}

// loadedScan is a scan run read back from its tables and summarised.
type loadedScan struct {
	setup *setup
	run   *runs.Set
	curve *scan.Curve
}

// loadScan reads the per-instance scan tables paths of one run and
// summarises them under the verdict flags vf, each flag the user did not
// give taking the value the tables record. cmd names the command in errors.
func loadScan(fs *pflag.FlagSet, vf *verdictFlags, paths []string, cmd string) (*loadedScan, error) {
	run, err := readRun(paths)
	if err != nil {
		return nil, err
	}
	first := run.Members[0]
	if by, _ := first.Table.Meta.Get("command"); by != "scan" {
		return nil, badInput("%s was written by %q, not scan: %s reads per-instance scan tables", first.Path, by, cmd)
	}
	rec := recordedCriteria(first.Table.Meta)
	v := *vf
	eps, conf, margin, rule := *vf.eps, *vf.conf, *vf.margin, *vf.rule
	v.eps, v.conf, v.margin, v.rule = &eps, &conf, &margin, &rule
	if !fs.Changed("eps") {
		eps = rec.Eps
	}
	if !fs.Changed("confidence") {
		conf = rec.Confidence
	}
	if !fs.Changed("pt-margin") {
		margin = rec.PTMargin
	}
	if !fs.Changed("rule") {
		rule = string(rec.Rule)
	}
	crit, err := v.criteria()
	if err != nil {
		return nil, err
	}
	s, err := setupFromMeta(first.Table.Meta)
	if err != nil {
		return nil, usageError{fmt.Errorf("%s: %w", first.Path, err)}
	}
	// In scan's order, (depth, instance), so that the sums are added in the
	// same order and the summary agrees with scan's to the last bit.
	records, err := run.ScanRecords()
	if err != nil {
		return nil, usageError{err}
	}
	return &loadedScan{setup: s, run: run, curve: s.spec.Estimate(records, crit)}, nil
}
