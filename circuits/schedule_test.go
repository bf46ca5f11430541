package circuits

import (
	"math"
	"math/rand/v2"
	"reflect"
	"testing"
)

func mustGraph(t *testing.T, spec string) *Graph {
	t.Helper()
	g, err := ParseGraph(spec)
	if err != nil {
		t.Fatalf("ParseGraph(%q): %v", spec, err)
	}
	return g
}

// TestLayeredClassesConventions checks LayeredClasses against the class
// conventions documented in the README (line: i even then odd; ring: the
// closing edge in class B, or its own class C for odd N; grid: horizontal c
// even, horizontal c odd, vertical r even, vertical r odd), with every expected class written out by hand
// (qubit (r, c) of grid:RxC has id r·C + c).
func TestLayeredClassesConventions(t *testing.T) {
	for _, tc := range []struct {
		spec string
		want [][]Edge
	}{
		{"line:2", [][]Edge{{{0, 1}}}},
		{"line:5", [][]Edge{
			{{0, 1}, {2, 3}},
			{{1, 2}, {3, 4}},
		}},
		{"line:6", [][]Edge{
			{{0, 1}, {2, 3}, {4, 5}},
			{{1, 2}, {3, 4}},
		}},
		// Odd ring: the closing edge (N−1, 0) forms class C on its own.
		{"ring:3", [][]Edge{{{0, 1}}, {{1, 2}}, {{2, 0}}}},
		{"ring:5", [][]Edge{
			{{0, 1}, {2, 3}},
			{{1, 2}, {3, 4}},
			{{4, 0}},
		}},
		// Even ring: the closing edge joins class B.
		{"ring:4", [][]Edge{
			{{0, 1}, {2, 3}},
			{{1, 2}, {3, 0}},
		}},
		{"ring:6", [][]Edge{
			{{0, 1}, {2, 3}, {4, 5}},
			{{1, 2}, {3, 4}, {5, 0}},
		}},
		// grid:1x4 has no vertical edges: both vertical classes are dropped.
		{"grid:1x4", [][]Edge{
			{{0, 1}, {2, 3}},
			{{1, 2}},
		}},
		// grid:4x1 has no horizontal edges.
		{"grid:4x1", [][]Edge{
			{{0, 1}, {2, 3}},
			{{1, 2}},
		}},
		// grid:2x3: 0 1 2 / 3 4 5; no vertical edge with r odd.
		{"grid:2x3", [][]Edge{
			{{0, 1}, {3, 4}},
			{{1, 2}, {4, 5}},
			{{0, 3}, {1, 4}, {2, 5}},
		}},
		// grid:3x3: 0 1 2 / 3 4 5 / 6 7 8.
		{"grid:3x3", [][]Edge{
			{{0, 1}, {3, 4}, {6, 7}},
			{{1, 2}, {4, 5}, {7, 8}},
			{{0, 3}, {1, 4}, {2, 5}},
			{{3, 6}, {4, 7}, {5, 8}},
		}},
		// grid:3x4: 0 1 2 3 / 4 5 6 7 / 8 9 10 11.
		{"grid:3x4", [][]Edge{
			{{0, 1}, {2, 3}, {4, 5}, {6, 7}, {8, 9}, {10, 11}},
			{{1, 2}, {5, 6}, {9, 10}},
			{{0, 4}, {1, 5}, {2, 6}, {3, 7}},
			{{4, 8}, {5, 9}, {6, 10}, {7, 11}},
		}},
	} {
		got := LayeredClasses(mustGraph(t, tc.spec))
		if !reflect.DeepEqual(got, tc.want) {
			t.Errorf("LayeredClasses(%s) =\n  %v\nwant\n  %v", tc.spec, got, tc.want)
		}
	}
}

// checkClasses fails unless classes is a partition of g's edges into classes
// of disjoint edges (the definition of a layered schedule).
func checkClasses(t *testing.T, g *Graph, classes [][]Edge) {
	t.Helper()
	count := map[[2]int]int{}
	for ci, cl := range classes {
		if len(cl) == 0 {
			t.Errorf("%s: class %d is empty", g.Name, ci)
		}
		used := map[int]bool{}
		for _, e := range cl {
			if used[e.A] || used[e.B] {
				t.Errorf("%s: class %d reuses a qubit of edge %v", g.Name, ci, e)
			}
			used[e.A], used[e.B] = true, true
			count[key(e)]++
		}
	}
	for _, e := range g.Edges {
		if c := count[key(e)]; c != 1 {
			t.Errorf("%s: edge %v is in %d classes, want 1", g.Name, e, c)
		}
		delete(count, key(e))
	}
	for k := range count {
		t.Errorf("%s: classes hold %v, which is not an edge of the graph", g.Name, k)
	}
}

func TestLayeredClassesPartition(t *testing.T) {
	for _, spec := range []string{
		"line:2", "line:7", "line:12", "ring:3", "ring:7", "ring:10",
		"grid:1x2", "grid:2x1", "grid:4x5", "grid:5x4", "grid:6x6",
		"complete:2", "complete:6", "complete:9", "star:2", "star:8",
	} {
		g := mustGraph(t, spec)
		checkClasses(t, g, LayeredClasses(g))
	}
}

// TestGateCount compares GateCount with a direct count of the edges that
// Step returns over the first depth steps.
func TestGateCount(t *testing.T) {
	for _, spec := range []string{"line:5", "ring:5", "ring:6", "grid:3x4", "grid:1x4", "complete:5", "star:6"} {
		g := mustGraph(t, spec)
		for _, kind := range Schedules {
			s, err := NewSchedule(kind, g)
			if err != nil {
				t.Fatal(err)
			}
			if s.Kind() != kind {
				t.Errorf("NewSchedule(%q).Kind() = %q", kind, s.Kind())
			}
			rng := rand.New(rand.NewPCG(3, 4))
			var dst []Edge
			count := 0
			for depth := 0; depth <= 40; depth++ {
				if got := s.GateCount(depth); got != count {
					t.Errorf("%s %s: GateCount(%d) = %d, Step gives %d", spec, kind, depth, got, count)
				}
				dst = s.Step(depth, rng, dst[:0])
				count += len(dst)
			}
		}
	}
}

// TestLayeredStepCycles checks that step t applies class t mod C.
func TestLayeredStepCycles(t *testing.T) {
	g := mustGraph(t, "ring:5")
	l := &Layered{Classes: LayeredClasses(g)}
	for step := range 10 {
		got := l.Step(step, nil, nil)
		if want := l.Classes[step%3]; !reflect.DeepEqual(got, want) {
			t.Errorf("Step(%d) = %v, want class %d %v", step, got, step%3, want)
		}
	}
}

// TestRandomEdgeUniform checks that RandomEdge draws each edge with
// probability 1/|E|: each count is Binomial(N, 1/|E|), checked to 4 standard
// deviations sqrt(N·p(1−p)) (fixed seed).
func TestRandomEdgeUniform(t *testing.T) {
	g := mustGraph(t, "grid:2x3")
	r := &RandomEdge{Edges: g.Edges}
	rng := rand.New(rand.NewPCG(5, 6))
	const N = 70000
	counts := map[Edge]int{}
	var dst []Edge
	for step := range N {
		dst = r.Step(step, rng, dst[:0])
		if len(dst) != 1 {
			t.Fatalf("Step returned %d edges, want 1", len(dst))
		}
		counts[dst[0]]++
	}
	p := 1 / float64(len(g.Edges))
	sd := math.Sqrt(N * p * (1 - p))
	for _, e := range g.Edges {
		if d := float64(counts[e]) - N*p; d > 4*sd || d < -4*sd {
			t.Errorf("edge %v drawn %d times, want %.0f ± %.0f", e, counts[e], N*p, 4*sd)
		}
	}
	if len(counts) != len(g.Edges) {
		t.Errorf("drew %d distinct edges, want %d", len(counts), len(g.Edges))
	}
}

func TestNewScheduleUnknown(t *testing.T) {
	if _, err := NewSchedule("brick", mustGraph(t, "line:3")); err == nil {
		t.Error("NewSchedule(\"brick\") returned no error")
	}
}
