package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"strconv"

	"github.com/schollz/progressbar/v3"

	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/plots"
	"mixdepth/sim"
	"mixdepth/stats"
	"mixdepth/tables"
)

func init() {
	register(command{name: "exact", summary: "exact second moments: E[Z], frame potential F2, spectral gap and depth bound, no sampling", run: runExact})
}

type exactJSON struct {
	Tool                   string                `json:"tool"`
	Version                string                `json:"version"`
	Graph                  string                `json:"graph"`
	GraphDigest            string                `json:"graph_digest"`
	Qubits                 int                   `json:"qubits"`
	Edges                  int                   `json:"edges"`
	Schedule               circuits.ScheduleKind `json:"schedule"`
	Gates                  string                `json:"gates"`
	HaarCollision          float64               `json:"haar_collision"`
	Eps                    float64               `json:"eps"`
	AnticoncentrationDepth *int                  `json:"anticoncentration_depth"`
	FrameNote              string                `json:"frame_potential_note,omitempty"`
	GapNote                string                `json:"gap_note,omitempty"`
	Rows                   []exactJSONRow        `json:"rows"`
	Gap                    *exactJSONGap         `json:"gap,omitempty"`
}

type exactJSONRow struct {
	Depth          int      `json:"depth"`
	GateCount      int      `json:"gate_count"`
	Collision      float64  `json:"collision"`
	CollisionRatio float64  `json:"collision_ratio"`
	FramePotential *float64 `json:"frame_potential"`
}

type exactJSONGap struct {
	SecondEigenvalue float64 `json:"second_eigenvalue"`
	HamiltonianGap   float64 `json:"hamiltonian_gap"`
	MinDegree        int     `json:"min_degree"`
	BoundEps         float64 `json:"bound_eps"`
	DesignDepthBound int     `json:"design_depth_bound"`
}

var exactFields = []tables.Field{
	{Name: "depth", Type: tables.Int64, Unit: "layers (gates for random-edge)", Doc: "circuit depth (layers, or gates for random-edge)"},
	{Name: "gate_count", Type: tables.Int64, Unit: "gates", Doc: "two-qubit gates applied up to this depth"},
	{Name: "collision", Type: tables.Float64, Unit: "probability", Doc: "exact ensemble average E[Z] of the collision probability"},
	{Name: "collision_ratio", Type: tables.Float64, Doc: "E[Z] / Z_H with Z_H = 2/(D+1)"},
	{Name: "frame_potential", Type: tables.Float64, Nullable: true, Doc: "second frame potential F2 (Haar value 2); null above the size limit or for non-Haar gate sets"},
}

// frameRandomMaxQubits bounds the random-edge frame potential, whose cost
// grows like the number of connected induced subgraphs.
const frameRandomMaxQubits = 10

// gapMaxQubits bounds the spectral-gap computation: Lanczos on the
// 2^n-dimensional Pauli-support chain keeps about 30 such vectors. It
// matches the largest random-edge graph the exact E[Z] accepts.
const gapMaxQubits = moments.CollisionRandomEdgeMaxQubits

// exactMaxQubits is where 2/(D+1) leaves the float64 range.
const exactMaxQubits = 1000

// exactResult is what exact computes; scan --exact reuses the curve.
type exactResult struct {
	depths     []int
	gateCounts []int
	collision  []float64
	frame      []float64 // nil when not computed
	frameNote  string
	ratio      []float64
	haar       float64
	gap        *moments.Gap
}

// momentTransfer returns the 4×4 transfer of an ensemble and whether its
// circuits end with a final single-qubit layer, or a usage error when the
// ensemble is not invariant under single-qubit rotations.
func momentTransfer(e circuits.Ensemble) (moments.Transfer, bool, error) {
	kind, g, ok := circuits.SecondMoments(e)
	if !ok {
		return moments.Transfer{}, false, badInput("--gates %s: a finite single-qubit set is not invariant under single-qubit rotations, so its second moments have no exact identity/swap form; use 'mixdepth scan' to estimate them", e.Name())
	}
	_, final := e.(circuits.Finisher)
	switch kind {
	case circuits.HaarMoments:
		return moments.HaarTransfer, final, nil
	case circuits.EntanglerMoments:
		return moments.EntanglerTransfer(&g), final, nil
	}
	return moments.Transfer{}, false, badInput("--gates %s: no exact second moments (%v)", e.Name(), kind)
}

// computeExact runs the exact engines for the circuits of s at depths.
// progress, when not nil, is called as the engine goes (done of total).
func computeExact(ctx context.Context, s *setup, depths []int, workers int, withFrame bool, progress func(done, total int)) (*exactResult, error) {
	t, final, err := momentTransfer(s.ensemble)
	if err != nil {
		return nil, err
	}
	var opts []moments.CollisionOption
	if final {
		opts = append(opts, moments.CollisionFinalLayer())
	}
	dim := math.Ldexp(1, s.graph.Qubits)
	r := &exactResult{depths: depths, haar: stats.HaarCollision(dim)}
	for _, d := range depths {
		r.gateCounts = append(r.gateCounts, s.schedule.GateCount(d))
	}
	if progress != nil {
		opts = append(opts, moments.CollisionProgress(progress))
	}
	r.collision, err = moments.CollisionCurve(ctx, s.graph, s.schedule, &t, depths, workers, opts...)
	if err != nil {
		return nil, exactError(err)
	}
	for _, z := range r.collision {
		r.ratio = append(r.ratio, z/r.haar)
	}
	if !withFrame {
		return r, nil
	}
	kind, _, _ := circuits.SecondMoments(s.ensemble)
	switch {
	case kind != circuits.HaarMoments:
		r.frameNote = "the frame potential is computed for Haar-equivalent gate sets (haar, clifford) only"
	case s.schedule.Kind() == circuits.KindRandomEdge && s.graph.Qubits > frameRandomMaxQubits:
		r.frameNote = fmt.Sprintf("for the random-edge schedule the exact frame potential sums the spectra of every connected induced subgraph, which takes minutes beyond %d qubits; this graph has %d", frameRandomMaxQubits, s.graph.Qubits)
	case s.graph.Qubits > moments.FrameMaxQubits:
		r.frameNote = fmt.Sprintf("the frame potential is computed exactly up to %d qubits (its transfer matrix has 4^n entries); this graph has %d", moments.FrameMaxQubits, s.graph.Qubits)
	default:
		r.frame, err = moments.FramePotential2(ctx, s.graph, s.schedule, depths)
		if err != nil {
			return nil, exactError(err)
		}
	}
	return r, nil
}

// exactError classifies an engine error: sizes the machine cannot hold are
// bad input (exit 2), interruptions exit 130.
func exactError(err error) error {
	switch {
	case errors.Is(err, sim.ErrTooLarge):
		return usageError{err}
	case errors.Is(err, context.Canceled):
		return errInterrupted
	}
	return err
}

func runExact(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("exact", "Computes the ensemble averages that decide anti-concentration exactly, with no sampling:\nE[Z]/Z_H and the second frame potential F2 at each depth, and for the random-edge schedule\nthe spectral gap of the second-moment operator and the design-depth bound it implies.",
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
	asJSON := fs.Bool("json", false, "print one JSON document instead of the text report")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		return badInput("exact takes no positional arguments (got %q)", fs.Arg(0))
	}
	s, err := cf.resolve()
	if err != nil {
		return err
	}
	if *explain {
		return explainTransfer(stdout, s.ensemble)
	}
	if n := s.graph.Qubits; n > exactMaxQubits {
		return badInput("--graph %s: %d qubits; the Haar collision probability 2/(2^n+1) underflows float64 beyond %d qubits", s.graph.Name, n, exactMaxQubits)
	}
	if re, ok := s.schedule.(*circuits.RandomEdge); ok && s.graph.Qubits > moments.CollisionRandomEdgeMaxQubits && len(re.Edges) != s.graph.Qubits*(s.graph.Qubits-1)/2 {
		return badInput("--schedule random-edge on %d qubits: the exact average over edges handles at most %d qubits except on complete graphs; use --schedule layered, a complete graph, or 'mixdepth scan'", s.graph.Qubits, moments.CollisionRandomEdgeMaxQubits)
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
	meta := runMeta(s, &cf)
	meta.Set("command", "exact")
	meta.Set("depths", joinInts(depths))
	meta.Set("eps", strconv.FormatFloat(*eps, 'g', -1, 64))
	if *out != "" {
		if err := checkWritable(*out, exactFields, meta, "--out"); err != nil {
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
	r, err := computeExact(ctx, s, depths, *workers, true, progress)
	if err != nil {
		return err
	}
	if *plot != "" {
		if err := plotExact(*plot, s, r, *eps); err != nil {
			return err
		}
	}
	var gap *exactJSONGap
	var gapNote string
	if s.schedule.Kind() == circuits.KindRandomEdge {
		kind, _, _ := circuits.SecondMoments(s.ensemble)
		switch {
		case kind != circuits.HaarMoments:
			gapNote = "the spectral gap is computed for Haar-equivalent gate sets (haar, clifford) only"
		case s.graph.Qubits > gapMaxQubits:
			gapNote = fmt.Sprintf("the spectral gap is computed on the 2^n-dimensional support chain, up to %d qubits; this graph has %d", gapMaxQubits, s.graph.Qubits)
		default:
			g, err := moments.SpectralGap(ctx, s.graph, *workers)
			if err != nil {
				return exactError(err)
			}
			r.gap = &g
			gap = &exactJSONGap{SecondEigenvalue: g.SecondEigenvalue, HamiltonianGap: g.HamiltonianGap,
				MinDegree: g.MinDegree, BoundEps: *boundEps, DesignDepthBound: moments.DesignDepthBound(g, s.graph.Qubits, 2, *boundEps)}
		}
	}
	depth, found := exactDepth(r, *eps)

	if *out != "" {
		w, err := tables.Create(*out, exactFields, meta)
		if err != nil {
			return fmt.Errorf("writing %s: %w", *out, err)
		}
		defer w.Abort()
		for i, d := range r.depths {
			var f any
			if r.frame != nil {
				f = r.frame[i]
			}
			w.Append(d, r.gateCounts[i], r.collision[i], r.ratio[i], f)
		}
		if err := w.Close(); err != nil {
			return err
		}
	}
	if *asJSON {
		doc := exactJSON{Tool: "mixdepth", Version: version, Graph: s.graph.Name, GraphDigest: s.graph.Digest(),
			Qubits: s.graph.Qubits, Edges: len(s.graph.Edges), Schedule: s.schedule.Kind(), Gates: s.ensemble.Name(),
			HaarCollision: r.haar, Eps: *eps, FrameNote: r.frameNote, GapNote: gapNote, Gap: gap}
		if found {
			doc.AnticoncentrationDepth = &depth
		}
		for i, d := range r.depths {
			row := exactJSONRow{Depth: d, GateCount: r.gateCounts[i], Collision: r.collision[i], CollisionRatio: r.ratio[i]}
			if r.frame != nil {
				row.FramePotential = &r.frame[i]
			}
			doc.Rows = append(doc.Rows, row)
		}
		return writeJSON(stdout, doc)
	}
	fmt.Fprintln(stdout, s.describe())
	fmt.Fprintf(stdout, "exact second moments · eps %g · Haar collision 2/(D+1) = %.6g\n\n", *eps, r.haar)
	fmt.Fprintf(stdout, "%6s %7s %14s %12s\n", "depth", "gates", "E[Z]/Z_H", "F2")
	for i, d := range r.depths {
		f := "—"
		if r.frame != nil {
			f = strconv.FormatFloat(r.frame[i], 'f', 6, 64)
		}
		fmt.Fprintf(stdout, "%6d %7d %14s %12s\n", d, r.gateCounts[i], formatRatio(r.ratio[i]), f)
	}
	fmt.Fprintln(stdout)
	if r.frameNote != "" {
		fmt.Fprintf(stdout, "F2 not shown: %s.\n", r.frameNote)
	}
	if found {
		fmt.Fprintf(stdout, "Anti-concentration depth (exact): %d (%d gates), where E[Z]/Z_H = %.6f ≤ 1+eps = %.4f.\n",
			depth, s.schedule.GateCount(depth), r.ratio[indexOf(r.depths, depth)], 1+*eps)
	} else {
		last := len(r.depths) - 1
		fmt.Fprintf(stdout, "No requested depth anti-concentrates: at depth %d E[Z]/Z_H = %.6f > 1+eps = %.4f; ask for larger depths.\n",
			r.depths[last], r.ratio[last], 1+*eps)
	}
	if gapNote != "" {
		fmt.Fprintf(stdout, "No spectral gap: %s.\n", gapNote)
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
	if *out != "" {
		fmt.Fprintf(stdout, "Per-depth table: %s (%d rows)\n", *out, len(r.depths))
	}
	if *plot != "" {
		fmt.Fprintf(stdout, "Plot: %s\n", *plot)
	}
	return nil
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
func plotExact(path string, s *setup, r *exactResult, eps float64) error {
	series := &plots.DepthSeries{Qubits: s.graph.Qubits, Depths: r.depths, Exact: r.ratio}
	series.Depth, series.Found = exactDepth(r, eps)
	return plots.SaveDepthPlot(path, series, eps, plots.WithDepthUnit(depthUnit(s)),
		plots.WithTitle(s.graph.Name+", "+s.ensemble.Name()+" gates, exact"))
}

// exactDepth is the smallest depth whose exact ratio is ≤ 1+eps.
func exactDepth(r *exactResult, eps float64) (int, bool) {
	return stats.AnticoncentrationDepth(r.depths, r.ratio, eps)
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
	t, final, err := momentTransfer(e)
	if err != nil {
		return err
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
	ev := t.Eigenvalues()
	sub := 0.0
	for _, v := range ev[2:] {
		sub = max(sub, cmplx.Abs(v))
	}
	fmt.Fprintf(w, "\nII and SS are fixed (eigenvalue 1): they are the two Haar-invariant states. A domain wall\n"+
		"between I and S regions (the states IS, SI) decays by the other eigenvalues, the largest\n"+
		"in modulus here %.5f (Haar U(4): 0); the closer to 0, the faster one gate erases it. A\n"+
		"negative eigenvalue means the gate also moves the wall to the other qubit, as a swap does,\n"+
		"which on a brickwork carries it further per layer. Compare gate sets with 'mixdepth exact'.\n", sub)
	if final {
		fmt.Fprintln(w, "Circuits of this gate set end with a layer of single-qubit gates on every qubit.")
	}
	return nil
}
