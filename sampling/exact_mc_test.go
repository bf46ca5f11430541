package sampling

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"mixdepth/circuits"
	"mixdepth/fixtures"
	"mixdepth/moments"
)

// The Monte Carlo checks of the exact expected benchmark (moments.Exact
// with ExactNoise, through PredictXEB): sampling.Run simulates the noisy
// circuits by quantum trajectories and draws shots, sampling.Score reads
// the normalized XEB, and the two methods share nothing but the circuit
// ensemble and the meaning of the noise rates (the trajectories draw
// Pauli errors gate by gate, the exact engine averages identity/swap
// patterns). They must agree within mcSigmas standard errors of the
// measured normalized XEB over instances (the cluster bootstrap of
// Report.NormalizedErrInstances: shots, trajectories and circuits).
//
// mcSigmas is 4: over the 39 cases of the full sweep, a two-sided normal
// deviation beyond 4σ has probability 6e-5 per case, 0.2% for the whole
// sweep, so a failure points at a real disagreement (common practice for a
// Monte Carlo test with fixed seeds). The normalized XEB is a ratio
// estimator whose bias is O(1/instances) of its relative variance; with the
// sizes below it is under a tenth of a standard error (see
// TestXEBIntervalCoverage, which measures it).
const mcSigmas = 4

// mcCase is one sampled configuration.
type mcCase struct {
	name      string
	g         *circuits.Graph
	s         circuits.Schedule
	gates     string
	depth     int
	noise     Noise               // what the sampler runs
	chip      *circuits.ChipNoise // the same noise for the exact engine
	instances int
	shots     int
	traj      int
	seed      uint64
}

// mcRun samples c, scores it and compares it with PredictXEB.
func mcRun(t *testing.T, c mcCase) Comparison {
	t.Helper()
	e, err := circuits.NewEnsemble(c.gates)
	if err != nil {
		t.Fatal(err)
	}
	ids := make([]int, c.instances)
	for i := range ids {
		ids[i] = i
	}
	cfg := &Config{Schedule: c.s, Ensemble: e, Qubits: c.g.Qubits, Depth: c.depth, Seed: c.seed,
		Instances: ids, Shots: c.shots, Noise: c.noise, Trajectories: c.traj, Workers: 2}
	var groups []InstanceSamples
	if _, err := Run(context.Background(), cfg, func(r *Result) error {
		groups = append(groups, r.Samples())
		return nil
	}); err != nil {
		t.Fatal(err)
	}
	rep := Score(c.g.Qubits, groups)
	if !rep.HasInstanceErr {
		t.Fatalf("%s: no standard error over instances", c.name)
	}
	x, err := PredictXEB(context.Background(), c.g, c.s, e, c.depth, c.chip, 2)
	if err != nil {
		t.Fatal(err)
	}
	return Compare(rep, x)
}

// mcCheck runs the cases and checks each within mcSigmas. So that the
// check can fail, it also requires the digital error model (the fidelity
// the usual reading would take as the benchmark's value) to lie more than
// mcSigmas standard errors from the measurement in at least one case: the
// tolerance is tight enough to tell the exact prediction from the rule of
// thumb (with readout flips at shallow depth the two differ by 10–40%).
func mcCheck(t *testing.T, cases []mcCase) []Comparison {
	t.Helper()
	var out []Comparison
	apart := 0
	defer func() {
		if apart == 0 {
			t.Errorf("in no case does the digital model lie beyond %d standard errors: the check cannot tell it from the exact prediction", mcSigmas)
		}
	}()
	for _, c := range cases {
		cmp := mcRun(t, c)
		t.Logf("%-40s normalized XEB %.4f ± %.4f, exact %.4f (%+.2fσ), digital %.4f",
			c.name, cmp.ImpliedNormalized, cmp.NormalizedErr, cmp.Exact.Normalized, cmp.NormalizedSigmas, cmp.Exact.Digital)
		if math.Abs(cmp.NormalizedSigmas) > mcSigmas || math.IsNaN(cmp.NormalizedSigmas) {
			t.Errorf("%s: measured normalized XEB %.4f ± %.4f is %.2f standard errors from the exact %.4f",
				c.name, cmp.ImpliedNormalized, cmp.NormalizedErr, cmp.NormalizedSigmas, cmp.Exact.Normalized)
		}
		if math.Abs(cmp.ImpliedNormalized-cmp.Exact.Digital) > mcSigmas*cmp.NormalizedErr {
			apart++
		}
		out = append(out, cmp)
	}
	return out
}

// uniformCases returns the cases of one graph: each depth, each gate error
// rate, without and with readout flips (0.02, 0.05), with the uniform
// noise fields of Noise (the exact side takes circuits.UniformNoise).
func uniformCases(name string, g *circuits.Graph, s circuits.Schedule, depths []int, rates []float64, instances, shots, traj int) []mcCase {
	var out []mcCase
	for _, d := range depths {
		for _, e := range rates {
			for _, ro := range [][2]float64{{0, 0}, {0.02, 0.05}} {
				out = append(out, mcCase{
					name: fmt.Sprintf("%s depth %d e %g readout %g,%g", name, d, e, ro[0], ro[1]),
					g:    g, s: s, gates: "haar", depth: d,
					noise:     Noise{Fidelity: 1, GateError: e, Readout01: ro[0], Readout10: ro[1]},
					chip:      circuits.UniformNoise(g, e, 0, ro[0], ro[1], 1),
					instances: instances, shots: shots, traj: traj, seed: 7100 + uint64(len(out)),
				})
			}
		}
	}
	return out
}

func layeredOf(t *testing.T, spec string) (*circuits.Graph, circuits.Schedule) {
	t.Helper()
	g, err := circuits.ParseGraph(spec)
	if err != nil {
		t.Fatal(err)
	}
	s, err := circuits.NewSchedule(circuits.KindLayered, g)
	if err != nil {
		t.Fatal(err)
	}
	return g, s
}

// TestExactXEBMonteCarloLine8 and TestExactXEBMonteCarloRing6: three
// depths (before, at and past anti-concentration), two gate error rates
// (0.005, 0.02), without and with readout flips: 80 instances × 500 shots
// (50 trajectories each), a standard error of about 0.008, so 4σ ≈ 0.03.
// Under -short (and the race detector) only the shallowest and deepest
// depths at e = 0.02 run.
func TestExactXEBMonteCarloLine8(t *testing.T) {
	g, s := layeredOf(t, "line:8")
	cases := uniformCases("line:8", g, s, []int{3, 8, 16}, []float64{0.005, 0.02}, 80, 500, 50)
	mcCheck(t, mcSubset(cases))
}

func TestExactXEBMonteCarloRing6(t *testing.T) {
	g, s := layeredOf(t, "ring:6")
	cases := uniformCases("ring:6", g, s, []int{2, 5, 12}, []float64{0.005, 0.02}, 80, 500, 50)
	mcCheck(t, mcSubset(cases))
}

// mcSubset returns cases under -short: the first and last depth at the
// second rate; all of them otherwise.
func mcSubset(cases []mcCase) []mcCase {
	if !testing.Short() && !raceEnabled {
		return cases
	}
	var out []mcCase
	for i, c := range cases {
		// 2 rates × 2 readouts per depth: indices 2, 3 of the first and
		// last depth are the second rate.
		if k := i % 4; k >= 2 && (i < 4 || i >= len(cases)-4) {
			out = append(out, c)
		}
	}
	return out
}

// TestExactXEBMonteCarloDemoChip: the demo chip (fixtures.DemoChip, 16
// qubits, its own layout) at depths 2, 4 and 8 with gate error rates 0.005
// and 0.02, without and with readout flips. Fewer instances and shots than
// the small graphs (each trajectory simulates 2^16 amplitudes), so the
// standard errors are larger (about 0.02, against 0.008 on line:8); under
// -short only depth 4 at e = 0.005 runs, without and with readout flips.
func TestExactXEBMonteCarloDemoChip(t *testing.T) {
	g, l := fixtures.DemoChip()
	s := l.Schedule()
	cases := uniformCases("demo chip", g, s, []int{2, 4, 8}, []float64{0.005, 0.02}, 20, 400, 20)
	if testing.Short() || raceEnabled {
		cases = cases[4:6]
	}
	mcCheck(t, cases)
}

// mcCalibration is an invented calibration of line:8 (a scenario of our
// own) in the calibration file format: coupler rates varying 3× (0.01 to
// 0.03), every qubit with its own single-qubit rate and readout flips.
const mcCalibration = `qubit,coupled_to,pair_error,single_error,readout_01,readout_10
0,1,0.010,,,
1,2,0.030,,,
2,3,0.015,,,
3,4,0.020,,,
4,5,0.012,,,
5,6,0.025,,,
6,7,0.018,,,
0,,,0.002,0.010,0.040
1,,,0.004,0.020,0.030
2,,,0.001,0.015,0.050
3,,,0.006,0.030,0.020
4,,,0.003,0.010,0.060
5,,,0.005,0.025,0.035
6,,,0.002,0.020,0.045
7,,,0.004,0.012,0.030
`

// TestExactXEBMonteCarloCalibration: the heterogeneous calibration
// mcCalibration on line:8 with cz+haar1 (single-qubit errors after the
// dressing gates and the final layer), read through
// circuits.ReadCalibration, agrees the same way at three depths (two in
// under -short).
func TestExactXEBMonteCarloCalibration(t *testing.T) {
	g, s := layeredOf(t, "line:8")
	chip, err := circuits.ReadCalibration("mc calibration", strings.NewReader(mcCalibration), g, circuits.UniformNoise(g, 0, 0, 0, 0, 1))
	if err != nil {
		t.Fatal(err)
	}
	depths := []int{4, 10, 20}
	if testing.Short() || raceEnabled {
		depths = []int{4, 20}
	}
	var cases []mcCase
	for i, d := range depths {
		cases = append(cases, mcCase{name: fmt.Sprintf("line:8 calibrated cz+haar1 depth %d", d), g: g, s: s, gates: "cz+haar1", depth: d,
			noise: Noise{Chip: chip}, chip: chip, instances: 80, shots: 500, traj: 50, seed: 7300 + uint64(i)})
	}
	mcCheck(t, cases)
}

// TestCompareByHand checks Compare's arithmetic on numbers worked by hand
// (invented values): measured normalized 0.50 ± 0.02 over instances
// against an exact 0.55 is −2.5σ; the model reading is 0.44 × 0.50/0.55 =
// 0.4, with standard error 0.44 × 0.02/0.55 = 0.016. Without the error over
// instances the shots' errors are used.
func TestCompareByHand(t *testing.T) {
	r := &Report{Linear: 0.48, LinearErr: 0.01, LinearErrInstances: 0.04, Normalized: 0.5, NormalizedErr: 0.01, NormalizedErrInstances: 0.02, HasInstanceErr: true}
	x := &ExactXEB{Expected: 0.5, Normalized: 0.55, Digital: 0.44}
	c := Compare(r, x)
	near := func(name string, got, want float64) {
		if math.Abs(got-want) > 1e-12 {
			t.Errorf("%s %.15g, want %.15g", name, got, want)
		}
	}
	near("LinearSigmas", c.LinearSigmas, -0.5)
	near("NormalizedSigmas", c.NormalizedSigmas, -2.5)
	near("ImpliedNormalized", c.ImpliedNormalized, 0.5)
	near("ImpliedModel", c.ImpliedModel, 0.4)
	near("ImpliedModelErr", c.ImpliedModelErr, 0.016)
	if !c.OverInstances {
		t.Error("OverInstances false with an error over instances")
	}
	r.HasInstanceErr = false
	c = Compare(r, x)
	near("NormalizedSigmas (shots)", c.NormalizedSigmas, -5)
	near("LinearSigmas (shots)", c.LinearSigmas, -2)
	if c.OverInstances {
		t.Error("OverInstances true without an error over instances")
	}
}

// TestPredictXEBRefuses: PredictXEB refuses before starting a run its
// estimate puts beyond PredictMaxSeconds (the random-edge average on
// grid:4x5, 31 couplers: 200·31·3^18 updates at 2 ns, about 80 minutes by
// moments' documented speed) and a gate set with no exact moments (CZ
// with the identity as its only single-qubit gate).
func TestPredictXEBRefuses(t *testing.T) {
	g, err := circuits.ParseGraph("grid:4x5")
	if err != nil {
		t.Fatal(err)
	}
	s, err := circuits.NewSchedule(circuits.KindRandomEdge, g)
	if err != nil {
		t.Fatal(err)
	}
	e, _ := circuits.NewEnsemble("haar")
	if _, err := PredictXEB(context.Background(), g, s, e, 200, circuits.UniformNoise(g, 0.005, 0, 0, 0, 1), 1); !errors.Is(err, ErrPredictCost) {
		t.Errorf("random-edge grid:4x5 depth 200: %v, want ErrPredictCost", err)
	}
	cz, _ := circuits.Entangler("cz")
	finite, err := circuits.NewGateSet("cz-identity", cz, [][4]complex128{{1, 0, 0, 1}})
	if err != nil {
		t.Fatal(err)
	}
	g4, s4 := layeredOf(t, "line:4")
	if _, err := PredictXEB(context.Background(), g4, s4, finite, 4, circuits.UniformNoise(g4, 0.005, 0, 0, 0, 1), 1); !errors.Is(err, moments.ErrNoExactMoments) {
		t.Errorf("finite single-qubit set: %v, want ErrNoExactMoments", err)
	}
}
