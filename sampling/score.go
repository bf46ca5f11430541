package sampling

import (
	"context"
	"math"

	"mixdepth/stats"
)

// DefaultEps is the relative distance from the Porter–Thomas value
// (D−1)/(D+1) beyond which Report.Spread is false unless SetEps chooses
// another: 0.05, the default eps of scan, so that "spread" (the word this
// project uses for a depth or a circuit set that meets its
// anti-concentration threshold) means one threshold in scan, score and
// plan.
const DefaultEps = 0.05

// InstanceConfidence is the level of Report's interval of the fidelity
// estimate over instances.
const InstanceConfidence = 0.95

// InstanceScore is the cross-entropy benchmark of one instance's shots.
type InstanceScore struct {
	Instance int
	Shots    int
	// Linear is F_lin = D·mean p(x_k) − 1 and LinearErr its standard error
	// D·sd p(x_k)/√N (stats.LinearXEB).
	Linear, LinearErr float64
	// Log is F_log = ln D + γ + mean ln p(x_k) and LogErr its standard error
	// (stats.LogXEB); −Inf when a shot has ideal probability 0.
	Log, LogErr float64
	// Ideal is D·Z_U − 1, the expected F_lin of an ideal sampler.
	Ideal float64
	// Normalized is Linear/Ideal, the fidelity estimate, and NormalizedErr
	// its standard error LinearErr/Ideal.
	Normalized, NormalizedErr float64
}

// Report is the cross-entropy benchmark of a sample table.
type Report struct {
	Qubits int
	// Shots is the total number of shots.
	Shots int
	// Linear, LinearErr, Log and LogErr are the estimators over all shots
	// pooled.
	Linear, LinearErr, Log, LogErr float64
	// Ideal is the shot-weighted mean of the instances' D·Z_U − 1: the
	// expected pooled F_lin of an ideal sampler.
	Ideal float64
	// Normalized is Linear/Ideal and NormalizedErr its standard error from
	// the shots alone, as if every shot were independent.
	Normalized, NormalizedErr float64
	// NormalizedErrInstances is the standard error of Normalized with every
	// source of variation (shots, noise trajectories, circuits), and
	// [NormalizedLower, NormalizedUpper] its two-sided interval at level
	// Confidence: the bootstrap over instances (stats.ClusterBootstrap).
	// HasInstanceErr is false, and these NaN, with fewer than
	// stats.MinIntervalValues instances. LinearErrInstances is the same
	// standard error for Linear.
	NormalizedErrInstances, NormalizedLower, NormalizedUpper float64
	LinearErrInstances                                       float64
	HasInstanceErr                                           bool
	Confidence                                               float64
	// PorterThomas is D·Limit − 1, the value Ideal tends to at large
	// depth: (D−1)/(D+1) for Haar-random outputs of a connected chip
	// (Limit = 2/(D+1); Boixo et al. 2018), D times the product of the
	// parts' Haar values, minus 1, for a chip in parts (SetLimit).
	PorterThomas float64
	// Limit is the E[Z] the circuits tend to: 2/(D+1) unless SetLimit
	// changed it.
	Limit float64
	// Spread is true when Ideal lies within Eps of PorterThomas
	// (relative). Otherwise the raw F_lin misstates the fidelity (it
	// overstates it when Ideal > 1): read Normalized instead, and prefer
	// deeper circuits.
	Spread    bool
	Eps       float64
	Instances []InstanceScore
}

// Score computes the linear and logarithmic cross-entropy benchmarks of the
// shots of every instance and of all shots pooled, with the ideal-device
// values D·Z_U − 1 and the normalised estimates F_lin/(D·Z_U − 1) (Boixo et
// al. 2018, Nature Physics 14, 595; Arute et al. 2019, Nature 574, 505). It
// panics if qubits < 1 or an instance has no shots.
func Score(qubits int, groups []InstanceSamples) *Report {
	if qubits < 1 {
		panic("sampling: Score needs at least 1 qubit")
	}
	dim := math.Ldexp(1, qubits)
	r := &Report{Qubits: qubits, PorterThomas: (dim - 1) / (dim + 1), Limit: stats.HaarCollision(dim)}
	var all []float64
	var idealSum float64
	for _, g := range groups {
		if len(g.PIdeal) == 0 {
			panic("sampling: Score of an instance without shots")
		}
		s := InstanceScore{Instance: g.Instance, Shots: len(g.PIdeal), Ideal: dim*g.Collision - 1}
		s.Linear, s.LinearErr = stats.LinearXEB(g.PIdeal, dim)
		s.Log, s.LogErr = stats.LogXEB(g.PIdeal, dim)
		s.Normalized, s.NormalizedErr = s.Linear/s.Ideal, s.LinearErr/s.Ideal
		r.Instances = append(r.Instances, s)
		all = append(all, g.PIdeal...)
		idealSum += float64(len(g.PIdeal)) * s.Ideal
	}
	r.Shots = len(all)
	r.Linear, r.LinearErr = stats.LinearXEB(all, dim)
	r.Log, r.LogErr = stats.LogXEB(all, dim)
	r.Ideal = idealSum / float64(r.Shots)
	r.Normalized, r.NormalizedErr = r.Linear/r.Ideal, r.LinearErr/r.Ideal
	r.Confidence = InstanceConfidence
	num, shots, ideal := make([]float64, len(groups)), make([]float64, len(groups)), make([]float64, len(groups))
	for i, g := range groups {
		s := r.Instances[i]
		// Σ_k (D·p_k − 1) = N·F_lin of the instance.
		num[i] = float64(s.Shots) * s.Linear
		shots[i] = float64(s.Shots)
		ideal[i] = float64(len(g.PIdeal)) * s.Ideal
	}
	r.NormalizedErrInstances, r.NormalizedLower, r.NormalizedUpper, r.HasInstanceErr = stats.ClusterBootstrap(num, ideal, r.Confidence)
	r.LinearErrInstances, _, _, _ = stats.ClusterBootstrap(num, shots, r.Confidence)
	r.SetEps(DefaultEps)
	return r
}

// SetLimit sets Limit, the E[Z] the circuits tend to (moments.PartsLimit
// for a chip in parts, whose parts' states are independent, so that E[Z]
// is the product of their Haar values), and with it PorterThomas =
// D·limit − 1 and Spread. It panics unless 0 < limit ≤ 1.
func (r *Report) SetLimit(limit float64) {
	if !(limit > 0 && limit <= 1) {
		panic("sampling: limit must lie in (0, 1]")
	}
	r.Limit = limit
	r.PorterThomas = math.Ldexp(limit, r.Qubits) - 1
	r.SetEps(r.Eps)
}

// SetEps sets the threshold Eps and Spread = |Ideal/PorterThomas − 1| ≤ eps.
// It panics unless 0 ≤ eps < 1.
func (r *Report) SetEps(eps float64) {
	if !(eps >= 0 && eps < 1) {
		panic("sampling: eps must lie in [0, 1)")
	}
	r.Eps = eps
	r.Spread = math.Abs(r.Ideal/r.PorterThomas-1) <= eps
}

// BitOrderSigmas is the number of standard errors in the bit-order rule
// (CheckBitOrder): 3, so that under normal errors the hint comes up by
// chance about once in 700 tables (two-sided 3σ, 0.27%) for each of its
// conditions (common practice for a detection).
const BitOrderSigmas = 3

// BitOrderCheck is the outcome of CheckBitOrder.
type BitOrderCheck struct {
	// NearZero is |F_lin| ≤ BitOrderSigmas·SE of the given order: the
	// linear XEB is consistent with 0, what shots read in the wrong order
	// give (each is scored as an unrelated output).
	NearZero bool
	// Reversed is the score of the same shots with every bitstring
	// reversed; nil unless NearZero.
	Reversed *Report
	// Suggest is the rule: NearZero, and the reversed order scores high:
	// its F_lin is at least BitOrderSigmas of its own standard errors above
	// 0 and at least BitOrderSigmas combined standard errors
	// √(SE² + SE_rev²) above the given one. The shots are the same, so the
	// two estimates are correlated; the combined error treats them as
	// independent, the usual bound when the correlation is unknown.
	Suggest bool
}

// XEBNearZero reports whether the pooled linear XEB of r is within
// BitOrderSigmas standard errors of 0 (false without an error bar, one
// shot).
func XEBNearZero(r *Report) bool {
	return r.LinearErr > 0 && math.Abs(r.Linear) <= BitOrderSigmas*r.LinearErr
}

// ScoresHigh reports whether rev, the score of the shots of given with
// every bitstring reversed, scores high: F_lin at least BitOrderSigmas of
// its standard errors above 0 and BitOrderSigmas combined standard errors
// above given's.
func ScoresHigh(rev, given *Report) bool {
	se := math.Hypot(rev.LinearErr, given.LinearErr)
	return rev.LinearErr > 0 && rev.Linear >= BitOrderSigmas*rev.LinearErr && rev.Linear-given.Linear >= BitOrderSigmas*se
}

// CheckBitOrder applies the bit-order rule to the shots records (in the
// tool's order, as given to Collect) whose score is given: when the linear
// XEB is near 0 (XEBNearZero) it scores the shots again with every
// bitstring reversed and suggests the other order when that scores high
// (ScoresHigh). A row's p_ideal belongs to its own order, so the reversed
// trial ignores it. The arguments name, qubits, circuit and workers are
// those of Collect; its errors are returned.
func CheckBitOrder(ctx context.Context, name string, records []Record, qubits int, circuit func(id int) *Circuit, workers int, given *Report) (BitOrderCheck, error) {
	var c BitOrderCheck
	if c.NearZero = XEBNearZero(given); !c.NearZero {
		return c, nil
	}
	other := Reversed(records)
	for i := range other {
		other[i].HasP = false
	}
	g, err := Collect(ctx, name, other, qubits, circuit, workers)
	if err != nil {
		return c, err
	}
	c.Reversed = Score(qubits, g)
	c.Suggest = ScoresHigh(c.Reversed, given)
	return c, nil
}
