package chart

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Format is a chart file format.
type Format int

const (
	// PNG is a raster image at [PNGDPI] dots per inch.
	PNG Format = iota + 1
	// SVG is a vector image, with its fonts embedded so that it looks the
	// same on every machine.
	SVG
)

// PNGDPI is the resolution of PNG charts: a 12-inch-wide chart is 1152
// pixels wide.
const PNGDPI = 96

// String returns "png" or "svg".
func (f Format) String() string {
	switch f {
	case PNG:
		return "png"
	case SVG:
		return "svg"
	}
	return fmt.Sprintf("Format(%d)", int(f))
}

// ErrFormat reports a chart file name whose extension is not .png or .svg.
var ErrFormat = errors.New("chart: unknown chart format")

// FormatOf returns the format named by the extension of path, .png or .svg
// in any case; any other extension, or none, is an error wrapping
// [ErrFormat] that names the file and what is wanted.
func FormatOf(path string) (Format, error) {
	ext := filepath.Ext(path)
	switch strings.ToLower(ext) {
	case ".png":
		return PNG, nil
	case ".svg":
		return SVG, nil
	case "":
		return 0, fmt.Errorf("%w: %s has no extension; want a file ending in .png or .svg", ErrFormat, path)
	}
	return 0, fmt.Errorf("%w %q in %s; want .png or .svg", ErrFormat, ext, path)
}

// Figure is one chart file: one or more panels, side by side or one above
// the other.
type Figure struct {
	// Width and Height are the figure's size (1 inch = 72 vg.Points).
	Width, Height vg.Length
	// Panels are drawn left to right, or top to bottom when Stacked.
	Panels  []Panel
	Stacked bool
}

// Panel is one plot of a [Figure].
type Panel struct {
	Plot *plot.Plot
	// Share is the panel's part of the figure's width (height when
	// stacked); 0 for an equal part. Stacked panels of equal share have
	// their data areas aligned.
	Share float64
	// EqualScale makes one unit as long on the x axis as on the y axis (the
	// sky, where a circle must stay a circle): the shorter axis's range is
	// widened about its centre to fill the data area.
	EqualScale bool
	// LegendBeside draws the plot's legend in a column to the right of the
	// plot instead of over the data, Aside, when not empty, below it, and
	// below that AsideDrawing, when set, in the rest of the column.
	LegendBeside bool
	Aside        string
	AsideDrawing Drawing
}

// Drawing is something drawn into a given area of a figure, outside any
// plot's axes.
type Drawing interface {
	// DrawIn draws into the area of c.
	DrawIn(c draw.Canvas)
}

// Encode renders the figure in format f.
func (fg *Figure) Encode(f Format) ([]byte, error) {
	if fg == nil || len(fg.Panels) == 0 {
		return nil, errors.New("chart: nothing to draw")
	}
	if !(fg.Width > 0 && fg.Height > 0) {
		return nil, fmt.Errorf("chart: size %v × %v: want a positive width and height", fg.Width, fg.Height)
	}
	var cw vg.CanvasWriterTo
	switch f {
	case PNG:
		cw = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(fg.Width, fg.Height), vgimg.UseDPI(PNGDPI))}
	case SVG:
		cw = vgsvg.NewWith(vgsvg.UseWH(fg.Width, fg.Height), vgsvg.EmbedFonts(true))
	default:
		return nil, fmt.Errorf("%w: %v", ErrFormat, f)
	}
	fg.draw(draw.New(cw))
	var buf bytes.Buffer
	if _, err := cw.WriteTo(&buf); err != nil {
		return nil, fmt.Errorf("chart: encoding %v: %v", f, err)
	}
	return buf.Bytes(), nil
}

// draw lays the panels out on c and draws them.
func (fg *Figure) draw(c draw.Canvas) {
	n := len(fg.Panels)
	equal := true
	for _, p := range fg.Panels {
		equal = equal && p.Share == 0
	}
	if fg.Stacked && equal && n > 1 {
		// Aligned data areas, so that the panels' time axes line up.
		plots := make([][]*plot.Plot, n)
		for i, p := range fg.Panels {
			plots[i] = []*plot.Plot{p.Plot}
		}
		tiles := draw.Tiles{Rows: n, Cols: 1, PadTop: 4, PadBottom: 4, PadLeft: 4, PadRight: 8, PadY: 10}
		cs := plot.Align(plots, tiles, c)
		for i, p := range fg.Panels {
			drawPanel(p, cs[i][0])
		}
		return
	}
	var total float64
	for _, p := range fg.Panels {
		total += share(p)
	}
	const pad = vg.Length(6)
	var at float64
	for _, p := range fg.Panels {
		lo, hi := at/total, (at+share(p))/total
		at += share(p)
		sub := c
		if fg.Stacked {
			h := c.Max.Y - c.Min.Y
			sub.Max.Y = c.Max.Y - vg.Length(lo)*h - pad
			sub.Min.Y = c.Max.Y - vg.Length(hi)*h + pad
			sub.Min.X += pad
			sub.Max.X -= pad
		} else {
			w := c.Max.X - c.Min.X
			sub.Min.X = c.Min.X + vg.Length(lo)*w + pad
			sub.Max.X = c.Min.X + vg.Length(hi)*w - pad
			sub.Min.Y += pad
			sub.Max.Y -= pad
		}
		drawPanel(p, sub)
	}
}

func share(p Panel) float64 {
	if p.Share > 0 {
		return p.Share
	}
	return 1
}

// drawPanel draws one panel into c.
func drawPanel(pn Panel, c draw.Canvas) {
	p := pn.Plot
	if !pn.LegendBeside {
		if pn.EqualScale {
			equalScale(p, c)
		}
		p.Draw(c)
		return
	}
	lg := p.Legend
	title := p.Title.Text
	p.Legend = plot.NewLegend() // no entries: nothing over the data
	p.Title.Text = ""
	defer func() { p.Legend, p.Title.Text = lg, title }()
	if title != "" {
		// The title centred over the plot and its legend together.
		st := p.Title.TextStyle
		c.FillText(st, vg.Point{X: c.Center().X, Y: c.Max.Y + st.FontExtents().Descent}, title)
		c.Max.Y -= st.Rectangle(title).Size().Y + p.Title.Padding
	}
	aside := textStyle(noteSize, black)
	aside.XAlign, aside.YAlign = draw.XLeft, draw.YTop
	w := lg.Rectangle(c).Size().X
	if pn.Aside != "" {
		w = max(w, aside.Rectangle(pn.Aside).Size().X)
	}
	// A tenth more than the text needs: an SVG viewer that lacks the
	// embedded font's support draws it in a wider one.
	w = w*1.1 + 14
	side := c
	side.Min.X = c.Max.X - w + 8
	c.Max.X -= w
	side.Max.Y = p.DataCanvas(c).Max.Y // level with the top of the data area
	if pn.EqualScale {
		equalScale(p, c)
	}
	p.Draw(c)
	beside := lg
	beside.Left, beside.Top, beside.XOffs, beside.YOffs = true, true, 0, 0
	beside.Draw(side)
	y := side.Max.Y - beside.Rectangle(side).Size().Y - 14
	if pn.Aside != "" {
		side.FillText(aside, vg.Point{X: side.Min.X, Y: y}, pn.Aside)
		y -= aside.Rectangle(pn.Aside).Size().Y + 24
	}
	if pn.AsideDrawing != nil {
		rest := side
		rest.Max.Y = y
		rest.Min.Y = p.DataCanvas(c).Min.Y
		if rest.Max.Y-rest.Min.Y > 40 {
			pn.AsideDrawing.DrawIn(rest)
		}
	}
}

// equalScale widens the narrower range of p's axes about its centre so that
// one data unit has the same length on both axes of the data area p gets in
// c. The data area depends on the tick labels, which depend on the ranges, so
// this is repeated until it settles (three rounds are plenty).
func equalScale(p *plot.Plot, c draw.Canvas) {
	cx, hx := (p.X.Min+p.X.Max)/2, (p.X.Max-p.X.Min)/2
	cy, hy := (p.Y.Min+p.Y.Max)/2, (p.Y.Max-p.Y.Min)/2
	if !(hx > 0 && hy > 0) {
		return
	}
	for range 3 {
		dc := p.DataCanvas(c)
		w, h := float64(dc.Max.X-dc.Min.X), float64(dc.Max.Y-dc.Min.Y)
		if !(w > 0 && h > 0) {
			return
		}
		ax, ay := hx, hy
		if hx/hy < w/h {
			ax = hy * w / h
		} else {
			ay = hx * h / w
		}
		p.X.Min, p.X.Max = cx-ax, cx+ax
		p.Y.Min, p.Y.Max = cy-ay, cy+ay
	}
}

// Save renders the figure in the format named by the extension of path
// ([FormatOf]) and writes it to path through a temporary file in the same
// directory, renamed into place: on any error no file is left at path (an
// existing file there is left as it was) and no temporary file remains.
func Save(path string, fg *Figure) error {
	f, err := FormatOf(path)
	if err != nil {
		return err
	}
	data, err := fg.Encode(f)
	if err != nil {
		return err
	}
	return writeFileAtomically(path, data)
}

// writeFileAtomically writes data to path through a temporary file in the
// same directory, renamed into place.
func writeFileAtomically(path string, data []byte) (err error) {
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		return fmt.Errorf("chart: cannot write %s: %v", path, unwrapPath(err))
	}
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	if _, err = tmp.Write(data); err != nil {
		return fmt.Errorf("chart: writing %s: %v", path, unwrapPath(err))
	}
	if err = tmp.Chmod(0o644); err != nil {
		return fmt.Errorf("chart: writing %s: %v", path, unwrapPath(err))
	}
	if err = tmp.Close(); err != nil {
		return fmt.Errorf("chart: writing %s: %v", path, unwrapPath(err))
	}
	if err = os.Rename(tmp.Name(), path); err != nil {
		return fmt.Errorf("chart: cannot write %s: %v", path, unwrapPath(err))
	}
	return nil
}

// unwrapPath drops the temporary file's name from an *os.PathError, leaving
// the reason ("permission denied", "no such file or directory").
func unwrapPath(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}
