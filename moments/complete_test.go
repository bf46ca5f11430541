package moments

import (
	"context"
	"math"
	"strings"
	"testing"
	"time"
)

// TestCompleteMatchesThreeState: on the complete graph the class-count
// reduction must equal the three-state engine (the full 3^N average) for
// every swap-symmetric transfer: Haar, dressed CNOT (negative entries), and
// an arbitrary symmetric matrix with negative entries. Tolerance 1e-12 on
// E[Z] of order 1 to 1e-3: both sides round a few thousand operations per
// coefficient.
func TestCompleteMatchesThreeState(t *testing.T) {
	cnot := bruteTransfer(t, bruteDressed(&bruteCNOT))
	arbitrary := Transfer{
		{0.9, 0.3, 0.3, -0.1},
		{0.05, -0.2, 0.25, 0.1},
		{0.05, 0.25, -0.2, 0.1},
		{-0.02, 0.4, 0.4, 0.85},
	}
	if !arbitrary.symmetric(0) {
		t.Fatal("test transfer is not symmetric")
	}
	depths := []int{0, 1, 2, 3, 5, 8, 13, 21, 34, 55}
	for _, tc := range []struct {
		name string
		n    int
		tr   *Transfer
	}{
		{"haar", 2, &HaarTransfer},
		{"haar", 3, &HaarTransfer},
		{"haar", 7, &HaarTransfer},
		{"haar", 10, &HaarTransfer},
		{"cnot", 6, &cnot},
		{"arbitrary", 5, &arbitrary},
		{"arbitrary", 8, &arbitrary},
	} {
		spec := "complete:" + itoa(tc.n)
		g := engineGraph(t, spec)
		got, err := CompleteCollisionCurve(context.Background(), tc.n, tc.tr, depths)
		if err != nil {
			t.Fatal(err)
		}
		r, err := newThreeState(tc.n, g.Edges, tc.tr, 2)
		if err != nil {
			t.Fatal(err)
		}
		d := 0
		for i, depth := range depths {
			for ; d < depth; d++ {
				r.step()
			}
			want := r.collision()
			if math.Abs(got[i]-want) > 1e-12 {
				t.Errorf("%s %s depth %d: reduction %.15g, three-state %.15g", tc.name, spec, depth, got[i], want)
			}
		}
	}
}

// TestCompleteFirstGates checks the reduction against E[Z] written by hand
// for the first two Haar gates on complete:N: one gate gives Z_H(4) = 2/5
// whatever N (the other qubits stay |0⟩); the second hits the same pair
// (1 way of C(N,2); E[Z] = 2/5), shares one qubit (2(N−2) ways; 6/25, see
// TestEngineTwoGatesSameQubit) or is disjoint (C(N−2,2) ways; (2/5)²).
// Tolerance: relative 1e-13, for the rescaling by logarithms.
func TestCompleteFirstGates(t *testing.T) {
	for _, n := range []int{4, 300, 2000} {
		pairs := float64(n) * float64(n-1) / 2
		m := float64(n - 2)
		want2 := (0.4 + 2*m*6/25 + m*(m-1)/2*4/25) / pairs
		logs, err := CompleteLogCollisionCurve(context.Background(), n, &HaarTransfer, []int{0, 1, 2})
		if err != nil {
			t.Fatal(err)
		}
		for i, want := range []float64{1, 0.4, want2} {
			if got := math.Exp(logs[i]); math.Abs(got-want) > 1e-13*want {
				t.Errorf("complete:%d depth %d: E[Z] = %.15g, want %.15g", n, i, got, want)
			}
		}
	}
}

// TestCompleteLarge: on complete:300 the random-edge average reaches the
// Haar value Z_H = 2/(D+1) (Dalzell, Hunter-Jones, Brandão 2022) once the circuit is deep: E[Z]/Z_H
// must tend to 1. The values are ~1e-90, kept exact through the logarithmic
// rescaling; the linear curve must agree with the logarithmic one. 10000
// gates is over three times the depth where the deviation fell to 1e-3, and
// the deviation decays exponentially; tolerance 1e-9 leaves room for the
// rounding of 1e4 rescaled steps (about 1e-12).
func TestCompleteLarge(t *testing.T) {
	n, depths := 300, []int{0, 1000, 3000, 10000}
	if raceEnabled {
		// The race detector slows the chain tenfold: a third of the qubits
		// and of the gates keep the same gates per qubit, so the same
		// convergence, in a tenth of the time.
		n, depths = 100, []int{0, 333, 1000, 3333}
	}
	start := time.Now()
	logs, err := CompleteLogCollisionCurve(context.Background(), n, &HaarTransfer, depths)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("complete:%d, %d gates in %v", n, depths[len(depths)-1], time.Since(start))
	lnZH := math.Log(2) - float64(n)*math.Ln2 // ln 2/(D+1), D+1 = D in float64
	for i, d := range depths {
		t.Logf("depth %d: ln E[Z] = %.10g, E[Z]/Z_H − 1 = %.3g", d, logs[i], math.Expm1(logs[i]-lnZH))
	}
	if r := math.Expm1(logs[len(logs)-1] - lnZH); math.Abs(r) > 1e-9 {
		t.Errorf("E[Z]/Z_H − 1 = %g at %d gates, want → 0", r, depths[len(depths)-1])
	}
	lin, err := CompleteCollisionCurve(context.Background(), n, &HaarTransfer, depths[:3])
	if err != nil {
		t.Fatal(err)
	}
	for i, v := range lin {
		if math.Abs(math.Log(v)-logs[i]) > 1e-12 {
			t.Errorf("depth %d: linear %g vs log %g", depths[i], v, math.Exp(logs[i]))
		}
	}
}

// TestCompleteAsymmetric: an asymmetric transfer has no exact class-count
// reduction; CompleteCollisionCurve refuses it and CollisionCurve falls back
// to the subset decomposition, checked here against the three-state
// reference.
func TestCompleteAsymmetric(t *testing.T) {
	asym := Transfer{{1, 0.2, 0.5, 0}, {0, 0.1, 0, 0}, {0, 0, 0.3, 0}, {0, 0.2, 0.5, 1}}
	_, err := CompleteCollisionCurve(context.Background(), 4, &asym, []int{3})
	if err == nil || !strings.HasPrefix(err.Error(), "moments: ") {
		t.Errorf("asymmetric transfer: error %v", err)
	}
	g := engineGraph(t, "complete:4")
	got, err := CollisionCurve(context.Background(), g, engineSchedule(t, "random-edge", g), &asym, []int{3}, 1)
	if err != nil {
		t.Fatal(err)
	}
	r, err := newThreeState(4, g.Edges, &asym, 1)
	if err != nil {
		t.Fatal(err)
	}
	for range 3 {
		r.step()
	}
	// Tolerance: two exact methods rounding differently (see
	// TestCollisionRandomEdgeThreeState).
	if want := r.collision(); math.Abs(got[0]-want) > 1e-12 {
		t.Errorf("fallback: %v, three-state %v", got[0], want)
	}
}

// BenchmarkCompleteCollision: the speed target for the complete-graph
// reduction, 3000 Haar gates on complete:300 (one op).
func BenchmarkCompleteCollision(b *testing.B) {
	for b.Loop() {
		if _, err := CompleteCollisionCurve(context.Background(), 300, &HaarTransfer, []int{3000}); err != nil {
			b.Fatal(err)
		}
	}
}

func itoa(n int) string {
	const digits = "0123456789"
	if n < 10 {
		return digits[n : n+1]
	}
	return itoa(n/10) + digits[n%10:n%10+1]
}
