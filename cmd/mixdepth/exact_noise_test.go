package main

import (
	"context"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/sampling"
	"mixdepth/tables"
)

// TestExactNoiseJSONMatchesLibrary: `exact --json` with noise flags and a
// list of gate errors prints, one block per rate, what moments.Exact with
// ExactNoise computes for the uniform chip noise of the flags (the values
// themselves are checked against the dense brute force in moments), with
// gate_error in every row and the 1%/5% agreement depths of each block.
func TestExactNoiseJSONMatchesLibrary(t *testing.T) {
	args := []string{"--graph", "line:6", "--gates", "cz+haar1", "--depths", "2:30:4", "--gate-error", "0.002,0.01",
		"--single-qubit-error", "0.001", "--readout-error", "0.01,0.03", "--fidelity", "0.97"}
	doc := exactJSONOf(t, args...)
	g, _ := circuits.ParseGraph("line:6")
	s, _ := circuits.NewSchedule(circuits.KindLayered, g)
	e, _ := circuits.NewEnsemble("cz+haar1")
	depths, _ := parseDepths("2:30:4")
	rates := []float64{0.002, 0.01}
	if doc.Noise == nil || len(doc.Noise.GateErrors) != 2 || doc.Noise.Readout10 != 0.03 || doc.Noise.Fidelity != 0.97 {
		t.Fatalf("noise block %+v", doc.Noise)
	}
	if len(doc.Rows) != len(rates)*len(depths) || len(doc.XEBAgreement) != len(rates) {
		t.Fatalf("%d rows and %d agreement entries, want %d and %d", len(doc.Rows), len(doc.XEBAgreement), len(rates)*len(depths), len(rates))
	}
	for k, rate := range rates {
		r, err := moments.Exact(context.Background(), g, s, e, depths, moments.ExactCurveOnly(),
			moments.ExactNoise(circuits.UniformNoise(g, rate, 0.001, 0.01, 0.03, 0.97)))
		if err != nil {
			t.Fatal(err)
		}
		for i, d := range depths {
			row := doc.Rows[k*len(depths)+i]
			if row.Depth != d || row.GateError == nil || *row.GateError != rate || row.XEBExpected == nil ||
				*row.XEBExpected != r.XEBExpected[i] || *row.XEBIdeal != r.XEBIdeal[i] || *row.XEBNormalized != r.XEBNormalized[i] ||
				*row.DigitalFidelity != r.DigitalFidelity[i] || *row.XEBOverDigital != r.XEBOverDigital[i] {
				t.Errorf("rate %g depth %d: row %+v, library %v %v %v", rate, d, row, r.XEBExpected[i], r.DigitalFidelity[i], r.XEBOverDigital[i])
			}
		}
		// The agreement depth is the first from which every later ratio is
		// within the band: checked here from the rows themselves.
		a := doc.XEBAgreement[k]
		for _, c := range []struct {
			tol float64
			got *int
		}{{0.01, a.Within1}, {0.05, a.Within5}} {
			want := -1
			for i := len(depths) - 1; i >= 0 && math.Abs(r.XEBOverDigital[i]-1) <= c.tol; i-- {
				want = depths[i]
			}
			if (want < 0) != (c.got == nil) || c.got != nil && *c.got != want {
				t.Errorf("rate %g within %g: %v, want %d (−1: none)", rate, c.tol, c.got, want)
			}
		}
	}
	// A single rate: no gate_error in the rows, the rate is in the noise block.
	one := exactJSONOf(t, "--graph", "line:4", "--depths", "3", "--gate-error", "0.01")
	if len(one.Rows) != 1 || one.Rows[0].GateError != nil || one.Rows[0].XEBExpected == nil || one.Noise.GateErrors[0] != 0.01 {
		t.Errorf("single rate: %+v, noise %+v", one.Rows, one.Noise)
	}
	// No noise flag: no benchmark fields.
	none := exactJSONOf(t, "--graph", "line:4", "--depths", "3")
	if none.Noise != nil || none.Rows[0].XEBExpected != nil {
		t.Errorf("without noise flags the JSON has benchmark fields: %+v", none.Rows[0])
	}
}

// TestExactNoiseDigitalCountGates: with uniform rates the digital fidelity
// that exact reports is the ErrorModel.Predict of sampling.CountGates (the
// digital error model, Arute et al., "Quantum supremacy using a
// programmable superconducting processor", Nature 574, 505, 2019), counted
// independently by the sampler, for a layered gate set with single-qubit
// gates, Haar gates, and the random-edge schedule. Tolerance 1e-14: both
// are products of a few hundred factors near 1.
func TestExactNoiseDigitalCountGates(t *testing.T) {
	for _, c := range []struct {
		graph, gates string
		kind         circuits.ScheduleKind
		depths       []int
	}{
		{"grid:2x3", "cz+haar1", circuits.KindLayered, []int{1, 2, 7, 20}},
		{"line:5", "haar", circuits.KindLayered, []int{1, 3, 10}},
		{"ring:5", "sqrt-iswap+haar1", circuits.KindRandomEdge, []int{1, 10, 50}},
	} {
		g, _ := circuits.ParseGraph(c.graph)
		s, _ := circuits.NewSchedule(c.kind, g)
		e, _ := circuits.NewEnsemble(c.gates)
		m := sampling.ErrorModel{TwoQubitError: 0.007, SingleQubitError: 0.0011, Depolarizing: 0.98, Readout01: 0.012, Readout10: 0.031}
		nz := circuits.UniformNoise(g, m.TwoQubitError, m.SingleQubitError, m.Readout01, m.Readout10, m.Depolarizing)
		r, err := moments.Exact(context.Background(), g, s, e, c.depths, moments.ExactCurveOnly(), moments.ExactNoise(nz))
		if err != nil {
			t.Fatal(err)
		}
		for i, d := range c.depths {
			want := m.Predict(sampling.CountGates(s, e, g.Qubits, d)).Fidelity
			if math.Abs(r.DigitalFidelity[i]-want) > 1e-14 {
				t.Errorf("%s %s depth %d: digital fidelity %.17g, CountGates model %.17g", c.graph, c.gates, d, r.DigitalFidelity[i], want)
			}
		}
	}
}

// TestExactNoiseTableAndReport: --out with noise writes one row per rate and
// depth with the benchmark columns (equal to the JSON values), --plot writes
// the XEB/digital plot, and the text report states the agreement depths.
func TestExactNoiseTableAndReport(t *testing.T) {
	dir := t.TempDir()
	out, png := filepath.Join(dir, "xeb.parquet"), filepath.Join(dir, "xeb.png")
	args := []string{"exact", "--graph", "line:5", "--depths", "1:25:6", "--gate-error", "0.001:0.003:0.001", "--out", out, "--plot", png}
	stdout, stderr, code := runCLI(t, args...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{"Expected cross-entropy benchmark · gate error 0.003", "xeb_over_digital", "The digital model is ", "Plot: " + png} {
		if !strings.Contains(stdout, want) {
			t.Errorf("the report lacks %q:\n%s", want, stdout)
		}
	}
	tb, err := tables.Read(out)
	if err != nil {
		t.Fatal(err)
	}
	if tb.Len() != 3*5 {
		t.Fatalf("%d rows, want 15", tb.Len())
	}
	rates, err := tb.Float64s("gate_error")
	if err != nil {
		t.Fatal(err)
	}
	over, err := tb.Float64s("xeb_over_digital")
	if err != nil {
		t.Fatal(err)
	}
	doc := exactJSONOf(t, args[1:len(args)-4]...)
	for i, row := range doc.Rows {
		if rates[i] != *row.GateError || over[i] != *row.XEBOverDigital {
			t.Errorf("table row %d: gate_error %v xeb_over_digital %v, JSON %v %v", i, rates[i], over[i], *row.GateError, *row.XEBOverDigital)
		}
	}
}

// TestExactNoiseBadInput: rates outside [0, 1] or a malformed rate list end
// with one line naming the flag and exit status 2.
func TestExactNoiseBadInput(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--gate-error", "1.5"}, "--gate-error"},
		{[]string{"--gate-error", "-0.1"}, "--gate-error"},
		{[]string{"--gate-error", "0.02:0.01:0.001"}, "FROM ≤ TO"},
		{[]string{"--gate-error", "0.01:0.02"}, "FROM:TO:STEP"},
		{[]string{"--gate-error", "x"}, "not a number"},
		{[]string{"--single-qubit-error", "2"}, "--single-qubit-error"},
		{[]string{"--readout-error", "0.1,1.2"}, "--readout-error"},
		{[]string{"--fidelity", "1.01"}, "--fidelity"},
	} {
		_, stderr, code := runCLI(t, append([]string{"exact", "--graph", "line:4", "--depths", "2"}, c.args...)...)
		if code != 2 || !strings.Contains(stderr, c.want) || strings.Count(strings.TrimSpace(stderr), "\n") != 0 {
			t.Errorf("%v: exit %d, stderr %q; want 2 and one line with %q", c.args, code, stderr, c.want)
		}
	}
}

// TestParseRates: the rate lists take the depth lists' syntax; a range's
// values are FROM + k·STEP, so 0.001:0.02:0.001 has 20 values ending at
// 0.02 exactly (no accumulated rounding drops the last one).
func TestParseRates(t *testing.T) {
	got, err := parseRates("--gate-error", "0.001:0.02:0.001")
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 20 || got[0] != 0.001 || got[19] != 0.02 || math.Abs(got[9]-0.01) > 1e-15 {
		t.Errorf("0.001:0.02:0.001 gives %v", got)
	}
	got, err = parseRates("--gate-error", "0.01, 0.002,0.01,0:0.002:0.001")
	if err != nil {
		t.Fatal(err)
	}
	if want := []float64{0, 0.001, 0.002, 0.01}; len(got) != len(want) || got[0] != want[0] || got[1] != want[1] || got[2] != want[2] || got[3] != want[3] {
		t.Errorf("list gives %v, want %v", got, want)
	}
}

// TestExactCalibration: `exact --calibration` models the chip of the file:
// its rows override the uniform flags element by element, so the JSON rows
// equal moments.Exact with the ChipNoise that circuits.ReadCalibration
// builds from the same file over the flags' rates; the file and its digest
// are recorded in the JSON and the table metadata, and --out cannot
// replace the file.
func TestExactCalibration(t *testing.T) {
	dir := t.TempDir()
	cal := writeFile(t, dir, "cal.csv", "qubit,coupled_to,pair_error,single_error,readout_01,readout_10\n"+
		"0,1,0.02,,,\n2,3,0.001,,,\n1,,,0.004,0.05,0.01\n4,,,,0,0.08\n")
	args := []string{"--graph", "line:5", "--gates", "iswap+haar1", "--depths", "1:12", "--gate-error", "0.005",
		"--readout-error", "0.01,0.02", "--calibration", cal}
	doc := exactJSONOf(t, args...)
	g, _ := circuits.ParseGraph("line:5")
	s, _ := circuits.NewSchedule(circuits.KindLayered, g)
	e, _ := circuits.NewEnsemble("iswap+haar1")
	depths, _ := parseDepths("1:12")
	f, err := os.Open(cal)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	chip, err := circuits.ReadCalibration(cal, f, g, circuits.UniformNoise(g, 0.005, 0, 0.01, 0.02, 1))
	if err != nil {
		t.Fatal(err)
	}
	if chip.PairError(0, 1) != 0.02 || chip.PairError(1, 2) != 0.005 || chip.Readout10[4] != 0.08 {
		t.Fatalf("calibration read as %+v", chip)
	}
	r, err := moments.Exact(context.Background(), g, s, e, depths, moments.ExactCurveOnly(), moments.ExactNoise(chip))
	if err != nil {
		t.Fatal(err)
	}
	for i, row := range doc.Rows {
		if row.XEBExpected == nil || *row.XEBExpected != r.XEBExpected[i] || *row.DigitalFidelity != r.DigitalFidelity[i] {
			t.Errorf("depth %d: row %+v, library %v %v", depths[i], row, r.XEBExpected[i], r.DigitalFidelity[i])
		}
	}
	if doc.Noise == nil || doc.Noise.Calibration == nil || doc.Noise.Calibration.Couplers != 2 || doc.Noise.Calibration.Qubits != 2 {
		t.Fatalf("noise block %+v", doc.Noise)
	}
	out := filepath.Join(dir, "x.arrow")
	mustRun(t, append(append([]string{"exact"}, args...), "--out", out)...)
	meta, _, err := tables.ReadMeta(out)
	if err != nil {
		t.Fatal(err)
	}
	if v, _ := meta.Get("calibration"); !strings.Contains(v, "0,1,0.02") {
		t.Errorf("calibration metadata %q", v)
	}
	if _, _, code := runCLI(t, append(append([]string{"exact"}, args...), "--out", cal)...); code != 2 {
		t.Errorf("--out onto the calibration file: exit %d, want 2", code)
	}
}
