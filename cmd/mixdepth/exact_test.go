package main

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"strings"
	"testing"

	"mixdepth/circuits"
	"mixdepth/moments"
)

func exactJSONOf(t *testing.T, args ...string) exactJSON {
	t.Helper()
	stdout, stderr, code := runCLI(t, append([]string{"exact", "--json"}, args...)...)
	if code != 0 {
		t.Fatalf("exact %v: exit %d: %s", args, code, stderr)
	}
	var doc exactJSON
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatalf("bad JSON: %v\n%s", err, stdout)
	}
	return doc
}

// TestExactJSONMatchesLibrary: `exact --json` prints what moments.Exact
// computes, row by row, with the gap and the design-depth bound at the
// default --bound-eps 0.01 (the values themselves are checked against the
// Pauli-support chain and pinned by the golden files in moments).
func TestExactJSONMatchesLibrary(t *testing.T) {
	doc := exactJSONOf(t, "--graph", "line:6", "--schedule", "random-edge", "--depths", "5:150:5")
	g, _ := circuits.ParseGraph("line:6")
	s, _ := circuits.NewSchedule(circuits.KindRandomEdge, g)
	depths, _ := parseDepths("5:150:5")
	r, err := moments.Exact(context.Background(), g, s, circuits.Haar{}, depths)
	if err != nil {
		t.Fatal(err)
	}
	if len(doc.Rows) != len(r.Depths) {
		t.Fatalf("%d rows, want %d", len(doc.Rows), len(r.Depths))
	}
	for k, row := range doc.Rows {
		if row.Depth != r.Depths[k] || row.GateCount != r.GateCounts[k] || row.Collision != r.Collision[k] ||
			row.CollisionRatio != r.Ratio[k] || row.FramePotential == nil || *row.FramePotential != r.Frame[k] {
			t.Errorf("row %d: %+v, library depth %d, %d gates, E[Z] %.17g, R %.17g, F2 %v", k, row, r.Depths[k], r.GateCounts[k], r.Collision[k], r.Ratio[k], r.Frame)
		}
	}
	if doc.Gap == nil || r.Gap == nil || doc.Gap.SecondEigenvalue != r.Gap.SecondEigenvalue ||
		doc.Gap.DesignDepthBound != moments.DesignDepthBound(*r.Gap, 6, 2, 0.01) {
		t.Errorf("gap: JSON %+v, library %+v", doc.Gap, r.Gap)
	}
	if !r.Found || doc.AnticoncentrationDepth == nil || *doc.AnticoncentrationDepth != r.Depth || doc.HaarCollision != r.HaarCollision {
		t.Errorf("depth: JSON %v (Z_H %g), library %d %v (Z_H %g)", doc.AnticoncentrationDepth, doc.HaarCollision, r.Depth, r.Found, r.HaarCollision)
	}
}

func deref(p *float64) any {
	if p == nil {
		return nil
	}
	return *p
}

// TestScanExactAcceptance is the foundation's acceptance run: the Monte
// Carlo collision means of `scan --graph line:8 --depths 2,4,8,16
// --instances 400 --seed 11` agree with the exact values within 4 standard
// errors (normal tail probability 6e-5 per depth).
func TestScanExactAcceptance(t *testing.T) {
	doc := scanJSONOf(t, "--graph", "line:8", "--depths", "2,4,8,16", "--instances", "400", "--seed", "11", "--exact")
	for _, r := range doc.Rows {
		if r.CollisionExact == nil || r.ExactDeviation == nil {
			t.Fatalf("row %+v lacks the exact fields", r)
		}
		if math.Abs(*r.ExactDeviation) > 4 {
			t.Errorf("depth %d: MC %.6g ± %.2g vs exact %.6g", r.Depth, r.CollisionMean, *r.CollisionStder, *r.CollisionExact)
		}
	}
}

// TestExactGateSets: the exact command refuses a finite single-qubit set
// with exit status 2 and a pointer to scan, and --explain prints the
// transfer and its eigenvalues (the values of the gate sets are checked in
// moments' TestExactGateSets).
func TestExactGateSets(t *testing.T) {
	finite := writeFile(t, t.TempDir(), "finite.json", `{"entangler": [[[1,0],[0,0],[0,0],[0,0]],[[0,0],[1,0],[0,0],[0,0]],[[0,0],[0,0],[1,0],[0,0]],[[0,0],[0,0],[0,0],[-1,0]]], "single_qubit": [[[[1,0],[0,0]],[[0,0],[1,0]]]]}`)
	for _, args := range [][]string{{"--graph", "ring:5", "--depths", "1:10"}, {"--explain"}} {
		_, stderr, code := runCLI(t, append([]string{"exact", "--gates", finite}, args...)...)
		if code != 2 || !strings.Contains(stderr, "mixdepth scan") {
			t.Errorf("finite set %v: exit %d, %q; want 2 and a pointer to scan", args, code, stderr)
		}
	}
	stdout, _, code := runCLI(t, "exact", "--gates", "iswap+haar1", "--explain")
	if code != 0 || !strings.Contains(stdout, "Eigenvalues") {
		t.Errorf("--explain: exit %d, %q", code, stdout)
	}
}

// TestExactTooLarge: sizes beyond the exact engines are bad input (exit 2)
// with a message naming the limit, for exact and for scan --exact.
func TestExactTooLarge(t *testing.T) {
	for _, args := range [][]string{
		{"exact", "--graph", "line:1001", "--depths", "1"},
		{"exact", "--graph", "line:21", "--schedule", "random-edge", "--depths", "1"},
		{"scan", "--graph", "line:21", "--schedule", "random-edge", "--depths", "1", "--instances", "1", "--exact"},
	} {
		_, stderr, code := runCLI(t, args...)
		if code != 2 || !strings.Contains(stderr, "too large for exact second moments") {
			t.Errorf("%v: exit %d, %q; want 2 and the size limit", args, code, stderr)
		}
	}
}

// TestExactEngineFlags: the MPS engine's JSON fields (engine, bond_dim,
// qubit_order, per-row truncation_error and bond_dim_used), the vector
// engine's zero truncation error, and one line with exit status 2 for each
// bad request of the issue: an order file that is not a permutation, a bond
// dimension below 2 or absurdly large, and a run whose estimated time is
// beyond the limit.
func TestExactEngineFlags(t *testing.T) {
	doc := exactJSONOf(t, "--graph", "grid:2x3", "--depths", "1:4", "--engine", "mps", "--bond-dim", "8")
	if doc.Engine != "mps" || doc.BondDim != 8 || len(doc.QubitOrder) != 6 || doc.OrderBandwidth != 2 {
		t.Errorf("mps header: engine %q, bond %d, order %v, bandwidth %d", doc.Engine, doc.BondDim, doc.QubitOrder, doc.OrderBandwidth)
	}
	vec := exactJSONOf(t, "--graph", "grid:2x3", "--depths", "1:4", "--engine", "vector")
	for i, row := range doc.Rows {
		if row.BondDimUsed < 1 || row.BondDimUsed > 8 {
			t.Errorf("depth %d: bond_dim_used %d", row.Depth, row.BondDimUsed)
		}
		// grid:2x3 needs bond 8 at most, so the MPS is exact: 1e-12 leaves room for rounding.
		if d := math.Abs(row.CollisionRatio - vec.Rows[i].CollisionRatio); d > 1e-12*row.CollisionRatio || row.TruncationErr < d {
			t.Errorf("depth %d: mps %g ± %g, vector %g", row.Depth, row.CollisionRatio, row.TruncationErr, vec.Rows[i].CollisionRatio)
		}
		if vec.Rows[i].TruncationErr != 0 {
			t.Errorf("vector engine depth %d: truncation_error %g, want 0", row.Depth, vec.Rows[i].TruncationErr)
		}
	}
	if vec.Engine != "vector" || vec.BondDim != 0 || vec.QubitOrder != nil {
		t.Errorf("vector header: engine %q, bond %d, order %v", vec.Engine, vec.BondDim, vec.QubitOrder)
	}
	dir := t.TempDir()
	notPerm := dir + "/order.txt"
	if err := os.WriteFile(notPerm, []byte("0 1 2 2\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--graph", "line:4", "--engine", "mps", "--order", notPerm}, "twice"},
		{[]string{"--graph", "line:4", "--engine", "mps", "--bond-dim", "1"}, "--bond-dim 1"},
		{[]string{"--graph", "line:4", "--engine", "mps", "--bond-dim", "100000"}, "--bond-dim 100000"},
		{[]string{"--graph", "line:4", "--engine", "tensor"}, "--engine"},
		{[]string{"--graph", "complete:200", "--engine", "mps", "--depths", "1000"}, "hours"},
	} {
		_, stderr, code := runCLI(t, append([]string{"exact"}, c.args...)...)
		if code != 2 || !strings.Contains(stderr, c.want) || strings.Count(strings.TrimSpace(stderr), "\n") != 0 {
			t.Errorf("exact %v: exit %d, %q; want 2 and one line with %q", c.args, code, stderr, c.want)
		}
	}
}
