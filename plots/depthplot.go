package plots

import (
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Option adjusts a DepthPlot.
type Option func(*depthOptions)

type depthOptions struct {
	title      string
	depthUnit  string
	confidence float64
	rule       string
}

// WithRule states, for the legend, when a depth is spread, such as "R's
// interval lies within 1 ± ε and the PT distance is near Haar's". The
// default is "the upper bound of R ≤ 1 + ε" ("R ≤ 1 + ε" for an exact curve
// alone).
func WithRule(rule string) Option { return func(o *depthOptions) { o.rule = rule } }

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

// DepthSeries is what a depth plot shows: per depth, the Monte Carlo
// estimate of R = mean(Z)/Z_H with its confidence interval, and the exact
// ratio E[Z]/Z_H, either of which may be absent. It holds plain slices, so
// that any source (a scan, an exact computation, a table read back) can
// fill it.
type DepthSeries struct {
	// Qubits is the number of qubits, for the default title.
	Qubits int
	// Depths are the depths in ascending order, one per point.
	Depths []int
	// Ratio is the estimate of R at each depth and [Lower, Upper] its
	// confidence interval. Ratio nil means no estimate; Lower and Upper nil
	// mean no band. A NaN ratio leaves the point out; an infinite or NaN
	// bound (a single instance) leaves the band out at that depth.
	Ratio, Lower, Upper []float64
	// Exact is E[Z]/Z_H at each depth, or nil. A NaN entry is left out.
	Exact []float64
	// ExactError is the error estimate of each Exact value (an MPS
	// truncation error, an extrapolation's uncertainty), or nil. The plot
	// shades Exact ± ExactError when it is visible at the plot's scale: some
	// depth has ExactError ≥ ExactErrorVisible·(Exact − 1).
	ExactError []float64
	// Depth is the recommended (anti-concentration) depth, drawn as a
	// vertical line when Found is true.
	Depth int
	Found bool
}

// check panics unless s has depths and every slice that is not nil has one
// entry per depth.
func (s *DepthSeries) check() {
	if s == nil || len(s.Depths) == 0 {
		panic("plots: DepthPlot needs a series with at least one depth")
	}
	for _, c := range []struct {
		name   string
		values []float64
	}{{"Ratio", s.Ratio}, {"Lower", s.Lower}, {"Upper", s.Upper}, {"Exact", s.Exact}, {"ExactError", s.ExactError}} {
		if c.values != nil && len(c.values) != len(s.Depths) {
			panic(fmt.Sprintf("plots: DepthPlot got %d %s values for %d depths", len(c.values), c.name, len(s.Depths)))
		}
	}
	if (s.Lower == nil) != (s.Upper == nil) {
		panic("plots: DepthPlot needs both Lower and Upper, or neither")
	}
	if s.ExactError != nil && s.Exact == nil {
		panic("plots: DepthPlot got ExactError without Exact")
	}
}

// ExactErrorVisible is the smallest ExactError/(Exact − 1) that DepthPlot
// shades: 5% of R − 1 is 0.02 of a decade on the log axis, about a pixel at
// the default size, below which a band would not show.
const ExactErrorVisible = 0.05

// DepthPlot draws s to w in the given format: R − 1 against depth on a
// logarithmic axis, where R = mean(Z)/Z_H is the collision probability in
// units of its Haar value Z_H = 2/(D+1): the estimate with its confidence
// band [Lower − 1, Upper − 1], a horizontal line at eps (a depth is
// anti-concentrated when Upper ≤ 1 + eps), a vertical line at the
// recommended depth s.Depth when s.Found, and the exact curve Exact − 1
// when there is one. A logarithmic axis has no room for values ≤ 0, which
// the estimate and the lower bound reach near the Haar value: such values
// are drawn at a floor below eps (a power of ten at most eps/10), and the
// legend says so. A series with an exact curve and no estimate plots the
// exact curve alone.
//
// DepthPlot panics if s has no depths, if a slice of s that is not nil
// differs in length from s.Depths, if only one of Lower and Upper is set,
// if eps is not positive and finite, or if format is not PNG or SVG.
func DepthPlot(w io.Writer, format Format, s *DepthSeries, eps float64, opts ...Option) error {
	s.check()
	checkEps(eps)
	fig, err := depthFigure(s, eps, opts)
	if err != nil {
		return fmt.Errorf("plots: plotting: %w", err)
	}
	return fig.write(w, format)
}

// SaveDepthPlot writes the DepthPlot of s to path, in the format its
// extension names (.png or .svg; any other gives a *FormatError), atomically
// (see the package comment). It panics as DepthPlot does.
func SaveDepthPlot(path string, s *DepthSeries, eps float64, opts ...Option) error {
	s.check()
	checkEps(eps)
	return save(path, func() (*figure, error) { return depthFigure(s, eps, opts) })
}

func checkEps(eps float64) {
	if !(eps > 0) || math.IsInf(eps, 1) {
		panic("plots: DepthPlot needs a positive, finite eps")
	}
}

// depthFigure applies the options and lays out the plot of s.
func depthFigure(s *DepthSeries, eps float64, opts []Option) (*figure, error) {
	o := depthOptions{depthUnit: "layers"}
	for _, opt := range opts {
		opt(&o)
	}
	if o.title == "" {
		o.title = fmt.Sprintf("Distance from the Haar collision probability, n = %d qubits", s.Qubits)
	}
	return depthPlot(newDepthPoints(s, eps), s, eps, o)
}

// depthPoints is what a DepthPlot draws, in data coordinates, every y value
// already raised to the floor.
type depthPoints struct {
	floor   float64
	mean    plotter.XYs   // R − 1 above the floor
	line    plotter.XYs   // every finite R − 1, joined by the estimate's line
	clipped plotter.XYs   // R − 1 at or below the floor, drawn at the floor
	bands   []plotter.XYs // closed outlines of the band over runs of finite intervals
	exact   plotter.XYs
	// exactBand is the closed outline of Exact ± ExactError over every
	// depth with a finite exact value, nil when the error is not visible.
	exactBand plotter.XYs
	// anyClipped is true when some drawn value (estimate, bound or exact)
	// lies at or below the floor.
	anyClipped bool
	ymax       float64
}

// newDepthPoints computes the points of a DepthPlot.
func newDepthPoints(ds *DepthSeries, eps float64) *depthPoints {
	at := func(v []float64, i int) float64 {
		if v == nil {
			return math.NaN()
		}
		return v[i]
	}
	var values []float64
	for i := range ds.Depths {
		values = append(values, at(ds.Ratio, i)-1, at(ds.Lower, i)-1, at(ds.Upper, i)-1, at(ds.Exact, i)-1)
	}
	visible := false
	for i := range ds.Depths {
		if e := at(ds.ExactError, i); finite(e) && e > 0 && e >= ExactErrorVisible*math.Abs(at(ds.Exact, i)-1) {
			visible = true
		}
	}
	s := &depthPoints{floor: logFloor(values, eps), ymax: eps}
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
	for i, d := range ds.Depths {
		x := float64(d)
		ratio, lo, hi, exact := at(ds.Ratio, i), at(ds.Lower, i), at(ds.Upper, i), at(ds.Exact, i)
		if finite(ratio) {
			y := ratio - 1
			pt := plotter.XY{X: x, Y: clip(y)}
			s.line = append(s.line, pt)
			if y <= s.floor {
				s.clipped = append(s.clipped, pt)
			} else {
				s.mean = append(s.mean, pt)
			}
		}
		if finite(lo) && finite(hi) {
			upper = append(upper, plotter.XY{X: x, Y: clip(hi - 1)})
			lower = append(lower, plotter.XY{X: x, Y: clip(lo - 1)})
		} else {
			closeBand()
		}
		if finite(exact) {
			s.exact = append(s.exact, plotter.XY{X: x, Y: clip(exact - 1)})
		}
	}
	closeBand()
	if visible {
		ymax := s.ymax
		var hi, lo plotter.XYs
		for i, d := range ds.Depths {
			exact, e := at(ds.Exact, i), at(ds.ExactError, i)
			if !finite(exact) || !finite(e) {
				continue
			}
			// The band does not widen the axis: it is cut at the plot's
			// top (2·ymax, see depthPlot) and drawn at the floor below it.
			hi = append(hi, plotter.XY{X: float64(d), Y: math.Min(clip(exact-1+e), 2*ymax)})
			lo = append(lo, plotter.XY{X: float64(d), Y: math.Min(clip(exact-1-e), 2*ymax)})
		}
		s.ymax = ymax
		slices.Reverse(lo)
		s.exactBand = append(hi, lo...)
	}
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
func depthPlot(s *depthPoints, ds *DepthSeries, eps float64, o depthOptions) (*figure, error) {
	fig := newRatioFigure(o.title, o.depthUnit)
	p := fig.plot

	xmin, xmax := float64(ds.Depths[0]), float64(ds.Depths[len(ds.Depths)-1])
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
	if len(s.exactBand) > 2 {
		poly, err := plotter.NewPolygon(log10XYs(s.exactBand))
		if err != nil {
			return nil, err
		}
		poly.Color = colourExactBand
		poly.LineStyle.Width = 0
		p.Add(poly)
		fig.key("error estimate of the exact curve (± error)", poly)
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

	epsLine, err := addEpsLine(p, xmin, xmax, eps)
	if err != nil {
		return nil, err
	}
	rule := "the upper bound of R ≤ 1 + ε"
	if len(s.bands) == 0 && len(s.line) == 0 {
		rule = "R ≤ 1 + ε" // the exact curve alone
	}
	if o.rule != "" {
		rule = o.rule
	}
	fig.key("ε = "+strconv.FormatFloat(eps, 'g', 4, 64)+": a depth is spread when "+rule, epsLine)

	if ds.Found {
		d := float64(ds.Depth)
		v, err := plotter.NewLine(log10XYs(plotter.XYs{{X: d, Y: ymin}, {X: d, Y: ymax}}))
		if err != nil {
			return nil, err
		}
		v.Color, v.Width = colourDepth, vg.Points(1.6)
		v.Dashes = []vg.Length{vg.Points(5), vg.Points(2)}
		p.Add(v)
		fig.key("recommended depth "+strconv.Itoa(ds.Depth), v)
		lab, err := plotter.NewLabels(plotter.XYLabels{
			XYs:    plotter.XYs{{X: d, Y: math.Log10(ymax)}},
			Labels: []string{"depth " + strconv.Itoa(ds.Depth)},
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

// newRatioFigure returns a figure with the axes of an R − 1 against depth
// plot: integer depths, a log-scale R − 1 and a grid.
func newRatioFigure(title, depthUnit string) *figure {
	fig := newFigure()
	p := fig.plot
	p.Title.Text = title
	p.X.Label.Text = "depth (" + depthUnit + ")"
	p.Y.Label.Text = "R − 1,  R = E[Z] / Z_H  (dimensionless, log scale)"
	p.Y.Tick.Marker = log10Ticks{}
	p.X.Tick.Marker = integerTicks{}
	p.Add(plotter.NewGrid())
	return fig
}

// addEpsLine draws the dashed threshold line R − 1 = eps across [xmin, xmax]
// and returns it for the legend.
func addEpsLine(p *plot.Plot, xmin, xmax, eps float64) (*plotter.Line, error) {
	l, err := plotter.NewLine(log10XYs(plotter.XYs{{X: xmin, Y: eps}, {X: xmax, Y: eps}}))
	if err != nil {
		return nil, err
	}
	l.Color, l.Width = colourEps, vg.Points(1.2)
	l.Dashes = []vg.Length{vg.Points(6), vg.Points(3)}
	p.Add(l)
	return l, nil
}
