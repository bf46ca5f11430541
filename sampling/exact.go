package sampling

import (
	"context"
	"errors"
	"fmt"
	"math"

	"mixdepth/circuits"
	"mixdepth/moments"
)

// ExactXEB is the exact expectation of the cross-entropy benchmark of a
// circuit ensemble under a noise model, at one depth (the XEB fields of
// moments.Result).
type ExactXEB struct {
	Depth int
	// Engine is the exact engine that computed it (moments.EngineVector or
	// moments.EngineMPS).
	Engine string
	// Expected is the exact E[F_lin] under the noise, Ideal = D·E[Z] − 1
	// the noiseless value, Normalized = Expected/Ideal (what
	// Report.Normalized estimates) and Digital the digital error model's
	// fidelity of the same circuits (circuits.ChipNoise.DigitalFidelity).
	Expected, Ideal, Normalized, Digital float64
	// TruncationError is the MPS error estimate of Expected (0 for the
	// vector engine).
	TruncationError float64
}

// ErrPredictCost is wrapped by PredictXEB's error when the exact engine
// would take longer than PredictMaxSeconds: the comparison is then left to
// a run of the exact engine of its own.
var ErrPredictCost = errors.New("exact prediction too slow for a score")

// PredictMaxSeconds is the estimated run time beyond which PredictXEB
// refuses: two minutes, so that scoring a table stays a matter of seconds
// to a minute or two (moments.Exact itself accepts hours).
const PredictMaxSeconds = 120

// randomEdgeSecondsPerUpdate is the time of one four-coefficient update of
// the random-edge subset chains, from moments' package documentation
// (grid:3x4, 17 couplers, 3^10 updates per gate in about 2 ms on two
// cores).
const randomEdgeSecondsPerUpdate = 2e-9

// PredictXEB returns the exact expected cross-entropy benchmark of the
// circuits of schedule s on g with gates from e after depth steps, under the
// noise chip (moments.Exact with moments.ExactNoise, on the engine that
// moments.EngineAuto chooses: the vector engine up to
// moments.AutoVectorMaxQubits qubits and for random-edge schedules, the MPS
// at its default bond beyond). Before starting it estimates the run time
// (moments.MPSEstimate; for a random-edge schedule on a graph that is not
// complete, |E|·3^(n−2) updates per gate) and returns an error wrapping
// ErrPredictCost beyond PredictMaxSeconds. The errors of moments.Exact
// (ErrNoExactMoments for a gate set with no exact moments, ErrTooLarge,
// ErrEngine) are returned as they are.
func PredictXEB(ctx context.Context, g *circuits.Graph, s circuits.Schedule, e circuits.Ensemble, depth int, chip *circuits.ChipNoise, workers int) (*ExactXEB, error) {
	if _, _, err := moments.TransferFor(e); err != nil {
		return nil, err
	}
	n := g.Qubits
	switch s := s.(type) {
	case *circuits.Layered:
		if n > moments.AutoVectorMaxQubits {
			order := moments.QubitOrder(g)
			bond := moments.DefaultBondDim(moments.Bandwidth(g, order))
			if _, secs := moments.MPSEstimate(g, s, order, depth, bond); secs > PredictMaxSeconds {
				return nil, fmt.Errorf("sampling: the exact engine (MPS, bond %d) needs about %.0f s for %s at depth %d, more than the %d s a score allows: %w; run mixdepth exact with the same noise instead",
					bond, secs, g.Name, depth, PredictMaxSeconds, ErrPredictCost)
			}
		}
	case *circuits.RandomEdge:
		if complete := len(s.Edges) == n*(n-1)/2; !complete && n >= 2 {
			secs := float64(depth) * float64(len(s.Edges)) * math.Pow(3, float64(n-2)) * randomEdgeSecondsPerUpdate
			if secs > PredictMaxSeconds {
				return nil, fmt.Errorf("sampling: the exact random-edge average needs about %.0f s for %s at depth %d, more than the %d s a score allows: %w; run mixdepth exact with the same noise instead",
					secs, g.Name, depth, PredictMaxSeconds, ErrPredictCost)
			}
		}
	}
	r, err := moments.Exact(ctx, g, s, e, []int{depth}, moments.ExactCurveOnly(), moments.ExactNoise(chip), moments.ExactWorkers(workers))
	if err != nil {
		return nil, err
	}
	return &ExactXEB{Depth: depth, Engine: r.Engine, Expected: r.XEBExpected[0], Ideal: r.XEBIdeal[0], Normalized: r.XEBNormalized[0],
		Digital: r.DigitalFidelity[0], TruncationError: r.XEBTruncationError[0]}, nil
}

// Comparison is a measured benchmark (Report) beside its exact expectation
// (ExactXEB).
type Comparison struct {
	Exact ExactXEB
	// Linear and Normalized are the measured pooled values
	// (Report.Linear, Report.Normalized).
	Linear, Normalized float64
	// OverInstances is true when the standard errors below are those over
	// instances (Report.HasInstanceErr: every source of variation), false
	// when they are the shots' alone.
	OverInstances bool
	// LinearErr and NormalizedErr are the standard errors used, and
	// LinearSigmas = (Linear − Exact.Expected)/LinearErr, NormalizedSigmas =
	// (Normalized − Exact.Normalized)/NormalizedErr the differences in
	// their units.
	LinearErr, NormalizedErr       float64
	LinearSigmas, NormalizedSigmas float64
	// ImpliedNormalized is the usual reading of the benchmark, the fidelity
	// estimate F ≈ normalized XEB (Report.Normalized), with its standard
	// error NormalizedErr. It is right once local noise has become global
	// white noise, where the normalized XEB equals the digital fidelity
	// (Dalzell, Hunter-Jones, Brandão, Commun. Math. Phys. 2024,
	// arXiv:2111.14907).
	ImpliedNormalized float64
	// ImpliedModel is the fidelity read through the exact model:
	// F = Exact.Digital × Normalized/Exact.Normalized, the digital fidelity
	// that the model's noise would have to carry to give the measured
	// normalized XEB, scaling the model's rates' product by the measured
	// over expected ratio; ImpliedModelErr is its standard error
	// Exact.Digital·NormalizedErr/Exact.Normalized (the exact values carry
	// no sampling error). At shallow depths, where the normalized XEB sits
	// above the digital fidelity, it corrects the usual reading's excess.
	ImpliedModel, ImpliedModelErr float64
}

// Compare returns the comparison of the measured benchmark r with its
// exact expectation x.
func Compare(r *Report, x *ExactXEB) Comparison {
	c := Comparison{Exact: *x, Linear: r.Linear, Normalized: r.Normalized, OverInstances: r.HasInstanceErr, LinearErr: r.LinearErr, NormalizedErr: r.NormalizedErr}
	if r.HasInstanceErr {
		c.LinearErr, c.NormalizedErr = r.LinearErrInstances, r.NormalizedErrInstances
	}
	c.LinearSigmas = (r.Linear - x.Expected) / c.LinearErr
	c.NormalizedSigmas = (r.Normalized - x.Normalized) / c.NormalizedErr
	c.ImpliedNormalized = r.Normalized
	c.ImpliedModel = x.Digital * r.Normalized / x.Normalized
	c.ImpliedModelErr = x.Digital * c.NormalizedErr / math.Abs(x.Normalized)
	return c
}
