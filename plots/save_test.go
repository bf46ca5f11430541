package plots

import (
	"bytes"
	"encoding/xml"
	"errors"
	"image"
	"image/color"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
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

// TestPlotPaths: a bad extension is a *FormatError and writes nothing; a
// missing directory is an error; an existing file is replaced whole.
func TestPlotPaths(t *testing.T) {
	sum := &DepthSeries{Qubits: 2, Depths: []int{1}, Ratio: []float64{1.5}, Lower: []float64{1.2}, Upper: []float64{1.8}}
	dir := t.TempDir()
	bad := filepath.Join(dir, "plot.jpg")
	err := SaveDepthPlot(bad, sum, 0.05)
	var fe *FormatError
	if !errors.As(err, &fe) || !strings.Contains(err.Error(), ".png or .svg") {
		t.Errorf("DepthPlot to .jpg: %v, want a FormatError", err)
	}
	if _, err := os.Stat(bad); err == nil {
		t.Error("a .jpg file was written")
	}
	if err := SavePorterThomasPlot(filepath.Join(dir, "pt.pdf"), [][]float64{{0.5, 0.5}}, 1, ""); !errors.As(err, &fe) {
		t.Errorf("PorterThomasPlot to .pdf: %v, want a FormatError", err)
	}
	if err := SaveDepthPlot(filepath.Join(dir, "absent", "p.png"), sum, 0.05); err == nil || !strings.Contains(err.Error(), "absent") {
		t.Errorf("missing directory: %v", err)
	}
	if err := CheckPath(filepath.Join(dir, "x.SVG")); err != nil {
		t.Errorf("upper-case .SVG refused: %v", err)
	}
	old := filepath.Join(dir, "old.png")
	if err := os.WriteFile(old, []byte("not a picture"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := SaveDepthPlot(old, sum, 0.05); err != nil {
		t.Fatal(err)
	}
	decodePNG(t, old)
}

func TestPanics(t *testing.T) {
	sum := &DepthSeries{Qubits: 2, Depths: []int{1}, Ratio: []float64{1.5}}
	p := filepath.Join(t.TempDir(), "p.png")
	var buf bytes.Buffer
	for name, f := range map[string]func(){
		"no rows":       func() { SaveDepthPlot(p, &DepthSeries{}, 0.05) },
		"nil series":    func() { DepthPlot(&buf, PNG, nil, 0.05) },
		"exact length":  func() { SaveDepthPlot(p, &DepthSeries{Depths: []int{1}, Exact: []float64{1, 2}}, 0.05) },
		"ratio length":  func() { DepthPlot(&buf, SVG, &DepthSeries{Depths: []int{1, 2}, Ratio: []float64{1}}, 0.05) },
		"lower only":    func() { DepthPlot(&buf, SVG, &DepthSeries{Depths: []int{1}, Lower: []float64{1}}, 0.05) },
		"eps zero":      func() { SaveDepthPlot(p, sum, 0) },
		"bad format":    func() { DepthPlot(&buf, Format("pdf"), sum, 0.05) },
		"no instances":  func() { SavePorterThomasPlot(p, nil, 1, "") },
		"ragged":        func() { SavePorterThomasPlot(p, [][]float64{{0.5, 0.5}, {1}}, 1, "") },
		"one outcome":   func() { PorterThomasPlot(&buf, PNG, [][]float64{{1}}, 1, "") },
		"pt bad format": func() { PorterThomasPlot(&buf, "", [][]float64{{0.5, 0.5}}, 1, "") },
		"no bins":       func() { densityBins([][]float64{{0.5, 0.5}}, 0) },
	} {
		func() {
			defer func() {
				r := recover()
				if s, ok := r.(string); !ok || !strings.HasPrefix(s, "plots: ") {
					t.Errorf("%s: recovered %v, want a panic with a \"plots: \" message", name, r)
				}
			}()
			f()
		}()
	}
}

// TestWriters draws both plots to a bytes.Buffer in each format and checks
// the signatures: the 8-byte PNG signature 89 50 4E 47 0D 0A 1A 0A (PNG
// specification, W3C 2003, section 5.2) and an SVG document with an <svg>
// root; then checks that the Save functions write the same bytes to a file.
func TestWriters(t *testing.T) {
	series := &DepthSeries{Qubits: 3, Depths: []int{1, 2, 3}, Ratio: []float64{2, 1.3, 1.02},
		Lower: []float64{1.8, 1.2, 0.99}, Upper: []float64{2.2, 1.4, 1.04}, Exact: []float64{2.1, 1.3, 1.01}, Depth: 3, Found: true}
	probs := [][]float64{{0.1, 0.2, 0.3, 0.4}, {0.4, 0.3, 0.2, 0.1}}
	dir := t.TempDir()
	for _, format := range []Format{PNG, SVG} {
		for _, c := range []struct {
			name string
			draw func(io.Writer) error
			save func(string) error
		}{
			{"depth", func(w io.Writer) error { return DepthPlot(w, format, series, 0.05) },
				func(p string) error { return SaveDepthPlot(p, series, 0.05) }},
			{"pt", func(w io.Writer) error { return PorterThomasPlot(w, format, probs, 2, "") },
				func(p string) error { return SavePorterThomasPlot(p, probs, 2, "") }},
		} {
			var buf bytes.Buffer
			if err := c.draw(&buf); err != nil {
				t.Fatalf("%s %s: %v", c.name, format, err)
			}
			path := filepath.Join(dir, c.name+"."+string(format))
			switch format {
			case PNG:
				if !bytes.HasPrefix(buf.Bytes(), []byte("\x89PNG\r\n\x1a\n")) {
					t.Errorf("%s: no PNG signature: % x", c.name, buf.Bytes()[:min(8, buf.Len())])
				}
				if _, err := png.Decode(bytes.NewReader(buf.Bytes())); err != nil {
					t.Errorf("%s: not a valid PNG: %v", c.name, err)
				}
			case SVG:
				if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
					t.Fatal(err)
				}
				checkSVG(t, path)
			}
			if err := c.save(path); err != nil {
				t.Fatal(err)
			}
			saved, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(saved, buf.Bytes()) {
				t.Errorf("%s %s: the saved file (%d bytes) differs from the writer's output (%d bytes)", c.name, format, len(saved), buf.Len())
			}
		}
	}
}
