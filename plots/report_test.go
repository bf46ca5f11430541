package plots

import (
	"bytes"
	"context"
	"encoding/xml"
	"errors"
	"image"
	"image/color"
	"image/png"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/stat/distuv"

	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/scan"
)

// plotDir is where the tests write their plots: a temporary directory, or
// REPORT_PLOT_DIR when set, to look at them.
func plotDir(t *testing.T) string {
	t.Helper()
	if d := os.Getenv("REPORT_PLOT_DIR"); d != "" {
		return d
	}
	return t.TempDir()
}

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
	return scan.Estimate(4, recs, 0.95, 0.05)
}

// decodePNG checks that path holds a PNG of the plot size and returns it.
func decodePNG(t *testing.T, path string) image.Image {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatalf("%s is not a valid PNG: %v", path, err)
	}
	// 25 cm × 15.5 cm at 96 dpi (the vgimg default): 945 × 586 pixels.
	b := img.Bounds()
	if b.Dx() < 900 || b.Dy() < 550 {
		t.Errorf("%s is %d×%d pixels, want about 945×586", path, b.Dx(), b.Dy())
	}
	return img
}

// countColour returns how many pixels of img are within 12 per channel of c
// (anti-aliasing shifts edge pixels a little; solid areas match exactly).
func countColour(img image.Image, c color.RGBA) int {
	n := 0
	b := img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			r, g, bl, _ := img.At(x, y).RGBA()
			if near(r>>8, c.R) && near(g>>8, c.G) && near(bl>>8, c.B) {
				n++
			}
		}
	}
	return n
}

func near(v uint32, want uint8) bool { return math.Abs(float64(v)-float64(want)) <= 12 }

// checkSVG checks that path is well-formed XML with an <svg> root and
// returns its text.
func checkSVG(t *testing.T, path string) string {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	dec := xml.NewDecoder(bytes.NewReader(data))
	root := ""
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("%s is not well-formed XML: %v", path, err)
		}
		if se, ok := tok.(xml.StartElement); ok && root == "" {
			root = se.Name.Local
		}
	}
	if root != "svg" {
		t.Fatalf("%s: root element %q, want svg", path, root)
	}
	if len(data) < 5000 { // axes, ticks and legend alone take several kB
		t.Errorf("%s has only %d bytes", path, len(data))
	}
	return string(data)
}

// TestDepthPlotFiles draws a real scan in both formats and checks the
// pictures: valid files of the plot size, with the band, the ε line and the
// recommended-depth line present in their colours, and the labels in the SVG.
func TestDepthPlotFiles(t *testing.T) {
	sum := lineScan(t, []int{1, 2, 3, 4, 5, 6, 8, 10, 12}, 40)
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
		if err := DepthPlot(p, sum, exact, 0.05, WithConfidence(0.95)); err != nil {
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
	if err := DepthPlot(p, sum, nil, 0.05); err != nil {
		t.Fatal(err)
	}
	if n := countColour(decodePNG(t, p), colourDepth); n > 20 {
		t.Errorf("%d pixels of the recommended-depth colour with no recommended depth", n)
	}
	s := filepath.Join(dir, "shallow.svg")
	if err := DepthPlot(s, sum, nil, 0.05, WithDepthUnit("gates")); err != nil {
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
	sum := &scan.Curve{Qubits: 3, Rows: []scan.Row{
		{Depth: 1, Ratio: 3, Lower: 2.5, Upper: 3.5},
		{Depth: 2, Ratio: 1.5, Lower: 1.2, Upper: 1.8},
		{Depth: 3, Ratio: 1.2, Lower: -inf, Upper: inf}, // one instance: no band
		{Depth: 4, Ratio: 1.01, Lower: 0.98, Upper: 1.04},
		{Depth: 5, Ratio: 0.99, Lower: 0.97, Upper: 1.01},
	}, Depth: 4, Found: true}
	s := newDepthSeries(sum, nil, 0.05)
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

// TestDensityBins: the histogram of Exp(1) samples is a density (area 1) and
// matches e^(−x) bin by bin within 4 binomial standard errors. Exp(1) is the
// Porter–Thomas law of D·p (Porter & Thomas 1956); samples from gonum
// distuv.Exponential with a fixed seed.
func TestDensityBins(t *testing.T) {
	const d, inst = 1000, 20
	e := distuv.Exponential{Rate: 1, Src: rand.New(rand.NewPCG(1, 2))}
	probs := make([][]float64, inst)
	for i := range probs {
		probs[i] = make([]float64, d)
		for j := range probs[i] {
			probs[i][j] = e.Rand() / d
		}
	}
	n := float64(d * inst)
	bins := densityBins(probs, binCount(d*inst))
	if len(bins) != 55 { // ⌈2·20000^(1/3)⌉ = ⌈54.3⌉
		t.Errorf("%d bins, want 55", len(bins))
	}
	area := 0.0
	for i, b := range bins {
		w := b.Max - b.Min
		area += b.Weight * w
		q := math.Exp(-b.Min) - math.Exp(-b.Max)
		se := math.Sqrt(q*(1-q)/n) / w
		if math.Abs(b.Weight-q/w) > 4*se+1/(n*w) { // +1 count: the bin edges of the maximum
			t.Errorf("bin %d [%.3f, %.3f): density %.5f, Exp(1) gives %.5f ± %.5f", i, b.Min, b.Max, b.Weight, q/w, se)
		}
	}
	if math.Abs(area-1) > 1e-12 {
		t.Errorf("histogram area %v, want 1", area)
	}
}

// TestFiniteDensity: the density of D·p under Beta(1, D−1) integrates to 1,
// has the closed form (D−1)/D·(1−x/D)^(D−2), and tends to e^(−x) with error
// about x²e^(−x)/(2D) (Porter & Thomas 1956; Dalzell, Hunter-Jones, Brandão
// 2022 for the Beta law).
func TestFiniteDensity(t *testing.T) {
	for _, d := range []float64{4, 16, 64} {
		f := finiteDensity(d)
		// A polynomial of degree D−2 ≤ 62: 64-point Gauss–Legendre is exact
		// up to rounding.
		if got := quad.Fixed(f, 0, d, 64, quad.Legendre{}, 0); math.Abs(got-1) > 1e-12 {
			t.Errorf("D = %g: integral %v, want 1", d, got)
		}
	}
	// D = 4, x = 1: (3/4)(3/4)² = 0.421875 (by hand).
	if got := finiteDensity(4)(1); math.Abs(got-0.421875) > 1e-15 {
		t.Errorf("D = 4 density at 1: %v, want 0.421875", got)
	}
	f := finiteDensity(1 << 16)
	for _, x := range []float64{0.5, 1, 3} {
		if diff := math.Abs(f(x) - math.Exp(-x)); diff > x*x*math.Exp(-x)/(1<<16) {
			t.Errorf("D = 2^16, x = %g: %v vs e^(−x) = %v", x, f(x), math.Exp(-x))
		}
	}
}

// haarStateProbs returns the output probabilities of a Haar-random state of
// dimension d: normalised squared moduli of d i.i.d. standard complex
// Gaussians (unitarily invariant, hence Haar-distributed direction; common
// practice).
func haarStateProbs(rng *rand.Rand, d int) []float64 {
	p := make([]float64, d)
	s := 0.0
	for i := range p {
		re, im := rng.NormFloat64(), rng.NormFloat64()
		p[i] = re*re + im*im
		s += p[i]
	}
	for i := range p {
		p[i] /= s
	}
	return p
}

// TestPorterThomasPlotFiles draws the histogram of Haar-state probabilities
// in both formats and checks the files and the drawn elements.
func TestPorterThomasPlotFiles(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	probs := make([][]float64, 20)
	for i := range probs {
		probs[i] = haarStateProbs(rng, 64)
	}
	dir := plotDir(t)
	pngPath, svgPath := filepath.Join(dir, "pt.png"), filepath.Join(dir, "pt.svg")
	for _, p := range []string{pngPath, svgPath} {
		if err := PorterThomasPlot(p, probs, 8, ""); err != nil {
			t.Fatal(err)
		}
	}
	img := decodePNG(t, pngPath)
	if n := countColour(img, colourHist); n < 5000 {
		t.Errorf("histogram: %d pixels of its fill colour", n)
	}
	if n := countColour(img, colourFinite); n < 100 {
		t.Errorf("finite-D curve: %d pixels of its colour", n)
	}
	svg := checkSVG(t, svgPath)
	for _, want := range []string{"Output probabilities at depth 8 (D = 64)", "Porter–Thomas", "x = D·p", "20 instance(s) × 64 outcomes"} {
		if !strings.Contains(svg, want) {
			t.Errorf("SVG lacks %q", want)
		}
	}
}

// TestPlotPaths: a bad extension is a *FormatError and writes nothing; a
// missing directory is an error; an existing file is replaced whole.
func TestPlotPaths(t *testing.T) {
	sum := &scan.Curve{Qubits: 2, Rows: []scan.Row{{Depth: 1, Ratio: 1.5, Lower: 1.2, Upper: 1.8}}}
	dir := t.TempDir()
	bad := filepath.Join(dir, "plot.jpg")
	err := DepthPlot(bad, sum, nil, 0.05)
	var fe *FormatError
	if !errors.As(err, &fe) || !strings.Contains(err.Error(), ".png or .svg") {
		t.Errorf("DepthPlot to .jpg: %v, want a FormatError", err)
	}
	if _, err := os.Stat(bad); err == nil {
		t.Error("a .jpg file was written")
	}
	if err := PorterThomasPlot(filepath.Join(dir, "pt.pdf"), [][]float64{{0.5, 0.5}}, 1, ""); !errors.As(err, &fe) {
		t.Errorf("PorterThomasPlot to .pdf: %v, want a FormatError", err)
	}
	if err := DepthPlot(filepath.Join(dir, "absent", "p.png"), sum, nil, 0.05); err == nil || !strings.Contains(err.Error(), "absent") {
		t.Errorf("missing directory: %v", err)
	}
	if err := CheckPath(filepath.Join(dir, "x.SVG")); err != nil {
		t.Errorf("upper-case .SVG refused: %v", err)
	}
	old := filepath.Join(dir, "old.png")
	if err := os.WriteFile(old, []byte("not a picture"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := DepthPlot(old, sum, nil, 0.05); err != nil {
		t.Fatal(err)
	}
	decodePNG(t, old)
}

func TestPanics(t *testing.T) {
	sum := &scan.Curve{Qubits: 2, Rows: []scan.Row{{Depth: 1, Ratio: 1.5}}}
	p := filepath.Join(t.TempDir(), "p.png")
	for name, f := range map[string]func(){
		"no rows":      func() { DepthPlot(p, &scan.Curve{}, nil, 0.05) },
		"exact length": func() { DepthPlot(p, sum, []float64{1, 2}, 0.05) },
		"eps zero":     func() { DepthPlot(p, sum, nil, 0) },
		"no instances": func() { PorterThomasPlot(p, nil, 1, "") },
		"ragged":       func() { PorterThomasPlot(p, [][]float64{{0.5, 0.5}, {1}}, 1, "") },
		"one outcome":  func() { PorterThomasPlot(p, [][]float64{{1}}, 1, "") },
		"no bins":      func() { densityBins([][]float64{{0.5, 0.5}}, 0) },
	} {
		func() {
			defer func() {
				r := recover()
				if s, ok := r.(string); !ok || !strings.HasPrefix(s, "report: ") {
					t.Errorf("%s: recovered %v, want a panic with a \"report: \" message", name, r)
				}
			}()
			f()
		}()
	}
}

func TestIntegerTicks(t *testing.T) {
	// The step rule: 1, 2, 5, 10, 20, … until at most 12 labels.
	cases := []struct {
		min, max float64
		labels   string
	}{
		{1, 14, "2 4 6 8 10 12 14"},
		{1, 8, "1 2 3 4 5 6 7 8"},
		{0.5, 3.5, "1 2 3"},
		{10, 300, "50 100 150 200 250 300"},
	}
	for _, c := range cases {
		var got []string
		for _, tk := range (integerTicks{}).Ticks(c.min, c.max) {
			if tk.Label != "" {
				got = append(got, tk.Label)
			}
		}
		if strings.Join(got, " ") != c.labels {
			t.Errorf("ticks on [%g, %g]: %v, want %s", c.min, c.max, got, c.labels)
		}
	}
}

func TestLog10Ticks(t *testing.T) {
	// Labels at the powers of ten inside the range; 2 and 5 as well when it
	// spans at most two decades.
	label := func(min, max float64) string {
		var got []string
		for _, tk := range (log10Ticks{}).Ticks(math.Log10(min), math.Log10(max)) {
			if tk.Label != "" {
				got = append(got, tk.Label)
			}
		}
		return strings.Join(got, " ")
	}
	if got := label(5e-4, 30); got != "0.001 0.01 0.1 1 10" {
		t.Errorf("[5e-4, 30]: %s", got)
	}
	if got := label(0.03, 1.5); got != "0.05 0.1 0.2 0.5 1" {
		t.Errorf("[0.03, 1.5]: %s", got)
	}
}

// TestDepthPlotExactOnly: rows without an estimate (NaN ratio, as for the
// exact command) draw the exact curve alone: no band, no estimate.
func TestDepthPlotExactOnly(t *testing.T) {
	nan := math.NaN()
	sum := &scan.Curve{Qubits: 6, Depth: 5, Found: true}
	var exact []float64
	for d := 1; d <= 8; d++ {
		sum.Rows = append(sum.Rows, scan.Row{Depth: d, Ratio: nan, Lower: nan, Upper: nan})
		exact = append(exact, 1+4*math.Pow(0.4, float64(d)))
	}
	dir := plotDir(t)
	p := filepath.Join(dir, "exact.png")
	if err := DepthPlot(p, sum, exact, 0.05); err != nil {
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
	if err := DepthPlot(s, sum, exact, 0.05); err != nil {
		t.Fatal(err)
	}
	svg := checkSVG(t, s)
	if !strings.Contains(svg, "exact E[Z]/Z_H") || strings.Contains(svg, "Monte Carlo") {
		t.Error("legend of an exact-only plot")
	}
}
