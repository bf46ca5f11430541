package scan

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"mixdepth/circuits"
	"mixdepth/internal/crash"
)

// brokenEnsemble panics when it draws a gate, standing in for a bug.
type brokenEnsemble struct{}

func (brokenEnsemble) Name() string                     { return "broken" }
func (brokenEnsemble) Gate(*rand.Rand, *[16]complex128) { panic("broken gate") }

// TestWorkerPanic: a panic inside a worker goroutine comes back from Run as
// an error wrapping crash.ErrPanic, for one worker and for several, instead
// of ending the process with Go's own status (which equals bad input's 2).
func TestWorkerPanic(t *testing.T) {
	g, err := circuits.ParseGraph("line:4")
	if err != nil {
		t.Fatal(err)
	}
	for _, workers := range []int{1, 2} {
		_, _, err := Run(context.Background(), &Config{Graph: g, Schedule: &circuits.Layered{Classes: circuits.LayeredClasses(g)},
			Ensemble: brokenEnsemble{}, Depths: []int{2}, Instances: []int{0, 1, 2}, Seed: 1, Workers: workers})
		if !errors.Is(err, crash.ErrPanic) {
			t.Errorf("workers %d: Run returned %v, want a crash.ErrPanic", workers, err)
		}
	}
}

// TestExactDeviations: (mean − exact)/stderr per row, worked by hand:
// (0.30 − 0.25)/0.02 = 2.5 and (0.10 − 0.16)/0.03 = −2.
func TestExactDeviations(t *testing.T) {
	c := &Curve{Rows: []Row{{}, {}}}
	c.Rows[0].Collision.Mean, c.Rows[0].Collision.StdErr = 0.30, 0.02
	c.Rows[1].Collision.Mean, c.Rows[1].Collision.StdErr = 0.10, 0.03
	got := c.ExactDeviations([]float64{0.25, 0.16})
	// Rounding of three decimal inputs: a few ulps.
	if math.Abs(got[0]-2.5) > 1e-12 || math.Abs(got[1]+2) > 1e-12 {
		t.Errorf("deviations %v, want [2.5 -2]", got)
	}
}
