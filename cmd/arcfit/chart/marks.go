package chart

import (
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// The small plotters the charts share: shaded spans, reference lines, text
// at a data point, the scale bar and the compass of the sky chart. None
// widens the axes (they are not DataRangers).

// span shades the data area between x = From and x = To (any order) over
// its whole height; with Fill nil it draws nothing. As a legend thumbnail it
// is a filled square.
type span struct {
	From, To float64
	Fill     color.Color
}

// Plot implements plot.Plotter.
func (s span) Plot(c draw.Canvas, p *plot.Plot) {
	if s.Fill == nil {
		return
	}
	trX, _ := p.Transforms(&c)
	x0, x1 := trX(s.From), trX(s.To)
	if x0 > x1 {
		x0, x1 = x1, x0
	}
	x0, x1 = max(x0, c.Min.X), min(x1, c.Max.X)
	if x1 <= x0 {
		return
	}
	c.FillPolygon(s.Fill, []vg.Point{{X: x0, Y: c.Min.Y}, {X: x1, Y: c.Min.Y}, {X: x1, Y: c.Max.Y}, {X: x0, Y: c.Max.Y}})
}

// Thumbnail implements plot.Thumbnailer.
func (s span) Thumbnail(c *draw.Canvas) {
	if s.Fill == nil {
		return
	}
	c.FillPolygon(s.Fill, []vg.Point{c.Min, {X: c.Max.X, Y: c.Min.Y}, c.Max, {X: c.Min.X, Y: c.Max.Y}})
	c.StrokeLines(lineStyle(midGrey, 0.5), []vg.Point{c.Min, {X: c.Max.X, Y: c.Min.Y}, c.Max, {X: c.Min.X, Y: c.Max.Y}, c.Min})
}

// rule is a horizontal (Vertical false) or vertical line across the whole
// data area at At, with an optional label at one end, on a white box: the
// right end of a horizontal rule, just above it (the left end with
// LabelAtStart); the top of a vertical one, beside it (the bottom with
// LabelAtStart); LabelDY moves the label down by that many points.
type rule struct {
	At           float64
	Vertical     bool
	Style        draw.LineStyle
	Label        string
	Text         text.Style
	LabelAtStart bool
	LabelDY      vg.Length
}

// Plot implements plot.Plotter.
func (r rule) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	if r.Vertical {
		x := trX(r.At)
		if x < c.Min.X || x > c.Max.X {
			return
		}
		c.StrokeLine2(r.Style, x, c.Min.Y, x, c.Max.Y)
		if r.Label != "" {
			st := r.Text
			st.XAlign, st.YAlign = draw.XLeft, draw.YTop
			pt := vg.Point{X: x + 4, Y: c.Max.Y - 4 - r.LabelDY}
			if r.LabelAtStart {
				st.YAlign, pt.Y = draw.YBottom, c.Min.Y+4-r.LabelDY
			}
			drawText(c, st, pt, r.Label, true)
		}
		return
	}
	y := trY(r.At)
	if y < c.Min.Y || y > c.Max.Y {
		return
	}
	c.StrokeLine2(r.Style, c.Min.X, y, c.Max.X, y)
	if r.Label != "" {
		st := r.Text
		st.XAlign, st.YAlign = draw.XRight, draw.YBottom
		pt := vg.Point{X: c.Max.X - 4, Y: y + 3 - r.LabelDY}
		if r.LabelAtStart {
			st.XAlign, pt.X = draw.XLeft, c.Min.X+4
		}
		drawText(c, st, pt, r.Label, true)
	}
}

// Thumbnail implements plot.Thumbnailer.
func (r rule) Thumbnail(c *draw.Canvas) {
	y := (c.Min.Y + c.Max.Y) / 2
	c.StrokeLine2(r.Style, c.Min.X, y, c.Max.X, y)
}

// note is text at the data point (X, Y), aligned by XAlign and YAlign and
// moved by (DX, DY) points; with Box, on a white box that hides what is
// under it. A point outside the data area draws nothing.
type note struct {
	X, Y   float64
	DX, DY vg.Length
	Text   string
	Style  text.Style
	Box    bool
}

// Plot implements plot.Plotter.
func (n note) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	pt := vg.Point{X: trX(n.X), Y: trY(n.Y)}
	if !c.Contains(pt) {
		return
	}
	pt.X += n.DX
	pt.Y += n.DY
	drawText(c, n.Style, pt, n.Text, n.Box)
}

// drawText draws s at pt in style st, on a white box when box is set.
func drawText(c draw.Canvas, st text.Style, pt vg.Point, s string, box bool) {
	if box {
		r := st.Rectangle(s)
		const m = 2
		bg := []vg.Point{
			{X: pt.X + r.Min.X - m, Y: pt.Y + r.Min.Y - m}, {X: pt.X + r.Max.X + m, Y: pt.Y + r.Min.Y - m},
			{X: pt.X + r.Max.X + m, Y: pt.Y + r.Max.Y + m}, {X: pt.X + r.Min.X - m, Y: pt.Y + r.Max.Y + m},
		}
		c.FillPolygon(paper, bg)
	}
	c.FillText(st, pt, s)
}

// cornerNote is text in a corner of the data area, on a white box: Left and
// Top choose the corner.
type cornerNote struct {
	Text      string
	Style     text.Style
	Left, Top bool
}

// Plot implements plot.Plotter.
func (n cornerNote) Plot(c draw.Canvas, _ *plot.Plot) {
	const m = 6
	st := n.Style
	pt := vg.Point{X: c.Max.X - m, Y: c.Min.Y + m}
	st.XAlign, st.YAlign = draw.XRight, draw.YBottom
	if n.Left {
		pt.X, st.XAlign = c.Min.X+m, draw.XLeft
	}
	if n.Top {
		pt.Y, st.YAlign = c.Max.Y-m, draw.YTop
	}
	drawText(c, st, pt, n.Text, true)
}

// scaleBar is a bar of Length data units along the x axis, drawn in the
// lower right corner of the data area with its label above it. It assumes
// the x axis has the same data unit per point everywhere (a linear scale,
// inverted or not).
type scaleBar struct {
	Length float64
	Label  string
	Style  text.Style
}

// Plot implements plot.Plotter.
func (s scaleBar) Plot(c draw.Canvas, p *plot.Plot) {
	trX, _ := p.Transforms(&c)
	w := vg.Length(math.Abs(float64(trX(s.Length) - trX(0))))
	if w <= 0 || w > c.Max.X-c.Min.X {
		return
	}
	const m = 12
	x1 := c.Max.X - m
	x0 := x1 - w
	y := c.Min.Y + m
	th := s.Style.Rectangle(s.Label)
	bg := []vg.Point{{X: x0 - 4, Y: y - 6}, {X: x1 + 4, Y: y - 6}, {X: x1 + 4, Y: y + 8 + th.Max.Y}, {X: x0 - 4, Y: y + 8 + th.Max.Y}}
	c.FillPolygon(paper, bg)
	ls := lineStyle(black, 2.5)
	c.StrokeLine2(ls, x0, y, x1, y)
	c.StrokeLine2(lineStyle(black, 1.2), x0, y-4, x0, y+4)
	c.StrokeLine2(lineStyle(black, 1.2), x1, y-4, x1, y+4)
	st := s.Style
	st.XAlign, st.YAlign = draw.XCenter, draw.YBottom
	c.FillText(st, vg.Point{X: (x0 + x1) / 2, Y: y + 5}, s.Label)
}

// compass draws the directions north (up) and east (left) in the upper
// left corner of the data area: the sky as seen looking up.
type compass struct {
	Style text.Style
}

// Plot implements plot.Plotter.
func (k compass) Plot(c draw.Canvas, p *plot.Plot) {
	const arm, m = 30, 16
	o := vg.Point{X: c.Min.X + m + arm, Y: c.Max.Y - m - arm}
	// The arrows point where the axes increase or decrease: north is +y;
	// east is +x on a normal axis, −x on the inverted one east-left uses.
	trX, trY := p.Transforms(&c)
	ex := 1.0
	if trX(1) < trX(0) {
		ex = -1
	}
	ny := 1.0
	if trY(1) < trY(0) {
		ny = -1
	}
	ls := lineStyle(black, 1.5)
	bg := []vg.Point{{X: o.X - arm - 14, Y: o.Y - 8}, {X: o.X + 8, Y: o.Y - 8}, {X: o.X + 8, Y: o.Y + arm + 14}, {X: o.X - arm - 14, Y: o.Y + arm + 14}}
	if ex > 0 {
		for i := range bg {
			bg[i].X = 2*o.X - bg[i].X
		}
	}
	c.FillPolygon(paper, bg)
	n := vg.Point{X: o.X, Y: o.Y + vg.Length(ny)*arm}
	e := vg.Point{X: o.X + vg.Length(ex)*arm, Y: o.Y}
	c.StrokeLine2(ls, o.X, o.Y, n.X, n.Y)
	c.StrokeLine2(ls, o.X, o.Y, e.X, e.Y)
	arrowHead(c, ls, o, n)
	arrowHead(c, ls, o, e)
	st := k.Style
	st.XAlign, st.YAlign = draw.XCenter, draw.YBottom
	c.FillText(st, vg.Point{X: n.X, Y: n.Y + 1}, "N")
	st.XAlign, st.YAlign = draw.XRight, draw.YCenter
	if ex > 0 {
		st.XAlign = draw.XLeft
	}
	c.FillText(st, vg.Point{X: e.X + vg.Length(ex)*3, Y: e.Y}, "E")
}

// arrowHead draws a head at b of the arrow from a to b.
func arrowHead(c draw.Canvas, ls draw.LineStyle, a, b vg.Point) {
	dx, dy := float64(b.X-a.X), float64(b.Y-a.Y)
	l := math.Hypot(dx, dy)
	if l == 0 {
		return
	}
	ux, uy := dx/l, dy/l
	const h, w = 7, 3.5
	p1 := vg.Point{X: b.X - vg.Length(h*ux-w*uy), Y: b.Y - vg.Length(h*uy+w*ux)}
	p2 := vg.Point{X: b.X - vg.Length(h*ux+w*uy), Y: b.Y - vg.Length(h*uy-w*ux)}
	c.FillPolygon(ls.Color, []vg.Point{b, p1, p2})
}

// arrow draws an arrowhead at (ToX, ToY) pointing away from (FromX, FromY),
// in data coordinates: the direction of the track's motion.
type arrow struct {
	FromX, FromY, ToX, ToY float64
	Style                  draw.LineStyle
}

// Plot implements plot.Plotter.
func (a arrow) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	to := vg.Point{X: trX(a.ToX), Y: trY(a.ToY)}
	from := vg.Point{X: trX(a.FromX), Y: trY(a.FromY)}
	if !c.Contains(to) {
		return
	}
	big := a.Style
	big.Width *= 2.5
	arrowHead(c, big, from, to)
}
