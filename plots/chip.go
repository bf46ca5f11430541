package plots

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/plotutil"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// ChipDrawing is a chip to draw: qubits at coordinates, couplers coloured by
// the layer of the layered schedule that holds them, and out-of-service
// elements drawn faded.
type ChipDrawing struct {
	Title    string
	Qubits   []ChipQubit
	Couplers []ChipCoupler
	// Layers is the number of layers; coupler layers lie in 0..Layers−1.
	Layers int
	// LayerSizes, when not nil, holds the number of couplers of each layer,
	// shown in the legend.
	LayerSizes []int
}

// ChipQubit is one qubit of a ChipDrawing.
type ChipQubit struct {
	X, Y  float64
	Label string
	// Faded marks a qubit out of service.
	Faded bool
}

// ChipCoupler is one coupler of a ChipDrawing between qubits A and B
// (indices into Qubits), in layer Layer, or faded when Layer is −1 (out of
// service).
type ChipCoupler struct {
	A, B, Layer int
}

// maxChipLabels is the largest chip whose qubits are labelled in the drawing;
// beyond it the labels would overlap into a blot.
const maxChipLabels = 120

// check panics on a drawing that refers to qubits or layers it does not have.
func (c *ChipDrawing) check() {
	if len(c.Qubits) == 0 {
		panic("plots: ChipDrawing has no qubits")
	}
	for _, e := range c.Couplers {
		if e.A < 0 || e.B < 0 || e.A >= len(c.Qubits) || e.B >= len(c.Qubits) || e.Layer < -1 || e.Layer >= c.Layers {
			panic(fmt.Sprintf("plots: ChipDrawing coupler %+v outside its %d qubits and %d layers", e, len(c.Qubits), c.Layers))
		}
	}
	if c.LayerSizes != nil && len(c.LayerSizes) != c.Layers {
		panic("plots: ChipDrawing.LayerSizes does not have one entry per layer")
	}
}

// ChipPlot draws c in format to w: couplers as lines coloured by layer
// (faded grey and dashed when out of service), qubits as dots with their
// labels (for up to 120 qubits), at equal scale on both axes. It panics if a
// coupler refers to a qubit or layer c does not have, or if format is not
// PNG or SVG.
func ChipPlot(w io.Writer, format Format, c *ChipDrawing) error {
	c.check()
	fig, err := chipFigure(c)
	if err != nil {
		return fmt.Errorf("plots: plotting: %w", err)
	}
	return fig.write(w, format)
}

// SaveChipPlot writes the ChipPlot of c to path, in the format its extension
// names (.png or .svg; any other gives a *FormatError), atomically. It panics
// as ChipPlot does.
func SaveChipPlot(path string, c *ChipDrawing) error {
	c.check()
	return save(path, func() (*figure, error) { return chipFigure(c) })
}

var colourFaded = color.RGBA{R: 190, G: 190, B: 190, A: 255}

func chipFigure(c *ChipDrawing) (*figure, error) {
	fig := newFigure()
	p := fig.plot
	p.Title.Text = c.Title
	p.HideAxes()
	lineStyle := func(layer int) draw.LineStyle {
		if layer < 0 {
			return draw.LineStyle{Color: colourFaded, Width: vg.Points(1.2), Dashes: []vg.Length{vg.Points(3), vg.Points(3)}}
		}
		return draw.LineStyle{Color: plotutil.Color(layer), Width: vg.Points(2.5)}
	}
	// Faded couplers first, so that working ones are drawn over them.
	for _, faded := range []bool{true, false} {
		for _, e := range c.Couplers {
			if (e.Layer < 0) != faded {
				continue
			}
			a, b := c.Qubits[e.A], c.Qubits[e.B]
			l, err := plotter.NewLine(plotter.XYs{{X: a.X, Y: a.Y}, {X: b.X, Y: b.Y}})
			if err != nil {
				return nil, err
			}
			l.LineStyle = lineStyle(e.Layer)
			p.Add(l)
		}
	}
	var live, dead plotter.XYs
	for _, q := range c.Qubits {
		if q.Faded {
			dead = append(dead, plotter.XY{X: q.X, Y: q.Y})
		} else {
			live = append(live, plotter.XY{X: q.X, Y: q.Y})
		}
	}
	radius := vg.Points(5)
	if len(c.Qubits) > maxChipLabels {
		radius = vg.Points(2.5)
	}
	for _, set := range []struct {
		xy   plotter.XYs
		fill color.Color
	}{{dead, colourFaded}, {live, color.Black}} {
		if len(set.xy) == 0 {
			continue
		}
		s, err := plotter.NewScatter(set.xy)
		if err != nil {
			return nil, err
		}
		s.GlyphStyle = draw.GlyphStyle{Color: set.fill, Radius: radius, Shape: draw.CircleGlyph{}}
		p.Add(s)
	}
	if len(c.Qubits) <= maxChipLabels {
		xys := make(plotter.XYs, len(c.Qubits))
		text := make([]string, len(c.Qubits))
		for i, q := range c.Qubits {
			xys[i] = plotter.XY{X: q.X, Y: q.Y}
			text[i] = q.Label
		}
		labels, err := plotter.NewLabels(plotter.XYLabels{XYs: xys, Labels: text})
		if err != nil {
			return nil, err
		}
		for i := range labels.TextStyle {
			labels.TextStyle[i].Font.Size = vg.Points(8)
			if c.Qubits[i].Faded {
				labels.TextStyle[i].Color = colourFaded
			}
		}
		labels.Offset = vg.Point{X: vg.Points(5), Y: vg.Points(4)}
		p.Add(labels)
	}
	equalScale(p, c.Qubits)
	for l := 0; l < c.Layers; l++ {
		text := "layer " + strconv.Itoa(l)
		if c.LayerSizes != nil {
			unit := " couplers)"
			if c.LayerSizes[l] == 1 {
				unit = " coupler)"
			}
			text += " (" + strconv.Itoa(c.LayerSizes[l]) + unit
		}
		thumb, _ := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 0}})
		thumb.LineStyle = lineStyle(l)
		fig.key(text, thumb)
	}
	for _, e := range c.Couplers {
		if e.Layer < 0 {
			thumb, _ := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 0}})
			thumb.LineStyle = lineStyle(-1)
			fig.key("out of service (dropped)", thumb)
			break
		}
	}
	return fig, nil
}

// equalScale sets the axis ranges so that one unit has the same length on
// both axes of the plot's data area, with a margin around the qubits.
func equalScale(p *plot.Plot, qs []ChipQubit) {
	x0, x1, y0, y1 := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for _, q := range qs {
		x0, x1 = min(x0, q.X), max(x1, q.X)
		y0, y1 = min(y0, q.Y), max(y1, q.Y)
	}
	w, h := math.Max(x1-x0, 1e-9), math.Max(y1-y0, 1e-9)
	aspect := float64(plotWidth / plotHeight)
	if w/h > aspect {
		h = w / aspect
	} else {
		w = h * aspect
	}
	cx, cy := (x0+x1)/2, (y0+y1)/2
	const pad = 0.58 // half the range plus an 8% margin on each side
	p.X.Min, p.X.Max = cx-pad*w, cx+pad*w
	p.Y.Min, p.Y.Max = cy-pad*h, cy+pad*h
}
