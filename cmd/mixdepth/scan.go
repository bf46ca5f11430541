package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/schollz/progressbar/v3"

	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/plots"
	"mixdepth/runs"
	"mixdepth/scan"
	"mixdepth/tables"
)

func init() {
	register(command{name: "scan", summary: "Monte Carlo depth scan: collision probability and Porter–Thomas distance per depth", run: runScan})
}

// scanJSON is the --json document of scan. Field names are an interface.
type scanJSON struct {
	runs.Header
	HaarCollision          float64       `json:"haar_collision"`
	Seed                   uint64        `json:"seed"`
	Instances              int           `json:"instances"`
	Eps                    float64       `json:"eps"`
	Confidence             float64       `json:"confidence"`
	AnticoncentrationDepth *int          `json:"anticoncentration_depth"`
	Rows                   []scanJSONRow `json:"rows"`
}

type scanJSONRow struct {
	Depth          int      `json:"depth"`
	GateCount      int      `json:"gate_count"`
	CollisionMean  float64  `json:"collision_mean"`
	CollisionStder *float64 `json:"collision_stderr"`
	CollisionRatio float64  `json:"collision_ratio"`
	RatioLower     *float64 `json:"ratio_lower"`
	RatioUpper     *float64 `json:"ratio_upper"`
	PTKSMean       float64  `json:"pt_ks_mean"`
	Spread         bool     `json:"spread"`
	// CollisionExact and ExactDeviation are set with --exact: the exact
	// E[Z] and (mean − exact)/stderr.
	CollisionExact *float64 `json:"collision_exact,omitempty"`
	ExactDeviation *float64 `json:"exact_deviation_sigmas,omitempty"`
}

func runScan(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("scan", "Simulates random circuit instances exactly and reports, per depth, the collision probability\nagainst the Haar value 2/(D+1) with a confidence interval, the Porter–Thomas distance, and the\nsmallest depth that anti-concentrates. With no flags it runs the demo chip.",
		"mixdepth scan --graph grid:3x4 --depths 1:16 --instances 400 --out scan.parquet", stdout)
	var cf circuitFlags
	cf.checkGraph = checkStateVector
	cf.add(fs)
	depthSpec := fs.String("depths", "", "depths to report: 2,4,8 or FROM:TO or FROM:TO:STEP (default 1:20; demo 2:24:2)")
	instances := fs.Int("instances", 200, "number of random circuit instances")
	eps := fs.Float64("eps", 0.05, "anti-concentration threshold: a depth is spread when the upper bound of R ≤ 1+eps")
	conf := fs.Float64("confidence", 0.95, "confidence level of the interval for R")
	workers := fs.Int("workers", defaultWorkers(), "worker goroutines")
	out := fs.String("out", "", "write the per-instance table to FILE.arrow or FILE.parquet")
	partFlag := fs.String("part", "", partFlagHelp)
	resume := fs.String("resume", "", "continue the table FILE left by an interrupted scan with the same flags, or extend a finished one with a larger --instances (writes --out, default FILE)")
	precision := fs.String("precision", "double", "amplitude precision: double (complex128) or single (complex64: half the memory, 31 qubits in 16 GiB; collision probability to about 1e-6 relative)")
	plot := fs.String("plot", "", "draw R − 1 against depth with its confidence band to FILE.png or FILE.svg")
	withExact := fs.Bool("exact", false, "also compute the exact E[Z] at each depth (no sampling) and flag depths where the Monte Carlo mean is more than 4 standard errors from it")
	asJSON := fs.Bool("json", false, "print one JSON document instead of the text report")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		return badInput("scan takes no positional arguments (got %q)", fs.Arg(0))
	}
	s, err := cf.resolve()
	if err != nil {
		return err
	}
	if *depthSpec == "" {
		*depthSpec = "1:20"
		if s.demo {
			*depthSpec = "2:24:2"
		}
	}
	depths, err := parseDepths(*depthSpec)
	if err != nil {
		return err
	}
	if *instances <= 0 || *instances > maxInstances {
		return badInput("--instances %d: must be between 1 (2 or more for error bars) and %d", *instances, maxInstances)
	}
	if *instances*len(depths) > 100_000_000 {
		return badInput("--instances %d × %d depths: more than 10^8 per-instance records to hold; use fewer, or parts (--part)", *instances, len(depths))
	}
	if err := checkUnit("eps", *eps); err != nil {
		return err
	}
	if err := checkUnit("confidence", *conf); err != nil {
		return err
	}
	if *workers <= 0 {
		return badInput("--workers %d: must be at least 1", *workers)
	}
	part, err := parsePart(*partFlag)
	if err != nil {
		return err
	}
	if p := scan.Precision(*precision); p != scan.PrecisionDouble && p != scan.PrecisionSingle {
		return badInput("--precision %q: use double or single", *precision)
	}
	if *resume != "" && *out == "" {
		*out = *resume
	}
	var files ioCheck
	files.circuitInputs(&cf)
	files.input("--resume", *resume)
	files.output("out", *out, "--resume")
	files.output("plot", *plot)
	if err := files.check(fs); err != nil {
		return err
	}

	sr := &runs.ScanRun{Spec: s.spec, Depths: depths, Instances: *instances, Eps: *eps, Confidence: *conf,
		Part: part, Precision: scan.Precision(*precision), Exact: *withExact}
	meta := sr.Meta(commandLine())
	fields := runs.ScanFields(*withExact)
	if *out != "" {
		flag := "--out"
		if *resume == *out {
			flag = "--resume"
		}
		if err := checkWritable(*out, fields, meta, flag); err != nil {
			return err
		}
	}
	if *plot != "" {
		if err := plots.CheckPath(*plot); err != nil {
			return usageError{fmt.Errorf("--plot: %w", err)}
		}
	}
	var exact *moments.Result
	if *withExact {
		if exact, err = moments.Exact(ctx, s.graph, s.schedule, s.ensemble, depths, moments.ExactWorkers(*workers), moments.ExactCurveOnly()); err != nil {
			return err
		}
	}

	runIDs := part.Instances(*instances)
	if len(runIDs) == 0 {
		return badInput("--part %s selects no instance of %d; use fewer parts than instances", part, *instances)
	}
	ids := runIDs
	var previous []scan.Record
	if *resume != "" {
		if previous, ids, err = runs.Resume(*resume, meta, runIDs); err != nil {
			return resumeInput(err)
		}
		fmt.Fprintf(stderr, "resuming %s: %d instance(s) done, %d to run\n", *resume, len(runIDs)-len(ids), len(ids))
	}
	cfg := &scan.Config{
		Graph: s.graph, Schedule: s.schedule, Ensemble: s.ensemble,
		Depths: depths, Instances: ids, Seed: cf.seed, Workers: *workers, Precision: scan.Precision(*precision),
	}
	if isTerminal(stderr) && len(ids) > 0 {
		bar := progressbar.NewOptions(len(ids), progressbar.OptionSetWriter(stderr),
			progressbar.OptionSetDescription("simulating instances"), progressbar.OptionShowCount(),
			progressbar.OptionClearOnFinish())
		cfg.Progress = func() { _ = bar.Add(1) }
		defer bar.Finish()
	}
	var records []scan.Record
	if len(ids) > 0 {
		records, _, err = scan.Run(ctx, cfg)
	}
	interrupted := errors.Is(err, context.Canceled)
	if err != nil && !interrupted {
		return err
	}
	records = append(previous, records...)
	runs.SortRecords(records)
	doneAll := runs.RecordInstances(records)
	if *out != "" {
		runs.SetDone(&meta, doneAll, len(doneAll) < len(runIDs))
		if err := runs.WriteScanTable(*out, meta, records, exact.CollisionByDepth()); err != nil {
			return err
		}
	}
	if interrupted {
		msg := fmt.Sprintf("interrupted after %d of %d instance(s) of this run", len(doneAll), len(runIDs))
		if *out != "" {
			msg += fmt.Sprintf("; the finished ones are in %s (partial); continue with the same flags and --resume %s", *out, *out)
		}
		fmt.Fprintln(stderr, msg)
		return errInterrupted
	}
	sum := scan.Estimate(s.graph.Qubits, records, *conf, *eps)
	for _, r := range sum.Rows {
		if r.Collision.N > 1 && r.Collision.StdDev == 0 {
			fmt.Fprintf(stderr, "mixdepth: warning: all %d instances have the same collision probability at depth %d: the gate set draws too few distinct circuits to estimate an ensemble average; its interval is not meaningful\n", r.Collision.N, r.Depth)
			break
		}
	}
	if *plot != "" {
		var curve []float64
		if exact != nil {
			curve = exact.Ratio
		}
		if err := plots.SaveDepthPlot(*plot, curveSeries(sum, curve), *eps, plots.WithConfidence(*conf), plots.WithDepthUnit(depthUnit(s)),
			plots.WithTitle(s.graph.Name+", "+s.ensemble.Name()+" gates")); err != nil {
			return err
		}
	}
	if *asJSON {
		doc := scanDocument(s, cf.seed, len(doneAll), *eps, *conf, sum)
		if exact != nil {
			for k := range doc.Rows {
				z, dev := exact.Collision[k], (sum.Rows[k].Collision.Mean-exact.Collision[k])/sum.Rows[k].Collision.StdErr
				doc.Rows[k].CollisionExact, doc.Rows[k].ExactDeviation = &z, finiteOrNull(dev)
			}
		}
		return writeJSON(stdout, doc)
	}
	printScan(stdout, s, &cf, instancesNote(len(doneAll), part, *instances), *eps, *conf, sum)
	if exact != nil {
		printExactCheck(stdout, sum, exact)
	}
	if *out != "" {
		fmt.Fprintf(stdout, "Per-instance table: %s (%d rows)\n", *out, len(records))
	}
	if *plot != "" {
		fmt.Fprintf(stdout, "Plot: %s\n", *plot)
	}
	return nil
}

// depthUnit names what a depth counts, for plot axes.
func depthUnit(s *setup) string {
	if s.schedule.Kind() == circuits.KindRandomEdge {
		return "gates"
	}
	return "layers"
}

// scanDocument assembles the --json document of a scan summary.
func scanDocument(s *setup, seed uint64, instances int, eps, conf float64, sum *scan.Curve) scanJSON {
	doc := scanJSON{
		Header: s.spec.Header(), HaarCollision: sum.HaarCollision, Seed: seed, Instances: instances, Eps: eps, Confidence: conf,
	}
	if sum.Found {
		d := sum.Depth
		doc.AnticoncentrationDepth = &d
	}
	for _, r := range sum.Rows {
		doc.Rows = append(doc.Rows, scanJSONRow{
			Depth: r.Depth, GateCount: r.GateCount, CollisionMean: r.Collision.Mean, CollisionStder: finiteOrNull(r.Collision.StdErr),
			CollisionRatio: r.Ratio, RatioLower: finiteOrNull(r.Lower), RatioUpper: finiteOrNull(r.Upper), PTKSMean: r.KSMean, Spread: r.Spread,
		})
	}
	return doc
}

// checkWritable fails early (naming flag in the error), before any computation, when path cannot take
// a table: it creates the table's temporary file and removes it again.
func checkWritable(path string, fields []tables.Field, meta tables.Meta, flag string) error {
	w, err := tables.Create(path, fields, meta)
	if err != nil {
		return usageError{fmt.Errorf("%s: %w", flag, err)}
	}
	w.Abort()
	return nil
}

// resumeInput turns a failure of runs.Resume into bad input, with the hint
// for a table of another run.
func resumeInput(err error) error {
	var dr *runs.DifferentRunError
	if errors.As(err, &dr) {
		return usageError{fmt.Errorf("%w; use the same flags as the run that wrote it (only --instances may grow)", err)}
	}
	return usageError{fmt.Errorf("--resume: %w", err)}
}

// printExactCheck compares the Monte Carlo means with the exact values and
// reports every depth more than 4 standard errors away: with a correct
// simulator that happens with probability about 6e-5 per depth, so a flag
// is a defect to report, not noise to hide.
func printExactCheck(w io.Writer, sum *scan.Curve, exact *moments.Result) {
	fmt.Fprintf(w, "\n%6s %12s %12s %10s\n", "depth", "R (MC)", "R (exact)", "MC−exact")
	var bad []string
	for k, r := range sum.Rows {
		dev := (r.Collision.Mean - exact.Collision[k]) / r.Collision.StdErr
		mark := ""
		if math.Abs(dev) > 4 {
			mark = "  ← more than 4 s.e.: please report this"
			bad = append(bad, strconv.Itoa(r.Depth))
		}
		fmt.Fprintf(w, "%6d %12.6f %12.6f %+9.2fσ%s\n", r.Depth, r.Ratio, exact.Ratio[k], dev, mark)
	}
	if len(bad) > 0 {
		fmt.Fprintf(w, "Monte Carlo and exact values disagree beyond 4 standard errors at depth(s) %s: this is a defect; please report it with the command line.\n", strings.Join(bad, ", "))
	} else {
		fmt.Fprintln(w, "Monte Carlo agrees with the exact values within 4 standard errors at every depth.")
	}
}

// printScan writes the human report of a scan.
func printScan(w io.Writer, s *setup, cf *circuitFlags, instances string, eps, conf float64, sum *scan.Curve) {
	fmt.Fprintln(w, s.describe())
	fmt.Fprintf(w, "seed %d · %s · eps %g · confidence %g · Haar collision 2/(D+1) = %.6g\n\n",
		cf.seed, instances, eps, conf, sum.HaarCollision)
	pct := strconv.FormatFloat(100*conf, 'g', 4, 64) + "% interval"
	fmt.Fprintf(w, "%6s %7s %10s  %-21s %9s  %s\n", "depth", "gates", "R=Z/Z_H", pct, "PT dist", "verdict")
	for _, r := range sum.Rows {
		verdict := "too shallow"
		if r.Spread {
			verdict = "spread"
		}
		fmt.Fprintf(w, "%6d %7d %10.4f  [%8.4f, %8.4f]  %9.4f  %s\n", r.Depth, r.GateCount, r.Ratio, r.Lower, r.Upper, r.KSMean, verdict)
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, scanVerdict(sum, eps, conf))
}

// instancesNote says how many instances a summary holds, and of which
// part of how large a run.
func instancesNote(n int, part runs.Part, total int) string {
	note := strconv.Itoa(n) + " instance"
	if n != 1 {
		note += "s"
	}
	if !part.IsWhole() {
		note += fmt.Sprintf(" (part %s of a %d-instance run)", part, total)
	}
	return note
}

// scanVerdict is the one-sentence recommendation.
func scanVerdict(sum *scan.Curve, eps, conf float64) string {
	level := strconv.FormatFloat(100*conf, 'g', 4, 64) + "%"
	if !sum.Found {
		last := sum.Rows[len(sum.Rows)-1]
		return fmt.Sprintf("No requested depth anti-concentrates: at depth %d the upper end of the %s interval of R is %.4f > 1+eps = %.4f; scan deeper or run more instances.",
			last.Depth, level, last.Upper, 1+eps)
	}
	for _, r := range sum.Rows {
		if r.Depth == sum.Depth {
			return fmt.Sprintf("Recommended depth: %d (%d gates): R ≤ %.4f (upper end of the %s interval), a margin of %.4f under 1+eps = %.4f.",
				r.Depth, r.GateCount, r.Upper, level, 1+eps-r.Upper, 1+eps)
		}
	}
	return ""
}

// runMeta is the table metadata shared by every command that builds
// circuits (runs.Spec.Meta), with the seed of cf.
func runMeta(s *setup, cf *circuitFlags) tables.Meta {
	sp := *s.spec
	sp.Seed = cf.seed
	return sp.Meta(commandLine())
}

// joinInts writes a depth list as "2,4,8" (runs.FormatDepths).
func joinInts(v []int) string { return runs.FormatDepths(v) }

// finiteOrNull returns nil (JSON null) for ±Inf and NaN, as for the
// interval of a single instance, which has no error bar.
func finiteOrNull(x float64) *float64 {
	if math.IsInf(x, 0) || math.IsNaN(x) {
		return nil
	}
	return &x
}

func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}
