package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
	"strconv"
	"strings"

	"github.com/schollz/progressbar/v3"
	"github.com/spf13/pflag"

	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/plots"
	"mixdepth/runs"
	"mixdepth/tables"
)

func init() {
	register(command{name: "exact", summary: "exact second moments: E[Z], frame potential F2, spectral gap and depth bound, no sampling", run: runExact})
}

type exactJSON struct {
	runs.Header
	HaarCollision float64 `json:"haar_collision"`
	// CollisionLimit is the product of the parts' Haar values, against which
	// collision_ratio is measured, for a chip in parts (--allow-disconnected).
	CollisionLimit         *float64       `json:"collision_limit,omitempty"`
	Eps                    float64        `json:"eps"`
	AnticoncentrationDepth *int           `json:"anticoncentration_depth"`
	DepthUncertain         bool           `json:"depth_uncertain,omitempty"`
	Engine                 string         `json:"engine"`
	BondDim                int            `json:"bond_dim,omitempty"`
	QubitOrder             []int          `json:"qubit_order,omitempty"`
	OrderBandwidth         int            `json:"order_bandwidth,omitempty"`
	ExtrapolatedFrom       []string       `json:"extrapolated_from,omitempty"`
	FrameNote              string         `json:"frame_potential_note,omitempty"`
	GapNote                string         `json:"gap_note,omitempty"`
	Rows                   []exactJSONRow `json:"rows"`
	Gap                    *exactJSONGap  `json:"gap,omitempty"`
	// Noise and XEBAgreement are present with any noise flag.
	Noise        *exactJSONNoise     `json:"noise,omitempty"`
	XEBAgreement []exactXEBAgreement `json:"xeb_agreement,omitempty"`
}

type exactJSONRow struct {
	Depth          int      `json:"depth"`
	GateCount      int      `json:"gate_count"`
	Collision      float64  `json:"collision"`
	CollisionRatio float64  `json:"collision_ratio"`
	FramePotential *float64 `json:"frame_potential"`
	Spread         bool     `json:"spread"`
	TruncationErr  float64  `json:"truncation_error"`
	BondDimUsed    int      `json:"bond_dim_used,omitempty"`
	// GateError is the row's rate with a list of --gate-error values.
	GateError *float64 `json:"gate_error,omitempty"`
	// The benchmark fields, present with any noise flag.
	XEBExpected     *float64 `json:"xeb_expected,omitempty"`
	XEBIdeal        *float64 `json:"xeb_ideal,omitempty"`
	XEBNormalized   *float64 `json:"xeb_normalized,omitempty"`
	DigitalFidelity *float64 `json:"digital_fidelity,omitempty"`
	XEBOverDigital  *float64 `json:"xeb_over_digital,omitempty"`
	XEBTruncation   *float64 `json:"xeb_truncation_error,omitempty"`
}

type exactJSONGap struct {
	SecondEigenvalue float64 `json:"second_eigenvalue"`
	HamiltonianGap   float64 `json:"hamiltonian_gap"`
	MinDegree        int     `json:"min_degree"`
	BoundEps         float64 `json:"bound_eps"`
	DesignDepthBound int     `json:"design_depth_bound"`
}

// gatesHint adds the command that estimates what the exact engines refuse
// to the error of a gate set with no exact second moments.
func gatesHint(err error) error {
	if errors.Is(err, moments.ErrNoExactMoments) {
		return fmt.Errorf("%w; use 'mixdepth scan' to estimate them", err)
	}
	return err
}

func runExact(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("exact", "Computes the ensemble averages that decide anti-concentration exactly, with no sampling:\nE[Z]/Z_H and the second frame potential F2 at each depth, and for the random-edge schedule\nthe spectral gap of the second-moment operator and the design-depth bound it implies.\nWith a noise flag (--gate-error, --single-qubit-error, --readout-error, --fidelity) it also\npredicts the expected cross-entropy benchmark at each depth and compares it with the digital error model.",
		"mixdepth exact --graph grid:3x4 --depths 1:16 --json", stdout)
	var cf circuitFlags
	cf.add(fs)
	depthSpec := fs.String("depths", "", "depths to report: 2,4,8 or FROM:TO or FROM:TO:STEP (default 1:20; random-edge 10:400:10)")
	eps := fs.Float64("eps", 0.05, "anti-concentration threshold: the first depth with E[Z]/Z_H ≤ 1+eps")
	boundEps := fs.Float64("bound-eps", 0.01, "ε of the design-depth bound |E|(2nk ln 2 + ln(1/ε))/Δ, k = 2")
	workers := fs.Int("workers", defaultWorkers(), "worker goroutines")
	out := fs.String("out", "", "write the per-depth table to FILE.arrow or FILE.parquet")
	plot := fs.String("plot", "", "draw the exact E[Z]/Z_H − 1 against depth to FILE.png or FILE.svg")
	explain := fs.Bool("explain", false, "print the gate set's 4×4 transfer matrix on {I,S}² and its eigenvalues, then stop")
	engine := fs.String("engine", moments.EngineAuto, fmt.Sprintf("engine for E[Z]: auto (the 2^n vector up to %d qubits, a matrix product state beyond), vector, mps, or extrapolate (fit smaller members of a line or lattice strip, up to %d qubits)", moments.AutoVectorMaxQubits, moments.DefaultExtrapolateQubits))
	bondFlag := fs.String("bond-dim", "auto", fmt.Sprintf("bond dimension cap of the mps engine, 2..%d; auto: %d for chains and rings (order bandwidth ≤ 2), %d otherwise; the error estimate reruns at half of it", moments.MPSMaxBond, moments.DefaultBondDim(1), moments.DefaultBondDim(3)))
	orderFlag := fs.String("order", "auto", "qubit order of the mps engine: auto, or FILE listing the qubit ids in order")
	asJSON := fs.Bool("json", false, "print one JSON document instead of the text report")
	var nf xebFlags
	nf.add(fs)
	nf.cal.add(fs, false)
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		return badInput("exact takes no positional arguments (got %q)", fs.Arg(0))
	}
	if !slices.Contains(moments.Engines, *engine) {
		return badInput("--engine %q: give one of %s", *engine, strings.Join(moments.Engines, ", "))
	}
	bondDim := 0
	if *bondFlag != "auto" {
		b, err := strconv.Atoi(*bondFlag)
		if err != nil || b < 2 || b > moments.MPSMaxBond {
			return badInput("--bond-dim %s: give auto or a whole number 2..%d (each update takes an SVD of size 2·bond)", *bondFlag, moments.MPSMaxBond)
		}
		bondDim = b
	}
	var files ioCheck
	files.circuitInputs(&cf)
	nf.cal.inputs(&files)
	files.output("out", *out)
	files.output("plot", *plot)
	if err := files.check(fs); err != nil {
		return err
	}
	s, err := cf.resolve(ctx)
	if err != nil {
		return err
	}
	var order []int
	if *orderFlag != "auto" {
		if order, err = readOrderFile(*orderFlag, s.graph); err != nil {
			return err
		}
	}
	if *explain {
		return explainTransfer(stdout, s.ensemble)
	}
	if *depthSpec == "" {
		*depthSpec = "1:20"
		if s.schedule.Kind() == circuits.KindRandomEdge {
			*depthSpec = "10:400:10"
		}
	}
	depths, err := parseDepths(*depthSpec)
	if err != nil {
		return err
	}
	if err := checkUnit("eps", *eps); err != nil {
		return err
	}
	if err := checkUnit("bound-eps", *boundEps); err != nil {
		return err
	}
	if *workers <= 0 {
		return badInput("--workers %d: must be at least 1", *workers)
	}
	noisy := nf.given(fs)
	if err := nf.parse(); err != nil {
		return err
	}
	meta := runMeta(s, &cf)
	meta.Set("command", "exact")
	meta.Set("depths", joinInts(depths))
	meta.Set("eps", strconv.FormatFloat(*eps, 'g', -1, 64))
	if noisy {
		// The calibration file is read once, on the first rate, so that its
		// content is in the metadata before the table's writability check.
		cal, err := exactNoise(s.graph, &nf, nf.gateErrors[0])
		if err != nil {
			return err
		}
		nf.info = cal
		nf.setMeta(&meta)
	}
	if *out != "" {
		fields := runs.ExactFields()
		if noisy {
			fields = runs.ExactXEBFields()
		}
		if err := checkWritable(*out, fields, meta, "--out"); err != nil {
			return err
		}
	}
	if *plot != "" {
		if err := plots.CheckPath(*plot); err != nil {
			return usageError{fmt.Errorf("--plot: %w", err)}
		}
	}
	var progress func(done, total int)
	if isTerminal(stderr) {
		var bar *progressbar.ProgressBar
		progress = func(done, total int) {
			if bar == nil {
				bar = progressbar.NewOptions(total, progressbar.OptionSetWriter(stderr),
					progressbar.OptionSetDescription("exact second moments"), progressbar.OptionClearOnFinish())
			}
			_ = bar.Set(done)
		}
	}
	exactOpts := []moments.ExactOption{moments.ExactWorkers(*workers), moments.ExactEps(*eps), moments.ExactProgress(progress),
		moments.ExactEngine(*engine), moments.ExactBondDim(bondDim), moments.ExactOrder(order)}
	// Without noise one run; with it, one run per gate error rate, the
	// first also computing the frame potential and gap.
	rates := []float64{0}
	if noisy {
		rates = nf.gateErrors
	}
	var results []*moments.Result
	for k, rate := range rates {
		opts := exactOpts
		if noisy {
			cal, err := exactNoise(s.graph, &nf, rate)
			if err != nil {
				return err
			}
			opts = append(slices.Clone(exactOpts), moments.ExactNoise(cal.Noise))
			if k > 0 {
				opts = append(opts, moments.ExactCurveOnly())
			}
		}
		r, err := moments.Exact(ctx, s.graph, s.schedule, s.ensemble, depths, opts...)
		if err != nil {
			return gatesHint(err)
		}
		results = append(results, r)
	}
	r := results[0]
	if *plot != "" {
		var err error
		if noisy {
			err = plotXEB(*plot, s, rates, results)
		} else {
			err = plotExact(*plot, s, r)
		}
		if err != nil {
			return err
		}
	}
	var gap *exactJSONGap
	if g := r.Gap; g != nil {
		gap = &exactJSONGap{SecondEigenvalue: g.SecondEigenvalue, HamiltonianGap: g.HamiltonianGap,
			MinDegree: g.MinDegree, BoundEps: *boundEps, DesignDepthBound: moments.DesignDepthBound(*g, s.graph.Qubits, 2, *boundEps)}
	}
	depth, found := r.Depth, r.Found

	if *out != "" {
		// The engine that computed the values, as the JSON names it.
		meta.Set("engine", r.Engine)
		if r.Engine == moments.EngineMPS {
			meta.Set("bond_dim", strconv.Itoa(r.BondDim))
		}
		if len(r.ExtrapolatedFrom) > 0 {
			meta.Set("extrapolated_from", strings.Join(r.ExtrapolatedFrom, ","))
		}
		var err error
		if noisy {
			err = runs.WriteExactXEBTable(*out, meta, rates, results)
		} else {
			err = runs.WriteExactTable(*out, meta, r)
		}
		if err != nil {
			return err
		}
	}
	if *asJSON {
		doc := exactJSON{Header: s.spec.Header(), HaarCollision: r.HaarCollision, Eps: *eps, FrameNote: r.FrameNote, GapNote: r.GapNote, Gap: gap,
			Engine: r.Engine, BondDim: r.BondDim, QubitOrder: r.Order, OrderBandwidth: r.Bandwidth, DepthUncertain: r.DepthUncertain(),
			ExtrapolatedFrom: r.ExtrapolatedFrom}
		if found {
			doc.AnticoncentrationDepth = &depth
		}
		if r.Parts > 1 {
			doc.CollisionLimit = &r.Limit
		}
		for i, d := range r.Depths {
			row := exactJSONRow{Depth: d, GateCount: r.GateCounts[i], Collision: r.Collision[i], CollisionRatio: r.Ratio[i], Spread: r.Spread(i),
				TruncationErr: r.TruncationError[i]}
			if r.BondDimUsed != nil {
				row.BondDimUsed = r.BondDimUsed[i]
			}
			if r.Frame != nil {
				row.FramePotential = &r.Frame[i]
			}
			doc.Rows = append(doc.Rows, row)
		}
		if noisy {
			doc.Noise = nf.json()
			doc.Rows = doc.Rows[:0]
			for k, rk := range results {
				for i, d := range rk.Depths {
					row := exactJSONRow{Depth: d, GateCount: rk.GateCounts[i], Collision: rk.Collision[i], CollisionRatio: rk.Ratio[i], Spread: rk.Spread(i),
						TruncationErr: rk.TruncationError[i]}
					row.setXEB(rk, i)
					if rk.BondDimUsed != nil {
						row.BondDimUsed = rk.BondDimUsed[i]
					}
					if r.Frame != nil {
						row.FramePotential = &r.Frame[i]
					}
					if len(rates) > 1 {
						row.GateError = &rates[k]
					}
					doc.Rows = append(doc.Rows, row)
				}
				a := xebAgreementOf(rk)
				a.GateError = rates[k]
				doc.XEBAgreement = append(doc.XEBAgreement, a)
			}
		}
		return writeJSON(stdout, doc)
	}
	fmt.Fprintln(stdout, s.describe())
	fmt.Fprintf(stdout, "exact second moments · eps %g · Haar collision 2/(D+1) = %.6g\n", *eps, r.HaarCollision)
	if r.Parts > 1 {
		fmt.Fprintf(stdout, "The chip is in %d parts and never reaches that value: E[Z] tends to the product of the parts' Haar values, %.6g;\nthe E[Z]/Z_H column below divides by that limit instead (and F2 tends to the product of the parts' values, not 2).\n", r.Parts, r.Limit)
	}
	mps := r.Engine == moments.EngineMPS
	extrap := r.Engine == moments.EngineExtrapolate
	if mps {
		fmt.Fprintf(stdout, "engine: matrix product state, bond dimension %d (error from a rerun at %d), qubit order bandwidth %d\n",
			r.BondDim, max(r.BondDim/2, 1), r.Bandwidth)
	}
	if extrap {
		fmt.Fprintf(stdout, "engine: extrapolation of ln E[Z]/Z_H from the exact curves of %s\n(error: the largest change when one size is left out or the sizes move one step down)\n",
			strings.Join(r.ExtrapolatedFrom, ", "))
	}
	fmt.Fprintln(stdout)
	switch {
	case extrap:
		fmt.Fprintf(stdout, "%6s %7s %14s %10s %12s\n", "depth", "gates", "E[Z]/Z_H", "± error", "F2")
	case mps:
		fmt.Fprintf(stdout, "%6s %7s %14s %10s %5s %12s\n", "depth", "gates", "E[Z]/Z_H", "± error", "bond", "F2")
	default:
		fmt.Fprintf(stdout, "%6s %7s %14s %12s\n", "depth", "gates", "E[Z]/Z_H", "F2")
	}
	for i, d := range r.Depths {
		f := "—"
		if r.Frame != nil {
			f = strconv.FormatFloat(r.Frame[i], 'f', 6, 64)
		}
		mark := ""
		if r.Uncertain(i) {
			mark = " ?"
		}
		switch {
		case extrap:
			fmt.Fprintf(stdout, "%6d %7d %14s %10.1e %12s%s\n", d, r.GateCounts[i], formatRatio(r.Ratio[i]), r.TruncationError[i], f, mark)
		case mps:
			fmt.Fprintf(stdout, "%6d %7d %14s %10.1e %5d %12s%s\n", d, r.GateCounts[i], formatRatio(r.Ratio[i]), r.TruncationError[i], r.BondDimUsed[i], f, mark)
		default:
			fmt.Fprintf(stdout, "%6d %7d %14s %12s\n", d, r.GateCounts[i], formatRatio(r.Ratio[i]), f)
		}
	}
	fmt.Fprintln(stdout)
	if mps && slices.ContainsFunc(r.Depths, func(d int) bool { return r.Uncertain(indexOf(r.Depths, d)) }) {
		fmt.Fprintln(stdout, "?: the error estimate is at least the distance of E[Z]/Z_H to 1+eps, so the truncation could move this depth across the threshold.")
	}
	if extrap && slices.ContainsFunc(r.Depths, func(d int) bool { return r.Uncertain(indexOf(r.Depths, d)) }) {
		fmt.Fprintln(stdout, "?: the extrapolation's error is at least the distance of E[Z]/Z_H to 1+eps, so this depth could lie on either side of the threshold.")
	}
	if r.FrameNote != "" {
		fmt.Fprintf(stdout, "F2 not shown: %s.\n", r.FrameNote)
	}
	switch {
	case extrap && r.DepthUncertain():
		fmt.Fprintf(stdout, "No verdict: the extrapolation's error reaches the distance to 1+eps = %.4f at a depth marked '?'; use --engine mps for this graph.\n", 1+*eps)
	case r.DepthUncertain():
		fmt.Fprintf(stdout, "No verdict: at bond dimension %d the truncation error reaches the distance to 1+eps = %.4f at a depth marked '?'; raise --bond-dim.\n", r.BondDim, 1+*eps)
	case found:
		how := "exact"
		if extrap {
			how = "extrapolated"
		}
		fmt.Fprintf(stdout, "Anti-concentration depth (%s): %d (%d gates), where E[Z]/Z_H = %.6f ≤ 1+eps = %.4f.\n",
			how, depth, s.schedule.GateCount(depth), r.Ratio[indexOf(r.Depths, depth)], 1+*eps)
	default:
		last := len(r.Depths) - 1
		fmt.Fprintf(stdout, "No requested depth anti-concentrates: at depth %d E[Z]/Z_H = %.6f > 1+eps = %.4f; ask for larger depths.\n",
			r.Depths[last], r.Ratio[last], 1+*eps)
	}
	if r.GapNote != "" {
		fmt.Fprintf(stdout, "No spectral gap: %s.\n", r.GapNote)
	}
	if gap != nil {
		fmt.Fprintf(stdout, "Spectral gap (random-edge, Haar gates): λ₂ = %.10f, Hamiltonian gap Δ = |E|(1−λ₂) = %.8f, minimum degree %d.\n",
			gap.SecondEigenvalue, gap.HamiltonianGap, gap.MinDegree)
		sentence := fmt.Sprintf("The 2-design bound at ε = %g asks for %d gates", *boundEps, gap.DesignDepthBound)
		if found {
			sentence += fmt.Sprintf(", %.1f times the %d gates at which the exact E[Z] anti-concentrates: the bound is sufficient, not tight.",
				float64(gap.DesignDepthBound)/float64(s.schedule.GateCount(depth)), s.schedule.GateCount(depth))
		} else {
			sentence += "; no requested depth anti-concentrates, so there is no exact depth to compare it with."
		}
		fmt.Fprintln(stdout, sentence)
	}
	if noisy {
		printXEB(stdout, &nf, rates, results)
	}
	if *out != "" {
		fmt.Fprintf(stdout, "Per-depth table: %s (%d rows)\n", *out, len(r.Depths)*len(results))
	}
	if *plot != "" {
		fmt.Fprintf(stdout, "Plot: %s\n", *plot)
	}
	return nil
}

// readOrderFile reads the --order file for g.
func readOrderFile(path string, g *circuits.Graph) ([]int, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, badInput("--order %s: %v; give auto or a file listing the qubit ids in order", path, err)
	}
	defer f.Close()
	order, err := moments.ReadOrder(path, f, g)
	if err != nil {
		return nil, fmt.Errorf("--order: %w; list each qubit 0..%d exactly once", err, g.Qubits-1)
	}
	return order, nil
}

// formatRatio prints E[Z]/Z_H with 8 decimals, or in exponent form when it
// is huge (shallow circuits on hundreds of qubits).
func formatRatio(x float64) string {
	if math.Abs(x) >= 1e6 {
		return strconv.FormatFloat(x, 'e', 6, 64)
	}
	return strconv.FormatFloat(x, 'f', 8, 64)
}

// plotExact draws the exact curve alone: the exact ratios per depth, with
// no Monte Carlo estimate or band.
func plotExact(path string, s *setup, r *moments.Result) error {
	// No depth line on a depth the error could move (the report's "No verdict").
	series := &plots.DepthSeries{Qubits: s.graph.Qubits, Depths: r.Depths, Exact: r.Ratio, ExactError: r.TruncationError, Depth: r.Depth, Found: r.Found && !r.DepthUncertain()}
	how := "exact"
	switch r.Engine {
	case moments.EngineMPS:
		how = "matrix product state"
	case moments.EngineExtrapolate:
		how = "extrapolated from " + strings.Join(r.ExtrapolatedFrom, ", ")
	}
	return plots.SaveDepthPlot(path, series, r.Eps, plots.WithDepthUnit(depthUnit(s)),
		plots.WithTitle(s.graph.Name+", "+s.ensemble.Name()+" gates, "+how))
}

func indexOf(v []int, x int) int {
	for i, y := range v {
		if y == x {
			return i
		}
	}
	return -1
}

// explainTransfer prints the 4×4 transfer matrix of the ensemble on the
// local pair states II, IS, SI, SS and its eigenvalues.
func explainTransfer(w io.Writer, e circuits.Ensemble) error {
	t, final, err := moments.TransferFor(e)
	if err != nil {
		return gatesHint(err)
	}
	names := []string{"II", "IS", "SI", "SS"}
	fmt.Fprintf(w, "Transfer of one %s gate on the identity/swap states of its two qubits\n", e.Name())
	fmt.Fprintln(w, "(column = state before the gate, row = state after; each column's readout weight is kept):")
	fmt.Fprintf(w, "%6s", "")
	for _, n := range names {
		fmt.Fprintf(w, "%10s", n)
	}
	fmt.Fprintln(w)
	for i, n := range names {
		fmt.Fprintf(w, "%6s", n)
		for j := range names {
			fmt.Fprintf(w, "%10.5f", t[i][j])
		}
		fmt.Fprintln(w)
	}
	fmt.Fprintln(w)
	fmt.Fprint(w, "Eigenvalues:")
	for _, ev := range t.Eigenvalues() {
		if math.Abs(imag(ev)) < 1e-12 {
			fmt.Fprintf(w, " %.5f", real(ev))
		} else {
			fmt.Fprintf(w, " %.5f%+.5fi", real(ev), imag(ev))
		}
	}
	fmt.Fprintln(w)
	fmt.Fprintf(w, "\nII and SS are fixed (eigenvalue 1): they are the two Haar-invariant states. A domain wall\n"+
		"between I and S regions (the states IS, SI) decays by the other eigenvalues, the largest\n"+
		"in modulus here %.5f (Haar U(4): 0); the closer to 0, the faster one gate erases it. A\n"+
		"negative eigenvalue means the gate also moves the wall to the other qubit, as a swap does,\n"+
		"which on a brickwork carries it further per layer. Compare gate sets with 'mixdepth exact'.\n", t.WallDecay())
	if final {
		fmt.Fprintln(w, "Circuits of this gate set end with a layer of single-qubit gates on every qubit.")
	}
	return nil
}

// xebFlags are the noise flags of exact: with any of them given, exact
// also predicts the cross-entropy benchmark.
type xebFlags struct {
	gateSpec, readoutSpec string
	single, fidelity      float64
	// cal is --calibration; info is what the file set, after the first
	// exactNoise.
	cal  noiseFlags
	info *circuits.Calibration
	// Parsed by parse.
	gateErrors []float64
	p01, p10   float64
}

// exactNoiseFlags are the flag names that switch the noisy benchmark on.
var exactNoiseFlags = []string{"gate-error", "single-qubit-error", "readout-error", "fidelity"}

func (nf *xebFlags) add(fs *pflag.FlagSet) {
	fs.StringVar(&nf.gateSpec, "gate-error", "0", "Pauli error rate in [0, 1] after every two-qubit gate (one of the 15 non-identity Paulis); a list or range as for --depths, e.g. 0.001:0.02:0.001, gives one block of rows per rate")
	fs.Float64Var(&nf.single, "single-qubit-error", 0, "Pauli error rate in [0, 1] after every single-qubit gate (gate sets G·(u⊗u) and their final layer; Haar and Clifford gates have none)")
	fs.StringVar(&nf.readoutSpec, "readout-error", "0,0", "readout flip probabilities p01,p10 (0→1, 1→0), or one value for both")
	fs.Float64Var(&nf.fidelity, "fidelity", 1, "global depolarizing fidelity f in [0, 1]: the output law is f·q + (1−f)/D before the readout flips")
}

// given reports whether any noise flag was set on the command line.
func (nf *xebFlags) given(fs *pflag.FlagSet) bool {
	return slices.ContainsFunc(exactNoiseFlags, fs.Changed) || nf.cal.calibration != ""
}

// parse checks the noise flags; every rate must lie in [0, 1].
func (nf *xebFlags) parse() error {
	rates, err := parseRates("--gate-error", nf.gateSpec)
	if err != nil {
		return err
	}
	nf.gateErrors = rates
	if err := checkProbability("single-qubit-error", nf.single); err != nil {
		return err
	}
	if err := checkProbability("fidelity", nf.fidelity); err != nil {
		return err
	}
	nf.p01, nf.p10, err = parseReadout(nf.readoutSpec)
	return err
}

// setMeta records the noise in the table metadata.
func (nf *xebFlags) setMeta(meta *tables.Meta) {
	rates := make([]string, len(nf.gateErrors))
	for i, r := range nf.gateErrors {
		rates[i] = formatFloat(r)
	}
	meta.Set("gate_error", strings.Join(rates, ","))
	meta.Set("single_qubit_error", formatFloat(nf.single))
	meta.Set("readout_error", formatFloat(nf.p01)+","+formatFloat(nf.p10))
	meta.Set("fidelity", formatFloat(nf.fidelity))
	nf.cal.setMeta(meta)
}

// exactNoise returns the chip noise of g for one gate error rate and the
// other noise flags: the same rates on every coupler and qubit, then the
// entries of the --calibration file, which override them.
func exactNoise(g *circuits.Graph, nf *xebFlags, gateError float64) (*circuits.Calibration, error) {
	if err := circuits.UniformNoise(g, gateError, nf.single, nf.p01, nf.p10, nf.fidelity).Validate(g); err != nil {
		return nil, badInput("%v; every rate must lie in [0, 1]", err)
	}
	return nf.cal.chip(g, gateError, nf.single, nf.p01, nf.p10, nf.fidelity)
}

// exactMaxRates bounds the --gate-error list: each rate is one exact run.
const exactMaxRates = 1000

// parseRates reads a list of rates in [0, 1] with the syntax of the depth
// lists: items separated by commas, each a value or a range FROM:TO:STEP
// (FROM:TO alone is refused: a rate range needs its step). Range values are
// FROM + k·STEP, so no rounding accumulates, up to TO within 1e-9·STEP.
func parseRates(flag, spec string) ([]float64, error) {
	bad := func(format string, args ...any) error {
		return badInput("%s %q: %s", flag, echo(spec), fmt.Sprintf(format, args...))
	}
	var out []float64
	for _, item := range strings.Split(spec, ",") {
		item = strings.TrimSpace(item)
		parts := strings.Split(item, ":")
		if item == "" || len(parts) == 2 || len(parts) > 3 {
			return nil, bad("write rates as a list like 0.001,0.005 or ranges FROM:TO:STEP")
		}
		nums := make([]float64, len(parts))
		for i, p := range parts {
			v, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, bad("%q is not a number", p)
			}
			nums[i] = v
		}
		from, to, step := nums[0], nums[0], 1.0
		if len(nums) == 3 {
			to, step = nums[1], nums[2]
		}
		if !(step > 0) || to < from {
			return nil, bad("a range FROM:TO:STEP needs FROM ≤ TO and STEP > 0")
		}
		if from < 0 || to > 1 {
			return nil, bad("rates must lie in [0, 1]")
		}
		count := math.Floor((to-from)/step+1e-9) + 1
		if float64(len(out))+count > exactMaxRates {
			return nil, bad("more than %d rates; use a larger step", exactMaxRates)
		}
		for k := range int(count) {
			out = append(out, min(from+float64(k)*step, to))
		}
	}
	slices.Sort(out)
	return slices.Compact(out), nil
}

// exactJSONNoise is the noise of the run in the JSON document.
type exactJSONNoise struct {
	GateErrors       []float64 `json:"gate_errors"`
	SingleQubitError float64   `json:"single_qubit_error"`
	Readout01        float64   `json:"readout_error_01"`
	Readout10        float64   `json:"readout_error_10"`
	Fidelity         float64   `json:"fidelity"`
	// Calibration describes the --calibration file, whose entries override
	// the uniform rates above.
	Calibration *calibrationJSON `json:"calibration,omitempty"`
}

func (nf *xebFlags) json() *exactJSONNoise {
	doc := &exactJSONNoise{GateErrors: nf.gateErrors, SingleQubitError: nf.single, Readout01: nf.p01, Readout10: nf.p10, Fidelity: nf.fidelity}
	if c := nf.info; c != nil && nf.cal.calibration != "" {
		doc.Calibration = &calibrationJSON{File: nf.cal.calibration, Digest: runs.CalibrationDigest(nf.cal.content), Couplers: c.Couplers, Qubits: c.Qubits, Skipped: c.Skipped}
	}
	return doc
}

// setXEB fills the benchmark fields of row from depth index i of r.
func (row *exactJSONRow) setXEB(r *moments.Result, i int) {
	row.XEBExpected, row.XEBIdeal, row.XEBNormalized = &r.XEBExpected[i], &r.XEBIdeal[i], &r.XEBNormalized[i]
	row.DigitalFidelity, row.XEBOverDigital, row.XEBTruncation = &r.DigitalFidelity[i], &r.XEBOverDigital[i], &r.XEBTruncationError[i]
}

// exactXEBAgreement says from which depth on the digital model stays within
// 1% and 5% of the exact value, for one gate error rate (null: at no
// requested depth onwards).
type exactXEBAgreement struct {
	GateError float64 `json:"gate_error"`
	Within1   *int    `json:"digital_within_1pct_from_depth"`
	Within5   *int    `json:"digital_within_5pct_from_depth"`
}

// xebStaysWithin returns the first depth from which every later requested
// depth has |XEBOverDigital − 1| ≤ tol.
func xebStaysWithin(r *moments.Result, tol float64) (int, bool) {
	first := -1
	for i := len(r.Depths) - 1; i >= 0; i-- {
		if !(math.Abs(r.XEBOverDigital[i]-1) <= tol) {
			break
		}
		first = i
	}
	if first < 0 {
		return 0, false
	}
	return r.Depths[first], true
}

func xebAgreementOf(r *moments.Result) exactXEBAgreement {
	var a exactXEBAgreement
	if d, ok := xebStaysWithin(r, 0.01); ok {
		a.Within1 = &d
	}
	if d, ok := xebStaysWithin(r, 0.05); ok {
		a.Within5 = &d
	}
	return a
}

// printXEB prints the benchmark blocks of the text report, one per rate.
func printXEB(w io.Writer, nf *xebFlags, rates []float64, results []*moments.Result) {
	for k, r := range results {
		fmt.Fprintln(w)
		fmt.Fprintf(w, "Expected cross-entropy benchmark · gate error %g · single-qubit error %g · readout %g,%g · fidelity %g\n",
			rates[k], nf.single, nf.p01, nf.p10, nf.fidelity)
		if c := nf.info; c != nil && nf.cal.calibration != "" {
			fmt.Fprintf(w, "calibration %s: its rates of %d coupler(s) and %d qubit(s) override the uniform ones above", nf.cal.calibration, c.Couplers, c.Qubits)
			if c.Skipped > 0 {
				fmt.Fprintf(w, "; %d row(s) of dropped elements skipped", c.Skipped)
			}
			fmt.Fprintln(w)
		}
		fmt.Fprintf(w, "%6s %7s %13s %13s %15s %17s %17s\n", "depth", "gates", "xeb_expected", "xeb_ideal", "xeb_normalized", "digital_fidelity", "xeb_over_digital")
		for i, d := range r.Depths {
			fmt.Fprintf(w, "%6d %7d %13.6g %13.6g %15.6f %17.6f %17.6f\n", d, r.GateCounts[i], r.XEBExpected[i], r.XEBIdeal[i],
				r.XEBNormalized[i], r.DigitalFidelity[i], r.XEBOverDigital[i])
		}
		last := r.Depths[len(r.Depths)-1]
		d1, ok1 := xebStaysWithin(r, 0.01)
		d5, ok5 := xebStaysWithin(r, 0.05)
		switch {
		case ok1:
			fmt.Fprintf(w, "The digital model is within 5%% of the exact benchmark from depth %d on, and within 1%% from depth %d on.\n", d5, d1)
		case ok5:
			fmt.Fprintf(w, "The digital model is within 5%% of the exact benchmark from depth %d on; not yet within 1%% at depth %d, the last requested.\n", d5, last)
		default:
			fmt.Fprintf(w, "The digital model is not yet within 5%% of the exact benchmark at depth %d, the last requested.\n", last)
		}
	}
}

// plotXEB draws XEB/digital against depth, one curve per gate error rate.
func plotXEB(path string, s *setup, rates []float64, results []*moments.Result) error {
	var curves []plots.XEBCurve
	for k, r := range results {
		curves = append(curves, plots.XEBCurve{Label: "gate error " + formatFloat(rates[k]), Depths: r.Depths, OverDigital: r.XEBOverDigital})
	}
	return plots.SaveXEBPlot(path, curves, plots.WithDepthUnit(depthUnit(s)),
		plots.WithTitle(s.graph.Name+", "+s.ensemble.Name()+" gates: exact XEB over the digital model"))
}
