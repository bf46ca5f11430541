package circuits

import (
	"errors"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"
)

// degreeCount returns how many qubits have each degree.
func degreeCount(g *Graph) map[int]int {
	m := map[int]int{}
	for _, d := range g.Degrees() {
		m[d]++
	}
	return m
}

// TestLatticeFamilySizes checks qubit and coupler counts and degrees against
// counts worked by hand from the lattice pictures (common practice): a
// honeycomb patch of R×C cells in brick-wall form has 2(R+1)(C+1)−2 vertices
// and, by Euler's formula V − E + F = 1 with F = RC cells, V + RC − 1 edges;
// the triangular lattice has interior degree 6, the diagonal (rotated
// square) lattice interior degree 4, the torus degree 4 everywhere.
func TestLatticeFamilySizes(t *testing.T) {
	for _, tc := range []struct {
		spec          string
		qubits, edges int
		degrees       map[int]int // degree → number of qubits
	}{
		{"honeycomb:1x1", 6, 6, map[int]int{2: 6}},
		// Two cells side by side share a rung: 10 vertices, two of degree 3.
		{"honeycomb:1x2", 10, 11, map[int]int{2: 8, 3: 2}},
		{"honeycomb:2x2", 16, 19, nil},
		{"honeycomb:3x4", 2*4*5 - 2, 2*4*5 - 2 + 12 - 1, nil},
		// 3×3 triangular: 6 horizontal, 6 vertical, 4 diagonal; the centre has degree 6.
		{"triangular:3x3", 9, 16, map[int]int{2: 2, 3: 2, 4: 4, 6: 1}},
		{"triangular:1x2", 2, 1, nil},
		// 3×3 diagonal: rows of 3, each row pair joined by 2·3−1 couplers.
		{"diagonal:3x3", 9, 10, nil},
		{"diagonal:4x4", 16, 21, nil},
		{"torus:3x3", 9, 18, map[int]int{4: 9}},
		{"torus:4x5", 20, 40, map[int]int{4: 20}},
		{"btree:1", 3, 2, map[int]int{1: 2, 2: 1}},
		{"btree:3", 15, 14, map[int]int{1: 8, 2: 1, 3: 6}},
	} {
		g := mustGraph(t, tc.spec)
		if g.Qubits != tc.qubits || len(g.Edges) != tc.edges {
			t.Errorf("%s: %d qubits, %d couplers; want %d, %d", tc.spec, g.Qubits, len(g.Edges), tc.qubits, tc.edges)
		}
		if tc.degrees != nil && !reflect.DeepEqual(degreeCount(g), tc.degrees) {
			t.Errorf("%s: degrees %v, want %v", tc.spec, degreeCount(g), tc.degrees)
		}
		if len(g.Coords) != g.Qubits {
			t.Errorf("%s: %d coordinates for %d qubits", tc.spec, len(g.Coords), g.Qubits)
		}
		checkClasses(t, g, LayeredClasses(g))
	}
	// Interior degrees of larger patches.
	g := mustGraph(t, "triangular:5x5")
	if d := g.Degrees()[2*5+2]; d != 6 {
		t.Errorf("triangular:5x5: interior qubit (2, 2) has degree %d, want 6", d)
	}
	g = mustGraph(t, "diagonal:5x5")
	if d := g.Degrees()[2*5+2]; d != 4 {
		t.Errorf("diagonal:5x5: interior qubit (2, 2) has degree %d, want 4", d)
	}
	if g.MaxDegree() != 4 {
		t.Errorf("diagonal:5x5: maximum degree %d, want 4", g.MaxDegree())
	}
	// A honeycomb's vertices have degree 2 or 3, and its interior ones 3.
	g = mustGraph(t, "honeycomb:4x4")
	if g.MaxDegree() != 3 || g.MinDegree() != 2 {
		t.Errorf("honeycomb:4x4: degrees %d..%d, want 2..3", g.MinDegree(), g.MaxDegree())
	}
}

// TestLatticeFamilyClasses checks the family class rules written by hand for
// small sizes (the rules of the README's conventions).
func TestLatticeFamilyClasses(t *testing.T) {
	for _, tc := range []struct {
		spec    string
		classes [][]Edge
	}{
		// One cell: row 0 holds qubits 0 1 2 and row 1 qubits 3 4 5 (columns
		// j = 0..2; the corners j = 3 dropped); rungs at j = 0 and 2.
		{"honeycomb:1x1", [][]Edge{{{0, 1}, {3, 4}}, {{1, 2}, {4, 5}}, {{0, 3}, {2, 5}}}},
		{"triangular:2x2", [][]Edge{{{0, 1}, {2, 3}}, {{0, 2}, {1, 3}}, {{0, 3}}}},
		// 2 rows of 2: (0,0)=0 down-right to 2; (0,1)=1 down-left to 2, down-right to 3.
		{"diagonal:2x2", [][]Edge{{{0, 2}, {1, 3}}, {{1, 2}}}},
		{"torus:3x3", [][]Edge{
			{{0, 1}, {3, 4}, {6, 7}}, {{1, 2}, {4, 5}, {7, 8}}, {{2, 0}, {5, 3}, {8, 6}},
			{{0, 3}, {1, 4}, {2, 5}}, {{3, 6}, {4, 7}, {5, 8}}, {{6, 0}, {7, 1}, {8, 2}}}},
		// Qubit 1's parent edge is in class 0, so its children 3, 4 take 1, 2;
		// qubit 2's is in class 1, so 5, 6 take 0, 2.
		{"btree:2", [][]Edge{{{0, 1}, {2, 5}}, {{0, 2}, {1, 3}}, {{1, 4}, {2, 6}}}},
		// subdivide:line:3: qubits 0 1 2, then 3 on 0-1 and 4 on 1-2; line
		// classes {0-1}, {1-2} each split into their two halves.
		{"subdivide:line:3", [][]Edge{{{0, 3}}, {{3, 1}}, {{1, 4}}, {{4, 2}}}},
	} {
		g := mustGraph(t, tc.spec)
		if got := LayeredClasses(g); !reflect.DeepEqual(got, tc.classes) {
			t.Errorf("%s: classes %v, want %v", tc.spec, got, tc.classes)
		}
	}
}

// TestSubdivideSizes checks |V|+|E| qubits and 2|E| couplers (the definition
// of a subdivision).
func TestSubdivideSizes(t *testing.T) {
	for _, base := range []string{"grid:3x4", "complete:5", "honeycomb:2x2", "tree:9,4"} {
		b := mustGraph(t, base)
		g := mustGraph(t, "subdivide:"+base)
		if g.Qubits != b.Qubits+len(b.Edges) || len(g.Edges) != 2*len(b.Edges) {
			t.Errorf("subdivide:%s: %d qubits, %d couplers; want %d, %d", base, g.Qubits, len(g.Edges), b.Qubits+len(b.Edges), 2*len(b.Edges))
		}
		for q := b.Qubits; q < g.Qubits; q++ {
			if g.Degrees()[q] != 2 {
				t.Errorf("subdivide:%s: coupler qubit %d has degree %d", base, q, g.Degrees()[q])
			}
		}
		checkClasses(t, g, LayeredClasses(g))
	}
}

// TestRandomFamilies checks the defining properties: regular graphs have
// every degree K, trees N−1 edges, all are connected, and a spec names one
// graph (same seed, same edges; another seed, another graph).
func TestRandomFamilies(t *testing.T) {
	for _, spec := range []string{"regular:10,3", "regular:16,4,7", "regular:12,2,3", "regular:30,5,2", "regular:8,7"} {
		g := mustGraph(t, spec)
		k := g.Degrees()[0]
		if g.MinDegree() != k || g.MaxDegree() != k || !strings.Contains(spec, ","+itoa(k)) {
			t.Errorf("%s: degrees %d..%d", spec, g.MinDegree(), g.MaxDegree())
		}
		if len(g.Components()) != 1 {
			t.Errorf("%s: not connected", spec)
		}
	}
	for _, spec := range []string{"tree:2", "tree:3,9", "tree:50,2", "tree:200,5"} {
		g := mustGraph(t, spec)
		if len(g.Edges) != g.Qubits-1 || len(g.Components()) != 1 {
			t.Errorf("%s: %d edges on %d qubits, %d parts", spec, len(g.Edges), g.Qubits, len(g.Components()))
		}
	}
	for _, spec := range []string{"gnp:20,0.3,5", "gnp:12,1", "gnp:40,0.1"} {
		g := mustGraph(t, spec)
		if len(g.Components()) != 1 {
			t.Errorf("%s: not connected", spec)
		}
	}
	if g := mustGraph(t, "gnp:6,1"); len(g.Edges) != 15 {
		t.Errorf("gnp:6,1 has %d edges, want all 15", len(g.Edges))
	}
	a, b, c := mustGraph(t, "regular:20,3,4"), mustGraph(t, "regular:20,3,4"), mustGraph(t, "regular:20,3,5")
	if !reflect.DeepEqual(a.Edges, b.Edges) || reflect.DeepEqual(a.Edges, c.Edges) {
		t.Error("regular:20,3,SEED does not follow the seed")
	}
	if d := mustGraph(t, "regular:20,3"); d.Name != "regular:20,3,1" {
		t.Errorf("the default seed is not shown in the name: %q", d.Name)
	}
}

func itoa(k int) string { return string(rune('0' + k)) }

// TestPruferTree decodes the worked example of the Prüfer correspondence
// (Prüfer 1918; the example of the tree with sequence 4 4 4 5 on labels 1..6,
// as in the usual textbook treatment, e.g. J. H. van Lint and R. M. Wilson,
// A Course in Combinatorics, 2nd ed., 2001, ch. 2), relabelled 0..5: the
// leaves 0, 1, 2 join 3 in turn, then 3 becomes a leaf and joins 4, and the
// last two qubits 4 and 5 are joined.
func TestPruferTree(t *testing.T) {
	got := PruferTree([]int{3, 3, 3, 4})
	want := []Edge{{0, 3}, {1, 3}, {2, 3}, {3, 4}, {4, 5}}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("PruferTree(3 3 3 4) = %v, want %v", got, want)
	}
	// A second hand-worked case: the path 0-2-3-1 has sequence 2 3 (remove
	// leaf 0, write 2; remove leaf 1, write 3); decoding joins 0-2, 1-3, 2-3.
	if got := PruferTree([]int{2, 3}); !reflect.DeepEqual(got, []Edge{{0, 2}, {1, 3}, {2, 3}}) {
		t.Errorf("PruferTree(2 3) = %v", got)
	}
	// Every sequence decodes to a tree: n−1 edges, connected (Cayley's
	// count n^(n−2) then follows from the bijection).
	rng := rand.New(rand.NewPCG(1918, 1))
	for range 200 {
		n := 2 + rng.IntN(30)
		seq := make([]int, n-2)
		for i := range seq {
			seq[i] = rng.IntN(n)
		}
		if e := PruferTree(seq); len(e) != n-1 || !connected(n, e) {
			t.Fatalf("PruferTree(%v) = %v is not a tree", seq, e)
		}
	}
}

func TestFamilyRangeErrors(t *testing.T) {
	for _, tc := range []struct {
		spec, mention string
	}{
		{"honeycomb:0x3", "1 ≤ R, C ≤ 1024"},
		{"honeycomb:3", "RxC"},
		{"torus:2x5", "3 ≤ R, C"},
		{"diagonal:1x5", "2 ≤ R"},
		{"triangular:1x1", "at least 2 qubits"},
		{"regular:5,3", "N·K even"},
		{"regular:5,5", "1 to N−1 = 4"},
		{"regular:1,1", "from 2 to 4096"},
		{"regular:10", "regular:N,K[,SEED]"},
		{"regular:10,3,-1", "SEED"},
		{"gnp:10,0", "(0, 1]"},
		{"gnp:10,1.5", "(0, 1]"},
		{"gnp:5000,0.5", "from 2 to 1024"},
		{"tree:1", "from 2"},
		{"tree:5,1,2", "tree:N[,SEED]"},
		{"btree:0", "from 1 to 19"},
		{"btree:20", "from 1 to 19"},
		{"subdivide:line:1", "N ≥ 2"},
	} {
		_, err := ParseGraph(tc.spec)
		if !errors.Is(err, ErrBadSize) || !strings.Contains(err.Error(), tc.mention) {
			t.Errorf("%s: error %v, want ErrBadSize mentioning %q", tc.spec, err, tc.mention)
		}
	}
	// A random family that cannot be made connected: perfect matchings
	// (K = 1) on more than 2 qubits, sparse G(N, P).
	for _, spec := range []string{"regular:6,1", "gnp:30,0.01"} {
		if _, err := ParseGraph(spec); !errors.Is(err, ErrDisconnected) || !strings.Contains(err.Error(), "draws") {
			t.Errorf("%s: error %v, want ErrDisconnected after bounded draws", spec, err)
		}
	}
}

func TestBalanceClasses(t *testing.T) {
	// The imbalance of the issue: classes of 9, 11, 8 and 1 on a chip can be
	// evened out; here a random graph's colouring is balanced and stays
	// proper (McDiarmid 1972: sizes may differ by at most one).
	rng := rand.New(rand.NewPCG(1972, 23))
	for range 60 {
		g := randomConnected(t, rng, 4+rng.IntN(20), rng.Float64()*0.5)
		classes := BalanceClasses(g, EdgeColouring(g))
		checkColouring(t, g, classes)
		lo, hi := len(g.Edges), 0
		for _, cl := range classes {
			lo, hi = min(lo, len(cl)), max(hi, len(cl))
		}
		if hi-lo > 1 {
			t.Fatalf("%s: class sizes range %d..%d after balancing", g.Name, lo, hi)
		}
	}
	// By hand: a path 0-1-2-3-4 coloured {0-1, 2-3, 3-4?}: classes {0-1,2-3},
	// {1-2}, {3-4} are proper; sizes 2,1,1 differ by one, unchanged.
	path := mustGraph(t, "line:6")
	in := [][]Edge{{{0, 1}, {2, 3}}, {{1, 2}}, {{3, 4}}}
	if got := BalanceClasses(path, in); !reflect.DeepEqual(got, [][]Edge{{{0, 1}, {2, 3}}, {{1, 2}}, {{3, 4}}}) {
		t.Errorf("balanced classes changed: %v", got)
	}
	// {0-1, 2-3, 4-5} and {} over the path 0..5 with 1-2, 3-4 in a third
	// class: one edge moves into the empty class.
	in = [][]Edge{{{0, 1}, {2, 3}, {4, 5}}, {{1, 2}, {3, 4}}, {}}
	got := BalanceClasses(path, in)
	if len(got[0]) != 2 || len(got[2]) != 1 {
		t.Errorf("BalanceClasses: sizes %d %d %d, want 2 2 1", len(got[0]), len(got[1]), len(got[2]))
	}
}
