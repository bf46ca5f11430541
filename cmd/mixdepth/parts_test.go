package main

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"mixdepth/stats"
)

// twoLines is the edge list of two disjoint line:4 chips, qubits 0–3 and
// 4–7.
const twoLines = "0 1\n1 2\n2 3\n4 5\n5 6\n6 7\n"

// partsLimit is the product of the two parts' Haar values, (2/(2⁴+1))²:
// the states of independent parts multiply, so Z = Z_1·Z_2 and, the parts'
// circuits being drawn independently, E[Z] = E[Z_1]·E[Z_2] → (2/17)² (a
// fact of the Haar measure: independent parts; Z_H = 2/(D+1), design.md §3).
var partsLimit = math.Pow(2.0/17, 2)

// TestAllowDisconnectedEveryCommand: every command that builds a graph
// refuses a chip in parts with exit 2 and a message naming
// --allow-disconnected, and accepts it with the flag.
func TestAllowDisconnectedEveryCommand(t *testing.T) {
	dir := t.TempDir()
	two := writeFile(t, dir, "two.edges", twoLines)
	csv := writeFile(t, dir, "shots.csv", "instance,bitstring\n0,00000000\n0,10000000\n")
	cases := [][]string{
		{"scan", "--graph", two, "--depths", "4", "--instances", "3"},
		{"sample", "--graph", two, "--depth", "4", "--instances", "2", "--shots", "5"},
		{"score", csv, "--graph", two, "--depth", "4"},
		{"plan", "--graph", two, "--depth", "4", "--fidelity", "0.5"},
		{"exact", "--graph", two, "--depths", "4"},
	}
	for _, args := range cases {
		_, stderr, code := runCLI(t, args...)
		if code != 2 || !strings.Contains(stderr, "--allow-disconnected") || strings.Count(strings.TrimSpace(stderr), "\n") != 0 {
			t.Errorf("%s without the flag: exit %d, stderr %q; want 2 and one line naming --allow-disconnected", args[0], code, stderr)
		}
		if _, stderr, code := runCLI(t, append(args, "--allow-disconnected")...); code != 0 {
			t.Errorf("%s --allow-disconnected: exit %d: %s", args[0], code, stderr)
		}
	}
}

// TestScanPartsLimit: on two disjoint line:4 chips scan's mean Z at depth
// 300 lies within 4 standard errors of (2/17)², the product of the parts'
// Haar values (not the whole chip's 2/257), R is measured against that
// limit, and summarize reads the same numbers back from the table (the
// parts key of the metadata).
func TestScanPartsLimit(t *testing.T) {
	dir := t.TempDir()
	two := writeFile(t, dir, "two.edges", twoLines)
	out := filepath.Join(dir, "scan.arrow")
	doc := scanJSONOf(t, "--graph", two, "--allow-disconnected", "--depths", "300", "--instances", "200", "--rule", "collision", "--out", out)
	if doc.Parts != 2 || doc.CollisionLimit == nil || math.Abs(*doc.CollisionLimit-partsLimit) > 1e-15 {
		t.Fatalf("parts %d, collision_limit %v; want 2 and %.10g", doc.Parts, doc.CollisionLimit, partsLimit)
	}
	r := doc.Rows[0]
	// 4 standard errors: a false alarm once in about 16 000 runs, and the
	// seed is fixed.
	if dev := (r.CollisionMean - partsLimit) / *r.CollisionStder; math.Abs(dev) > 4 {
		t.Errorf("mean Z %.6g ± %.2g at depth 300 is %.1f s.e. from (2/17)² = %.6g", r.CollisionMean, *r.CollisionStder, dev, partsLimit)
	}
	if zh := stats.HaarCollision(256); math.Abs(r.CollisionMean/zh-1) < 0.5 {
		t.Errorf("mean Z %.6g is near the whole chip's Haar value %.6g: the parts do not mix", r.CollisionMean, zh)
	}
	if math.Abs(r.CollisionRatio-r.CollisionMean/partsLimit) > 1e-12 {
		t.Errorf("R = %.8g, want mean/limit = %.8g", r.CollisionRatio, r.CollisionMean/partsLimit)
	}
	stdout, stderr, code := runCLI(t, "summarize", "--json", "--rule", "collision", out)
	if code != 0 {
		t.Fatalf("summarize: exit %d: %s", code, stderr)
	}
	var sum scanJSON
	if err := json.Unmarshal([]byte(stdout), &sum); err != nil {
		t.Fatal(err)
	}
	if sum.Parts != 2 || sum.Rows[0].CollisionRatio != r.CollisionRatio {
		t.Errorf("summarize: parts %d, R %v; scan gave 2, %v", sum.Parts, sum.Rows[0].CollisionRatio, r.CollisionRatio)
	}
	text, _, _ := runCLI(t, "scan", "--graph", two, "--allow-disconnected", "--depths", "300", "--instances", "3")
	if !strings.Contains(text, "never reaches the Haar value") || !strings.Contains(text, "0.0138408") {
		t.Errorf("the report does not say that the chip never reaches the Haar value, nor print the limit:\n%s", text)
	}
}

// TestScorePartsLimit: the ideal XEB of a chip in parts tends to
// D·(2/17)² − 1 (design.md §6, E[F_lin] = D·Z − 1 for an ideal sampler,
// with the parts' limit for Z), and score's anti-concentration check reads
// the circuits against that value: at depth 300 the mean of the per-instance
// D·Z_U − 1 lies within 4 standard errors of it.
func TestScorePartsLimit(t *testing.T) {
	dir := t.TempDir()
	two := writeFile(t, dir, "two.edges", twoLines)
	table := filepath.Join(dir, "shots.parquet")
	if _, stderr, code := runCLI(t, "sample", "--graph", two, "--allow-disconnected", "--depth", "300", "--instances", "40", "--shots", "50", "--out", table); code != 0 {
		t.Fatalf("sample: exit %d: %s", code, stderr)
	}
	stdout, stderr, code := runCLI(t, "score", "--json", table)
	if code != 0 {
		t.Fatalf("score: exit %d: %s", code, stderr)
	}
	var doc scoreJSON
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	want := 256*partsLimit - 1
	if doc.Parts != 2 || math.Abs(doc.PorterThomasXEB-want) > 1e-12 {
		t.Fatalf("parts %d, reference XEB %.8g; want 2 and D·(2/17)² − 1 = %.8g", doc.Parts, doc.PorterThomasXEB, want)
	}
	ideal := make([]float64, len(doc.Instances))
	for i, s := range doc.Instances {
		ideal[i] = *s.IdealXEB
	}
	sm := stats.Summarize(ideal)
	if dev := (sm.Mean - want) / sm.StdErr; math.Abs(dev) > 4 {
		t.Errorf("mean ideal XEB %.4f ± %.4f is %.1f s.e. from %.4f", sm.Mean, sm.StdErr, dev, want)
	}
}

// TestSetupCancelled: a signal during the edge colouring of a large graph
// (complete:300: seconds of colouring before exact or graph can start) stops
// the command, which exits 130 as for any interruption; the context is
// cancelled from another goroutine as the command starts.
func TestSetupCancelled(t *testing.T) {
	for _, args := range [][]string{
		{"exact", "--graph", "complete:300", "--depths", "1"},
		{"graph", "complete:300"},
	} {
		ctx, cancel := context.WithCancel(context.Background())
		go cancel()
		var out, errb bytes.Buffer
		code := exitCode(run(ctx, args, &out, &errb), &errb)
		t.Logf("%s: %s", args[0], strings.TrimSpace(errb.String()))
		if code != 130 {
			t.Errorf("%s cancelled during set-up: exit %d, stderr %q; want 130", args[0], code, errb.String())
		}
	}
}
