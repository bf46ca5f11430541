package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"
	"unicode/utf8"

	"github.com/spf13/pflag"

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
	Parts          int      `json:"parts,omitempty"`
	CollisionLimit *float64 `json:"collision_limit,omitempty"`
	Eps            float64  `json:"eps"`
	Spread         bool     `json:"spread"`
	Warnings       []string `json:"warnings"`
	// The comparison with the exact expected benchmark under the noise
	// model (sampling.Compare): noise_source says where the model came
	// from (table, flags, table+flags or none); the other fields are null,
	// and exact_note says why, when it was not computed. The sigmas are
	// (measured − expected) in units of the standard error over instances,
	// or of the shots alone when sigmas_over is "shots".
	NoiseSource                     string   `json:"noise_source"`
	ExactEngine                     *string  `json:"exact_engine"`
	ExactNote                       string   `json:"exact_note,omitempty"`
	XEBExpected                     *float64 `json:"xeb_expected"`
	XEBNormalizedExpected           *float64 `json:"xeb_normalized_expected"`
	DigitalFidelity                 *float64 `json:"digital_fidelity"`
	LinearXEBSigmas                 *float64 `json:"linear_xeb_sigmas"`
	NormalizedXEBSigmas             *float64 `json:"normalized_xeb_sigmas"`
	SigmasOver                      string   `json:"sigmas_over,omitempty"`
	ImpliedFidelityNormalized       *float64 `json:"implied_fidelity_normalized"`
	ImpliedFidelityNormalizedStderr *float64 `json:"implied_fidelity_normalized_stderr"`
	ImpliedFidelityModel            *float64 `json:"implied_fidelity_model"`
	ImpliedFidelityModelStderr      *float64 `json:"implied_fidelity_model_stderr"`
	// XEBTruncationError is the MPS error estimate of xeb_expected (0 for
	// the vector engine), as exact's xeb_truncation_error.
	XEBTruncationError *float64            `json:"xeb_truncation_error"`
	Instances          []scoreJSONInstance `json:"instance_scores"`
}

// setExact fills the comparison fields of doc.
func (doc *scoreJSON) setExact(ex scoreExact) {
	doc.NoiseSource, doc.ExactNote = ex.source, ex.note
	c := ex.cmp
	if c == nil {
		return
	}
	doc.ExactEngine = &c.Exact.Engine
	doc.XEBExpected, doc.XEBNormalizedExpected, doc.DigitalFidelity = finiteOrNull(c.Exact.Expected), finiteOrNull(c.Exact.Normalized), finiteOrNull(c.Exact.Digital)
	doc.LinearXEBSigmas, doc.NormalizedXEBSigmas = finiteOrNull(c.LinearSigmas), finiteOrNull(c.NormalizedSigmas)
	doc.SigmasOver = "instances"
	if !c.OverInstances {
		doc.SigmasOver = "shots"
	}
	doc.ImpliedFidelityNormalized, doc.ImpliedFidelityNormalizedStderr = finiteOrNull(c.ImpliedNormalized), finiteOrNull(c.NormalizedErr)
	doc.ImpliedFidelityModel, doc.ImpliedFidelityModelStderr = finiteOrNull(c.ImpliedModel), finiteOrNull(c.ImpliedModelErr)
	doc.XEBTruncationError = finiteOrNull(c.Exact.TruncationError)
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
	fs := newFlags("score FILE",
		"Scores the shots of a sample table (FILE.arrow or FILE.parquet from 'mixdepth sample', or a\n"+
			"CSV of measured data with a header and at least the columns instance,bitstring; bitstrings list\n"+
			"qubit 0 first, or last with --bit-order last; an optional p_ideal column is checked against the\n"+
			"simulation). Reports per instance\n"+
			"and over all shots: the linear XEB F_lin = D·mean p − 1 and the logarithmic XEB\n"+
			"F_log = ln D + γ + mean ln p with their standard errors, the ideal-device value D·Z − 1 and the\n"+
			"normalized estimate F_lin/(D·Z − 1), whose error bar over all shots comes twice: from the shots\n"+
			"alone, and from a bootstrap over instances that includes every source of variation (shots,\n"+
			"noise trajectories, circuits). It warns when the circuits have not anti-concentrated (mean\n"+
			"D·Z − 1 more than eps from the Porter–Thomas value (D−1)/(D+1), relative), where the raw\n"+
			"F_lin misstates the fidelity.\n\n"+
			"The circuits come from --circuits FILE.json, or are rebuilt: for a table written by sample,\n"+
			"from its recorded run parameters (--seed and --depth each override the recorded value; any of\n"+
			"--graph, --layout, --drop, --schedule and --gates rebuilds the circuits from the flags alone); for a\n"+
			"CSV, from those flags and their defaults, as sample uses them.\n\n"+
			"With a noise model it also computes the exact expected benchmark of the circuits' ensemble under\n"+
			"that noise at their depth (as 'mixdepth exact' with noise does) and prints it beside the measured\n"+
			"values, their difference in standard errors, and the implied fidelity two ways: (a) the usual\n"+
			"reading, normalized XEB ≈ fidelity, right once the noise acts as global white noise (deep\n"+
			"circuits); (b) corrected by the exact model, F = digital fidelity × measured/expected normalized\n"+
			"XEB: the model's digital fidelity scaled by how far the chip fell from the model's expectation.\n"+
			"The noise model is the one a table written by sample records; --gate-error, --single-qubit-error,\n"+
			"--readout-error, --fidelity and --calibration override it key by key (for a CSV they are the only\n"+
			"source). The report names the source; without a model, or when no exact engine fits, it says why.",
		"mixdepth score samples.parquet --circuits circuits.json", stdout)
	cf := circuitFlags{checkGraph: func(g *circuits.Graph) error { return sampling.CheckQubits(g.Qubits, "scoring") }}
	cf.add(fs)
	depth := fs.Int("depth", defaultSampleDepth, "circuit depth when rebuilding the circuits (default: the depth the table records, else 16)")
	circuitsIn := fs.String("circuits", "", "read the circuits from FILE.json, as written by 'mixdepth sample --circuits'")
	workers := fs.Int("workers", defaultWorkers(), "worker goroutines for states of 16 qubits or more")
	asJSON := fs.Bool("json", false, "print one JSON document instead of the text report")
	eps := fs.Float64("eps", sampling.DefaultEps, "anti-concentration threshold, as scan's: the circuits are spread when the mean D·Z − 1 lies within eps of (D−1)/(D+1), relative")
	bitOrder := fs.String("bit-order", "first", "which end of a measured bitstring is qubit 0: first or last")
	var nf scoreNoiseFlags
	nf.add(fs)
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if err := checkUnit("eps", *eps); err != nil {
		return err
	}
	if err := nf.check(); err != nil {
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
	// rebuilt and rebuiltDepth are the rebuilt circuits' setup and depth
	// (nil with --circuits).
	var rebuilt *setup
	var rebuiltDepth int
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
		rebuilt, rebuiltDepth = s, d
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
	ex, err := scoreCompare(ctx, fs.Changed, &nf, rebuilt, rebuiltDepth, *circuitsIn, meta, sampled, path, rep, *workers)
	if err != nil {
		return err
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
		doc.setExact(ex)
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
	printScoreExact(stdout, ex, fs.Changed)
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
			return nil, 0, 0, 0, badInput("%s was sampled on graph %s (digest %s) but the flags give %s (digest %s): drop the circuit flags (--graph/--layout/--drop/--schedule/--gates), or score the right table",
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

// scoreNoiseFlags are score's noise flags: the chip's noise model for the
// comparison with the exact expected benchmark. Each one given overrides
// the same key of a table written by sample.
type scoreNoiseFlags struct {
	gateError, fidelity float64
	readout             string
	cal                 noiseFlags
	// p01, p10 are --readout-error, parsed by check.
	p01, p10 float64
}

// check validates the noise flags (before any work) and parses
// --readout-error; every failure is bad input.
func (nf *scoreNoiseFlags) check() error {
	for _, c := range []struct {
		name string
		v    float64
	}{{"gate-error", nf.gateError}, {"single-qubit-error", nf.cal.single}, {"fidelity", nf.fidelity}} {
		if err := checkProbability(c.name, c.v); err != nil {
			return err
		}
	}
	var err error
	nf.p01, nf.p10, err = parseReadout(nf.readout)
	return err
}

// scoreNoiseFlagNames are the flags that describe the noise.
var scoreNoiseFlagNames = []string{"gate-error", "single-qubit-error", "readout-error", "fidelity", "calibration"}

func (nf *scoreNoiseFlags) add(fs *pflag.FlagSet) {
	fs.Float64Var(&nf.gateError, "gate-error", 0, "the chip's Pauli error rate in [0, 1] after every two-qubit gate, for the exact expectation (overrides the table's)")
	fs.StringVar(&nf.readout, "readout-error", "0,0", "the chip's readout flip probabilities p01,p10, or one value for both, for the exact expectation (overrides the table's)")
	fs.Float64Var(&nf.fidelity, "fidelity", 1, "the global depolarizing fidelity in [0, 1], for the exact expectation (overrides the table's)")
	nf.cal.add(fs, true)
}

// scoreNoise returns the noise model of the circuits on g for the exact
// comparison and where it came from: "table" (the metadata of a table
// written by sample), "flags" (no such table), "table+flags" (the table's,
// with the given flags overriding their keys), or nil and "none" when
// there is neither. A --calibration file replaces the table's calibration;
// its entries override the uniform rates element by element. Errors are
// bad input.
func scoreNoise(changed func(string) bool, nf *scoreNoiseFlags, meta tables.Meta, sampled bool, g *circuits.Graph, path string) (*circuits.ChipNoise, string, error) {
	var given []string
	for _, name := range scoreNoiseFlagNames {
		if changed(name) {
			given = append(given, name)
		}
	}
	source := "table"
	switch {
	case len(given) == 0 && !sampled:
		return nil, "none", nil
	case !sampled:
		source = "flags"
	case len(given) > 0:
		source = "table+flags"
	}
	p01, p10 := nf.p01, nf.p10
	// The flags override the table's keys; the rebuilt metadata gives the
	// noise by the rule sample's tables are read with (chipFromMeta).
	var m tables.Meta
	for i, k := range meta.Keys {
		if sampled && !(nf.cal.calibration != "" && (k == runs.KeyCalibration || k == runs.KeyCalibrationDigest)) {
			m.Set(k, meta.Values[i])
		}
	}
	set := map[string]string{"gate-error": formatFloat(nf.gateError), "single-qubit-error": formatFloat(nf.cal.single),
		"readout-error": formatFloat(p01) + "," + formatFloat(p10), "fidelity": formatFloat(nf.fidelity)}
	keys := map[string]string{"gate-error": "gate_error", "single-qubit-error": runs.KeySingleQubitError, "readout-error": "readout_error", "fidelity": "fidelity"}
	for _, name := range given {
		if k, ok := keys[name]; ok {
			m.Set(k, set[name])
		}
	}
	chip, err := runs.NoiseFromMeta(m, g)
	if err != nil {
		return nil, "", badInput("%s: its noise metadata cannot be read: %v; give the noise with --gate-error, --readout-error, --fidelity, --calibration", path, err)
	}
	if nf.cal.calibration != "" {
		data, err := inputfile.ReadFile(nf.cal.calibration, inputfile.SmallLimit)
		if err != nil {
			return nil, "", badInput("--calibration %q: %v", echo(nf.cal.calibration), err)
		}
		if chip, err = circuits.ReadCalibration(nf.cal.calibration, bytes.NewReader(data), g, chip); err != nil {
			return nil, "", err
		}
	}
	return chip, source, nil
}

// scoreExactSetup returns the circuits whose ensemble the exact comparison
// averages over, and their depth: the rebuilt setup, or with --circuits
// the run parameters of a table written by sample; nil and a reason when
// there are none.
func scoreExactSetup(rebuilt *setup, depth int, circuitsIn string, meta tables.Meta, sampled bool) (*setup, int, string) {
	if rebuilt != nil {
		return rebuilt, depth, ""
	}
	if !sampled {
		return nil, 0, fmt.Sprintf("the circuits come from %s and the table records no run, so the gate set and schedule are unknown; rebuild the circuits with the circuit flags instead of --circuits", circuitsIn)
	}
	s, err := setupFromMeta(meta)
	if err != nil {
		return nil, 0, fmt.Sprintf("the table's run parameters cannot be read (%v)", err)
	}
	d, err := metaInt(meta, "depth")
	if err != nil {
		return nil, 0, fmt.Sprintf("the table records no depth (%v)", err)
	}
	return s, d, ""
}

// scoreExact is the exact comparison of a score: cmp is nil when it was
// skipped, with note saying why.
type scoreExact struct {
	source string
	chip   *circuits.ChipNoise
	cmp    *sampling.Comparison
	note   string
}

// scoreCompare runs the exact comparison of rep. The engines' refusals
// (no exact moments, too large, too slow) skip it with a note; an
// interruption is returned.
func scoreCompare(ctx context.Context, changed func(string) bool, nf *scoreNoiseFlags, rebuilt *setup, depth int, circuitsIn string, meta tables.Meta, sampled bool, path string, rep *sampling.Report, workers int) (scoreExact, error) {
	var out scoreExact
	s, d, why := scoreExactSetup(rebuilt, depth, circuitsIn, meta, sampled)
	if s == nil {
		out.source, out.note = "none", why
		return out, nil
	}
	chip, source, err := scoreNoise(changed, nf, meta, sampled, s.graph, path)
	if err != nil {
		return out, err
	}
	out.source, out.chip = source, chip
	if chip == nil {
		out.note = "no noise model: a table not written by sample records none; give the chip's noise with --gate-error, --single-qubit-error, --readout-error, --fidelity or --calibration"
		return out, nil
	}
	x, err := sampling.PredictXEB(ctx, s.graph, s.schedule, s.ensemble, d, chip, workers)
	switch {
	case errors.Is(err, context.Canceled):
		return out, errInterrupted
	case errors.Is(err, moments.ErrNoExactMoments), errors.Is(err, moments.ErrTooLarge), errors.Is(err, moments.ErrEngine), errors.Is(err, sampling.ErrPredictCost):
		out.note = "no exact engine fits: " + strings.TrimPrefix(strings.TrimPrefix(err.Error(), "moments: "), "sampling: ")
		return out, nil
	case err != nil:
		return out, err
	}
	c := sampling.Compare(rep, x)
	out.cmp = &c
	return out, nil
}

// describeSource is the text report's phrase for the origin of the noise.
func describeSource(source string, changed func(string) bool) string {
	switch source {
	case "table":
		return "from the table (the noise sample ran with)"
	case "flags":
		return "from the flags"
	}
	var given []string
	for _, name := range scoreNoiseFlagNames {
		if changed(name) {
			given = append(given, "--"+name)
		}
	}
	return "from the table, with " + strings.Join(given, ", ") + " overriding"
}

// printScoreExact prints the exact comparison block of the text report.
func printScoreExact(w io.Writer, ex scoreExact, changed func(string) bool) {
	if ex.cmp == nil {
		fmt.Fprintf(w, "\nExact expectation: not computed: %s.\n", ex.note)
		return
	}
	c := ex.cmp
	over := "over instances"
	if !c.OverInstances {
		over = "of the shots alone: too few instances for the error over instances"
	}
	fmt.Fprintf(w, "\nExact expectation under the noise model %s, at depth %d (%s engine):\n", describeSource(ex.source, changed), c.Exact.Depth, c.Exact.Engine)
	fmt.Fprintf(w, "  %-24s %8.4f   measured %s (%+.2f standard errors %s)\n", "expected linear XEB", c.Exact.Expected, plusMinus(c.Linear, c.LinearErr), c.LinearSigmas, over)
	fmt.Fprintf(w, "  %-24s %8.4f   measured %s (%+.2f standard errors)\n", "expected normalized XEB", c.Exact.Normalized, plusMinus(c.Normalized, c.NormalizedErr), c.NormalizedSigmas)
	fmt.Fprintf(w, "  %-24s %8.4f   (the product of the model's gate, readout and global fidelities)\n", "digital fidelity", c.Exact.Digital)
	if c.Exact.Engine == moments.EngineMPS {
		fmt.Fprintf(w, "  %-24s %8.2g   (estimate of the MPS truncation error of the expected linear XEB)\n", "truncation error", c.Exact.TruncationError)
	}
	fmt.Fprintf(w, "Implied fidelity:\n")
	fmt.Fprintf(w, "  %s   normalized XEB ≈ fidelity, the usual reading (right once the noise acts as global white noise)\n", pad(plusMinus(c.ImpliedNormalized, c.NormalizedErr), 17))
	fmt.Fprintf(w, "  %s   corrected by the exact model: digital fidelity × measured / expected normalized XEB\n", pad(plusMinus(c.ImpliedModel, c.ImpliedModelErr), 17))
}
