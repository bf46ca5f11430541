package plots

import (
	"bytes"
	"image/png"
	"testing"
)

func testChip() *ChipDrawing {
	return &ChipDrawing{
		Title:      "test chip",
		Qubits:     []ChipQubit{{X: 0, Y: 0, Label: "Q0"}, {X: 1, Y: 0, Label: "Q1"}, {X: 1, Y: 1, Label: "Q2", Faded: true}, {X: 0, Y: 1, Label: "Q3"}},
		Couplers:   []ChipCoupler{{A: 0, B: 1, Layer: 0}, {A: 1, B: 2, Layer: -1}, {A: 3, B: 0, Layer: 1}},
		Layers:     2,
		LayerSizes: []int{1, 1},
	}
}

// TestChipPlot: the drawing decodes as a PNG of the figure's size and is an
// SVG document in SVG (the formats' own decoders and markers).
func TestChipPlot(t *testing.T) {
	var b bytes.Buffer
	if err := ChipPlot(&b, PNG, testChip()); err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(&b)
	if err != nil {
		t.Fatalf("not a PNG: %v", err)
	}
	if w := img.Bounds().Dx(); w < 900 || w > 1000 {
		t.Errorf("PNG width %d, want about 945 (25 cm at 96 dpi)", w)
	}
	b.Reset()
	if err := ChipPlot(&b, SVG, testChip()); err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(b.Bytes(), []byte("<svg")) || !bytes.Contains(b.Bytes(), []byte("Q2")) {
		t.Error("the SVG lacks the document element or a qubit label")
	}
}

func TestChipPlotPanics(t *testing.T) {
	for _, bad := range []func(*ChipDrawing){
		func(c *ChipDrawing) { c.Couplers[0].B = 9 },
		func(c *ChipDrawing) { c.Couplers[0].Layer = 2 },
		func(c *ChipDrawing) { c.LayerSizes = []int{1} },
		func(c *ChipDrawing) { c.Qubits = nil },
	} {
		c := testChip()
		bad(c)
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("ChipPlot accepted %+v", c)
				}
			}()
			_ = ChipPlot(&bytes.Buffer{}, PNG, c)
		}()
	}
}
