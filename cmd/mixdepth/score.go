package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"
	"unicode/utf8"

	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/runs"
	"mixdepth/sampling"
	"mixdepth/stats"
	"mixdepth/tables"

	"mixdepth/internal/inputfile"
)

func init() {
	register(command{name: "score", summary: "score a sample table with the linear and logarithmic cross-entropy benchmarks", run: runScore})
}

// scoreJSON is the --json document of score. Field names are an interface.
type scoreJSON struct {
	runs.Producer
	Table               string   `json:"table"`
	Circuits            string   `json:"circuits"`
	Qubits              int      `json:"qubits"`
	Shots               int      `json:"shots"`
	LinearXEB           *float64 `json:"linear_xeb"`
	LinearXEBStderr     *float64 `json:"linear_xeb_stderr"`
	LogXEB              *float64 `json:"log_xeb"`
	LogXEBStderr        *float64 `json:"log_xeb_stderr"`
	IdealXEB            *float64 `json:"ideal_xeb"`
	NormalizedXEB       *float64 `json:"normalized_xeb"`
	NormalizedXEBStderr *float64 `json:"normalized_xeb_stderr"`
	// The errors over instances (stats.ClusterBootstrap): every source of
	// variation; null with too few instances.
	LinearXEBStderrInstances     *float64 `json:"linear_xeb_stderr_instances"`
	NormalizedXEBStderrInstances *float64 `json:"normalized_xeb_stderr_instances"`
	NormalizedXEBLower           *float64 `json:"normalized_xeb_lower"`
	NormalizedXEBUpper           *float64 `json:"normalized_xeb_upper"`
	Confidence                   float64  `json:"confidence"`
	PorterThomasXEB              float64  `json:"porter_thomas_xeb"`
	// Parts and CollisionLimit are set for a chip in parts: the number of
	// parts and the product of their Haar values; porter_thomas_xeb is then
	// D·collision_limit − 1, the value the ideal XEB tends to.
	Parts          int                 `json:"parts,omitempty"`
	CollisionLimit *float64            `json:"collision_limit,omitempty"`
	Eps            float64             `json:"eps"`
	Spread         bool                `json:"spread"`
	Warnings       []string            `json:"warnings"`
	Instances      []scoreJSONInstance `json:"instance_scores"`
}

type scoreJSONInstance struct {
	Instance            int      `json:"instance"`
	Shots               int      `json:"shots"`
	LinearXEB           *float64 `json:"linear_xeb"`
	LinearXEBStderr     *float64 `json:"linear_xeb_stderr"`
	LogXEB              *float64 `json:"log_xeb"`
	LogXEBStderr        *float64 `json:"log_xeb_stderr"`
	IdealXEB            *float64 `json:"ideal_xeb"`
	NormalizedXEB       *float64 `json:"normalized_xeb"`
	NormalizedXEBStderr *float64 `json:"normalized_xeb_stderr"`
}

func runScore(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("score", "mixdepth score FILE [flags]\n\n"+
		"Scores the shots of a sample table (FILE.arrow or FILE.parquet from 'mixdepth sample', or a\n"+
		"CSV of measured data with a header and at least the columns instance,bitstring; bitstrings list\n"+
		"qubit 0 first, or last with --bit-order last; an optional p_ideal column is checked against the\n"+
		"simulation). Reports per instance\n"+
		"and over all shots: the linear XEB F_lin = D·mean p − 1 and the logarithmic XEB\n"+
		"F_log = ln D + γ + mean ln p with their standard errors, the ideal-device value D·Z_U − 1 and the\n"+
		"normalized estimate F_lin/(D·Z_U − 1), whose error bar over all shots comes twice: from the shots\n"+
		"alone, and from a bootstrap over instances that includes every source of variation (shots,\n"+
		"noise trajectories, circuits). It warns when the circuits have not anti-concentrated (mean\n"+
		"D·Z_U − 1 more than eps from the Porter–Thomas value (D−1)/(D+1), relative), where the raw\n"+
		"F_lin misstates the fidelity.\n\n"+
		"The circuits come from --circuits FILE.json, or are rebuilt: for a table written by sample,\n"+
		"from its recorded run parameters (any of --graph, --layout, --schedule, --gates, --seed and\n"+
		"--depth given overrides them); for a CSV, from those flags and their defaults, as sample uses them.",
		"mixdepth score samples.parquet --circuits circuits.json", stdout)
	cf := circuitFlags{checkGraph: func(g *circuits.Graph) error { return sampling.CheckQubits(g.Qubits, "scoring") }}
	cf.add(fs)
	depth := fs.Int("depth", defaultSampleDepth, "circuit depth when rebuilding the circuits; a table that records its depth overrides this fallback")
	circuitsIn := fs.String("circuits", "", "read the circuits from FILE.json, as written by 'mixdepth sample --circuits'")
	workers := fs.Int("workers", defaultWorkers(), "worker goroutines for states of 16 qubits or more")
	asJSON := fs.Bool("json", false, "print one JSON document instead of the text report")
	eps := fs.Float64("eps", sampling.DefaultEps, "anti-concentration threshold, as scan's: the circuits are spread when the mean D·Z_U − 1 lies within eps of (D−1)/(D+1), relative")
	bitOrder := fs.String("bit-order", "first", "which end of a measured bitstring is qubit 0: first or last")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if err := checkUnit("eps", *eps); err != nil {
		return err
	}
	order, err := sampling.ParseBitOrder(*bitOrder)
	if err != nil {
		return badInput("--bit-order %q: use first (qubit 0 is the first character, the tool's order) or last", *bitOrder)
	}
	if fs.NArg() != 1 {
		return badInput("score takes one sample table: mixdepth score FILE [flags] (got %d arguments)", fs.NArg())
	}
	if *workers < 1 {
		return badInput("--workers %d: must be at least 1", *workers)
	}
	path := fs.Arg(0)
	recs, meta, err := readSamples(path)
	if err != nil {
		return err
	}
	sampled := false
	if cmd, ok := meta.Get("command"); ok && cmd == "sample" {
		sampled = true
	}

	if sampled && order != sampling.QubitZeroFirst {
		return badInput("--bit-order %s: %s was written by mixdepth sample, whose bitstrings list qubit 0 first; drop --bit-order", *bitOrder, path)
	}
	var qubits int
	var lookup func(int) *sampling.Circuit
	var source string
	// parts and limit describe a chip in parts: its E[Z] tends to limit,
	// the product of the parts' Haar values.
	var parts int
	var limit float64
	if *circuitsIn != "" {
		for _, name := range []string{"schedule", "gates", "seed", "depth"} {
			if fs.Changed(name) {
				return badInput("--%s: the circuits come from --circuits %s; drop --%s", name, *circuitsIn, name)
			}
		}
		cfile, err := readCircuitFile(*circuitsIn)
		if err != nil {
			return err
		}
		if fs.Changed("graph") || fs.Changed("layout") {
			s, err := cf.resolve(ctx)
			if err != nil {
				return err
			}
			if err := cfile.Check(s.graph); err != nil {
				return fmt.Errorf("--circuits %s: %w", *circuitsIn, err)
			}
		}
		if d, ok := meta.Get("graph_digest"); ok && cfile.GraphDigest != "" && d != cfile.GraphDigest {
			return badInput("--circuits %s is for graph %s (digest %s) but %s was sampled on graph digest %s: use the circuits of that run",
				*circuitsIn, cfile.Graph, cfile.GraphDigest, path, d)
		}
		qubits, lookup = cfile.Qubits, cfile.Circuit
		source = *circuitsIn
		// The file's edges say whether the chip is in parts (it was sampled
		// with --allow-disconnected); the final layer, whether an isolated
		// qubit is rotated.
		if g := cfile.FileGraph(cfile.Graph); len(g.Components()) > 1 {
			final := len(cfile.Circuits) > 0 && cfile.Circuits[0].Final != nil
			parts, limit = len(g.Components()), moments.PartsLimit(g, final)
		}
	} else {
		s, seed, d, total, err := scoreSetup(ctx, fs.Changed, &cf, *depth, meta, sampled, path)
		if err != nil {
			return err
		}
		qubits = s.graph.Qubits
		if s.spec.Parts > 1 {
			parts, limit = s.spec.Parts, s.spec.Limit()
		}
		lookup = func(id int) *sampling.Circuit {
			if id < 0 || total > 0 && id >= total {
				return nil
			}
			return sampling.Build(s.schedule, s.ensemble, qubits, seed, id, d)
		}
		source = fmt.Sprintf("rebuilt: %s, %s schedule, %s gates, seed %d, depth %d", s.graph.Name, s.schedule.Kind(), s.ensemble.Name(), seed, d)
	}
	if p, _ := meta.Get("partial"); p == "true" {
		done, _ := meta.Get("instances_done")
		fmt.Fprintf(stderr, "mixdepth: note: %s is partial (an interrupted run); it holds instances %q\n", path, done)
	}

	recs = sampling.InOrder(recs, order)
	groups, err := sampling.Collect(ctx, path, recs, qubits, lookup, *workers)
	switch {
	case errors.Is(err, context.Canceled):
		return errInterrupted
	case errors.Is(err, sampling.ErrInstance) && *circuitsIn != "":
		return badInput("%v (%s has %s)", err, *circuitsIn, describeCircuitIDs(lookup, recs))
	case err != nil:
		return err
	}
	rep := sampling.Score(qubits, groups)
	reference := "the Porter–Thomas value"
	if parts > 1 {
		rep.SetLimit(limit)
		reference = fmt.Sprintf("the value of a chip in %d parts, D times the product of the parts' Haar values minus 1,", parts)
	}
	rep.SetEps(*eps)
	warnings := []string{}
	if !rep.Spread {
		w := fmt.Sprintf("the circuits have not anti-concentrated: the ideal value D·Z − 1 = %.4f is more than %g%% from %s %.4f, so the raw linear XEB misstates the fidelity; read normalized_xeb, or use deeper circuits",
			rep.Ideal, 100*rep.Eps, reference, rep.PorterThomas)
		if rep.Ideal > rep.PorterThomas {
			w = strings.Replace(w, "misstates", "overstates", 1)
		}
		warnings = append(warnings, w)
	}
	bits, err := sampling.CheckBitOrder(ctx, path, recs, qubits, lookup, *workers, rep)
	if errors.Is(err, context.Canceled) {
		return errInterrupted
	}
	// Any other failure would have stopped the first Collect: reversing
	// a bitstring keeps its length and characters.
	if err == nil && bits.Suggest {
		flip := map[sampling.BitOrder]string{sampling.QubitZeroFirst: "last", sampling.QubitZeroLast: "first"}[order]
		warnings = append(warnings, fmt.Sprintf("the linear XEB %s is near 0 (within %d standard errors), but with each bitstring reversed it is %s: the data may list qubit 0 %s; score with --bit-order %s",
			plusMinus(rep.Linear, rep.LinearErr), sampling.BitOrderSigmas, plusMinus(bits.Reversed.Linear, bits.Reversed.LinearErr), flip, flip))
	}
	for _, w := range warnings {
		fmt.Fprintln(stderr, "mixdepth: warning: "+w)
	}
	if *asJSON {
		doc := scoreJSON{
			Producer: runs.ThisProducer, Table: path, Circuits: source, Qubits: qubits, Shots: rep.Shots,
			LinearXEB: finiteOrNull(rep.Linear), LinearXEBStderr: finiteOrNull(rep.LinearErr),
			LogXEB: finiteOrNull(rep.Log), LogXEBStderr: finiteOrNull(rep.LogErr),
			IdealXEB: finiteOrNull(rep.Ideal), NormalizedXEB: finiteOrNull(rep.Normalized), NormalizedXEBStderr: finiteOrNull(rep.NormalizedErr),
			LinearXEBStderrInstances: finiteOrNull(rep.LinearErrInstances), NormalizedXEBStderrInstances: finiteOrNull(rep.NormalizedErrInstances),
			NormalizedXEBLower: finiteOrNull(rep.NormalizedLower), NormalizedXEBUpper: finiteOrNull(rep.NormalizedUpper), Confidence: rep.Confidence,
			PorterThomasXEB: rep.PorterThomas, Eps: rep.Eps, Spread: rep.Spread, Warnings: warnings,
		}
		if parts > 1 {
			doc.Parts, doc.CollisionLimit = parts, &rep.Limit
		}
		for _, s := range rep.Instances {
			doc.Instances = append(doc.Instances, scoreJSONInstance{
				Instance: s.Instance, Shots: s.Shots,
				LinearXEB: finiteOrNull(s.Linear), LinearXEBStderr: finiteOrNull(s.LinearErr),
				LogXEB: finiteOrNull(s.Log), LogXEBStderr: finiteOrNull(s.LogErr),
				IdealXEB: finiteOrNull(s.Ideal), NormalizedXEB: finiteOrNull(s.Normalized), NormalizedXEBStderr: finiteOrNull(s.NormalizedErr),
			})
		}
		return writeJSON(stdout, doc)
	}
	fmt.Fprintf(stdout, "%s: %d shots of %d instance(s) on %d qubits\ncircuits: %s\n\n", path, rep.Shots, len(rep.Instances), qubits, source)
	fmt.Fprintf(stdout, "%s %7s  %s  %s  %s  %s\n", pad("", 12), "shots", pad("linear XEB", 17), pad("log XEB", 17), padLeft("D·Z − 1", 8), "normalized")
	row := func(label string, shots int, lin, linErr, lg, lgErr, ideal, norm, normErr float64) {
		fmt.Fprintf(stdout, "%s %7d  %s  %s  %8.4f  %s\n", pad(label, 12), shots, pad(plusMinus(lin, linErr), 17), pad(logText(lg, lgErr), 17), ideal, plusMinus(norm, normErr))
	}
	row("all", rep.Shots, rep.Linear, rep.LinearErr, rep.Log, rep.LogErr, rep.Ideal, rep.Normalized, rep.NormalizedErr)
	for _, s := range rep.Instances {
		row(fmt.Sprintf("instance %d", s.Instance), s.Shots, s.Linear, s.LinearErr, s.Log, s.LogErr, s.Ideal, s.Normalized, s.NormalizedErr)
	}
	if parts > 1 {
		fmt.Fprintf(stdout, "\nThe chip is in %d parts and never reaches the Haar value: E[Z] tends to the product of the parts' Haar values, %.6g,\nso D·Z − 1 tends to %.4f, not (D−1)/(D+1); the anti-concentration check uses that limit", parts, rep.Limit, rep.PorterThomas)
	} else {
		fmt.Fprintf(stdout, "\nPorter–Thomas value of D·Z − 1: (D−1)/(D+1) = %.4f", rep.PorterThomas)
	}
	if rep.Spread {
		fmt.Fprintf(stdout, "; the circuits are spread: their mean lies within eps = %g of it (relative).\n", rep.Eps)
	} else {
		fmt.Fprintf(stdout, "; the circuits are NOT spread: their mean lies more than eps = %g from it (relative), so read the normalized column.\n", rep.Eps)
	}
	fmt.Fprintf(stdout, "Fidelity estimate (normalized linear XEB over all shots): %.4f\n", rep.Normalized)
	fmt.Fprintf(stdout, "  standard error from the shots alone: %.4f\n", rep.NormalizedErr)
	if rep.HasInstanceErr {
		fmt.Fprintf(stdout, "  standard error over instances (shots, trajectories and circuits): %.4f; %g%% interval [%.4f, %.4f]\n",
			rep.NormalizedErrInstances, 100*rep.Confidence, rep.NormalizedLower, rep.NormalizedUpper)
	} else {
		fmt.Fprintf(stdout, "  standard error over instances: too few instances for an interval (%d; at least %d)\n", len(rep.Instances), stats.MinIntervalValues)
	}
	return nil
}

// pad pads s with spaces to width runes (a column of text output).
func pad(s string, width int) string {
	return s + strings.Repeat(" ", max(0, width-utf8.RuneCountInString(s)))
}

// padLeft right-aligns s in width runes.
func padLeft(s string, width int) string {
	return strings.Repeat(" ", max(0, width-utf8.RuneCountInString(s))) + s
}

// logText formats a log-XEB value, which is −Inf when a shot has ideal
// probability zero.
func logText(v, se float64) string {
	if math.IsInf(v, -1) {
		return "−inf (p = 0 shot)"
	}
	return plusMinus(v, se)
}

// describeCircuitIDs lists the instance ids lookup knows among 0..max id of
// recs, for the message about an unknown instance.
func describeCircuitIDs(lookup func(int) *sampling.Circuit, recs []sampling.Record) string {
	hi := 0
	for _, r := range recs {
		hi = max(hi, r.Instance)
	}
	var ids []int
	// A circuit file holds at most maxInstances circuits; ids beyond cannot
	// be in it, so the scan stops there whatever id a table row claims.
	for id := 0; id <= min(hi, maxInstances); id++ {
		if lookup(id) != nil {
			ids = append(ids, id)
		}
	}
	if len(ids) == 0 {
		return "none of the table's instances"
	}
	return "instances " + formatIDs(ids)
}

// readSamples reads the records of a sample table with
// sampling.ReadSampleTable; every failure is bad input naming the file.
func readSamples(path string) ([]sampling.Record, tables.Meta, error) {
	recs, meta, err := sampling.ReadSampleTable(path)
	var fe *tables.FormatError
	switch {
	case errors.As(err, &fe):
		return nil, meta, badInput("%s: unknown table format: use a name ending in .arrow, .parquet or .csv", path)
	case err != nil:
		return nil, meta, usageError{err}
	}
	return recs, meta, nil
}

// readCircuitFile reads and checks a circuit file; every failure is bad input.
func readCircuitFile(path string) (*sampling.CircuitFile, error) {
	f, err := inputfile.Open(path, inputfile.DataLimit)
	if err != nil {
		return nil, usageError{fmt.Errorf("--circuits: %w", err)}
	}
	defer f.Close()
	cfile, err := sampling.ReadCircuits(path, f)
	if err != nil {
		return nil, usageError{fmt.Errorf("--circuits: %w", err)}
	}
	return cfile, nil
}

// scoreSetup resolves the circuits to rebuild for score: from the table's
// run parameters when it was written by sample and no circuit flag was
// given, else from the flags; --seed and --depth override the table's.
// total is the full run's instance count when the table records it (ids at
// or above it are unknown), else 0.
func scoreSetup(ctx context.Context, changed func(string) bool, cf *circuitFlags, depth int, meta tables.Meta, sampled bool, path string) (s *setup, seed uint64, d, total int, err error) {
	flagged := changed("graph") || changed("layout") || changed("schedule") || changed("gates") || changed("drop")
	if sampled && !flagged {
		if s, err = setupFromMeta(meta); err != nil {
			return nil, 0, 0, 0, badInput("%s: cannot rebuild its circuits: %v; give --circuits FILE.json or the circuit flags", path, err)
		}
	} else {
		if s, err = cf.resolve(ctx); err != nil {
			return nil, 0, 0, 0, err
		}
		if digest, ok := meta.Get("graph_digest"); ok && sampled && digest != s.graph.Digest() {
			g, _ := meta.Get("graph")
			return nil, 0, 0, 0, badInput("%s was sampled on graph %s (digest %s) but the flags give %s (digest %s): drop --graph/--layout, or score the right table",
				path, g, digest, s.graph.Name, s.graph.Digest())
		}
	}
	seed, d = cf.seed, depth
	if sampled {
		if !changed("seed") {
			if seed, err = metaUint(meta, "seed"); err != nil {
				return nil, 0, 0, 0, badInput("%s: %v", path, err)
			}
		}
		if !changed("depth") {
			if d, err = metaInt(meta, "depth"); err != nil {
				return nil, 0, 0, 0, badInput("%s: %v", path, err)
			}
		}
		if total, err = metaInt(meta, "instances"); err != nil {
			return nil, 0, 0, 0, badInput("%s: %v", path, err)
		}
	}
	if d < 1 {
		return nil, 0, 0, 0, badInput("--depth %d: must be at least 1", d)
	}
	if err := checkCircuitDepth(s, d); err != nil {
		return nil, 0, 0, 0, err
	}
	return s, seed, d, total, nil
}
