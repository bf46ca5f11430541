package sampling

import (
	"flag"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"path/filepath"
	"slices"
	"testing"

	"mixdepth/circuits"
	"mixdepth/internal/golden"
)

// chipConfig is testConfig with the noise of a ChipNoise on the graph spec.
func chipConfig(t *testing.T, spec, gates string, depth, instances, shots int, chip func(g *circuits.Graph) *circuits.ChipNoise) *Config {
	t.Helper()
	c := testConfig(t, spec, gates, depth, instances, shots, Noise{})
	g, err := circuits.ParseGraph(spec)
	if err != nil {
		t.Fatal(err)
	}
	c.Noise = Noise{Chip: chip(g)}
	return c
}

// TestChipUniformSameShots checks that a ChipNoise with the same rates
// everywhere draws exactly what the uniform fields draw: the same random
// streams in the same order, so that runs with only the uniform options
// keep their outputs bit for bit.
func TestChipUniformSameShots(t *testing.T) {
	for _, gates := range []string{"haar", "cz+haar1"} {
		uniform := Noise{Fidelity: 0.9, GateError: 0.02, Readout01: 0.03, Readout10: 0.05}
		want := runAll(t, testConfig(t, "grid:2x3", gates, 6, 3, 400, uniform))
		c := chipConfig(t, "grid:2x3", gates, 6, 3, 400, func(g *circuits.Graph) *circuits.ChipNoise {
			return circuits.UniformNoise(g, 0.02, 0, 0.03, 0.05, 0.9)
		})
		got := runAll(t, c)
		for i := range want {
			if !slices.Equal(got[i].Outcomes, want[i].Outcomes) || got[i].Trajectories != want[i].Trajectories {
				t.Errorf("%s instance %d: a uniform chip noise gives other shots than the uniform fields", gates, i)
			}
		}
	}
}

// fixedGate is a test ensemble whose every gate is M, drawing nothing.
type fixedGate struct{ m [16]complex128 }

func (f fixedGate) Name() string                         { return "fixed" }
func (f fixedGate) Gate(_ *rand.Rand, m *[16]complex128) { *m = f.m }

// TestChipOneNoisyCoupler runs identity gates on line:4 where only the
// coupler (1, 2) has a Pauli error rate e. The state stays a basis state:
// an error flips qubit 1 when its Pauli is X or Y there, and likewise
// qubit 2, so each error draws the flip pattern 00 with probability 3/15
// and each of 01, 10, 11 with 4/15. After m gates on the coupler the chain
// of patterns, whose kernel has eigenvalue 1 − 16e/15 off the uniform law
// (worked by hand), gives
//
//	P(qubits 1 and 2 read 00) = 1/4 + (3/4)·(1 − 16e/15)^m,
//
// checked within 4 standard errors of the binomial fraction over
// independent shots (one trajectory per shot, fixed seed). Qubits 0 and 3
// sit only on noiseless couplers and must always read 0.
func TestChipOneNoisyCoupler(t *testing.T) {
	const e, shots, depth = 0.05, 20000, 8
	id := fixedGate{[16]complex128{0: 1, 5: 1, 10: 1, 15: 1}}
	c := chipConfig(t, "line:4", "haar", depth, 1, shots, func(g *circuits.Graph) *circuits.ChipNoise {
		ch := circuits.UniformNoise(g, 0, 0, 0, 0, 1)
		i, ok := ch.PairIndex(1, 2)
		if !ok {
			t.Fatal("line:4 has no coupler 1-2")
		}
		ch.Pair[i] = e
		return ch
	})
	c.Ensemble = id
	c.Trajectories = shots
	r := runAll(t, c)[0]
	m := 0 // gates on the coupler (1, 2)
	for _, step := range r.Circuit.Steps {
		for _, g := range step {
			if g.A == 1 && g.B == 2 {
				m++
			}
		}
	}
	if m != depth/2 {
		t.Fatalf("%d gates on the coupler 1-2 at depth %d, want %d (line rule: class B every other layer)", m, depth, depth/2)
	}
	zero := 0
	for _, x := range r.Outcomes {
		if x&0b1001 != 0 {
			t.Fatalf("outcome %04b: a noiseless qubit flipped", x)
		}
		if x&0b0110 == 0 {
			zero++
		}
	}
	want := 0.25 + 0.75*math.Pow(1-16*e/15, float64(m))
	se := math.Sqrt(want * (1 - want) / shots)
	if got := float64(zero) / shots; math.Abs(got-want) > 4*se {
		t.Errorf("P(00 on qubits 1, 2) = %.4f, want %.4f ± 4·%.4f", got, want, se)
	}
}

// TestChipReadoutPerQubit checks each qubit's own readout flips: line:3
// with the gate X⊗X, depth 2 (coupler (0,1) then (1,2)), prepares |1 0 1⟩,
// so qubits 0 and 2 show their 1→0 rates and qubit 1 its 0→1 rate, each
// within 4 binomial standard errors (fixed seed).
func TestChipReadoutPerQubit(t *testing.T) {
	const shots = 40000
	p01 := []float64{0.3, 0.07, 0.5}
	p10 := []float64{0.12, 0.4, 0.02}
	c := chipConfig(t, "line:3", "haar", 2, 1, shots, func(g *circuits.Graph) *circuits.ChipNoise {
		ch := circuits.UniformNoise(g, 0, 0, 0, 0, 1)
		copy(ch.Readout01, p01)
		copy(ch.Readout10, p10)
		return ch
	})
	c.Ensemble = fixedGate{[16]complex128{3: 1, 6: 1, 9: 1, 12: 1}} // X⊗X
	r := runAll(t, c)[0]
	var ones [3]int
	for _, x := range r.Outcomes {
		for q := range 3 {
			ones[q] += int(x >> q & 1)
		}
	}
	for q, want := range []float64{1 - p10[0], p01[1], 1 - p10[2]} {
		se := math.Sqrt(want * (1 - want) / shots)
		if got := float64(ones[q]) / shots; math.Abs(got-want) > 4*se {
			t.Errorf("qubit %d reads 1 with frequency %.4f, want %.4f ± 4·%.4f", q, got, want, se)
		}
	}
}

// density is a 4×4 density matrix of two qubits, basis x = b_0 + 2·b_1.
type density [4][4]complex128

// op4 returns the 4×4 operator, in the state basis, of the gate m on the
// qubits (a, b) of a two-qubit state, m in the gate basis 2·b_a + b_b.
func op4(m *[16]complex128, a, b int) (u [4][4]complex128) {
	for x := range 4 {
		for y := range 4 {
			u[x][y] = m[4*(2*(x>>a&1)+(x>>b&1))+2*(y>>a&1)+(y>>b&1)]
		}
	}
	return u
}

// op1 returns the 4×4 operator of the 2×2 gate m on qubit q.
func op1(m *[4]complex128, q int) (u [4][4]complex128) {
	for x := range 4 {
		for y := range 4 {
			if x&^(1<<q) == y&^(1<<q) {
				u[x][y] = m[2*(x>>q&1)+(y>>q&1)]
			}
		}
	}
	return u
}

// conj returns u·ρ·u†.
func (r density) conj(u [4][4]complex128) (out density) {
	for i := range 4 {
		for j := range 4 {
			var s complex128
			for k := range 4 {
				for l := range 4 {
					s += u[i][k] * r[k][l] * cmplx.Conj(u[j][l])
				}
			}
			out[i][j] = s
		}
	}
	return out
}

// mix returns Σ w_k·ρ_k.
func mix(ws []float64, rs []density) (out density) {
	for k, r := range rs {
		for i := range 4 {
			for j := range 4 {
				out[i][j] += complex(ws[k], 0) * r[i][j]
			}
		}
	}
	return out
}

// paulis2x2 are I, X, Y, Z, row-major, written here apart from the
// package's tables.
var paulis2x2 = [4][4]complex128{{1, 0, 0, 1}, {0, 1, 1, 0}, {0, -1i, 1i, 0}, {1, 0, 0, -1}}

// single applies ρ → (1−s)ρ + (s/3)(XρX + YρY + ZρZ) on qubit q.
func (r density) single(q int, s float64) density {
	rs := []density{r}
	ws := []float64{1 - s}
	for p := 1; p < 4; p++ {
		rs = append(rs, r.conj(op1(&paulis2x2[p], q)))
		ws = append(ws, s/3)
	}
	return mix(ws, rs)
}

// pair applies ρ → (1−e)ρ + (e/15) Σ_{P ≠ I⊗I} PρP on both qubits.
func (r density) pair(e float64) density {
	rs := []density{r}
	ws := []float64{1 - e}
	for p := 1; p < 16; p++ {
		a, b := op1(&paulis2x2[p/4], 0), op1(&paulis2x2[p%4], 1)
		rs = append(rs, r.conj(a).conj(b))
		ws = append(ws, e/15)
	}
	return mix(ws, rs)
}

// chipLaw returns the exact output law of the two-qubit circuit c of the
// gate set gs, G·(u_a ⊗ u_b) with G the set's entangler or its coupler's,
// under ch by applying every channel to the density matrix: each gate as u_a ⊗ u_b = G†·M, then the single-qubit
// channels of a and b (before G when beforeG, after it otherwise), G, the
// coupler's Pauli channel; the final layer with a single-qubit channel
// after each gate; then the readout flips of each qubit on the diagonal.
func chipLaw(c *Circuit, gs *circuits.GateSet, ch *circuits.ChipNoise, beforeG bool) [4]float64 {
	bound := gs.EdgeEntanglers()
	var r density
	r[0][0] = 1
	for _, step := range c.Steps {
		for _, gt := range step {
			g := &gs.G
			if b, ok := bound[[2]int{gt.A, gt.B}]; ok {
				g = &b
			}
			var gd [16]complex128 // G†
			for i := range 4 {
				for j := range 4 {
					gd[4*i+j] = cmplx.Conj(g[4*j+i])
				}
			}
			var k [16]complex128
			mul4(&k, &gd, &gt.M)
			r = r.conj(op4(&k, gt.A, gt.B))
			if beforeG {
				r = r.single(gt.A, ch.Single[gt.A]).single(gt.B, ch.Single[gt.B])
			}
			r = r.conj(op4(g, gt.A, gt.B))
			if !beforeG {
				r = r.single(gt.A, ch.Single[gt.A]).single(gt.B, ch.Single[gt.B])
			}
			r = r.pair(ch.PairError(gt.A, gt.B))
		}
	}
	for q := range c.Final {
		r = r.conj(op1(&c.Final[q], q)).single(q, ch.Single[q])
	}
	var law [4]float64
	for y := range 4 {
		for x := range 4 {
			w := real(r[y][y])
			for q := range 2 {
				by, bx := y>>q&1, x>>q&1
				switch {
				case by == 0 && bx == 1:
					w *= ch.Readout01[q]
				case by == 0:
					w *= 1 - ch.Readout01[q]
				case bx == 0:
					w *= ch.Readout10[q]
				default:
					w *= 1 - ch.Readout10[q]
				}
			}
			law[x] += w
		}
	}
	return law
}

// TestChipSingleQubitErrorsDensity checks the placement of single-qubit
// errors against a brute-force density matrix: a two-qubit circuit of
// depth 3 with large single-qubit rates, a coupler rate and per-qubit
// readout flips. The output law of the channels applied explicitly to ρ
// (single-qubit errors after u_a, u_b and before G, and after each
// final-layer gate) is compared outcome by outcome with the frequencies of
// independent shots (one trajectory each, fixed seed), within 4 binomial
// standard errors. Three gate sets: cz+haar1; CNOT dressed with the
// identity as its only single-qubit gate; and CZ with its coupler
// calibrated to CNOT (a per-coupler entangler), dressed the same way. With
// CNOT an X error on the control before G also flips the target, after G
// it does not, so the law with the errors placed after G differs from the
// right one by more than 6 standard errors (checked, so that the test can
// fail); the law without single-qubit errors must differ too.
func TestChipSingleQubitErrorsDensity(t *testing.T) {
	shots := 60000
	if testing.Short() || raceEnabled {
		// Still enough for the wrong placement to lie 7 standard errors away.
		shots = 30000
	}
	build := func(g *circuits.Graph) *circuits.ChipNoise {
		ch := circuits.UniformNoise(g, 0.1, 0, 0, 0, 1)
		ch.Single = []float64{0.3, 0.2}
		ch.Readout01 = []float64{0.04, 0.1}
		ch.Readout10 = []float64{0.08, 0.02}
		return ch
	}
	cnot, _ := circuits.Entangler("cnot")
	plain, err := circuits.NewGateSet("cnot-identity", cnot, [][4]complex128{{1, 0, 0, 1}})
	if err != nil {
		t.Fatal(err)
	}
	cz, _ := circuits.NewEnsemble("cz+haar1")
	// A set whose G is CZ but whose coupler 0-1 is calibrated to CNOT: the
	// dressing errors must be conjugated by the coupler's entangler.
	czG, _ := circuits.Entangler("cz")
	unbound, err := circuits.NewGateSet("coupler-cnot", czG, [][4]complex128{{1, 0, 0, 1}})
	if err != nil {
		t.Fatal(err)
	}
	unbound.Couplers = []circuits.CouplerGate{{A: "0", B: "1", G: cnot}}
	line2, _ := circuits.ParseGraph("line:2")
	perCoupler, err := unbound.Bind(line2)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		gs        *circuits.GateSet
		seed      uint64
		placement bool // the after-G law must differ
	}{{cz.(*circuits.GateSet), 7, false}, {plain, 11, true}, {perCoupler, 13, true}} {
		c := chipConfig(t, "line:2", "haar", 3, 1, shots, build)
		c.Ensemble = tc.gs
		c.Seed = tc.seed
		c.Trajectories = shots
		r := runAll(t, c)[0]
		want := chipLaw(r.Circuit, tc.gs, c.Noise.Chip, true)
		after := chipLaw(r.Circuit, tc.gs, c.Noise.Chip, false)
		none := *c.Noise.Chip
		none.Single = []float64{0, 0}
		without := chipLaw(r.Circuit, tc.gs, &none, true)
		var count [4]int
		for _, x := range r.Outcomes {
			count[x]++
		}
		sumWant := 0.0
		var worstAfter, worstWithout float64
		for x := range 4 {
			sumWant += want[x]
			se := math.Sqrt(want[x] * (1 - want[x]) / float64(shots))
			got := float64(count[x]) / float64(shots)
			if math.Abs(got-want[x]) > 4*se {
				t.Errorf("%s, outcome %02b: frequency %.4f, density matrix %.4f ± 4·%.4f", tc.gs.Spec, x, got, want[x], se)
			}
			worstAfter = max(worstAfter, math.Abs(after[x]-want[x])/se)
			worstWithout = max(worstWithout, math.Abs(without[x]-want[x])/se)
		}
		if math.Abs(sumWant-1) > 1e-12 {
			t.Errorf("%s: the density-matrix law sums to %v", tc.gs.Spec, sumWant)
		}
		if worstWithout < 6 || (tc.placement && worstAfter < 6) {
			t.Errorf("%s: the wrong laws differ by only %.1f (errors after G) and %.1f (none) standard errors; the test would not see them", tc.gs.Spec, worstAfter, worstWithout)
		}
	}
}

// TestChipTrajectoryCheckpoints: with single-qubit and per-coupler errors,
// trajectories started from saved ideal states give the same shots, bit
// for bit, as trajectories run from |0…0⟩ (the first error now counts the
// single-qubit ones, the final layer included).
func TestChipTrajectoryCheckpoints(t *testing.T) {
	for _, gates := range []string{"cz+haar1", "iswap+haar1"} {
		c := chipConfig(t, "grid:3x3", gates, 9, 2, 120, func(g *circuits.Graph) *circuits.ChipNoise {
			ch := circuits.UniformNoise(g, 0, 0, 0.01, 0.02, 1)
			ch.Pair[3] = 0.02
			for q := range ch.Single {
				ch.Single[q] = 0.002 * float64(q)
			}
			return ch
		})
		c.Trajectories = 60
		c.SavedStateBytes = -1
		want := runAll(t, c)
		c.SavedStateBytes = 0
		got := runAll(t, c)
		for i := range want {
			if !slices.Equal(got[i].Outcomes, want[i].Outcomes) {
				t.Errorf("%s instance %d: outcomes differ from trajectories run from the start", gates, i)
			}
		}
	}
}

// TestChipSingleWithoutSingleGates checks that for a Haar ensemble, which has no
// single-qubit gates, single-qubit rates change nothing: no trajectories,
// the shots of the noiseless chip.
func TestChipSingleWithoutSingleGates(t *testing.T) {
	noisy := chipConfig(t, "ring:4", "haar", 4, 2, 300, func(g *circuits.Graph) *circuits.ChipNoise {
		return circuits.UniformNoise(g, 0, 0.2, 0, 0, 1)
	})
	clean := chipConfig(t, "ring:4", "haar", 4, 2, 300, func(g *circuits.Graph) *circuits.ChipNoise {
		return circuits.UniformNoise(g, 0, 0, 0, 0, 1)
	})
	if noisy.TrajectoriesPerInstance() != 0 {
		t.Errorf("%d trajectories for single-qubit errors of a gate set without single-qubit gates", noisy.TrajectoriesPerInstance())
	}
	a, b := runAll(t, noisy), runAll(t, clean)
	for i := range a {
		if !slices.Equal(a[i].Outcomes, b[i].Outcomes) {
			t.Errorf("instance %d: single-qubit rates changed the shots of Haar gates", i)
		}
	}
}

// TestChipValidate checks the errors for a chip noise that does not fit the
// circuit or sits beside uniform fields.
func TestChipValidate(t *testing.T) {
	c := chipConfig(t, "line:4", "haar", 4, 1, 10, func(g *circuits.Graph) *circuits.ChipNoise {
		return circuits.UniformNoise(g, 0.01, 0, 0, 0, 1)
	})
	ring, _ := circuits.ParseGraph("ring:4")
	line5, _ := circuits.ParseGraph("line:5")
	for _, bad := range []Noise{
		{Chip: c.Noise.Chip, GateError: 0.01},
		{Chip: circuits.UniformNoise(line5, 0, 0, 0, 0, 1)},
		{Chip: circuits.UniformNoise(ring, 2, 0, 0, 0, 1)},
	} {
		d := *c
		d.Noise = bad
		if err := d.Validate(); err == nil {
			t.Errorf("%+v: no error", bad)
		}
	}
	// ring:4 has every coupler of line:4: accepted.
	d := *c
	d.Noise = Noise{Chip: circuits.UniformNoise(ring, 0.01, 0, 0, 0, 1)}
	if err := d.Validate(); err != nil {
		t.Error(err)
	}
}

// finalIdentity is a test ensemble of identity two-qubit gates with a final
// layer of identity single-qubit gates: only the final layer can hold
// single-qubit errors.
type finalIdentity struct{ fixedGate }

func (finalIdentity) Final(_ *rand.Rand, m *[4]complex128) { *m = [4]complex128{1, 0, 0, 1} }

// TestChipFinalLayerErrors: with identity gates and identity final gates,
// a trajectory's only errors are those after the final layer, and qubit q
// reads 1 exactly when its error is X or Y: P(1) = 2·Single[q]/3 (worked
// by hand), within 4 binomial standard errors. Trajectories whose first
// error lies past the last gate start from the last saved state; the shots
// are the same bit for bit without saved states.
func TestChipFinalLayerErrors(t *testing.T) {
	const shots = 30000
	single := []float64{0.3, 0, 0.06}
	c := chipConfig(t, "line:3", "haar", 4, 1, shots, func(g *circuits.Graph) *circuits.ChipNoise {
		ch := circuits.UniformNoise(g, 0, 0, 0, 0, 1)
		copy(ch.Single, single)
		return ch
	})
	c.Ensemble = finalIdentity{fixedGate{[16]complex128{0: 1, 5: 1, 10: 1, 15: 1}}}
	c.Trajectories = shots
	r := runAll(t, c)[0]
	var ones [3]int
	for _, x := range r.Outcomes {
		for q := range 3 {
			ones[q] += int(x >> q & 1)
		}
	}
	for q, s := range single {
		want := 2 * s / 3
		se := math.Sqrt(want * (1 - want) / shots)
		if got := float64(ones[q]) / shots; math.Abs(got-want) > 4*se {
			t.Errorf("qubit %d reads 1 with frequency %.4f, want %.4f ± 4·%.4f", q, got, want, se)
		}
	}
	c.SavedStateBytes = -1
	if again := runAll(t, c)[0]; !slices.Equal(again.Outcomes, r.Outcomes) {
		t.Error("final-layer errors: shots differ without saved states")
	}
}

var updateChip = flag.Bool("update", false, "rewrite testdata/chip_regress.json from the current code")

// chipRegress is what TestChipRegress pins: the outcomes of a small run
// with per-coupler, single-qubit and readout errors.
type chipRegress struct {
	Outcomes [][]uint64
}

// TestChipRegress pins the shots of a run with a ChipNoise (per-coupler
// rates, single-qubit errors on cz+haar1, per-qubit readout), so that a
// change to SingleErrorStream or to the order of the draws shows up: it
// would change every later table of a run with these flags. Regenerate
// with go test ./sampling/ -run ChipRegress -update, after checking why.
func TestChipRegress(t *testing.T) {
	c := chipConfig(t, "ring:5", "cz+haar1", 6, 2, 40, func(g *circuits.Graph) *circuits.ChipNoise {
		ch := circuits.UniformNoise(g, 0.01, 0.003, 0.02, 0.04, 0.95)
		ch.Pair[2] = 0.05
		ch.Single[4] = 0.02
		ch.Readout10[1] = 0.1
		return ch
	})
	c.Trajectories = 20
	var got chipRegress
	for _, r := range runAll(t, c) {
		got.Outcomes = append(got.Outcomes, r.Outcomes)
	}
	var want chipRegress
	if !golden.Load(t, filepath.Join("testdata", "chip_regress.json"), *updateChip, got, &want) {
		return
	}
	for i := range want.Outcomes {
		if i >= len(got.Outcomes) || !slices.Equal(got.Outcomes[i], want.Outcomes[i]) {
			t.Errorf("instance %d: outcomes differ from the pinned ones", i)
		}
	}
}
