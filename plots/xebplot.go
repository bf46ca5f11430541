package plots

import (
	"fmt"
	"io"
	"math"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// XEBCurve is one curve of an XEBPlot: the ratio of the exact expected
// cross-entropy benchmark (normalized by its noiseless value) to the digital
// error model's fidelity at each depth, and the legend text that names its
// noise (an error rate).
type XEBCurve struct {
	Label  string
	Depths []int
	// OverDigital holds XEB_normalized / F_digital per depth; non-finite
	// values are skipped.
	OverDigital []float64
}

// XEBPlot draws, to w, the curves' XEB/digital ratio against depth on a
// linear axis, with dashed lines at 1 ± 0.01 and 1 ± 0.05 (the bands the
// exact report names), one colour and glyph per curve. WithTitle and
// WithDepthUnit apply. It panics if curves is empty, a curve's slices
// differ in length, or format is not PNG or SVG.
func XEBPlot(w io.Writer, format Format, curves []XEBCurve, opts ...Option) error {
	fig, err := xebFigure(curves, opts)
	if err != nil {
		return fmt.Errorf("plots: plotting: %w", err)
	}
	return fig.write(w, format)
}

// SaveXEBPlot writes the XEBPlot of curves to path atomically, in the format
// its extension names (.png or .svg). It panics as XEBPlot does.
func SaveXEBPlot(path string, curves []XEBCurve, opts ...Option) error {
	checkXEBCurves(curves)
	return save(path, func() (*figure, error) { return xebFigure(curves, opts) })
}

func checkXEBCurves(curves []XEBCurve) {
	if len(curves) == 0 {
		panic("plots: XEBPlot needs at least one curve")
	}
	for _, c := range curves {
		if len(c.Depths) != len(c.OverDigital) {
			panic(fmt.Sprintf("plots: XEB curve %q with %d depths and %d values", c.Label, len(c.Depths), len(c.OverDigital)))
		}
	}
}

func xebFigure(curves []XEBCurve, opts []Option) (*figure, error) {
	checkXEBCurves(curves)
	o := depthOptions{depthUnit: "layers", title: "Exact expected XEB over the digital error model"}
	for _, opt := range opts {
		opt(&o)
	}
	fig := newFigure()
	p := fig.plot
	p.Title.Text = o.title
	p.X.Label.Text = "depth (" + o.depthUnit + ")"
	p.Y.Label.Text = "(E[F_lin] / F_lin ideal) / F_digital  (dimensionless)"
	p.X.Tick.Marker = integerTicks{}
	p.Y.Tick.Marker = plainTicks{}
	p.Add(plotter.NewGrid())
	xmin, xmax := math.Inf(1), math.Inf(-1)
	ymin, ymax := 0.95, 1.05
	for k, c := range curves {
		var pts plotter.XYs
		for i, d := range c.Depths {
			v := c.OverDigital[i]
			if !finite(v) {
				continue
			}
			pts = append(pts, plotter.XY{X: float64(d), Y: v})
			xmin, xmax = math.Min(xmin, float64(d)), math.Max(xmax, float64(d))
			ymin, ymax = math.Min(ymin, v), math.Max(ymax, v)
		}
		if len(pts) == 0 {
			continue
		}
		col := comparePalette[k%len(comparePalette)]
		l, sc, err := plotter.NewLinePoints(pts)
		if err != nil {
			return nil, err
		}
		l.Color, l.Width = col, vg.Points(1.2)
		sc.GlyphStyle = draw.GlyphStyle{Color: col, Radius: vg.Points(2.5), Shape: compareGlyphs[k%len(compareGlyphs)]}
		p.Add(l, sc)
		fig.key(c.Label, l, sc)
	}
	if math.IsInf(xmin, 0) {
		xmin, xmax = 0, 1
	}
	if xmax == xmin {
		xmin, xmax = xmin-1, xmax+1
	}
	for i, band := range []float64{0.01, 0.05} {
		var first *plotter.Line
		for _, y := range []float64{1 - band, 1 + band} {
			l, err := plotter.NewLine(plotter.XYs{{X: xmin, Y: y}, {X: xmax, Y: y}})
			if err != nil {
				return nil, err
			}
			l.Color, l.Width = colourEps, vg.Points(0.8+0.4*float64(i))
			l.Dashes = []vg.Length{vg.Points(6), vg.Points(3)}
			p.Add(l)
			first = l
		}
		fig.key(fmt.Sprintf("1 ± %g", band), first)
	}
	pad := 0.05 * (ymax - ymin)
	p.X.Min, p.X.Max = xmin, xmax
	p.Y.Min, p.Y.Max = ymin-pad, ymax+pad
	return fig, nil
}
