package sampling

import (
	"context"
	"errors"
	"fmt"
	"math"

	"mixdepth/circuits"
	"mixdepth/internal/crash"
	"mixdepth/moments"
	"mixdepth/stats"
)

// The sources of an Experiment's fidelity (Experiment.Source, the JSON key
// fidelity_source of plan).
const (
	// FidelityExact is the exact expected linear XEB of moments.Exact under
	// the chip's noise.
	FidelityExact = "exact"
	// FidelityDigital is the digital error model, the product of the gate
	// and readout fidelities (Arute et al. 2019, Nature 574, 505).
	FidelityDigital = "digital"
	// FidelityGiven is a fidelity given by the user.
	FidelityGiven = "given"
)

// The sources of an Experiment's circuit-to-circuit variance
// (Experiment.CircuitVarianceSource).
const (
	// VarianceScan is F_norm²·D²·Var(Z_U) with Var(Z_U) the spread of the
	// per-instance collision probabilities of a scan at the planned depth.
	VarianceScan = "scan"
	// VarianceHaarFloor is F_norm²·D²·Var_Haar(Z), a lower bound: circuits
	// of finite depth spread more than Haar-random states.
	VarianceHaarFloor = "haar-floor"
)

// DefaultCircuitCost is the default price of one more circuit, in shots:
// on a superconducting chip a shot takes of the order of 100 µs (repetition
// rates of several kHz) while compiling and loading a new circuit takes of
// the order of 0.1 s, so one circuit costs about 1000 shots (common
// practice, from memory; trapped ions and other platforms differ, hence the
// option).
const DefaultCircuitCost = 1000

// ExperimentConfig describes a linear-XEB measurement for PlanExperiment.
type ExperimentConfig struct {
	// Depth is the circuit depth of the measurement, at least 1.
	Depth int
	// Noise is the chip's noise; nil when no error rates are known (then
	// Given must be set). Its global Fidelity should be 1: the digital
	// model and the exact XEB both read the gate and readout errors.
	Noise *circuits.ChipNoise
	// Digital is the digital error model's fidelity at Depth, the fallback
	// when no exact engine fits (ignored when Noise is nil).
	Digital float64
	// Given, when positive, is the expected fidelity: it overrides both
	// predictions (which are still computed when Noise is set).
	Given float64
	// NoExact, when non-empty, skips the exact engines and says why (for
	// example a gate count the exact engines do not model).
	NoExact string
	// ExactDepths are the depths of the exact run, ascending and ending at
	// Depth (nil: Depth alone); more depths let the caller read the
	// anti-concentration depth off Experiment.Exact.
	ExactDepths []int
	// ExactOptions are passed on to moments.Exact (workers, eps, engine).
	ExactOptions []moments.ExactOption
	// Sigmas z > 0 asks for F_lin at z standard errors from 0, Relative
	// r > 0 for a standard error r·F; at least one must be positive.
	Sigmas, Relative float64
	// CircuitCost is the price of one more circuit in shots, ≥ 0.
	CircuitCost float64
	// CollisionSpread, when not nil, is the spread over instances of the
	// per-instance collision probabilities Z_U at Depth (a scan's row), at
	// least 2 instances; nil uses the Haar floor.
	CollisionSpread *stats.Summary
	// MinInstances is the fewest circuits of the split (0 means
	// stats.MinIntervalValues).
	MinInstances int
}

// Experiment is a planned linear-XEB measurement: the fidelity it will
// read, where that value comes from, and the circuits × shots that reach
// the precision asked for at the least cost.
type Experiment struct {
	// Source is FidelityExact, FidelityDigital or FidelityGiven, and
	// Fidelity the value F the shot formulas use: the expected linear XEB
	// the experiment reads (XEBExpected for FidelityExact).
	Source   string
	Fidelity float64
	// Normalized is F_norm, the fidelity that scales each circuit's ideal
	// XEB under global depolarizing (Boixo et al. 2018): XEBNormalized for
	// the exact source, Fidelity otherwise.
	Normalized float64
	// Digital is ExperimentConfig.Digital (0 without noise).
	Digital float64
	// Exact is the run of moments.Exact (nil when none ran or it failed,
	// with ExactNote saying why); ExactEngine its engine, and XEBExpected,
	// XEBNormalized, XEBTruncation its values at Depth.
	Exact                                     *moments.Result
	ExactEngine                               string
	XEBExpected, XEBNormalized, XEBTruncation float64
	ExactNote                                 string
	// Shots is the shot plan for Fidelity (PlanShots), and DigitalShots
	// the plan the digital model would ask for (nil unless Source is
	// FidelityExact).
	Shots        ShotPlan
	DigitalShots *ShotPlan
	// ShotsAtOne is set when Fidelity exceeds 1 (circuits that have not
	// anti-concentrated): the shot formulas, the variances and the target
	// then take F = 1.
	ShotsAtOne bool
	// ShotVariance is σ_w² = 1 + 2F − F², the per-shot variance of F_lin
	// for Porter–Thomas outputs (Boixo et al. 2018).
	ShotVariance float64
	// CircuitVariance is σ_b², the circuit-to-circuit variance of the
	// circuits' expected XEB, F_norm²·D²·Var(Z_U), with its source
	// (VarianceScan or VarianceHaarFloor).
	CircuitVariance       float64
	CircuitVarianceSource string
	// TargetVariance is the variance the measurement must reach: (F/z)²
	// for Sigmas, (r·F)² for Relative, the smaller of the two for both.
	TargetVariance float64
	// CircuitCost is ExperimentConfig.CircuitCost and Split the cheapest
	// circuits × shots (PlanSplit) for TargetVariance.
	CircuitCost float64
	Split       SplitPlan
}

// PlanExperiment plans a linear-XEB measurement of the circuits of schedule
// s on g with gates from e at cfg.Depth. When cfg.Noise is set and no
// reason is given against it, it runs moments.Exact with
// moments.ExactNoise(cfg.Noise) and takes the exact expected linear XEB as
// F; when no exact engine fits (no exact moments for the gate set, a size
// beyond the engines, a schedule off the couplers) it takes cfg.Digital and
// says why in ExactNote. cfg.Given overrides both. It then splits the
// measurement into M circuits of m shots: with σ_b² the circuit-to-circuit
// variance of the expected XEB and σ_w² = 1 + 2F − F² the per-shot variance,
// the estimate's variance is
//
//	σ_b²/M + σ_w²/(M·m),  cheapest at m* = sqrt(c·σ_w²/σ_b²)
//
// for a circuit cost c in shots (two-stage sampling, Cochran, Sampling
// Techniques, 3rd ed., 1977, §10.6; PlanSplit). Under global depolarizing
// each circuit's expected XEB is F_norm·(D·Z_U − 1) (Boixo et al. 2018,
// Nature Physics 14, 595), so σ_b² = F_norm²·D²·Var(Z_U): from
// cfg.CollisionSpread when given, else the Haar floor F_norm²·D²·Var_Haar(Z)
// (stats.HaarCollisionVariance; per part for a chip in parts), a lower
// bound. A fidelity no number of shots resolves, or counts beyond
// MaxPlanShots, give an error wrapping ErrTooManyShots; an interruption
// wraps ctx.Err(). It panics on a configuration that breaks the rules of
// ExperimentConfig.
func PlanExperiment(ctx context.Context, g *circuits.Graph, s circuits.Schedule, e circuits.Ensemble, cfg ExperimentConfig) (*Experiment, error) {
	if g == nil || s == nil || e == nil || cfg.Depth < 1 || !(cfg.Sigmas > 0 || cfg.Relative > 0) || cfg.Sigmas < 0 || cfg.Relative < 0 ||
		!(cfg.CircuitCost >= 0) || math.IsInf(cfg.CircuitCost, 1) || (cfg.Noise == nil && !(cfg.Given > 0)) || cfg.Given > 1 ||
		(cfg.CollisionSpread != nil && cfg.CollisionSpread.N < 2) {
		panic(fmt.Sprintf("sampling: PlanExperiment with an invalid configuration (depth %d, sigmas %v, relative %v, circuit cost %v, given %v)",
			cfg.Depth, cfg.Sigmas, cfg.Relative, cfg.CircuitCost, cfg.Given))
	}
	x := &Experiment{CircuitCost: cfg.CircuitCost}
	if cfg.Noise != nil {
		x.Digital = cfg.Digital
		x.Source, x.Fidelity, x.Normalized = FidelityDigital, cfg.Digital, cfg.Digital
		if cfg.NoExact != "" {
			x.ExactNote = cfg.NoExact
		} else if err := x.runExact(ctx, g, s, e, &cfg); err != nil {
			return nil, err
		}
	}
	if cfg.Given > 0 {
		x.Source, x.Fidelity, x.Normalized = FidelityGiven, cfg.Given, cfg.Given
	}
	f := x.Fidelity
	if !(f > 0) {
		return nil, fmt.Errorf("sampling: the %s prediction of the fidelity is %.3g: no number of shots resolves it: %w", x.Source, f, ErrTooManyShots)
	}
	// The expected XEB exceeds 1 on circuits far from anti-concentration
	// (D·E[Z] − 1 > 1); the Porter–Thomas shot variance 1 + 2F − F² holds
	// for F ≤ 1 only, so the formulas take F = 1 there (ShotsAtOne).
	if f > 1 {
		f, x.ShotsAtOne = 1, true
	}
	sp, err := PlanShots(f, cfg.Sigmas, cfg.Relative)
	if err != nil {
		return nil, err
	}
	x.Shots = sp
	if x.Source == FidelityExact && cfg.Digital > 0 && cfg.Digital <= 1 {
		if dp, err := PlanShots(cfg.Digital, cfg.Sigmas, cfg.Relative); err == nil {
			x.DigitalShots = &dp
		}
	}
	x.ShotVariance = 1 + 2*f - f*f
	dim := math.Ldexp(1, g.Qubits)
	if sp := cfg.CollisionSpread; sp != nil {
		ds := dim * sp.StdDev
		x.CircuitVariance, x.CircuitVarianceSource = x.Normalized*x.Normalized*ds*ds, VarianceScan
	} else {
		_, final := e.(circuits.Finisher)
		x.CircuitVariance, x.CircuitVarianceSource = x.Normalized*x.Normalized*HaarXEBVariance(g, final), VarianceHaarFloor
	}
	x.TargetVariance = math.Inf(1)
	if cfg.Sigmas > 0 {
		x.TargetVariance = (f / cfg.Sigmas) * (f / cfg.Sigmas)
	}
	if cfg.Relative > 0 {
		x.TargetVariance = min(x.TargetVariance, (cfg.Relative*f)*(cfg.Relative*f))
	}
	minInst := cfg.MinInstances
	if minInst == 0 {
		minInst = stats.MinIntervalValues
	}
	if x.Split, err = PlanSplit(x.CircuitVariance, x.ShotVariance, cfg.CircuitCost, x.TargetVariance, minInst); err != nil {
		return nil, err
	}
	return x, nil
}

// runExact runs moments.Exact with the noise and fills the exact fields of
// x, or the note that says why no exact engine fits. Only an interruption
// or a crash is returned as an error.
func (x *Experiment) runExact(ctx context.Context, g *circuits.Graph, s circuits.Schedule, e circuits.Ensemble, cfg *ExperimentConfig) error {
	depths := cfg.ExactDepths
	if len(depths) == 0 {
		depths = []int{cfg.Depth}
	}
	if depths[len(depths)-1] != cfg.Depth {
		panic(fmt.Sprintf("sampling: PlanExperiment with exact depths ending at %d, not the depth %d", depths[len(depths)-1], cfg.Depth))
	}
	opts := append(append([]moments.ExactOption{}, cfg.ExactOptions...), moments.ExactNoise(cfg.Noise), moments.ExactCurveOnly())
	r, err := moments.Exact(ctx, g, s, e, depths, opts...)
	switch {
	case err != nil && (ctx.Err() != nil || errors.Is(err, crash.ErrPanic)):
		return err
	case err != nil:
		x.ExactNote = err.Error()
		return nil
	}
	last := len(depths) - 1
	x.Exact, x.ExactEngine = r, r.Engine
	x.XEBExpected, x.XEBNormalized, x.XEBTruncation = r.XEBExpected[last], r.XEBNormalized[last], r.XEBTruncationError[last]
	x.Source, x.Fidelity, x.Normalized = FidelityExact, x.XEBExpected, x.XEBNormalized
	return nil
}

// HaarXEBVariance returns D²·Var(Z) for Haar-random states on the parts of
// g, the variance of the ideal linear XEB D·Z − 1 over circuits that have
// fully mixed: for a connected graph D²·stats.HaarCollisionVariance(D),
// about 4/D. On a chip in parts the parts' states are independent, so
// E[Z²] and E[Z] are products over the parts; an isolated qubit keeps
// Z = 1, or is a Haar state of one qubit when the circuits end with a
// single-qubit layer (final), as in moments.PartsLimit.
func HaarXEBVariance(g *circuits.Graph, final bool) float64 {
	// D²·Var(Z) = Π_k (D_k·E[Z_k])² · (Π_k (1 + v_k) − 1), v_k the relative
	// variance of part k, summed in logarithms to keep the small v_k.
	logScale, logGrowth := 0.0, 0.0
	for _, c := range g.Components() {
		dk := math.Ldexp(1, len(c))
		mean, v := 1.0, 0.0
		if len(c) > 1 || final {
			mean = stats.HaarCollision(dk)
			v = stats.HaarCollisionVariance(dk) / (mean * mean)
		}
		logScale += 2 * math.Log(dk*mean)
		logGrowth += math.Log1p(v)
	}
	return math.Exp(logScale) * math.Expm1(logGrowth)
}
