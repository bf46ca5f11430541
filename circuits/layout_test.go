package circuits

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

func TestReadLayoutValid(t *testing.T) {
	in := `{
  "qubits": 4,
  "layers": [
    [[0, 1], [2, 3]],
    [[1, 2]],
    [[3, 0], [1, 2]]
  ]
}`
	l, err := ReadLayout("ring.json", strings.NewReader(in))
	if err != nil {
		t.Fatal(err)
	}
	want := [][]Edge{{{0, 1}, {2, 3}}, {{1, 2}}, {{3, 0}, {1, 2}}}
	if l.Qubits != 4 || !reflect.DeepEqual(l.Layers, want) {
		t.Errorf("ReadLayout = %+v, want 4 qubits, layers %v", l, want)
	}
	// The union of the layers, in order of first appearance.
	g := l.Graph("ring.json")
	if g.Qubits != 4 || !reflect.DeepEqual(g.Edges, []Edge{{0, 1}, {2, 3}, {1, 2}, {3, 0}}) {
		t.Errorf("Layout.Graph = %+v", g)
	}
	if s := l.Schedule(); !reflect.DeepEqual(s.Classes, want) || s.GateCount(4) != 2+1+2+2 {
		t.Errorf("Layout.Schedule = %+v, GateCount(4) = %d", s, s.GateCount(4))
	}
	if err := l.Check("ring.json", mustGraph(t, "ring:4")); err != nil {
		t.Errorf("Check against ring:4: %v", err)
	}
}

func TestReadLayoutErrors(t *testing.T) {
	for _, tc := range []struct {
		name, in string
		want     error
		detail   string // a fragment the message must contain
	}{
		{"overlap", `{"qubits": 3, "layers": [[[0, 1], [1, 2]]]}`, ErrOverlap, "layer 0 gate 1"},
		{"overlap later layer", `{"qubits": 4, "layers": [[[0, 1], [2, 3]], [[1, 2], [2, 3]]]}`, ErrOverlap, "layer 1 gate 1"},
		{"out of range", `{"qubits": 3, "layers": [[[0, 1], [1, 3]]]}`, ErrQubitRange, "0..2"},
		{"negative id", `{"qubits": 3, "layers": [[[0, 1]], [[-1, 2]]]}`, ErrNegativeID, "layer 1 gate 0"},
		{"self-loop", `{"qubits": 3, "layers": [[[0, 1]], [[2, 2]]]}`, ErrSelfLoop, "layer 1"},
		{"empty layer", `{"qubits": 3, "layers": [[[0, 1]], []]}`, ErrLayoutSyntax, "layer 1 is empty"},
		{"no layers", `{"qubits": 3, "layers": []}`, ErrLayoutSyntax, "empty"},
		{"missing layers", `{"qubits": 3}`, ErrLayoutSyntax, "empty"},
		{"missing qubits", `{"layers": [[[0, 1]]]}`, ErrLayoutSyntax, `missing "qubits"`},
		{"one qubit", `{"qubits": 1, "layers": [[[0, 1]]]}`, ErrTooFewQubits, ""},
		{"three-qubit gate", `{"qubits": 3, "layers": [[[0, 1, 2]]]}`, ErrFieldCount, "3 qubits"},
		{"malformed JSON", `{"qubits": 3, "layers": [[[0, 1]]`, ErrLayoutSyntax, ""},
		{"syntax error", `{"qubits": 3, "layers": [[[0, 1]],]}`, ErrLayoutSyntax, "invalid JSON"},
		{"empty input", ``, ErrLayoutSyntax, ""},
		{"wrong type", `{"qubits": "3", "layers": [[[0, 1]]]}`, ErrLayoutSyntax, "qubits"},
		{"fractional id", `{"qubits": 2, "layers": [[[0, 1.5]]]}`, ErrLayoutSyntax, "wrong type"},
		{"unknown field", `{"qubits": 2, "layers": [[[0, 1]]], "depth": 4}`, ErrLayoutSyntax, "depth"},
		{"trailing data", `{"qubits": 2, "layers": [[[0, 1]]]} {"qubits": 3}`, ErrLayoutSyntax, "after the layout"},
		{"isolated qubit", `{"qubits": 4, "layers": [[[0, 1]], [[1, 2]]]}`, ErrIsolatedQubit, "qubit 3"},
		{"isolated huge count", `{"qubits": 4000000000000, "layers": [[[0, 1]]]}`, ErrIsolatedQubit, "qubit 2"},
		{"disconnected", `{"qubits": 4, "layers": [[[0, 1], [2, 3]]]}`, ErrDisconnected, "2 separate parts"},
	} {
		_, err := ReadLayout("lay.json", strings.NewReader(tc.in))
		wantParseError(t, tc.name, err, tc.want, 0)
		if err != nil && !strings.Contains(err.Error(), tc.detail) {
			t.Errorf("%s: error %q does not contain %q", tc.name, err, tc.detail)
		}
		// No flag accepts a layout in parts, so its message must not offer one.
		if err != nil && strings.Contains(err.Error(), "--allow-disconnected") {
			t.Errorf("%s: error %q offers --allow-disconnected, which a layout ignores", tc.name, err)
		}
		if err != nil && !strings.Contains(err.Error(), "lay.json") {
			t.Errorf("%s: error %q does not name the file", tc.name, err)
		}
	}
}

func TestLayoutCheck(t *testing.T) {
	l, err := ReadLayout("l", strings.NewReader(`{"qubits": 3, "layers": [[[0, 1]], [[2, 0]]]}`))
	if err != nil {
		t.Fatal(err)
	}
	if err := l.Check("l", mustGraph(t, "ring:3")); err != nil {
		t.Errorf("Check against ring:3: %v", err)
	}
	if err := l.Check("l", mustGraph(t, "complete:3")); err != nil {
		t.Errorf("Check against complete:3: %v", err)
	}
	err = l.Check("l", mustGraph(t, "line:3"))
	wantParseError(t, "edge not in graph", err, ErrNotInGraph, 0)
	if err != nil && !strings.Contains(err.Error(), "[2, 0]") {
		t.Errorf("error %q does not name the gate [2, 0]", err)
	}
	err = l.Check("l", mustGraph(t, "ring:4"))
	wantParseError(t, "qubit mismatch", err, ErrLayoutMismatch, 0)
}

func TestReadLayoutFile(t *testing.T) {
	path := filepath.Join(t.TempDir(), "lay.json")
	if err := os.WriteFile(path, []byte(`{"qubits": 2, "layers": [[[1, 0]]]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	l, err := ReadLayoutFile(path)
	if err != nil || l.Qubits != 2 || !reflect.DeepEqual(l.Layers, [][]Edge{{{1, 0}}}) {
		t.Errorf("ReadLayoutFile = %+v, %v", l, err)
	}
	if _, err := ReadLayoutFile(filepath.Join(t.TempDir(), "missing.json")); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: error %v, want one wrapping a not-exist error", err)
	}
}

// TestLayoutMatchesFamilySchedule: a layout file that spells out the layered
// classes of grid:3x3 (written by hand from the grid rule: horizontal c even, horizontal c odd,
// vertical r even, vertical r odd) drives the Builder
// to exactly the gates of the family's own layered schedule, same seed.
func TestLayoutMatchesFamilySchedule(t *testing.T) {
	in := `{"qubits": 9, "layers": [
		[[0, 1], [3, 4], [6, 7]],
		[[1, 2], [4, 5], [7, 8]],
		[[0, 3], [1, 4], [2, 5]],
		[[3, 6], [4, 7], [5, 8]]
	]}`
	l, err := ReadLayout("grid3x3.json", strings.NewReader(in))
	if err != nil {
		t.Fatal(err)
	}
	g := mustGraph(t, "grid:3x3")
	if err := l.Check("grid3x3.json", g); err != nil {
		t.Fatal(err)
	}
	family, err := NewSchedule("layered", g)
	if err != nil {
		t.Fatal(err)
	}
	for _, inst := range []int{0, 1, 17} {
		a := NewBuilder(l.Schedule(), Haar{}, 42, inst)
		b := NewBuilder(family, Haar{}, 42, inst)
		var ga, gb []Gate
		for range 10 {
			ga = a.Next(ga)
			gb = b.Next(gb)
		}
		if len(ga) != family.GateCount(10) {
			t.Fatalf("built %d gates, GateCount(10) = %d", len(ga), family.GateCount(10))
		}
		if !reflect.DeepEqual(ga, gb) {
			t.Errorf("instance %d: layout and family schedule give different gates", inst)
		}
	}
}

// FuzzReadLayout checks that ReadLayout never panics, that every failure is
// a *ParseError, and that an accepted layout yields a valid graph (Graph
// panics otherwise) which the layout passes Check against.
func FuzzReadLayout(f *testing.F) {
	for _, seed := range []string{
		`{"qubits": 2, "layers": [[[0, 1]]]}`,
		`{"qubits": 4, "layers": [[[0, 1], [2, 3]], [[1, 2]]]}`,
		`{"qubits": 3, "layers": [[[0, 1], [1, 2]]]}`,
		`{"qubits": 3, "layers": [[[0, 1]], []]}`,
		`{"qubits": 4000000000000, "layers": [[[0, 1]]]}`,
		`{"qubits": 2, "layers": [[[0, 1]]], "x": 1}`,
		`{"qubits": 2, "layers": [[[0, 1]]]} []`,
		`[]`, `null`, `{`, ``,
	} {
		f.Add([]byte(seed))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		l, err := ReadLayout("fuzz", bytes.NewReader(data))
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %q is not a *ParseError", err)
			}
			return
		}
		g := l.Graph("fuzz")
		if err := l.Check("fuzz", g); err != nil {
			t.Fatalf("layout fails Check against its own graph: %v", err)
		}
	})
}
