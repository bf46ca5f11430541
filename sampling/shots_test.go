package sampling

import (
	"errors"
	"testing"
)

// TestPlanShots: shot counts worked by hand from the per-shot variance
// 1 + 2F − F² (linear XEB under global depolarization, Porter–Thomas
// outputs): F = 0.5 gives 1.75, so 5σ needs 25·1.75/0.25 = 175 shots and a
// 10% standard error 1.75/0.05² = 700; the plan is the larger, split over
// 10 instances of 70. A fidelity of 1e-9 at 5σ needs ~2.5e19 shots: refused.
func TestPlanShots(t *testing.T) {
	p, err := PlanShots(0.5, 5, 0.1)
	if err != nil || p.ForSigmas != 175 || p.ForRelative != 700 || p.Shots != 700 || p.Instances != 10 || p.PerInstance != 70 {
		t.Errorf("PlanShots(0.5, 5, 0.1) = %+v, %v", p, err)
	}
	if p, err := PlanShots(0.5, 5, 0); err != nil || p.ForRelative != 0 || p.Shots != 175 || p.PerInstance != 18 {
		t.Errorf("PlanShots(0.5, 5, 0) = %+v, %v", p, err)
	}
	if _, err := PlanShots(1e-9, 5, 0); !errors.Is(err, ErrTooManyShots) {
		t.Errorf("PlanShots(1e-9, 5, 0): %v, want ErrTooManyShots", err)
	}
}
