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

	"github.com/spf13/pflag"

	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/plots"
	"mixdepth/runs"
	"mixdepth/scan"
	"mixdepth/stats"
	"mixdepth/tables"
)

func init() {
	register(command{name: "scan", summary: "Monte Carlo depth scan: collision probability and Porter–Thomas distance per depth", run: runScan})
}

// scanJSON is the --json document of scan. Field names are an interface.
type scanJSON struct {
	runs.Header
	HaarCollision float64 `json:"haar_collision"`
	// Parts and CollisionLimit are set for a chip in parts
	// (--allow-disconnected): the number of parts and the product of their
	// Haar values, against which collision_ratio is measured.
	Parts          int      `json:"parts,omitempty"`
	CollisionLimit *float64 `json:"collision_limit,omitempty"`
	// PTHaar is the mean Porter–Thomas distance of Haar-random states of the
	// same dimension (stats.HaarPTBaseline); null under the collision rule.
	PTHaar           *float64      `json:"pt_ks_haar"`
	Seed             uint64        `json:"seed"`
	Instances        int           `json:"instances"`
	Eps              float64       `json:"eps"`
	Confidence       float64       `json:"confidence"`
	Rule             stats.Rule    `json:"rule"`
	PTMargin         float64       `json:"pt_margin"`
	RecommendedDepth *int          `json:"recommended_depth"`
	Rows             []scanJSONRow `json:"rows"`
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
	// Verdict is one of the stats.Verdict words; Spread is verdict = spread.
	Verdict stats.Verdict `json:"verdict"`
	Spread  bool          `json:"spread"`
	// RWithin and PTNear are the two criteria: R's interval within the band
	// and the PT distance within the margin of pt_ks_haar (null under the
	// collision rule).
	RWithin bool  `json:"r_within_band"`
	PTNear  *bool `json:"pt_near_haar"`
	// CollisionExact and ExactDeviation are set with --exact: the exact
	// E[Z] and (mean − exact)/stderr.
	CollisionExact *float64 `json:"collision_exact,omitempty"`
	ExactDeviation *float64 `json:"exact_deviation_sigmas,omitempty"`
}

func runScan(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("scan", "Simulates random circuit instances exactly and reports, per depth, the collision probability\nagainst the Haar value 2/(D+1) with a confidence interval, the Porter–Thomas distance, and the\nrecommended depth (the first from which every later depth is spread). With no --graph or\n--layout it runs the demo chip.",
		"mixdepth scan --graph grid:3x4 --depths 1:16 --instances 400 --out scan.parquet", stdout)
	var cf circuitFlags
	cf.checkGraph = checkStateVector
	cf.add(fs)
	depthSpec := fs.String("depths", "", "depths to report: 2,4,8 or FROM:TO or FROM:TO:STEP (default 1:20; demo 2:24:2)")
	instances := fs.Int("instances", 200, "number of random circuit instances")
	vf := addVerdictFlags(fs)
	workers := fs.Int("workers", defaultWorkers(), "worker goroutines")
	out := fs.String("out", "", "write the per-instance table to FILE.arrow or FILE.parquet")
	partFlag := fs.String("part", "", partFlagHelp)
	resume := fs.String("resume", "", "continue the table FILE left by an interrupted scan with the same flags, or extend a finished one with a larger --instances (writes --out, default FILE)")
	precision := fs.String("precision", "double", "amplitude precision: double (complex128) or single (complex64: half the memory, 31 qubits in 16 GiB; collision probability to about 1e-6 relative)")
	plot := fs.String("plot", "", "draw R − 1 against depth with its confidence band to FILE.png or FILE.svg")
	withExact := fs.Bool("exact", false, "also compute the exact E[Z] at each depth (no sampling) and flag depths where the Monte Carlo mean is more than 4 standard errors from it")
	asJSON := fs.Bool("json", false, "print one JSON document instead of the text report")
	progress := fs.Bool("progress", false, progressFlagHelp)
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		return badInput("scan takes no positional arguments (got %q)", fs.Arg(0))
	}
	s, err := cf.resolve(ctx)
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
		return badInput("--instances %d: must be between 1 (%d or more for an interval) and %d", *instances, stats.MinIntervalValues, maxInstances)
	}
	if *instances*len(depths) > 100_000_000 {
		return badInput("--instances %d × %d depths: more than 10^8 per-instance records to hold; use fewer, or parts (--part)", *instances, len(depths))
	}
	crit, err := vf.criteria()
	if err != nil {
		return err
	}
	eps, conf := &crit.Eps, &crit.Confidence
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

	sr := &runs.ScanRun{Spec: s.spec, Depths: depths, Instances: *instances, Eps: *eps, Confidence: *conf, Rule: crit.Rule, PTMargin: crit.PTMargin,
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
		return badInput("--part %s selects no instance of %d: use fewer parts or more instances", part, *instances)
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
	tick, stopProgress := startProgress(stderr, *progress, "simulating instances", len(ids))
	cfg.Progress = tick
	defer stopProgress()
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
	sum := s.spec.Estimate(records, crit)
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
		if err := saveScanPlot(*plot, s, sum, curve); err != nil {
			return err
		}
	}
	if *asJSON {
		doc := scanDocument(s, cf.seed, len(doneAll), sum)
		if exact != nil {
			devs := sum.ExactDeviations(exact.Collision)
			for k := range doc.Rows {
				z := exact.Collision[k]
				doc.Rows[k].CollisionExact, doc.Rows[k].ExactDeviation = &z, finiteOrNull(devs[k])
			}
		}
		return writeJSON(stdout, doc)
	}
	printScan(stdout, s, &cf, instancesNote(len(doneAll), part, *instances), sum)
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

// saveScanPlot draws the depth plot of a scan's curve (scan --plot and
// summarize --plot), with the exact ratios when exact is not nil.
func saveScanPlot(path string, s *setup, sum *scan.Curve, exact []float64) error {
	opts := []plots.Option{plots.WithConfidence(sum.Criteria.Confidence), plots.WithDepthUnit(depthUnit(s)),
		plots.WithTitle(s.graph.Name + ", " + s.ensemble.Name() + " gates")}
	if sum.Criteria.Rule != stats.RuleCollision {
		opts = append(opts, plots.WithRule(fmt.Sprintf("R's interval is in 1 ± ε, PT dist ≤ %.3g",
			sum.PTBaseline.Mean+sum.Criteria.PTMargin)))
	}
	return plots.SaveDepthPlot(path, curveSeries(sum, exact), sum.Criteria.Eps, opts...)
}

// depthUnit names what a depth counts, for plot axes.
func depthUnit(s *setup) string {
	if s.schedule.Kind() == circuits.KindRandomEdge {
		return "gates"
	}
	return "layers"
}

// scanDocument assembles the --json document of a scan summary.
func scanDocument(s *setup, seed uint64, instances int, sum *scan.Curve) scanJSON {
	c := sum.Criteria
	doc := scanJSON{
		Header: s.spec.Header(), HaarCollision: sum.HaarCollision, Seed: seed, Instances: instances,
		Eps: c.Eps, Confidence: c.Confidence, Rule: c.Rule, PTMargin: c.PTMargin,
	}
	if c.Rule != stats.RuleCollision {
		doc.PTHaar = &sum.PTBaseline.Mean
	}
	if s.spec.Parts > 1 {
		doc.Parts, doc.CollisionLimit = s.spec.Parts, &sum.Limit
	}
	if sum.Found {
		d := sum.Depth
		doc.RecommendedDepth = &d
	}
	for _, r := range sum.Rows {
		var near *bool
		if c.Rule != stats.RuleCollision {
			near = &r.PTNear
		}
		doc.Rows = append(doc.Rows, scanJSONRow{
			Depth: r.Depth, GateCount: r.GateCount, CollisionMean: r.Collision.Mean, CollisionStder: finiteOrNull(r.Collision.StdErr),
			CollisionRatio: r.Ratio, RatioLower: finiteOrNull(r.Lower), RatioUpper: finiteOrNull(r.Upper), PTKSMean: r.KSMean,
			Verdict: r.Verdict, Spread: r.Spread, RWithin: r.RWithin, PTNear: near,
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
// reports every depth more than scan.ExactAgreementSigmas standard errors
// away.
func printExactCheck(w io.Writer, sum *scan.Curve, exact *moments.Result) {
	fmt.Fprintf(w, "\n%6s %12s %12s %10s\n", "depth", "R (MC)", "R (exact)", "MC−exact")
	var bad []string
	devs := sum.ExactDeviations(exact.Collision)
	for k, r := range sum.Rows {
		dev := devs[k]
		mark := ""
		if math.Abs(dev) > scan.ExactAgreementSigmas {
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
func printScan(w io.Writer, s *setup, cf *circuitFlags, instances string, sum *scan.Curve) {
	c := sum.Criteria
	fmt.Fprintln(w, s.describe())
	fmt.Fprintf(w, "seed %d · %s · eps %g · confidence %g · rule %s · Haar collision 2/(D+1) = %.6g\n",
		cf.seed, instances, c.Eps, c.Confidence, c.Rule, sum.HaarCollision)
	if c.Rule != stats.RuleCollision {
		b := sum.PTBaseline
		fmt.Fprintf(w, "Haar PT dist (mean over %d Haar-random states of D = %s%s) = %.4g; margin %g\n",
			b.States, dimString(s.graph.Qubits), scaledNote(b), b.Mean, c.PTMargin)
	}
	if note := s.partsNote(); note != "" {
		fmt.Fprintln(w, note)
		if c.Rule != stats.RuleCollision {
			fmt.Fprintln(w, "Its outputs are a product of the parts' outputs, not Porter–Thomas over the whole chip, so the PT distance stays above the Haar baseline: use --rule collision.")
		}
	}
	fmt.Fprintln(w)
	pct := strconv.FormatFloat(100*c.Confidence, 'g', 4, 64) + "% interval"
	const noInterval = "too few instances for an interval"
	width := 21
	for _, r := range sum.Rows {
		if !r.HasInterval {
			width = len(noInterval)
		}
	}
	fmt.Fprintf(w, "%6s %7s %10s  %-*s %9s  %s\n", "depth", "gates", "R=Z/Z_H", width, pct, "PT dist", "verdict")
	for _, r := range sum.Rows {
		interval := fmt.Sprintf("[%8.4f, %8.4f]", r.Lower, r.Upper)
		if !r.HasInterval {
			interval = noInterval
		}
		fmt.Fprintf(w, "%6d %7d %10.4f  %-*s %9.4f  %s\n", r.Depth, r.GateCount, r.Ratio, width, interval, r.KSMean, r.Verdict)
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, scanVerdict(sum))
}

// dimString writes D = 2^n.
func dimString(n int) string {
	if n <= 20 {
		return strconv.Itoa(1 << n)
	}
	return "2^" + strconv.Itoa(n)
}

// scaledNote says when a PT baseline was scaled from a smaller dimension.
func scaledNote(b stats.PTBaseline) string {
	if !b.Scaled {
		return ""
	}
	return fmt.Sprintf(", scaled by 1/√D from D = %d", stats.PTBaselineMaxDim)
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

// scanVerdict is the recommendation: the depth and why, or why none.
func scanVerdict(sum *scan.Curve) string {
	c := sum.Criteria
	level := strconv.FormatFloat(100*c.Confidence, 'g', 4, 64) + "%"
	rule := fmt.Sprintf("the %s interval of R within [%.4g, %.4g] and the mean PT distance at most %.4g (Haar %.4g + margin %g)",
		level, 1-c.Eps, 1+c.Eps, sum.PTBaseline.Mean+c.PTMargin, sum.PTBaseline.Mean, c.PTMargin)
	if c.Rule == stats.RuleCollision {
		rule = fmt.Sprintf("the upper end of the %s interval of R at most 1+eps = %.4g", level, 1+c.Eps)
	}
	if !sum.Found {
		last := sum.Rows[len(sum.Rows)-1]
		return fmt.Sprintf("No recommended depth: the deepest requested depth, %d, is %s, not spread (spread needs %s); %s.",
			last.Depth, last.Verdict, rule, verdictAdvice(last))
	}
	for _, r := range sum.Rows {
		if r.Depth == sum.Depth {
			return fmt.Sprintf("Recommended depth: %d (%d gates), the first depth from which every later requested depth is spread: %s.\n"+
				"Requiring every later depth to pass keeps the %s level for the whole claim (an intersection–union test), not once per depth.",
				r.Depth, r.GateCount, rule, level)
		}
	}
	return ""
}

// verdictAdvice says what to do about a depth that is not spread.
func verdictAdvice(r scan.Row) string {
	switch r.Verdict {
	case stats.VerdictUnresolved:
		if !r.HasInterval {
			return fmt.Sprintf("run at least %d instances for an interval", stats.MinIntervalValues)
		}
		return "run more instances to narrow the interval of R"
	case stats.VerdictDistorted:
		return "the output distribution is not Porter–Thomas: scan deeper if the PT distance is still falling; a gate set that is not universal (Clifford gates) never gets there"
	case stats.VerdictFlat:
		return "R is below 1 − eps: the outputs are flatter than Haar-random ones; run more instances if the interval is wide, else check the gate set"
	}
	return "scan deeper or run more instances"
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

// verdictFlags are the criteria flags that scan and summarize share.
type verdictFlags struct {
	eps, conf, margin *float64
	rule              *string
}

func addVerdictFlags(fs *pflag.FlagSet) *verdictFlags {
	return &verdictFlags{
		eps:    fs.Float64("eps", 0.05, "tolerance on R = E[Z]/Z_H: a depth is spread when the interval of R lies within [1−eps, 1+eps] (--rule collision: its upper end ≤ 1+eps)"),
		conf:   fs.Float64("confidence", 0.95, "confidence level of the two-sided interval of R"),
		margin: fs.Float64("pt-margin", stats.DefaultPTMargin, "a depth is spread only when its mean Porter–Thomas distance is at most the Haar value for the same D plus this margin"),
		rule:   fs.String("rule", string(stats.RuleBoth), "verdict rule: both (R two-sided and the Porter–Thomas distance) or collision (the anti-concentration depth alone: upper end of R ≤ 1+eps)"),
	}
}

// criteria checks the flags and returns the verdict criteria.
func (v *verdictFlags) criteria() (stats.Criteria, error) {
	c := stats.Criteria{Eps: *v.eps, Confidence: *v.conf, PTMargin: *v.margin, Rule: stats.Rule(*v.rule)}
	if err := checkUnit("eps", c.Eps); err != nil {
		return c, err
	}
	if err := checkUnit("confidence", c.Confidence); err != nil {
		return c, err
	}
	if !(c.PTMargin >= 0 && c.PTMargin <= 1) {
		return c, badInput("--pt-margin %v: must lie between 0 and 1 (a distance between two CDFs)", c.PTMargin)
	}
	if c.Rule != stats.RuleBoth && c.Rule != stats.RuleCollision {
		return c, badInput("--rule %q: use both or collision", *v.rule)
	}
	return c, nil
}
