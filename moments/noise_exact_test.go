package moments_test

import (
	"context"
	"math"
	"testing"

	"mixdepth/circuits"
	"mixdepth/moments"
)

// TestExactNoiseNoiselessEveryEngine: with no error at all (e = 0, no
// readout error, f = 1) the noisy benchmark is the ideal one, D·E[Z] − 1
// (Boixo et al., Nature Physics 14, 595, 2018: an ideal sampler's
// E[F_lin] = D·E[Σp²] − 1), on every engine: the vector engine (layered),
// the random-edge average, the complete-graph reduction and the MPS.
// Tolerance 1e-12 relative: the two curves run the same arithmetic but for
// the readout sum, whose blocks round differently.
func TestExactNoiseNoiselessEveryEngine(t *testing.T) {
	for _, c := range []struct {
		graph  string
		kind   circuits.ScheduleKind
		gates  string
		engine string
		depths []int
	}{
		{"line:6", circuits.KindLayered, "haar", moments.EngineVector, []int{0, 1, 2, 5, 10}},
		{"grid:2x3", circuits.KindLayered, "cz+haar1", moments.EngineVector, []int{0, 1, 3, 8}},
		{"ring:5", circuits.KindRandomEdge, "haar", moments.EngineVector, []int{0, 1, 10, 40}},
		{"ring:5", circuits.KindRandomEdge, "iswap+haar1", moments.EngineVector, []int{0, 3, 30}},
		{"complete:30", circuits.KindRandomEdge, "haar", moments.EngineVector, []int{0, 10, 100, 400}},
		{"line:10", circuits.KindLayered, "haar", moments.EngineMPS, []int{1, 4, 12}},
		{"line:10", circuits.KindLayered, "cz+haar1", moments.EngineMPS, []int{1, 4, 12}},
	} {
		g, s, e := exactInputs(t, c.graph, c.kind, c.gates)
		nz := circuits.UniformNoise(g, 0, 0, 0, 0, 1)
		opts := []moments.ExactOption{moments.ExactCurveOnly(), moments.ExactEngine(c.engine), moments.ExactNoise(nz), moments.ExactWorkers(2)}
		if c.engine == moments.EngineMPS {
			// A bond of 2^(n/2) keeps the MPS exact: the check is about the
			// noise rules, not truncation (where the noiseless readout
			// restores two traces and the noisy one only Tr).
			opts = append(opts, moments.ExactBondDim(32))
		}
		r, err := moments.Exact(context.Background(), g, s, e, c.depths, opts...)
		if err != nil {
			t.Fatalf("%s %s: %v", c.graph, c.gates, err)
		}
		for i, d := range c.depths {
			want := math.Ldexp(r.Collision[i], g.Qubits) - 1
			if math.Abs(r.XEBExpected[i]-want) > 1e-12*math.Max(1, math.Abs(want)) {
				t.Errorf("%s %s %s depth %d: noiseless XEB %.15g, D·E[Z] − 1 = %.15g", c.graph, c.gates, r.Engine, d, r.XEBExpected[i], want)
			}
			if r.XEBIdeal[i] != want || r.DigitalFidelity[i] != 1 {
				t.Errorf("%s depth %d: XEBIdeal %v (want %v), digital %v (want 1)", c.graph, d, r.XEBIdeal[i], want, r.DigitalFidelity[i])
			}
		}
	}
}

// chipOf returns an invented heterogeneous chip for g: every coupler and
// qubit with its own rates.
func chipOf(g *circuits.Graph) *circuits.ChipNoise {
	c := circuits.UniformNoise(g, 0, 0, 0, 0, 0.95)
	for i := range c.Pair {
		c.Pair[i] = 0.004 + 0.001*float64(i%7)
	}
	for q := range c.Single {
		c.Single[q] = 0.0005 * float64(1+q%3)
		c.Readout01[q] = 0.01 + 0.002*float64(q%4)
		c.Readout10[q] = 0.03 - 0.003*float64(q%5)
	}
	return c
}

// TestExactNoiseMPSAgainstVector: the MPS at a bond large enough to be
// exact (2^(n/2)) against the vector engine with a heterogeneous chip, on
// line:10 and grid:3x4, both gate kinds. Tolerance 1e-10 relative: the MPS
// rounds through SVDs of size up to 128 at every gate (TestMPS… in
// mps_test.go use the same scale).
func TestExactNoiseMPSAgainstVector(t *testing.T) {
	for _, c := range []struct {
		graph, gates string
		bond         int
	}{
		{"line:10", "haar", 32},
		{"line:10", "cz+haar1", 32},
		{"grid:3x4", "haar", 64},
		{"grid:3x4", "sqrt-iswap+haar1", 64},
	} {
		g, s, e := exactInputs(t, c.graph, circuits.KindLayered, c.gates)
		nz := chipOf(g)
		depths := []int{1, 2, 5, 12, 25}
		run := func(opts ...moments.ExactOption) *moments.Result {
			opts = append(opts, moments.ExactCurveOnly(), moments.ExactNoise(nz), moments.ExactWorkers(2))
			r, err := moments.Exact(context.Background(), g, s, e, depths, opts...)
			if err != nil {
				t.Fatal(err)
			}
			return r
		}
		v := run(moments.ExactEngine(moments.EngineVector))
		m := run(moments.ExactEngine(moments.EngineMPS), moments.ExactBondDim(c.bond))
		for i, d := range depths {
			if math.Abs(m.XEBExpected[i]-v.XEBExpected[i]) > 1e-10*math.Abs(v.XEBExpected[i]) {
				t.Errorf("%s %s depth %d: MPS %.15g, vector %.15g", c.graph, c.gates, d, m.XEBExpected[i], v.XEBExpected[i])
			}
		}
	}
}

// TestExactNoiseWhiteNoiseLimit: deep random circuits turn local noise into
// global white noise (Dalzell, Hunter-Jones, Brandão, "Random quantum
// circuits transform local noise into global white noise", Commun. Math.
// Phys. 2024, arXiv:2111.14907), so E[F_lin]/F_ideal approaches the
// digital fidelity: on line:8 at depth 60 with Pauli rate e on every
// coupler the ratio XEBOverDigital is within 3% of 1 at e = 0.005, and the
// excess |ratio − 1| shrinks as e decreases (the same work shows the
// deviation is of order e·n, not growing with depth once the circuit
// mixes). Both values are exact, so the comparison needs no tolerance
// beyond the 3% that the source's bound allows at this size.
func TestExactNoiseWhiteNoiseLimit(t *testing.T) {
	g, s, e := exactInputs(t, "line:8", circuits.KindLayered, "haar")
	excess := func(rate float64) float64 {
		r, err := moments.Exact(context.Background(), g, s, e, []int{60}, moments.ExactCurveOnly(), moments.ExactNoise(circuits.UniformNoise(g, rate, 0, 0, 0, 1)))
		if err != nil {
			t.Fatal(err)
		}
		return math.Abs(r.XEBOverDigital[0] - 1)
	}
	hi, lo := excess(0.005), excess(0.0025)
	t.Logf("|XEB/digital − 1| at depth 60: %.4g (e = 0.005), %.4g (e = 0.0025)", hi, lo)
	if hi > 0.03 {
		t.Errorf("e = 0.005: |XEB/digital − 1| = %.4g at depth 60, want ≤ 0.03", hi)
	}
	if !(lo < hi) {
		t.Errorf("the excess does not shrink with e: %.4g at e = 0.0025, %.4g at e = 0.005", lo, hi)
	}
}
