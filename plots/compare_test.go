package plots

import (
	"path/filepath"
	"strings"
	"testing"
)

// TestComparePlotFiles draws two real scans of line:4 on one chart in both
// formats: valid files of the plot size, each curve in its own colour, and
// both labels with their recommended depths and the ε key in the SVG.
func TestComparePlotFiles(t *testing.T) {
	a := lineScan(t, []int{1, 2, 3, 4, 6, 8, 12}, 200)
	b := lineScan(t, []int{2, 4, 8, 16}, 100)
	curves := []Labelled{{Label: "gates haar (200)", Series: seriesOf(a, nil)}, {Label: "gates haar (100)", Series: seriesOf(b, nil)}}
	dir := plotDir(t)
	pngPath, svgPath := filepath.Join(dir, "compare.png"), filepath.Join(dir, "compare.svg")
	for _, p := range []string{pngPath, svgPath} {
		if err := SaveComparePlot(p, curves, 0.05, WithConfidence(0.95)); err != nil {
			t.Fatal(err)
		}
	}
	img := decodePNG(t, pngPath)
	for i, c := range comparePalette[:2] {
		if n := countColour(img, c); n < 150 {
			t.Errorf("curve %d: %d pixels of its colour, want at least 150", i, n)
		}
	}
	svg := checkSVG(t, svgPath)
	for _, want := range []string{"gates haar (200): recommended depth", "gates haar (100)", "ε = 0.05 (bars: 95% confidence bounds)"} {
		if !strings.Contains(svg, want) {
			t.Errorf("SVG lacks %q", want)
		}
	}
	if !mustPanicPlots(func() { _ = SaveComparePlot(pngPath, nil, 0.05) }) {
		t.Error("no panic without curves")
	}
}

func mustPanicPlots(f func()) (panicked bool) {
	defer func() { panicked = recover() != nil }()
	f()
	return false
}
