package plots

import (
	"fmt"
	"io"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"mixdepth/internal/atomicfile"
)

// The size of the data part of every plot, about 945×586 pixels in PNG at
// the vgimg default of 96 dpi; the legend adds its height below.
const (
	plotWidth  = 25 * vg.Centimeter
	plotHeight = 15.5 * vg.Centimeter
)

// legendFont is the size of the legend text.
const legendFont = 10

// figure is a plot with its legend drawn below it, in two columns, so that
// the legend never hides data.
type figure struct {
	plot *plot.Plot
	keys []legendKey
}

type legendKey struct {
	text   string
	thumbs []plot.Thumbnailer
}

func newFigure() *figure { return &figure{plot: plot.New()} }

// key adds a legend entry; with no thumbnails it is a line of text.
func (f *figure) key(text string, thumbs ...plot.Thumbnailer) {
	f.keys = append(f.keys, legendKey{text, thumbs})
}

// legends returns the two legend columns, the first holding the first half
// of the entries (rounded up).
func (f *figure) legends() [2]plot.Legend {
	var cols [2]plot.Legend
	half := (len(f.keys) + 1) / 2
	for i := range cols {
		cols[i] = plot.NewLegend()
		cols[i].Top, cols[i].Left = true, true
		cols[i].TextStyle.Font.Size = vg.Points(legendFont)
		cols[i].Padding = vg.Points(2)
	}
	for i, k := range f.keys {
		cols[i/half].Add(k.text, k.thumbs...)
	}
	return cols
}

// draw renders the figure in the given format ("png" or "svg").
func (f *figure) draw(format string) (io.WriterTo, error) {
	cols := f.legends()
	margin := vg.Points(12)
	var legendHeight vg.Length
	for _, l := range cols {
		legendHeight = max(legendHeight, l.Rectangle(draw.Canvas{}).Size().Y)
	}
	if legendHeight > 0 {
		legendHeight += 2 * margin
	}
	c, err := draw.NewFormattedCanvas(plotWidth, plotHeight+legendHeight, format)
	if err != nil {
		return nil, err
	}
	dc := draw.New(c)
	if f.plot.BackgroundColor != nil {
		// The plot paints only its own part; the legend strip needs the
		// same background.
		dc.SetColor(f.plot.BackgroundColor)
		dc.Fill(dc.Rectangle.Path())
	}
	edge := vg.Points(8) // keeps the title and the last tick label off the border
	f.plot.Title.Padding = vg.Points(6)
	f.plot.Draw(draw.Crop(dc, edge, -edge, legendHeight, -edge))
	if legendHeight > 0 {
		strip := draw.Crop(dc, 0, 0, 0, -(plotHeight + margin))
		strip = draw.Crop(strip, margin, 0, margin, 0)
		half := (strip.Max.X - strip.Min.X) / 2
		cols[0].Draw(draw.Crop(strip, 0, -half, 0, 0))
		cols[1].Draw(draw.Crop(strip, half, 0, 0, 0))
	}
	return c, nil
}

// Format is a picture format of the plots.
type Format string

// The formats of the plots.
const (
	PNG Format = "png" // raster, 96 dpi
	SVG Format = "svg" // vector
)

// FormatError reports a plot file name whose extension names no plot format.
type FormatError struct {
	Path string
}

func (e *FormatError) Error() string {
	return fmt.Sprintf("plots: unknown plot format %q: use a name ending in .png or .svg", e.Path)
}

// FormatOf returns the Format named by the extension of path (".png" or
// ".svg", in any case), or a *FormatError.
func FormatOf(path string) (Format, error) {
	switch ext := strings.ToLower(filepath.Ext(path)); ext {
	case ".png", ".svg":
		return Format(ext[1:]), nil
	}
	return "", &FormatError{Path: path}
}

// CheckPath returns an error unless path names a plot format (.png or .svg)
// and its directory exists, so that a caller can refuse a bad destination
// before computing what to plot. The error is a *FormatError for a bad
// extension.
func CheckPath(path string) error {
	if _, err := FormatOf(path); err != nil {
		return err
	}
	if err := atomicfile.CheckWritable(path); err != nil {
		return fmt.Errorf("plots: cannot write %q: %w", path, err)
	}
	return nil
}

// write draws f in format to w. It panics if format is not PNG or SVG.
func (f *figure) write(w io.Writer, format Format) error {
	if format != PNG && format != SVG {
		panic(fmt.Sprintf("plots: unknown Format %q, want PNG or SVG", format))
	}
	wt, err := f.draw(string(format))
	if err != nil {
		return fmt.Errorf("plots: drawing: %w", err)
	}
	if _, err := wt.WriteTo(w); err != nil {
		return fmt.Errorf("plots: writing: %w", err)
	}
	return nil
}

// save writes a figure to path atomically, in the format its extension
// names: into a temporary file in the same directory, synced, then renamed
// onto path. build is called only once path has been checked; it returns
// the figure.
func save(path string, build func() (*figure, error)) error {
	format, err := FormatOf(path)
	if err != nil {
		return err
	}
	if err := CheckPath(path); err != nil {
		return err
	}
	fig, err := build()
	if err != nil {
		return fmt.Errorf("plots: plotting %q: %w", path, err)
	}
	wt, err := fig.draw(string(format))
	if err != nil {
		return fmt.Errorf("plots: drawing %q: %w", path, err)
	}
	err = atomicfile.Write(path, func(w io.Writer) error {
		_, err := wt.WriteTo(w)
		return err
	})
	if err != nil {
		return fmt.Errorf("plots: cannot write %q: %w", path, err)
	}
	return nil
}
