package chart

import (
	"fmt"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// inset draws the search region magnified in a square at the top of the
// area it is given (the sky chart's side column, below the notes): the
// ellipses, the cloud and the track within HalfWidth arcseconds of the
// predicted place, north up and east left, with its label above it and a
// scale bar in arcseconds. Coordinates are arcseconds, x = RA·cos δ (east
// positive), y = Dec.
type inset struct {
	HalfWidth  float64
	Rings      []plotter.XYs
	RingStyles []draw.LineStyle
	Cloud      plotter.XYs
	CloudStyle draw.GlyphStyle
	Track      plotter.XYs
	TrackStyle draw.LineStyle
	Label      string
	Style      text.Style
}

// DrawIn implements Drawing.
func (in inset) DrawIn(c draw.Canvas) {
	if !(in.HalfWidth > 0) {
		return
	}
	lh := in.Style.Rectangle(in.Label).Size().Y + 4
	side := min(c.Max.X-c.Min.X-4, c.Max.Y-c.Min.Y-lh, 200)
	if side < 40 {
		return
	}
	box := vg.Rectangle{Min: vg.Point{X: c.Min.X + 2, Y: c.Max.Y - lh - side}}
	box.Max = vg.Point{X: box.Min.X + side, Y: box.Min.Y + side}
	frame := []vg.Point{box.Min, {X: box.Max.X, Y: box.Min.Y}, box.Max, {X: box.Min.X, Y: box.Max.Y}}
	c.FillPolygon(paper, frame)
	ic := draw.Canvas{Canvas: c.Canvas, Rectangle: box}
	mid := vg.Point{X: (box.Min.X + box.Max.X) / 2, Y: (box.Min.Y + box.Max.Y) / 2}
	k := float64(side) / 2 / in.HalfWidth // points per arcsecond
	at := func(q plotter.XY) vg.Point {
		// East (+x) to the left.
		return vg.Point{X: mid.X - vg.Length(q.X*k), Y: mid.Y + vg.Length(q.Y*k)}
	}
	line := func(xys plotter.XYs, closed bool) []vg.Point {
		pts := make([]vg.Point, 0, len(xys)+1)
		for _, q := range xys {
			pts = append(pts, at(q))
		}
		if closed && len(pts) > 0 {
			pts = append(pts, pts[0])
		}
		return pts
	}
	for _, q := range in.Cloud {
		if pt := at(q); ic.Contains(pt) {
			ic.DrawGlyph(in.CloudStyle, pt)
		}
	}
	if len(in.Track) > 1 {
		ic.StrokeLines(in.TrackStyle, ic.ClipLinesXY(line(in.Track, false))...)
	}
	for i, r := range in.Rings {
		ic.StrokeLines(in.RingStyles[i], ic.ClipLinesXY(line(r, true))...)
	}
	ic.DrawGlyph(draw.GlyphStyle{Color: black, Radius: 3.5, Shape: draw.CrossGlyph{}}, mid)
	c.StrokeLines(lineStyle(black, 1), append(frame, frame[0]))

	st := in.Style
	st.XAlign, st.YAlign = draw.XLeft, draw.YBottom
	c.FillText(st, vg.Point{X: box.Min.X, Y: box.Max.Y + 3}, in.Label)
	// Scale bar in arcseconds, a quarter of the inset or less.
	bar := niceFloor(in.HalfWidth / 2)
	w := vg.Length(bar * k)
	x1, y := box.Max.X-8, box.Min.Y+8
	c.StrokeLine2(lineStyle(black, 2), x1-w, y, x1, y)
	st.XAlign, st.YAlign = draw.XCenter, draw.YBottom
	c.FillText(st, vg.Point{X: x1 - w/2, Y: y + 3}, fmt.Sprintf("%s″", trimFloat(bar)))
}

// niceFloor returns the largest 1-2-5 multiple of a power of ten not above
// x (x > 0).
func niceFloor(x float64) float64 {
	s := niceStep(x)
	for s > x*1.0000001 {
		switch m := s / pow10Floor(s); {
		case m > 4.9:
			s = s / 5 * 2
		case m > 1.9:
			s /= 2
		default:
			s = s / 10 * 5
		}
	}
	return s
}
