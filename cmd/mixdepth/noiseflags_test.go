package main

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"mixdepth/circuits"
	"mixdepth/fixtures"
	"mixdepth/runs"
	"mixdepth/sampling"
)

// lineCalibration is a calibration of line:4 (invented values for the
// test): the coupler 1-2 weak, qubit 2's single-qubit gates worse, qubit 0
// reading 1 as 0 often.
const lineCalibration = `# test calibration of line:4 (invented values)
qubit,coupled_to,pair_error,single_error,readout_01,readout_10
1,2,0.03,,,
2,,,0.004,,
0,,,,,0.1
`

// TestSampleCalibration runs sample with a calibration file: the report
// counts the file's rows, the predicted fidelity is the digital model
// element by element (worked by hand below), and the table's metadata
// rebuilds the same ChipNoise (chipFromMeta).
func TestSampleCalibration(t *testing.T) {
	dir := t.TempDir()
	cal := writeFile(t, dir, "line4.csv", lineCalibration)
	out := filepath.Join(dir, "s.arrow")
	stdout, _ := sampleOK(t, "sample", "--graph", "line:4", "--gates", "cz+haar1", "--depth", "4", "--instances", "2", "--shots", "200",
		"--gate-error", "0.01", "--single-qubit-error", "0.001", "--readout-error", "0.02", "--calibration", cal, "--out", out, "--json")
	var doc sampleJSON
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	if doc.Calibration == nil || doc.Calibration.Couplers != 1 || doc.Calibration.Qubits != 2 || doc.SingleQubitError == nil || *doc.SingleQubitError != 0.001 {
		t.Fatalf("calibration %+v, single %v; want 1 coupler, 2 qubits, 0.001", doc.Calibration, doc.SingleQubitError)
	}
	// line:4 layered, depth 4: (0,1), (2,3), (1,2), (0,1), (2,3), (1,2);
	// each gate carries the single-qubit errors of its two qubits, the final
	// layer one per qubit (Arute et al. 2019, the digital error model).
	s := []float64{0.999, 0.999, 0.996, 0.999} // 1 − single, per qubit
	g01 := 0.99 * s[0] * s[1]
	g23 := 0.99 * s[2] * s[3]
	g12 := 0.97 * s[1] * s[2]
	readout := (1 - (0.02+0.1)/2) * math.Pow(1-0.02, 3)
	want := math.Pow(g01*g23*g12, 2) * s[0] * s[1] * s[2] * s[3] * readout
	if math.Abs(doc.PredictedFidelity-want) > 1e-12 {
		t.Errorf("predicted fidelity %.15g, want %.15g", doc.PredictedFidelity, want)
	}
	if doc.Trajectories != 100 {
		t.Errorf("%d trajectories, want the default 100", doc.Trajectories)
	}

	tab := sampleTable(t, out)
	if got, _ := tab.Meta.Get(runs.KeyCalibration); got != lineCalibration {
		t.Errorf("metadata calibration %q, want the file's content", got)
	}
	g, _ := circuits.ParseGraph("line:4")
	rebuilt, err := runs.NoiseFromMeta(tab.Meta, g)
	if err != nil {
		t.Fatal(err)
	}
	direct, err := circuits.ReadCalibration("f", strings.NewReader(lineCalibration), g, circuits.UniformNoise(g, 0.01, 0.001, 0.02, 0.02, 1))
	if err != nil {
		t.Fatal(err)
	}
	if fmt.Sprint(rebuilt.Pair, rebuilt.Single, rebuilt.Readout01, rebuilt.Readout10, rebuilt.Fidelity) !=
		fmt.Sprint(direct.Pair, direct.Single, direct.Readout01, direct.Readout10, direct.Fidelity) {
		t.Errorf("metadata rebuilds %+v, want %+v", rebuilt, direct)
	}
	// An altered calibration in the metadata is refused.
	tab.Meta.Set(runs.KeyCalibration, strings.Replace(lineCalibration, "0.03", "0.003", 1))
	if _, err := runs.NoiseFromMeta(tab.Meta, g); err == nil || !strings.Contains(err.Error(), "altered") {
		t.Errorf("altered calibration: %v", err)
	}

	// Without the new flags the table has none of their keys.
	plain := filepath.Join(dir, "p.arrow")
	sampleOK(t, "sample", "--graph", "line:4", "--depth", "4", "--instances", "1", "--shots", "10", "--gate-error", "0.01", "--out", plain)
	for _, k := range []string{runs.KeyCalibration, runs.KeyCalibrationDigest, runs.KeySingleQubitError} {
		if _, ok := sampleTable(t, plain).Meta.Get(k); ok {
			t.Errorf("a run without --calibration and --single-qubit-error records %s", k)
		}
	}
}

// TestCalibrationBadInput: a bad calibration file, or an output over it,
// exits 2 with one line naming the file and the problem.
func TestCalibrationBadInput(t *testing.T) {
	dir := t.TempDir()
	cal := writeFile(t, dir, "line4.csv", lineCalibration)
	bad := writeFile(t, dir, "bad.csv", "qubit,coupled_to,pair_error\n0,2,0.01\n")
	base := []string{"sample", "--graph", "line:4", "--depth", "2", "--instances", "1", "--shots", "5"}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--calibration", bad}, "bad.csv:2: invalid calibration file: line:4 does not couple qubits 0 and 2"},
		{[]string{"--calibration", filepath.Join(dir, "none.csv")}, "--calibration"},
		{[]string{"--calibration", cal, "--out", cal}, "same file as the input --calibration"},
		{[]string{"--single-qubit-error", "1.5"}, "--single-qubit-error 1.5"},
	} {
		_, stderr, code := runCLI(t, append(base, c.args...)...)
		if code != 2 || !strings.Contains(stderr, c.want) || strings.Count(strings.TrimSpace(stderr), "\n") > 0 {
			t.Errorf("%v: exit %d, %q; want 2 and one line with %q", c.args, code, stderr, c.want)
		}
	}
	if data, _ := os.ReadFile(cal); string(data) != lineCalibration {
		t.Error("the calibration file was changed")
	}
	_, stderr, code := runCLI(t, "plan", "--graph", "line:4", "--calibration", bad)
	if code != 2 || !strings.Contains(stderr, "bad.csv:2") {
		t.Errorf("plan with a bad calibration: exit %d, %q", code, stderr)
	}
}

// TestPlanCalibrationUniform: a calibration that lists every element of the
// demo chip with the uniform rates predicts, element by element, what the
// uniform digital model (ErrorModel.Predict over CountGates) predicts: two
// derivations of Arute et al.'s product of fidelities.
func TestPlanCalibrationUniform(t *testing.T) {
	var b strings.Builder
	b.WriteString("qubit,coupled_to,pair_error,single_error,readout_01,readout_10\n")
	g, _ := fixtures.DemoChip()
	for _, e := range g.Edges {
		fmt.Fprintf(&b, "%d,%d,0.006,,,\n", e.A, e.B)
	}
	for q := range g.Qubits {
		fmt.Fprintf(&b, "%d,,,0.001,0.02,0.04\n", q)
	}
	cal := writeFile(t, t.TempDir(), "uniform.csv", b.String())
	plan := func(args ...string) planJSON {
		t.Helper()
		return planJSONOf(t, append([]string{"--gates", "iswap+haar1", "--depth", "10"}, args...)...)
	}
	want := plan("--gate-error", "0.006", "--single-qubit-error", "0.001", "--readout-error", "0.02,0.04")
	got := plan("--calibration", cal)
	for _, p := range [][2]float64{{got.PredictedFidelity, want.PredictedFidelity}, {got.TwoQubitFidelity, want.TwoQubitFidelity},
		{got.SingleQubitFidelity, want.SingleQubitFidelity}, {got.ReadoutFidelity, want.ReadoutFidelity}} {
		if math.Abs(p[0]-p[1]) > 1e-12*p[1] {
			t.Errorf("with the calibration %.15g, uniform %.15g", p[0], p[1])
		}
	}
	if got.Calibration != cal {
		t.Errorf("JSON calibration %q, want %q", got.Calibration, cal)
	}
}

// TestDemoCalibration reads the shipped calibration of the demo chip
// (invented values): every coupler and qubit set, rates in the plausible
// ranges its comment states, and with --drop 9 the rows of qubit 9 and its
// four couplers skipped.
func TestDemoCalibration(t *testing.T) {
	const path = "../../fixtures/tarn16-calibration.csv"
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	g, _ := fixtures.DemoChip()
	c, err := circuits.ReadCalibrationInfo(path, strings.NewReader(string(data)), g, circuits.UniformNoise(g, 0, 0, 0, 0, 1))
	if err != nil {
		t.Fatal(err)
	}
	if c.Couplers != len(g.Edges) || c.Qubits != g.Qubits || c.Skipped != 0 {
		t.Errorf("%d couplers, %d qubits, %d skipped; want %d, %d, 0", c.Couplers, c.Qubits, c.Skipped, len(g.Edges), g.Qubits)
	}
	in := func(v, lo, hi float64) bool { return v >= lo && v <= hi }
	for i, v := range c.Noise.Pair {
		if !in(v, 0.003, 0.015) {
			t.Errorf("coupler %v: rate %v outside 0.3–1.5%%", g.Edges[i], v)
		}
	}
	for q := range g.Qubits {
		if !in(c.Noise.Single[q], 0.0002, 0.001) || !in(c.Noise.Readout01[q], 0.01, 0.05) || !in(c.Noise.Readout10[q], 0.01, 0.05) {
			t.Errorf("qubit %d: rates %v, %v, %v outside the stated ranges", q, c.Noise.Single[q], c.Noise.Readout01[q], c.Noise.Readout10[q])
		}
	}
	stdout, _ := sampleOK(t, "sample", "--depth", "2", "--instances", "1", "--shots", "20", "--drop", "9", "--calibration", path, "--json")
	var doc sampleJSON
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	if doc.Calibration == nil || doc.Calibration.Skipped != 5 || doc.Calibration.Qubits != 15 || doc.Calibration.Couplers != len(g.Edges)-4 {
		t.Errorf("--drop 9: calibration %+v; want 5 rows skipped, 15 qubits, %d couplers", doc.Calibration, len(g.Edges)-4)
	}
}

// TestSampleCalibrationUniformSameShots: a calibration file that sets
// nothing (a header alone) leaves the uniform rates, and the shots are
// those of the same run without the file, row for row: the per-element
// sampler draws what the uniform one draws.
func TestSampleCalibrationUniformSameShots(t *testing.T) {
	dir := t.TempDir()
	empty := writeFile(t, dir, "empty.csv", "# no entries\nqubit,coupled_to,pair_error\n")
	args := []string{"sample", "--graph", "grid:2x3", "--gates", "cz+haar1", "--depth", "6", "--instances", "3", "--shots", "300",
		"--gate-error", "0.02", "--readout-error", "0.03,0.05", "--fidelity", "0.9"}
	a, b := filepath.Join(dir, "a.arrow"), filepath.Join(dir, "b.arrow")
	sampleOK(t, append(args, "--out", a)...)
	sampleOK(t, append(args, "--out", b, "--calibration", empty)...)
	ra, _, err := sampling.ReadSampleTable(a)
	if err != nil {
		t.Fatal(err)
	}
	rb, _, err := sampling.ReadSampleTable(b)
	if err != nil {
		t.Fatal(err)
	}
	if len(ra) != len(rb) || len(ra) != 900 {
		t.Fatalf("%d and %d rows, want 900", len(ra), len(rb))
	}
	for i := range ra {
		if ra[i].Instance != rb[i].Instance || ra[i].Bitstring != rb[i].Bitstring || ra[i].PIdeal != rb[i].PIdeal {
			t.Fatalf("row %d: %+v without the file, %+v with it", i+1, ra[i], rb[i])
		}
	}
}
