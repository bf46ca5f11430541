package sampling

import (
	"errors"
	"math"
	"testing"
)

// TestPlanSplitBruteForce compares PlanSplit with an exhaustive search over
// the shots per circuit m (each with the fewest circuits M that meet the
// target, at least the minimum): the two costs must be equal, and the plan
// must meet the target. The cases span circuit spreads from none to
// dominant, cheap and dear circuits.
func TestPlanSplitBruteForce(t *testing.T) {
	for _, c := range []struct{ between, within, cost, target float64 }{
		{0, 2.5, 100, 1e-3},
		{1e-4, 2.5, 100, 1e-4},
		{1e-3, 1.8, 1000, 2e-5},
		{5e-3, 1.2, 10, 1e-3},
		{0.2, 1, 0, 1e-2},
		{2e-6, 2.9, 5000, 1e-4},
	} {
		got, err := PlanSplit(c.between, c.within, c.cost, c.target, 10)
		if err != nil {
			t.Fatalf("%+v: %v", c, err)
		}
		if got.Variance > c.target*(1+1e-9) {
			t.Errorf("%+v: variance %.6g above the target", c, got.Variance)
		}
		best := math.Inf(1)
		for m := 1.0; m <= 200000; m++ {
			circuits := math.Max(math.Ceil((c.between+c.within/m)/c.target*(1-1e-12)), 10)
			best = math.Min(best, circuits*(c.cost+m))
		}
		if math.Abs(got.Cost-best) > 1e-9*best {
			t.Errorf("%+v: cost %.6g (%d × %d), exhaustive search %.6g", c, got.Cost, got.Instances, got.PerInstance, best)
		}
	}
}

// TestPlanSplitOptimum checks the continuous optimum of two-stage sampling,
// m* = sqrt(c·σ_w²/σ_b²) (Cochran 1977, §10.6, from memory), worked by hand:
// σ_b² = 1e-4, σ_w² = 2.5, c = 400 give m* = sqrt(400·2.5/1e-4) = 3162.3,
// and for a target variance 1e-6, M = (1e-4 + 2.5/3162)/1e-6 ≈ 890.6, so
// 891 circuits. The integer plan sits at the optimum to within rounding.
func TestPlanSplitOptimum(t *testing.T) {
	p, err := PlanSplit(1e-4, 2.5, 400, 1e-6, 10)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(p.Optimum-3162.2776601683795) > 1e-9 {
		t.Errorf("optimum %v, want sqrt(1e7)", p.Optimum)
	}
	if math.Abs(float64(p.PerInstance)-p.Optimum) > 0.05*p.Optimum || p.Instances < 880 || p.Instances > 900 {
		t.Errorf("plan %d × %d, want about 891 × 3162", p.Instances, p.PerInstance)
	}
}

// TestPlanSplitLimits: with no circuit spread the minimum number of circuits
// takes all the shots (m = ceil(σ_w²/(M₀·target))), and an unreachable
// target is an error wrapping ErrTooManyShots.
func TestPlanSplitLimits(t *testing.T) {
	p, err := PlanSplit(0, 2, 50, 1e-4, 10)
	if err != nil {
		t.Fatal(err)
	}
	if p.Instances != 10 || p.PerInstance != 2000 {
		t.Errorf("no spread: %d × %d, want 10 × 2000", p.Instances, p.PerInstance)
	}
	if _, err := PlanSplit(1, 1, 1e20, 1e-30, 10); !errors.Is(err, ErrTooManyShots) {
		t.Errorf("unreachable target: %v, want ErrTooManyShots", err)
	}
}
