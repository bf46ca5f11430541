package plots

import (
	"fmt"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"mixdepth/scan"
)

// Option adjusts a DepthPlot.
type Option func(*depthOptions)

type depthOptions struct {
	title      string
	depthUnit  string
	confidence float64
}

// WithTitle sets the title of a DepthPlot. The default names the qubit
// count: "Distance from the Haar collision probability, n = 12 qubits".
func WithTitle(title string) Option { return func(o *depthOptions) { o.title = title } }

// WithDepthUnit names what one depth step is, for the depth axis label. The
// default is "layers"; a random-edge schedule counts "gates".
func WithDepthUnit(unit string) Option { return func(o *depthOptions) { o.depthUnit = unit } }

// WithConfidence gives the confidence level of the band (such as 0.95) for
// the legend. The default, 0, labels it "confidence band" without a level.
func WithConfidence(level float64) Option {
	return func(o *depthOptions) { o.confidence = level }
}

// DepthPlot writes to path (.png or .svg) a plot of R − 1 against depth on a
// logarithmic axis, where R = mean(Z)/Z_H is the ratio of each row of sum
// (design.md section 4): the estimate with its confidence band [Lower − 1,
// Upper − 1], a horizontal line at eps (a depth is anti-concentrated when
// Upper ≤ 1 + eps), a vertical line at the recommended depth sum.Depth when
// sum.Found, and the exact curve exact[i] − 1 when exact is not nil. exact[i]
// is E[Z]/Z_H at the depth of sum.Rows[i]; a NaN entry (or a NaN ratio in a
// row) is left out. A logarithmic axis has no room for values ≤ 0, which the
// estimate and the lower bound reach near the Haar value: such values are
// drawn at a floor below eps (a power of ten at most eps/10), and the legend
// says so. Rows whose interval is infinite (a single instance) have no band;
// rows whose Ratio is NaN have no estimate, so a summary of such rows with
// exact values plots the exact curve alone.
//
// The file is written atomically (see the package comment). DepthPlot
// panics if sum has no rows, if exact is not nil and its length differs from
// the number of rows, or if eps is not positive.
func DepthPlot(path string, sum *scan.Curve, exact []float64, eps float64, opts ...Option) error {
	if sum == nil || len(sum.Rows) == 0 {
		panic("report: DepthPlot needs a summary with at least one row")
	}
	if exact != nil && len(exact) != len(sum.Rows) {
		panic(fmt.Sprintf("report: DepthPlot got %d exact values for %d rows", len(exact), len(sum.Rows)))
	}
	if !(eps > 0) || math.IsInf(eps, 1) {
		panic("report: DepthPlot needs a positive, finite eps")
	}
	if err := CheckPath(path); err != nil {
		return err
	}
	o := depthOptions{depthUnit: "layers"}
	for _, opt := range opts {
		opt(&o)
	}
	if o.title == "" {
		o.title = fmt.Sprintf("Distance from the Haar collision probability, n = %d qubits", sum.Qubits)
	}
	fig, err := depthPlot(newDepthSeries(sum, exact, eps), sum, eps, o)
	if err != nil {
		return fmt.Errorf("report: plotting %q: %w", path, err)
	}
	return fig.save(path)
}

// depthSeries is what a DepthPlot draws, in data coordinates, every y value
// already raised to the floor.
type depthSeries struct {
	floor   float64
	mean    plotter.XYs   // R − 1 above the floor
	line    plotter.XYs   // every finite R − 1, joined by the estimate's line
	clipped plotter.XYs   // R − 1 at or below the floor, drawn at the floor
	bands   []plotter.XYs // closed outlines of the band over runs of finite intervals
	exact   plotter.XYs
	// anyClipped is true when some drawn value (estimate, bound or exact)
	// lies at or below the floor.
	anyClipped bool
	ymax       float64
}

// newDepthSeries computes the points of a DepthPlot.
func newDepthSeries(sum *scan.Curve, exact []float64, eps float64) *depthSeries {
	var values []float64
	for i, r := range sum.Rows {
		values = append(values, r.Ratio-1, r.Lower-1, r.Upper-1)
		if exact != nil {
			values = append(values, exact[i]-1)
		}
	}
	s := &depthSeries{floor: logFloor(values, eps), ymax: eps}
	clip := func(v float64) float64 {
		if v <= s.floor {
			s.anyClipped = true
			return s.floor
		}
		s.ymax = math.Max(s.ymax, v)
		return v
	}
	var upper, lower plotter.XYs
	closeBand := func() {
		if len(upper) > 0 {
			ring := append(plotter.XYs(nil), upper...)
			for i := len(lower) - 1; i >= 0; i-- {
				ring = append(ring, lower[i])
			}
			s.bands = append(s.bands, ring)
		}
		upper, lower = nil, nil
	}
	for i, r := range sum.Rows {
		x := float64(r.Depth)
		if finite(r.Ratio) {
			y := r.Ratio - 1
			pt := plotter.XY{X: x, Y: clip(y)}
			s.line = append(s.line, pt)
			if y <= s.floor {
				s.clipped = append(s.clipped, pt)
			} else {
				s.mean = append(s.mean, pt)
			}
		}
		if finite(r.Lower) && finite(r.Upper) {
			upper = append(upper, plotter.XY{X: x, Y: clip(r.Upper - 1)})
			lower = append(lower, plotter.XY{X: x, Y: clip(r.Lower - 1)})
		} else {
			closeBand()
		}
		if exact != nil && finite(exact[i]) {
			s.exact = append(s.exact, plotter.XY{X: x, Y: clip(exact[i] - 1)})
		}
	}
	closeBand()
	return s
}

// logFloor returns the value at which a logarithmic axis of R − 1 stops: the
// power of ten at or below the smaller of eps/10 and half the smallest
// positive value, but no lower than eps·10⁻⁴, so that the interesting range
// near eps keeps most of the height.
func logFloor(values []float64, eps float64) float64 {
	lo := eps / 10
	for _, v := range values {
		if v > 0 && finite(v) {
			lo = math.Min(lo, v/2)
		}
	}
	lo = math.Max(lo, eps*1e-4)
	return math.Pow(10, math.Floor(math.Log10(lo)))
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// depthPlot lays out the plot of s.
func depthPlot(s *depthSeries, sum *scan.Curve, eps float64, o depthOptions) (*figure, error) {
	fig := newFigure()
	p := fig.plot
	p.Title.Text = o.title
	p.X.Label.Text = "depth (" + o.depthUnit + ")"
	p.Y.Label.Text = "R − 1,  R = E[Z] / Z_H  (dimensionless, log scale)"
	p.Y.Tick.Marker = log10Ticks{}
	p.X.Tick.Marker = integerTicks{}
	p.Add(plotter.NewGrid())

	xmin, xmax := float64(sum.Rows[0].Depth), float64(sum.Rows[len(sum.Rows)-1].Depth)
	if xmax == xmin {
		xmin, xmax = xmin-1, xmax+1
	}
	ymin, ymax := s.floor/2, s.ymax*2

	band := "confidence band of R − 1"
	if o.confidence > 0 {
		band = strconv.FormatFloat(100*o.confidence, 'g', 4, 64) + "% " + band
	}
	for i, ring := range s.bands {
		poly, err := plotter.NewPolygon(log10XYs(ring))
		if err != nil {
			return nil, err
		}
		poly.Color = colourBand
		poly.LineStyle.Width = 0
		p.Add(poly)
		if i == 0 {
			fig.key(band, poly)
		}
	}
	if len(s.exact) > 0 {
		l, err := plotter.NewLine(log10XYs(s.exact))
		if err != nil {
			return nil, err
		}
		l.Color, l.Width = colourExact, vg.Points(1.5)
		p.Add(l)
		fig.key("exact E[Z]/Z_H − 1", l)
	}
	if len(s.line) > 0 {
		l, err := plotter.NewLine(log10XYs(s.line))
		if err != nil {
			return nil, err
		}
		l.Color, l.Width = colourMean, vg.Points(1)
		p.Add(l)
		var thumbs []plot.Thumbnailer
		thumbs = append(thumbs, l)
		if len(s.mean) > 0 {
			sc, err := plotter.NewScatter(log10XYs(s.mean))
			if err != nil {
				return nil, err
			}
			sc.GlyphStyle = draw.GlyphStyle{Color: colourMean, Radius: vg.Points(2.5), Shape: draw.CircleGlyph{}}
			p.Add(sc)
			thumbs = append(thumbs, sc)
		}
		fig.key("Monte Carlo estimate of R − 1", thumbs...)
	}
	if len(s.clipped) > 0 {
		sc, err := plotter.NewScatter(log10XYs(s.clipped))
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle = draw.GlyphStyle{Color: colourFloor, Radius: vg.Points(3), Shape: draw.RingGlyph{}}
		p.Add(sc)
		fig.key("estimate ≤ "+formatFloor(s.floor)+" (at or below the Haar value)", sc)
	}

	epsLine, err := plotter.NewLine(log10XYs(plotter.XYs{{X: xmin, Y: eps}, {X: xmax, Y: eps}}))
	if err != nil {
		return nil, err
	}
	epsLine.Color, epsLine.Width = colourEps, vg.Points(1.2)
	epsLine.Dashes = []vg.Length{vg.Points(6), vg.Points(3)}
	p.Add(epsLine)
	rule := "the upper bound of R ≤ 1 + ε"
	if len(s.bands) == 0 && len(s.line) == 0 {
		rule = "R ≤ 1 + ε" // the exact curve alone
	}
	fig.key("ε = "+strconv.FormatFloat(eps, 'g', 4, 64)+": a depth is ready when "+rule, epsLine)

	if sum.Found {
		d := float64(sum.Depth)
		v, err := plotter.NewLine(log10XYs(plotter.XYs{{X: d, Y: ymin}, {X: d, Y: ymax}}))
		if err != nil {
			return nil, err
		}
		v.Color, v.Width = colourDepth, vg.Points(1.6)
		v.Dashes = []vg.Length{vg.Points(5), vg.Points(2)}
		p.Add(v)
		fig.key("recommended depth "+strconv.Itoa(sum.Depth), v)
		lab, err := plotter.NewLabels(plotter.XYLabels{
			XYs:    plotter.XYs{{X: d, Y: math.Log10(ymax)}},
			Labels: []string{"depth " + strconv.Itoa(sum.Depth)},
		})
		if err != nil {
			return nil, err
		}
		lab.TextStyle[0].Color = colourDepth
		lab.TextStyle[0].XAlign = text.XLeft
		lab.TextStyle[0].YAlign = text.YTop
		lab.Offset = vg.Point{X: vg.Points(3), Y: vg.Points(-3)}
		p.Add(lab)
	} else {
		fig.key("no depth shown reaches 1 + ε: scan deeper or run more instances")
	}
	if s.anyClipped {
		fig.key("log axis: values ≤ " + formatFloor(s.floor) + ", R − 1 ≤ 0 included, drawn at " + formatFloor(s.floor))
	}
	p.X.Min, p.X.Max = xmin, xmax
	p.Y.Min, p.Y.Max = math.Log10(ymin), math.Log10(ymax)
	return fig, nil
}

// formatFloor writes a power of ten briefly: 0.001, 1e-05.
func formatFloor(v float64) string { return strconv.FormatFloat(v, 'g', 3, 64) }
