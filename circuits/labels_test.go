package circuits

import (
	"bytes"
	"errors"
	"reflect"
	"strings"
	"testing"
)

// labelled is a 2×3 grid with lab names, in grid:2x3's edge order, so that
// its numbering by first appearance is grid:2x3's.
const labelled = "A0 A1\nA1 A2\nB0 B1\nB1 B2\nA0 B0\nA1 B1\nA2 B2\n"

func labelledGraph(t testing.TB) *Graph {
	t.Helper()
	g, err := ReadEdgeList("chip", strings.NewReader(labelled))
	if err != nil {
		t.Fatal(err)
	}
	return g
}

func TestLabelledEdgeList(t *testing.T) {
	g := labelledGraph(t)
	grid := mustGraph(t, "grid:2x3")
	// First appearance: A0 A1 A2 B0 B1 B2 = grid qubits 0..5.
	if !reflect.DeepEqual(g.Labels, []string{"A0", "A1", "A2", "B0", "B1", "B2"}) || !reflect.DeepEqual(g.Edges, grid.Edges) {
		t.Errorf("labels %v, edges %v", g.Labels, g.Edges)
	}
	if g.Label(4) != "B1" || g.EdgeLabel(Edge{1, 4}) != "A1-B1" || grid.Label(4) != "4" {
		t.Errorf("Label: %q %q %q", g.Label(4), g.EdgeLabel(Edge{1, 4}), grid.Label(4))
	}
	if g.Digest() == grid.Digest() {
		t.Error("the labels do not enter the digest")
	}
	// Isolated qubits are declared on a line of their own and accepted only
	// with AllowDisconnected; the chip's qubit count is then 7.
	in := labelled + "C9\n"
	if _, err := ReadEdgeList("chip", strings.NewReader(in)); !errors.Is(err, ErrIsolatedQubit) {
		t.Errorf("declared isolated qubit: %v", err)
	}
	p, err := ReadEdgeListWith("chip", strings.NewReader(in), ReadOptions{AllowDisconnected: true})
	if err != nil || p.Qubits != 7 || len(p.Components()) != 2 || p.Label(6) != "C9" {
		t.Errorf("AllowDisconnected: %+v, %v", p, err)
	}
}

// TestLayoutLabels: a layout may name qubits by label once the graph is
// known, and then equals the numeric layout.
func TestLayoutLabels(t *testing.T) {
	g := labelledGraph(t)
	byLabel, err := ReadLayoutFor("l.json", strings.NewReader(`{"layers": [[["A0", "A1"], ["B1", "B2"]], [["A1", "A2"], [3, 4]], [["A0","B0"],["A1","B1"],["A2","B2"]]]}`), g)
	if err != nil {
		t.Fatal(err)
	}
	byNumber, err := ReadLayoutFor("l.json", strings.NewReader(`{"qubits": 6, "layers": [[[0, 1], [4, 5]], [[1, 2], [3, 4]], [[0,3],[1,4],[2,5]]]}`), g)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(byLabel, byNumber) {
		t.Errorf("labelled layout %v, numeric %v", byLabel.Layers, byNumber.Layers)
	}
	for _, tc := range []struct {
		in   string
		want error
	}{
		{`{"layers": [[["A0", "QQ"]]]}`, ErrUnknownLabel},
		{`{"qubits": 7, "layers": [[["A0", "A1"]]]}`, ErrLayoutMismatch},
		{`{"layers": [[["A0", "B1"]], [["A0","A1"],["B1","B2"]], [["A1","A2"],["B0","B1"]], [["A0","B0"],["A1","B1"],["A2","B2"]]]}`, ErrNotInGraph},
		{`{"layers": [[["A0", "A1"], ["A1", "A2"]]]}`, ErrOverlap},
		{`{"layers": [[["A0"]]]}`, ErrFieldCount},
	} {
		_, err := ReadLayoutFor("l.json", strings.NewReader(tc.in), g)
		if !errors.Is(err, tc.want) {
			t.Errorf("%s: %v, want %v", tc.in, err, tc.want)
		}
	}
}

// TestDrop checks drops worked by hand on the labelled 2×3 grid.
func TestDrop(t *testing.T) {
	g := labelledGraph(t)
	d, err := Drop(g, "B1", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	h := d.Graph
	// Without B1 (and its couplers A1-B1, B0-B1, B1-B2) the path
	// B0-A0-A1-A2-B2 remains; qubits A0 A1 A2 B0 B2 renumbered 0..4.
	wantEdges := []Edge{{0, 1}, {1, 2}, {0, 3}, {2, 4}}
	if !reflect.DeepEqual(h.Labels, []string{"A0", "A1", "A2", "B0", "B2"}) || !reflect.DeepEqual(h.Edges, wantEdges) ||
		!reflect.DeepEqual(h.Dropped, []string{"B1"}) || !reflect.DeepEqual(d.New, []int{0, 1, 2, 3, -1, 4}) {
		t.Errorf("drop: labels %v edges %v dropped %v new %v", h.Labels, h.Edges, h.Dropped, d.New)
	}
	// Couplers only: the qubits stay, numbered as before.
	d, err = Drop(g, "A0-A1, B1-B2", ReadOptions{})
	if err != nil || d.Graph.Qubits != 6 || len(d.Graph.Edges) != 5 || d.Graph.HasEdge(0, 1) || d.Graph.HasEdge(4, 5) {
		t.Errorf("coupler drop: %+v, %v", d, err)
	}
	// The grid rule survives a drop (minus the dropped couplers).
	gd, err := Drop(mustGraph(t, "grid:3x3"), "4-5", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want := [][]Edge{{{0, 1}, {3, 4}, {6, 7}}, {{1, 2}, {7, 8}}, {{0, 3}, {1, 4}, {2, 5}}, {{3, 6}, {4, 7}, {5, 8}}}
	if got := LayeredClasses(gd.Graph); !reflect.DeepEqual(got, want) {
		t.Errorf("grid:3x3 without 4-5: classes %v, want %v", got, want)
	}
	for _, tc := range []struct {
		list string
		want error
	}{
		{"Z9", ErrUnknownLabel},
		{"A0,A0", ErrDuplicateLabel},
		{"A0-A1,A1-A0", ErrDuplicateLabel},
		{"A0-B1", ErrNotInGraph},
		{"A0,A1,A2,B0,B1", ErrDropAll},
		{"A1-B1,B0-B1,B1-B2", ErrIsolatedQubit},
		{"A1-A2,B1-B2", ErrDisconnected}, // A2-B2 is cut off
		{"", ErrUnknownLabel},
	} {
		if _, err := Drop(g, tc.list, ReadOptions{}); !errors.Is(err, tc.want) {
			t.Errorf("Drop(%q): %v, want %v", tc.list, err, tc.want)
		}
	}
}

// FuzzDrop checks that Drop never panics on any list, that failures are
// *ParseError values, and that a result is a valid graph keeping the labels
// of the qubits it keeps.
func FuzzDrop(f *testing.F) {
	for _, seed := range []string{"B1", "A0-A1", "B1,A0-A1", "A0,A0", "", ",", "-", "A0-", "A0-A1-A2", "Z", "A0,A1,A2,B0,B1,B2"} {
		f.Add(seed)
	}
	g, err := ReadEdgeList("chip", strings.NewReader(labelled))
	if err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, list string) {
		d, err := Drop(g, list, ReadOptions{})
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %q is not a *ParseError", err)
			}
			return
		}
		if _, err := NewGraph("check", d.Graph.Qubits, d.Graph.Edges); err != nil {
			t.Fatalf("Drop(%q) left an invalid graph: %v", list, err)
		}
		for q, n := range d.New {
			if n >= 0 && d.Graph.Labels[n] != g.Labels[q] {
				t.Fatalf("Drop(%q) relabelled qubit %s as %s", list, g.Labels[q], d.Graph.Labels[n])
			}
		}
		checkClasses(t, d.Graph, LayeredClasses(d.Graph))
	})
}

// FuzzReadLayoutFor checks that ReadLayoutFor never panics, that failures
// are *ParseError values, and that an accepted layout passes Check.
func FuzzReadLayoutFor(f *testing.F) {
	for _, seed := range []string{
		`{"layers": [[["A0", "A1"]]]}`,
		`{"qubits": 6, "layers": [[[0, 1], ["B1", "B2"]]]}`,
		`{"layers": [[["A0", "QQ"]]]}`,
		`{"layers": [[[0.5, 1]]]}`,
		`{"layers": [[[true, 1]]]}`,
		`{"layers": []}`, `{"layers": [[]]}`, `[]`, `{`,
	} {
		f.Add([]byte(seed))
	}
	g, err := ReadEdgeList("chip", strings.NewReader(labelled))
	if err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		l, err := ReadLayoutFor("fuzz", bytes.NewReader(data), g)
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %q is not a *ParseError", err)
			}
			return
		}
		if err := l.Check("fuzz", g); err != nil {
			t.Fatalf("accepted layout fails Check: %v", err)
		}
	})
}
