package sampling

import (
	"errors"
	"fmt"
	"math"

	"mixdepth/stats"
)

// MaxPlanShots bounds a shot plan: beyond 10^15 shots (years of any device's
// time) a plan is refused rather than overflowing int64.
const MaxPlanShots = 1e15

// ErrTooManyShots is wrapped by PlanShots when a count exceeds MaxPlanShots.
var ErrTooManyShots = errors.New("beyond any experiment")

// ShotPlan is the number of shots a linear-XEB measurement of fidelity F
// needs, from the Porter–Thomas per-shot variance 1 + 2F − F² under global
// depolarization (stats.XEBSamples, stats.XEBSamplesRelative).
type ShotPlan struct {
	// ForSigmas tells F from 0 at the given number of standard deviations,
	// N = z²(1 + 2F − F²)/F²; 0 when not asked for.
	ForSigmas int64
	// ForRelative gives a standard error of r·F, N = (1 + 2F − F²)/(r·F)²;
	// 0 when not asked for.
	ForRelative int64
	// Shots is the larger of the two: the plan.
	Shots int64
	// Instances × PerInstance ≥ Shots splits the plan over
	// stats.MinIntervalValues instances, the fewest that give an error over
	// instances.
	Instances   int
	PerInstance int64
}

// PlanShots returns the shots for fidelity f at z standard deviations
// (z > 0) and/or a relative standard error r (r > 0); a zero z or r is not
// asked for. Counts are rounded up; a count beyond MaxPlanShots returns an
// error wrapping ErrTooManyShots. It panics unless 0 < f ≤ 1 and one of z, r
// is positive.
func PlanShots(f, z, r float64) (ShotPlan, error) {
	if !(f > 0 && f <= 1) || !(z > 0 || r > 0) {
		panic("sampling: PlanShots needs 0 < f ≤ 1 and z > 0 or r > 0")
	}
	ceil := func(x float64) (int64, error) {
		if !(x <= MaxPlanShots) {
			return 0, fmt.Errorf("sampling: %.3g shots at fidelity %g: %w", x, f, ErrTooManyShots)
		}
		return int64(math.Ceil(x)), nil
	}
	var p ShotPlan
	var err error
	if z > 0 {
		if p.ForSigmas, err = ceil(stats.XEBSamples(f, z)); err != nil {
			return ShotPlan{}, err
		}
		p.Shots = p.ForSigmas
	}
	if r > 0 {
		if p.ForRelative, err = ceil(stats.XEBSamplesRelative(f, r)); err != nil {
			return ShotPlan{}, err
		}
		p.Shots = max(p.Shots, p.ForRelative)
	}
	p.Instances = stats.MinIntervalValues
	p.PerInstance = (p.Shots + int64(p.Instances) - 1) / int64(p.Instances)
	return p, nil
}
