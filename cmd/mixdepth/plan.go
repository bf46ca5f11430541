package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/spf13/pflag"

	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/runs"
	"mixdepth/sampling"
	"mixdepth/stats"
)

func init() {
	register(command{name: "plan", summary: "predict the fidelity of a sampling experiment and the shots it needs", run: runPlan})
}

// planJSON is the --json document of plan. Field names are an interface.
type planJSON struct {
	runs.Header
	Depth               int        `json:"depth"`
	TwoQubitGates       int        `json:"gate_count"`
	SingleQubitGates    int        `json:"single_qubit_gates"`
	GateError           float64    `json:"gate_error"`
	SingleQubitError    float64    `json:"single_qubit_error"`
	ReadoutError        [2]float64 `json:"readout_error"`
	TwoQubitFidelity    float64    `json:"two_qubit_fidelity"`
	SingleQubitFidelity float64    `json:"single_qubit_fidelity"`
	ReadoutFidelity     float64    `json:"readout_fidelity"`
	PredictedFidelity   float64    `json:"predicted_fidelity"`
	Calibration         string     `json:"calibration,omitempty"`
	FidelitySource      string     `json:"fidelity_source"`
	Sigmas              *float64   `json:"sigmas"`
	RelPrecision        *float64   `json:"rel_precision"`
	ShotsSigmas         *int64     `json:"shots_sigmas"`
	ShotsRelPrecision   *int64     `json:"shots_rel_precision"`
	Shots               int64      `json:"shots"`
	// The exact prediction (null when no exact engine ran: ExactNote says
	// why) and the digital model's fidelity and shots beside it (null
	// without error rates).
	XEBExpected     *float64 `json:"xeb_expected"`
	XEBNormalized   *float64 `json:"xeb_normalized"`
	XEBTruncation   *float64 `json:"xeb_truncation_error,omitempty"`
	ExactEngine     *string  `json:"exact_engine"`
	ExactNote       string   `json:"exact_note,omitempty"`
	DigitalFidelity *float64 `json:"digital_fidelity"`
	DigitalShots    *int64   `json:"digital_shots"`
	// ShotsAtOne: xeb_expected exceeds 1 (circuits far from
	// anti-concentration) and the shot formulas took F = 1.
	ShotsAtOne       bool    `json:"shots_at_fidelity_one,omitempty"`
	ShotVariance     float64 `json:"shot_variance"`
	CircuitVariance  float64 `json:"circuit_variance"`
	CircuitVarSource string  `json:"circuit_variance_source"`
	TargetVariance   float64 `json:"target_variance"`
	CircuitCost      float64 `json:"circuit_cost"`
	// Instances × ShotsPerInstance is the cheapest split for the target
	// variance (sampling.PlanSplit), with TotalShots = their product, its
	// variance and its cost in shots.
	Instances        int     `json:"instances"`
	ShotsPerInstance int64   `json:"shots_per_instance"`
	TotalShots       int64   `json:"total_shots"`
	SplitVariance    float64 `json:"split_variance"`
	SplitCost        float64 `json:"split_cost"`
	// AnticoncentrationDepth is the chip's depth from exact (when it fits)
	// or from the --from scan table, with its source; Spread says whether
	// --depth reaches it. Null when neither is available.
	AnticoncentrationDepth *int     `json:"anticoncentration_depth"`
	DepthSource            string   `json:"depth_source"`
	Eps                    float64  `json:"eps"`
	Spread                 *bool    `json:"spread"`
	Warnings               []string `json:"warnings"`
}

func runPlan(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("plan", "Predicts what the linear cross-entropy benchmark of a random-circuit sampling experiment will\n"+
		"read on a noisy chip, and the circuits × shots a measurement of it needs.\n\n"+
		"With error rates (--gate-error, --single-qubit-error, --readout-error, --calibration) and a gate\n"+
		"set and size that an exact engine takes (see mixdepth exact), F is the exact expected linear XEB\n"+
		"under that noise; otherwise, and as a labelled second line, the digital error model\n"+
		"(Arute et al. 2019: the product of the gate and readout fidelities)\n\n"+
		"  F = (1 − e2)^g2 · (1 − e1)^g1 · (1 − (p01 + p10)/2)^n\n\n"+
		"with g2 two-qubit and g1 single-qubit gates counted on the graph, schedule and depth.\n"+
		"--fidelity gives F directly instead. The shots N the linear XEB needs: to tell F from 0 at z\n"+
		"standard deviations, N = z²(1 + 2F − F²)/F², and for a standard error r·F, N = (1 + 2F − F²)/(r·F)²\n"+
		"(per-shot variance 1 + 2F − F² for Porter–Thomas outputs). The split into M circuits of m shots\n"+
		"is the cheapest whose variance σ_b²/M + σ_w²/(M·m) meets the target, a circuit costing\n"+
		"--circuit-cost shots (two-stage sampling, Cochran 1977, §10.6), σ_b² from the --from scan table's\n"+
		"per-instance spread at --depth or else the Haar floor, a lower bound.\n"+
		"Single-qubit gates counted by default: the final layer (n) of gate sets that have one, plus two\n"+
		"per two-qubit gate for the NAME+haar1 and file gate sets G·(u_a ⊗ u_b); Haar and Clifford gates\n"+
		"count as native two-qubit gates.",
		"mixdepth plan --depth 16 --gate-error 0.005 --readout-error 0.01,0.03 --sigmas 5 --rel-precision 0.1", stdout)
	var cf circuitFlags
	cf.add(fs)
	depth := fs.Int("depth", defaultSampleDepth, "circuit depth (layers, or gates for random-edge)")
	fidelity := fs.Float64("fidelity", 0, "expected fidelity F in (0, 1] (default: the exact expected XEB under the error rates, or the digital error model's prediction)")
	sigmas := fs.Float64("sigmas", 5, "standard deviations z at which F must differ from 0")
	rel := fs.Float64("rel-precision", 0, "relative precision r: the standard error of F_lin is r·F")
	gateError := fs.Float64("gate-error", 0, "two-qubit gate error e2 in [0, 1)")
	singleError := fs.Float64("single-qubit-error", 0, "single-qubit gate error e1 in [0, 1)")
	readout := fs.String("readout-error", "0,0", "readout flip probabilities p01,p10 (0→1, 1→0), or one value for both")
	var nf noiseFlags
	nf.add(fs, false)
	singleGates := fs.Int("single-qubit-gates", -1, "single-qubit gates to count; -1 counts them from the gate set (see above); a count of your own leaves the exact engines out")
	circuitCost := fs.Float64("circuit-cost", sampling.DefaultCircuitCost, "cost of running one more circuit (compiling, loading) in units of one shot, ≥ 0; the default is about 0.1 s of loading against 100 µs per shot (README: circuits × shots)")
	asJSON := fs.Bool("json", false, "print one JSON document instead of the text report")
	eps := fs.Float64("eps", sampling.DefaultEps, "anti-concentration threshold, as scan's: plan warns when --depth is below the depth whose R ≤ 1+eps")
	from := fs.String("from", "", "per-instance scan table of the chip: its recommended depth replaces the exact anti-concentration depth, and its spread of Z at --depth gives the circuit-to-circuit variance")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if err := checkUnit("eps", *eps); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		return badInput("plan takes no positional arguments (got %q)", fs.Arg(0))
	}
	if !(*circuitCost >= 0) || math.IsInf(*circuitCost, 1) {
		return badInput("--circuit-cost %v: must be a finite number ≥ 0, the cost of one more circuit in shots", *circuitCost)
	}
	s, err := cf.resolve(ctx)
	if err != nil {
		return err
	}
	if *depth < 1 || *depth > maxDepth {
		return badInput("--depth %d: must be between 1 and %d", *depth, maxDepth)
	}
	for _, e := range []struct {
		name string
		v    float64
	}{{"gate-error", *gateError}, {"single-qubit-error", *singleError}} {
		if !(e.v >= 0 && e.v < 1) {
			return badInput("--%s %v: must lie in [0, 1)", e.name, e.v)
		}
	}
	p01, p10, err := parseReadout(*readout)
	if err != nil {
		return err
	}
	given := fs.Changed("fidelity")
	if given && !(*fidelity > 0 && *fidelity <= 1) {
		return badInput("--fidelity %v: must lie in (0, 1]", *fidelity)
	}
	rates := fs.Changed("gate-error") || fs.Changed("single-qubit-error") || fs.Changed("readout-error") || nf.calibration != ""
	if !given && !rates {
		return badInput("plan needs the expected fidelity: give --fidelity F, or error rates (--gate-error, --single-qubit-error, --readout-error) for the exact prediction and the digital error model")
	}
	useSigmas := fs.Changed("sigmas") || !fs.Changed("rel-precision")
	if useSigmas && !(*sigmas > 0 && !math.IsInf(*sigmas, 1)) {
		return badInput("--sigmas %v: must be positive", *sigmas)
	}
	useRel := fs.Changed("rel-precision")
	if useRel && !(*rel > 0 && !math.IsInf(*rel, 1)) {
		return badInput("--rel-precision %v: must be positive", *rel)
	}
	counts := sampling.CountGates(s.schedule, s.ensemble, s.graph.Qubits, *depth)
	if fs.Changed("single-qubit-gates") {
		if *singleGates < 0 {
			return badInput("--single-qubit-gates %d: must be at least 0", *singleGates)
		}
		counts.SingleQubit = *singleGates
	}

	n, g2, g1 := counts.Qubits, counts.TwoQubit, counts.SingleQubit
	errModel := sampling.ErrorModel{TwoQubitError: *gateError, SingleQubitError: *singleError, Depolarizing: 1, Readout01: p01, Readout10: p10}
	pred := errModel.Predict(counts)
	f2, f1, fr, model := pred.TwoQubit, pred.SingleQubit, pred.Readout, pred.Fidelity
	var cal *circuits.Calibration
	if nf.calibration != "" && fs.Changed("single-qubit-gates") {
		return badInput("--single-qubit-gates with --calibration: the per-element model counts each qubit's single-qubit gates itself; drop one of them")
	}
	if rates {
		if cal, err = nf.chip(s.graph, *gateError, *singleError, p01, p10, 1); err != nil {
			return err
		}
	}
	if nf.calibration != "" {
		parts := cal.Noise.DigitalParts(s.schedule, s.ensemble, *depth)
		f2, f1, fr, model = parts.TwoQubit, parts.SingleQubit, parts.Readout, parts.Fidelity
	}
	if rates && !given && !(model > 0) {
		return badInput("the digital error model predicts fidelity %g: no number of shots resolves it; lower the error rates or the depth", model)
	}

	// The scan table, read first: its spread of Z at the depth gives the
	// circuit-to-circuit variance.
	var sc *loadedScan
	var spread *stats.Summary
	var spreadNote string
	if *from != "" {
		vf := addVerdictFlags(pflag.NewFlagSet("from", pflag.ContinueOnError))
		*vf.eps = *eps
		if sc, err = loadScan(fs, vf, []string{*from}, "plan --from"); err != nil {
			return err
		}
		if sc.setup.graph.Digest() != s.graph.Digest() {
			return badInput("--from %s is a scan of graph %s, not of %s: scan the chip you plan for", *from, sc.setup.graph.Name, s.graph.Name)
		}
		spread, spreadNote = scanSpread(sc, s, *from, *depth)
	}

	cfg := sampling.ExperimentConfig{Depth: *depth, Digital: model, CircuitCost: *circuitCost,
		CollisionSpread: spread, ExactOptions: []moments.ExactOption{moments.ExactEps(*eps)}}
	if useSigmas {
		cfg.Sigmas = *sigmas
	}
	if useRel {
		cfg.Relative = *rel
	}
	if rates {
		cfg.Noise = cal.Noise
	}
	if given {
		cfg.Given = *fidelity
	}
	if fs.Changed("single-qubit-gates") {
		cfg.NoExact = "--single-qubit-gates sets a gate count of its own, which the exact engines do not model"
	}
	// Without a scan table the exact run also gives the anti-concentration
	// depth: every depth up to --depth (one evolution, read out at each).
	fullCurve := *from == "" && *depth <= planExactMaxDepth
	if fullCurve {
		cfg.ExactDepths = make([]int, *depth)
		for i := range cfg.ExactDepths {
			cfg.ExactDepths[i] = i + 1
		}
	}
	x, err := sampling.PlanExperiment(ctx, s.graph, s.schedule, s.ensemble, cfg)
	if errors.Is(err, sampling.ErrTooManyShots) {
		return badInput("the plan needs %s; raise the fidelity (fewer gates, lower error rates) or relax --sigmas/--rel-precision", strings.TrimPrefix(err.Error(), "sampling: "))
	} else if err != nil {
		return err
	}

	f := x.Fidelity
	doc := planJSON{
		Header: s.spec.Header(),
		Depth:  *depth, TwoQubitGates: g2, SingleQubitGates: g1, GateError: *gateError, SingleQubitError: *singleError,
		ReadoutError: [2]float64{p01, p10}, TwoQubitFidelity: f2, SingleQubitFidelity: f1, ReadoutFidelity: fr,
		PredictedFidelity: f, FidelitySource: x.Source, ExactNote: x.ExactNote,
		ShotsAtOne: x.ShotsAtOne, ShotVariance: x.ShotVariance, CircuitVariance: x.CircuitVariance, CircuitVarSource: x.CircuitVarianceSource,
		TargetVariance: x.TargetVariance, CircuitCost: x.CircuitCost,
	}
	if cal != nil && nf.calibration != "" {
		doc.Calibration = nf.calibration
	}
	if rates {
		doc.DigitalFidelity = &model
	}
	if x.Exact != nil {
		doc.XEBExpected, doc.XEBNormalized, doc.ExactEngine = &x.XEBExpected, &x.XEBNormalized, &x.ExactEngine
		if x.XEBTruncation != 0 {
			doc.XEBTruncation = &x.XEBTruncation
		}
	}
	if x.DigitalShots != nil {
		doc.DigitalShots = &x.DigitalShots.Shots
	}
	sp := x.Shots
	if useSigmas {
		doc.Sigmas, doc.ShotsSigmas = &cfg.Sigmas, &sp.ForSigmas
	}
	if useRel {
		doc.RelPrecision, doc.ShotsRelPrecision = &cfg.Relative, &sp.ForRelative
	}
	doc.Shots = sp.Shots
	doc.Instances, doc.ShotsPerInstance = x.Split.Instances, x.Split.PerInstance
	doc.TotalShots = int64(x.Split.Instances) * x.Split.PerInstance
	doc.SplitVariance, doc.SplitCost = x.Split.Variance, x.Split.Cost
	doc.Eps, doc.Warnings = *eps, []string{}
	var curve *moments.Result
	if fullCurve {
		curve = x.Exact
	}
	if err := planDepthCheck(ctx, s, *depth, *eps, *from, sc, curve, &doc); err != nil {
		return err
	}
	if spreadNote != "" {
		doc.Warnings = append(doc.Warnings, spreadNote)
	}
	for _, w := range doc.Warnings {
		fmt.Fprintln(stderr, "mixdepth: warning: "+w)
	}
	if *asJSON {
		return writeJSON(stdout, doc)
	}
	fmt.Fprintln(stdout, s.describe())
	if note := s.partsNote(); note != "" {
		fmt.Fprintln(stdout, strings.Replace(note, "R below is", "the anti-concentration depth below is", 1))
	}
	fmt.Fprintf(stdout, "depth %d: %d two-qubit gates, %d single-qubit gates, %d qubits read out\n\n", *depth, g2, g1, n)
	if rates {
		fmt.Fprintln(stdout, "digital error model (Arute et al. 2019, Nature 574, 505):")
		if nf.calibration != "" {
			fmt.Fprintf(stdout, "  calibration %s: rates of %d coupler(s) and %d qubit(s), the others uniform\n", nf.calibration, cal.Couplers, cal.Qubits)
			fmt.Fprintf(stdout, "  two-qubit gates   Π (1 − e2 of the coupler) = %.4f\n", f2)
			fmt.Fprintf(stdout, "  single-qubit      Π (1 − e1 of the qubit) = %.4f\n", f1)
			fmt.Fprintf(stdout, "  readout           Π (1 − (p01 + p10)/2 of the qubit) = %.4f\n", fr)
		} else {
			fmt.Fprintf(stdout, "  two-qubit gates   (1 − %g)^%d = %.4f\n", *gateError, g2, f2)
			fmt.Fprintf(stdout, "  single-qubit      (1 − %g)^%d = %.4f\n", *singleError, g1, f1)
			fmt.Fprintf(stdout, "  readout           (1 − (%g + %g)/2)^%d = %.4f\n", p01, p10, n, fr)
		}
		fmt.Fprintf(stdout, "  predicted fidelity F = %.4f\n", model)
		if x.Exact != nil {
			trunc := ""
			if x.XEBTruncation != 0 {
				trunc = fmt.Sprintf(" ± %.1e", x.XEBTruncation)
			}
			fmt.Fprintf(stdout, "exact expected linear XEB under the same noise (%s engine, as mixdepth exact computes it):\n", engineName(x.ExactEngine))
			fmt.Fprintf(stdout, "  xeb_expected = %.4f%s, normalized by the ideal D·E[Z] − 1: %.4f (digital model / exact normalized = %.4f)\n",
				x.XEBExpected, trunc, x.XEBNormalized, model/x.XEBNormalized)
		} else {
			fmt.Fprintf(stdout, "no exact prediction, so the plan uses the digital model: %s\n", strings.TrimPrefix(x.ExactNote, "moments: "))
		}
	}
	switch x.Source {
	case sampling.FidelityGiven:
		fmt.Fprintf(stdout, "expected fidelity F = %g (given)\n", *fidelity)
	case sampling.FidelityExact:
		fmt.Fprintf(stdout, "the plan uses F = %.4f, the exact expected linear XEB", f)
		if x.DigitalShots != nil {
			fmt.Fprintf(stdout, "; the digital model's F = %.4f would ask for N = %d shots", model, x.DigitalShots.Shots)
		}
		fmt.Fprintln(stdout)
	}
	if x.ShotsAtOne {
		fmt.Fprintln(stdout, "F > 1: these circuits have not anti-concentrated (D·E[Z] − 1 > 1), and the Porter–Thomas shot variance\n"+
			"1 + 2F − F² holds for F ≤ 1 only, so the formulas below take F = 1")
	}
	fmt.Fprintln(stdout)
	if useSigmas {
		fmt.Fprintf(stdout, "shots to tell F from 0 at %gσ:        N = z²(1 + 2F − F²)/F² = %d\n", *sigmas, *doc.ShotsSigmas)
	}
	if useRel {
		fmt.Fprintf(stdout, "shots for a standard error of %g·F:  N = (1 + 2F − F²)/(r·F)² = %d\n", *rel, *doc.ShotsRelPrecision)
	}
	printSplit(stdout, x, *from, *depth)
	if doc.AnticoncentrationDepth != nil {
		fmt.Fprintf(stdout, "anti-concentration depth of the chip (eps %g, %s): %d; --depth %d %s.\n", *eps, doc.DepthSource,
			*doc.AnticoncentrationDepth, *depth, map[bool]string{true: "reaches it", false: "is below it (see the warning)"}[*doc.Spread])
	}
	return nil
}

// planExactMaxDepth is the deepest plan whose exact run also reads out every
// shallower depth for the anti-concentration check.
const planExactMaxDepth = 1000

// engineName names an engine of moments.Exact in the report.
func engineName(e string) string {
	if e == moments.EngineMPS {
		return "matrix product state"
	}
	return "state-vector moment"
}

// printSplit prints the circuits × shots recommendation of x.
func printSplit(w io.Writer, x *sampling.Experiment, from string, depth int) {
	sp := x.Split
	fmt.Fprintf(w, "\ncircuits × shots (two-stage sampling, Cochran, Sampling Techniques, 1977, §10.6): the variance of\n"+
		"the pooled estimate over M circuits of m shots is σ_b²/M + σ_w²/(M·m), cheapest at m* = sqrt(c·σ_w²/σ_b²):\n")
	fmt.Fprintf(w, "  per-shot variance          σ_w² = 1 + 2F − F² = %.4g\n", x.ShotVariance)
	if x.CircuitVarianceSource == sampling.VarianceScan {
		fmt.Fprintf(w, "  circuit-to-circuit         σ_b² = F_norm²·D²·Var(Z_U) = %.4g (Var(Z_U) over the instances of %s at depth %d;\n"+
			"                             global-depolarizing scaling of each circuit's XEB, Boixo et al. 2018)\n", x.CircuitVariance, from, depth)
	} else {
		fmt.Fprintf(w, "  circuit-to-circuit         σ_b² ≥ F_norm²·D²·Var_Haar(Z) = %.4g, the Haar floor: a lower bound, since circuits\n"+
			"                             of finite depth spread more (give a scan table with --from for the real spread)\n", x.CircuitVariance)
	}
	fmt.Fprintf(w, "  target variance            %.4g;  one circuit costs c = %g shots\n", x.TargetVariance, x.CircuitCost)
	fmt.Fprintf(w, "cheapest split: %d instances × %d shots\n  (%d shots in all, cost %.0f shot-equivalents, variance %.4g)",
		sp.Instances, sp.PerInstance, int64(sp.Instances)*sp.PerInstance, sp.Cost, sp.Variance)
	if sp.Instances == stats.MinIntervalValues {
		fmt.Fprintf(w, ";\n  %d instances is the fewest that give an error bar over instances", stats.MinIntervalValues)
		if x.CircuitVarianceSource == sampling.VarianceHaarFloor {
			fmt.Fprint(w, ": run at least that many\n  (more if score's error over instances exceeds the shots' error)")
		}
	}
	fmt.Fprintln(w, ".")
}

// scanSpread returns the spread of the per-instance Z of the scan sc at
// depth, or nil with a note when the scan cannot give it (another gate set
// or schedule, no row at that depth, fewer than two instances).
func scanSpread(sc *loadedScan, s *setup, from string, depth int) (*stats.Summary, string) {
	if a, b := sc.setup.ensemble.Name(), s.ensemble.Name(); a != b || sc.setup.schedule.Kind() != s.schedule.Kind() {
		return nil, fmt.Sprintf("--from %s scans %s gates on a %s schedule, not %s on %s: its spread of Z is not this plan's; the circuit-to-circuit variance is the Haar floor", from, a, sc.setup.schedule.Kind(), b, s.schedule.Kind())
	}
	for _, row := range sc.curve.Rows {
		if row.Depth != depth {
			continue
		}
		if row.Collision.N < 2 {
			return nil, fmt.Sprintf("--from %s has %d instance(s) at depth %d: the circuit-to-circuit variance needs two or more, so it is the Haar floor", from, row.Collision.N, depth)
		}
		sum := row.Collision
		return &sum, ""
	}
	return nil, fmt.Sprintf("--from %s has no row at depth %d, so the circuit-to-circuit variance is the Haar floor; scan that depth for the real spread", from, depth)
}

// planDepthCheck finds the chip's anti-concentration depth, from the scan
// sc when given, else from the exact curve (every depth up to depth) when
// the plan computed it, else from its own noiseless exact run when the
// moments exist and fit, and adds a warning to doc when depth is below it.
func planDepthCheck(ctx context.Context, s *setup, depth int, eps float64, from string, sc *loadedScan, curve *moments.Result, doc *planJSON) error {
	var ac int
	found := false
	switch {
	case sc != nil:
		ac, found = sc.curve.Depth, sc.curve.Found
		doc.DepthSource = "scan table " + from
		if !found {
			doc.Warnings = append(doc.Warnings, fmt.Sprintf("--from %s: no depth of that scan is spread, so the depth cannot be checked; scan deeper", from))
			return nil
		}
	case depth <= planExactMaxDepth:
		r := curve
		if r == nil {
			depths := make([]int, depth)
			for i := range depths {
				depths[i] = i + 1
			}
			var err error
			r, err = moments.Exact(ctx, s.graph, s.schedule, s.ensemble, depths, moments.ExactEps(eps), moments.ExactCurveOnly())
			if err != nil {
				if ctx.Err() != nil {
					return err
				}
				// No exact moments for this gate set or size: nothing to
				// check against without --from.
				return nil
			}
		}
		doc.DepthSource = "exact E[Z]"
		ac, found = r.Depth, r.Found
		if !found {
			ratio := "E[Z]/Z_H"
			if r.Parts > 1 {
				ratio = fmt.Sprintf("E[Z]/%.6g (the chip is in %d parts: the product of their Haar values, which E[Z] tends to)", r.Limit, r.Parts)
			}
			doc.Warnings = append(doc.Warnings, fmt.Sprintf("depth %d has not anti-concentrated: the exact R = %s there is %.4f > 1+eps = %.4f, so the raw linear XEB overstates the fidelity; use deeper circuits (see mixdepth exact)",
				depth, ratio, r.Ratio[len(r.Ratio)-1], 1+eps))
			spread := false
			doc.Spread = &spread
			return nil
		}
	default:
		return nil
	}
	spread := depth >= ac
	doc.AnticoncentrationDepth, doc.Spread = &ac, &spread
	if !spread {
		doc.Warnings = append(doc.Warnings, fmt.Sprintf("depth %d is below the chip's anti-concentration depth %d (%s, eps %g): the raw linear XEB overstates the fidelity there; plan for depth %d or more",
			depth, ac, doc.DepthSource, eps, ac))
	}
	return nil
}
