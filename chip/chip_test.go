package chip

import (
	"context"
	"math"
	"testing"

	"mixdepth/circuits"
	"mixdepth/moments"
)

func mustGraph(t *testing.T, spec string) *circuits.Graph {
	t.Helper()
	g, err := circuits.ParseGraph(spec)
	if err != nil {
		t.Fatalf("ParseGraph(%q): %v", spec, err)
	}
	return g
}

// TestAlgebraicConnectivity checks the Laplacian spectra of standard
// graphs (F. R. K. Chung, Spectral Graph Theory, AMS 1997, §1.2): the path
// P_n has λ₂ = 2(1 − cos(π/n)), the cycle C_n 2(1 − cos(2π/n)), the complete
// graph K_n n. Tolerance 1e-10: a dense symmetric eigensolver is accurate to
// a few ulps of the largest eigenvalue (≤ 2Δ here).
func TestAlgebraicConnectivity(t *testing.T) {
	for n := 2; n <= 24; n++ {
		cases := []struct {
			spec string
			want float64
		}{
			{"line:" + itoa(n), 2 * (1 - math.Cos(math.Pi/float64(n)))},
			{"complete:" + itoa(n), float64(n)},
		}
		if n >= 3 {
			cases = append(cases, struct {
				spec string
				want float64
			}{"ring:" + itoa(n), 2 * (1 - math.Cos(2*math.Pi/float64(n)))})
		}
		for _, tc := range cases {
			if got := AlgebraicConnectivity(mustGraph(t, tc.spec)); math.Abs(got-tc.want) > 1e-10 {
				t.Errorf("%s: algebraic connectivity %.15g, want %.15g", tc.spec, got, tc.want)
			}
		}
	}
	parts, err := circuits.NewGraphParts("two lines", 8, twoLines)
	if err != nil {
		t.Fatal(err)
	}
	if got := AlgebraicConnectivity(parts); got != 0 {
		t.Errorf("a graph in two parts has algebraic connectivity %g, want 0 (Fiedler 1973)", got)
	}
}

// twoLines is two disjoint paths of 4 qubits.
var twoLines = []circuits.Edge{{A: 0, B: 1}, {A: 1, B: 2}, {A: 2, B: 3}, {A: 4, B: 5}, {A: 5, B: 6}, {A: 6, B: 7}}

func itoa(n int) string {
	if n < 10 {
		return string(rune('0' + n))
	}
	return itoa(n/10) + string(rune('0'+n%10))
}

// TestDiameterBipartite checks values worked by hand: a path of n qubits has
// diameter n−1, an R×C grid R+C−2, a complete graph 1, a complete binary tree
// of depth d 2d, a torus R×C ⌊R/2⌋+⌊C/2⌋, a star 2; grids, trees and honeycombs are
// bipartite, odd rings and triangular lattices are not.
func TestDiameterBipartite(t *testing.T) {
	for _, tc := range []struct {
		spec      string
		diameter  int
		bipartite bool
	}{
		{"line:7", 6, true},
		{"grid:3x5", 6, true},
		{"complete:6", 1, false},
		{"btree:4", 8, true},
		{"torus:4x5", 4, false},
		{"torus:4x6", 5, true},
		{"ring:7", 3, false},
		{"ring:8", 4, true},
		{"honeycomb:3x3", 0, true},
		// Corner (0, 2) to corner (2, 0): the diagonals run down-right, so
		// each step changes r or c by one in the needed direction: 4 steps.
		{"triangular:3x3", 4, false},
		{"tree:40,3", 0, true},
		{"star:9", 2, true},
	} {
		g := mustGraph(t, tc.spec)
		if d := Diameter(g); tc.diameter > 0 && d != tc.diameter {
			t.Errorf("%s: diameter %d, want %d", tc.spec, d, tc.diameter)
		}
		if b := Bipartite(g); b != tc.bipartite {
			t.Errorf("%s: bipartite %v, want %v", tc.spec, b, tc.bipartite)
		}
	}
}

// TestDisconnectedLimit checks that two disjoint line:4 chips tend to the
// product of their Haar values, (2/(2⁴+1))² = (2/17)², rather than the Haar
// value 2/(2⁸+1) of eight qubits: each part is a product factor of the
// state, so E[Z] factorises (design.md §3 for each part's Haar value). The
// exact engine at depth 400 is within 1e-12 of the limit (each part's ratio
// decays geometrically, below 1e-20 by then).
func TestDisconnectedLimit(t *testing.T) {
	g, err := circuits.NewGraphParts("two line:4", 8, twoLines)
	if err != nil {
		t.Fatal(err)
	}
	r, err := Describe(context.Background(), g, circuits.LayeredClasses(g), circuits.ClassSource(g), 1)
	if err != nil {
		t.Fatal(err)
	}
	want := (2.0 / 17) * (2.0 / 17)
	if math.Abs(r.HaarLimit-want) > 1e-15 || len(r.Components) != 2 || r.Gap != nil {
		t.Errorf("report: limit %g (want %g), %d parts, gap %v", r.HaarLimit, want, len(r.Components), r.Gap)
	}
	sched := &circuits.Layered{Classes: circuits.LayeredClasses(g)}
	z, err := moments.CollisionCurve(context.Background(), g, sched, &moments.HaarTransfer, []int{400}, 1)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(z[0]-want) > 1e-12 {
		t.Errorf("E[Z] at depth 400 is %.15g, want the product of the parts' Haar values %.15g", z[0], want)
	}
	// An isolated qubit, never touched, keeps Z = 1 (2/3 after a final Haar
	// single-qubit layer: Σ_x p_x² of a Haar qubit has mean 2/3).
	iso, err := circuits.NewGraphParts("line:2 and a qubit", 3, []circuits.Edge{{A: 0, B: 1}})
	if err != nil {
		t.Fatal(err)
	}
	if a, b := moments.PartsLimit(iso, false), moments.PartsLimit(iso, true); math.Abs(a-0.4) > 1e-15 || math.Abs(b-0.4*2/3) > 1e-15 {
		t.Errorf("PartsLimit(line:2 + qubit) = %g, %g; want 2/5 and 2/5·2/3", a, b)
	}
}

// TestDescribe checks the report of a small family against its parts
// computed above, and that the gap matches moments.SpectralGap.
func TestDescribe(t *testing.T) {
	g := mustGraph(t, "grid:2x3")
	r, err := Describe(context.Background(), g, circuits.LayeredClasses(g), circuits.ClassSource(g), 1)
	if err != nil {
		t.Fatal(err)
	}
	if r.Degrees[2] != 4 || r.Degrees[3] != 2 || r.Diameter != 3 || !r.Bipartite || len(r.Layers) != 3 || r.Gap == nil {
		t.Errorf("grid:2x3 report %+v", r)
	}
	if math.Abs(r.HaarLimit-2.0/65) > 1e-15 {
		t.Errorf("connected chip's limit %g, want the Haar value 2/65", r.HaarLimit)
	}
	coords := Coordinates(mustGraph(t, "regular:10,3"))
	again := Coordinates(mustGraph(t, "regular:10,3"))
	for q := range coords {
		if coords[q] != again[q] || math.IsNaN(coords[q][0]) {
			t.Fatalf("force-directed coordinates are not reproducible: %v vs %v", coords[q], again[q])
		}
	}
}
