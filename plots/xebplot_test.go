package plots

import (
	"bytes"
	"strings"
	"testing"
)

// TestXEBPlot draws two curves (invented values) to SVG and checks that the
// legend names each curve and both bands, and that a curve with mismatched
// slices panics.
func TestXEBPlot(t *testing.T) {
	curves := []XEBCurve{
		{Label: "gate error 0.005", Depths: []int{1, 2, 4, 8}, OverDigital: []float64{1.2, 1.08, 1.03, 1.01}},
		{Label: "gate error 0.01", Depths: []int{1, 2, 4, 8}, OverDigital: []float64{1.3, 1.15, 1.06, 1.02}},
	}
	var b bytes.Buffer
	if err := XEBPlot(&b, SVG, curves, WithTitle("demo chip")); err != nil {
		t.Fatal(err)
	}
	svg := b.String()
	for _, want := range []string{"gate error 0.005", "gate error 0.01", "1 ± 0.01", "1 ± 0.05", "demo chip"} {
		if !strings.Contains(svg, want) {
			t.Errorf("the SVG does not contain %q", want)
		}
	}
	defer func() {
		if recover() == nil {
			t.Error("no panic for a curve with 2 depths and 1 value")
		}
	}()
	_ = XEBPlot(&b, SVG, []XEBCurve{{Label: "bad", Depths: []int{1, 2}, OverDigital: []float64{1}}})
}
