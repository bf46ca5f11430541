package moments

import (
	"context"
	"math"
	"testing"

	"mixdepth/circuits"
)

// complexGate turns a real 4×4 gate into the circuits form.
func complexGate(g *[16]float64) [16]complex128 {
	var out [16]complex128
	for i, v := range g {
		out[i] = complex(v, 0)
	}
	return out
}

// TestEdgeTransfersBruteForce: a gate set whose couplers carry different
// entanglers (CNOT on 0-1 given in the reverse orientation 1→0, a Givens
// rotation by 0.7 on 1-2, one by 0.3 elsewhere) against the dense two-copy
// operator evolved gate by gate with the coupler's own gate (Weingarten
// twirls, Collins 2003). Tolerance 1e-12 as for the layered check.
func TestEdgeTransfersBruteForce(t *testing.T) {
	g, err := circuits.ParseGraph("ring:4")
	if err != nil {
		t.Fatal(err)
	}
	cnot := complexGate(&bruteCNOT)
	givens := complexGate(bruteGivens(0.7))
	// The brute force needs real gates. rev is CNOT with control and target
	// exchanged (SWAP·CNOT·SWAP), the gate of coupler 1→0 seen as (0, 1);
	// the default is a Givens rotation by 0.3.
	rev := [16]float64{1, 0, 0, 0, 0, 0, 0, 1, 0, 0, 1, 0, 0, 1, 0, 0}
	gs, err := circuits.NewGateSet("calibrated", complexGate(bruteGivens(0.3)), nil)
	if err != nil {
		t.Fatal(err)
	}
	gs.Couplers = []circuits.CouplerGate{{A: "1", B: "0", G: cnot}, {A: "1", B: "2", G: givens}}
	bound, err := gs.Bind(g)
	if err != nil {
		t.Fatal(err)
	}
	et, err := EdgeTransfersFor(bound)
	if err != nil || et == nil {
		t.Fatalf("EdgeTransfersFor: %v, %v", et, err)
	}
	// The brute-force gate of each coupler, in the orientation the schedule
	// applies it: (0, 1) is CNOT with control 1, that is SWAP·CNOT·SWAP.
	gateOf := func(a, b int) *[16]float64 {
		switch {
		case a == 0 && b == 1:
			return &rev
		case a == 1 && b == 2:
			return bruteGivens(0.7)
		}
		return bruteGivens(0.3)
	}
	s := &circuits.Layered{Classes: circuits.LayeredClasses(g)}
	depths := []int{0, 1, 2, 3, 4, 5}
	got, err := CollisionCurve(context.Background(), g, s, &et.Default, depths, 1, CollisionEdgeTransfers(et))
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range depths {
		r := newBruteRho(g.Qubits)
		for step := range d {
			for _, e := range s.Step(step, nil, nil) {
				r.dressed(gateOf(e.A, e.B), e.A, e.B)
			}
		}
		if want := r.collision(); math.Abs(got[d]-want) > 1e-12 {
			t.Errorf("depth %d: engine %.15g, brute force %.15g", d, got[d], want)
		}
	}
	// The same transfers everywhere give the single-transfer curve exactly.
	same := *gs
	same.Couplers = []circuits.CouplerGate{{A: "0", B: "1", G: gs.G}, {A: "2", B: "3", G: gs.G}}
	sb, _ := same.Bind(g)
	set, _ := EdgeTransfersFor(sb)
	a, _ := CollisionCurve(context.Background(), g, s, &set.Default, depths, 1, CollisionEdgeTransfers(set))
	b, _ := CollisionCurve(context.Background(), g, s, &set.Default, depths, 1)
	for i := range a {
		if a[i] != b[i] {
			t.Errorf("depth %d: per-coupler copies of one gate %.17g, one gate %.17g", depths[i], a[i], b[i])
		}
	}
	// The random-edge average takes each edge's own transfer: against the
	// brute force over all |E|^t edge sequences (same source, same
	// tolerance; ring:4 lists its edges as (i, i+1) and (3, 0), so gateOf
	// sees each coupler in its schedule orientation).
	re := &circuits.RandomEdge{Edges: g.Edges}
	rdepths := []int{0, 1, 2, 3}
	rgot, err := CollisionCurve(context.Background(), g, re, &et.Default, rdepths, 1, CollisionEdgeTransfers(et))
	if err != nil {
		t.Fatalf("random-edge with per-coupler transfers: %v", err)
	}
	gate := func(r *bruteRho, a, b int) { r.dressed(gateOf(a, b), a, b) }
	for i, d := range rdepths {
		if want := bruteRandomEdge(g.Qubits, g.Edges, gate, d); math.Abs(rgot[i]-want) > 1e-12 {
			t.Errorf("random-edge depth %d: engine %.15g, brute force %.15g", d, rgot[i], want)
		}
	}
}
