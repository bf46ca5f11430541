package main

import (
	"encoding/json"
	"math"
	"path/filepath"
	"strings"
	"testing"
)

// demoCalibration is the demo chip's calibration file (invented numbers,
// fixtures/tarn16-calibration.csv).
var demoCalibration = filepath.Join("..", "..", "fixtures", "tarn16-calibration.csv")

// TestScoreExactDemoChip runs sample and score through the commands on the
// demo chip with its calibration (per-coupler Pauli rates, per-qubit
// single-qubit and readout rates) at depth 4, and checks:
//   - the measured normalized XEB agrees with the exact expectation within 4
//     standard errors over instances (the Monte Carlo check of
//     sampling/exact_mc_test.go, here through the tables and the metadata;
//     20 instances × 400 shots give a standard error of about 0.02, and a
//     4σ deviation has probability 6e-5 under normal errors: common
//     practice for a fixed-seed Monte Carlo test);
//   - score's exact values are those of 'mixdepth exact --calibration' on
//     the same chip (one model read two ways: from the table's metadata and
//     from the file), to 1e-12;
//   - implied_fidelity_model = digital_fidelity × normalized_xeb /
//     xeb_normalized_expected (its definition, to 1e-12);
//   - --fidelity 0.5 over the table's noise halves the expected normalized
//     XEB exactly: global depolarizing scales E[F_lin] by f once every
//     qubit has been touched (the sampler draws f·q + (1−f)/D, whose
//     uniform part scores 0; Boixo et al., Nature Physics 14, 595, 2018),
//     and the source is then table+flags.
func TestScoreExactDemoChip(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "demo.parquet")
	sampleOK(t, "sample", "--depth", "4", "--instances", "20", "--shots", "400", "--trajectories", "20", "--seed", "41",
		"--calibration", demoCalibration, "--workers", "2", "--out", out)
	doc := scoreDoc(t, out)
	if doc.NoiseSource != "table" || doc.ExactEngine == nil || *doc.ExactEngine != "vector" || doc.XEBNormalizedExpected == nil || doc.NormalizedXEBSigmas == nil {
		t.Fatalf("no exact comparison: source %q, note %q", doc.NoiseSource, doc.ExactNote)
	}
	if doc.SigmasOver != "instances" {
		t.Errorf("sigmas_over %q, want instances", doc.SigmasOver)
	}
	t.Logf("demo chip depth 4: normalized XEB %.4f ± %.4f, exact %.4f (%+.2fσ), digital %.4f, implied (model) %.4f",
		*doc.NormalizedXEB, *doc.NormalizedXEBStderrInstances, *doc.XEBNormalizedExpected, *doc.NormalizedXEBSigmas, *doc.DigitalFidelity, *doc.ImpliedFidelityModel)
	if s := *doc.NormalizedXEBSigmas; math.Abs(s) > 4 {
		t.Errorf("measured normalized XEB %.4f is %.2f standard errors from the exact %.4f", *doc.NormalizedXEB, s, *doc.XEBNormalizedExpected)
	}
	if want := (*doc.NormalizedXEB - *doc.XEBNormalizedExpected) / *doc.NormalizedXEBStderrInstances; math.Abs(*doc.NormalizedXEBSigmas-want) > 1e-12*math.Abs(want) {
		t.Errorf("normalized_xeb_sigmas %v, want %v", *doc.NormalizedXEBSigmas, want)
	}
	if want := *doc.DigitalFidelity * *doc.NormalizedXEB / *doc.XEBNormalizedExpected; math.Abs(*doc.ImpliedFidelityModel-want) > 1e-12 {
		t.Errorf("implied_fidelity_model %v, want %v", *doc.ImpliedFidelityModel, want)
	}
	if *doc.ImpliedFidelityNormalized != *doc.NormalizedXEB {
		t.Errorf("implied_fidelity_normalized %v, want normalized_xeb %v", *doc.ImpliedFidelityNormalized, *doc.NormalizedXEB)
	}

	stdout, _ := sampleOK(t, "exact", "--depths", "4", "--calibration", demoCalibration, "--json")
	var ex exactJSON
	if err := json.Unmarshal([]byte(stdout), &ex); err != nil {
		t.Fatal(err)
	}
	row := ex.Rows[0]
	for _, c := range []struct {
		name      string
		got, want float64
	}{{"xeb_expected", *doc.XEBExpected, *row.XEBExpected}, {"xeb_normalized_expected", *doc.XEBNormalizedExpected, *row.XEBNormalized}, {"digital_fidelity", *doc.DigitalFidelity, *row.DigitalFidelity}} {
		if math.Abs(c.got-c.want) > 1e-12*math.Abs(c.want) {
			t.Errorf("score %s %.15g, exact --calibration %.15g", c.name, c.got, c.want)
		}
	}

	half := scoreDoc(t, out, "--fidelity", "0.5")
	if half.NoiseSource != "table+flags" {
		t.Errorf("noise_source %q with --fidelity, want table+flags", half.NoiseSource)
	}
	if got, want := *half.XEBNormalizedExpected, 0.5**doc.XEBNormalizedExpected; math.Abs(got-want) > 1e-12 {
		t.Errorf("--fidelity 0.5: expected normalized XEB %.15g, want half of %.15g", got, *doc.XEBNormalizedExpected)
	}

	// --calibration replaces the table's calibration: the same file gives
	// the same model, a file with no rows leaves the table's uniform rates
	// (all zero: sample ran with the calibration alone), and with no noise
	// the expected normalized XEB is 1 (E[F_lin] = D·E[Z] − 1, Boixo et
	// al. 2018).
	same := scoreDoc(t, out, "--calibration", demoCalibration)
	if same.NoiseSource != "table+flags" || *same.XEBNormalizedExpected != *doc.XEBNormalizedExpected {
		t.Errorf("--calibration with the table's own file: source %q, expected %v, want table+flags and %v", same.NoiseSource, *same.XEBNormalizedExpected, *doc.XEBNormalizedExpected)
	}
	empty := writeFile(t, dir, "empty.csv", "qubit,coupled_to,pair_error,single_error,readout_01,readout_10\n")
	clean := scoreDoc(t, out, "--calibration", empty)
	if math.Abs(*clean.XEBNormalizedExpected-1) > 1e-12 || *clean.DigitalFidelity != 1 {
		t.Errorf("--calibration with no rows: expected normalized XEB %.15g, digital %v; want 1 and 1", *clean.XEBNormalizedExpected, *clean.DigitalFidelity)
	}

	text, _ := sampleOK(t, "score", out)
	for _, want := range []string{"Exact expectation under the noise model from the table", "vector engine", "Implied fidelity", "corrected by the exact model"} {
		if !strings.Contains(text, want) {
			t.Errorf("text report lacks %q:\n%s", want, text)
		}
	}
}

// TestScoreExactSources: measured data (a CSV) records no noise, so score
// compares only when the flags give it (source flags), and says why not
// otherwise; the comparison is skipped with a reason for a gate set with
// no exact moments; bad noise flags are bad input.
func TestScoreExactSources(t *testing.T) {
	dir := t.TempDir()
	csv := writeFile(t, dir, "m.csv", "instance,bitstring\n0,0000\n0,0110\n1,1011\n1,0001\n2,0000\n2,1111\n")
	none := scoreDoc(t, csv, "--graph", "line:4", "--depth", "4")
	if none.NoiseSource != "none" || none.XEBExpected != nil || !strings.Contains(none.ExactNote, "--gate-error") {
		t.Errorf("CSV without noise flags: source %q, xeb_expected %v, note %q", none.NoiseSource, none.XEBExpected, none.ExactNote)
	}
	flags := scoreDoc(t, csv, "--graph", "line:4", "--depth", "4", "--gate-error", "0.01", "--readout-error", "0.02")
	if flags.NoiseSource != "flags" || flags.XEBExpected == nil {
		t.Errorf("CSV with noise flags: source %q, note %q", flags.NoiseSource, flags.ExactNote)
	}
	// Three instances are too few for the error over instances: the
	// sigmas are in units of the shots' standard error.
	if flags.SigmasOver != "shots" {
		t.Errorf("sigmas_over %q", flags.SigmasOver)
	}
	// CZ with the identity as its only single-qubit gate (as in
	// TestExactGateSets): no identity/swap form.
	gates := writeFile(t, dir, "finite.json", `{"entangler": [[[1,0],[0,0],[0,0],[0,0]],[[0,0],[1,0],[0,0],[0,0]],[[0,0],[0,0],[1,0],[0,0]],[[0,0],[0,0],[0,0],[-1,0]]], "single_qubit": [[[[1,0],[0,0]],[[0,0],[1,0]]]]}`)
	finite := scoreDoc(t, csv, "--graph", "line:4", "--depth", "4", "--gates", gates, "--gate-error", "0.01")
	if finite.XEBExpected != nil || !strings.Contains(finite.ExactNote, "no exact engine fits") {
		t.Errorf("finite single-qubit set: xeb_expected %v, note %q", finite.XEBExpected, finite.ExactNote)
	}
	// With --circuits, a table written by sample still gives the ensemble
	// (its run parameters) and the noise.
	tab, circ := filepath.Join(dir, "s.parquet"), filepath.Join(dir, "c.json")
	sampleOK(t, append(append([]string{}, smallSample...), "--out", tab, "--circuits", circ)...)
	withFile := scoreDoc(t, tab, "--circuits", circ)
	rebuilt := scoreDoc(t, tab)
	if withFile.NoiseSource != "table" || withFile.XEBExpected == nil || rebuilt.XEBExpected == nil || *withFile.XEBExpected != *rebuilt.XEBExpected {
		t.Errorf("--circuits: source %q, xeb_expected %v (rebuilt %v), note %q", withFile.NoiseSource, withFile.XEBExpected, rebuilt.XEBExpected, withFile.ExactNote)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--gate-error", "1.5"}, "--gate-error 1.5"},
		{[]string{"--readout-error", "0.1,x"}, "--readout-error"},
		{[]string{"--calibration", filepath.Join(dir, "absent.csv")}, "--calibration"},
	} {
		args := append([]string{"score", csv, "--graph", "line:4", "--depth", "4"}, c.args...)
		_, stderr, code := runCLI(t, args...)
		if code != 2 || !strings.Contains(stderr, c.want) || strings.Count(strings.TrimSpace(stderr), "\n") != 0 {
			t.Errorf("%v: exit %d, stderr %q; want 2 and one line with %q", c.args, code, stderr, c.want)
		}
	}
}
