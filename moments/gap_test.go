package moments

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"mixdepth/circuits"
)

func gapOf(t *testing.T, g *circuits.Graph, workers int) Gap {
	t.Helper()
	gp, err := SpectralGap(context.Background(), g, workers)
	if err != nil {
		t.Fatalf("%s: %v", g.Name, err)
	}
	return gp
}

// TestGapByHand checks gaps derived by hand.
//   - line:2: the single gate is the Haar twirl, the projector onto
//     span{I, S} (Collins 2003), so M vanishes off its fixed space:
//     λ_diag = λ₂ = 0 and Δ = 1.
//   - complete:3 (|E| = 3, δ = 2): with P_e = |x_c⟩⟨x_c| + |u⟩⟨u| + |u'⟩⟨u'|
//     on the non-empty supports (x_i = {i}, y_i = V∖{i}, z = V;
//     u = (x_a + x_b + √3 y_c)/√5, u' = (y_a + y_b + √3 z)/√5), the
//     permutation-symmetric sector has 15M = [[9, 2√3, 0], [2√3, 7, 6],
//     [0, 6, 9]] with eigenvalues 15, 9, 1, and the two-dimensional
//     standard sector 15M = [[6, −√3], [−√3, 4]] with 7 and 3. Hence
//     λ_diag = 3/5 > 1 − δ/|E| = 1/3, λ₂ = 3/5 and Δ = 3·2/5 = 6/5.
//     (The eigenvalues sum to 45/15 = 3, the trace of M on the 7 supports.)
func TestGapByHand(t *testing.T) {
	for _, c := range []struct {
		spec              string
		diag, second, gap float64
		delta, edges      int
	}{
		{"line:2", 0, 0, 1, 1, 1},
		{"complete:3", 0.6, 0.6, 1.2, 2, 3},
	} {
		gp := gapOf(t, denseGraph(t, c.spec), 1)
		// Tolerance: GapTolerance bounds the eigenvalue error; ×3 for Δ.
		if math.Abs(gp.DiagEigenvalue-c.diag) > GapTolerance || math.Abs(gp.SecondEigenvalue-c.second) > GapTolerance ||
			math.Abs(gp.HamiltonianGap-c.gap) > 3*GapTolerance || gp.MinDegree != c.delta || gp.Edges != c.edges {
			t.Errorf("%s: %+v, want λ_diag %v, λ₂ %v, Δ %v, δ %d, |E| %d", c.spec, gp, c.diag, c.second, c.gap, c.delta, c.edges)
		}
	}
}

// TestGapLanczosVsEigenSym compares the matrix-free Lanczos λ_diag with
// gonum's dense EigenSym on the support chain built densely from the rule
// (01, 10, 11) → (1/5, 1/5, 3/5) and symmetrised with π(A) = 3^|A|.
func TestGapLanczosVsEigenSym(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	graphs := []*circuits.Graph{}
	for _, spec := range []string{"line:3", "line:8", "ring:7", "grid:2x4", "star:8", "complete:6", "grid:2x5"} {
		graphs = append(graphs, denseGraph(t, spec))
	}
	for _, n := range []int{4, 5, 6, 7, 8} {
		graphs = append(graphs, denseRandomGraph(t, rng, n, n/2))
	}
	for _, g := range graphs {
		spec := denseChainSpectrum(g.Qubits, g.Edges)
		top, want := spec[len(spec)-1], spec[len(spec)-2]
		// The stationary law makes 1 the top eigenvalue (common practice
		// for a reversible chain); rounding of a 2^n eigensolve.
		if math.Abs(top-1) > 1e-12 {
			t.Errorf("%s: dense top eigenvalue %v, want 1", g.Name, top)
		}
		gp := gapOf(t, g, 1)
		// Tolerance: Lanczos residual ≤ 1e-10, plus rounding of EigenSym.
		if math.Abs(gp.DiagEigenvalue-want) > 1e-9 {
			t.Errorf("%s: Lanczos λ_diag %.15g, EigenSym %.15g", g.Name, gp.DiagEigenvalue, want)
		}
		if frozen := 1 - float64(g.MinDegree())/float64(len(g.Edges)); math.Abs(gp.SecondEigenvalue-max(want, frozen)) > 1e-9 {
			t.Errorf("%s: λ₂ %.15g, want max(%.15g, %.15g)", g.Name, gp.SecondEigenvalue, want, frozen)
		}
	}
}

// TestGapVsDense takes the full spectrum of the dense 16^n moment operator
// M = mean_e M_e from the U(4) Weingarten values (Collins 2003) with gonum's
// EigenSym. M is a mean of projectors, so its spectrum lies in [0, 1]; the
// eigenvalue 1 has multiplicity 2 (the span of I and S on all qubits, the
// commutant of U^⊗2 for D ≥ 2); λ₂ is the largest eigenvalue below it and
// must equal max(λ_diag, 1 − δ/|E|).
func TestGapVsDense(t *testing.T) {
	for _, spec := range []string{"line:2", "line:3", "ring:3", "line:4", "star:4", "ring:4"} {
		g := denseGraph(t, spec)
		eig := denseSpectrum(g.Qubits, denseMean(g.Qubits, g.Edges))
		// Tolerance: rounding of eigensolves of blocks of order ≤ 4^n.
		const tol = 1e-12
		if math.Abs(eig[0]-1) > tol || math.Abs(eig[1]-1) > tol || eig[2] > 1-1e-6 {
			t.Errorf("%s: top eigenvalues %v, want 1 twice then a gap", spec, eig[:3])
		}
		if eig[len(eig)-1] < -tol {
			t.Errorf("%s: eigenvalue %v < 0", spec, eig[len(eig)-1])
		}
		gp := gapOf(t, g, 1)
		if math.Abs(gp.SecondEigenvalue-eig[2]) > 1e-10 {
			t.Errorf("%s: λ₂ %.15g, dense %.15g", spec, gp.SecondEigenvalue, eig[2])
		}
	}
}

// TestGapWorkers: the parallel operator adds the same terms in the same
// order per entry, so the result does not depend on the worker count.
func TestGapWorkers(t *testing.T) {
	g := denseGraph(t, "grid:3x5") // 2^15 supports: above gapParallel
	one, two := gapOf(t, g, 1), gapOf(t, g, 2)
	if one != two {
		t.Errorf("workers 1: %+v, workers 2: %+v", one, two)
	}
}

// TestDesignDepthBound checks ⌈|E|(2nk ln 2 + ln(1/ε))/Δ⌉ (Brandão, Harrow,
// Horodecki 2016) by hand:
//   - line:2 (Δ = 1, |E| = 1), k = 2, ε = 10⁻³: 8 ln 2 + ln 1000 =
//     5.545 + 6.908 = 12.45 → 13;
//   - complete:3 (Δ = 6/5, |E| = 3), ε = 10⁻²: 2.5·(12 ln 2 + ln 100) =
//     2.5·(8.318 + 4.605) = 32.31 → 33.
func TestDesignDepthBound(t *testing.T) {
	if got := DesignDepthBound(Gap{HamiltonianGap: 1, Edges: 1}, 2, 2, 1e-3); got != 13 {
		t.Errorf("line:2: %d gates, want 13", got)
	}
	if got := DesignDepthBound(Gap{HamiltonianGap: 1.2, Edges: 3}, 3, 2, 1e-2); got != 33 {
		t.Errorf("complete:3: %d gates, want 33", got)
	}
	gp := gapOf(t, denseGraph(t, "complete:3"), 1)
	if got := DesignDepthBound(gp, 3, 2, 1e-2); got != 33 {
		t.Errorf("complete:3 from SpectralGap: %d gates, want 33", got)
	}
	for _, bad := range []func(){
		func() { DesignDepthBound(Gap{HamiltonianGap: 0, Edges: 1}, 2, 2, 0.1) },
		func() { DesignDepthBound(Gap{HamiltonianGap: 1, Edges: 1}, 2, 2, 0) },
		func() { DesignDepthBound(Gap{HamiltonianGap: 1, Edges: 1}, 2, 0, 0.1) },
	} {
		func() {
			defer func() {
				if recover() == nil {
					t.Error("invalid DesignDepthBound arguments did not panic")
				}
			}()
			bad()
		}()
	}
}

// TestGapCancelled: a cancelled context stops the iteration.
func TestGapCancelled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := SpectralGap(ctx, denseGraph(t, "line:6"), 1); err == nil {
		t.Error("cancelled context: no error")
	}
}

// BenchmarkSpectralGap measures the matrix-free Lanczos on 2^n supports.
func BenchmarkSpectralGap(b *testing.B) {
	for _, spec := range []string{"grid:3x4", "grid:4x4", "grid:4x5"} {
		g, err := circuits.ParseGraph(spec)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(spec, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := SpectralGap(context.Background(), g, 2); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkFramePotential2 measures the exact frame potential at n = 10.
func BenchmarkFramePotential2(b *testing.B) {
	g, err := circuits.ParseGraph("grid:2x5")
	if err != nil {
		b.Fatal(err)
	}
	depths := []int{10, 20, 40}
	for _, kind := range circuits.Schedules {
		s, _ := circuits.NewSchedule(kind, g)
		b.Run(string(kind), func(b *testing.B) {
			for b.Loop() {
				if _, err := FramePotential2(context.Background(), g, s, depths); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// TestGapTiledOperator compares the tiled operator with the plain sum of
// one pass per edge, K x = |E|⁻¹ Σ_e P_e x, on graphs larger than one tile.
func TestGapTiledOperator(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 17))
	for _, g := range []*circuits.Graph{denseGraph(t, "grid:3x5"), denseRandomGraph(t, rng, 14, 10)} {
		op := newGapOperator(g, 2)
		if len(op.tilings) < 2 {
			t.Errorf("%s: %d tiling(s); the test needs several", g.Name, len(op.tilings))
		}
		dim := 1 << g.Qubits
		x := make([]float64, dim)
		for i := range x {
			x[i] = rng.NormFloat64()
		}
		want := make([]float64, dim)
		for _, e := range g.Edges {
			gapProjectAdd(want, x, min(e.A, e.B), max(e.A, e.B), 0, dim/4)
		}
		got := make([]float64, dim)
		op.apply(got, x)
		for i := range got {
			// Tolerance: the same ≤ |E| terms summed in another order.
			if w := want[i] / float64(len(g.Edges)); math.Abs(got[i]-w) > 1e-14*(1+math.Abs(w)) {
				t.Fatalf("%s: (Kx)[%d] = %v, want %v", g.Name, i, got[i], w)
			}
		}
	}
}
