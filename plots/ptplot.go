package plots

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"strconv"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"

	"mixdepth/stats"
)

// curvePoints is the number of points on each density curve.
const curvePoints = 400

// PorterThomasPlot draws to w, in the given format, the histogram of the
// rescaled output probabilities x = D·p at the given depth, pooled over the
// instances (probs[i] holds the D output probabilities of instance i),
// normalised as a probability density, on a logarithmic density axis with
//
//	the Porter–Thomas density   e^(−x)                        (D → ∞)
//	the finite-D Haar density   (D−1)/D · (1 − x/D)^(D−2),  0 ≤ x ≤ D
//
// the second being Beta(1, D−1) of p rescaled to x = D·p (Porter & Thomas
// 1956; Dalzell, Hunter-Jones, Brandão 2022, PRX Quantum 3, 010333). On this
// axis e^(−x) is a straight line, so a deficit of large probabilities (a
// circuit too shallow or too structured) shows as a bend. An empty title
// means "Output probabilities at depth d (D = …)". PorterThomasPlot panics
// if probs is empty, if the slices differ in length, if D < 2, or if format
// is not PNG or SVG.
func PorterThomasPlot(w io.Writer, format Format, probs [][]float64, depth int, title string) error {
	checkProbs(probs)
	fig, err := ptFigure(probs, depth, title)
	if err != nil {
		return fmt.Errorf("plots: plotting: %w", err)
	}
	return fig.write(w, format)
}

// SavePorterThomasPlot writes the PorterThomasPlot of probs to path, in the
// format its extension names (.png or .svg; any other gives a
// *FormatError), atomically (see the package comment). It panics as
// PorterThomasPlot does.
func SavePorterThomasPlot(path string, probs [][]float64, depth int, title string) error {
	checkProbs(probs)
	return save(path, func() (*figure, error) { return ptFigure(probs, depth, title) })
}

// checkProbs panics unless probs holds at least one instance of D ≥ 2
// probabilities and every instance has D.
func checkProbs(probs [][]float64) {
	if len(probs) == 0 {
		panic("plots: PorterThomasPlot needs at least one instance")
	}
	dim := len(probs[0])
	if dim < 2 {
		panic(fmt.Sprintf("plots: PorterThomasPlot needs D ≥ 2 probabilities per instance, got %d", dim))
	}
	for i, p := range probs {
		if len(p) != dim {
			panic(fmt.Sprintf("plots: PorterThomasPlot: instance %d has %d probabilities, instance 0 has %d", i, len(p), dim))
		}
	}
}

// ptFigure bins probs and lays out the plot.
func ptFigure(probs [][]float64, depth int, title string) (*figure, error) {
	dim := len(probs[0])
	if title == "" {
		title = fmt.Sprintf("Output probabilities at depth %d (D = %d)", depth, dim)
	}
	bins := densityBins(probs, binCount(len(probs)*dim))
	return ptPlot(bins, len(probs), dim, title)
}

// binCount is the number of histogram bins for n values: the Rice rule
// ⌈2·n^(1/3)⌉ (common practice), kept between 10 and 100 so that a small
// sample still shows a shape and a large one stays readable.
func binCount(n int) int {
	k := int(math.Ceil(2 * math.Cbrt(float64(n))))
	return min(max(k, 10), 100)
}

// densityBins returns k equal bins over [0, max D·p] holding the histogram of
// the rescaled probabilities D·p of all instances, each weight the fraction
// of values in the bin divided by the bin width, so that the histogram
// integrates to 1 like the densities it is compared with. A value equal to
// the maximum goes into the last bin. It panics if k < 1.
func densityBins(probs [][]float64, k int) []plotter.HistogramBin {
	if k < 1 {
		panic("plots: need at least one histogram bin")
	}
	dim := float64(len(probs[0]))
	hi := 0.0
	n := 0
	for _, p := range probs {
		for _, v := range p {
			hi = math.Max(hi, dim*v)
		}
		n += len(p)
	}
	if !(hi > 0) {
		hi = 1 // every probability zero cannot happen for a normalised state; keep the bins valid
	}
	width := hi / float64(k)
	bins := make([]plotter.HistogramBin, k)
	for i := range bins {
		bins[i].Min, bins[i].Max = float64(i)*width, float64(i+1)*width
	}
	bins[k-1].Max = hi
	for _, p := range probs {
		for _, v := range p {
			j := min(int(dim*v/width), k-1)
			bins[max(j, 0)].Weight++
		}
	}
	for i := range bins {
		bins[i].Weight /= float64(n) * width
	}
	return bins
}

// finiteDensity is the density of x = D·p for the Haar law Beta(1, D−1) of p.
func finiteDensity(dim float64) func(float64) float64 {
	h := stats.HaarProb{Dim: dim}
	return func(x float64) float64 { return h.Prob(x/dim) / dim }
}

// ptPlot lays out the Porter–Thomas plot.
func ptPlot(bins []plotter.HistogramBin, instances, dim int, title string) (*figure, error) {
	fig := newFigure()
	p := fig.plot
	p.Title.Text = title
	p.X.Label.Text = "x = D·p  (dimensionless; D = 2^n = " + strconv.Itoa(dim) + " outcomes)"
	p.Y.Label.Text = "probability density of x  (dimensionless, log scale)"
	p.Y.Tick.Marker = log10Ticks{}
	p.X.Tick.Marker = plainTicks{}
	p.Add(plotter.NewGrid())

	xmax := bins[len(bins)-1].Max
	ylow, yhigh := math.Inf(1), 1.0
	for _, b := range bins {
		if b.Weight > 0 {
			ylow = math.Min(ylow, b.Weight)
			yhigh = math.Max(yhigh, b.Weight)
		}
	}
	// Down to a third of the rarest bin (one value in it, usually), so that
	// every bar shows; the curves stop at the bottom of the axis.
	ymin := ylow / 3
	ymax := yhigh * 1.5

	// The bars as polygons from the bottom of the axis, in log10 units
	// (see log10Ticks); empty bins have no bar.
	var bars []plotter.XYer
	for _, b := range bins {
		if b.Weight > 0 {
			lo, hi := math.Log10(ymin), math.Log10(b.Weight)
			bars = append(bars, plotter.XYs{{X: b.Min, Y: lo}, {X: b.Max, Y: lo}, {X: b.Max, Y: hi}, {X: b.Min, Y: hi}})
		}
	}
	h, err := plotter.NewPolygon(bars...)
	if err != nil {
		return nil, err
	}
	h.Color = colourHist
	p.Add(h)
	fig.key(fmt.Sprintf("simulated: %d instance(s) × %d outcomes", instances, dim), h)

	pt := stats.PorterThomas{}
	curves := []struct {
		name   string
		f      func(float64) float64
		dashes []vg.Length
		colour color.Color
	}{
		{"Porter–Thomas e^(−x)", pt.Prob, nil, colourMean},
		{"Haar at D = " + strconv.Itoa(dim) + ": (D−1)/D · (1 − x/D)^(D−2)", finiteDensity(float64(dim)), []vg.Length{vg.Points(5), vg.Points(3)}, colourFinite},
	}
	for _, c := range curves {
		xys := make(plotter.XYs, 0, curvePoints+1)
		for j := 0; j <= curvePoints; j++ {
			x := xmax * float64(j) / curvePoints
			y := c.f(x)
			if !(y >= ymin) {
				// Below the axis: stop the curve there rather than
				// drawing to log(0).
				if len(xys) > 0 {
					xys = append(xys, plotter.XY{X: x, Y: ymin})
				}
				break
			}
			xys = append(xys, plotter.XY{X: x, Y: y})
		}
		l, err := plotter.NewLine(log10XYs(xys))
		if err != nil {
			return nil, err
		}
		l.Color, l.Width, l.Dashes = c.colour, vg.Points(1.6), c.dashes
		p.Add(l)
		fig.key(c.name, l)
	}
	p.X.Min, p.X.Max = 0, xmax
	p.Y.Min, p.Y.Max = math.Log10(ymin), math.Log10(ymax)
	return fig, nil
}
