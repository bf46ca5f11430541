package main

import (
	"context"
	"encoding/json"
	"flag"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"mixdepth/moments"
)

var update = flag.Bool("update", false, "rewrite the golden files in fixtures/exact")

func exactJSONOf(t *testing.T, args ...string) exactJSON {
	t.Helper()
	stdout, stderr, code := runCLI(t, append([]string{"exact", "--json"}, args...)...)
	if code != 0 {
		t.Fatalf("exact %v: exit %d: %s", args, code, stderr)
	}
	var doc exactJSON
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatalf("bad JSON: %v\n%s", err, stdout)
	}
	return doc
}

// exactCases are the graphs of the exact command's acceptance check.
var exactCases = []struct {
	name string
	args []string
}{
	{"grid3x4", []string{"--graph", "grid:3x4", "--depths", "1:16"}},
	{"line9", []string{"--graph", "line:9", "--depths", "1:16"}},
	{"ring7", []string{"--graph", "ring:7", "--depths", "1:16"}},
	{"star6", []string{"--graph", "star:6", "--depths", "1:16"}},
	{"complete6", []string{"--graph", "complete:6", "--depths", "1:16"}},
	{"line6-random", []string{"--graph", "line:6", "--schedule", "random-edge", "--depths", "5:150:5"}},
	{"complete5-random", []string{"--graph", "complete:5", "--schedule", "random-edge", "--depths", "5:100:5"}},
}

// TestExactAgainstPauliChain: `exact --json` (the identity/swap engines)
// agrees to 1e-9 with an independent derivation, the Pauli-support chain of
// design.md §5 (Hunter-Jones 2019; Dalzell, Hunter-Jones, Brandão 2022),
// evaluated here directly; and the golden files pin the values, so a change
// of any number is seen (regenerate with -update only after checking why).
func TestExactAgainstPauliChain(t *testing.T) {
	for _, c := range exactCases {
		t.Run(c.name, func(t *testing.T) {
			doc := exactJSONOf(t, c.args...)
			var cf circuitFlags
			fs := newFlags("x", "", "", os.Stdout)
			cf.add(fs)
			depthSpec := fs.String("depths", "", "")
			if err := fs.Parse(c.args); err != nil {
				t.Fatal(err)
			}
			s, err := cf.resolve()
			if err != nil {
				t.Fatal(err)
			}
			depths, _ := parseDepths(*depthSpec)
			pauli, err := moments.PauliCollisionCurve(context.Background(), s.graph, s.schedule, depths)
			if err != nil {
				t.Fatal(err)
			}
			if len(doc.Rows) != len(depths) {
				t.Fatalf("%d rows, want %d", len(doc.Rows), len(depths))
			}
			for k, row := range doc.Rows {
				if math.Abs(row.Collision-pauli[k]) > 1e-9*pauli[k] {
					t.Errorf("depth %d: engine %.15g, Pauli chain %.15g", row.Depth, row.Collision, pauli[k])
				}
				if row.FramePotential == nil || *row.FramePotential < 2-1e-9 {
					t.Errorf("depth %d: frame potential %v, want ≥ 2 (Haar value 2!, Gross, Audenaert, Eisert 2007)", row.Depth, row.FramePotential)
				}
			}
			golden(t, filepath.Join("..", "..", "fixtures", "exact", c.name+".json"), doc)
		})
	}
}

// golden compares doc with the golden file to 1e-12 relative, or rewrites
// the file with -update.
func golden(t *testing.T, path string, doc exactJSON) {
	t.Helper()
	if *update {
		b, _ := json.MarshalIndent(doc, "", "  ")
		if err := os.WriteFile(path, append(b, '\n'), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("golden file: %v (run go test ./cmd/mixdepth/ -run Exact -update to create it)", err)
	}
	var want exactJSON
	if err := json.Unmarshal(b, &want); err != nil {
		t.Fatal(err)
	}
	near := func(a, b float64) bool { return math.Abs(a-b) <= 1e-12*math.Max(math.Abs(a), math.Abs(b)) }
	if len(want.Rows) != len(doc.Rows) {
		t.Fatalf("golden %s has %d rows, got %d", path, len(want.Rows), len(doc.Rows))
	}
	for k := range doc.Rows {
		g, w := doc.Rows[k], want.Rows[k]
		if g.Depth != w.Depth || g.GateCount != w.GateCount || !near(g.Collision, w.Collision) ||
			(g.FramePotential == nil) != (w.FramePotential == nil) || (g.FramePotential != nil && !near(*g.FramePotential, *w.FramePotential)) {
			t.Errorf("%s row %d: got depth %d, %d gates, E[Z] %.17g, F2 %v; golden depth %d, %d gates, E[Z] %.17g, F2 %v",
				path, k, g.Depth, g.GateCount, g.Collision, deref(g.FramePotential), w.Depth, w.GateCount, w.Collision, deref(w.FramePotential))
		}
	}
	if (doc.Gap == nil) != (want.Gap == nil) || (doc.Gap != nil && (!near(doc.Gap.SecondEigenvalue, want.Gap.SecondEigenvalue) || doc.Gap.DesignDepthBound != want.Gap.DesignDepthBound)) {
		t.Errorf("%s gap: got %+v, golden %+v", path, doc.Gap, want.Gap)
	}
	if !equalDepth(doc.AnticoncentrationDepth, want.AnticoncentrationDepth) {
		t.Errorf("%s depth: got %v, golden %v", path, doc.AnticoncentrationDepth, want.AnticoncentrationDepth)
	}
}

func deref(p *float64) any {
	if p == nil {
		return nil
	}
	return *p
}

func equalDepth(a, b *int) bool { return (a == nil) == (b == nil) && (a == nil || *a == *b) }

// TestExactHaarValues: one Haar gate on two qubits gives E[Z] = 2/5 and
// F2 = 2 exactly (Haar values 2/(D+1) and 2! for D ≥ 2; Gross, Audenaert,
// Eisert 2007), and the gap on one edge is that of a projector.
func TestExactHaarValues(t *testing.T) {
	doc := exactJSONOf(t, "--graph", "line:2", "--depths", "1,50")
	r := doc.Rows[0]
	if math.Abs(r.Collision-0.4) > 1e-15 || math.Abs(*r.FramePotential-2) > 1e-12 {
		t.Errorf("one gate: E[Z] = %.17g, F2 = %.17g; want 2/5 and 2", r.Collision, *r.FramePotential)
	}
	// Random-edge on a single edge: M = M_e is the Haar projector, so every
	// eigenvalue off its fixed space is 0: λ₂ = 0, Δ = |E|(1−λ₂) = 1.
	doc = exactJSONOf(t, "--graph", "line:2", "--schedule", "random-edge", "--depths", "1")
	if doc.Gap == nil || math.Abs(doc.Gap.SecondEigenvalue) > 1e-12 || math.Abs(doc.Gap.HamiltonianGap-1) > 1e-12 {
		t.Errorf("gap of one edge: %+v, want λ₂ = 0 and Δ = 1", doc.Gap)
	}
}

// TestScanExactAcceptance is the foundation's acceptance run: the Monte
// Carlo collision means of `scan --graph line:8 --depths 2,4,8,16
// --instances 400 --seed 11` agree with the exact values within 4 standard
// errors (normal tail probability 6e-5 per depth).
func TestScanExactAcceptance(t *testing.T) {
	doc := scanJSONOf(t, "--graph", "line:8", "--depths", "2,4,8,16", "--instances", "400", "--seed", "11", "--exact")
	for _, r := range doc.Rows {
		if r.CollisionExact == nil || r.ExactDeviation == nil {
			t.Fatalf("row %+v lacks the exact fields", r)
		}
		if math.Abs(*r.ExactDeviation) > 4 {
			t.Errorf("depth %d: MC %.6g ± %.2g vs exact %.6g", r.Depth, r.CollisionMean, *r.CollisionStder, *r.CollisionExact)
		}
	}
}

// TestExactGateSets: `exact --gates clifford` equals haar (the Clifford
// group is a unitary 3-design: Webb 2016; Zhu 2017) — here this checks the
// routing of the spec only; the evidence that the Clifford average really is
// the Haar transfer is TestEntanglerTransferCliffordAverage in moments
// and the Monte Carlo Clifford scan in scan/scan_test.go — a CZ gate file
// equals cz+haar1 exactly, and a finite single-qubit set is refused with a
// hint.
func TestExactGateSets(t *testing.T) {
	base := []string{"--graph", "ring:5", "--depths", "1:10"}
	haar := exactJSONOf(t, base...)
	cliff := exactJSONOf(t, append(base, "--gates", "clifford")...)
	for k := range haar.Rows {
		if haar.Rows[k].Collision != cliff.Rows[k].Collision {
			t.Errorf("depth %d: haar %.17g, clifford %.17g", haar.Rows[k].Depth, haar.Rows[k].Collision, cliff.Rows[k].Collision)
		}
	}
	dir := t.TempDir()
	czFile := writeFile(t, dir, "cz.json", `{"entangler": [[[1,0],[0,0],[0,0],[0,0]],[[0,0],[1,0],[0,0],[0,0]],[[0,0],[0,0],[1,0],[0,0]],[[0,0],[0,0],[0,0],[-1,0]]], "single_qubit": "haar"}`)
	a := exactJSONOf(t, append(base, "--gates", "cz+haar1")...)
	b := exactJSONOf(t, append(base, "--gates", czFile)...)
	for k := range a.Rows {
		if a.Rows[k].Collision != b.Rows[k].Collision {
			t.Errorf("depth %d: cz+haar1 %.17g, CZ file %.17g", a.Rows[k].Depth, a.Rows[k].Collision, b.Rows[k].Collision)
		}
	}
	finite := writeFile(t, dir, "finite.json", `{"entangler": [[[1,0],[0,0],[0,0],[0,0]],[[0,0],[1,0],[0,0],[0,0]],[[0,0],[0,0],[1,0],[0,0]],[[0,0],[0,0],[0,0],[-1,0]]], "single_qubit": [[[[1,0],[0,0]],[[0,0],[1,0]]]]}`)
	_, stderr, code := runCLI(t, append([]string{"exact"}, append(base, "--gates", finite)...)...)
	if code != 2 || !strings.Contains(stderr, "mixdepth scan") {
		t.Errorf("finite set: exit %d, %q; want 2 and a pointer to scan", code, stderr)
	}
	// --explain prints the transfer and its eigenvalues.
	stdout, _, code := runCLI(t, "exact", "--gates", "iswap+haar1", "--explain")
	if code != 0 || !strings.Contains(stdout, "Eigenvalues") {
		t.Errorf("--explain: exit %d, %q", code, stdout)
	}
}
