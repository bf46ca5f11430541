package plots

import (
	"image/color"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
)

// Colours of the plots: distinguishable in colour and, by line style, in grey.
var (
	colourMean  = color.RGBA{R: 31, G: 84, B: 160, A: 255}
	colourBand  = color.RGBA{R: 176, G: 203, B: 236, A: 255}
	colourExact = color.RGBA{A: 255}
	// colourExactBand is a light grey, so that the exact curve's error band
	// stays apart from the blue confidence band of an estimate.
	colourExactBand = color.RGBA{R: 205, G: 205, B: 205, A: 255}
	colourEps       = color.RGBA{R: 200, G: 30, B: 30, A: 255}
	colourDepth     = color.RGBA{R: 20, G: 130, B: 60, A: 255}
	colourFloor     = color.RGBA{R: 110, G: 110, B: 110, A: 255}
	colourHist      = color.RGBA{R: 190, G: 190, B: 190, A: 255}
	colourFinite    = color.RGBA{R: 200, G: 30, B: 30, A: 255}
)

// integerTicks marks depth axes: labels at whole multiples of a step of 1,
// 2 or 5 times a power of ten, at most 12 of them, with unlabelled ticks at
// the whole numbers between when there are at most 100.
type integerTicks struct{}

// Ticks returns the ticks for [min, max].
func (integerTicks) Ticks(min, max float64) []plot.Tick {
	lo, hi := math.Ceil(min), math.Floor(max)
	if hi < lo {
		return nil
	}
	step := 1.0
	for k := 1; (hi-lo)/step > 11; k++ {
		step = []float64{1, 2, 5}[k%3] * math.Pow(10, float64(k/3))
	}
	var ticks []plot.Tick
	if hi-lo <= 100 {
		for v := lo; v <= hi; v++ {
			t := plot.Tick{Value: v}
			if math.Mod(v, step) == 0 {
				t.Label = strconv.FormatFloat(v, 'f', 0, 64)
			}
			ticks = append(ticks, t)
		}
		return ticks
	}
	for v := math.Ceil(lo/step) * step; v <= hi; v += step {
		ticks = append(ticks, plot.Tick{Value: v, Label: strconv.FormatFloat(v, 'f', 0, 64)})
	}
	return ticks
}

// The logarithmic axes are drawn as linear axes of log10 of the value, with
// tick labels showing the values themselves: gonum's LogScale places a
// vertical axis label by the arithmetic mid-point of the range, which on a
// log axis sits near the top and makes the plot shrink its data area.

// log10XYs returns xys with every Y replaced by log10(Y).
func log10XYs(xys plotter.XYs) plotter.XYs {
	out := make(plotter.XYs, len(xys))
	for i, p := range xys {
		out[i] = plotter.XY{X: p.X, Y: math.Log10(p.Y)}
	}
	return out
}

// log10Ticks marks an axis of log10 values at the powers of ten, labelled
// with the value (0.001, 1, 100), and at 2 and 5 times them, labelled when
// the axis spans at most two decades, with minor ticks at the other
// multiples.
type log10Ticks struct{}

// Ticks returns the ticks for log10 values in [min, max].
func (log10Ticks) Ticks(min, max float64) []plot.Tick {
	fine := max-min <= 2
	var ticks []plot.Tick
	for e := math.Floor(min); e <= math.Ceil(max); e++ {
		for m := 1; m < 10; m++ {
			v := e + math.Log10(float64(m))
			if v < min-1e-9 || v > max+1e-9 {
				continue
			}
			t := plot.Tick{Value: v}
			if m == 1 || fine && (m == 2 || m == 5) {
				t.Label = strconv.FormatFloat(float64(m)*math.Pow(10, e), 'g', 3, 64)
			}
			ticks = append(ticks, t)
		}
	}
	return ticks
}

// plainTicks are gonum's default ticks with labels written as briefly as
// possible (2.5, not 2.50).
type plainTicks struct{}

// Ticks returns the default ticks for [min, max] with brief labels.
func (plainTicks) Ticks(min, max float64) []plot.Tick {
	ticks := plot.DefaultTicks{}.Ticks(min, max)
	for i := range ticks {
		if ticks[i].Label != "" {
			ticks[i].Label = strconv.FormatFloat(ticks[i].Value, 'g', -1, 64)
		}
	}
	return ticks
}
