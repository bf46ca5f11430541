package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"mixdepth/sampling"
	"mixdepth/stats"
	"mixdepth/tables"
)

// sampleOK runs the command line and fails the test unless it exits 0.
func sampleOK(t *testing.T, args ...string) (stdout, stderr string) {
	t.Helper()
	stdout, stderr, code := runCLI(t, args...)
	if code != 0 {
		t.Fatalf("%v: exit %d: %s", args, code, stderr)
	}
	return stdout, stderr
}

// sampleTable reads a table or fails the test.
func sampleTable(t *testing.T, path string) *tables.Table {
	t.Helper()
	tab, err := tables.Read(path)
	if err != nil {
		t.Fatal(err)
	}
	return tab
}

// scoreDoc runs score --json and decodes its document.
func scoreDoc(t *testing.T, args ...string) scoreJSON {
	t.Helper()
	stdout, _ := sampleOK(t, append([]string{"score", "--json"}, args...)...)
	var doc scoreJSON
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatalf("bad JSON: %v\n%s", err, stdout)
	}
	return doc
}

// A small noisy run used by several tests: well under a second.
var smallSample = []string{"sample", "--graph", "line:5", "--depth", "8", "--instances", "4", "--shots", "300",
	"--seed", "3", "--gate-error", "0.02", "--readout-error", "0.01,0.02", "--fidelity", "0.9", "--workers", "1"}

// TestSampleTable checks the columns, rows and metadata of a sample table,
// and that bitstring, outcome and p_ideal agree with each other
// (x = Σ b_q 2^q, qubit 0 first).
func TestSampleTable(t *testing.T) {
	dir := t.TempDir()
	out, circ := filepath.Join(dir, "s.parquet"), filepath.Join(dir, "c.json")
	sampleOK(t, append(smallSample, "--out", out, "--circuits", circ)...)
	tab := sampleTable(t, out)
	want := []struct {
		name string
		typ  tables.Type
	}{{"instance", tables.Int64}, {"shot", tables.Int64}, {"bitstring", tables.String}, {"outcome", tables.Int64}, {"p_ideal", tables.Float64}}
	if len(tab.Fields) != len(want) {
		t.Fatalf("columns %v", tab.Fields)
	}
	for i, w := range want {
		if tab.Fields[i].Name != w.name || tab.Fields[i].Type != w.typ {
			t.Errorf("column %d is %s %s, want %s %s", i, tab.Fields[i].Name, tab.Fields[i].Type, w.name, w.typ)
		}
	}
	if tab.Len() != 4*300 {
		t.Fatalf("%d rows, want 1200", tab.Len())
	}
	inst, _ := tab.Int64s("instance")
	shot, _ := tab.Int64s("shot")
	bits, _ := tab.Strings("bitstring")
	outcome, _ := tab.Int64s("outcome")
	p, _ := tab.Float64s("p_ideal")
	for i := range tab.Len() {
		if inst[i] != int64(i/300) || shot[i] != int64(i%300) {
			t.Fatalf("row %d is instance %d shot %d", i, inst[i], shot[i])
		}
		var x int64
		for q, c := range bits[i] {
			if c == '1' {
				x |= 1 << q
			}
		}
		if len(bits[i]) != 5 || x != outcome[i] || !(p[i] >= 0 && p[i] <= 1) {
			t.Fatalf("row %d: bitstring %q, outcome %d, p_ideal %g", i, bits[i], outcome[i], p[i])
		}
	}
	for k, v := range map[string]string{
		"command": "sample", "seed": "3", "graph": "line:5", "qubits": "5", "schedule": "layered", "gates": "haar",
		"depth": "8", "gate_count": "16", "instances": "4", "shots": "300", "fidelity": "0.9", "gate_error": "0.02",
		"readout_error": "0.01,0.02", "trajectories": "100", "part": "0/1", "partial": "false", "instances_done": "0-3",
		"edges": "0-1,1-2,2-3,3-4", "layers": "0-1,2-3;1-2,3-4",
	} {
		if got, ok := tab.Meta.Get(k); !ok || got != v {
			t.Errorf("metadata %s = %q, want %q", k, got, v)
		}
	}
	for _, k := range []string{"tool_version", "command_line", "graph_digest", "layout"} {
		if _, ok := tab.Meta.Get(k); !ok {
			t.Errorf("metadata has no %s", k)
		}
	}
	data, err := os.ReadFile(circ)
	if err != nil {
		t.Fatal(err)
	}
	f, err := sampling.ReadCircuits(circ, bytes.NewReader(data))
	if err != nil || len(f.Circuits) != 4 || f.Depth != 8 || f.Seed != 3 || f.Partial {
		t.Fatalf("circuit file: %v %+v", err, f)
	}
}

// TestSampleScore: score reports the linear XEB of Boixo et al. 2018
// (Nature Physics 14, 595), F_lin = D·mean p − 1, computed here from the
// table's p_ideal column, whether the circuits come from the circuit file or
// are rebuilt from the table's metadata, and a CSV of the measured bits
// alone scores the same.
func TestSampleScore(t *testing.T) {
	dir := t.TempDir()
	out, circ := filepath.Join(dir, "s.arrow"), filepath.Join(dir, "c.json")
	sampleOK(t, append(smallSample, "--out", out, "--circuits", circ)...)
	tab := sampleTable(t, out)
	p, _ := tab.Float64s("p_ideal")
	var sum float64
	for _, v := range p {
		sum += v
	}
	want := 32*sum/float64(len(p)) - 1

	fromFile := scoreDoc(t, out, "--circuits", circ)
	rebuilt := scoreDoc(t, out)
	if fromFile.LinearXEB == nil || math.Abs(*fromFile.LinearXEB-want) > 1e-12 {
		t.Errorf("linear_xeb %v, want D·mean p − 1 = %.15g", fromFile.LinearXEB, want)
	}
	if *rebuilt.LinearXEB != *fromFile.LinearXEB || *rebuilt.IdealXEB != *fromFile.IdealXEB || *rebuilt.LogXEB != *fromFile.LogXEB {
		t.Errorf("rebuilt circuits score differently: %+v vs %+v", rebuilt, fromFile)
	}
	if len(fromFile.Instances) != 4 || fromFile.Shots != 1200 || fromFile.Qubits != 5 {
		t.Fatalf("document %+v", fromFile)
	}
	// The pooled ideal value is the shot-weighted mean of the instances'.
	var ideal float64
	for _, s := range fromFile.Instances {
		ideal += *s.IdealXEB / 4
		if s.Shots != 300 || math.Abs(*s.NormalizedXEB - *s.LinearXEB / *s.IdealXEB) > 1e-12 {
			t.Errorf("instance %+v", s)
		}
	}
	if math.Abs(ideal-*fromFile.IdealXEB) > 1e-12 || math.Abs(*fromFile.NormalizedXEB-want/ideal) > 1e-12 {
		t.Errorf("ideal_xeb %v normalized_xeb %v, want %v and %v", *fromFile.IdealXEB, *fromFile.NormalizedXEB, ideal, want/ideal)
	}

	// Measured data: a CSV with only instance and bitstring, scored with the
	// same flags the run used.
	inst, _ := tab.Int64s("instance")
	bits, _ := tab.Strings("bitstring")
	var csv strings.Builder
	csv.WriteString("instance,bitstring\n")
	for i := range inst {
		fmt.Fprintf(&csv, "%d,%s\n", inst[i], bits[i])
	}
	path := writeFile(t, dir, "m.csv", csv.String())
	measured := scoreDoc(t, path, "--graph", "line:5", "--depth", "8", "--seed", "3")
	if *measured.LinearXEB != *fromFile.LinearXEB || *measured.LogXEBStderr != *fromFile.LogXEBStderr {
		t.Errorf("CSV scores %v, table %v", *measured.LinearXEB, *fromFile.LinearXEB)
	}
	viaFile := scoreDoc(t, path, "--circuits", circ)
	if *viaFile.LinearXEB != *fromFile.LinearXEB {
		t.Errorf("CSV with --circuits scores %v, table %v", *viaFile.LinearXEB, *fromFile.LinearXEB)
	}
	// The documented JSON field names.
	stdout, _ := sampleOK(t, "score", "--json", out)
	var raw map[string]any
	if err := json.Unmarshal([]byte(stdout), &raw); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"linear_xeb", "linear_xeb_stderr", "log_xeb", "log_xeb_stderr", "normalized_xeb", "instance_scores"} {
		if _, ok := raw[k]; !ok {
			t.Errorf("score --json has no %q", k)
		}
	}
	first := raw["instance_scores"].([]any)[0].(map[string]any)
	for _, k := range []string{"instance", "linear_xeb", "linear_xeb_stderr", "log_xeb", "log_xeb_stderr", "ideal_xeb", "normalized_xeb"} {
		if _, ok := first[k]; !ok {
			t.Errorf("score --json instances[0] has no %q", k)
		}
	}
}

// TestScoreWarnsWithoutAnticoncentration: at depth 1 a line's outputs are
// products of two-qubit states, far from Porter–Thomas, so D·Z − 1 is far
// above (D−1)/(D+1) and the raw XEB overstates the fidelity (Boixo et al.
// 2018): score warns but still exits 0.
func TestScoreWarnsWithoutAnticoncentration(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "shallow.parquet")
	sampleOK(t, "sample", "--graph", "line:6", "--depth", "1", "--instances", "5", "--shots", "200", "--out", out)
	stdout, stderr := sampleOK(t, "score", out)
	if !strings.Contains(stderr, "warning: the circuits have not anti-concentrated") || !strings.Contains(stderr, "overstates") {
		t.Errorf("no warning on stderr: %q", stderr)
	}
	if !strings.Contains(stdout, "are NOT spread") {
		t.Errorf("report does not say so: %s", stdout)
	}
	doc := scoreDoc(t, out)
	if doc.Spread || len(doc.Warnings) != 1 || *doc.IdealXEB < 2 {
		t.Errorf("anticoncentrated %v, warnings %q, ideal %v", doc.Spread, doc.Warnings, *doc.IdealXEB)
	}
	deep := filepath.Join(dir, "deep.parquet")
	sampleOK(t, "sample", "--graph", "line:6", "--depth", "20", "--instances", "5", "--shots", "200", "--out", deep)
	if _, stderr := sampleOK(t, "score", deep); strings.Contains(stderr, "warning") {
		t.Errorf("deep circuits warned: %q", stderr)
	}
}

// TestSampleParts: the parts of a run hold the run's rows (the same
// per-instance streams keyed by (seed, instance)) and record the part and
// the full run's parameters.
func TestSampleParts(t *testing.T) {
	dir := t.TempDir()
	single := filepath.Join(dir, "all.arrow")
	sampleOK(t, append(smallSample, "--out", single)...)
	all := sampleTable(t, single)
	allBits, _ := all.Strings("bitstring")
	allP, _ := all.Float64s("p_ideal")
	for k := range 2 {
		p := filepath.Join(dir, "s"+strconv.Itoa(k)+".arrow")
		cp := filepath.Join(dir, "c"+strconv.Itoa(k)+".json")
		sampleOK(t, append(smallSample, "--part", strconv.Itoa(k)+"/2", "--workers", "2", "--out", p, "--circuits", cp)...)
		tab := sampleTable(t, p)
		inst, _ := tab.Int64s("instance")
		shot, _ := tab.Int64s("shot")
		bits, _ := tab.Strings("bitstring")
		pi, _ := tab.Float64s("p_ideal")
		if tab.Len() != 600 {
			t.Fatalf("part %d/2: %d rows, want 600", k, tab.Len())
		}
		for i := range inst {
			j := int(inst[i])*300 + int(shot[i])
			if int(inst[i])%2 != k || bits[i] != allBits[j] || pi[i] != allP[j] {
				t.Fatalf("part %d/2 row %d (instance %d shot %d) differs from the whole run", k, i, inst[i], shot[i])
			}
		}
		wantDone := map[int]string{0: "0,2", 1: "1,3"}[k]
		for key, v := range map[string]string{"part": strconv.Itoa(k) + "/2", "instances": "4", "instances_done": wantDone, "partial": "false"} {
			if got, _ := tab.Meta.Get(key); got != v {
				t.Errorf("part %d/2: metadata %s = %q, want %q", k, key, got, v)
			}
		}
		// Each part scores with its own circuit file.
		if doc := scoreDoc(t, p, "--circuits", cp); len(doc.Instances) != 2 {
			t.Errorf("part %d/2 scored %d instances", k, len(doc.Instances))
		}
	}
}

// TestSampleInterrupt: a run cancelled after its first instance writes that
// instance as a valid table and circuit file marked partial, says where it
// stopped on stderr, and exits 130.
func TestSampleInterrupt(t *testing.T) {
	dir := t.TempDir()
	out, circ := filepath.Join(dir, "p.parquet"), filepath.Join(dir, "p.json")
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	testHookSampleProgress = cancel
	defer func() { testHookSampleProgress = nil }()
	var stdout, stderr bytes.Buffer
	args := append(smallSample[:len(smallSample):len(smallSample)], "--instances", "6", "--out", out, "--circuits", circ)
	code := exitCode(run(ctx, args, &stdout, &stderr), &stderr)
	if code != 130 {
		t.Fatalf("exit %d, want 130; stderr %q", code, stderr.String())
	}
	if !strings.Contains(stderr.String(), "interrupted after 1 of 6 instance(s)") || !strings.Contains(stderr.String(), out) {
		t.Errorf("stderr %q does not say where it stopped", stderr.String())
	}
	tab := sampleTable(t, out)
	for k, v := range map[string]string{"partial": "true", "instances_done": "0", "instances": "6"} {
		if got, _ := tab.Meta.Get(k); got != v {
			t.Errorf("metadata %s = %q, want %q", k, got, v)
		}
	}
	inst, _ := tab.Int64s("instance")
	if tab.Len() != 300 || inst[0] != 0 || inst[299] != 0 {
		t.Errorf("partial table has %d rows", tab.Len())
	}
	data, err := os.ReadFile(circ)
	if err != nil {
		t.Fatal(err)
	}
	f, err := sampling.ReadCircuits(circ, bytes.NewReader(data))
	if err != nil || !f.Partial || len(f.Circuits) != 1 {
		t.Fatalf("partial circuit file: %v, %+v", err, f)
	}
	// The partial table scores, with a note that it is partial.
	testHookSampleProgress = nil
	if _, stderr := sampleOK(t, "score", out); !strings.Contains(stderr, "partial") {
		t.Errorf("score of a partial table: stderr %q", stderr)
	}
}

// TestSampleDemoChip: with no --graph the three commands use the demo chip,
// as scan does.
func TestSampleDemoChip(t *testing.T) {
	dir := t.TempDir()
	out, circ := filepath.Join(dir, "demo.parquet"), filepath.Join(dir, "demo.json")
	stdout, _ := sampleOK(t, "sample", "--depth", "4", "--instances", "2", "--shots", "50", "--readout-error", "0.02", "--out", out, "--circuits", circ)
	if !strings.Contains(stdout, "tarn16") {
		t.Errorf("sample did not use the demo chip: %s", stdout)
	}
	if g, _ := sampleTable(t, out).Meta.Get("qubits"); g != "16" {
		t.Errorf("qubits %q, want 16", g)
	}
	a, b := scoreDoc(t, out), scoreDoc(t, out, "--circuits", circ)
	if *a.LinearXEB != *b.LinearXEB || a.Qubits != 16 {
		t.Errorf("demo scores %v and %v", *a.LinearXEB, *b.LinearXEB)
	}
	if stdout, _ := sampleOK(t, "plan", "--gate-error", "0.005"); !strings.Contains(stdout, "tarn16") || !strings.Contains(stdout, "92 two-qubit gates") {
		t.Errorf("plan: %s", stdout)
	}
}

// TestPlan checks plan's predicted fidelity against the digital error model
// (Arute et al. 2019, Nature 574, 505: the product of the gate and readout
// fidelities) on gate counts made by hand, and its sample counts against
// N = z²(1 + 2f − f²)/f² and N = (1 + 2f − f²)/(r·f)² (linear XEB under global depolarization, per-sample variance 1 + 2f − f²).
func TestPlan(t *testing.T) {
	plan := func(args ...string) planJSON { t.Helper(); return planJSONOf(t, args...) }
	// line:4 layered: class A = (0,1), (2,3), class B = (1,2); depth 4 is
	// A, B, A, B: 6 gates.
	doc := plan("--graph", "line:4", "--depth", "4", "--gate-error", "0.01", "--single-qubit-error", "0.001",
		"--readout-error", "0.02,0.04", "--sigmas", "3", "--rel-precision", "0.05")
	f := math.Pow(0.99, 6) * math.Pow(1-0.03, 4)
	shots := func(f float64) (nz, nr float64) {
		return math.Ceil(9 * (1 + 2*f - f*f) / (f * f)), math.Ceil((1 + 2*f - f*f) / (0.05 * f * 0.05 * f))
	}
	if doc.TwoQubitGates != 6 || doc.SingleQubitGates != 0 || math.Abs(*doc.DigitalFidelity-f) > 1e-12 {
		t.Errorf("gates %d/%d, digital fidelity %v; want 6/0 and %v", doc.TwoQubitGates, doc.SingleQubitGates, *doc.DigitalFidelity, f)
	}
	// The plan's F is the exact expected XEB (TestPlanExactPrediction); the
	// shot formulas take it, and the digital model's F gives digital_shots.
	if doc.FidelitySource != "exact" || doc.XEBExpected == nil || doc.PredictedFidelity != *doc.XEBExpected {
		t.Errorf("fidelity source %q, predicted %v, xeb_expected %v", doc.FidelitySource, doc.PredictedFidelity, doc.XEBExpected)
	}
	nz, nr := shots(doc.PredictedFidelity)
	if *doc.ShotsSigmas != int64(nz) || *doc.ShotsRelPrecision != int64(nr) || doc.Shots != int64(max(nz, nr)) {
		t.Errorf("samples %d, %d, %d; want %v, %v", *doc.ShotsSigmas, *doc.ShotsRelPrecision, doc.Shots, nz, nr)
	}
	if nz, nr := shots(f); doc.DigitalShots == nil || *doc.DigitalShots != int64(max(nz, nr)) {
		t.Errorf("digital shots %v, want %v", doc.DigitalShots, max(nz, nr))
	}
	// A dressed gate set G·(u_a ⊗ u_b) with a final layer: 2 single-qubit
	// gates per two-qubit gate plus one per qubit.
	doc = plan("--graph", "line:4", "--depth", "4", "--gates", "cz+haar1", "--single-qubit-error", "0.001")
	if doc.SingleQubitGates != 16 || math.Abs(*doc.DigitalFidelity-math.Pow(0.999, 16)) > 1e-12 {
		t.Errorf("cz+haar1: %d single-qubit gates, fidelity %v", doc.SingleQubitGates, *doc.DigitalFidelity)
	}
	// --fidelity alone, the default 5σ: Arute et al.'s f ≈ 0.002 needs
	// about 25/f² ≈ 6.3 million shots.
	doc = plan("--fidelity", "0.002")
	if doc.DigitalFidelity != nil || doc.ShotsRelPrecision != nil || doc.Shots != int64(math.Ceil(stats.XEBSamples(0.002, 5))) {
		t.Errorf("--fidelity 0.002: %+v", doc)
	}
	if doc.Shots < 6_200_000 || doc.Shots > 6_300_000 {
		t.Errorf("--fidelity 0.002: %d samples, want about 25·1.004/0.002² ≈ 6.27 million", doc.Shots)
	}
	// --rel-precision alone drops the default --sigmas.
	doc = plan("--fidelity", "0.5", "--rel-precision", "0.1")
	if doc.ShotsSigmas != nil || doc.Shots != int64(math.Ceil(1.75/0.0025)) {
		t.Errorf("--rel-precision alone: %+v", doc)
	}
}

// TestSampleScorePlanBadInput: every bad input exits 2 with one line naming
// the offending value, row or field.
func TestSampleScorePlanBadInput(t *testing.T) {
	dir := t.TempDir()
	out, circ := filepath.Join(dir, "s.parquet"), filepath.Join(dir, "c.json")
	sampleOK(t, "sample", "--graph", "line:4", "--depth", "4", "--instances", "2", "--shots", "20", "--seed", "9", "--out", out, "--circuits", circ)
	csvFile := func(name, text string) string { return writeFile(t, dir, name, text) }
	// The run's table with row 3 moved to instance 5 of a 2-instance run.
	tab := sampleTable(t, out)
	inst, _ := tab.Int64s("instance")
	inst[2] = 5
	beyond := filepath.Join(dir, "beyond.arrow")
	if err := tables.WriteTable(beyond, tab); err != nil {
		t.Fatal(err)
	}
	badCircuit := writeFile(t, dir, "bad.json", `{"format": "mixdepth-circuits", "version": 1, "qubits": 4, "depth": 1, "edges": [[0, 1], [1, 2], [2, 3]], "circuits": [{"instance": 0, "steps": [[{"qubits": [0, 1], "matrix": [[[1, 0]]]}]]}]}`)
	cases := []struct {
		name string
		args []string
		want []string
	}{
		{"depth", []string{"sample", "--graph", "line:4", "--depth", "0"}, []string{"--depth 0"}},
		{"shots", []string{"sample", "--graph", "line:4", "--shots", "0"}, []string{"--shots 0"}},
		{"instances", []string{"sample", "--graph", "line:4", "--instances", "0"}, []string{"--instances 0"}},
		{"fidelity", []string{"sample", "--graph", "line:4", "--fidelity", "1.5"}, []string{"--fidelity 1.5"}},
		{"gate error", []string{"sample", "--graph", "line:4", "--gate-error", "-0.1"}, []string{"--gate-error -0.1"}},
		{"readout three", []string{"sample", "--graph", "line:4", "--readout-error", "0.1,0.2,0.3"}, []string{"--readout-error", "p01,p10"}},
		{"readout word", []string{"sample", "--graph", "line:4", "--readout-error", "0.1,x"}, []string{"--readout-error", `"x"`}},
		{"readout range", []string{"sample", "--graph", "line:4", "--readout-error", "2"}, []string{"--readout-error", "[0, 1]"}},
		{"trajectories", []string{"sample", "--graph", "line:4", "--trajectories", "0"}, []string{"--trajectories 0"}},
		{"part", []string{"sample", "--graph", "line:4", "--part", "2/2"}, []string{"--part"}},
		{"empty part", []string{"sample", "--graph", "line:4", "--instances", "2", "--part", "3/4"}, []string{"selects no instance"}},
		{"circuits name", []string{"sample", "--graph", "line:4", "--circuits", filepath.Join(dir, "c.txt")}, []string{"--circuits", ".json"}},
		{"circuits dir", []string{"sample", "--graph", "line:4", "--circuits", filepath.Join(dir, "no", "c.json")}, []string{"--circuits"}},
		{"out format", []string{"sample", "--graph", "line:4", "--out", filepath.Join(dir, "t.csv")}, []string{".arrow or .parquet"}},
		{"sample positional", []string{"sample", "extra"}, []string{"positional"}},
		{"sample qubits", []string{"sample", "--graph", "line:40", "--depth", "2"}, []string{"40 qubits", "2 to 32"}},

		{"no table", []string{"score"}, []string{"one sample table"}},
		{"missing table", []string{"score", filepath.Join(dir, "absent.parquet")}, []string{"absent.parquet"}},
		{"table format", []string{"score", filepath.Join(dir, "t.txt")}, []string{".csv"}},
		{"empty csv", []string{"score", csvFile("empty.csv", "")}, []string{"empty.csv", "no shots"}},
		{"header only", []string{"score", csvFile("header.csv", "instance,bitstring\n")}, []string{"header.csv", "no shots"}},
		{"no bitstring column", []string{"score", csvFile("cols.csv", "instance,bits\n0,0101\n")}, []string{"cols.csv", "bitstring"}},
		{"short bitstring", []string{"score", csvFile("short.csv", "instance,bitstring\n0,0101\n1,010\n"), "--graph", "line:4", "--depth", "4", "--seed", "9"},
			[]string{"short.csv: line 3", "column bitstring", `"010"`}},
		{"bad character", []string{"score", csvFile("char.csv", "instance,bitstring\n0,01x1\n"), "--graph", "line:4", "--depth", "4"},
			[]string{"char.csv: line 2", "column bitstring", `'x'`}},
		{"unknown instance in file", []string{"score", csvFile("unk.csv", "instance,bitstring\n0,0101\n7,0101\n"), "--circuits", circ},
			[]string{"unk.csv: line 3", "column instance", "instance 7", "instances 0-1"}},
		{"negative instance", []string{"score", csvFile("unk2.csv", "instance,bitstring\n-1,0101\n"), "--graph", "line:4"}, []string{"unk2.csv: line 2", "instance -1"}},
		{"instance beyond the run", []string{"score", beyond}, []string{"beyond.arrow: row 3", "instance 5"}},
		{"p above 1", []string{"score", csvFile("p.csv", "instance,bitstring,p_ideal\n0,0101,1.5\n"), "--circuits", circ},
			[]string{"p.csv: line 2", "column p_ideal", "outside [0, 1]"}},
		{"p negative", []string{"score", csvFile("pn.csv", "instance,bitstring,p_ideal\n0,0101,-0.5\n"), "--circuits", circ},
			[]string{"pn.csv: line 2", "column p_ideal"}},
		{"p mismatch", []string{"score", out, "--seed", "10"}, []string{"s.parquet: row 1", "column p_ideal", "does not match"}},
		{"graph mismatch", []string{"score", out, "--graph", "line:5"}, []string{"sampled on graph line:4"}},
		{"circuits off graph", []string{"score", out, "--circuits", circ, "--graph", "star:4"}, []string{"does not match the graph", "circuits[0].steps[0][1].qubits"}},
		{"circuits qubits", []string{"score", csvFile("q.csv", "instance,bitstring\n0,0101\n"), "--circuits", circ, "--graph", "line:5"}, []string{"field qubits"}},
		{"circuits malformed", []string{"score", csvFile("m.csv", "instance,bitstring\n0,0101\n"), "--circuits", badCircuit}, []string{"bad.json", "circuits[0].steps[0][0].matrix"}},
		{"circuits and depth", []string{"score", out, "--circuits", circ, "--depth", "3"}, []string{"drop --depth"}},
		{"score qubits", []string{"score", csvFile("big.csv", "instance,bitstring\n0,"+strings.Repeat("0", 40)+"\n"), "--graph", "line:40", "--depth", "2"},
			[]string{"40 qubits", "2 to 32"}},

		{"plan needs f", []string{"plan"}, []string{"--fidelity"}},
		{"plan f zero", []string{"plan", "--fidelity", "0"}, []string{"--fidelity 0"}},
		{"plan f big", []string{"plan", "--fidelity", "1.5"}, []string{"--fidelity 1.5"}},
		{"plan sigmas", []string{"plan", "--fidelity", "0.5", "--sigmas", "0"}, []string{"--sigmas 0"}},
		{"plan rel", []string{"plan", "--fidelity", "0.5", "--rel-precision", "-1"}, []string{"--rel-precision -1"}},
		{"plan gate error", []string{"plan", "--gate-error", "1"}, []string{"--gate-error 1"}},
		{"plan readout", []string{"plan", "--readout-error", "a"}, []string{"--readout-error"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			stdout, stderr, code := runCLI(t, c.args...)
			if code != 2 {
				t.Fatalf("exit %d, want 2; stderr %q", code, stderr)
			}
			if stdout != "" {
				t.Errorf("stdout not empty: %q", stdout)
			}
			lines := strings.Split(strings.TrimRight(stderr, "\n"), "\n")
			if len(lines) != 1 || !strings.HasPrefix(lines[0], "mixdepth: ") {
				t.Errorf("want one 'mixdepth: ' line on stderr, got %q", stderr)
			}
			for _, w := range c.want {
				if !strings.Contains(stderr, w) {
					t.Errorf("stderr %q does not mention %q", stderr, w)
				}
			}
		})
	}
	if left, _ := filepath.Glob(filepath.Join(dir, ".*.tmp")); len(left) > 0 {
		t.Errorf("failed runs left temporary files: %v", left)
	}
}

// TestExitCodeSamplingErrors: every sentinel of package sampling for bad
// input or data maps to exit status 2 through exitCode's list, however
// deeply it is wrapped, while another error stays a failure while running.
func TestExitCodeSamplingErrors(t *testing.T) {
	for _, s := range []error{
		sampling.ErrConfig, sampling.ErrNoiseRange, sampling.ErrCircuitFile, sampling.ErrCircuitMismatch,
		sampling.ErrEmpty, sampling.ErrColumn, sampling.ErrColumnType, sampling.ErrNull, sampling.ErrNotNumber, sampling.ErrBitstring, sampling.ErrInstance,
		sampling.ErrProbability, sampling.ErrMismatch,
	} {
		err := fmt.Errorf("--circuits c.json: %w", &sampling.RowError{File: "t.csv", Err: s})
		if code := exitCode(err, io.Discard); code != 2 {
			t.Errorf("%v: exit %d, want 2", s, code)
		}
	}
	if code := exitCode(fmt.Errorf("sampling: writing: %w", os.ErrClosed), io.Discard); code != 1 {
		t.Errorf("a failure while running: exit %d, want 1", code)
	}
}
