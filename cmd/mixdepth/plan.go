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
	TwoQubitGates       int        `json:"two_qubit_gates"`
	SingleQubitGates    int        `json:"single_qubit_gates"`
	GateError           float64    `json:"gate_error"`
	SingleQubitError    float64    `json:"single_qubit_error"`
	ReadoutError        [2]float64 `json:"readout_error"`
	TwoQubitFidelity    float64    `json:"two_qubit_fidelity"`
	SingleQubitFidelity float64    `json:"single_qubit_fidelity"`
	ReadoutFidelity     float64    `json:"readout_fidelity"`
	ErrorModelFidelity  *float64   `json:"error_model_fidelity"`
	PredictedFidelity   float64    `json:"predicted_fidelity"`
	Calibration         string     `json:"calibration,omitempty"`
	FidelitySource      string     `json:"fidelity_source"`
	Sigmas              *float64   `json:"sigmas"`
	RelPrecision        *float64   `json:"rel_precision"`
	ShotsSigmas         *int64     `json:"shots_sigmas"`
	ShotsRelPrecision   *int64     `json:"shots_rel_precision"`
	Shots               int64      `json:"shots"`
	// Instances and ShotsPerInstance split Shots (at least
	// stats.MinIntervalValues instances, for an error bar over instances).
	Instances        int   `json:"instances"`
	ShotsPerInstance int64 `json:"shots_per_instance"`
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
	fs := newFlags("plan", "Predicts the fidelity of a random-circuit sampling experiment with the digital error model\n"+
		"(Arute et al. 2019: the product of the gate and readout fidelities)\n\n"+
		"  F = (1 − e2)^g2 · (1 − e1)^g1 · (1 − (p01 + p10)/2)^n\n\n"+
		"with g2 two-qubit and g1 single-qubit gates counted on the graph, schedule and depth, and the\n"+
		"number of shots N the linear XEB needs: to tell F from 0 at z standard deviations,\n"+
		"N = z²(1 + 2F − F²)/F², and for a standard error r·F, N = (1 + 2F − F²)/(r·F)² (per-shot\n"+
		"variance 1 + 2F − F² for Porter–Thomas outputs). --fidelity gives F directly instead.\n"+
		"Single-qubit gates counted by default: the final layer (n) of gate sets that have one, plus two\n"+
		"per two-qubit gate for the NAME+haar1 and file gate sets G·(u_a ⊗ u_b); Haar and Clifford gates\n"+
		"count as native two-qubit gates.",
		"mixdepth plan --depth 16 --gate-error 0.005 --readout-error 0.01,0.03 --sigmas 5 --rel-precision 0.1", stdout)
	var cf circuitFlags
	cf.add(fs)
	depth := fs.Int("depth", defaultSampleDepth, "circuit depth (layers, or gates for random-edge)")
	fidelity := fs.Float64("fidelity", 0, "expected fidelity F in (0, 1] (default: the digital error model's prediction)")
	sigmas := fs.Float64("sigmas", 5, "standard deviations z at which F must differ from 0")
	rel := fs.Float64("rel-precision", 0, "relative precision r: the standard error of F_lin is r·F")
	gateError := fs.Float64("gate-error", 0, "two-qubit gate error e2 in [0, 1)")
	singleError := fs.Float64("single-qubit-error", 0, "single-qubit gate error e1 in [0, 1)")
	readout := fs.String("readout-error", "0,0", "readout flip probabilities p01,p10 (0→1, 1→0), or one value for both")
	var nf noiseFlags
	nf.add(fs, false)
	singleGates := fs.Int("single-qubit-gates", -1, "single-qubit gates to count; −1 counts them from the gate set (see above)")
	asJSON := fs.Bool("json", false, "print one JSON document instead of the text report")
	eps := fs.Float64("eps", sampling.DefaultEps, "anti-concentration threshold, as scan's: plan warns when --depth is below the depth whose R ≤ 1+eps")
	from := fs.String("from", "", "take the anti-concentration depth from this per-instance scan table of the chip (its recommended depth) instead of the exact computation")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if err := checkUnit("eps", *eps); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		return badInput("plan takes no positional arguments (got %q)", fs.Arg(0))
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
		return badInput("plan needs the expected fidelity: give --fidelity F, or error rates (--gate-error, --single-qubit-error, --readout-error) for the digital error model")
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
	if nf.calibration != "" {
		if fs.Changed("single-qubit-gates") {
			return badInput("--single-qubit-gates with --calibration: the per-element model counts each qubit's single-qubit gates itself; drop one of them")
		}
		if cal, err = nf.chip(s.graph, *gateError, *singleError, p01, p10, 1); err != nil {
			return err
		}
		f2, f1, fr, model = digitalParts(cal.Noise, s.schedule, s.ensemble, *depth)
	}
	f, source := model, "error model"
	if given {
		f, source = *fidelity, "given"
	}
	if !(f > 0) {
		return badInput("the digital error model predicts fidelity %g: no number of samples resolves it; lower the error rates or the depth", f)
	}
	doc := planJSON{
		Header: s.spec.Header(),
		Depth:  *depth, TwoQubitGates: g2, SingleQubitGates: g1, GateError: *gateError, SingleQubitError: *singleError,
		ReadoutError: [2]float64{p01, p10}, TwoQubitFidelity: f2, SingleQubitFidelity: f1, ReadoutFidelity: fr,
		PredictedFidelity: f, FidelitySource: source,
	}
	if cal != nil {
		doc.Calibration = nf.calibration
	}
	if rates {
		doc.ErrorModelFidelity = &model
	}
	var z, r float64
	if useSigmas {
		z = *sigmas
	}
	if useRel {
		r = *rel
	}
	sp, err := sampling.PlanShots(f, z, r)
	if errors.Is(err, sampling.ErrTooManyShots) {
		return badInput("the plan needs %s; raise the fidelity (fewer gates, lower error rates) or relax --sigmas/--rel-precision", strings.TrimPrefix(err.Error(), "sampling: "))
	} else if err != nil {
		return err
	}
	if useSigmas {
		doc.Sigmas, doc.ShotsSigmas = &z, &sp.ForSigmas
	}
	if useRel {
		doc.RelPrecision, doc.ShotsRelPrecision = &r, &sp.ForRelative
	}
	doc.Shots, doc.Instances, doc.ShotsPerInstance = sp.Shots, sp.Instances, sp.PerInstance
	doc.Eps, doc.Warnings = *eps, []string{}
	if err := planDepthCheck(ctx, fs, s, *depth, *eps, *from, &doc); err != nil {
		return err
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
		if cal != nil {
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
	}
	if given {
		fmt.Fprintf(stdout, "expected fidelity F = %g (given)\n", *fidelity)
	}
	fmt.Fprintln(stdout)
	if useSigmas {
		fmt.Fprintf(stdout, "shots to tell F from 0 at %gσ:        N = z²(1 + 2F − F²)/F² = %d\n", *sigmas, *doc.ShotsSigmas)
	}
	if useRel {
		fmt.Fprintf(stdout, "shots for a standard error of %g·F:  N = (1 + 2F − F²)/(r·F)² = %d\n", *rel, *doc.ShotsRelPrecision)
	}
	fmt.Fprintf(stdout, "plan for N = %d shots in all (pooled over the instances): for example %d instances × %d shots;\n"+
		"the formulas count shots only, so use at least %d instances, more when circuits differ in fidelity: the\n"+
		"variance of the estimate is σ_b²/M + (1 + 2F − F²)/(M·m) for M instances of m shots, σ_b² the\n"+
		"circuit-to-circuit variance (two-stage sampling, Cochran 1977, Sampling Techniques, ch. 10), which\n"+
		"score's error over instances includes.\n",
		doc.Shots, doc.Instances, doc.ShotsPerInstance, stats.MinIntervalValues)
	if doc.AnticoncentrationDepth != nil {
		fmt.Fprintf(stdout, "anti-concentration depth of the chip (eps %g, %s): %d; --depth %d %s.\n", *eps, doc.DepthSource,
			*doc.AnticoncentrationDepth, *depth, map[bool]string{true: "reaches it", false: "is below it (see the warning)"}[*doc.Spread])
	}
	return nil
}

// planDepthCheck finds the chip's anti-concentration depth, from the scan
// table from when given, else from the exact second moments when they
// exist and fit, and adds a warning to doc when depth is below it.
func planDepthCheck(ctx context.Context, fs *pflag.FlagSet, s *setup, depth int, eps float64, from string, doc *planJSON) error {
	var ac int
	found := false
	switch {
	case from != "":
		vf := addVerdictFlags(pflag.NewFlagSet("from", pflag.ContinueOnError))
		*vf.eps = eps
		sc, err := loadScan(fs, vf, []string{from}, "plan --from")
		if err != nil {
			return err
		}
		if sc.setup.graph.Digest() != s.graph.Digest() {
			return badInput("--from %s is a scan of graph %s, not of %s: scan the chip you plan for", from, sc.setup.graph.Name, s.graph.Name)
		}
		ac, found = sc.curve.Depth, sc.curve.Found
		doc.DepthSource = "scan table " + from
		if !found {
			doc.Warnings = append(doc.Warnings, fmt.Sprintf("--from %s: no depth of that scan is spread, so the depth cannot be checked; scan deeper", from))
			return nil
		}
	case depth <= 1000:
		depths := make([]int, depth)
		for i := range depths {
			depths[i] = i + 1
		}
		r, err := moments.Exact(ctx, s.graph, s.schedule, s.ensemble, depths, moments.ExactEps(eps), moments.ExactCurveOnly())
		if err != nil {
			// No exact moments for this gate set or size: nothing to check
			// against without --from.
			return nil
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
