package plots

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"mixdepth/tables"
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

// FormatError reports a plot file name whose extension names no plot format.
type FormatError struct {
	Path string
}

func (e *FormatError) Error() string {
	return fmt.Sprintf("report: unknown plot format %q: use a name ending in .png or .svg", e.Path)
}

// formatOf returns "png" or "svg" for the extension of path, ignoring case.
func formatOf(path string) (string, error) {
	switch ext := strings.ToLower(filepath.Ext(path)); ext {
	case ".png", ".svg":
		return ext[1:], nil
	}
	return "", &FormatError{Path: path}
}

// CheckPath returns an error unless path names a plot format (.png or .svg)
// and its directory exists, so that a caller can refuse a bad destination
// before computing what to plot. The error is a *FormatError for a bad
// extension.
func CheckPath(path string) error {
	if _, err := formatOf(path); err != nil {
		return err
	}
	dir := filepath.Dir(path)
	info, err := os.Stat(dir)
	switch {
	case err != nil:
		return fmt.Errorf("report: cannot write %q: directory %q: %w", path, dir, pathCause(err))
	case !info.IsDir():
		return fmt.Errorf("report: cannot write %q: %q is not a directory", path, dir)
	}
	if info, err := os.Stat(path); err == nil && info.IsDir() {
		return fmt.Errorf("report: cannot write %q: it is a directory", path)
	}
	return nil
}

// pathCause returns the cause inside a *os.PathError, or err itself.
func pathCause(err error) error {
	if pe, ok := err.(*os.PathError); ok {
		return pe.Err
	}
	return err
}

// save draws f and writes it to path atomically: into a temporary file in
// the same directory, synced, then renamed onto path.
func (f *figure) save(path string) error {
	if err := CheckPath(path); err != nil {
		return err
	}
	format, _ := formatOf(path)
	wt, err := f.draw(format)
	if err != nil {
		return fmt.Errorf("report: drawing %q: %w", path, err)
	}
	err = tables.WriteFileAtomic(path, func(w io.Writer) error {
		_, err := wt.WriteTo(w)
		return err
	})
	if err != nil {
		return fmt.Errorf("report: cannot write %q: %w", path, pathCause(err))
	}
	return nil
}
