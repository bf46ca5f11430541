package sim_test

import (
	"context"
	"math"
	"math/cmplx"
	"math/rand/v2"
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
// layered grid circuit with its final single-qubit layer and its undo.
func TestRunMatchesOneByOne(t *testing.T) {
	defer func(v int) { *sim.FuseMinQubits = v }(*sim.FuseMinQubits)
	*sim.FuseMinQubits = sim.BlockQubits + 1 // block passes from 15 qubits on
	rng := rand.New(rand.NewPCG(51, 52))
	for _, tc := range []struct{ n, count, workers int }{
		{2, 30, 1}, {3, 60, 1}, {7, 200, 1}, {sim.BlockQubits, 150, 1},
		{sim.BlockQubits + 1, 150, 1}, {17, 120, 2}, {18, 80, 3},
	} {
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
		if d := maxDiff(ref.Amp, fused.Amp); d > 1e-12 {
			t.Errorf("n=%d ops=%d workers=%d: fused and one-by-one differ by %g", tc.n, tc.count, tc.workers, d)
		}
	}
}

// TestRunLayeredWithFinalLayer runs a 4×5 grid (20 qubits, blocks of
// BlockQubits) brickwork of depth 6 with a final single-qubit layer applied
// and undone between depths, as the scan does, against Apply2/Apply1.
// Tolerance as in TestRunMatchesOneByOne.
func TestRunLayeredWithFinalLayer(t *testing.T) {
	defer func(v int) { *sim.FuseMinQubits = v }(*sim.FuseMinQubits)
	*sim.FuseMinQubits = sim.BlockQubits + 1
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
