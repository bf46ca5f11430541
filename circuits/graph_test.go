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

func TestReadEdgeListValid(t *testing.T) {
	for _, tc := range []struct {
		name, in string
		qubits   int
		edges    []Edge
	}{
		{"plain", "0 1\n1 2\n", 3, []Edge{{0, 1}, {1, 2}}},
		{"comments and blanks",
			"# a chip\n\n0 1   # first coupler\n\t1 2\n   \n# end\n2 0", 3,
			[]Edge{{0, 1}, {1, 2}, {2, 0}}},
		{"CRLF line ends", "1 0\r\n2 1\r\n", 3, []Edge{{1, 0}, {2, 1}}},
		{"orientation kept", "3 2\n0 3\n1 0\n", 4, []Edge{{3, 2}, {0, 3}, {1, 0}}},
		{"comment glued to ids", "0 1#x\n", 2, []Edge{{0, 1}}},
	} {
		g, err := ReadEdgeList("test.edges", strings.NewReader(tc.in))
		if err != nil {
			t.Errorf("%s: %v", tc.name, err)
			continue
		}
		if g.Qubits != tc.qubits || !reflect.DeepEqual(g.Edges, tc.edges) || g.Name != "test.edges" || g.Family != "" {
			t.Errorf("%s: got %+v, want %d qubits and edges %v", tc.name, g, tc.qubits, tc.edges)
		}
	}
}

// wantParseError fails unless err is a *ParseError at line with sentinel
// want in its chain.
func wantParseError(t *testing.T, label string, err error, want error, line int) {
	t.Helper()
	if err == nil {
		t.Errorf("%s: no error, want %v", label, want)
		return
	}
	var pe *ParseError
	if !errors.As(err, &pe) {
		t.Errorf("%s: error %q (%T) is not a *ParseError", label, err, err)
		return
	}
	if !errors.Is(err, want) {
		t.Errorf("%s: error %q does not wrap %q", label, err, want)
	}
	if pe.Line != line {
		t.Errorf("%s: error %q has line %d, want %d", label, err, pe.Line, line)
	}
	if !strings.HasPrefix(err.Error(), "circuits: ") {
		t.Errorf("%s: error %q lacks the package prefix", label, err)
	}
}

func TestReadEdgeListErrors(t *testing.T) {
	for _, tc := range []struct {
		name, in string
		want     error
		line     int // 0: the error concerns the whole file
	}{
		{"self-loop", "0 1\n1 1\n", ErrSelfLoop, 2},
		{"duplicate", "0 1\n1 2\n0 1\n", ErrDuplicateEdge, 3},
		{"duplicate reversed", "0 1\n1 0\n", ErrDuplicateEdge, 2},
		{"line counts comments and blanks", "# header\n\n0 1\n# note\n1 0\n", ErrDuplicateEdge, 5},
		{"bad character", "0 1\n1 x/y\n", ErrBadLabel, 2},
		{"plus sign", "+1 0\n", ErrBadLabel, 1},
		{"id too large for int", "0 1\n1 99999999999999999999\n", ErrNotNumber, 2},
		{"negative id", "0 1\n-1 2\n", ErrNegativeID, 2},
		{"three fields", "0 1\n1 2 3\n", ErrFieldCount, 2},
		// A single token declares a qubit; one on no coupler is isolated.
		{"declared isolated", "0 1\n\n2\n", ErrIsolatedQubit, 3},
		{"declared isolated name", "a b\nc\n", ErrIsolatedQubit, 2},
		{"declared twice", "a b\na\na\n", ErrDuplicateLabel, 3},
		{"name self-loop", "a b\nb b\n", ErrSelfLoop, 2},
		{"name duplicate", "a b\nb a\n", ErrDuplicateEdge, 2},
		{"numbers with leading zeros", "01 1\n", ErrSelfLoop, 1},
		{"comma separated", "0,1\n", ErrBadLabel, 1},
		{"coordinates unknown", "a b\n#@ c 0 0\n", ErrUnknownLabel, 2},
		{"coordinates twice", "a b\n#@ a 0 0\n#@ a 1 0\n#@ b 1 1\n", ErrDuplicateLabel, 3},
		{"coordinates missing", "a b\n#@ a 0 0\n", ErrBadCoordinates, 0},
		{"coordinates not finite", "a b\n#@ a NaN 0\n", ErrBadCoordinates, 2},
		{"coordinates short", "a b\n#@ a 0\n", ErrBadCoordinates, 2},
		{"disconnected names", "a b\nc d\n", ErrDisconnected, 0},
		// Qubit 1 lies below the largest id 2 but is on no edge.
		{"isolated", "0 2\n", ErrIsolatedQubit, 0},
		{"isolated among many", "0 1\n1 2\n2 4\n", ErrIsolatedQubit, 0},
		// A huge id must be reported, not allocated for.
		{"isolated huge id", "0 1\n1 4000000000000\n", ErrIsolatedQubit, 0},
		{"isolated max int", "0 1\n1 9223372036854775807\n", ErrIsolatedQubit, 0},
		{"disconnected", "0 1\n2 3\n", ErrDisconnected, 0},
		{"empty file", "", ErrTooFewQubits, 0},
		{"only comments", "# nothing here\n\n   \n", ErrTooFewQubits, 0},
	} {
		_, err := ReadEdgeList("chip.edges", strings.NewReader(tc.in))
		wantParseError(t, tc.name, err, tc.want, tc.line)
		if err != nil && !strings.Contains(err.Error(), "chip.edges") {
			t.Errorf("%s: error %q does not name the file", tc.name, err)
		}
	}
}

func TestReadEdgeListMessages(t *testing.T) {
	_, err := ReadEdgeList("chip.edges", strings.NewReader("0 1\n1 1\n"))
	if want := "circuits: chip.edges:2: self-loop"; err == nil || !strings.HasPrefix(err.Error(), want) {
		t.Errorf("error %q, want prefix %q", err, want)
	}
	_, err = ReadEdgeList("chip.edges", strings.NewReader("0 1\n1 5\n"))
	if err == nil || !strings.Contains(err.Error(), "qubit 2 is on no coupler") || !strings.Contains(err.Error(), "0..5") {
		t.Errorf("isolated-qubit error %q does not name qubit 2 and the range 0..5", err)
	}
	_, err = ReadEdgeList("chip.edges", strings.NewReader("0 1\n1 9223372036854775807\n"))
	if err == nil || !strings.Contains(err.Error(), "qubit 2 is on no coupler") {
		t.Errorf("isolated-qubit error %q does not name qubit 2", err)
	}
}

func TestNewGraphErrors(t *testing.T) {
	for _, tc := range []struct {
		name   string
		n      int
		edges  []Edge
		want   error
		detail string
	}{
		{"one qubit", 1, nil, ErrTooFewQubits, ""},
		{"negative", 3, []Edge{{0, 1}, {-1, 2}}, ErrNegativeID, "coupler 2 (-1 2)"},
		{"out of range", 3, []Edge{{0, 1}, {1, 3}}, ErrQubitRange, "coupler 2 (1 3)"},
		{"self-loop", 3, []Edge{{0, 1}, {2, 2}}, ErrSelfLoop, "coupler 2 (2 2)"},
		{"duplicate", 3, []Edge{{0, 1}, {1, 2}, {1, 0}}, ErrDuplicateEdge, "coupler 3 (1 0) repeats coupler 1"},
		{"isolated", 4, []Edge{{0, 1}, {1, 2}}, ErrIsolatedQubit, "qubit 3 is on no coupler"},
		{"isolated huge n", 1 << 40, []Edge{{0, 1}}, ErrIsolatedQubit, "qubit 2 is on no coupler"},
		{"disconnected", 4, []Edge{{0, 1}, {2, 3}}, ErrDisconnected, "2 separate parts"},
	} {
		// A list of couplers has no lines: Line stays 0 (a file reader such
		// as ReadEdgeList sets it), and the message names the coupler by its
		// 1-based position in the list.
		_, err := NewGraph(tc.name, tc.n, tc.edges)
		wantParseError(t, tc.name, err, tc.want, 0)
		if err != nil && !strings.Contains(err.Error(), tc.detail) {
			t.Errorf("%s: error %q does not say %q", tc.name, err, tc.detail)
		}
	}
	g, err := NewGraph("ok", 3, []Edge{{2, 1}, {0, 1}})
	if err != nil || g.Qubits != 3 || !reflect.DeepEqual(g.Edges, []Edge{{2, 1}, {0, 1}}) {
		t.Errorf("NewGraph(ok) = %+v, %v", g, err)
	}
}

// TestFamilies checks the edge lists of the built-in families, written by
// hand, and their degrees.
func TestFamilies(t *testing.T) {
	for _, tc := range []struct {
		spec       string
		qubits     int
		edges      []Edge
		minD, maxD int
	}{
		{"line:4", 4, []Edge{{0, 1}, {1, 2}, {2, 3}}, 1, 2},
		{"ring:4", 4, []Edge{{0, 1}, {1, 2}, {2, 3}, {3, 0}}, 2, 2},
		{"grid:2x2", 4, []Edge{{0, 1}, {2, 3}, {0, 2}, {1, 3}}, 2, 2},
		{"grid:2x3", 6, []Edge{{0, 1}, {1, 2}, {3, 4}, {4, 5}, {0, 3}, {1, 4}, {2, 5}}, 2, 3},
		{"complete:4", 4, []Edge{{0, 1}, {0, 2}, {0, 3}, {1, 2}, {1, 3}, {2, 3}}, 3, 3},
		{"star:4", 4, []Edge{{0, 1}, {0, 2}, {0, 3}}, 1, 3},
	} {
		g := mustGraph(t, tc.spec)
		if g.Qubits != tc.qubits || !reflect.DeepEqual(g.Edges, tc.edges) || g.Name != tc.spec {
			t.Errorf("%s: got %d qubits, edges %v, name %q", tc.spec, g.Qubits, g.Edges, g.Name)
		}
		if fam, _, _ := strings.Cut(tc.spec, ":"); g.Family != fam {
			t.Errorf("%s: Family = %q", tc.spec, g.Family)
		}
		if g.MinDegree() != tc.minD || g.MaxDegree() != tc.maxD {
			t.Errorf("%s: degrees %d..%d, want %d..%d", tc.spec, g.MinDegree(), g.MaxDegree(), tc.minD, tc.maxD)
		}
		for _, e := range tc.edges {
			if !g.HasEdge(e.A, e.B) || !g.HasEdge(e.B, e.A) {
				t.Errorf("%s: HasEdge(%d, %d) is false", tc.spec, e.A, e.B)
			}
		}
	}
	g := mustGraph(t, "grid:3x4")
	if g.Rows != 3 || g.Cols != 4 || g.Qubits != 12 || len(g.Edges) != 3*3+2*4 {
		t.Errorf("grid:3x4: %d×%d, %d qubits, %d edges", g.Rows, g.Cols, g.Qubits, len(g.Edges))
	}
	if g.HasEdge(3, 4) {
		t.Error("grid:3x4 couples 3 and 4, which are in different rows")
	}
}

func TestParseGraphErrors(t *testing.T) {
	for _, tc := range []struct {
		spec string
		want error
	}{
		{"hexagon:3", ErrUnknownFamily},
		{"torus:3", ErrBadSize},
		{"no-such-file.edges", ErrUnknownFamily},
		{"line:1", ErrBadSize},
		{"line:0", ErrBadSize},
		{"line:-3", ErrBadSize},
		{"line:x", ErrBadSize},
		{"line:", ErrBadSize},
		{"ring:2", ErrBadSize},
		{"complete:1", ErrBadSize},
		{"star:1", ErrBadSize},
		{"grid:0x3", ErrBadSize},
		{"grid:3x0", ErrBadSize},
		{"grid:1x1", ErrBadSize},
		{"grid:3", ErrBadSize},
		{"grid:3x", ErrBadSize},
		{"grid:axb", ErrBadSize},
		{"grid:2x3x4", ErrBadSize},
	} {
		_, err := ParseGraph(tc.spec)
		wantParseError(t, tc.spec, err, tc.want, 0)
	}
	// Family checks the family before the size.
	_, err := Family("hexagon", "x")
	wantParseError(t, "Family(torus, x)", err, ErrUnknownFamily, 0)
}

func TestParseGraphFile(t *testing.T) {
	path := filepath.Join(t.TempDir(), "chip.edges")
	if err := os.WriteFile(path, []byte("# triangle\n0 1\n1 2\n2 0\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	g, err := ParseGraph(path)
	if err != nil {
		t.Fatal(err)
	}
	if g.Qubits != 3 || len(g.Edges) != 3 || g.Name != path || g.Family != "" {
		t.Errorf("ParseGraph(file) = %+v", g)
	}
	// A file's classes come from the edge colouring.
	checkColouring(t, g, LayeredClasses(g))

	bad := filepath.Join(t.TempDir(), "bad.edges")
	if err := os.WriteFile(bad, []byte("0 1\n\n1 1\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	_, err = ParseGraph(bad)
	wantParseError(t, "bad file", err, ErrSelfLoop, 3)
}

func TestDigest(t *testing.T) {
	a, b := mustGraph(t, "ring:5"), mustGraph(t, "ring:5")
	if a.Digest() != b.Digest() || len(a.Digest()) != 16 {
		t.Errorf("digest of ring:5 is %q then %q", a.Digest(), b.Digest())
	}
	c, err := ReadEdgeList("x", strings.NewReader("0 1\n1 2\n2 3\n3 4\n0 4\n"))
	if err != nil {
		t.Fatal(err)
	}
	if a.Digest() == c.Digest() {
		t.Error("ring:5 and a reordered ring share a digest; the digest must follow the edge order")
	}
	if a.Digest() == mustGraph(t, "ring:6").Digest() {
		t.Error("ring:5 and ring:6 share a digest")
	}
}

// FuzzReadEdgeList checks that ReadEdgeList never panics, that every failure
// is a *ParseError wrapping a sentinel (or a read error), and that a graph it
// accepts survives write → read unchanged (the round trip of encoding/csv's
// FuzzRoundtrip, Go standard library).
func FuzzReadEdgeList(f *testing.F) {
	for _, seed := range []string{
		"0 1\n",
		"0 1\n1 2\n2 0\n",
		"# comment\n\n0 1 # c\n  1 2\r\n",
		"0 1\n1 1\n",
		"0 1\n1 0\n",
		"0 x\n",
		"-1 0\n",
		"0 1 2\n",
		"0 2\n",
		"0 1\n2 3\n",
		"",
		"#",
		"0 1\n1 9223372036854775807\n",
		"+1 0\n",
		"0\t1\n",
		"Q1 Q2\nQ2 q_3.a:b-c\n",
		"a b\nc\n",
		"0 1\n2\n1 2\n",
		"a b\n#@ a 0 1.5\n#@ b -2 3e2\n",
		"#@ 0 0 0\n0 1\n#@ 1 1 1\n",
		"a b\nb 1\n1 01\n",
	} {
		f.Add([]byte(seed))
	}
	sentinels := []error{ErrFieldCount, ErrNotNumber, ErrNegativeID, ErrSelfLoop, ErrDuplicateEdge,
		ErrIsolatedQubit, ErrDisconnected, ErrTooFewQubits, ErrBadLabel, ErrUnknownLabel,
		ErrDuplicateLabel, ErrBadCoordinates}
	f.Fuzz(func(t *testing.T, data []byte) {
		g, err := ReadEdgeList("fuzz", bytes.NewReader(data))
		if err != nil {
			var pe *ParseError
			if errors.As(err, &pe) {
				found := false
				for _, s := range sentinels {
					found = found || errors.Is(err, s)
				}
				if !found {
					t.Fatalf("ParseError %q wraps no edge-list sentinel", err)
				}
			}
			return
		}
		if g.Qubits < 2 || len(g.Edges) == 0 {
			t.Fatalf("accepted a graph with %d qubits and %d edges", g.Qubits, len(g.Edges))
		}
		var buf bytes.Buffer
		if err := WriteEdgeList(&buf, g); err != nil {
			t.Fatal(err)
		}
		h, err := ReadEdgeList("fuzz", &buf)
		if err != nil {
			t.Fatalf("re-reading the written graph: %v", err)
		}
		if h.Qubits != g.Qubits || !reflect.DeepEqual(h.Edges, g.Edges) || !reflect.DeepEqual(h.Labels, g.Labels) || !reflect.DeepEqual(h.Coords, g.Coords) {
			t.Fatalf("round trip changed the graph:\n%+v\n%+v", g, h)
		}
		// Whatever the strict reader accepts, the lenient one accepts unchanged.
		p, err := ReadEdgeListWith("fuzz", bytes.NewReader(data), ReadOptions{AllowDisconnected: true})
		if err != nil || !reflect.DeepEqual(p.Edges, g.Edges) || !reflect.DeepEqual(p.Labels, g.Labels) {
			t.Fatalf("AllowDisconnected changes an accepted graph: %v", err)
		}
		// The graph also passes NewGraph's validation unchanged.
		if _, err := NewGraph("fuzz", g.Qubits, g.Edges); err != nil {
			t.Fatalf("NewGraph rejects an accepted graph: %v", err)
		}
	})
}
