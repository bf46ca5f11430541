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

	"mixdepth/scan"
	"mixdepth/sim"
	"mixdepth/tables"
)

func init() {
	register(command{name: "scan", summary: "Monte Carlo depth scan: collision probability and Porter–Thomas distance per depth", run: runScan})
}

// scanJSON is the --json document of scan. Field names are an interface.
type scanJSON struct {
	Tool                   string        `json:"tool"`
	Version                string        `json:"version"`
	Graph                  string        `json:"graph"`
	GraphDigest            string        `json:"graph_digest"`
	Qubits                 int           `json:"qubits"`
	Edges                  int           `json:"edges"`
	Schedule               string        `json:"schedule"`
	Gates                  string        `json:"gates"`
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
	CollisionStder float64  `json:"collision_stderr"`
	CollisionRatio float64  `json:"collision_ratio"`
	RatioLower     *float64 `json:"ratio_lower"`
	RatioUpper     *float64 `json:"ratio_upper"`
	PTKSMean       float64  `json:"pt_ks_mean"`
}

// scanFields are the columns of the per-instance scan table.
var scanFields = []tables.Field{
	{Name: "depth", Type: tables.Int64, Doc: "circuit depth (layers, or gates for random-edge)"},
	{Name: "gate_count", Type: tables.Int64, Doc: "two-qubit gates applied up to this depth"},
	{Name: "instance", Type: tables.Int64, Doc: "instance id; its random stream depends only on (seed, instance)"},
	{Name: "collision", Type: tables.Float64, Doc: "collision probability Z = Σ p(x)²"},
	{Name: "collision_ratio", Type: tables.Float64, Doc: "Z / Z_H with Z_H = 2/(D+1)"},
	{Name: "pt_ks", Type: tables.Float64, Doc: "Kolmogorov–Smirnov distance of the output probabilities to Beta(1, D−1)"},
	{Name: "xeb_ideal", Type: tables.Float64, Doc: "linear XEB of an ideal sampler, D·Z − 1"},
}

func runScan(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("scan", "Simulates random circuit instances exactly and reports, per depth, the collision probability\nagainst the Haar value 2/(D+1) with a confidence interval, the Porter–Thomas distance, and the\nsmallest depth that anti-concentrates. With no flags it runs the demo chip.",
		"mixdepth scan --graph grid:3x4 --depths 1:16 --instances 400 --out scan.parquet", stdout)
	var cf circuitFlags
	cf.add(fs)
	depthSpec := fs.String("depths", "", "depths to report: 2,4,8 or FROM:TO or FROM:TO:STEP (default 1:20; demo 2:24:2)")
	instances := fs.Int("instances", 200, "number of random circuit instances")
	eps := fs.Float64("eps", 0.05, "anti-concentration threshold: depth reached when the upper bound of R ≤ 1+eps")
	conf := fs.Float64("confidence", 0.95, "confidence level of the interval for R")
	workers := fs.Int("workers", defaultWorkers(), "worker goroutines")
	out := fs.String("out", "", "write the per-instance table to FILE.arrow or FILE.parquet")
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
	if *instances <= 0 {
		return badInput("--instances %d: must be at least 1 (2 or more for error bars)", *instances)
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

	meta := runMeta(s, &cf)
	meta.Set("command", "scan")
	meta.Set("depths", joinInts(depths))
	meta.Set("instances", strconv.Itoa(*instances))
	var w *tables.Writer
	if *out != "" {
		w, err = tables.Create(*out, scanFields, meta)
		if err != nil {
			return usageError{fmt.Errorf("--out: %w", err)}
		}
		defer w.Abort()
	}

	ids := make([]int, *instances)
	for i := range ids {
		ids[i] = i
	}
	cfg := &scan.Config{
		Graph: s.graph, Schedule: s.schedule, Ensemble: s.ensemble,
		Depths: depths, Instances: ids, Seed: cf.seed, Workers: *workers,
	}
	if isTerminal(stderr) {
		bar := progressbar.NewOptions(len(ids), progressbar.OptionSetWriter(stderr),
			progressbar.OptionSetDescription("simulating instances"), progressbar.OptionShowCount(),
			progressbar.OptionClearOnFinish())
		cfg.Progress = func() { _ = bar.Add(1) }
		defer bar.Finish()
	}
	records, _, err := scan.Run(ctx, cfg)
	if err != nil {
		if errors.Is(err, context.Canceled) {
			return errInterrupted
		}
		if errors.Is(err, sim.ErrTooLarge) {
			return usageError{err}
		}
		return err
	}
	sum := scan.Summarize(s.graph.Qubits, records, *conf, *eps)

	if w != nil {
		for _, r := range records {
			w.Append(r.Depth, r.GateCount, r.Instance, r.Collision, r.Ratio, r.KS, r.XEBIdeal)
		}
		if err := w.Close(); err != nil {
			return err
		}
	}
	if *asJSON {
		doc := scanJSON{
			Tool: "mixdepth", Version: version, Graph: s.graph.Name, GraphDigest: s.graph.Digest(),
			Qubits: s.graph.Qubits, Edges: len(s.graph.Edges), Schedule: s.schedule.Kind(), Gates: s.ensemble.Name(),
			HaarCollision: sum.HaarCollision, Seed: cf.seed, Instances: *instances, Eps: *eps, Confidence: *conf,
		}
		if sum.Found {
			d := sum.Depth
			doc.AnticoncentrationDepth = &d
		}
		for _, r := range sum.Rows {
			doc.Rows = append(doc.Rows, scanJSONRow{
				Depth: r.Depth, GateCount: r.GateCount, CollisionMean: r.Collision.Mean, CollisionStder: r.Collision.StdErr,
				CollisionRatio: r.Ratio, RatioLower: finiteOrNull(r.Lower), RatioUpper: finiteOrNull(r.Upper), PTKSMean: r.KSMean,
			})
		}
		return writeJSON(stdout, doc)
	}
	printScan(stdout, s, &cf, *instances, *eps, *conf, sum)
	if *out != "" {
		fmt.Fprintf(stdout, "Per-instance table: %s (%d rows)\n", *out, len(records))
	}
	return nil
}

// printScan writes the human report of a scan.
func printScan(w io.Writer, s *setup, cf *circuitFlags, instances int, eps, conf float64, sum *scan.Summary) {
	fmt.Fprintln(w, s.describe())
	fmt.Fprintf(w, "seed %d · %d instances · eps %g · confidence %g · Haar collision 2/(D+1) = %.6g\n\n",
		cf.seed, instances, eps, conf, sum.HaarCollision)
	pct := strconv.FormatFloat(100*conf, 'g', 4, 64) + "% interval"
	fmt.Fprintf(w, "%6s %7s %10s  %-21s %9s  %s\n", "depth", "gates", "R=Z/Z_H", pct, "PT dist", "verdict")
	for _, r := range sum.Rows {
		verdict := "too shallow"
		if r.Ready {
			verdict = "spread"
		}
		fmt.Fprintf(w, "%6d %7d %10.4f  [%8.4f, %8.4f]  %9.4f  %s\n", r.Depth, r.GateCount, r.Ratio, r.Lower, r.Upper, r.KSMean, verdict)
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, scanVerdict(sum, eps, conf))
}

// scanVerdict is the one-sentence recommendation.
func scanVerdict(sum *scan.Summary, eps, conf float64) string {
	level := strconv.FormatFloat(100*conf, 'g', 4, 64) + "%"
	if !sum.Found {
		last := sum.Rows[len(sum.Rows)-1]
		return fmt.Sprintf("No requested depth anti-concentrates: at depth %d the upper %s bound of R is %.4f > 1+eps = %.4f; scan deeper or run more instances.",
			last.Depth, level, last.Upper, 1+eps)
	}
	for _, r := range sum.Rows {
		if r.Depth == sum.Depth {
			return fmt.Sprintf("Recommended depth: %d (%d gates): R ≤ %.4f at %s confidence, a margin of %.4f under 1+eps = %.4f.",
				r.Depth, r.GateCount, r.Upper, level, 1+eps-r.Upper, 1+eps)
		}
	}
	return ""
}

// runMeta is the table metadata shared by every command that builds circuits.
func runMeta(s *setup, cf *circuitFlags) tables.Meta {
	var m tables.Meta
	m.Set("tool_version", "mixdepth "+version)
	m.Set("command_line", commandLine())
	m.Set("seed", strconv.FormatUint(cf.seed, 10))
	m.Set("graph", s.graph.Name)
	m.Set("graph_digest", s.graph.Digest())
	m.Set("qubits", strconv.Itoa(s.graph.Qubits))
	m.Set("schedule", s.schedule.Kind())
	m.Set("layout", s.layout)
	m.Set("gates", s.ensemble.Name())
	return m
}

func joinInts(v []int) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.Itoa(x)
	}
	return strings.Join(s, ",")
}

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
