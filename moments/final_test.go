package moments

import (
	"context"
	"math"
	"testing"

	"mixdepth/circuits"
)

// TestFinalLayerMethodsAgree: with a final single-qubit Haar layer the three
// exact routes — the layered engine, the random-edge subset sum and the
// complete-graph reduction — must agree where they overlap, and one gate on
// two of three qubits must give the product of the pair value and the
// Haar-qubit value 2/3 (a Haar-random qubit has collision probability
// 2/(2+1); Dalzell, Hunter-Jones, Brandão 2022).
func TestFinalLayerMethodsAgree(t *testing.T) {
	cz, _ := circuits.Entangler("cz")
	tr := EntanglerTransfer(&cz)
	ctx := context.Background()
	final := CollisionFinalLayer()

	// One CZ+haar1 gate on (0, 1) of line:3, qubit 2 untouched: 32/81 · 2/3
	// (32/81 is the two-qubit value derived in entangler_test.go).
	g, _ := circuits.ParseGraph("line:3")
	lay := &circuits.Layered{Classes: [][]circuits.Edge{{{A: 0, B: 1}}, {{A: 1, B: 2}}}}
	z, err := CollisionCurve(ctx, g, lay, &tr, []int{1}, 1, final)
	if err != nil {
		t.Fatal(err)
	}
	if want := 32.0 / 81 * 2 / 3; math.Abs(z[0]-want) > 1e-15 {
		t.Errorf("one gate on line:3 with final layer: %.17g, want %.17g", z[0], want)
	}

	// Complete graph: the subset method (forced by a graph whose edge list
	// is complete but passed through randomEdgeCurve) against the reduction.
	for n := 2; n <= 6; n++ {
		gc, _ := circuits.ParseGraph("complete:" + string(rune('0'+n)))
		depths := []int{0, 1, 2, 5, 13}
		red, err := CompleteCollisionCurve(ctx, n, &tr, depths, final)
		if err != nil {
			t.Fatal(err)
		}
		cfg := collisionConfigure([]CollisionOption{final})
		sub, err := randomEdgeCurve(ctx, n, gc.Edges, &tr, depths, 2, &cfg)
		if err != nil {
			t.Fatal(err)
		}
		for i := range depths {
			// Two exact methods in float64: rounding only.
			if math.Abs(red[i]-sub[i]) > 1e-12*sub[i] {
				t.Errorf("complete:%d depth %d: reduction %.15g, subsets %.15g", n, depths[i], red[i], sub[i])
			}
		}
		// Depth 0: every qubit untouched and twirled: (2/3)^n.
		if want := math.Pow(2.0/3, float64(n)); math.Abs(red[0]-want) > 1e-15 {
			t.Errorf("complete:%d depth 0: %.17g, want (2/3)^n = %.17g", n, red[0], want)
		}
	}
}
