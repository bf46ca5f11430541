package moments

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"

	"mixdepth/circuits"
	"mixdepth/sim"
	"mixdepth/stats"
)

// ErrNoExactMoments is wrapped by TransferFor and Exact for a gate set whose
// two-copy average has no identity/swap form: an ensemble that is not
// invariant under single-qubit rotations, such as a finite single-qubit set.
var ErrNoExactMoments = errors.New("no exact second moments")

// ErrTooLarge is wrapped by Exact for sizes the exact engines refuse: more
// than ExactMaxQubits qubits, a random-edge schedule beyond
// CollisionRandomEdgeMaxQubits qubits on a graph that is not complete, and
// vectors the machine cannot hold. In the last case the error also wraps
// sim.ErrTooLarge, so errors.Is holds for both.
var ErrTooLarge = errors.New("too large for exact second moments")

// ExactMaxQubits is the largest qubit count Exact accepts: beyond it the
// Haar collision probability 2/(2^n+1) underflows float64.
const ExactMaxQubits = 1000

// FrameRandomEdgeMaxQubits is the largest qubit count for which Exact
// computes the frame potential of a random-edge schedule, whose cost grows
// like the number of connected induced subgraphs (minutes beyond it).
const FrameRandomEdgeMaxQubits = 10

// GapMaxQubits is the largest qubit count for which Exact computes the
// spectral gap: Lanczos on the 2^n-dimensional support chain keeps about 30
// such vectors. It matches the largest random-edge graph the exact E[Z]
// accepts.
const GapMaxQubits = CollisionRandomEdgeMaxQubits

// DefaultExactEps is the anti-concentration threshold ε of Exact unless
// ExactEps sets another.
const DefaultExactEps = 0.05

// TransferFor returns the 4×4 transfer on {I,S}² of one gate of the
// ensemble e and whether its circuits end with a final single-qubit layer
// (e is a circuits.Finisher; pass CollisionFinalLayer to CollisionCurve
// then). An ensemble that circuits.SecondMoments reports as having no
// exact moments gives an error wrapping ErrNoExactMoments. It panics if e
// is nil.
func TransferFor(e circuits.Ensemble) (t Transfer, final bool, err error) {
	t, _, final, err = transferFor(e)
	return t, final, err
}

// transferFor is TransferFor with the moment kind of e.
func transferFor(e circuits.Ensemble) (Transfer, circuits.MomentKind, bool, error) {
	if e == nil {
		panic("moments: TransferFor with a nil ensemble")
	}
	kind, g, ok := circuits.SecondMoments(e)
	if !ok {
		return Transfer{}, kind, false, fmt.Errorf("moments: gate set %s has %w: a finite single-qubit set is not invariant under single-qubit rotations, so its second moments have no identity/swap form", e.Name(), ErrNoExactMoments)
	}
	_, final := e.(circuits.Finisher)
	switch kind {
	case circuits.HaarMoments:
		return HaarTransfer, kind, final, nil
	case circuits.EntanglerMoments:
		return EntanglerTransfer(&g), kind, final, nil
	}
	return Transfer{}, kind, false, fmt.Errorf("moments: gate set %s has %w (moment kind %v)", e.Name(), ErrNoExactMoments, kind)
}

// Result is what Exact computes; the slices hold one entry per depth.
type Result struct {
	Depths     []int
	GateCounts []int
	// Collision is the exact E[Z] and Ratio is E[Z]/HaarCollision.
	Collision, Ratio []float64
	// HaarCollision is Z_H = 2/(D+1), D = 2^n.
	HaarCollision float64
	// Limit is the large-depth value of E[Z] that Ratio divides by:
	// HaarCollision for a connected graph, PartsLimit for a graph in parts
	// (Parts > 1), which never reaches HaarCollision.
	Limit float64
	Parts int
	// Frame is the second frame potential F^(2) (Haar value 2), or nil with
	// FrameNote saying why it was not computed.
	Frame     []float64
	FrameNote string
	// Gap is the spectral gap of a random-edge schedule, or nil with GapNote
	// saying why it was not computed; both are empty for a layered schedule
	// and with ExactCurveOnly.
	Gap     *Gap
	GapNote string
	// Eps is the anti-concentration threshold; Depth is the smallest depth
	// with Ratio ≤ 1 + Eps, and Found is false when no depth is.
	Eps   float64
	Depth int
	Found bool
	// Engine is the engine that computed E[Z]: EngineVector or EngineMPS
	// (random-edge schedules and the complete-graph reduction report
	// EngineVector). For EngineMPS, BondDim is the bond cap, Order the
	// qubit at each site and Bandwidth its bandwidth (see QubitOrder);
	// TruncationError holds the error estimate of each ratio (see
	// MPSCurve) and BondDimUsed the largest bond reached up to each depth.
	// For EngineVector TruncationError is all zero and the others are empty.
	Engine          string
	BondDim         int
	Order           []int
	Bandwidth       int
	TruncationError []float64
	BondDimUsed     []int
	// With ExactNoise, the expected cross-entropy benchmark at each depth
	// (nil otherwise): XEBExpected is the exact E[F_lin] under the noise
	// (XEBCurve), XEBIdeal = D·E[Z] − 1 the noiseless value of the same
	// circuits, XEBNormalized their ratio, DigitalFidelity the digital
	// error model of the gates applied up to that depth
	// (circuits.ChipNoise.DigitalFidelity) and XEBOverDigital =
	// XEBNormalized/DigitalFidelity, which tends to 1 when local noise
	// has become global white noise. XEBTruncationError is the MPS error
	// estimate of XEBExpected (zero for the vector engine).
	XEBExpected, XEBIdeal, XEBNormalized []float64
	DigitalFidelity, XEBOverDigital      []float64
	XEBTruncationError                   []float64
	// ExtrapolatedFrom names the smaller members of the graph's family whose
	// exact curves EngineExtrapolate fitted, ascending in size; there
	// TruncationError is the leave-one-size-out uncertainty of each ratio
	// (see ExactEngine). It is nil for the other engines.
	ExtrapolatedFrom []string
}

// ExactOption sets an optional parameter of Exact.
type ExactOption func(*exactConfig)

type exactConfig struct {
	workers   int
	eps       float64
	progress  func(done, total int)
	curveOnly bool
	noise     *circuits.ChipNoise // ExactNoise, or nil
	engine    string
	bond      int
	order     []int
	// extrapQubits is the largest member of EngineExtrapolate, 0 for
	// DefaultExtrapolateQubits.
	extrapQubits int
}

// The engines of Exact (see ExactEngine).
const (
	EngineAuto   = "auto"
	EngineVector = "vector"
	EngineMPS    = "mps"
	// EngineExtrapolate fits the exact curves of smaller members of a
	// lattice family and predicts the graph's (see ExactEngine).
	EngineExtrapolate = "extrapolate"
)

// Engines lists the values ExactEngine accepts.
var Engines = []string{EngineAuto, EngineVector, EngineMPS, EngineExtrapolate}

// AutoVectorMaxQubits is the largest qubit count for which EngineAuto takes
// the vector engine on a layered schedule: 2^26 coefficients are 512 MiB
// and a depth-40 curve on 26 qubits takes about a minute on two cores,
// while the MPS at its default bond answers in seconds with an error estimate
// well below 1e-3·(R−1) on the lattices checked (TestMPSDefaultBond).
const AutoVectorMaxQubits = 26

// DefaultBondDim returns the bond cap of the MPS engine for an order of the
// given bandwidth unless ExactBondDim sets another: 16 for chains and rings
// (bandwidth ≤ 2), where it keeps line:26 within 1e-7 of the vector engine
// and line:1000 at depth 60 takes seconds, and 64 otherwise, which keeps
// grid:5x5 within 1e-3·(R−1) at every depth up to R − 1 < 1e-4
// (TestMPSDefaultBond).
func DefaultBondDim(bandwidth int) int {
	if bandwidth <= 2 {
		return 16
	}
	return 64
}

// ExactWorkers bounds the goroutines of Exact (values below 1 mean 1); the
// default is runtime.GOMAXPROCS(0). The result does not depend on it.
func ExactWorkers(n int) ExactOption {
	return func(c *exactConfig) { c.workers = max(n, 1) }
}

// ExactEps sets the anti-concentration threshold ε, 0 < ε < 1; the default
// is DefaultExactEps. Exact panics for other values.
func ExactEps(eps float64) ExactOption {
	return func(c *exactConfig) { c.eps = eps }
}

// ExactProgress makes Exact report the progress of E[Z] as CollisionProgress
// does; the default is no report.
func ExactProgress(f func(done, total int)) ExactOption {
	return func(c *exactConfig) { c.progress = f }
}

// ExactEngine chooses the engine for E[Z]: EngineVector (the 2^n vector,
// or the random-edge and complete-graph methods), EngineMPS (a matrix
// product state, layered schedules only, see MPS) or EngineAuto (the
// default): the vector engine for random-edge schedules and for layered
// schedules on at most AutoVectorMaxQubits qubits, the MPS beyond. Exact
// panics for other values.
//
// EngineExtrapolate (the family's layered schedule on a graph of
// ExtrapolateFamilies only) computes with the vector engine the exact
// ln E[Z]/Z_H of smaller members of the graph's family, up to
// ExactExtrapolateQubits qubits, fits it per depth by least squares with
// a bulk and an end term (a lattice as a strip of its narrow side), and
// evaluates the fit at the graph; each TruncationError is the uncertainty
// from leaving one size out and from the previous window of sizes, and
// ExtrapolatedFrom lists the members. Other graphs and schedules, and gate
// files with per-coupler matrices, give an error wrapping ErrEngine.
func ExactEngine(name string) ExactOption {
	return func(c *exactConfig) { c.engine = name }
}

// ExactBondDim sets the bond cap of the MPS engine, 2 ≤ bond ≤ MPSMaxBond,
// or 0 for the default, DefaultBondDim of the order's bandwidth. Exact
// panics for other values.
func ExactBondDim(bond int) ExactOption {
	return func(c *exactConfig) { c.bond = bond }
}

// ExactOrder sets the qubit order of the MPS engine (order[k] is the qubit
// at site k); the default is QubitOrder(g). Exact returns an error
// wrapping ErrOrder when it is not a permutation of g's qubits.
func ExactOrder(order []int) ExactOption {
	return func(c *exactConfig) { c.order = order }
}

// ExactCurveOnly makes Exact compute E[Z] only, with no frame potential and
// no spectral gap (and no notes about them).
func ExactCurveOnly() ExactOption {
	return func(c *exactConfig) { c.curveOnly = true }
}

// Exact computes the exact second moments of the circuits of schedule s on
// g with gates from e at each of depths (ascending, non-negative): E[Z] by
// CollisionCurve with the transfer of TransferFor, or of EdgeTransfersFor
// for a gate set with calibrated couplers (and the final layer when e has
// one), the ratio to the Haar value Z_H = 2/(D+1) (stats.HaarCollision) —
// for a graph in parts (circuits.NewGraphParts) to PartsLimit instead —
// and the anti-concentration depth, the smallest depth with
// E[Z]/Z_H ≤ 1 + ε (Dalzell, Hunter-Jones, Brandão, PRX Quantum 3, 010333,
// 2022). Unless ExactCurveOnly is given it adds
//
//   - the frame potential F^(2) by FramePotential2, for gate sets with the
//     Haar transfer, up to FrameMaxQubits qubits (FrameRandomEdgeMaxQubits
//     for a random-edge schedule);
//   - for a random-edge schedule, the spectral gap by SpectralGap, for gate
//     sets with the Haar transfer, up to GapMaxQubits qubits.
//
// A value outside those rules is absent, with a note in the Result. A gate
// set with no exact moments gives an error wrapping ErrNoExactMoments; sizes
// beyond the engines give an error wrapping ErrTooLarge. Cancelling ctx stops
// the work with an error wrapping ctx.Err(). It panics if g, s or e is nil
// or if the ε of ExactEps is not in (0, 1).
func Exact(ctx context.Context, g *circuits.Graph, s circuits.Schedule, e circuits.Ensemble, depths []int, opts ...ExactOption) (*Result, error) {
	if g == nil || s == nil {
		panic("moments: Exact with a nil graph or schedule")
	}
	cfg := exactConfig{workers: runtime.GOMAXPROCS(0), eps: DefaultExactEps, engine: EngineAuto}
	for _, o := range opts {
		o(&cfg)
	}
	if !(cfg.eps > 0 && cfg.eps < 1) {
		panic(fmt.Sprintf("moments: Exact with eps %g: need 0 < eps < 1", cfg.eps))
	}
	if !slices.Contains(Engines, cfg.engine) {
		panic(fmt.Sprintf("moments: Exact with engine %q: need one of %v", cfg.engine, Engines))
	}
	if cfg.bond != 0 && (cfg.bond < 2 || cfg.bond > MPSMaxBond) {
		panic(fmt.Sprintf("moments: Exact with bond dimension %d: need 2..%d", cfg.bond, MPSMaxBond))
	}
	t, kind, final, err := transferFor(e)
	if err != nil {
		return nil, err
	}
	if err := exactCheckSize(g, s); err != nil {
		return nil, err
	}
	var copts []CollisionOption
	if final {
		copts = append(copts, CollisionFinalLayer())
	}
	et, err := EdgeTransfersFor(e)
	if err != nil {
		return nil, err
	}
	if et != nil {
		copts = append(copts, CollisionEdgeTransfers(et))
	}
	if cfg.progress != nil {
		copts = append(copts, CollisionProgress(cfg.progress))
	}
	n := g.Qubits
	r := &Result{Depths: depths, HaarCollision: stats.HaarCollision(math.Ldexp(1, n)), Eps: cfg.eps}
	r.Limit, r.Parts = r.HaarCollision, len(g.Components())
	if r.Parts > 1 {
		r.Limit = PartsLimit(g, final)
	}
	for _, d := range depths {
		r.GateCounts = append(r.GateCounts, s.GateCount(d))
	}
	layered, _ := s.(*circuits.Layered)
	useMPS := layered != nil && (cfg.engine == EngineMPS || cfg.engine == EngineAuto && n > AutoVectorMaxQubits)
	if cfg.engine == EngineMPS && layered == nil {
		return nil, fmt.Errorf("moments: the MPS engine runs layered schedules (and layout files) only, not %s: %w", s.Kind(), ErrEngine)
	}
	switch {
	case cfg.engine == EngineExtrapolate:
		if et != nil {
			return nil, fmt.Errorf("moments: the extrapolate engine takes one transfer for every coupler, and a gate file with per-coupler matrices has no smaller members: %w; use --engine vector or mps", ErrEngine)
		}
		if cfg.noise != nil {
			return nil, fmt.Errorf("moments: the extrapolate engine fits noiseless curves only, not the benchmark under noise: %w; use --engine vector or mps with noise", ErrEngine)
		}
		if cfg.extrapQubits != 0 && (cfg.extrapQubits < 4 || cfg.extrapQubits > AutoVectorMaxQubits) {
			panic(fmt.Sprintf("moments: Exact with extrapolation members up to %d qubits: need 4..%d", cfg.extrapQubits, AutoVectorMaxQubits))
		}
		if err := exactExtrapolate(ctx, r, g, s, &t, depths, &cfg, final); err != nil {
			return nil, err
		}
	case useMPS:
		if err := exactMPS(ctx, r, g, layered, &t, depths, &cfg, copts); err != nil {
			return nil, err
		}
		if r.Parts > 1 {
			// The MPS reads out E[Z]/Z_H; a chip in parts is measured against
			// the product of its parts' Haar values instead.
			scale := r.HaarCollision / r.Limit
			for i := range r.Ratio {
				r.Ratio[i] *= scale
				r.TruncationError[i] *= scale
			}
		}
	default:
		r.Engine = EngineVector
		if r.Collision, err = CollisionCurve(ctx, g, s, &t, depths, cfg.workers, copts...); err != nil {
			return nil, exactMemory(err)
		}
		for _, z := range r.Collision {
			r.Ratio = append(r.Ratio, z/r.Limit)
		}
		r.TruncationError = make([]float64, len(depths))
	}
	if cfg.noise != nil {
		if err := exactXEB(ctx, r, g, s, e, useMPS, &t, et, &cfg, copts); err != nil {
			return nil, err
		}
	}
	r.Depth, r.Found = stats.AnticoncentrationDepth(depths, r.Ratio, cfg.eps)
	if cfg.curveOnly {
		return r, nil
	}
	randomEdge := s.Kind() == circuits.KindRandomEdge
	switch {
	case kind != circuits.HaarMoments:
		r.FrameNote = "the frame potential is computed for Haar-equivalent gate sets (haar, clifford) only"
	case randomEdge && n > FrameRandomEdgeMaxQubits:
		r.FrameNote = fmt.Sprintf("for the random-edge schedule the exact frame potential sums the spectra of every connected induced subgraph, which takes minutes beyond %d qubits; this graph has %d", FrameRandomEdgeMaxQubits, n)
	case n > FrameMaxQubits:
		r.FrameNote = fmt.Sprintf("the frame potential is computed exactly up to %d qubits (its transfer matrix has 4^n entries); this graph has %d", FrameMaxQubits, n)
	default:
		if r.Frame, err = FramePotential2(ctx, g, s, depths); err != nil {
			return nil, exactMemory(err)
		}
	}
	if !randomEdge {
		return r, nil
	}
	switch {
	case r.Parts > 1:
		r.GapNote = "a graph in parts has gap 0: identity on one part and swap on another stay fixed"
	case kind != circuits.HaarMoments:
		r.GapNote = "the spectral gap is computed for Haar-equivalent gate sets (haar, clifford) only"
	case n > GapMaxQubits:
		r.GapNote = fmt.Sprintf("the spectral gap is computed on the 2^n-dimensional support chain, up to %d qubits; this graph has %d", GapMaxQubits, n)
	default:
		gap, err := SpectralGap(ctx, g, cfg.workers)
		if err != nil {
			return nil, exactMemory(err)
		}
		r.Gap = &gap
	}
	return r, nil
}

// ErrEngine is wrapped by Exact for an engine that cannot run the request:
// the MPS engine on a random-edge schedule, or an MPS run whose estimated
// memory or time is beyond MPSMaxSeconds or the machine's memory.
var ErrEngine = errors.New("engine cannot run this")

// MPSMaxSeconds is the estimated run time (MPSEstimate) beyond which Exact
// refuses an MPS run before starting: four hours.
const MPSMaxSeconds = 4 * 3600

// exactMPS fills the curve of r by MPSCurve, after checking the order and
// the estimated cost.
func exactMPS(ctx context.Context, r *Result, g *circuits.Graph, s *circuits.Layered, t *Transfer, depths []int, cfg *exactConfig, copts []CollisionOption) error {
	order := cfg.order
	if order == nil {
		order = QubitOrder(g)
	} else if err := CheckOrder(g, order); err != nil {
		return err
	}
	r.Engine, r.Order, r.Bandwidth = EngineMPS, order, Bandwidth(g, order)
	r.BondDim = cfg.bond
	if r.BondDim == 0 {
		r.BondDim = DefaultBondDim(r.Bandwidth)
	}
	if len(depths) > 0 {
		bytes, secs := MPSEstimate(g, s, order, depths[len(depths)-1], r.BondDim)
		what := fmt.Sprintf("the MPS of %s at bond dimension %d (order bandwidth %d)", g.Name, r.BondDim, r.Bandwidth)
		if secs > MPSMaxSeconds {
			return fmt.Errorf("moments: %s would take up to %.0f hours (estimate: %s, %s): %w; lower --bond-dim, give an order with a smaller bandwidth, or ask for fewer depths",
				what, secs/3600, sim.GiB(bytes), mpsDuration(secs), ErrEngine)
		}
		if err := sim.CheckMemory(bytes, what); err != nil {
			return exactMemory(fmt.Errorf("moments: %w", err))
		}
	}
	var err error
	r.Ratio, r.TruncationError, r.BondDimUsed, err = MPSCurve(ctx, g, s, t, depths, order, r.BondDim, copts...)
	if err != nil {
		return err
	}
	for _, x := range r.Ratio {
		r.Collision = append(r.Collision, x*r.HaarCollision)
	}
	return nil
}

// mpsDuration formats an estimated number of seconds.
func mpsDuration(secs float64) string {
	switch {
	case secs < 120:
		return fmt.Sprintf("%.0f s", secs)
	case secs < 7200:
		return fmt.Sprintf("%.0f min", secs/60)
	}
	return fmt.Sprintf("%.1f h", secs/3600)
}

// Uncertain reports whether the truncation error of depth r.Depths[i] is at
// least the distance of its ratio to 1 + Eps, so that the truncation could
// have moved it across the threshold. It panics if i is out of range.
func (r *Result) Uncertain(i int) bool {
	return r.TruncationError[i] >= math.Abs(r.Ratio[i]-(1+r.Eps))
}

// DepthUncertain reports whether the anti-concentration depth (or its
// absence) rests on a ratio the truncation could have moved across the
// threshold: some depth up to Depth (every depth when none is found) is
// Uncertain.
func (r *Result) DepthUncertain() bool {
	for i, d := range r.Depths {
		if r.Found && d > r.Depth {
			break
		}
		if r.Uncertain(i) {
			return true
		}
	}
	return false
}

// exactCheckSize returns an error wrapping ErrTooLarge for the sizes Exact
// refuses before any work.
func exactCheckSize(g *circuits.Graph, s circuits.Schedule) error {
	n := g.Qubits
	if n > ExactMaxQubits {
		return fmt.Errorf("moments: %s (%d qubits) is %w: the Haar collision probability 2/(2^n+1) underflows float64 beyond %d qubits", g.Name, n, ErrTooLarge, ExactMaxQubits)
	}
	if re, ok := s.(*circuits.RandomEdge); ok && n > CollisionRandomEdgeMaxQubits && len(re.Edges) != n*(n-1)/2 {
		return fmt.Errorf("moments: a random-edge schedule on %d qubits is %w: the exact average over edges handles at most %d qubits except on complete graphs; use a layered schedule, a complete graph, or a Monte Carlo scan", n, ErrTooLarge, CollisionRandomEdgeMaxQubits)
	}
	return nil
}

// memoryError is an error caused by memory: errors.Is finds both
// ErrTooLarge and sim.ErrTooLarge in it, and its message is the cause's.
type memoryError struct{ err error }

func (e memoryError) Error() string   { return e.err.Error() }
func (e memoryError) Unwrap() []error { return []error{ErrTooLarge, e.err} }

// exactMemory marks an engine error caused by memory (sim.ErrTooLarge) as
// ErrTooLarge too.
func exactMemory(err error) error {
	if errors.Is(err, sim.ErrTooLarge) && !errors.Is(err, ErrTooLarge) {
		return memoryError{err}
	}
	return err
}

// CollisionByDepth returns E[Z] keyed by depth, or nil for a nil Result (so
// a caller without an exact curve can pass it on unchanged).
func (r *Result) CollisionByDepth() map[int]float64 {
	if r == nil {
		return nil
	}
	m := make(map[int]float64, len(r.Depths))
	for k, d := range r.Depths {
		m[d] = r.Collision[k]
	}
	return m
}

// Spread reports whether depth r.Depths[i] meets the anti-concentration
// threshold, E[Z]/Z_H ≤ 1 + Eps (the rule that sets Depth). It panics if i
// is out of range.
func (r *Result) Spread(i int) bool { return r.Ratio[i] <= 1+r.Eps }

// PartsLimit is the value E[Z] tends to at large depth on a graph whose
// connected parts mix separately: the state is a product over the parts, so
// E[Z] is the product of the parts' collision probabilities, each tending to
// its Haar value 2/(2^k + 1) for a part of k qubits (design.md §3); an
// isolated qubit, which no gate touches, keeps 1, or 2/3 (the Haar value of
// one qubit) when the circuits end with a Haar single-qubit layer (final).
// For a connected graph it is stats.HaarCollision(2^n).
func PartsLimit(g *circuits.Graph, final bool) float64 {
	z := 1.0
	for _, c := range g.Components() {
		if len(c) > 1 || final {
			z *= stats.HaarCollision(math.Ldexp(1, len(c)))
		}
	}
	return z
}
