package scan

import (
	"context"
	"math"
	"testing"

	"mixdepth/sim"
	"mixdepth/stats"
)

// TestStreamedReadout: above ExactKSQubits the scan reads the collision
// probability and the Porter–Thomas distance from passes over the amplitudes
// (no probability array). On a 21-qubit brickwork state (far from
// Porter–Thomas at depth 1, close at depth 16) both agree with the
// array path: stats.Collision (pairwise) and stats.KSHaar (sort). The
// collision sums the same squares in another pairwise order, so it agrees to
// a few ulps (1e−14 relative); KSHaarPasses evaluates the same terms as
// KSHaar (stats/pthist_test.go), so 1e−15 absolute.
func TestStreamedReadout(t *testing.T) {
	cfg := config(t, "grid:3x7", "layered", "cz+haar1", []int{1, 16}, 1)
	n := cfg.Graph.Qubits
	if n <= ExactKSQubits {
		t.Fatalf("grid:3x7 has %d qubits, not above ExactKSQubits", n)
	}
	st, err := sim.NewState(n, 0)
	if err != nil {
		t.Skip(err)
	}
	streamed := newReadout(n, 2)
	probs := make([]float64, 1<<n)
	var got [][2]float64
	check := &checkingVector{vector: st, read: func() {
		zs, kss := streamed.read(st)
		probs = st.Probabilities(probs, 2)
		ze, kse := stats.Collision(probs), stats.KSHaar(probs, nil)
		got = append(got, [2]float64{zs, kss})
		if math.Abs(zs-ze) > 1e-14*ze || math.Abs(kss-kse) > 1e-15 {
			t.Errorf("streamed Z %.17g KS %.17g, array Z %.17g KS %.17g", zs, kss, ze, kse)
		}
	}}
	recs, ok := runInstance(context.Background(), cfg, 0, n, check, newReadout(n, 2))
	if !ok || len(recs) != 2 || len(got) != 2 {
		t.Fatalf("runInstance: ok=%v, %d records, %d checks", ok, len(recs), len(got))
	}
	// Depth 16 (four cycles of the grid's classes) of a 21-qubit brickwork
	// has anti-concentrated: Z/Z_H within 10% of 1 (Dalzell, Hunter-Jones,
	// Brandão 2022: anti-concentration at depth O(log n)); a sanity check
	// that the compared state is not trivial.
	if r := recs[1].Ratio; r < 0.9 || r > 1.1 {
		t.Errorf("depth 16: Z/Z_H = %g", r)
	}
}

// checkingVector calls read once before each readout of the scan (in
// RunVisit, after the gates, or at the first ProbabilityBlocks or
// AmplitudeBlocks after a Run). It wraps a *sim.State only: it always has
// AmplitudeBlocks, so the read-out would take a State64's probabilities
// from RunVisit for amplitude pairs.
type checkingVector struct {
	vector
	read    func()
	pending bool
}

func (c *checkingVector) Run(ctx context.Context, ops []sim.Op, workers int) error {
	c.pending = true
	return c.vector.Run(ctx, ops, workers)
}

// RunVisit applies the gates, reads, and visits the chunks in a pass of
// their own (not folded, which TestFoldedReadout compares).
func (c *checkingVector) RunVisit(ctx context.Context, ops []sim.Op, workers int, visit func(w, off int, x []float64)) error {
	if err := c.vector.Run(ctx, ops, workers); err != nil {
		return err
	}
	c.pending = false
	c.read()
	if av, ok := c.vector.(amplitudeVector); ok {
		av.AmplitudeBlocks(workers, visit)
	} else {
		c.vector.ProbabilityBlocks(workers, visit)
	}
	return nil
}

func (c *checkingVector) AmplitudeBlocks(workers int, visit func(w, off int, a []float64)) {
	if c.pending {
		c.pending = false
		c.read()
	}
	c.vector.(amplitudeVector).AmplitudeBlocks(workers, visit)
}

func (c *checkingVector) ProbabilityBlocks(workers int, visit func(w, off int, p []float64)) {
	if c.pending {
		c.pending = false
		c.read()
	}
	c.vector.ProbabilityBlocks(workers, visit)
}

// TestRunLargeWorkers: with gates split across goroutines (n ≥
// sim.ParallelQubits) the records do not depend on the worker count: blocks,
// chunk sums and the streamed statistic are the same for 1 and 2 workers.
func TestRunLargeWorkers(t *testing.T) {
	a := config(t, "grid:3x6", "layered", "haar", []int{1, 4}, 1)
	a.Workers = 1
	b := config(t, "grid:3x6", "layered", "haar", []int{1, 4}, 1)
	b.Workers = 2
	ra, _, err := Run(context.Background(), a)
	if err != nil {
		t.Fatal(err)
	}
	rb, _, err := Run(context.Background(), b)
	if err != nil {
		t.Fatal(err)
	}
	for i := range ra {
		if ra[i] != rb[i] {
			t.Errorf("record %d: 1 worker %+v, 2 workers %+v", i, ra[i], rb[i])
		}
	}
}

// TestSinglePrecision: complex64 amplitudes give the double-precision
// records to single-precision rounding. A 12-qubit circuit of depth 12 has
// about 200 gates; their rounding errors (2^−24 each, adding like a random
// walk) leave the collision probability within ~1e−6 relative (measured in
// sim's TestState64Accuracy), so 2e−5 is a margin of ten or more. The KS
// distance moves by at most the density of the Haar law times the largest
// probability error, ≈ D·|Δp| ≲ 1e−5: 1e−4.
func TestSinglePrecision(t *testing.T) {
	d := config(t, "grid:3x4", "layered", "haar", []int{2, 12}, 4)
	s := config(t, "grid:3x4", "layered", "haar", []int{2, 12}, 4)
	s.Precision = PrecisionSingle
	rd, _, err := Run(context.Background(), d)
	if err != nil {
		t.Fatal(err)
	}
	rs, _, err := Run(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	for i := range rd {
		if e := math.Abs(rs[i].Collision-rd[i].Collision) / rd[i].Collision; e > 2e-5 {
			t.Errorf("record %d: single %g, double %g (relative %g)", i, rs[i].Collision, rd[i].Collision, e)
		}
		if e := math.Abs(rs[i].KS - rd[i].KS); e > 1e-4 {
			t.Errorf("record %d: KS single %g, double %g", i, rs[i].KS, rd[i].KS)
		}
	}
	s.Precision = "quad"
	if err := s.Validate(); err == nil {
		t.Error("precision quad accepted")
	}
}
