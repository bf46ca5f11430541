package sampling

import (
	"fmt"
	"math"
)

// SplitPlan is a two-stage design for a linear-XEB measurement: Instances
// circuits of PerInstance shots each.
type SplitPlan struct {
	Instances   int
	PerInstance int64
	// Variance is the variance of the pooled estimate with this split,
	// Between/Instances + Within/(Instances·PerInstance), and Cost its
	// price, Instances·(CircuitCost + PerInstance), in shots.
	Variance, Cost float64
	// Optimum is the shots per circuit of the continuous optimum,
	// sqrt(CircuitCost·Within/Between) (+Inf when Between is 0).
	Optimum float64
}

// PlanSplit returns the cheapest split of a measurement into circuits and
// shots whose pooled linear XEB has at most the variance target. between is
// the circuit-to-circuit variance σ_b² of the circuits' expected XEB, within
// the per-shot variance σ_w² (1 + 2F − F² for Porter–Thomas outputs), and
// circuitCost the price of running one more circuit (loading, calibration)
// in units of one shot. With M circuits of m shots the estimate's variance
// is σ_b²/M + σ_w²/(M·m) and the cost M·(c + m); the cost is least at
//
//	m* = sqrt(c·σ_w²/σ_b²),  M = (σ_b² + σ_w²/m)/target
//
// (two-stage sampling with equal cluster sizes: Cochran, Sampling
// Techniques, 3rd ed., 1977, §10.6, from memory). PlanSplit rounds to whole
// numbers: it takes the cheapest integer m near m* (each with the smallest M
// that meets the target) and at least minInstances circuits, so that the
// error over instances can be estimated (stats.MinIntervalValues is the
// tool's minimum). A count beyond MaxPlanShots gives an error wrapping
// ErrTooManyShots. It panics unless between ≥ 0, within > 0, circuitCost ≥ 0,
// target > 0 and minInstances ≥ 1.
func PlanSplit(between, within, circuitCost, target float64, minInstances int) (SplitPlan, error) {
	if !(between >= 0) || !(within > 0) || !(circuitCost >= 0) || !(target > 0) || minInstances < 1 ||
		math.IsInf(between, 0) || math.IsInf(within, 0) || math.IsInf(circuitCost, 0) || math.IsInf(target, 0) {
		panic(fmt.Sprintf("sampling: PlanSplit(%v, %v, %v, %v, %d)", between, within, circuitCost, target, minInstances))
	}
	opt := math.Inf(1)
	if between > 0 {
		opt = math.Sqrt(circuitCost * within / between)
	}
	// plan returns the split with m shots per circuit and the fewest circuits
	// that meet the target.
	plan := func(m float64) (SplitPlan, bool) {
		circuits := math.Max(math.Ceil((between+within/m)/target*(1-1e-12)), float64(minInstances))
		if !(circuits*m <= MaxPlanShots) {
			return SplitPlan{}, false
		}
		p := SplitPlan{Instances: int(circuits), PerInstance: int64(m), Optimum: opt}
		p.Variance = between/circuits + within/(circuits*m)
		p.Cost = circuits * (circuitCost + m)
		return p, true
	}
	// With minInstances circuits forced, m ≥ need already meets the target
	// and only adds cost, so the best m lies in [1, ceil(need)], near the
	// continuous optimum or at ceil(need). The rounding of M makes the cost
	// ragged, so every integer in a window around the optimum is tried.
	need := math.Inf(1)
	if float64(minInstances)*target > between {
		need = math.Ceil(within / (float64(minInstances)*target - between))
	}
	centre := math.Max(math.Min(opt, need), 1)
	var best SplitPlan
	found := false
	try := func(m float64) {
		if m < 1 || m > need || m > MaxPlanShots {
			return
		}
		if p, ok := plan(m); ok && (!found || p.Cost < best.Cost) {
			best, found = p, true
		}
	}
	try(need)
	for k := -splitWindow; k <= splitWindow; k++ {
		try(math.Floor(centre) + float64(k))
		try(math.Floor(centre * (1 + float64(k)/(4*splitWindow))))
	}
	if !found {
		return SplitPlan{}, fmt.Errorf("sampling: a standard error of %.3g needs more than %.0e shots: %w", math.Sqrt(target), float64(MaxPlanShots), ErrTooManyShots)
	}
	return best, nil
}

// splitWindow is the half-width of PlanSplit's search around the optimum:
// that many integers on each side, and as many points spread over ±25%.
const splitWindow = 64
