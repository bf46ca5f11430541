package sampling

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/mathext"

	"mixdepth/circuits"
	"mixdepth/sim"
	"mixdepth/stats"
)

// testConfig returns a layered-schedule configuration on the graph spec.
func testConfig(t *testing.T, spec, gates string, depth, instances, shots int, nz Noise) *Config {
	t.Helper()
	g, err := circuits.ParseGraph(spec)
	if err != nil {
		t.Fatal(err)
	}
	s, err := circuits.NewSchedule("layered", g)
	if err != nil {
		t.Fatal(err)
	}
	e, err := circuits.NewEnsemble(gates)
	if err != nil {
		t.Fatal(err)
	}
	ids := make([]int, instances)
	for i := range ids {
		ids[i] = i
	}
	return &Config{Schedule: s, Ensemble: e, Qubits: g.Qubits, Depth: depth, Seed: 20261201,
		Instances: ids, Shots: shots, Noise: nz, Workers: 2}
}

func runAll(t *testing.T, c *Config) []*Result {
	t.Helper()
	var out []*Result
	done, err := Run(context.Background(), c, func(r *Result) error { out = append(out, r); return nil })
	if err != nil {
		t.Fatal(err)
	}
	if len(done) != len(c.Instances) || len(out) != len(c.Instances) {
		t.Fatalf("%d instances done, %d results, want %d", len(done), len(out), len(c.Instances))
	}
	return out
}

// groups turns results into scoring input.
func groups(rs []*Result) []InstanceSamples {
	g := make([]InstanceSamples, len(rs))
	for i, r := range rs {
		g[i] = r.Samples()
	}
	return g
}

// meanSE returns the mean of xs and its standard error sd/√N.
func meanSE(xs []float64) (float64, float64) {
	s := stats.Summarize(xs)
	return s.Mean, s.StdErr
}

// referenceProbabilities simulates c with sim directly, independently of
// Circuit.Apply: the gates of every step in order, then the final layer.
func referenceProbabilities(t *testing.T, c *Circuit) []float64 {
	t.Helper()
	st, err := sim.NewState(c.Qubits, 0)
	if err != nil {
		t.Fatal(err)
	}
	for _, step := range c.Steps {
		for _, g := range step {
			st.Apply2(g.A, g.B, &g.M, 1)
		}
	}
	for q := range c.Final {
		st.Apply1(q, &c.Final[q], 1)
	}
	return st.Probabilities(nil, 1)
}

// TestIdealSampler: an ideal sampler's linear XEB equals D·Z_U − 1 of each
// instance within 4 standard errors, and for deep circuits the mean over
// instances tends to the Porter–Thomas value (D−1)/(D+1) (Boixo et al.,
// "Characterizing quantum supremacy in near-term devices", Nature Physics
// 14, 595, 2018; Arute et al., Nature 574, 505, 2019). With fixed seeds the
// test is deterministic; 4 standard errors make a false failure of one
// check about 6e-5 likely for a correct sampler.
func TestIdealSampler(t *testing.T) {
	// line:6 at depth 30 is far past its anti-concentration depth (about 8
	// layers), so E[D·Z] − 1 is within about 1e-3 of the Haar value, well
	// inside the error bars below.
	c := testConfig(t, "line:6", "haar", 30, 40, 2000, Ideal)
	rs := runAll(t, c)
	dim := 64.0
	var perInstance, ideal []float64
	for _, r := range rs {
		f, se := stats.LinearXEB(r.PIdeal, dim)
		want := dim*r.Collision - 1
		if math.Abs(f-want) > 4*se {
			t.Errorf("instance %d: F_lin = %.4f ± %.4f, want D·Z − 1 = %.4f", r.Circuit.Instance, f, se, want)
		}
		perInstance = append(perInstance, f)
		ideal = append(ideal, want)
		// p_ideal is the probability of the recorded outcome.
		ref := referenceProbabilities(t, r.Circuit)
		for k, x := range r.Outcomes {
			if r.PIdeal[k] != ref[x] {
				t.Fatalf("instance %d shot %d: p_ideal %g, simulator %g", r.Circuit.Instance, k, r.PIdeal[k], ref[x])
			}
		}
	}
	pt := (dim - 1) / (dim + 1)
	if m, se := meanSE(perInstance); math.Abs(m-pt) > 4*se {
		t.Errorf("mean F_lin over instances = %.4f ± %.4f, want (D−1)/(D+1) = %.4f", m, se, pt)
	}
	if m, se := meanSE(ideal); math.Abs(m-pt) > 4*se {
		t.Errorf("mean D·Z − 1 over instances = %.4f ± %.4f, want (D−1)/(D+1) = %.4f", m, se, pt)
	}
	rep := Score(6, groups(rs))
	if !rep.Spread || math.Abs(rep.Normalized-1) > 4*rep.NormalizedErr {
		t.Errorf("Score: normalized %.4f ± %.4f (want 1), anticoncentrated %v", rep.Normalized, rep.NormalizedErr, rep.Spread)
	}
}

// TestUniformAndDepolarizing: a uniform sampler (fidelity 0) scores 0 and
// the global depolarizing model with fidelity f scores f·(D·Z − 1)
// (Boixo et al. 2018, Nature Physics 14, 595), within 4 standard errors of the pooled
// shots. Shots of different instances are pooled with equal counts, a
// stratified sample whose pooled standard error is conservative.
func TestUniformAndDepolarizing(t *testing.T) {
	for _, f := range []float64{0, 0.5} {
		c := testConfig(t, "line:6", "haar", 20, 20, 4000, Noise{Fidelity: f})
		rep := Score(6, groups(runAll(t, c)))
		want := f * rep.Ideal
		if math.Abs(rep.Linear-want) > 4*rep.LinearErr {
			t.Errorf("fidelity %g: F_lin = %.4f ± %.4f, want f·(D·Z − 1) = %.4f", f, rep.Linear, rep.LinearErr, want)
		}
	}
}

// TestGateErrorDigitalModel: with Pauli errors of rate e after every gate,
// the XEB of deep circuits is the digital error model's (1 − e)^g (Arute et
// al., "Quantum supremacy using a programmable superconducting processor",
// Nature 574, 505, 2019: the fidelity is about the product of the gate
// fidelities), here within 15%: the statistical error is about 2%
// (20 instances × 100 trajectories × 2000 shots) and the model's own bias
// (errors in the last layers that the readout cannot see, and the
// incomplete scrambling of shallow errors) is a few percent, so 15% leaves
// room for both while still failing for a wrong error rate (e = 0.01 over
// 60 gates moves the prediction by 45% against no errors). Readout
// and depolarizing multiply in as their own fidelities.
func TestGateErrorDigitalModel(t *testing.T) {
	cases := []struct {
		name string
		nz   Noise
	}{
		{"gate errors", Noise{Fidelity: 1, GateError: 0.01}},
		{"all three", Noise{Fidelity: 0.8, GateError: 0.01, Readout01: 0.02, Readout10: 0.04}},
	}
	for _, tc := range cases {
		c := testConfig(t, "ring:6", "haar", 20, 20, 2000, tc.nz)
		g := c.Schedule.GateCount(c.Depth) // 60
		rs := runAll(t, c)
		for _, r := range rs {
			if r.Trajectories != DefaultTrajectories {
				t.Fatalf("%d trajectories, want %d", r.Trajectories, DefaultTrajectories)
			}
		}
		rep := Score(6, groups(rs))
		want := math.Pow(1-tc.nz.GateError, float64(g)) * tc.nz.Fidelity * math.Pow(1-(tc.nz.Readout01+tc.nz.Readout10)/2, 6)
		// ErrorModel is the same product (to rounding: 1e-14 relative).
		if model := tc.nz.ErrorModel().Predict(CountGates(c.Schedule, c.Ensemble, 6, c.Depth)).Fidelity; math.Abs(model-want) > 1e-14*want {
			t.Errorf("%s: ErrorModel predicts %.17g, want %.17g", tc.name, model, want)
		}
		t.Logf("%s: normalized %.4f ± %.4f, linear %.4f, digital model %.4f", tc.name, rep.Normalized, rep.NormalizedErr, rep.Linear, want)
		if math.Abs(rep.Normalized-want) > 0.15*want {
			t.Errorf("%s: normalized XEB %.4f ± %.4f, digital model %.4f (g = %d): off by more than 15%%", tc.name, rep.Normalized, rep.NormalizedErr, want, g)
		}
		if math.Abs(rep.Linear-want) > 0.15*want {
			t.Errorf("%s: linear XEB %.4f ± %.4f, digital model %.4f (g = %d): off by more than 15%%", tc.name, rep.Linear, rep.LinearErr, want, g)
		}
	}
}

// TestStdErrMatchesSpread: the standard errors D·sd(p)/√N of F_lin and
// sd(ln p)/√N of F_log match the spread of the estimates over repeated runs
// on one circuit within 10%. With R = 1000 repetitions the spread itself is
// known to about 1/√(2R) ≈ 2.2%, so 10% is more than 4 of its standard
// errors (common practice for the sampling error of a standard deviation).
func TestStdErrMatchesSpread(t *testing.T) {
	c := testConfig(t, "line:6", "haar", 20, 1, 1, Ideal)
	circ := Build(c.Schedule, c.Ensemble, 6, c.Seed, 0, c.Depth)
	probs := referenceProbabilities(t, circ)
	a := NewAlias(probs)
	const reps, shots = 1000, 400
	for _, f := range []float64{1, 0.5} {
		nz := Noise{Fidelity: f}
		var lin, linSE, lg, lgSE []float64
		out := make([]uint64, 0, shots)
		p := make([]float64, shots)
		for rep := range reps {
			rng := rand.New(rand.NewPCG(uint64(rep), 99))
			out = DrawShots(out[:0], rng, a, 6, shots, nz)
			for k, x := range out {
				p[k] = probs[x]
			}
			v, se := stats.LinearXEB(p, 64)
			lin, linSE = append(lin, v), append(linSE, se)
			v, se = stats.LogXEB(p, 64)
			lg, lgSE = append(lg, v), append(lgSE, se)
		}
		for _, m := range []struct {
			name    string
			est, se []float64
		}{{"linear", lin, linSE}, {"log", lg, lgSE}} {
			spread := stats.Summarize(m.est).StdDev
			formula := stats.Summarize(m.se).Mean
			t.Logf("f=%g %s: formula %.5f, spread %.5f", f, m.name, formula, spread)
			if math.Abs(formula/spread-1) > 0.10 {
				t.Errorf("f=%g %s XEB: formula stderr %.5f, spread of %d runs %.5f: differ by more than 10%%", f, m.name, formula, reps, spread)
			}
		}
	}
}

// TestSamplerChiSquare compares the histogram of the sampler's shots with
// the exact output law for n ≤ 6, by Pearson's χ² test with gonum's
// distuv.ChiSquared as the reference (see chiSquareP), for each noise model
// alone. The exact laws are computed here from the state vector:
// depolarizing q = f·p + (1−f)/D; readout q(y) = Σ_x p(x) Π_q T(y_q|x_q);
// Pauli errors the average over all 16² error patterns of a two-gate
// circuit, with T = shots trajectories so that the shots are independent
// draws of the mixture.
func TestSamplerChiSquare(t *testing.T) {
	const shots = 60000
	check := func(name string, r *Result, want []float64) {
		t.Helper()
		counts := make([]int, len(want))
		for _, x := range r.Outcomes {
			counts[x]++
		}
		if p := chiSquareP(t, counts, want); p < pThreshold {
			t.Errorf("%s: χ² p-value %.3g < %g", name, p, pThreshold)
		}
	}
	one := func(c *Config) *Result {
		c.Instances = []int{3}
		return runAll(t, c)[0]
	}

	c := testConfig(t, "line:4", "haar", 6, 1, shots, Ideal)
	r := one(c)
	p := referenceProbabilities(t, r.Circuit)
	check("ideal", r, p)

	c = testConfig(t, "line:4", "cz+haar1", 6, 1, shots, Noise{Fidelity: 0.6})
	r = one(c)
	if r.Circuit.Final == nil {
		t.Fatal("cz+haar1 circuit has no final layer")
	}
	p = referenceProbabilities(t, r.Circuit)
	q := make([]float64, len(p))
	for x := range p {
		q[x] = 0.6*p[x] + 0.4/float64(len(p))
	}
	check("depolarizing", r, q)

	const p01, p10 = 0.05, 0.15
	c = testConfig(t, "line:4", "haar", 6, 1, shots, Noise{Fidelity: 1, Readout01: p01, Readout10: p10})
	r = one(c)
	p = referenceProbabilities(t, r.Circuit)
	q = make([]float64, len(p))
	for x := range p {
		for y := range q {
			w := p[x]
			for b := range 4 {
				xb, yb := x>>b&1, y>>b&1
				switch {
				case xb == 0 && yb == 0:
					w *= 1 - p01
				case xb == 0:
					w *= p01
				case yb == 1:
					w *= 1 - p10
				default:
					w *= p10
				}
			}
			q[y] += w
		}
	}
	check("readout", r, q)

	// Two gates on line:3 (one per layer), a Pauli error rate of 0.3.
	const e = 0.3
	c = testConfig(t, "line:3", "haar", 2, 1, shots, Noise{Fidelity: 1, GateError: e})
	c.Trajectories = shots
	r = one(c)
	if r.Trajectories != shots || r.Circuit.GateCount() != 2 {
		t.Fatalf("%d trajectories, %d gates; want %d and 2", r.Trajectories, r.Circuit.GateCount(), shots)
	}
	check("gate errors", r, pauliMixture(t, r.Circuit, e))
}

// pauliMixture returns the output law of c with each gate followed by the
// Pauli channel ρ → (1−e)ρ + (e/15) Σ_{P ≠ I} PρP, by enumerating every
// error pattern. Paulis are applied as single-qubit gates with Apply1,
// independently of the package's 4×4 Pauli table.
func pauliMixture(t *testing.T, c *Circuit, e float64) []float64 {
	t.Helper()
	single := [4][4]complex128{{1, 0, 0, 1}, {0, 1, 1, 0}, {0, -1i, 1i, 0}, {1, 0, 0, -1}} // I, X, Y, Z
	var gates []circuits.Gate
	for _, step := range c.Steps {
		gates = append(gates, step...)
	}
	st, err := sim.NewState(c.Qubits, 0)
	if err != nil {
		t.Fatal(err)
	}
	total := make([]float64, 1<<c.Qubits)
	pattern := make([]int, len(gates))
	var walk func(k int, w float64)
	walk = func(k int, w float64) {
		if k == len(gates) {
			st.Reset()
			for i, g := range gates {
				st.Apply2(g.A, g.B, &g.M, 1)
				st.Apply1(g.A, &single[pattern[i]/4], 1)
				st.Apply1(g.B, &single[pattern[i]%4], 1)
			}
			for x, v := range st.Probabilities(nil, 1) {
				total[x] += w * v
			}
			return
		}
		for p := range 16 {
			pattern[k] = p
			if p == 0 {
				walk(k+1, w*(1-e))
			} else {
				walk(k+1, w*e/15)
			}
		}
	}
	walk(0, 1)
	return total
}

// TestLogXEB: for Porter–Thomas outputs an ideal sampler gives F_log → 1
// and a uniform sampler 0 (Boixo et al. 2018): under ideal sampling D·p
// follows Gamma(2, 1), with E[ln D·p] = ψ(2) = 1 − γ, and under uniform
// sampling Exp(1), with E[ln D·p] = ψ(1) = −γ. At finite D a Haar output p
// follows Beta(1, D−1) exactly, a shot of an ideal sampler size-biases it
// to Beta(2, D−1), and E[ln X] = ψ(a) − ψ(a+b) for X ~ Beta(a, b) (common
// practice), so
//
//	ideal:   E[F_log] = ln D + γ + ψ(2) − ψ(D+1) → γ + 1 − γ = 1,
//	uniform: E[F_log] = ln D + γ + ψ(1) − ψ(D)   → 0,
//
// with ψ from gonum mathext.Digamma. Checked within 4 standard errors of
// the mean over instances (which includes instance-to-instance spread).
func TestLogXEB(t *testing.T) {
	dim := 256.0
	wants := map[float64]float64{
		1: math.Log(dim) + stats.EulerGamma + mathext.Digamma(2) - mathext.Digamma(dim+1),
		0: math.Log(dim) + stats.EulerGamma + mathext.Digamma(1) - mathext.Digamma(dim),
	}
	for f, want := range wants {
		// The finite-D values are within 1/D of the limits 1 and 0.
		if math.Abs(want-f) > 1/dim {
			t.Fatalf("exact F_log target %.5f for fidelity %g is not near %g", want, f, f)
		}
		// line:8 at depth 40 is far past anti-concentration (about 10 layers).
		c := testConfig(t, "line:8", "haar", 40, 40, 1000, Noise{Fidelity: f})
		var logs []float64
		for _, r := range runAll(t, c) {
			v, _ := stats.LogXEB(r.PIdeal, dim)
			logs = append(logs, v)
		}
		m, se := meanSE(logs)
		t.Logf("fidelity %g: mean F_log %.4f ± %.4f, want %.4f", f, m, se, want)
		if math.Abs(m-want) > 4*se {
			t.Errorf("fidelity %g: mean F_log %.4f ± %.4f, want %.4f", f, m, se, want)
		}
	}
}

// TestRunDeterminism: an instance's shots depend only on (seed, instance,
// depth), not on the worker count or the other instances run (per-instance streams keyed by (seed, instance)).
func TestRunDeterminism(t *testing.T) {
	nz := Noise{Fidelity: 0.9, GateError: 0.02, Readout01: 0.01, Readout10: 0.02}
	a := testConfig(t, "line:5", "haar", 6, 6, 300, nz)
	a.Workers = 1
	all := runAll(t, a)
	b := testConfig(t, "line:5", "haar", 6, 6, 300, nz)
	b.Instances, b.Workers = []int{4, 1}, 3 // a subset, as a part of a run has, listed out of order
	some := runAll(t, b)
	if some[0].Circuit.Instance != 1 || some[1].Circuit.Instance != 4 {
		t.Fatalf("results not in ascending order: %d, %d", some[0].Circuit.Instance, some[1].Circuit.Instance)
	}
	for _, r := range some {
		ref := all[r.Circuit.Instance]
		if !slices.Equal(r.Outcomes, ref.Outcomes) || !slices.Equal(r.PIdeal, ref.PIdeal) || r.Collision != ref.Collision {
			t.Errorf("instance %d differs between runs", r.Circuit.Instance)
		}
	}
	if slices.Equal(all[0].Outcomes, all[1].Outcomes) {
		t.Error("instances 0 and 1 drew the same shots")
	}
}

// TestRunCancel: a cancelled run emits only whole instances and returns
// context.Canceled.
func TestRunCancel(t *testing.T) {
	c := testConfig(t, "line:4", "haar", 4, 50, 100, Ideal)
	c.Workers = 1
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	c.Progress = cancel // cancel as soon as the first instance is done
	var got []int
	done, err := Run(ctx, c, func(r *Result) error {
		if len(r.Outcomes) != c.Shots {
			t.Errorf("instance %d emitted with %d shots", r.Circuit.Instance, len(r.Outcomes))
		}
		got = append(got, r.Circuit.Instance)
		return nil
	})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("err = %v, want context.Canceled", err)
	}
	if len(done) == 0 || len(done) == len(c.Instances) || !slices.Equal(done, got) || done[0] != 0 {
		t.Errorf("done %v, emitted %v", done, got)
	}
}

func TestTrajectoryShots(t *testing.T) {
	for _, c := range []struct{ shots, t int }{{10, 3}, {100, 100}, {1000, 100}, {7, 1}} {
		split := TrajectoryShots(c.shots, c.t)
		sum := 0
		for i, k := range split {
			sum += k
			if k != c.shots/c.t && k != c.shots/c.t+1 || i > 0 && k > split[i-1] {
				t.Errorf("TrajectoryShots(%d, %d) = %v: not an even split", c.shots, c.t, split)
			}
		}
		if sum != c.shots || len(split) != c.t {
			t.Errorf("TrajectoryShots(%d, %d) = %v", c.shots, c.t, split)
		}
	}
	c := testConfig(t, "line:3", "haar", 2, 1, 30, Noise{Fidelity: 1, GateError: 0.1})
	if got := c.TrajectoriesPerInstance(); got != 30 {
		t.Errorf("30 shots: %d trajectories, want min(30, 100) = 30", got)
	}
}

func TestConfigValidate(t *testing.T) {
	base := func() *Config { return testConfig(t, "line:3", "haar", 2, 2, 10, Ideal) }
	cases := map[string]func(*Config){
		"depth":        func(c *Config) { c.Depth = 0 },
		"shots":        func(c *Config) { c.Shots = 0 },
		"qubits":       func(c *Config) { c.Qubits = 1 },
		"no instances": func(c *Config) { c.Instances = nil },
		"negative id":  func(c *Config) { c.Instances = []int{-1} },
		"duplicate id": func(c *Config) { c.Instances = []int{1, 1} },
		"trajectories": func(c *Config) { c.Trajectories = -1 },
		"fidelity":     func(c *Config) { c.Noise.Fidelity = 1.5 },
		"gate error":   func(c *Config) { c.Noise.GateError = -0.1 },
		"readout NaN":  func(c *Config) { c.Noise.Readout10 = math.NaN() },
	}
	for name, mutate := range cases {
		c := base()
		mutate(c)
		err := c.Validate()
		if !errors.Is(err, ErrConfig) && !errors.Is(err, ErrNoiseRange) {
			t.Errorf("%s: Validate() = %v", name, err)
		}
	}
	if err := base().Validate(); err != nil {
		t.Errorf("valid config: %v", err)
	}
}

// TestScoreByHand checks Score on values worked out by hand: D = 4,
// p = (0.1, 0.4, 0.25) gives F_lin = 4·0.25 − 1 = 0 and, with Z = 0.3,
// D·Z − 1 = 0.2 (F_lin = D·mean p(x) − 1, Boixo et al. 2018).
func TestScoreByHand(t *testing.T) {
	r := Score(2, []InstanceSamples{{Instance: 7, Collision: 0.3, PIdeal: []float64{0.1, 0.4, 0.25}}})
	s := r.Instances[0]
	near := func(a, b float64) bool { return math.Abs(a-b) < 1e-12 }
	// sd of (0.1, 0.4, 0.25) is 0.15, so stderr = 4·0.15/√3.
	if !near(s.Linear, 0) || !near(s.LinearErr, 4*0.15/math.Sqrt(3)) || !near(s.Ideal, 0.2) || !near(s.Normalized, 0) {
		t.Errorf("instance score %+v", s)
	}
	wantLog := math.Log(4) + stats.EulerGamma + (math.Log(0.1)+math.Log(0.4)+math.Log(0.25))/3
	if !near(s.Log, wantLog) || !near(r.Log, wantLog) || r.Shots != 3 || !near(r.PorterThomas, 0.6) {
		t.Errorf("report %+v", r)
	}
	// D·Z − 1 = 0.2 is far from (D−1)/(D+1) = 0.6.
	if r.Spread {
		t.Error("Spread with D·Z − 1 = 0.2 against 0.6")
	}
}

// TestTrajectoryCheckpoints: trajectories that start from a saved ideal
// state (checkpointsFor) give the same outcomes bit for bit as
// trajectories run from |0…0⟩, the definition: both apply the same gates in
// the same order to the same amplitudes. Checked with room for every first
// error, with a budget of one and of two states, on a gate set with a final
// single-qubit layer, and at a high error rate so that first errors fall
// on every gate, including the first.
func TestTrajectoryCheckpoints(t *testing.T) {
	for _, gates := range []string{"haar", "cz+haar1"} {
		c := testConfig(t, "grid:3x3", gates, 9, 3, 120, Noise{Fidelity: 1, GateError: 0.03})
		c.Trajectories = 60
		c.SavedStateBytes = -1
		if c.savedStates() != 0 {
			t.Fatalf("%d saved states with no budget", c.savedStates())
		}
		want := runAll(t, c)
		for _, budget := range []float64{1, 2, 100} {
			c.SavedStateBytes = int64(budget * sim.StateBytes(c.Qubits))
			if got := c.savedStates(); got != min(int(budget), c.Trajectories) {
				t.Fatalf("budget of %g states: %d saved states", budget, got)
			}
			got := runAll(t, c)
			for i := range want {
				if !slices.Equal(got[i].Outcomes, want[i].Outcomes) || !slices.Equal(got[i].PIdeal, want[i].PIdeal) {
					t.Errorf("%s, budget %g states, instance %d: outcomes differ from trajectories run from the start", gates, budget, i)
				}
			}
		}
	}
}
