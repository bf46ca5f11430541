package sim_test

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"sync"
	"testing"

	"mixdepth/circuits"
	"mixdepth/sim"
)

// randomOps draws count ops on n qubits: Haar two-qubit gates on random
// pairs (with repeats of the previous pair, so that same-pair merging is
// exercised) and Haar single-qubit gates.
func randomOps(rng *rand.Rand, n, count int) []sim.Op {
	ops := make([]sim.Op, 0, count)
	for len(ops) < count {
		var op sim.Op
		switch {
		case rng.IntN(4) == 0:
			op.Single, op.A = true, rng.IntN(n)
			circuits.HaarUnitary(rng, 2, op.U[:])
		case len(ops) > 0 && !ops[len(ops)-1].Single && rng.IntN(4) == 0:
			prev := ops[len(ops)-1]
			op.A, op.B = prev.B, prev.A // the same pair, reversed
			circuits.HaarUnitary(rng, 4, op.M[:])
		default:
			op.A = rng.IntN(n)
			op.B = (op.A + 1 + rng.IntN(n-1)) % n
			circuits.HaarUnitary(rng, 4, op.M[:])
		}
		ops = append(ops, op)
	}
	return ops
}

// applyOneByOne applies ops with Apply2 and Apply1, the unfused reference.
func applyOneByOne(s *sim.State, ops []sim.Op, workers int) {
	for i := range ops {
		if ops[i].Single {
			s.Apply1(ops[i].A, &ops[i].U, workers)
		} else {
			s.Apply2(ops[i].A, ops[i].B, &ops[i].M, workers)
		}
	}
}

// TestRunMatchesOneByOne: fused passes (blocks, folded single-qubit gates,
// merged same-pair gates) give the amplitudes of the gate-by-gate circuit
// to 1e-12. Both are products of the same unitaries on a unit vector; each
// rounding is ~1e-16 relative and errors add over at most a few hundred
// operations, so a correct fusion differs by ≲ 1e-14 while any wrong order,
// position or product gives O(2^−n/2) or more. Sizes cover one whole-state
// pass (n ≤ BlockQubits), block passes with one and two workers, and a
// layered grid circuit with its final single-qubit layer and its undo;
// block passes of every shape blockSize chooses (k from 14 to 16 with
// k − 10 low qubits), whatever this machine's cache.
func TestRunMatchesOneByOne(t *testing.T) {
	defer func(v int) { *sim.FuseMinQubits = v }(*sim.FuseMinQubits)
	rng := rand.New(rand.NewPCG(51, 52))
	type testCase struct{ n, count, workers, k int }
	cases := []testCase{{2, 30, 1, 14}, {3, 60, 1, 14}, {7, 200, 1, 14}}
	for k := 14; k <= 16; k++ {
		cases = append(cases, testCase{k, 150, 1, k}, testCase{k + 1, 150, 1, k}, testCase{k + 3, 120, 2, k}, testCase{k + 4, 80, 3, k})
	}
	for _, tc := range cases {
		restore := sim.SetBlock(tc.k, tc.k-10)
		*sim.FuseMinQubits = tc.k + 1 // block passes above k qubits
		ops := randomOps(rng, tc.n, tc.count)
		ref, fused := newState(t, tc.n), newState(t, tc.n)
		randomState(rng, ref)
		scale := 1 / math.Sqrt(ref.Norm())
		for i := range ref.Amp {
			ref.Amp[i] *= complex(scale, 0)
		}
		copy(fused.Amp, ref.Amp)
		applyOneByOne(ref, ops, tc.workers)
		if err := fused.Run(context.Background(), ops, tc.workers); err != nil {
			t.Fatal(err)
		}
		restore()
		if d := maxDiff(ref.Amp, fused.Amp); d > 1e-12 {
			t.Errorf("n=%d ops=%d workers=%d blocks of %d qubits: fused and one-by-one differ by %g", tc.n, tc.count, tc.workers, tc.k, d)
		}
	}
}

// TestRunLayeredWithFinalLayer runs a 4×5 grid (20 qubits, blocks of
// BlockQubits) brickwork of depth 6 with a final single-qubit layer applied
// and undone between depths, as the scan does, against Apply2/Apply1.
// Tolerance as in TestRunMatchesOneByOne.
func TestRunLayeredWithFinalLayer(t *testing.T) {
	defer func(v int) { *sim.FuseMinQubits = v }(*sim.FuseMinQubits)
	defer sim.SetBlock(14, 4)() // the block shape the case was written for
	*sim.FuseMinQubits = sim.BlockQubits() + 1
	g, err := circuits.ParseGraph("grid:4x5")
	if err != nil {
		t.Fatal(err)
	}
	sch, err := circuits.NewSchedule("layered", g)
	if err != nil {
		t.Fatal(err)
	}
	ens, err := circuits.NewEnsemble("cz+haar1")
	if err != nil {
		t.Fatal(err)
	}
	n := g.Qubits
	b := circuits.NewBuilder(sch, ens, 7, 1)
	var ops []sim.Op
	var gates []circuits.Gate
	var final [][4]complex128
	for d := 1; d <= 6; d++ {
		gates = b.Next(gates[:0])
		for _, gt := range gates {
			ops = append(ops, sim.Op{A: gt.A, B: gt.B, M: gt.M})
		}
		if d%2 == 0 {
			final, _ = circuits.FinalLayer(ens, n, 7, 1, d, final)
			for q := range final {
				ops = append(ops, sim.Op{Single: true, A: q, U: final[q]})
			}
			for q := range final {
				u := final[q]
				inv := [4]complex128{cmplx.Conj(u[0]), cmplx.Conj(u[2]), cmplx.Conj(u[1]), cmplx.Conj(u[3])}
				ops = append(ops, sim.Op{Single: true, A: q, U: inv})
			}
		}
	}
	ref, fused := newState(t, n), newState(t, n)
	applyOneByOne(ref, ops, 2)
	if err := fused.Run(context.Background(), ops, 2); err != nil {
		t.Fatal(err)
	}
	if d := maxDiff(ref.Amp, fused.Amp); d > 1e-12 {
		t.Errorf("grid:4x5: fused and one-by-one differ by %g", d)
	}
}

// TestRunCancelled: a cancelled context stops Run before its first pass.
func TestRunCancelled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	s := newState(t, 4)
	ops := randomOps(rand.New(rand.NewPCG(1, 1)), 4, 5)
	if err := s.Run(ctx, ops, 1); err != context.Canceled {
		t.Errorf("Run on a cancelled context: %v", err)
	}
	if s.Amp[0] != 1 {
		t.Error("Run applied gates after cancellation")
	}
}

func maxDiff(x, y []complex128) float64 {
	var d float64
	for i := range x {
		d = max(d, cmplx.Abs(x[i]-y[i]))
	}
	return d
}

// visitCase is a circuit for the RunVisit tests, with whether its last
// pass takes the fold (in place, gathered in runs of whole chunks) or the
// separate pass.
type visitCase struct {
	name    string
	n       int
	ops     []sim.Op
	workers int
	folds   bool
	either  bool // random gates: the fold may or may not be taken
}

// visitCases covers every way RunVisit visits: blocks of the lowest
// qubits in place (gates on qubits < BlockQubits only), blocks gathered in
// runs of 2^13 amplitudes (a gate on (0, n−1) after gates on all of the
// lowest BlockQubits: a last pass on the block {0..12, n−1}), and the
// separate pass after a pass gathered in runs of 2^11 (the block
// {0..10, 12, 13, n−1}), after no gates, after one whole-state pass (n ≤ BlockQubits)
// and on a state smaller than a chunk; sizes 10–21 qubits, 1 and 2 workers.
// Block passes run from 15 qubits on (FuseMinQubits lowered) and, at 21,
// by default.
func visitCases(rng *rand.Rand) []visitCase {
	low := func(n, count int) []sim.Op { // gates within the lowest BlockQubits qubits
		ops := randomOps(rng, sim.BlockQubits(), count)
		for i := range ops {
			ops[i].A, ops[i].B = ops[i].A%n, ops[i].B%n
		}
		return ops
	}
	var cs []visitCase
	for _, workers := range []int{1, 2} {
		for _, n := range []int{15, 16, 18, 21} {
			gate := func(a, b int) sim.Op {
				o := sim.Op{A: a, B: b}
				circuits.HaarUnitary(rng, 4, o.M[:])
				return o
			}
			edge := low(n, 20)
			for q := 0; q < sim.BlockQubits(); q += 2 { // all of them: later gates are blocked
				edge = append(edge, gate(q, q+1))
			}
			// One pass on the block {0..10, 12, 13, n−1}, whatever seed the
			// planner takes.
			short := []sim.Op{gate(12, n-1), gate(13, n-1)}
			cs = append(cs,
				visitCase{"in place", n, low(n, 40), workers, true, false},
				visitCase{"gathered", n, append(edge, gate(0, n-1)), workers, true, false},
				visitCase{"short runs", n, short, workers, false, false},
				visitCase{"random", n, randomOps(rng, n, 60), workers, false, true},
				visitCase{"no gates", n, nil, workers, false, false},
			)
		}
		cs = append(cs,
			visitCase{"whole state", sim.BlockQubits(), randomOps(rng, sim.BlockQubits(), 40), workers, false, false},
			visitCase{"below a chunk", 10, randomOps(rng, 10, 40), workers, false, false},
		)
	}
	return cs
}

// TestRunVisitChunks: State.RunVisit leaves the amplitudes of Run bit for
// bit and visits every chunk of ProbabilityChunk amplitudes exactly once,
// from a worker index in [0, workers), with the chunk's own amplitudes
// (checked bit for bit against the state after Run, as AmplitudeBlocks
// hands them out: the definition of a chunk, common practice), whether the
// visit is folded into the last pass or not; and the fold is taken exactly
// where the cases expect it (sim.VisitFolds), so both paths are tested.
func TestRunVisitChunks(t *testing.T) {
	defer func(v int) { *sim.FuseMinQubits = v }(*sim.FuseMinQubits)
	defer sim.SetBlock(14, 4)() // visitCases are written for blocks of 14 qubits
	*sim.FuseMinQubits = sim.BlockQubits() + 1
	rng := rand.New(rand.NewPCG(61, 62))
	for _, tc := range visitCases(rng) {
		if *sim.FuseMinQubits = sim.BlockQubits() + 1; tc.n == 21 {
			*sim.FuseMinQubits = 21 // the default
		}
		if got := sim.VisitFolds(tc.n, tc.ops); got != tc.folds && !tc.either {
			t.Fatalf("%s n=%d: VisitFolds = %v, the case expects %v", tc.name, tc.n, got, tc.folds)
		}
		ref, got := newState(t, tc.n), newState(t, tc.n)
		randomState(rng, ref)
		copy(got.Amp, ref.Amp)
		if err := ref.Run(context.Background(), tc.ops, tc.workers); err != nil {
			t.Fatal(err)
		}
		chunks := (len(ref.Amp) + sim.ProbabilityChunk - 1) / sim.ProbabilityChunk
		wantLen := min(sim.ProbabilityChunk, len(ref.Amp))
		var mu sync.Mutex
		seen := make([]int, chunks)
		var bad []string
		err := got.RunVisit(context.Background(), tc.ops, tc.workers, func(w, off int, a []float64) {
			mu.Lock()
			defer mu.Unlock()
			if w < 0 || w >= tc.workers || off%sim.ProbabilityChunk != 0 || off < 0 || off >= len(ref.Amp) || len(a) != 2*wantLen {
				bad = append(bad, fmt.Sprintf("w=%d off=%d len=%d", w, off, len(a)))
				return
			}
			seen[off/sim.ProbabilityChunk]++
			for i := 0; i < len(a); i += 2 {
				v := ref.Amp[off+i/2]
				if math.Float64bits(a[i]) != math.Float64bits(real(v)) || math.Float64bits(a[i+1]) != math.Float64bits(imag(v)) {
					bad = append(bad, fmt.Sprintf("chunk %d: amplitude %d is %v, %v after Run", off, off+i/2, complex(a[i], a[i+1]), v))
					return
				}
			}
		})
		if err != nil {
			t.Fatal(err)
		}
		name := fmt.Sprintf("%s n=%d workers=%d", tc.name, tc.n, tc.workers)
		reportVisits(t, name, bad, seen)
		if !identical(got.Amp, ref.Amp) {
			t.Errorf("%s: RunVisit's amplitudes differ from Run's", name)
		}
	}
}

// TestRunVisitChunks64 is TestRunVisitChunks for State64.RunVisit, whose
// visit gets the probabilities float64(re)² + float64(im)² of the chunk's
// amplitudes after Run (each square rounded on its own, as
// ProbabilityBlocks computes them), bit for bit.
func TestRunVisitChunks64(t *testing.T) {
	defer func(v int) { *sim.FuseMinQubits = v }(*sim.FuseMinQubits)
	defer sim.SetBlock(14, 4)() // visitCases are written for blocks of 14 qubits
	rng := rand.New(rand.NewPCG(63, 64))
	for _, tc := range visitCases(rng) {
		if *sim.FuseMinQubits = sim.BlockQubits() + 1; tc.n == 21 {
			*sim.FuseMinQubits = 21
		}
		ref, err := sim.NewState64(tc.n, 0)
		if err != nil {
			t.Fatal(err)
		}
		got, err := sim.NewState64(tc.n, 0)
		if err != nil {
			t.Fatal(err)
		}
		for i := range ref.Amp {
			ref.Amp[i] = complex(float32(rng.NormFloat64()), float32(rng.NormFloat64()))
		}
		copy(got.Amp, ref.Amp)
		if err := ref.Run(context.Background(), tc.ops, tc.workers); err != nil {
			t.Fatal(err)
		}
		chunks := (len(ref.Amp) + sim.ProbabilityChunk - 1) / sim.ProbabilityChunk
		var mu sync.Mutex
		seen := make([]int, chunks)
		var bad []string
		err = got.RunVisit(context.Background(), tc.ops, tc.workers, func(w, off int, p []float64) {
			mu.Lock()
			defer mu.Unlock()
			if w < 0 || w >= tc.workers || off%sim.ProbabilityChunk != 0 || off < 0 || off >= len(ref.Amp) || len(p) != min(sim.ProbabilityChunk, len(ref.Amp)) {
				bad = append(bad, fmt.Sprintf("w=%d off=%d len=%d", w, off, len(p)))
				return
			}
			seen[off/sim.ProbabilityChunk]++
			for i, v := range p {
				a := ref.Amp[off+i]
				re, im := float64(real(a)), float64(imag(a))
				if want := float64(re*re) + float64(im*im); math.Float64bits(v) != math.Float64bits(want) {
					bad = append(bad, fmt.Sprintf("chunk %d: probability %d is %v, want %v", off, off+i, v, want))
					return
				}
			}
		})
		if err != nil {
			t.Fatal(err)
		}
		name := fmt.Sprintf("%s n=%d workers=%d", tc.name, tc.n, tc.workers)
		reportVisits(t, name, bad, seen)
		for i := range ref.Amp {
			if ref.Amp[i] != got.Amp[i] {
				t.Errorf("%s: RunVisit's amplitude %d is %v, Run's %v", name, i, got.Amp[i], ref.Amp[i])
				break
			}
		}
	}
}

// identical reports whether x and y hold the same bits.
func identical(x, y []complex128) bool {
	for i := range x {
		if math.Float64bits(real(x[i])) != math.Float64bits(real(y[i])) || math.Float64bits(imag(x[i])) != math.Float64bits(imag(y[i])) {
			return false
		}
	}
	return len(x) == len(y)
}

// reportVisits reports the first three bad visits of a RunVisit case and
// every chunk not visited exactly once.
func reportVisits(t *testing.T, name string, bad []string, seen []int) {
	t.Helper()
	for _, b := range bad[:min(len(bad), 3)] {
		t.Errorf("%s: %s", name, b)
	}
	for c, k := range seen {
		if k != 1 {
			t.Errorf("%s: chunk %d visited %d times", name, c, k)
		}
	}
}

// TestBlockSize: the block shape follows the second-level cache — half of
// it for a block of complex128, from 14 to 16 qubits, 10 of them free of
// the low run — and sysfs sizes parse as Linux writes them ("2048K"; the
// sysfs format is common practice, from the kernel's cacheinfo).
func TestBlockSize(t *testing.T) {
	for _, c := range []struct {
		l2     int64
		k, low int
	}{{0, 14, 4}, {256 << 10, 14, 4}, {512 << 10, 14, 4}, {1 << 20, 15, 5}, {2 << 20, 16, 6}, {32 << 20, 16, 6}} {
		if k, low := sim.BlockSize(c.l2); k != c.k || low != c.low {
			t.Errorf("blockSize(%d) = (%d, %d), want (%d, %d)", c.l2, k, low, c.k, c.low)
		}
	}
	for s, want := range map[string]int64{"2048K": 2 << 20, "1M": 1 << 20, "512K": 512 << 10, "": 0, "abc": 0, "-4K": 0} {
		if got := sim.CacheBytes(s); got != want {
			t.Errorf("cacheBytes(%q) = %d, want %d", s, got, want)
		}
	}
}

// TestPasses checks the sweeps Passes counts against hand derivations from
// the planning rules (Run's documentation), for every block shape
// blockSize can choose.
func TestPasses(t *testing.T) {
	two := func(a, b int) sim.Op { return sim.Op{A: a, B: b} }
	one := func(q int) sim.Op { return sim.Op{Single: true, A: q} }
	// 10 qubits, below the fused sizes: one sweep per gate after folding.
	// The single-qubit gate on 0 folds into (0, 1), that on 2 into the
	// first (1, 2), and the second (1, 2) is multiplied into it: 2 sweeps.
	small := []sim.Op{one(0), two(0, 1), two(1, 2), one(2), two(1, 2)}
	if got := sim.Passes(10, small); got != 2 {
		t.Errorf("10 qubits, 5 ops: Passes = %d, want 2", got)
	}
	if got := sim.Passes(10, nil); got != 0 {
		t.Errorf("no ops: Passes = %d, want 0", got)
	}
	for _, shape := range [][2]int{{14, 4}, {15, 5}, {16, 6}} {
		restore := sim.SetBlock(shape[0], shape[1])
		k := shape[0]
		// 22 qubits, gates on the lowest 14 only: one block holds them all.
		var low []sim.Op
		for q := 0; q+1 < 14; q += 2 {
			low = append(low, two(q, q+1), two(q+1, (q+2)%14))
		}
		if got := sim.Passes(22, low); got != 1 {
			t.Errorf("k = %d, gates on qubits 0..13: Passes = %d, want 1", k, got)
		}
		// The staircase (0,1), (1,2), …, (20,21): the first pass takes the
		// k−1 gates on qubits 0..k−1; (k−1, k) does not fit and blocks
		// every later gate. The other 22−k gates act on 23−k ≤ 9 qubits,
		// which fit beside the low qubits of a second block.
		var stairs []sim.Op
		for q := 0; q+1 < 22; q++ {
			stairs = append(stairs, two(q, q+1))
		}
		if got := sim.Passes(22, stairs); got != 2 {
			t.Errorf("k = %d, staircase on 22 qubits: Passes = %d, want 2", k, got)
		}
		restore()
	}
}
