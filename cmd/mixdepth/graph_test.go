package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"image/png"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"mixdepth/circuits"
)

// tempFile writes content to a file name in a new temporary directory.
func tempFile(t *testing.T, name, content string) string {
	t.Helper()
	return writeFile(t, t.TempDir(), name, content)
}

// labelledChip is a 3×3 grid written with lab names (row letter, column
// digit), listed in the order of grid:3x3's edges, so that numbering by
// first appearance gives grid:3x3's numbers except that qubits are met in a
// different order; intTwin is the same file with each name replaced by its
// number.
const labelledChip = `# a small chip with named qubits
QA0 QA1
QA1 QA2
QB0 QB1
QB1 QB2
QC0 QC1
QC1 QC2
QA0 QB0
QA1 QB1
QA2 QB2
QB0 QC0
QB1 QC1
QB2 QC2
`

const intTwin = `0 1
1 2
3 4
4 5
6 7
7 8
0 3
1 4
2 5
3 6
4 7
5 8
`

// exactRatios runs exact --json and returns E[Z] per depth.
func exactRatios(t *testing.T, args ...string) []float64 {
	t.Helper()
	doc := exactJSONOf(t, args...)
	out := make([]float64, len(doc.Rows))
	for i, r := range doc.Rows {
		out[i] = r.Collision
	}
	return out
}

func sameFloats(t *testing.T, label string, a, b []float64) {
	t.Helper()
	if len(a) != len(b) {
		t.Fatalf("%s: %d values vs %d", label, len(a), len(b))
	}
	for i := range a {
		if a[i] != b[i] {
			t.Errorf("%s: depth %d: %.17g vs %.17g", label, i+1, a[i], b[i])
		}
	}
}

// TestLabelledTwinExact: a labelled edge file and its integer twin are the
// same chip, so exact prints identical numbers (a labelled file numbers its
// qubits by first appearance; here that is the twin's numbering).
func TestLabelledTwinExact(t *testing.T) {
	named := tempFile(t, "named.edges", labelledChip)
	twin := tempFile(t, "twin.edges", intTwin)
	for _, sched := range []string{"layered", "random-edge"} {
		a := exactRatios(t, "--graph", named, "--schedule", sched, "--depths", "1:8")
		b := exactRatios(t, "--graph", twin, "--schedule", sched, "--depths", "1:8")
		sameFloats(t, "labelled vs integer twin, "+sched, a, b)
	}
	// The drop list takes the labels: dropping QB1-QB2 is dropping 4-5.
	a := exactRatios(t, "--graph", named, "--drop", "QB1-QB2", "--depths", "1:8")
	b := exactRatios(t, "--graph", twin, "--drop", "4-5", "--depths", "1:8")
	sameFloats(t, "labelled vs integer drop", a, b)
}

// TestDropEqualsEdgeFile: dropping coupler 4-5 from grid:3x3 gives the
// circuits of the edge file without it. With the random-edge schedule the
// edges (in order) are all that matters; with the layered schedule the
// dropped grid keeps the grid's layers minus 4-5, which a layout file states
// for the edge file.
func TestDropEqualsEdgeFile(t *testing.T) {
	without := strings.Replace(intTwin, "4 5\n", "", 1)
	file := tempFile(t, "without.edges", without)
	a := exactRatios(t, "--graph", "grid:3x3", "--drop", "4-5", "--schedule", "random-edge", "--depths", "1:20")
	b := exactRatios(t, "--graph", file, "--schedule", "random-edge", "--depths", "1:20")
	sameFloats(t, "random-edge: grid:3x3 --drop 4-5 vs edge file", a, b)

	layout := tempFile(t, "layers.json", `{"qubits": 9, "layers": [[[0,1],[3,4],[6,7]], [[1,2],[7,8]], [[0,3],[1,4],[2,5]], [[3,6],[4,7],[5,8]]]}`)
	a = exactRatios(t, "--graph", "grid:3x3", "--drop", "4-5", "--depths", "1:12")
	b = exactRatios(t, "--graph", file, "--layout", layout, "--depths", "1:12")
	sameFloats(t, "layered: grid:3x3 --drop 4-5 vs edge file with the grid layers", a, b)
	// Dropping from the layout as well: the layout's gates on 4-5 go.
	full := tempFile(t, "full.json", `{"qubits": 9, "layers": [[[0,1],[3,4],[6,7]], [[1,2],[4,5],[7,8]], [[0,3],[1,4],[2,5]], [[3,6],[4,7],[5,8]]]}`)
	c := exactRatios(t, "--graph", "grid:3x3", "--layout", full, "--drop", "4-5", "--depths", "1:12")
	sameFloats(t, "layout with --drop vs the layout without the coupler", a, c)
}

func TestGraphCommand(t *testing.T) {
	named := tempFile(t, "named.edges", labelledChip+"#@ QA0 0 0\n#@ QA1 1 0\n#@ QA2 2 0\n#@ QB0 0 1\n#@ QB1 1 1\n#@ QB2 2 1\n#@ QC0 0 2\n#@ QC1 1 2\n#@ QC2 2 2\n")
	// The 3×3 grid without corner QC2, worked by hand: corners QA0, QA2, QC0
	// and the corner's neighbours QB2, QC1 have degree 2, QA1 and QB0 3, QB1
	// 4; the farthest pair QA2–QC0 is 4 couplers apart.
	out := mustRun(t, "graph", named, "--drop", "QC2")
	for _, want := range []string{
		"8 qubits, 10 couplers",
		"0=QA0 1=QA1 2=QA2 3=QB0 4=QB1 5=QB2 6=QC0 7=QC1",
		"out of service (dropped; the other qubits renumbered): QC2",
		"degrees: 5×degree 2, 2×degree 3, 1×degree 4",
		"connected: yes", "diameter: 4 couplers", "bipartite: yes",
		"layer 0: ", "Laplacian algebraic connectivity", "random-edge schedule, Haar gates",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("graph output lacks %q:\n%s", want, out)
		}
	}
	var doc graphJSON
	if err := json.Unmarshal([]byte(mustRun(t, "graph", "ring:6", "--json")), &doc); err != nil {
		t.Fatal(err)
	}
	// ring:6: all degrees 2, diameter 3, bipartite, λ₂(L) = 2(1 − cos(π/3)) = 1
	// (Chung 1997).
	if doc.Qubits != 6 || len(doc.Couplers) != 6 || doc.Degrees[2] != 6 || *doc.Diameter != 3 || !doc.Bipartite ||
		doc.AlgebraicConnectivity == nil || *doc.AlgebraicConnectivity < 1-1e-12 || *doc.AlgebraicConnectivity > 1+1e-12 ||
		doc.RandomEdgeHamiltonianGap == nil || len(doc.Layers) != 2 || doc.Labels[5] != "5" {
		t.Errorf("graph ring:6 --json: %+v", doc)
	}
	// The keys are an interface (README): the coupler pairs are
	// coupler_list, since couplers is the count in every run's header, and the
	// gap is named as exact --json names it (hamiltonian_gap).
	var keys map[string]json.RawMessage
	if err := json.Unmarshal([]byte(mustRun(t, "graph", "ring:6", "--json")), &keys); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"coupler_list", "random_edge_second_eigenvalue", "random_edge_hamiltonian_gap"} {
		if _, ok := keys[k]; !ok {
			t.Errorf("graph --json lacks %q", k)
		}
	}
	for _, k := range []string{"couplers", "random_edge_gap"} {
		if _, ok := keys[k]; ok {
			t.Errorf("graph --json still has the old key %q", k)
		}
	}
	// A chip in parts is refused, then shown with its limit (2/17)².
	parts := tempFile(t, "parts.edges", "a b\nb c\nc d\ne f\nf g\ng h\n")
	if _, _, code := runCLI(t, "graph", parts); code != 2 {
		t.Errorf("a disconnected chip: exit %d, want 2", code)
	}
	out = mustRun(t, "graph", parts, "--allow-disconnected")
	if !strings.Contains(out, "2 parts of 4, 4 qubits") || !strings.Contains(out, "0.0138408") {
		t.Errorf("disconnected report:\n%s", out)
	}
	// Plots: a valid PNG and an SVG document.
	dir := t.TempDir()
	pngPath, svgPath := filepath.Join(dir, "chip.png"), filepath.Join(dir, "chip.svg")
	mustRun(t, "graph", named, "--drop", "QB1,QA0-QA1", "--plot", pngPath)
	mustRun(t, "graph", "honeycomb:2x2", "--plot", svgPath)
	data, err := os.ReadFile(pngPath)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := png.Decode(bytes.NewReader(data)); err != nil {
		t.Errorf("graph --plot wrote no valid PNG: %v", err)
	}
	svg, err := os.ReadFile(svgPath)
	if err != nil || !bytes.Contains(svg, []byte("<svg")) {
		t.Errorf("graph --plot wrote no SVG: %v", err)
	}
}

// TestChipBadInput: each mistake of the list exits 2 with one line.
func TestChipBadInput(t *testing.T) {
	named := tempFile(t, "named.edges", labelledChip)
	dup := tempFile(t, "dup.edges", "QA QB\nQA\nQA\n")
	for _, args := range [][]string{
		{"graph", named, "--drop", "QZ9"},
		{"graph", named, "--drop", "QA0,QA0"},
		{"graph", "line:2", "--drop", "0"},
		{"graph", dup},
		{"graph", "torus:2x2"},
		{"graph", "regular:7,3"},
		{"graph", "regular:6,1"},
		{"exact", "--graph", "grid:3x3", "--drop", "0-4"},
		{"scan", "--graph", named, "--drop", "QB1-QQ"},
	} {
		_, stderr, code := runCLI(t, args...)
		if code != 2 || strings.Count(strings.TrimSpace(stderr), "\n") != 0 || strings.Contains(stderr, "panic") {
			t.Errorf("%v: exit %d, stderr %q; want exit 2 and one line", args, code, stderr)
		}
	}
}

// TestScoreBitOrder: measured data written with qubit 0 last (a real
// sample run, bitstrings reversed by the test) scores as unrelated outputs,
// XEB near 0; score says so (sampling.CheckBitOrder), and --bit-order last
// gives exactly the score of the data in the tool's order. The other
// direction, data in the tool's order read with --bit-order last, draws
// the hint to --bit-order first.
func TestScoreBitOrder(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "s.parquet")
	// 12 qubits at depth 16 (spread): read in the wrong order the shots
	// are unrelated outputs, XEB near 0; on a smaller or shallower chip the
	// outputs at reversed qubits stay correlated and the XEB is not near 0.
	args := []string{"--graph", "grid:3x4", "--depth", "16", "--instances", "4", "--seed", "5"}
	sampleOK(t, append(append([]string{"sample"}, args...), "--shots", "500", "--out", out)...)
	tab := sampleTable(t, out)
	ids, err := tab.Int64s("instance")
	if err != nil {
		t.Fatal(err)
	}
	bits, err := tab.Strings("bitstring")
	if err != nil {
		t.Fatal(err)
	}
	var first, last strings.Builder
	first.WriteString("instance,bitstring\n")
	last.WriteString("instance,bitstring\n")
	for i := range ids {
		b := []byte(bits[i])
		fmt.Fprintf(&first, "%d,%s\n", ids[i], b)
		slices.Reverse(b)
		fmt.Fprintf(&last, "%d,%s\n", ids[i], b)
	}
	firstCSV := writeFile(t, dir, "first.csv", first.String())
	lastCSV := writeFile(t, dir, "last.csv", last.String())
	scoreArgs := []string{"--graph", "grid:3x4", "--depth", "16", "--seed", "5"}
	want := scoreDoc(t, append([]string{firstCSV}, scoreArgs...)...)
	got := scoreDoc(t, append([]string{lastCSV, "--bit-order", "last"}, scoreArgs...)...)
	if *got.LinearXEB != *want.LinearXEB || *got.NormalizedXEB != *want.NormalizedXEB {
		t.Errorf("--bit-order last: XEB %v, want %v", *got.LinearXEB, *want.LinearXEB)
	}
	wrong := scoreDoc(t, append([]string{lastCSV}, scoreArgs...)...)
	t.Logf("reversed data: XEB %v ± %v, warnings %v", *wrong.LinearXEB, *wrong.LinearXEBStderr, wrong.Warnings)
	found := false
	for _, w := range wrong.Warnings {
		found = found || strings.Contains(w, "--bit-order last")
	}
	if !found {
		t.Errorf("reversed data scored %v without a bit-order warning: %v", *wrong.LinearXEB, wrong.Warnings)
	}
	for _, w := range append(want.Warnings, got.Warnings...) {
		if strings.Contains(w, "bit-order") {
			t.Errorf("data in the right order draws a bit-order warning: %s", w)
		}
	}
	// The other direction: data in the tool's order scored as qubit 0
	// last is near 0 too, and the hint names --bit-order first.
	other := scoreDoc(t, append([]string{firstCSV, "--bit-order", "last"}, scoreArgs...)...)
	found = false
	for _, w := range other.Warnings {
		found = found || strings.Contains(w, "--bit-order first")
	}
	if !found {
		t.Errorf("qubit-0-first data read as last scored %v without a hint to --bit-order first: %v", *other.LinearXEB, other.Warnings)
	}
	_, stderr, code := runCLI(t, "score", out, "--bit-order", "last")
	if code != 2 || !strings.Contains(stderr, "qubit 0 first") {
		t.Errorf("--bit-order last on a sample table: exit %d, %s", code, stderr)
	}
}

// matrixJSON writes a 4×4 matrix as rows of [re, im] pairs.
func matrixJSON(m [16]complex128) string {
	var b strings.Builder
	b.WriteString("[")
	for i := 0; i < 4; i++ {
		if i > 0 {
			b.WriteString(",")
		}
		b.WriteString("[")
		for j := 0; j < 4; j++ {
			if j > 0 {
				b.WriteString(",")
			}
			fmt.Fprintf(&b, "[%v,%v]", real(m[4*i+j]), imag(m[4*i+j]))
		}
		b.WriteString("]")
	}
	return b.String() + "]"
}

// TestCouplerGateFiles: a gate file giving the same matrix for every coupler
// builds exactly the circuits of the single-matrix file (same draws, same
// gates), so exact and sample print the same numbers; a matrix rounded to 4
// digits is refused with a message naming --unitarize, and accepted with it.
func TestCouplerGateFiles(t *testing.T) {
	dir := t.TempDir()
	named := writeFile(t, dir, "named.edges", labelledChip)
	g, _ := circuits.Entangler("sqrt-iswap")
	single := writeFile(t, dir, "single.json", `{"entangler": `+matrixJSON(g)+`, "single_qubit": "haar"}`)
	var couplers []string
	for _, pair := range [][2]string{{"QA0", "QA1"}, {"QA1", "QA2"}, {"QB0", "QB1"}, {"QB1", "QB2"}, {"QC0", "QC1"}, {"QC1", "QC2"},
		{"QA0", "QB0"}, {"QA1", "QB1"}, {"QA2", "QB2"}, {"QB0", "QC0"}, {"QB1", "QC1"}, {"QB2", "QC2"}} {
		couplers = append(couplers, `{"qubits": ["`+pair[0]+`", "`+pair[1]+`"], "entangler": `+matrixJSON(g)+`}`)
	}
	perCoupler := writeFile(t, dir, "couplers.json", `{"entangler": `+matrixJSON(g)+`, "couplers": [`+strings.Join(couplers, ", ")+`], "single_qubit": "haar"}`)
	a := exactRatios(t, "--graph", named, "--gates", single, "--depths", "1:10")
	b := exactRatios(t, "--graph", named, "--gates", perCoupler, "--depths", "1:10")
	sameFloats(t, "exact: per-coupler file with one matrix vs the single-matrix file", a, b)
	sa, _ := sampleOK(t, "sample", "--graph", named, "--gates", single, "--depth", "6", "--instances", "3", "--shots", "50", "--json")
	sb, _ := sampleOK(t, "sample", "--graph", named, "--gates", perCoupler, "--depth", "6", "--instances", "3", "--shots", "50", "--json")
	strip := func(s string) string { // the gates key names the file
		var kept []string
		for _, l := range strings.Split(s, "\n") {
			if !strings.Contains(l, `"gates"`) {
				kept = append(kept, l)
			}
		}
		return strings.Join(kept, "\n")
	}
	if strip(sa) != strip(sb) {
		t.Errorf("sample differs between the per-coupler and the single-matrix file:\n%s\n%s", sa, sb)
	}

	// A calibrated coupler changes the numbers (the file is bound to the chip).
	cz, _ := circuits.Entangler("cz")
	one := writeFile(t, dir, "one.json", `{"entangler": `+matrixJSON(g)+`, "couplers": [{"qubits": ["QB1", "QB2"], "entangler": `+matrixJSON(cz)+`}], "single_qubit": "haar"}`)
	c := exactRatios(t, "--graph", named, "--gates", one, "--depths", "1:10")
	if c[9] == a[9] {
		t.Error("a coupler calibrated with CZ leaves E[Z] unchanged")
	}
	// Unknown coupler labels are bad input; a coupler on a dropped element is skipped.
	bad := writeFile(t, dir, "bad.json", `{"entangler": `+matrixJSON(g)+`, "couplers": [{"qubits": ["QB1", "QZ"], "entangler": `+matrixJSON(cz)+`}], "single_qubit": "haar"}`)
	if _, stderr, code := runCLI(t, "exact", "--graph", named, "--gates", bad, "--depths", "1:3"); code != 2 || !strings.Contains(stderr, "QZ") {
		t.Errorf("unknown coupler label: exit %d, %s", code, stderr)
	}
	mustRun(t, "exact", "--graph", named, "--gates", one, "--drop", "QB1-QB2", "--depths", "1:3")

	// Rounded to 4 digits: refused, naming --unitarize; accepted with it.
	var u [16]complex128
	circuits.HaarUnitary(rand.New(rand.NewPCG(4, 4)), 4, u[:])
	for i := range u {
		u[i] = complex(math.Round(real(u[i])*1e4)/1e4, math.Round(imag(u[i])*1e4)/1e4)
	}
	rounded := writeFile(t, dir, "rounded.json", `{"entangler": `+matrixJSON(u)+`, "single_qubit": "haar"}`)
	_, stderr, code := runCLI(t, "exact", "--graph", "line:4", "--gates", rounded, "--depths", "1:3")
	if code != 2 || !strings.Contains(stderr, "--unitarize") {
		t.Errorf("rounded matrix: exit %d, %s", code, stderr)
	}
	out := mustRun(t, "exact", "--graph", "line:4", "--gates", rounded, "--unitarize", "--depths", "1:3")
	if !strings.Contains(out, "made unitary: largest entry change") {
		t.Errorf("--unitarize does not report its change:\n%s", out)
	}
}

// TestExactDisconnected: two disjoint line:4 chips, accepted with
// --allow-disconnected, tend to (2/17)² (the product of the parts' Haar
// values, design.md §3), and the ratio is measured against that limit: at
// depth 300 it is 1 to 1e-9 (each part's excess decays geometrically).
func TestExactDisconnected(t *testing.T) {
	two := tempFile(t, "two.edges", "a b\nb c\nc d\ne f\nf g\ng h\n")
	if _, _, code := runCLI(t, "exact", "--graph", two, "--depths", "1:3"); code != 2 {
		t.Errorf("a chip in parts without --allow-disconnected: exit %d, want 2", code)
	}
	doc := exactJSONOf(t, "--graph", two, "--allow-disconnected", "--depths", "300")
	want := (2.0 / 17) * (2.0 / 17)
	if doc.CollisionLimit == nil || math.Abs(*doc.CollisionLimit-want) > 1e-15 ||
		math.Abs(doc.Rows[0].Collision-want) > 1e-12 || math.Abs(doc.Rows[0].CollisionRatio-1) > 1e-9 {
		t.Errorf("limit %v, E[Z] %.15g, ratio %.12g; want %.15g and 1", doc.CollisionLimit, doc.Rows[0].Collision, doc.Rows[0].CollisionRatio, want)
	}
	out := mustRun(t, "exact", "--graph", two, "--allow-disconnected", "--depths", "5")
	if !strings.Contains(out, "in 2 parts and never reaches that value") {
		t.Errorf("exact does not say the chip is in parts:\n%s", out)
	}
}
