package plots

import (
	"context"
	"image/color"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/scan"
	"mixdepth/stats"
)

// lineScan runs a small real scan (line:4, Haar U(4) gates) and summarises it.
func lineScan(t *testing.T, depths []int, instances int) *scan.Curve {
	t.Helper()
	g, err := circuits.ParseGraph("line:4")
	if err != nil {
		t.Fatal(err)
	}
	ids := make([]int, instances)
	for i := range ids {
		ids[i] = i
	}
	recs, _, err := scan.Run(context.Background(), &scan.Config{
		Graph: g, Schedule: &circuits.Layered{Classes: circuits.LayeredClasses(g)}, Ensemble: circuits.Haar{},
		Depths: depths, Instances: ids, Seed: 3, Workers: 1,
	})
	if err != nil {
		t.Fatal(err)
	}
	// The anti-concentration rule alone: 40 instances of line:4 resolve R's
	// upper end, not both ends of the band (the plot draws either).
	return scan.Estimate(4, recs, stats.Criteria{Eps: 0.05, Confidence: 0.95, Rule: stats.RuleCollision})
}

// seriesOf is the DepthSeries of a scan's curve, with the exact ratios (or
// nil).
func seriesOf(c *scan.Curve, exact []float64) *DepthSeries {
	s := &DepthSeries{Qubits: c.Qubits, Exact: exact, Depth: c.Depth, Found: c.Found}
	for _, r := range c.Rows {
		s.Depths = append(s.Depths, r.Depth)
		s.Ratio = append(s.Ratio, r.Ratio)
		s.Lower = append(s.Lower, r.Lower)
		s.Upper = append(s.Upper, r.Upper)
	}
	return s
}

// TestDepthPlotFiles draws a real scan in both formats and checks the
// pictures: valid files of the plot size, with the band, the ε line and the
// recommended-depth line present in their colours, and the labels in the SVG.
func TestDepthPlotFiles(t *testing.T) {
	sum := lineScan(t, []int{1, 2, 3, 4, 5, 6, 8, 10, 12}, 400)
	if !sum.Found {
		t.Fatalf("line:4 did not anti-concentrate by depth 12: %+v", sum.Rows)
	}
	// The exact curve of the same circuits, from the identity/swap engine.
	g, _ := circuits.ParseGraph("line:4")
	depths := make([]int, len(sum.Rows))
	for i, r := range sum.Rows {
		depths[i] = r.Depth
	}
	z, err := moments.CollisionCurve(context.Background(), g, &circuits.Layered{Classes: circuits.LayeredClasses(g)}, &moments.HaarTransfer, depths, 1)
	if err != nil {
		t.Fatal(err)
	}
	exact := make([]float64, len(z))
	for i := range z {
		exact[i] = z[i] / sum.HaarCollision
	}
	dir := plotDir(t)
	pngPath := filepath.Join(dir, "depth.png")
	svgPath := filepath.Join(dir, "depth.svg")
	for _, p := range []string{pngPath, svgPath} {
		if err := SaveDepthPlot(p, seriesOf(sum, exact), 0.05, WithConfidence(0.95)); err != nil {
			t.Fatal(err)
		}
	}
	img := decodePNG(t, pngPath)
	for _, c := range []struct {
		name   string
		colour color.RGBA
		least  int
	}{
		// The band fills an area; the lines are a pixel or two wide across
		// much of the plot, hence the smaller thresholds.
		{"confidence band", colourBand, 2000},
		{"ε line", colourEps, 300},
		{"recommended depth line", colourDepth, 150},
		{"estimate", colourMean, 150},
	} {
		if n := countColour(img, c.colour); n < c.least {
			t.Errorf("%s: %d pixels of its colour, want at least %d", c.name, n, c.least)
		}
	}
	svg := checkSVG(t, svgPath)
	for _, want := range []string{"depth (layers)", "recommended depth", "ε = 0.05", "95% confidence band", "exact E[Z]/Z_H"} {
		if !strings.Contains(svg, want) {
			t.Errorf("SVG lacks the text %q", want)
		}
	}
	if left, _ := filepath.Glob(filepath.Join(dir, ".*.tmp")); len(left) > 0 {
		t.Errorf("temporary files left: %v", left)
	}
}

// TestDepthPlotNotFound: without a recommended depth there is no green line
// and the legend says that no depth qualifies.
func TestDepthPlotNotFound(t *testing.T) {
	sum := lineScan(t, []int{1, 2}, 10)
	if sum.Found {
		t.Fatalf("line:4 anti-concentrated at depth ≤ 2: %+v", sum.Rows)
	}
	dir := plotDir(t)
	p := filepath.Join(dir, "shallow.png")
	if err := SaveDepthPlot(p, seriesOf(sum, nil), 0.05); err != nil {
		t.Fatal(err)
	}
	if n := countColour(decodePNG(t, p), colourDepth); n > 20 {
		t.Errorf("%d pixels of the recommended-depth colour with no recommended depth", n)
	}
	s := filepath.Join(dir, "shallow.svg")
	if err := SaveDepthPlot(s, seriesOf(sum, nil), 0.05, WithDepthUnit("gates")); err != nil {
		t.Fatal(err)
	}
	svg := checkSVG(t, s)
	for _, want := range []string{"no depth shown reaches", "depth (gates)"} {
		if !strings.Contains(svg, want) {
			t.Errorf("SVG lacks %q", want)
		}
	}
}

func TestLogFloor(t *testing.T) {
	// The rule of logFloor: a power of ten at or below min(eps/10, half the
	// smallest positive value), not below eps·1e-4.
	cases := []struct {
		values []float64
		eps    float64
		want   float64
	}{
		{nil, 0.05, 1e-3},                                 // eps/10 = 0.005
		{[]float64{0.5, 0.02, -0.3}, 0.05, 1e-3},          // min(0.005, 0.01) = 0.005
		{[]float64{0.0003, math.Inf(1)}, 0.05, 1e-4},      // 0.00015
		{[]float64{1e-9, math.NaN()}, 0.05, 1e-6},         // capped at 5e-6
		{[]float64{2, 3}, 0.5, 0.01},                      // 0.05
		{[]float64{math.Inf(-1), math.Inf(1)}, 0.2, 0.01}, // 0.02
	}
	for _, c := range cases {
		if got := logFloor(c.values, c.eps); math.Abs(got-c.want) > 1e-12*c.want {
			t.Errorf("logFloor(%v, %g) = %g, want %g", c.values, c.eps, got, c.want)
		}
	}
}

// TestDepthSeries checks the clipping and the band runs on hand-made rows.
func TestDepthSeries(t *testing.T) {
	inf := math.Inf(1)
	ds := &DepthSeries{Qubits: 3, Depth: 4, Found: true,
		Depths: []int{1, 2, 3, 4, 5},
		Ratio:  []float64{3, 1.5, 1.2, 1.01, 0.99},
		Lower:  []float64{2.5, 1.2, -inf, 0.98, 0.97}, // depth 3, one instance: no band
		Upper:  []float64{3.5, 1.8, inf, 1.04, 1.01},
	}
	s := newDepthPoints(ds, 0.05)
	// Smallest positive value 0.01 → half is 0.005 = eps/10 → floor 1e-3.
	if s.floor != 1e-3 {
		t.Fatalf("floor %g, want 1e-3", s.floor)
	}
	if len(s.line) != 5 || len(s.mean) != 4 || len(s.clipped) != 1 || s.clipped[0].X != 5 || s.clipped[0].Y != 1e-3 {
		t.Errorf("estimate points: line %v mean %v clipped %v", s.line, s.mean, s.clipped)
	}
	if !s.anyClipped {
		t.Error("lower bounds below 1 not reported as clipped")
	}
	// Two runs of finite intervals: depths 1–2 and 4–5, each a closed outline
	// of 4 vertices (upper forward, lower backward).
	if len(s.bands) != 2 || len(s.bands[0]) != 4 || len(s.bands[1]) != 4 {
		t.Fatalf("bands %v", s.bands)
	}
	want := []float64{2.5, 0.8, 0.2, 1.5} // upper at 1, 2; lower at 2, 1
	for i, p := range s.bands[0] {
		if math.Abs(p.Y-want[i]) > 1e-12 {
			t.Errorf("band vertex %d: %v, want y %g", i, p, want[i])
		}
	}
	if s.bands[1][2].Y != 1e-3 || s.bands[1][3].Y != 1e-3 {
		t.Errorf("lower bounds below 1 not drawn at the floor: %v", s.bands[1])
	}
}

// TestDepthPlotExactOnly: a series without an estimate (as for the exact
// command) draws the exact curve alone: no band, no estimate.
func TestDepthPlotExactOnly(t *testing.T) {
	sum := &DepthSeries{Qubits: 6, Depth: 5, Found: true}
	for d := 1; d <= 8; d++ {
		sum.Depths = append(sum.Depths, d)
		sum.Exact = append(sum.Exact, 1+4*math.Pow(0.4, float64(d)))
	}
	dir := plotDir(t)
	p := filepath.Join(dir, "exact.png")
	if err := SaveDepthPlot(p, sum, 0.05); err != nil {
		t.Fatal(err)
	}
	img := decodePNG(t, p)
	if n := countColour(img, colourBand); n > 50 {
		t.Errorf("%d band pixels without an interval", n)
	}
	if n := countColour(img, colourMean); n > 50 {
		t.Errorf("%d estimate pixels without an estimate", n)
	}
	if n := countColour(img, colourEps); n < 300 {
		t.Errorf("ε line: %d pixels", n)
	}
	s := filepath.Join(dir, "exact.svg")
	if err := SaveDepthPlot(s, sum, 0.05); err != nil {
		t.Fatal(err)
	}
	svg := checkSVG(t, s)
	if !strings.Contains(svg, "exact E[Z]/Z_H") || strings.Contains(svg, "Monte Carlo") {
		t.Error("legend of an exact-only plot")
	}
}

// TestExactErrorBand: the exact curve's error band is drawn when some error
// reaches ExactErrorVisible·(R − 1) and left out below it; it is cut at the
// floor below and does not raise the axis above the data (a design rule of
// this package, not an outside fact).
func TestExactErrorBand(t *testing.T) {
	exact := []float64{3, 1.5, 1.1, 1.01}
	s := &DepthSeries{Depths: []int{1, 2, 3, 4}, Exact: exact, ExactError: []float64{1e-3, 1e-4, 1e-5, 1e-6}}
	if p := newDepthPoints(s, 0.05); p.exactBand != nil {
		t.Errorf("an error of 0.1%% of R − 1 drew a band: %v", p.exactBand)
	}
	s.ExactError = []float64{100, 0.1, 0.01, 2e-2}
	p := newDepthPoints(s, 0.05)
	if len(p.exactBand) != 8 {
		t.Fatalf("band outline has %d points, want 8", len(p.exactBand))
	}
	if p.ymax != 2 { // the largest R − 1; the band's 102 does not raise it
		t.Errorf("ymax %g, want 2", p.ymax)
	}
	if top := p.exactBand[0].Y; top != 4 {
		t.Errorf("band top at depth 1 is %g, want the plot's top 4", top)
	}
	if low := p.exactBand[len(p.exactBand)-1].Y; low != p.floor { // depth 1 lower side: 2 − 100 < 0
		t.Errorf("band bottom at depth 1 is %g, want the floor %g", low, p.floor)
	}
	if low := p.exactBand[4].Y; low != p.floor { // depth 4: 0.01 − 0.02 < 0
		t.Errorf("band bottom at depth 4 is %g, want the floor %g", low, p.floor)
	}
}
