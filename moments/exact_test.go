package moments_test

import (
	"context"
	"encoding/json"
	"errors"
	"flag"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/sim"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata")

// goldenBoundEps is the ε of the design-depth bound pinned in the golden
// files (the CLI's default --bound-eps).
const goldenBoundEps = 0.01

// exactInputs builds the graph, schedule and ensemble of a test case.
func exactInputs(t *testing.T, graph string, kind circuits.ScheduleKind, gates string) (*circuits.Graph, circuits.Schedule, circuits.Ensemble) {
	t.Helper()
	g, err := circuits.ParseGraph(graph)
	if err != nil {
		t.Fatal(err)
	}
	s, err := circuits.NewSchedule(kind, g)
	if err != nil {
		t.Fatal(err)
	}
	e, err := circuits.NewEnsemble(gates)
	if err != nil {
		t.Fatal(err)
	}
	return g, s, e
}

func depthRange(from, to, step int) []int {
	var d []int
	for x := from; x <= to; x += step {
		d = append(d, x)
	}
	return d
}

// exactCases are the graphs of the exact engines' acceptance check, with
// Haar gates.
var exactCases = []struct {
	name     string
	graph    string
	schedule circuits.ScheduleKind
	depths   []int
}{
	{"grid3x4", "grid:3x4", circuits.KindLayered, depthRange(1, 16, 1)},
	{"line9", "line:9", circuits.KindLayered, depthRange(1, 16, 1)},
	{"ring7", "ring:7", circuits.KindLayered, depthRange(1, 16, 1)},
	{"star6", "star:6", circuits.KindLayered, depthRange(1, 16, 1)},
	{"complete6", "complete:6", circuits.KindLayered, depthRange(1, 16, 1)},
	{"line6-random", "line:6", circuits.KindRandomEdge, depthRange(5, 150, 5)},
	{"complete5-random", "complete:5", circuits.KindRandomEdge, depthRange(5, 100, 5)},
}

// goldenDoc is the content of a golden file in testdata: the Result of
// Exact and, for a random-edge schedule, the design-depth bound at
// goldenBoundEps.
type goldenDoc struct {
	moments.Result
	DesignDepthBound int `json:",omitempty"`
}

// goldenOf is the golden document of r on g.
func goldenOf(g *circuits.Graph, r *moments.Result) goldenDoc {
	doc := goldenDoc{Result: *r}
	if r.Gap != nil {
		doc.DesignDepthBound = moments.DesignDepthBound(*r.Gap, g.Qubits, 2, goldenBoundEps)
	}
	return doc
}

// TestExactAgainstPauliChain: Exact (the identity/swap engines) agrees to
// 1e-9 with an independent derivation, the Pauli-support chain
// (Hunter-Jones 2019; Dalzell, Hunter-Jones, Brandão 2022), and its frame
// potential is at least the Haar value 2 (Gross, Audenaert, Eisert 2007);
// the golden files in testdata pin the values as a regression check, so a
// change of any number is seen (regenerate with -update only after checking
// why it changed).
func TestExactAgainstPauliChain(t *testing.T) {
	ctx := context.Background()
	for _, c := range exactCases {
		t.Run(c.name, func(t *testing.T) {
			g, s, e := exactInputs(t, c.graph, c.schedule, "haar")
			r, err := moments.Exact(ctx, g, s, e, c.depths, moments.ExactWorkers(2))
			if err != nil {
				t.Fatal(err)
			}
			pauli, err := moments.PauliCollisionCurve(ctx, g, s, c.depths)
			if err != nil {
				t.Fatal(err)
			}
			if len(r.Collision) != len(c.depths) {
				t.Fatalf("%d values, want %d", len(r.Collision), len(c.depths))
			}
			for k, d := range c.depths {
				if math.Abs(r.Collision[k]-pauli[k]) > 1e-9*pauli[k] {
					t.Errorf("depth %d: engine %.15g, Pauli chain %.15g", d, r.Collision[k], pauli[k])
				}
				if r.Frame == nil || r.Frame[k] < 2-1e-9 {
					t.Errorf("depth %d: frame potential missing or below 2 (%q)", d, r.FrameNote)
				}
			}
			golden(t, filepath.Join("testdata", c.name+".json"), goldenOf(g, r))
		})
	}
}

// golden compares doc with the golden file to 1e-12 relative (rounding of
// a different summation order would stay far below), or rewrites the file
// with -update.
func golden(t *testing.T, path string, doc goldenDoc) {
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
		t.Fatalf("golden file: %v (run go test ./moments/ -run ExactAgainst -update to create it)", err)
	}
	var want goldenDoc
	if err := json.Unmarshal(b, &want); err != nil {
		t.Fatal(err)
	}
	near := func(a, b float64) bool { return math.Abs(a-b) <= 1e-12*math.Max(math.Abs(a), math.Abs(b)) }
	if !slices.Equal(doc.Depths, want.Depths) || !slices.Equal(doc.GateCounts, want.GateCounts) || len(want.Collision) != len(doc.Collision) {
		t.Fatalf("golden %s: depths %v, gates %v; got %v, %v", path, want.Depths, want.GateCounts, doc.Depths, doc.GateCounts)
	}
	if (doc.Frame == nil) != (want.Frame == nil) {
		t.Fatalf("golden %s: frame potential %v, got %v", path, want.Frame, doc.Frame)
	}
	for k, d := range doc.Depths {
		if !near(doc.Collision[k], want.Collision[k]) || doc.Frame != nil && !near(doc.Frame[k], want.Frame[k]) {
			t.Errorf("%s depth %d: got E[Z] %.17g, F2 %v; golden E[Z] %.17g, F2 %v", path, d, doc.Collision[k], doc.Frame, want.Collision[k], want.Frame)
		}
	}
	if (doc.Gap == nil) != (want.Gap == nil) || (doc.Gap != nil && (!near(doc.Gap.SecondEigenvalue, want.Gap.SecondEigenvalue) || doc.DesignDepthBound != want.DesignDepthBound)) {
		t.Errorf("%s gap: got %+v (bound %d), golden %+v (bound %d)", path, doc.Gap, doc.DesignDepthBound, want.Gap, want.DesignDepthBound)
	}
	if doc.Depth != want.Depth || doc.Found != want.Found {
		t.Errorf("%s anti-concentration depth: got %d %v, golden %d %v", path, doc.Depth, doc.Found, want.Depth, want.Found)
	}
}

// TestExactHaarValues: one Haar gate on two qubits gives E[Z] = 2/5 and
// F2 = 2 exactly (Haar values 2/(D+1) and 2! for D ≥ 2; Gross, Audenaert,
// Eisert 2007), and the gap on one edge is that of a projector.
func TestExactHaarValues(t *testing.T) {
	ctx := context.Background()
	g, s, e := exactInputs(t, "line:2", circuits.KindLayered, "haar")
	r, err := moments.Exact(ctx, g, s, e, []int{1, 50})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.Collision[0]-0.4) > 1e-15 || math.Abs(r.Frame[0]-2) > 1e-12 {
		t.Errorf("one gate: E[Z] = %.17g, F2 = %.17g; want 2/5 and 2", r.Collision[0], r.Frame[0])
	}
	if r.Gap != nil || r.GapNote != "" {
		t.Errorf("layered schedule: gap %+v, note %q; want neither", r.Gap, r.GapNote)
	}
	// Random-edge on a single edge: M = M_e is the Haar projector, so every
	// eigenvalue off its fixed space is 0: λ₂ = 0, Δ = |E|(1−λ₂) = 1.
	g, s, e = exactInputs(t, "line:2", circuits.KindRandomEdge, "haar")
	r, err = moments.Exact(ctx, g, s, e, []int{1})
	if err != nil {
		t.Fatal(err)
	}
	if r.Gap == nil || math.Abs(r.Gap.SecondEigenvalue) > 1e-12 || math.Abs(r.Gap.HamiltonianGap-1) > 1e-12 {
		t.Errorf("gap of one edge: %+v, want λ₂ = 0 and Δ = 1", r.Gap)
	}
}

// czGates is the CZ entangler with Haar single-qubit gates, as a gate-set
// file, and with a finite single-qubit set (the identity) instead.
const (
	czGates     = `{"entangler": [[[1,0],[0,0],[0,0],[0,0]],[[0,0],[1,0],[0,0],[0,0]],[[0,0],[0,0],[1,0],[0,0]],[[0,0],[0,0],[0,0],[-1,0]]], "single_qubit": "haar"}`
	czFiniteSet = `{"entangler": [[[1,0],[0,0],[0,0],[0,0]],[[0,0],[1,0],[0,0],[0,0]],[[0,0],[0,0],[1,0],[0,0]],[[0,0],[0,0],[0,0],[-1,0]]], "single_qubit": [[[[1,0],[0,0]],[[0,0],[1,0]]]]}`
)

// TestExactGateSets: Exact with clifford equals haar (the Clifford group is
// a unitary 3-design: Webb 2016; Zhu 2017) — this checks the routing of the
// ensemble only; the evidence that the Clifford average really is the Haar
// transfer is TestEntanglerTransferCliffordAverage and the Monte Carlo
// Clifford scan in scan/scan_test.go — a CZ gate file equals cz+haar1
// exactly, the frame potential of a non-Haar set is absent with a note, and
// a finite single-qubit set is refused with ErrNoExactMoments.
func TestExactGateSets(t *testing.T) {
	ctx := context.Background()
	depths := depthRange(1, 10, 1)
	curve := func(e circuits.Ensemble) *moments.Result {
		t.Helper()
		g, s, _ := exactInputs(t, "ring:5", circuits.KindLayered, "haar")
		r, err := moments.Exact(ctx, g, s, e, depths)
		if err != nil {
			t.Fatal(err)
		}
		return r
	}
	ensemble := func(spec string) circuits.Ensemble {
		t.Helper()
		e, err := circuits.NewEnsemble(spec)
		if err != nil {
			t.Fatal(err)
		}
		return e
	}
	haar, cliff := curve(ensemble("haar")), curve(ensemble("clifford"))
	for k, d := range depths {
		if haar.Collision[k] != cliff.Collision[k] {
			t.Errorf("depth %d: haar %.17g, clifford %.17g", d, haar.Collision[k], cliff.Collision[k])
		}
	}
	file, err := circuits.ReadGateSet("cz.json", strings.NewReader(czGates))
	if err != nil {
		t.Fatal(err)
	}
	a, b := curve(ensemble("cz+haar1")), curve(file)
	for k, d := range depths {
		if a.Collision[k] != b.Collision[k] {
			t.Errorf("depth %d: cz+haar1 %.17g, CZ file %.17g", d, a.Collision[k], b.Collision[k])
		}
	}
	if a.Frame != nil || a.FrameNote == "" {
		t.Errorf("cz+haar1: frame potential %v, note %q; want none, with a note", a.Frame, a.FrameNote)
	}
	finite, err := circuits.ReadGateSet("finite.json", strings.NewReader(czFiniteSet))
	if err != nil {
		t.Fatal(err)
	}
	g, s, _ := exactInputs(t, "ring:5", circuits.KindLayered, "haar")
	if _, err := moments.Exact(ctx, g, s, finite, depths); !errors.Is(err, moments.ErrNoExactMoments) {
		t.Errorf("finite single-qubit set: Exact error %v, want ErrNoExactMoments", err)
	}
	if _, _, err := moments.TransferFor(finite); !errors.Is(err, moments.ErrNoExactMoments) {
		t.Errorf("finite single-qubit set: TransferFor error %v, want ErrNoExactMoments", err)
	}
}

// TestTransferFor: Haar and Clifford get HaarTransfer with no final layer,
// an entangler set the transfer of its entangler with the final layer (the
// rules of circuits.MomentKind).
func TestTransferFor(t *testing.T) {
	for _, spec := range []string{"haar", "clifford"} {
		e, _ := circuits.NewEnsemble(spec)
		tr, final, err := moments.TransferFor(e)
		if err != nil || final || tr != moments.HaarTransfer {
			t.Errorf("%s: TransferFor = %v, %v, %v; want HaarTransfer, no final layer", spec, tr, final, err)
		}
	}
	e, _ := circuits.NewEnsemble("iswap+haar1")
	g, _ := circuits.Entangler("iswap")
	tr, final, err := moments.TransferFor(e)
	if err != nil || !final || tr != moments.EntanglerTransfer(&g) {
		t.Errorf("iswap+haar1: TransferFor = %v, %v, %v; want the iSWAP transfer with a final layer", tr, final, err)
	}
}

// TestExactTooLarge: the size rules give errors wrapping ErrTooLarge before
// any work, and a memory failure of the vector engine (chosen explicitly:
// auto takes the MPS beyond AutoVectorMaxQubits) wraps both ErrTooLarge and
// sim.ErrTooLarge.
func TestExactTooLarge(t *testing.T) {
	ctx := context.Background()
	for _, c := range []struct {
		graph    string
		schedule circuits.ScheduleKind
		memory   bool
	}{
		{"line:1001", circuits.KindLayered, false},                                      // beyond ExactMaxQubits
		{"line:21", circuits.KindRandomEdge, false},                                     // beyond CollisionRandomEdgeMaxQubits
		{"line:" + strconv.Itoa(moments.EngineMaxQubits+1), circuits.KindLayered, true}, // beyond the engine's index range
	} {
		g, s, e := exactInputs(t, c.graph, c.schedule, "haar")
		_, err := moments.Exact(ctx, g, s, e, []int{1}, moments.ExactEngine(moments.EngineVector))
		if !errors.Is(err, moments.ErrTooLarge) || errors.Is(err, sim.ErrTooLarge) != c.memory {
			t.Errorf("%s %s: error %v; want ErrTooLarge (and sim.ErrTooLarge: %v)", c.graph, c.schedule, err, c.memory)
		}
	}
	// The complete graph is exempt from the random-edge limit: 30 qubits by
	// the permutation-symmetric reduction.
	g, s, e := exactInputs(t, "complete:30", circuits.KindRandomEdge, "haar")
	r, err := moments.Exact(ctx, g, s, e, []int{10}, moments.ExactCurveOnly())
	if err != nil || len(r.Collision) != 1 {
		t.Errorf("complete:30 random-edge: %v, %v", r, err)
	}
}
