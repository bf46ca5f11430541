package plots

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"strconv"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Labelled is one curve of a comparison plot: a depth series and the legend
// text that tells it apart from the others (its gate set, graph or noise).
type Labelled struct {
	Label  string
	Series *DepthSeries
}

// comparePalette holds the curve colours of a comparison plot, in order,
// with a glyph shape per colour so that the curves stay apart in grey; more
// curves cycle through it.
var comparePalette = []color.RGBA{
	{R: 31, G: 84, B: 160, A: 255},
	{R: 214, G: 110, B: 20, A: 255},
	{R: 20, G: 130, B: 60, A: 255},
	{R: 150, G: 40, B: 150, A: 255},
	{R: 90, G: 90, B: 90, A: 255},
	{R: 0, G: 150, B: 170, A: 255},
}

var compareGlyphs = []draw.GlyphDrawer{draw.CircleGlyph{}, draw.SquareGlyph{}, draw.TriangleGlyph{}, draw.CrossGlyph{}, draw.PlusGlyph{}, draw.RingGlyph{}}

// ComparePlot draws several depth series on one chart to w: each curve's
// R − 1 against depth on a logarithmic axis (the estimate where the series
// has one, else its exact curve) with its confidence bounds as error bars,
// a horizontal line at eps, and a legend of the labels with each curve's
// recommended depth. Values ≤ 0 are drawn at a floor below eps, as in
// DepthPlot. WithTitle, WithDepthUnit and WithConfidence apply. It panics if
// curves is empty, a series is invalid (see DepthPlot), eps is not positive
// and finite, or format is not PNG or SVG.
func ComparePlot(w io.Writer, format Format, curves []Labelled, eps float64, opts ...Option) error {
	fig, err := compareFigure(curves, eps, opts)
	if err != nil {
		return fmt.Errorf("plots: plotting: %w", err)
	}
	return fig.write(w, format)
}

// SaveComparePlot writes the ComparePlot of curves to path as SaveDepthPlot
// writes a DepthPlot. It panics as ComparePlot does.
func SaveComparePlot(path string, curves []Labelled, eps float64, opts ...Option) error {
	checkCurves(curves, eps)
	return save(path, func() (*figure, error) { return compareFigure(curves, eps, opts) })
}

func checkCurves(curves []Labelled, eps float64) {
	if len(curves) == 0 {
		panic("plots: ComparePlot needs at least one curve")
	}
	for _, c := range curves {
		c.Series.check()
	}
	checkEps(eps)
}

// compareFigure lays out the comparison plot.
func compareFigure(curves []Labelled, eps float64, opts []Option) (*figure, error) {
	checkCurves(curves, eps)
	o := depthOptions{depthUnit: "layers", title: "Distance from the Haar collision probability"}
	for _, opt := range opts {
		opt(&o)
	}
	var values []float64
	xmin, xmax := math.Inf(1), math.Inf(-1)
	for _, c := range curves {
		s := c.Series
		for i, d := range s.Depths {
			xmin, xmax = math.Min(xmin, float64(d)), math.Max(xmax, float64(d))
			for _, v := range [][]float64{s.Ratio, s.Lower, s.Upper, s.Exact} {
				if v != nil {
					values = append(values, v[i]-1)
				}
			}
		}
	}
	if xmax == xmin {
		xmin, xmax = xmin-1, xmax+1
	}
	floor := logFloor(values, eps)
	ymax := eps
	clipped := false
	lift := func(v float64) float64 {
		if v <= floor {
			clipped = true
			return floor
		}
		ymax = math.Max(ymax, v)
		return v
	}
	fig := newRatioFigure(o.title, o.depthUnit)
	p := fig.plot
	for k, c := range curves {
		s := c.Series
		ratio := s.Ratio
		if ratio == nil {
			ratio = s.Exact
		}
		var pts plotter.XYs
		var bars plotter.XYs
		var lo, hi []float64
		for i, d := range s.Depths {
			if !finite(ratio[i]) {
				continue
			}
			pts = append(pts, plotter.XY{X: float64(d), Y: lift(ratio[i] - 1)})
			if s.Ratio != nil && s.Lower != nil && finite(s.Lower[i]) && finite(s.Upper[i]) {
				bars = append(bars, plotter.XY{X: float64(d), Y: 0})
				lo = append(lo, lift(s.Lower[i]-1))
				hi = append(hi, lift(s.Upper[i]-1))
			}
		}
		if len(pts) == 0 {
			continue
		}
		col := comparePalette[k%len(comparePalette)]
		l, sc, err := plotter.NewLinePoints(log10XYs(pts))
		if err != nil {
			return nil, err
		}
		l.Color, l.Width = col, vg.Points(1.2)
		sc.GlyphStyle = draw.GlyphStyle{Color: col, Radius: vg.Points(2.5), Shape: compareGlyphs[k%len(compareGlyphs)]}
		p.Add(l, sc)
		if len(bars) > 0 {
			eb := errorBars{xys: bars, lo: lo, hi: hi}
			b, err := plotter.NewYErrorBars(eb)
			if err != nil {
				return nil, err
			}
			b.Color = col
			p.Add(b)
		}
		label := c.Label
		if s.Found {
			label += ": recommended depth " + strconv.Itoa(s.Depth)
		} else {
			label += ": no recommended depth"
		}
		fig.key(label, l, sc)
	}
	epsLine, err := addEpsLine(p, xmin, xmax, eps)
	if err != nil {
		return nil, err
	}
	band := "confidence bounds"
	if o.confidence > 0 {
		band = strconv.FormatFloat(100*o.confidence, 'g', 4, 64) + "% " + band
	}
	fig.key("ε = "+strconv.FormatFloat(eps, 'g', 4, 64)+" (bars: "+band+")", epsLine)
	if clipped {
		fig.key("log axis: values ≤ " + formatFloor(floor) + ", R − 1 ≤ 0 included, drawn at " + formatFloor(floor))
	}
	p.X.Min, p.X.Max = xmin, xmax
	p.Y.Min, p.Y.Max = math.Log10(floor/2), math.Log10(ymax*2)
	return fig, nil
}

// errorBars are y error bars in log10 coordinates: at each point the bar
// runs from log10(lo) to log10(hi).
type errorBars struct {
	xys    plotter.XYs
	lo, hi []float64
}

func (e errorBars) Len() int { return len(e.xys) }

func (e errorBars) XY(i int) (float64, float64) {
	mid := (math.Log10(e.lo[i]) + math.Log10(e.hi[i])) / 2
	return e.xys[i].X, mid
}

func (e errorBars) YError(i int) (float64, float64) {
	mid := (math.Log10(e.lo[i]) + math.Log10(e.hi[i])) / 2
	return mid - math.Log10(e.lo[i]), math.Log10(e.hi[i]) - mid
}
