package chart

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"
	"time"

	"arcfit/astro"
	"arcfit/fit"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// SkyOptions control [SkyRegion].
type SkyOptions struct {
	// Title is the chart's title; "" gives "search region at HH:MM UTC".
	Title string
	// FOVArcmin is the side of the field-of-view box drawn about the
	// predicted position, arcminutes; 0 draws none.
	FOVArcmin float64
	// Sigma is the level the search region is quoted at in the note (the
	// ellipses are always drawn at 1, 2 and 3 σ); 0 means 3.
	Sigma float64
}

// sigmaLevels are the ellipses drawn, with their two-dimensional coverage
// 1 − exp(−k²/2) (Press et al. 2007, §15.6.5).
var sigmaLevels = []struct {
	k     float64
	label string
}{{1, "1σ (39 %)"}, {2, "2σ (86 %)"}, {3, "3σ (98.9 %)"}}

// insetBelow is the size of the 3-σ ellipse, as a fraction of the view's
// half-width, below which the region is also drawn magnified in an inset.
const insetBelow = 0.1

// ErrNoPosition reports a prediction whose place is not finite.
var ErrNoPosition = errors.New("chart: the prediction has no finite position")

// SkyRegion returns the panel of the search region about the prediction
// at: the 1-, 2- and 3-σ ellipses of its covariance, its Monte Carlo cloud
// when it has one (Prediction.Samples), the field-of-view box, and the track
// through the given predictions at other instants (labelled with their UTC
// times), on the tangent plane at the predicted place. North is up and east
// to the left, as the sky is seen looking up; the same scale on both axes,
// in arcseconds, arcminutes or degrees as the labels say, and a scale bar
// in arcminutes. Where to point, the region's size and the motion are
// written beside the legend.
//
// The view frames the 3-σ ellipse, the cloud and the field box, with a
// margin; a track that leaves it is cut at its edge. When the 3-σ ellipse is
// smaller than a tenth of the view, an inset below the notes shows it
// magnified, with its own scale bar in arcseconds. Predictions of the track that cannot be projected (90° or
// more away) are left out.
//
// Errors: a prediction without a finite place ([ErrNoPosition]).
func SkyRegion(at fit.Prediction, track []fit.Prediction, opts SkyOptions) (Panel, error) {
	if !finite(float64(at.RA)) || !finite(float64(at.Dec)) {
		return Panel{}, ErrNoPosition
	}
	sigma := opts.Sigma
	if !(sigma > 0) {
		sigma = 3
	}
	plane := astro.TangentPlane{RA0: at.RA, Dec0: at.Dec}
	as := astro.Arcsecond.Radians()

	// The extent to frame, arcseconds from the centre.
	e3 := at.Ellipse(3)
	region := e3.SemiMajorArcsec
	if !finite(region) {
		region = 0
	}
	for _, s := range at.Samples {
		if r := math.Hypot(s[0], s[1]); finite(r) && r > region {
			region = r
		}
	}
	extent := region
	if opts.FOVArcmin > 0 {
		extent = math.Max(extent, opts.FOVArcmin*60/2*math.Sqrt2)
	}
	extent = math.Max(extent*1.12, 5) // at least 5″: a point still gets a view
	unit, unitName := skyUnit(extent)

	title := opts.Title
	if title == "" {
		title = "search region at " + hhmm(at.UTC) + " UTC"
	}
	p := newPlot(title, "← east"+wideGap+"ΔRA·cos δ ("+unitName+")"+wideGap+"west →", "ΔDec ("+unitName+"), north ↑")
	p.X.Scale = plot.InvertedScale{Normalizer: plot.LinearScale{}}
	p.X.Tick.Marker = symmetricTicks{}
	p.Y.Tick.Marker = symmetricTicks{}

	// The field box.
	if f := opts.FOVArcmin; f > 0 {
		h := f * 60 / 2 / unit
		box, err := plotter.NewPolygon(plotter.XYs{{X: -h, Y: -h}, {X: h, Y: -h}, {X: h, Y: h}, {X: -h, Y: h}})
		if err != nil {
			return Panel{}, err
		}
		box.LineStyle = lineStyle(fovColour, 1.5, 6, 3)
		box.Color = nil
		p.Add(box)
		p.Legend.Add(fmt.Sprintf("%s field", arcminText(f)), box)
	}

	// The Monte Carlo cloud, arcseconds.
	var cloud plotter.XYs
	for _, s := range at.Samples {
		if finite(s[0]) && finite(s[1]) {
			cloud = append(cloud, plotter.XY{X: s[0], Y: s[1]})
		}
	}
	cloudStyle := draw.GlyphStyle{Color: cloudDot, Radius: 1.3, Shape: draw.CircleGlyph{}}
	if len(cloud) > 0 {
		sc, err := plotter.NewScatter(scaleXYs(cloud, 1/unit))
		if err != nil {
			return Panel{}, err
		}
		sc.GlyphStyle = cloudStyle
		p.Add(sc)
		p.Legend.Add(fmt.Sprintf("sampled orbits (%d)", len(cloud)), sc)
	}

	// The ellipses, 1σ solid and thick to 3σ thin and dashed; arcseconds.
	var rings []plotter.XYs
	var ringStyles []draw.LineStyle
	for i, lv := range sigmaLevels {
		e := at.Ellipse(lv.k)
		if !(e.SemiMajorArcsec > 0) || !finite(e.SemiMajorArcsec) {
			continue
		}
		ring := ellipseXYs(e)
		pg, err := plotter.NewPolygon(scaleXYs(ring, 1/unit))
		if err != nil {
			return Panel{}, err
		}
		pg.Color = nil
		pg.LineStyle = lineStyle(targetRed, vg.Length(2.2-0.6*float64(i)))
		if i > 0 {
			pg.LineStyle.Dashes = []vg.Length{vg.Length(7 - 2*i), 3}
		}
		p.Add(pg)
		p.Legend.Add(lv.label, pg)
		rings, ringStyles = append(rings, ring), append(ringStyles, pg.LineStyle)
	}

	// The track, arcseconds.
	type tp struct {
		t    astro.JD
		x, y float64
	}
	var pts []tp
	for _, q := range track {
		xi, eta, err := plane.Project(q.RA, q.Dec)
		if err != nil || q.UTC == at.UTC {
			continue
		}
		pts = append(pts, tp{q.UTC, xi / as, eta / as})
	}
	pts = append(pts, tp{at.UTC, 0, 0})
	sort.Slice(pts, func(i, j int) bool { return pts[i].t.Before(pts[j].t) })
	trackStyle := lineStyle(darkGrey, 1.2)
	var trackXYs plotter.XYs
	if len(pts) > 1 {
		trackXYs = make(plotter.XYs, len(pts))
		for i, q := range pts {
			trackXYs[i] = plotter.XY{X: q.x, Y: q.y}
		}
		ln, err := plotter.NewLine(scaleXYs(trackXYs, 1/unit))
		if err != nil {
			return Panel{}, err
		}
		ln.LineStyle = trackStyle
		dots, err := plotter.NewScatter(scaleXYs(trackXYs, 1/unit))
		if err != nil {
			return Panel{}, err
		}
		dots.GlyphStyle = draw.GlyphStyle{Color: darkGrey, Radius: 1.8, Shape: draw.CircleGlyph{}}
		p.Add(ln, dots)
		end := len(pts) - 1
		p.Add(arrow{FromX: pts[end-1].x / unit, FromY: pts[end-1].y / unit, ToX: pts[end].x / unit, ToY: pts[end].y / unit, Style: trackStyle})
		p.Legend.Add(trackLegend(track), ln, dots)
		// The first and last instants, written beyond the track's ends.
		st := textStyle(noteSize, darkGrey)
		p.Add(endLabel(pts[1].x-pts[0].x, pts[1].y-pts[0].y, pts[0].x/unit, pts[0].y/unit, hhmm(pts[0].t), st, true))
		p.Add(endLabel(pts[end].x-pts[end-1].x, pts[end].y-pts[end-1].y, pts[end].x/unit, pts[end].y/unit, hhmm(pts[end].t), st, false))
	}

	// The predicted place.
	ctr, err := plotter.NewScatter(plotter.XYs{{}})
	if err != nil {
		return Panel{}, err
	}
	ctr.GlyphStyle = draw.GlyphStyle{Color: black, Radius: 5, Shape: draw.CrossGlyph{}}
	p.Add(ctr)
	p.Legend.Add("predicted place, "+hhmm(at.UTC)+" UTC", ctr)

	var zoom Drawing
	if region > 0 && region < insetBelow*extent {
		half := region * 1.5
		zoom = inset{HalfWidth: half, Rings: rings, RingStyles: ringStyles, Cloud: cloud, CloudStyle: cloudStyle,
			Track: trackXYs, TrackStyle: trackStyle, Label: "the region, magnified", Style: textStyle(noteSize, black)}
	}
	p.Add(compass{Style: textStyle(labelSize, black)})
	bar := scaleBarArcmin(2 * extent)
	p.Add(scaleBar{Length: bar * 60 / unit, Label: scaleLabel(bar), Style: textStyle(noteSize, black)})

	r := extent / unit
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = -r, r, -r, r
	return Panel{Plot: p, EqualScale: true, LegendBeside: true, Aside: skyNote(at, sigma), AsideDrawing: zoom}, nil
}

// wideGap separates the parts of the sky chart's x label: no-break spaces,
// which SVG viewers do not collapse into one.
const wideGap = "\u00a0\u00a0\u00a0\u00a0\u00a0"

// scaleXYs returns the points multiplied by f.
func scaleXYs(xys plotter.XYs, f float64) plotter.XYs {
	out := make(plotter.XYs, len(xys))
	for i, q := range xys {
		out[i] = plotter.XY{X: q.X * f, Y: q.Y * f}
	}
	return out
}

// skyUnit returns the unit of the sky chart's axes for a view of half-width
// extent arcseconds: arcseconds up to 2′, arcminutes up to 3°, degrees
// beyond; the size of the unit in arcseconds and its name.
func skyUnit(extent float64) (arcsec float64, name string) {
	switch {
	case extent <= 120:
		return 1, "arcsec"
	case extent <= 3*3600:
		return 60, "arcmin"
	}
	return 3600, "degrees"
}

// ellipseXYs returns the outline of e in arcseconds: x = offset in
// RA·cos δ (east positive), y = in Dec.
func ellipseXYs(e fit.Ellipse) plotter.XYs {
	const n = 120
	a, b := e.SemiMajorArcsec, e.SemiMinorArcsec
	sp, cp := math.Sincos(float64(e.PA))
	out := make(plotter.XYs, n)
	for i := range out {
		th := 2 * math.Pi * float64(i) / n
		st, ct := math.Sincos(th)
		// Major axis along PA (north through east): (east, north) = (sin PA, cos PA).
		out[i] = plotter.XY{X: a*ct*sp + b*st*cp, Y: a*ct*cp - b*st*sp}
	}
	return out
}

// scaleBarArcmin returns the length of the scale bar, arcminutes: the
// largest 1-2-5 multiple of a power of ten, of arcminutes (of degrees from
// 1° up), at most a quarter of the view's width (width in arcseconds).
func scaleBarArcmin(width float64) float64 {
	target := width / 4 / 60
	if !(target > 0) {
		return 1
	}
	if target >= 60 {
		return 60 * scaleBarArcmin(width/60)
	}
	p := math.Pow(10, math.Floor(math.Log10(target)))
	for _, m := range []float64{5, 2, 1} {
		if m*p <= target {
			return m * p
		}
	}
	return p
}

// scaleLabel labels a scale bar of l arcminutes: "10′", and for less than
// one arcminute also its arcseconds, "0.5′ = 30″".
func scaleLabel(l float64) string {
	if l >= 1 {
		return arcminText(l)
	}
	return fmt.Sprintf("%s = %s″", arcminText(l), trimFloat(l*60))
}

// arcminText formats a number of arcminutes: "30′", "0.5′", "1.5°" at 90′
// or more when whole degrees do not read better.
func arcminText(m float64) string {
	if m >= 90 {
		return trimFloat(m/60) + "°"
	}
	return trimFloat(m) + "′"
}

// trimFloat formats v with up to 3 significant digits and no trailing
// zeros.
func trimFloat(v float64) string {
	s := fmt.Sprintf("%.3g", v)
	if strings.ContainsAny(s, "e") {
		return fmt.Sprintf("%g", v)
	}
	return s
}

// skyNote is the corner note of the sky chart: where to point, the region
// and the motion.
func skyNote(at fit.Prediction, sigma float64) string {
	var b strings.Builder
	fmt.Fprintf(&b, "point at (ICRS, %s UTC)\nRA %s\nDec %s", hhmm(at.UTC), astro.FormatHMS(at.RA, 1), astro.FormatDMS(at.Dec, 0))
	e := at.Ellipse(sigma)
	if e.SemiMajorArcsec > 0 && finite(e.SemiMajorArcsec) {
		fmt.Fprintf(&b, "\n\nsearch the %gσ region\n%s, long axis PA %.0f°", sigma,
			sizeText(2*e.SemiMajorArcsec, 2*e.SemiMinorArcsec), e.PA.Degrees())
	} else {
		b.WriteString("\n\nno stated uncertainty:\nthe region is a point")
	}
	if r := at.RateArcsecPerMin; finite(r) && r > 0 {
		fmt.Fprintf(&b, "\n\nmoving %.3g″/min\ntoward PA %.0f°", r, at.RatePA.Degrees())
	}
	if at.BeyondHorizon {
		b.WriteString("\n\nBEYOND the fit's validity\nhorizon: do not trust it")
	}
	return b.String()
}

// sizeText formats the full axes of a region, given in arcseconds, in the
// unit the larger one reads best in: ″ below 2′, ′ below 2°, ° beyond
// ("2.68′ × 0.73′").
func sizeText(major, minor float64) string {
	unit, sym := 1.0, "″"
	switch {
	case major >= 7200:
		unit, sym = 3600, "°"
	case major >= 120:
		unit, sym = 60, "′"
	}
	return fmt.Sprintf("%.3g%s × %.3g%s", major/unit, sym, minor/unit, sym)
}

// trackLegend is the legend entry of the track, with the interval between
// the predictions it was drawn through (the median of their spacing); its
// ends are labelled with their times on the chart.
func trackLegend(track []fit.Prediction) string {
	var gaps []float64
	for i := 1; i < len(track); i++ {
		gaps = append(gaps, math.Abs(track[i].UTC.Sub(track[i-1].UTC))*1440)
	}
	step := ""
	if len(gaps) > 0 {
		sort.Float64s(gaps)
		if m := math.Round(gaps[len(gaps)/2]); m > 0 {
			step = fmt.Sprintf(", a dot every %.0f min", m)
		}
	}
	return "track" + step
}

// endLabel returns the label of a track's end at (x, y), written beyond
// the end: along the direction (dx, dy) of the motion there (data units,
// x towards east) at the last point, against it at the first.
func endLabel(dx, dy, x, y float64, s string, st text.Style, first bool) note {
	if first {
		dx, dy = -dx, -dy
	}
	// On the page east is to the left.
	px, py := -dx, dy
	n := note{X: x, Y: y, Text: s, Style: st, Box: true}
	const off = 6
	if math.Abs(px) >= math.Abs(py) {
		n.Style.YAlign = draw.YCenter
		if px > 0 {
			n.Style.XAlign, n.DX = draw.XLeft, off
		} else {
			n.Style.XAlign, n.DX = draw.XRight, -off
		}
	} else {
		n.Style.XAlign = draw.XCenter
		if py > 0 {
			n.Style.YAlign, n.DY = draw.YBottom, off
		} else {
			n.Style.YAlign, n.DY = draw.YTop, -off
		}
	}
	return n
}

// symmetricTicks labels an axis centred on zero with round steps, about
// five labels, so that 0 is always marked.
type symmetricTicks struct{}

// Ticks implements plot.Ticker.
func (symmetricTicks) Ticks(min, max float64) []plot.Tick {
	step := niceStep((max - min) / 6)
	if !(step > 0) || math.IsInf(step, 0) {
		return nil
	}
	var out []plot.Tick
	for k := math.Ceil(min / step * 2); k <= math.Floor(max/step*2); k++ {
		v := k * step / 2
		t := plot.Tick{Value: v}
		if int(k)%2 == 0 {
			t.Label = trimFloat(v)
			if math.Abs(v) < step*1e-9 {
				t.Label = "0"
			}
		}
		out = append(out, t)
	}
	return out
}

// niceStep returns the 1-2-5 multiple of a power of ten nearest above x.
func niceStep(x float64) float64 {
	if !(x > 0) {
		return 0
	}
	p := math.Pow(10, math.Floor(math.Log10(x)))
	for _, m := range []float64{1, 2, 5, 10} {
		if m*p >= x*0.999 {
			return m * p
		}
	}
	return 10 * p
}

// utcTime returns a UTC instant as a time.Time, rounded to the second.
func utcTime(t astro.JD) time.Time { return axisTime(axisSeconds(t)).Round(time.Second) }

// hhmm formats a UTC instant as hours and minutes, rounded to the minute.
func hhmm(t astro.JD) string { return utcTime(t).Round(time.Minute).Format("15:04") }

// finite reports whether v is neither NaN nor infinite.
func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// pow10Floor returns the largest power of ten not above x (x > 0).
func pow10Floor(x float64) float64 { return math.Pow(10, math.Floor(math.Log10(x)+1e-12)) }
