package moments

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"runtime"
	"strings"
	"testing"

	"mixdepth/circuits"
	"mixdepth/sim"
)

// collisionHaarValue is Z_H = 2/(D+1), D = 2^n, the collision probability
// of a Haar-random state (Dalzell, Hunter-Jones, Brandão 2022, PRX Quantum 3, 010333).
func collisionHaarValue(n int) float64 { return 2 / (math.Ldexp(1, n) + 1) }

func engineGraph(t testing.TB, spec string) *circuits.Graph {
	t.Helper()
	g, err := circuits.ParseGraph(spec)
	if err != nil {
		t.Fatalf("ParseGraph(%q): %v", spec, err)
	}
	return g
}

func engineSchedule(t testing.TB, kind circuits.ScheduleKind, g *circuits.Graph) circuits.Schedule {
	t.Helper()
	s, err := circuits.NewSchedule(kind, g)
	if err != nil {
		t.Fatalf("NewSchedule(%q): %v", kind, err)
	}
	return s
}

// TestEngineOneHaarGate: one Haar U(4) gate on two qubits makes the state
// Haar on D = 4, so E[Z] = Z_H = 2/(D+1) = 2/5 (Dalzell, Hunter-Jones, Brandão 2022; Hunter-Jones 2019, arXiv:1905.12053). Every
// engine must give it; tolerance 1e-15 covers the few roundings of 0.4.
func TestEngineOneHaarGate(t *testing.T) {
	e, err := NewEngine(2, 1)
	if err != nil {
		t.Fatal(err)
	}
	if z := e.Collision(); z != 1 {
		t.Errorf("depth 0: E[Z] = %v, want 1 (|00⟩ has Z = 1)", z)
	}
	e.Apply(0, 1, &HaarTransfer)
	if z := e.Collision(); math.Abs(z-0.4) > 1e-15 {
		t.Errorf("Engine: E[Z] = %.17g, want 2/5", z)
	}
	e.Reset()
	e.Apply(1, 0, &HaarTransfer)
	if z := e.Collision(); math.Abs(z-0.4) > 1e-15 {
		t.Errorf("Engine, edge (1, 0): E[Z] = %.17g, want 2/5", z)
	}
	ctx := context.Background()
	for _, spec := range []string{"line:2", "complete:2"} {
		g := engineGraph(t, spec)
		for _, kind := range circuits.Schedules {
			z, err := CollisionCurve(ctx, g, engineSchedule(t, kind, g), &HaarTransfer, []int{0, 1}, 1)
			if err != nil {
				t.Fatalf("%s %s: %v", spec, kind, err)
			}
			if z[0] != 1 || math.Abs(z[1]-0.4) > 1e-15 {
				t.Errorf("%s %s: E[Z] at depths 0, 1 = %v, want [1 0.4]", spec, kind, z)
			}
		}
	}
	r, err := newThreeState(2, []circuits.Edge{{A: 0, B: 1}}, &HaarTransfer, 1)
	if err != nil {
		t.Fatal(err)
	}
	r.step()
	if z := r.collision(); math.Abs(z-0.4) > 1e-15 {
		t.Errorf("three-state engine: E[Z] = %.17g, want 2/5", z)
	}
}

// TestEngineTwoGatesSameQubit: after one Haar gate on (0, 1) of three
// qubits, qubit 2 is untouched: the state is Haar on qubits 0, 1 times
// |0⟩, so Z = Z_H(4)·1 = 2/5. A Haar gate on (1, 2) next gives E[Z] by hand
// (Hunter-Jones 2019, arXiv:1905.12053): the pair state is (II+SS)/(4·5) in c-coordinates, qubit 2
// enters as (I+S)/6, the gate keeps I₁I₂ and S₁S₂ and sends I₁S₂ and S₁I₂
// to (2/5)(II+SS), total weight 4/5 each; with readout 2 per qubit,
// E[Z] = 8/(20·6)·2·(1 + 4/5) = 6/25. Tolerance: a handful of roundings.
func TestEngineTwoGatesSameQubit(t *testing.T) {
	e, err := NewEngine(3, 1)
	if err != nil {
		t.Fatal(err)
	}
	e.Apply(0, 1, &HaarTransfer)
	if z := e.Collision(); math.Abs(z-0.4) > 1e-15 {
		t.Errorf("after (0,1): E[Z] = %.17g, want 2/5", z)
	}
	if e.Touched(2) || !e.Touched(0) || !e.Touched(1) {
		t.Errorf("touched mask wrong after (0,1)")
	}
	e.Apply(1, 2, &HaarTransfer)
	if z := e.Collision(); math.Abs(z-6.0/25) > 1e-15 {
		t.Errorf("after (0,1),(1,2): E[Z] = %.17g, want 6/25", z)
	}
}

// TestEngineMemory: 40 qubits need 8·2^40 bytes = 8 TiB, far beyond the
// 24 GiB machine, so NewEngine must refuse with sim.ErrTooLarge and say the
// size in GiB (memory is checked before a vector is allocated).
func TestEngineMemory(t *testing.T) {
	_, err := NewEngine(40, 1)
	if !errors.Is(err, sim.ErrTooLarge) {
		t.Fatalf("NewEngine(40): %v, want an error wrapping sim.ErrTooLarge", err)
	}
	if !strings.Contains(err.Error(), "8192.0 GiB") || !strings.HasPrefix(err.Error(), "moments: ") {
		t.Errorf("NewEngine(40): %q should start with moments: and state 8192.0 GiB", err)
	}
	_, err = NewEngine(70, 1)
	if !errors.Is(err, sim.ErrTooLarge) || !strings.Contains(err.Error(), "GiB") {
		t.Errorf("NewEngine(70): %v", err)
	}
	_, err = newThreeState(22, nil, &HaarTransfer, 1) // 16·3^22 bytes = 470 GiB
	if !errors.Is(err, sim.ErrTooLarge) || !strings.Contains(err.Error(), "GiB") {
		t.Errorf("three-state engine on 22 qubits: %v, want sim.ErrTooLarge with the GiB", err)
	}
	g := engineGraph(t, "line:30")
	_, err = CollisionCurve(context.Background(), g, engineSchedule(t, "random-edge", g), &HaarTransfer, []int{1}, 1)
	if err == nil || !strings.HasPrefix(err.Error(), "moments: ") {
		t.Errorf("random-edge on line:30: %v, want a moments: error on the size of the work", err)
	}
}

// TestEngineApplyPanics: programmer mistakes panic with the package prefix.
func TestEngineApplyPanics(t *testing.T) {
	e, err := NewEngine(3, 1)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		a, b int
		t    *Transfer
	}{{0, 0, &HaarTransfer}, {0, 3, &HaarTransfer}, {-1, 1, &HaarTransfer}, {0, 1, nil}} {
		func() {
			defer func() {
				r := recover()
				if s, ok := r.(string); !ok || !strings.HasPrefix(s, "moments: ") {
					t.Errorf("Apply(%d, %d): recovered %v, want a moments: panic", tc.a, tc.b, r)
				}
			}()
			e.Apply(tc.a, tc.b, tc.t)
		}()
	}
}

// TestEngineParallelMatchesSerial: splitting the passes across goroutines
// must not change the result; the kernel is elementwise and Collision sums
// fixed blocks, so the agreement is exact. Random non-Haar transfers with
// negative entries exercise every matrix entry and both run kernels (low
// qubits below 2 and at or above 2).
func TestEngineParallelMatchesSerial(t *testing.T) {
	const n = 16 // sim.ParallelQubits: the smallest parallel size
	if sim.ParallelQubits != n {
		t.Fatalf("sim.ParallelQubits = %d; update the test", sim.ParallelQubits)
	}
	a, err := NewEngine(n, 1)
	if err != nil {
		t.Fatal(err)
	}
	b, err := NewEngine(n, 3)
	if err != nil {
		t.Fatal(err)
	}
	tr := Transfer{{0.9, 0.3, -0.2, 0.1}, {0.05, -0.1, 0.2, 0.3}, {0.1, 0.2, 0.15, -0.05}, {0.02, 0.4, 0.3, 0.8}}
	pairs := [][2]int{{0, 1}, {1, 0}, {15, 0}, {3, 9}, {9, 3}, {14, 15}, {2, 7}, {1, 5}, {6, 2}}
	for _, p := range pairs {
		a.Apply(p[0], p[1], &tr)
		b.Apply(p[0], p[1], &tr)
	}
	for i := range a.u {
		if a.u[i] != b.u[i] {
			t.Fatalf("coefficient %d: serial %v, parallel %v", i, a.u[i], b.u[i])
		}
	}
	if za, zb := a.Collision(), b.Collision(); za != zb {
		t.Errorf("Collision: serial %v, parallel %v", za, zb)
	}
}

// TestEngineKernelDefinition compares Apply, for an asymmetric transfer
// with negative entries, with the definition written as a plain loop over
// σ: u'(σ) = Σ_{x,y} T[2σ_a+σ_b][2x+y] u(σ with a→x, b→y) (local index 2·σ_a + σ_b, column = input), on a vector whose qubits
// are all touched. Tolerance: four products of numbers of order 1.
func TestEngineKernelDefinition(t *testing.T) {
	const n = 6
	tr := Transfer{{0.9, 0.3, -0.2, 0.1}, {0.05, -0.1, 0.2, 0.3}, {0.1, 0.2, 0.15, -0.05}, {0.02, 0.4, 0.3, 0.8}}
	e, err := NewEngine(n, 1)
	if err != nil {
		t.Fatal(err)
	}
	for q := range n {
		e.touched |= 1 << q
	}
	for i := range e.u {
		e.u[i] = math.Sin(float64(3*i + 1))
	}
	for _, p := range [][2]int{{0, 1}, {1, 0}, {2, 5}, {5, 2}, {4, 1}, {3, 4}} {
		a, b := p[0], p[1]
		want := make([]float64, len(e.u))
		for s := range e.u {
			sa, sb := s>>a&1, s>>b&1
			for x := range 2 {
				for y := range 2 {
					src := s&^(1<<a|1<<b) | x<<a | y<<b
					want[s] += tr[2*sa+sb][2*x+y] * e.u[src]
				}
			}
		}
		e.Apply(a, b, &tr)
		for s := range want {
			if math.Abs(e.u[s]-want[s]) > 1e-14 {
				t.Fatalf("Apply(%d, %d): coefficient %d = %v, want %v", a, b, s, e.u[s], want[s])
			}
		}
	}
}

// TestCollisionMonteCarlo compares the exact engines with an independent
// method: Haar circuits simulated on a state vector (circuits.NewBuilder,
// sim.State.Apply2) with Z = Σ_x p(x)² per instance. Depths are below the
// mixing depth so that E[Z] is well above Z_H. Tolerance: 4 standard errors
// of the sample mean (fixed seeds; a correct engine fails with probability
// about 6e-5 per case).
func TestCollisionMonteCarlo(t *testing.T) {
	const instances = 3000
	for _, tc := range []struct {
		spec  string
		kind  circuits.ScheduleKind
		depth int
	}{
		{"line:4", "layered", 2},
		{"line:4", "random-edge", 3},
		{"grid:2x3", "layered", 3},
		{"grid:2x3", "random-edge", 6},
	} {
		g := engineGraph(t, tc.spec)
		s := engineSchedule(t, tc.kind, g)
		exact, err := CollisionCurve(context.Background(), g, s, &HaarTransfer, []int{tc.depth}, 1)
		if err != nil {
			t.Fatal(err)
		}
		st, err := sim.NewState(g.Qubits, 0)
		if err != nil {
			t.Fatal(err)
		}
		var sum, sum2 float64
		var gates []circuits.Gate
		var probs []float64
		for i := range instances {
			st.Reset()
			b := circuits.NewBuilder(s, circuits.Haar{}, 20260601, i)
			for range tc.depth {
				gates = b.Next(gates[:0])
				for k := range gates {
					st.Apply2(gates[k].A, gates[k].B, &gates[k].M, 1)
				}
			}
			probs = st.Probabilities(probs, 1)
			var z float64
			for _, p := range probs {
				z += p * p
			}
			sum += z
			sum2 += z * z
		}
		mean := sum / instances
		se := math.Sqrt((sum2/instances - mean*mean) / (instances - 1))
		if math.Abs(mean-exact[0]) > 4*se {
			t.Errorf("%s %s depth %d: Monte Carlo %.6f ± %.6f, exact %.6f", tc.spec, tc.kind, tc.depth, mean, se, exact[0])
		}
		t.Logf("%s %s depth %d: Monte Carlo %.6f ± %.6f, exact %.6f, Z_H %.6f", tc.spec, tc.kind, tc.depth, mean, se, exact[0], collisionHaarValue(g.Qubits))
	}
}

// TestCollisionDeep: deep Haar circuits on a connected graph converge to a
// 2-design, E[Z] → Z_H = 2/(D+1) (Dalzell, Hunter-Jones, Brandão 2022;
// Dalzell, Hunter-Jones, Brandão 2022). The depths are at least twice those at which the deviation
// fell below 1e-12 (layered: 100 layers; random-edge: 400 gates), so the
// tolerance 1e-9 on E[Z]/Z_H leaves the remaining deviation and the rounding
// (below 1e-13 over these depths) far inside it.
func TestCollisionDeep(t *testing.T) {
	for _, tc := range []struct {
		spec  string
		kind  circuits.ScheduleKind
		depth int
	}{
		{"line:6", "layered", 300},
		{"ring:5", "layered", 300},
		{"grid:2x3", "layered", 300},
		{"star:5", "layered", 300},
		{"complete:5", "layered", 300},
		{"line:5", "random-edge", 1000},
		{"ring:5", "random-edge", 1000},
		{"grid:2x3", "random-edge", 1000},
		{"star:5", "random-edge", 1000},
		{"complete:6", "random-edge", 1000}, // by the complete-graph reduction
	} {
		g := engineGraph(t, tc.spec)
		s := engineSchedule(t, tc.kind, g)
		z, err := CollisionCurve(context.Background(), g, s, &HaarTransfer, []int{tc.depth}, 1)
		if err != nil {
			t.Fatal(err)
		}
		if r := z[0] / collisionHaarValue(g.Qubits); math.Abs(r-1) > 1e-9 {
			t.Errorf("%s %s depth %d: E[Z]/Z_H = %.15g, want 1", tc.spec, tc.kind, tc.depth, r)
		}
	}
	// The subset decomposition on the complete graph too (CollisionCurve
	// takes the class-count reduction there).
	g := engineGraph(t, "complete:5")
	var cfg collisionConfig
	z, err := randomEdgeCurve(context.Background(), 5, g.Edges, &HaarTransfer, []int{1000}, 1, &cfg)
	if err != nil {
		t.Fatal(err)
	}
	if v := z[0] / collisionHaarValue(5); math.Abs(v-1) > 1e-9 {
		t.Errorf("complete:5 by subsets, 1000 gates: E[Z]/Z_H = %.15g, want 1", v)
	}
}

// BenchmarkMomentEngine measures the Apply kernel on n = 20, 22, 24 qubits
// (26 and 28 with MIXDEPTH_BIG=1), on all cores. One op is one pair update,
// a pass over the 2^n coefficients; SetBytes uses the bandwidth model of
// 16·2^n bytes per update (each 8-byte coefficient read and written).
func BenchmarkMomentEngine(b *testing.B) {
	sizes := []int{20, 22, 24}
	if os.Getenv("MIXDEPTH_BIG") == "1" {
		sizes = append(sizes, 26, 28)
	}
	workers := runtime.GOMAXPROCS(0)
	for _, n := range sizes {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			e, err := NewEngine(n, workers)
			if err != nil {
				b.Skip(err)
			}
			for q := range n {
				e.Apply(q, (q+1)%n, &HaarTransfer) // touch every qubit
			}
			pairs := [][2]int{{0, 1}, {n / 2, n/2 + 1}, {n - 2, n - 1}, {1, n - 1}, {3, n / 2}}
			b.SetBytes(int64(16) << n)
			b.ReportAllocs()
			for i := 0; b.Loop(); i++ {
				p := pairs[i%len(pairs)]
				e.Apply(p[0], p[1], &HaarTransfer)
			}
			b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "pair-updates/s")
		})
	}
}

// BenchmarkCollisionRandomEdge measures the exact random-edge average on
// grid:3x4 (12 qubits, 17 edges), 100 gates per op, on all cores.
func BenchmarkCollisionRandomEdge(b *testing.B) {
	g := engineGraph(b, "grid:3x4")
	s := engineSchedule(b, "random-edge", g)
	for b.Loop() {
		if _, err := CollisionCurve(context.Background(), g, s, &HaarTransfer, []int{100}, runtime.GOMAXPROCS(0)); err != nil {
			b.Fatal(err)
		}
	}
}
