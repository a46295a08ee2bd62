package chart

import (
	"errors"
	"fmt"
	"math"

	"arcfit/astro"
	"arcfit/fit"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// ResidualPoint is one observation's residual as the residual chart draws
// it.
type ResidualPoint struct {
	UTC astro.JD
	// DRAArcsec and DDecArcsec are observed minus computed in RA·cos δ and
	// Dec, arcseconds; SigmaRAArcsec and SigmaDecArcsec the observation's
	// stated 1-σ, 0 when not known (no error bar).
	DRAArcsec, DDecArcsec         float64
	SigmaRAArcsec, SigmaDecArcsec float64
	// Flagged marks an outlier the fit rejected; Used is false for a point
	// that took no part in the fit (flagged, or a duplicate).
	Flagged, Used bool
}

// SolutionResiduals returns the residuals of a sky-plane fit, in track
// order, with the observations' σ (the plane's σ, equal to the sky's to
// first order in the distance from the tangent point).
func SolutionResiduals(sol *fit.Solution) []ResidualPoint {
	if sol == nil {
		return nil
	}
	as := astro.Arcsecond.Radians()
	out := make([]ResidualPoint, len(sol.Residuals))
	for i, r := range sol.Residuals {
		out[i] = ResidualPoint{UTC: r.UTC, DRAArcsec: r.DRAArcsec, DDecArcsec: r.DDecArcsec, Flagged: r.Flagged, Used: r.Used}
		if sol.Track != nil && i < len(sol.Track.Points) {
			pt := sol.Track.Points[i]
			out[i].SigmaRAArcsec, out[i].SigmaDecArcsec = pt.SigmaXi/as, pt.SigmaEta/as
		}
	}
	return out
}

// OrbitResiduals returns the residuals of a two-body orbit fit (without
// error bars: the orbit's residuals carry no σ).
func OrbitResiduals(f *fit.OrbitFit) []ResidualPoint {
	if f == nil || f.Solution == nil {
		return nil
	}
	out := make([]ResidualPoint, len(f.Solution.Residuals))
	for i, r := range f.Solution.Residuals {
		out[i] = ResidualPoint{UTC: r.UTC, DRAArcsec: r.DEArcsec, DDecArcsec: r.DNArcsec, Flagged: r.Flagged, Used: r.Used}
	}
	return out
}

// ComparisonResiduals returns the name and the residuals of the
// comparison's chosen model: its two-body orbit when that was chosen (with
// the σ of the same observations in the sky-plane track), else its
// sky-plane solution.
func ComparisonResiduals(c *fit.Comparison) (model string, pts []ResidualPoint) {
	if c == nil {
		return "", nil
	}
	if c.Orbit != nil {
		pts := OrbitResiduals(c.Orbit)
		if c.Solution != nil {
			withSigmas(pts, SolutionResiduals(c.Solution))
		}
		return c.Chosen, pts
	}
	if c.Solution == nil {
		return c.Chosen, nil
	}
	name := c.Solution.Model.Name()
	if len(c.Solution.Model.Knots) > 0 {
		name = c.Solution.Model.String()
	}
	return name, SolutionResiduals(c.Solution)
}

// withSigmas gives the points of pts the σ of the points of from at the
// same instant (to the millisecond), taken in order when several share one.
func withSigmas(pts, from []ResidualPoint) {
	key := func(t astro.JD) int64 { return int64(math.Round(axisSeconds(t) * 1000)) }
	byTime := map[int64][]ResidualPoint{}
	for _, f := range from {
		byTime[key(f.UTC)] = append(byTime[key(f.UTC)], f)
	}
	for i := range pts {
		k := key(pts[i].UTC)
		if fs := byTime[k]; len(fs) > 0 {
			pts[i].SigmaRAArcsec, pts[i].SigmaDecArcsec = fs[0].SigmaRAArcsec, fs[0].SigmaDecArcsec
			byTime[k] = fs[1:]
		}
	}
}

// ResidualsFigure returns the residual chart of a fit of the model named:
// observed minus computed against UTC, RA·cos δ in the upper panel and Dec
// in the lower, arcseconds, with the observations' 1-σ error bars; points
// the fit used are filled dots, flagged outliers open diamonds in another
// colour, and duplicates the reader dropped grey rings. The time axis is
// broken between nights (each night's stretch in hours, the time between
// them written in the break) and shared by both panels; the residual scale
// is the same on both, symmetric, and set by the points used (and the
// others within four times their reach), so that an outlier far off is drawn
// at the edge with its value written beside it.
//
// Errors: no residual with finite values.
func ResidualsFigure(model string, pts []ResidualPoint) (*Figure, error) {
	var times []astro.JD
	lim := 0.0
	for _, r := range pts {
		if !finite(r.DRAArcsec) || !finite(r.DDecArcsec) || !finite(r.UTC.Float()) {
			continue
		}
		times = append(times, r.UTC)
		if r.Used && !r.Flagged {
			lim = math.Max(lim, math.Max(math.Abs(r.DRAArcsec)+r.SigmaRAArcsec, math.Abs(r.DDecArcsec)+r.SigmaDecArcsec))
		}
	}
	if len(times) == 0 {
		return nil, errors.New("chart: no residuals to draw")
	}
	// Points not used join the scale when it need not grow more than
	// fourfold for them (all of them when nothing was used).
	usedLim := lim
	for _, r := range pts {
		if finite(r.DRAArcsec) && finite(r.DDecArcsec) && !(r.Used && !r.Flagged) {
			if v := math.Max(math.Abs(r.DRAArcsec), math.Abs(r.DDecArcsec)); usedLim == 0 || v <= 4*usedLim {
				lim = math.Max(lim, v)
			}
		}
	}
	lim = niceStep(lim * 1.25)
	if !(lim > 0) {
		lim = 1
	}
	bt := newBrokenTime(times)
	x0, x1 := bt.span()
	var rms [2]float64
	var used int
	for _, r := range pts {
		if r.Used && !r.Flagged {
			rms[0] += r.DRAArcsec * r.DRAArcsec
			rms[1] += r.DDecArcsec * r.DDecArcsec
			used++
		}
	}
	var panels []Panel
	for k, name := range []string{"RA·cos δ", "Dec"} {
		title := ""
		if k == 0 {
			title = fmt.Sprintf("residuals of %s, observed − computed", model)
		}
		p := newPlot(title, "", fmt.Sprintf("Δ%s (arcsec)", name))
		if k == 1 {
			p.X.Label.Text = "UTC (the axis is broken between nights)"
		}
		p.X.Tick.Marker = bt
		p.Y.Tick.Marker = symmetricTicks{}
		p.Legend.Top, p.Legend.Left = true, false
		p.Add(rule{At: 0, Style: lineStyle(midGrey, 1)})
		at, days := bt.breaks()
		for i, x := range at {
			p.Add(rule{At: x, Vertical: true, Style: lineStyle(lightGrey, 1.2, 3, 3)})
			st := textStyle(noteSize, darkGrey)
			st.XAlign, st.YAlign = draw.XCenter, draw.YBottom
			p.Add(note{X: x, Y: -lim * 0.98, DY: 2, Text: gapLabel(days[i]), Style: st, Box: true})
		}
		val := func(r ResidualPoint) (float64, float64) {
			if k == 0 {
				return r.DRAArcsec, r.SigmaRAArcsec
			}
			return r.DDecArcsec, r.SigmaDecArcsec
		}
		type group struct {
			name  string
			glyph draw.GlyphStyle
			keep  func(ResidualPoint) bool
		}
		groups := []group{
			{"used in the fit", draw.GlyphStyle{Color: modelColour(0), Radius: 3.2, Shape: draw.CircleGlyph{}},
				func(r ResidualPoint) bool { return r.Used && !r.Flagged }},
			{"flagged outlier, not used", draw.GlyphStyle{Color: flagColour, Radius: 5.5, Shape: diamondGlyph{}},
				func(r ResidualPoint) bool { return r.Flagged }},
			{"duplicate, not used", draw.GlyphStyle{Color: midGrey, Radius: 4, Shape: draw.RingGlyph{}},
				func(r ResidualPoint) bool { return !r.Used && !r.Flagged }},
		}
		for _, g := range groups {
			var xys plotter.XYs
			var errs plotter.YErrors
			for _, r := range pts {
				v, s := val(r)
				x := bt.x(r.UTC)
				if !g.keep(r) || !finite(v) || !finite(x) {
					continue
				}
				if math.Abs(v) > lim { // off the scale: at the edge, with its value
					edge := math.Copysign(lim, v)
					st := textStyle(noteSize, g.glyph.Color)
					st.XAlign, st.YAlign = draw.XLeft, draw.YCenter
					p.Add(note{X: x, Y: edge * 0.999, DX: 8, Text: fmt.Sprintf("%+.1f″ (off scale)", v), Style: st, Box: true})
					v, s = edge, 0
				}
				xys = append(xys, plotter.XY{X: x, Y: v})
				if !(s > 0) || !finite(s) {
					s = 0
				}
				errs = append(errs, struct{ Low, High float64 }{s, s})
			}
			if len(xys) == 0 {
				continue
			}
			eb, err := plotter.NewYErrorBars(errorPoints{xys, errs})
			if err != nil {
				return nil, err
			}
			eb.LineStyle = lineStyle(g.glyph.Color, 1)
			eb.CapWidth = 5
			sc, err := plotter.NewScatter(xys)
			if err != nil {
				return nil, err
			}
			sc.GlyphStyle = g.glyph
			p.Add(eb, sc)
			if k == 0 {
				p.Legend.Add(g.name, sc)
			}
		}
		if used > 0 {
			p.Add(cornerNote{Text: fmt.Sprintf("rms %.2f″ (%d used)", math.Sqrt(rms[k]/float64(used)), used),
				Style: textStyle(noteSize, black), Left: true, Top: true})
		}
		p.X.Min, p.X.Max = x0, x1
		p.Y.Min, p.Y.Max = -lim, lim
		panels = append(panels, Panel{Plot: p})
	}
	return &Figure{Width: 11 * vg.Inch, Height: 7 * vg.Inch, Panels: panels, Stacked: true}, nil
}

// errorPoints joins points and their vertical error bars for
// plotter.NewYErrorBars.
type errorPoints struct {
	plotter.XYs
	plotter.YErrors
}

// diamondGlyph is an open diamond, the flagged outliers' marker.
type diamondGlyph struct{}

// DrawGlyph implements draw.GlyphDrawer.
func (diamondGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	r := sty.Radius
	c.StrokeLines(lineStyle(sty.Color, 2), []vg.Point{
		{X: pt.X, Y: pt.Y + r}, {X: pt.X + r, Y: pt.Y}, {X: pt.X, Y: pt.Y - r}, {X: pt.X - r, Y: pt.Y}, {X: pt.X, Y: pt.Y + r},
	})
}
