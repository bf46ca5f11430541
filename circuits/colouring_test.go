package circuits

import (
	"fmt"
	"math/rand/v2"
	"reflect"
	"testing"
)

// randomConnected returns a connected graph on n qubits: a random spanning
// tree plus every other pair with probability p, edges in shuffled order and
// orientation.
func randomConnected(t *testing.T, rng *rand.Rand, n int, p float64) *Graph {
	t.Helper()
	perm := rng.Perm(n)
	has := map[[2]int]bool{}
	var edges []Edge
	add := func(a, b int) {
		if a == b || has[key(Edge{a, b})] {
			return
		}
		has[key(Edge{a, b})] = true
		if rng.IntN(2) == 0 {
			a, b = b, a
		}
		edges = append(edges, Edge{a, b})
	}
	for i := 1; i < n; i++ {
		add(perm[i], perm[rng.IntN(i)])
	}
	for a := 0; a < n; a++ {
		for b := a + 1; b < n; b++ {
			if rng.Float64() < p {
				add(a, b)
			}
		}
	}
	rng.Shuffle(len(edges), func(i, j int) { edges[i], edges[j] = edges[j], edges[i] })
	g, err := NewGraph(fmt.Sprintf("random n=%d p=%g", n, p), n, edges)
	if err != nil {
		t.Fatalf("random graph: %v", err)
	}
	return g
}

// checkColouring fails unless classes is a proper edge colouring of g (no two
// edges of a class share a qubit), covering every edge exactly once, with at
// most Δ+1 colours (Vizing's theorem; the bound Misra and Gries, "A
// constructive proof of Vizing's theorem", IPL 41, 131, 1992, achieve), and
// with each class in the order of g.Edges.
func checkColouring(t *testing.T, g *Graph, classes [][]Edge) {
	t.Helper()
	checkClasses(t, g, classes)
	if delta := g.MaxDegree(); len(classes) > delta+1 {
		t.Errorf("%s: %d colours, more than Δ+1 = %d", g.Name, len(classes), delta+1)
	}
	pos := map[[2]int]int{}
	for i, e := range g.Edges {
		pos[key(e)] = i
	}
	for ci, cl := range classes {
		for j := 1; j < len(cl); j++ {
			if pos[key(cl[j-1])] >= pos[key(cl[j])] {
				t.Errorf("%s: class %d is not in the order of the edge list", g.Name, ci)
			}
		}
		for _, e := range cl {
			if i, ok := pos[key(e)]; ok && g.Edges[i] != e {
				t.Errorf("%s: class %d holds %v, but the graph lists %v", g.Name, ci, e, g.Edges[i])
			}
		}
	}
}

func TestEdgeColouringRandomGraphs(t *testing.T) {
	rng := rand.New(rand.NewPCG(1992, 131))
	graphs := 0
	for _, p := range []float64{0, 0.05, 0.2, 0.5, 0.9, 1} {
		for n := 2; n <= 24; n++ {
			for range 4 {
				g := randomConnected(t, rng, n, p)
				classes := EdgeColouring(g)
				checkColouring(t, g, classes)
				// Determinism: the same graph, rebuilt, colours the same way.
				h, err := NewGraph(g.Name, g.Qubits, append([]Edge(nil), g.Edges...))
				if err != nil {
					t.Fatal(err)
				}
				if again := EdgeColouring(h); !reflect.DeepEqual(again, classes) {
					t.Fatalf("%s: EdgeColouring is not deterministic", g.Name)
				}
				graphs++
			}
		}
	}
	if graphs < 500 {
		t.Fatalf("only %d graphs tested", graphs)
	}
}

func TestEdgeColouringFamilies(t *testing.T) {
	for n := 2; n <= 14; n++ {
		// K_n with n odd has chromatic index n = Δ+1: a colour class holds at
		// most (n−1)/2 of the n(n−1)/2 edges (common practice).
		g := mustGraph(t, fmt.Sprintf("complete:%d", n))
		classes := EdgeColouring(g)
		checkColouring(t, g, classes)
		if n%2 == 1 && len(classes) != n {
			t.Errorf("complete:%d: %d colours, want %d", n, len(classes), n)
		}
		// A star needs exactly Δ = N−1 colours: all edges share the centre
		// (common practice).
		g = mustGraph(t, fmt.Sprintf("star:%d", n))
		classes = EdgeColouring(g)
		checkColouring(t, g, classes)
		if len(classes) != n-1 {
			t.Errorf("star:%d: %d colours, want Δ = %d", n, len(classes), n-1)
		}
		// The layered schedule of these families is their colouring.
		if got := LayeredClasses(g); !reflect.DeepEqual(got, classes) {
			t.Errorf("star:%d: LayeredClasses differs from EdgeColouring", n)
		}
	}
	// The Petersen graph is cubic with chromatic index 4 (common practice).
	var petersen []Edge
	for i := range 5 {
		petersen = append(petersen, Edge{i, (i + 1) % 5}, Edge{i, i + 5}, Edge{5 + i, 5 + (i+2)%5})
	}
	g, err := NewGraph("petersen", 10, petersen)
	if err != nil {
		t.Fatal(err)
	}
	classes := EdgeColouring(g)
	checkColouring(t, g, classes)
	if len(classes) != 4 {
		t.Errorf("Petersen graph: %d colours, want 4", len(classes))
	}
}
