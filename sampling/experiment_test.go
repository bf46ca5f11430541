package sampling

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/stats"
)

// haarSecondMoment is E[Z²] for a Haar-random state of dimension d, a
// derivation independent of stats.HaarCollisionVariance: the outcome
// probabilities are Dirichlet(1, …, 1), so E[p⁴] = 4!/(d(d+1)(d+2)(d+3))
// (design.md §3, the moments E[p^k] of Beta(1, d−1)) and, for two outcomes,
// E[p_i²p_j²] = 2!·2!/(d(d+1)(d+2)(d+3)) (the Dirichlet mixed moment, common
// practice); Z² = Σ p_i⁴ + Σ_{i≠j} p_i²p_j² gives
//
//	E[Z²] = (24 + 4(d−1))/((d+1)(d+2)(d+3)) = 4(d+5)/((d+1)(d+2)(d+3)).
func haarSecondMoment(d float64) float64 { return 4 * (d + 5) / ((d + 1) * (d + 2) * (d + 3)) }

// splitClose compares two splits: the counts exactly, the derived values
// to 1e-12 (σ_b² computed in another order moves the last bits).
func splitClose(a, b SplitPlan) bool {
	close := func(x, y float64) bool { return x == y || math.Abs(x-y) <= 1e-12*math.Abs(y) }
	return a.Instances == b.Instances && a.PerInstance == b.PerInstance && close(a.Variance, b.Variance) && close(a.Cost, b.Cost) && close(a.Optimum, b.Optimum)
}

func mustGraph(t *testing.T, spec string) *circuits.Graph {
	t.Helper()
	g, err := circuits.ParseGraph(spec)
	if err != nil {
		t.Fatal(err)
	}
	return g
}

func mustParts(t *testing.T, n int, edges ...circuits.Edge) *circuits.Graph {
	t.Helper()
	g, err := circuits.NewGraphParts("parts", n, edges)
	if err != nil {
		t.Fatal(err)
	}
	return g
}

// TestHaarXEBVariance checks D²·Var(Z) against the Dirichlet moments
// (haarSecondMoment) for connected graphs, for chips in parts (independent
// parts: E[Z²] and E[Z] are products), with an isolated qubit kept at Z = 1
// or, under a final single-qubit layer, a Haar state of one qubit
// (moments.PartsLimit's rule).
func TestHaarXEBVariance(t *testing.T) {
	haarVar := func(d float64) float64 { // D²·Var(Z) of one Haar part
		m := 2 / (d + 1)
		return d * d * (haarSecondMoment(d) - m*m)
	}
	e2 := func(d float64) float64 { return d * d * haarSecondMoment(d) } // D²·E[Z²]
	e1 := func(d float64) float64 { return d * 2 / (d + 1) }             // D·E[Z]
	cases := []struct {
		name  string
		g     *circuits.Graph
		final bool
		want  float64
	}{
		{"line:2", mustGraph(t, "line:2"), false, haarVar(4)},
		{"ring:5", mustGraph(t, "ring:5"), false, haarVar(32)},
		{"grid:3x4", mustGraph(t, "grid:3x4"), false, haarVar(4096)},
		// Two parts of two qubits: D²Var = (D1²E[Z1²])² − (D1·E[Z1])⁴.
		{"2+2", mustParts(t, 4, circuits.Edge{A: 0, B: 1}, circuits.Edge{A: 2, B: 3}), false, e2(4)*e2(4) - math.Pow(e1(4), 4)},
		// A pair and an isolated qubit: Z = Z_pair, D = 8, so D²Var = 4·(4²Var_pair).
		{"2+1", mustParts(t, 3, circuits.Edge{A: 0, B: 1}), false, 4 * haarVar(4)},
		// The same under a final layer: the lone qubit is a Haar state of one qubit.
		{"2+1 final", mustParts(t, 3, circuits.Edge{A: 0, B: 1}), true, e2(4)*e2(2) - math.Pow(e1(4)*e1(2), 2)},
	}
	for _, c := range cases {
		if got := HaarXEBVariance(c.g, c.final); math.Abs(got-c.want) > 1e-12*c.want {
			t.Errorf("%s: D²·Var(Z) = %.15g, want %.15g", c.name, got, c.want)
		}
	}
	// About 4/D for large D (HaarCollisionVariance ~ 4/D³).
	if got := HaarXEBVariance(mustGraph(t, "line:40"), false); math.Abs(got*math.Ldexp(1, 40)/4-1) > 1e-10 {
		t.Errorf("line:40: D²·Var(Z)·D/4 = %v, want 1", got*math.Ldexp(1, 40)/4)
	}
}

// TestHaarXEBVarianceMonteCarlo draws Haar-random states of dimension 8 as
// normalized complex Gaussian vectors (common practice: the Gaussian vector's
// law is unitarily invariant) and compares the sample variance of D·Z with
// HaarXEBVariance within 4 standard errors (the standard error of a sample
// variance, sqrt((m4 − s⁴)/N), from the same draws; fixed seed).
func TestHaarXEBVarianceMonteCarlo(t *testing.T) {
	const n, dim = 40000, 8
	rng := rand.New(rand.NewPCG(11, 12))
	xs := make([]float64, n)
	for k := range xs {
		var p [dim]float64
		norm := 0.0
		for i := range p {
			a, b := rng.NormFloat64(), rng.NormFloat64()
			p[i] = a*a + b*b
			norm += p[i]
		}
		z := 0.0
		for _, v := range p {
			z += (v / norm) * (v / norm)
		}
		xs[k] = dim * z
	}
	mean := 0.0
	for _, x := range xs {
		mean += x / n
	}
	var m2, m4 float64
	for _, x := range xs {
		d := x - mean
		m2 += d * d / n
		m4 += d * d * d * d / n
	}
	s2 := m2 * n / (n - 1)
	se := math.Sqrt((m4 - m2*m2) / n)
	want := HaarXEBVariance(mustGraph(t, "line:3"), false)
	if math.Abs(s2-want) > 4*se {
		t.Errorf("Monte Carlo D²·Var(Z) = %.6g ± %.2g, HaarXEBVariance %.6g", s2, se, want)
	}
}

// TestPlanExperimentGiven: a given fidelity overrides everything; the shots
// are PlanShots', and the split is PlanSplit's on σ_b² = F²·D²·Var_Haar(Z),
// σ_w² = 1 + 2F − F² and the stricter of the targets (F/z)² and (r·F)².
func TestPlanExperimentGiven(t *testing.T) {
	g := mustGraph(t, "line:6")
	s, _ := circuits.NewSchedule(circuits.KindLayered, g)
	e, _ := circuits.NewEnsemble("haar")
	const f, z, r, c = 0.3, 5, 0.05, 500
	x, err := PlanExperiment(context.Background(), g, s, e, ExperimentConfig{Depth: 10, Given: f, Sigmas: z, Relative: r, CircuitCost: c})
	if err != nil {
		t.Fatal(err)
	}
	wantShots, _ := PlanShots(f, z, r)
	target := min((f/z)*(f/z), (r*f)*(r*f))
	between := f * f * HaarXEBVariance(g, false)
	wantSplit, _ := PlanSplit(between, 1+2*f-f*f, c, target, stats.MinIntervalValues)
	if x.Source != FidelityGiven || x.Fidelity != f || x.Exact != nil || x.Shots != wantShots || !splitClose(x.Split, wantSplit) ||
		x.TargetVariance != target || x.CircuitVarianceSource != VarianceHaarFloor || math.Abs(x.CircuitVariance-between) > 1e-15 {
		t.Errorf("got %+v\nwant shots %+v, split %+v, target %v, between %v", x, wantShots, wantSplit, target, between)
	}
}

// TestPlanExperimentExact: with noise the fidelity is moments.Exact's
// XEBExpected at the depth (the same engine, 1e-12), and on one Haar gate of
// two qubits with Pauli rate e it is the hand-derived (3/5)(1 − 16e/15): the
// noisy copy is (1 − 16e/15)ρ + (16e/15)·I/4 and E[Σp²] = 2/5 (design.md
// §5), so E[F_lin] = 4·(λ·2/5 + (1−λ)/4) − 1 = (3/5)·λ.
func TestPlanExperimentExact(t *testing.T) {
	ctx := context.Background()
	g := mustGraph(t, "ring:6")
	s, _ := circuits.NewSchedule(circuits.KindLayered, g)
	e, err := circuits.NewEnsemble("iswap+haar1")
	if err != nil {
		t.Fatal(err)
	}
	nz := circuits.UniformNoise(g, 0.01, 0.002, 0.01, 0.03, 1)
	digital := nz.DigitalFidelity(s, e, 8)
	x, err := PlanExperiment(ctx, g, s, e, ExperimentConfig{Depth: 8, Noise: nz, Digital: digital, Relative: 0.05, CircuitCost: 1000})
	if err != nil {
		t.Fatal(err)
	}
	r, err := moments.Exact(ctx, g, s, e, []int{8}, moments.ExactNoise(nz))
	if err != nil {
		t.Fatal(err)
	}
	if x.Source != FidelityExact || math.Abs(x.Fidelity-r.XEBExpected[0]) > 1e-12 || math.Abs(x.Normalized-r.XEBNormalized[0]) > 1e-12 || x.ExactEngine != moments.EngineVector {
		t.Errorf("source %s engine %s: F %v, normalized %v; moments.Exact %v, %v", x.Source, x.ExactEngine, x.Fidelity, x.Normalized, r.XEBExpected[0], r.XEBNormalized[0])
	}
	if dp, _ := PlanShots(digital, 0, 0.05); x.DigitalShots == nil || *x.DigitalShots != dp || x.Digital != digital {
		t.Errorf("digital shots %+v, want %+v", x.DigitalShots, dp)
	}
	if want, _ := PlanShots(x.Fidelity, 0, 0.05); x.Shots != want {
		t.Errorf("shots %+v, want %+v", x.Shots, want)
	}

	two := mustGraph(t, "line:2")
	s2, _ := circuits.NewSchedule(circuits.KindLayered, two)
	haar, _ := circuits.NewEnsemble("haar")
	for _, rate := range []float64{0, 0.01, 0.2} {
		x, err := PlanExperiment(ctx, two, s2, haar, ExperimentConfig{Depth: 1, Noise: circuits.UniformNoise(two, rate, 0, 0, 0, 1), Digital: 1 - rate, Sigmas: 5})
		if err != nil {
			t.Fatal(err)
		}
		if want := 0.6 * (1 - 16*rate/15); math.Abs(x.Fidelity-want) > 1e-12 {
			t.Errorf("one Haar gate, e = %g: F = %.15g, want (3/5)(1 − 16e/15) = %.15g", rate, x.Fidelity, want)
		}
	}
}

// TestPlanExperimentFallback: without an exact engine (a random-edge
// schedule beyond moments.CollisionRandomEdgeMaxQubits, or a reason given)
// the digital model is the fidelity, with the reason in ExactNote.
func TestPlanExperimentFallback(t *testing.T) {
	g := mustGraph(t, "line:21")
	s, _ := circuits.NewSchedule(circuits.KindRandomEdge, g)
	e, _ := circuits.NewEnsemble("haar")
	nz := circuits.UniformNoise(g, 0.002, 0, 0, 0, 1)
	x, err := PlanExperiment(context.Background(), g, s, e, ExperimentConfig{Depth: 100, Noise: nz, Digital: 0.8, Sigmas: 5})
	if err != nil {
		t.Fatal(err)
	}
	if x.Source != FidelityDigital || x.Fidelity != 0.8 || x.Exact != nil || x.DigitalShots != nil || !strings.Contains(x.ExactNote, "too large") {
		t.Errorf("random-edge line:21: %+v", x)
	}
	g4 := mustGraph(t, "line:4")
	s4, _ := circuits.NewSchedule(circuits.KindLayered, g4)
	x, err = PlanExperiment(context.Background(), g4, s4, e, ExperimentConfig{Depth: 4, Noise: circuits.UniformNoise(g4, 0.01, 0, 0, 0, 1), Digital: 0.9, Sigmas: 5, NoExact: "asked"})
	if err != nil || x.Source != FidelityDigital || x.ExactNote != "asked" || x.Exact != nil {
		t.Errorf("NoExact: %+v, %v", x, err)
	}
}

// TestPlanExperimentSpread: a scan's spread of Z gives σ_b² = F²·(D·sd)²,
// and the split is PlanSplit's on it.
func TestPlanExperimentSpread(t *testing.T) {
	g := mustGraph(t, "line:6")
	s, _ := circuits.NewSchedule(circuits.KindLayered, g)
	e, _ := circuits.NewEnsemble("haar")
	sum := stats.Summary{N: 40, Mean: 0.032, StdDev: 0.004}
	const f = 0.6
	x, err := PlanExperiment(context.Background(), g, s, e, ExperimentConfig{Depth: 10, Given: f, Relative: 0.01, CircuitCost: 100, CollisionSpread: &sum})
	if err != nil {
		t.Fatal(err)
	}
	between := f * f * (64 * 0.004) * (64 * 0.004)
	want, _ := PlanSplit(between, 1+2*f-f*f, 100, (0.01*f)*(0.01*f), stats.MinIntervalValues)
	if x.CircuitVarianceSource != VarianceScan || math.Abs(x.CircuitVariance-between) > 1e-14 || !splitClose(x.Split, want) {
		t.Errorf("spread: σ_b² %v (%s), split %+v; want %v, %+v", x.CircuitVariance, x.CircuitVarianceSource, x.Split, between, want)
	}
	if x.Split.Instances <= stats.MinIntervalValues {
		t.Errorf("a dominant circuit spread should ask for more than %d circuits: %+v", stats.MinIntervalValues, x.Split)
	}
}

// TestPlanExperimentLimits: an expected XEB above 1 (cz+haar1 on line:4 at
// depth 4, far from anti-concentration) takes F = 1 in the shot formulas,
// and a fidelity no shots resolve is ErrTooManyShots.
func TestPlanExperimentLimits(t *testing.T) {
	g := mustGraph(t, "line:4")
	s, _ := circuits.NewSchedule(circuits.KindLayered, g)
	e, _ := circuits.NewEnsemble("cz+haar1")
	x, err := PlanExperiment(context.Background(), g, s, e, ExperimentConfig{Depth: 4, Noise: circuits.UniformNoise(g, 0, 0.001, 0, 0, 1), Digital: 0.98, Sigmas: 5})
	if err != nil {
		t.Fatal(err)
	}
	if want, _ := PlanShots(1, 5, 0); !(x.Fidelity > 1) || !x.ShotsAtOne || x.Shots != want || x.ShotVariance != 2 {
		t.Errorf("F %v: at one %v, shots %+v, σ_w² %v", x.Fidelity, x.ShotsAtOne, x.Shots, x.ShotVariance)
	}
	_, err = PlanExperiment(context.Background(), g, s, e, ExperimentConfig{Depth: 4, Given: 1e-9, Sigmas: 5})
	if !errors.Is(err, ErrTooManyShots) {
		t.Errorf("F = 1e-9: %v", err)
	}
}

// TestPlanExperimentTwoStageVariance simulates the design PlanExperiment
// plans for and checks its variance model on the data: 300 circuits of
// line:6 at depth 10 with gate error 0.01, m = 100 shots each, one
// trajectory per shot (so the shots of a circuit are independent draws of
// its noisy law). The per-circuit linear XEB should have mean F (the exact
// expected XEB) and variance σ_b² + σ_w²/m, with σ_b² = F_norm²·D²·Var(Z_U)
// from the same circuits' Z_U (the global-depolarizing approximation, Boixo
// et al. 2018) and σ_w² = 1 + 2F − F² (Porter–Thomas shots; Cochran 1977,
// §10.6, for the two-stage sum). Tolerances: 4 standard errors of the mean
// and of the sample variance (sqrt((m4 − s⁴)/M)), fixed seed.
func TestPlanExperimentTwoStageVariance(t *testing.T) {
	g := mustGraph(t, "line:6")
	s, _ := circuits.NewSchedule(circuits.KindLayered, g)
	e, _ := circuits.NewEnsemble("haar")
	const circuitsN, shots, depth, rate = 300, 100, 10, 0.01
	inst := make([]int, circuitsN)
	for i := range inst {
		inst[i] = i
	}
	cfg := &Config{Schedule: s, Ensemble: e, Qubits: g.Qubits, Depth: depth, Seed: 31, Instances: inst, Shots: shots,
		Noise: Noise{Fidelity: 1, GateError: rate}, Trajectories: shots, Workers: 2}
	var xeb, zs []float64
	if _, err := Run(context.Background(), cfg, func(r *Result) error {
		sum := 0.0
		for _, p := range r.PIdeal {
			sum += p
		}
		xeb = append(xeb, 64*sum/shots-1)
		zs = append(zs, r.Collision)
		return nil
	}); err != nil {
		t.Fatal(err)
	}
	spread := stats.Summarize(zs)
	x, err := PlanExperiment(context.Background(), g, s, e, ExperimentConfig{Depth: depth, Noise: circuits.UniformNoise(g, rate, 0, 0, 0, 1),
		Digital: math.Pow(1-rate, 25), Relative: 0.05, CollisionSpread: &spread})
	if err != nil {
		t.Fatal(err)
	}
	sum := stats.Summarize(xeb)
	var m4 float64
	for _, v := range xeb {
		d := v - sum.Mean
		m4 += d * d * d * d / circuitsN
	}
	s2 := sum.StdDev * sum.StdDev
	seVar := math.Sqrt((m4 - s2*s2) / circuitsN)
	want := x.CircuitVariance + x.ShotVariance/shots
	t.Logf("per-circuit XEB: mean %.4f ± %.4f (exact %.4f); variance %.5f ± %.5f, model σ_b² + σ_w²/m = %.5f + %.5f",
		sum.Mean, sum.StdErr, x.Fidelity, s2, seVar, x.CircuitVariance, x.ShotVariance/shots)
	if math.Abs(sum.Mean-x.Fidelity) > 4*sum.StdErr {
		t.Errorf("mean XEB %.4f ± %.4f, exact expected %.4f", sum.Mean, sum.StdErr, x.Fidelity)
	}
	if math.Abs(s2-want) > 4*seVar {
		t.Errorf("variance over circuits %.5f ± %.5f, model %.5f", s2, seVar, want)
	}
}
