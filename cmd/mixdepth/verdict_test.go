package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestSweepPlotsAndVerdict: a scan run in two parts, summarized with
// --plot, draws a picture; compare draws two gate sets on one chart with
// labels from their metadata; the report gives a verdict word per depth
// and the Haar PT baseline; too few instances print no interval.
func TestSweepPlotsAndVerdict(t *testing.T) {
	dir := t.TempDir()
	p0, p1, cz := filepath.Join(dir, "p0.arrow"), filepath.Join(dir, "p1.arrow"), filepath.Join(dir, "cz.arrow")
	base := []string{"scan", "--graph", "ring:5", "--depths", "2,6,12", "--instances", "24"}
	sampleOK(t, append(base, "--part", "0/2", "--out", p0)...)
	sampleOK(t, append(base, "--part", "1/2", "--out", p1)...)
	sampleOK(t, append(base, "--gates", "cz+haar1", "--out", cz)...)
	png := filepath.Join(dir, "sweep.png")
	out, _ := sampleOK(t, "summarize", p0, p1, "--plot", png)
	for _, want := range []string{"Haar PT dist (mean over", "verdict", "shallow", "Plot: " + png} {
		if !strings.Contains(out, want) {
			t.Errorf("summarize report lacks %q:\n%s", want, out)
		}
	}
	if fi, err := os.Stat(png); err != nil || fi.Size() == 0 {
		t.Errorf("summarize --plot wrote no picture: %v", err)
	}
	merged := filepath.Join(dir, "haar.arrow")
	sampleOK(t, "merge", p0, p1, "--out", merged)
	chart := filepath.Join(dir, "gates.svg")
	out, _ = sampleOK(t, "compare", merged, cz, "--plot", chart)
	svg, err := os.ReadFile(chart)
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"gates haar", "gates cz+haar1"} {
		if !strings.Contains(out, want) || !strings.Contains(string(svg), want) {
			t.Errorf("compare lacks the label %q:\n%s", want, out)
		}
	}
	wantExit2(t, []string{"compare", merged, "--plot", chart}, "two or more")
	few, _ := sampleOK(t, "scan", "--graph", "ring:5", "--depths", "2", "--instances", "3")
	if !strings.Contains(few, "too few instances for an interval") || !strings.Contains(few, "unresolved") {
		t.Errorf("three instances:\n%s", few)
	}
	wantExit2(t, []string{"scan", "--graph", "ring:5", "--rule", "r-only"}, "--rule")
}

// TestPlanWarnsBelowDepth: plan checks its depth against the exact
// anti-concentration depth (ring:5 with Haar gates is far from it at depth
// 2) and splits the shots into instances.
func TestPlanWarnsBelowDepth(t *testing.T) {
	out, stderr := sampleOK(t, "plan", "--graph", "ring:5", "--depth", "2", "--fidelity", "0.5")
	if !strings.Contains(stderr, "warning: depth 2 has not anti-concentrated") {
		t.Errorf("no warning: %q", stderr)
	}
	if !strings.Contains(out, "10 instances ×") {
		t.Errorf("no split into instances:\n%s", out)
	}
	_, stderr = sampleOK(t, "plan", "--graph", "ring:5", "--depth", "30", "--fidelity", "0.5")
	if strings.Contains(stderr, "warning") {
		t.Errorf("warning at depth 30: %q", stderr)
	}
}
