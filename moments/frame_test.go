package moments

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"mixdepth/circuits"
)

// TestFrameOneGate: one Haar gate on two qubits is Haar on U(4), whose
// second frame potential is 2! = 2 for D ≥ 2 (Gross, Audenaert, Eisert,
// "Evenly distributed unitaries", J. Math. Phys. 48, 052104, 2007); more
// gates on the same pair are again Haar. Depth 0 is the identity,
// |Tr I|⁴ = D⁴ = 256.
func TestFrameOneGate(t *testing.T) {
	g := denseGraph(t, "line:2")
	for kind, s := range pauliTestSchedules(t, g) {
		got, err := FramePotential2(context.Background(), g, s, []int{0, 1, 2, 5})
		if err != nil {
			t.Fatal(err)
		}
		for i, want := range []float64{256, 2, 2, 2} {
			// Tolerance: rounding of sums of 16 squares (layered) or of 4
			// eigenvalue powers from a 4×4 eigenproblem (random-edge).
			if !scalar.EqualWithinAbsOrRel(got[i], want, 1e-13, 1e-13) {
				t.Errorf("%s: F at depth index %d = %.17g, want %v", kind, i, got[i], want)
			}
		}
	}
}

// TestFrameUntouchedByHand checks untouched qubits on line:3 by hand.
//   - Layered, one layer: U = u⊗I with u Haar on qubits (0,1), so
//     |Tr(U†V)|⁴ = |Tr(u†v)|⁴·|Tr I₂|⁴ and F = 2·16 = 32 (Gross et al. 2007).
//   - Random-edge, one gate: F = ‖(M₁+M₂)/2‖² = (32 + 32 + 2 Tr M₁M₂)/4.
//     Every block with a frozen (off-diagonal or traceless-diagonal) qubit
//     is killed by M₁ or M₂, so Tr M₁M₂ = Tr P₁P₂ on the 8 supports, with
//     P the pair projector onto 00 and u = (1, 1, √3)/√5. The partial
//     trace of P over the outer qubit is [[6/5, √3/5], [√3/5, 4/5]] on the
//     middle qubit, so Tr P₁P₂ = 36/25 + 2·3/25 + 16/25 = 58/25 and
//     F = 16 + 29/25 = 429/25.
//
// The random-edge value differs from what the mean chain alone gives,
// ‖(P₁+P₂)/2‖² = 2 + 29/25: untouched qubits matter.
func TestFrameUntouchedByHand(t *testing.T) {
	g := denseGraph(t, "line:3")
	ss := pauliTestSchedules(t, g)
	for _, c := range []struct {
		kind circuits.ScheduleKind
		want float64
	}{{"layered", 32}, {"random-edge", 429.0 / 25}} {
		got, err := FramePotential2(context.Background(), g, ss[c.kind], []int{1})
		if err != nil {
			t.Fatal(err)
		}
		// Tolerance: rounding of a few dozen operations on numbers ≤ 32.
		if !scalar.EqualWithinAbsOrRel(got[0], c.want, 1e-13, 1e-13) {
			t.Errorf("%s: F after one step = %.17g, want %.17g", c.kind, got[0], c.want)
		}
	}
}

// TestFrameVsDense compares with the dense Weingarten operator (Collins
// 2003): for a layered schedule F = ‖Φ‖²_F of the product channel, column by
// column, on at most three qubits; for the random-edge schedule
// F(t) = Tr M^(2t) = Σ λ^(2t) over all 16^n eigenvalues of M = mean_e M_e
// (gonum EigenSym), on at most four qubits.
func TestFrameVsDense(t *testing.T) {
	for _, spec := range []string{"line:2", "line:3", "ring:3", "star:3"} {
		g := denseGraph(t, spec)
		l := &circuits.Layered{Classes: circuits.LayeredClasses(g)}
		depths := []int{0, 1, 2, 3, 4, 5}
		got, err := FramePotential2(context.Background(), g, l, depths)
		if err != nil {
			t.Fatal(err)
		}
		dense := denseLayeredFrame(g.Qubits, l, depths[len(depths)-1])
		for i, d := range depths {
			want := dense[d]
			// Tolerance: sums of up to 16^n rounded squares.
			if !scalar.EqualWithinAbsOrRel(got[i], want, 1e-12, 1e-12) {
				t.Errorf("%s layered depth %d: F = %.17g, dense %.17g", spec, d, got[i], want)
			}
		}
	}
	for _, spec := range []string{"line:2", "line:3", "ring:3", "line:4", "star:4", "ring:4"} {
		g := denseGraph(t, spec)
		spec4 := denseSpectrum(g.Qubits, denseMean(g.Qubits, g.Edges))
		depths := []int{0, 1, 2, 3, 5, 8, 13, 40}
		got, err := FramePotential2(context.Background(), g, &circuits.RandomEdge{Edges: g.Edges}, depths)
		if err != nil {
			t.Fatal(err)
		}
		for i, d := range depths {
			var want float64
			for _, l := range spec4 {
				want += math.Pow(max(l, 0), float64(2*d))
			}
			// Tolerance: eigenvalues from two eigensolvers agree to ~1e-15;
			// raised to the power 2t ≤ 80 and summed over 16^n terms.
			if !scalar.EqualWithinAbsOrRel(got[i], want, 1e-11, 1e-11) {
				t.Errorf("%s random-edge depth %d: F = %.17g, dense %.17g", spec, d, got[i], want)
			}
		}
	}
}

// TestFrameDeepHaar: deep random circuits converge to the Haar value
// F^(2) = 2 (Gross, Audenaert, Eisert 2007). The excess decays as λ₂^(2t)
// times at most 16^n: with λ₂ ≤ 0.94 for these graphs (SpectralGap, checked
// in gap_test.go) it is far below 1e-9 after 1500 random-edge gates, and a
// layered cycle contracts faster still at 80 layers.
func TestFrameDeepHaar(t *testing.T) {
	for _, spec := range []string{"line:6", "ring:5", "grid:2x3", "star:5", "complete:4"} {
		g := denseGraph(t, spec)
		for kind, s := range pauliTestSchedules(t, g) {
			depth := 80
			if kind == "random-edge" {
				depth = 1500
			}
			got, err := FramePotential2(context.Background(), g, s, []int{depth})
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(got[0]-2) > 1e-9 {
				t.Errorf("%s %s depth %d: F = %.17g, want 2", spec, kind, depth, got[0])
			}
		}
	}
}

// TestFrameTooLarge: above FrameMaxQubits the error wraps ErrFrameTooLarge
// and states the limit.
func TestFrameTooLarge(t *testing.T) {
	g := denseGraph(t, "grid:3x5")
	_, err := FramePotential2(context.Background(), g, &circuits.RandomEdge{Edges: g.Edges}, []int{1})
	if !errors.Is(err, ErrFrameTooLarge) {
		t.Fatalf("error %v does not wrap ErrFrameTooLarge", err)
	}
	if !strings.Contains(err.Error(), "12") {
		t.Errorf("error %q does not state the limit", err)
	}
}
