package plots

import (
	"math"
	"math/rand/v2"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/stat/distuv"
)

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
		if err := SavePorterThomasPlot(p, probs, 8, ""); err != nil {
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
