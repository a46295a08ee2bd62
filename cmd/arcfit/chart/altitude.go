package chart

import (
	"errors"
	"fmt"
	"image/color"
	"strings"
	"time"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit/plan"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// The shades of the sky behind the altitude chart, darker as the Sun sinks:
// civil twilight (Sun below −0.83°, the upper limb set), nautical (below
// −6°), astronomical (below −12°) and darkness (below −18°). Daylight is
// left white.
var (
	civilShade    = color.RGBA{R: 228, G: 234, B: 244, A: 255}
	nauticalShade = color.RGBA{R: 204, G: 214, B: 234, A: 255}
	astroShade    = color.RGBA{R: 178, G: 192, B: 222, A: 255}
	darkShade     = color.RGBA{R: 150, G: 168, B: 208, A: 255}
)

// AltitudeOptions control [Altitude].
type AltitudeOptions struct {
	// Title is the chart's title; "" gives one naming the night and site.
	Title string
	// TargetName names the target in the legend; "" gives "target".
	TargetName string
	// MinAlt is the altitude limit to draw; 0 draws none.
	MinAlt astro.Angle
	// Windows are the stretches in which the target is observable, shaded;
	// Best, when set, is marked with its time and altitude.
	Windows []plan.Window
	Best    *plan.Point
	// Withheld is a reason not to draw the target's curve (a target near
	// the Sun), said on the chart instead.
	Withheld string
	// Note, when not empty, is written below the title (why the target is
	// not observable).
	Note string
}

// Altitude returns the chart of the night's altitudes: the target's curve
// (when curves has one), the Moon's, the altitude limit and the target's
// windows and best time, over the sky's twilights (civil, nautical,
// astronomical and darkness shaded darker in turn), against UTC with each
// hour's label also in the night's local time.
//
// The twilights come from the sky's events (ephem.NightAt); a level whose
// dusk or dawn falls outside the night's span is shaded to the chart's edge.
//
// The legend stands beside the plot.
//
// Errors: curves without samples or of unequal lengths.
func Altitude(sky ephem.NightSky, curves NightCurves, opts AltitudeOptions) (Panel, error) {
	pl, err := altitudePlot(sky, curves, opts)
	if err != nil {
		return Panel{}, err
	}
	return Panel{Plot: pl, LegendBeside: true}, nil
}

// altitudePlot is the plot of [Altitude].
func altitudePlot(sky ephem.NightSky, curves NightCurves, opts AltitudeOptions) (*plot.Plot, error) {
	n := len(curves.Times)
	if n < 2 || len(curves.MoonAlt) != n || (curves.TargetAlt != nil && len(curves.TargetAlt) != n) {
		return nil, errors.New("chart: the night's curves are empty or of unequal lengths")
	}
	loc := sky.Location
	if loc == nil {
		loc = time.UTC
	}
	title := opts.Title
	if title == "" {
		title = fmt.Sprintf("altitude through the night of %04d-%02d-%02d at %s", sky.Year, sky.Month, sky.Day, siteName(sky.Site))
	}
	if opts.Note != "" {
		title += "\n" + opts.Note
	}
	xLabel := "UTC (upper) and " + zoneLabel(loc) + " (lower)"
	p := newPlot(title, xLabel, "altitude (°)")
	x0, x1 := axisSeconds(curves.Times[0]), axisSeconds(curves.Times[n-1])
	p.X.Tick.Marker = timeTicks{MaxLabels: 8, Local: loc}
	p.Y.Tick.Marker = plot.ConstantTicks(altTicks())

	// The twilights, each level over the one before.
	for _, lv := range []struct {
		alt        astro.Angle
		dusk, dawn astro.JD
		fill       color.Color
		name       string
	}{
		{ephem.SunRiseAltitude, sky.Sunset, sky.Sunrise, civilShade, "civil twilight"},
		{ephem.CivilTwilight.Altitude(), sky.CivilDusk, sky.CivilDawn, nauticalShade, "nautical twilight"},
		{ephem.NauticalTwilight.Altitude(), sky.NauticalDusk, sky.NauticalDawn, astroShade, "astronomical twilight"},
		{ephem.AstronomicalTwilight.Altitude(), sky.AstroDusk, sky.AstroDawn, darkShade, "dark: Sun below −18°"},
	} {
		from, to, ok := shadeSpan(sky, lv.alt, lv.dusk, lv.dawn, x0, x1)
		if s := (span{From: from, To: to, Fill: lv.fill}); ok {
			p.Add(s)
			p.Legend.Add(lv.name, s)
		}
	}

	if why := noDarkNote(sky); why != "" {
		p.Add(cornerNote{Text: why, Style: textStyle(labelSize, black), Top: true})
	}

	// The windows.
	for i, w := range opts.Windows {
		lo := opts.MinAlt.Degrees()
		pg, err := plotter.NewPolygon(plotter.XYs{{X: axisSeconds(w.Start), Y: lo}, {X: axisSeconds(w.End), Y: lo},
			{X: axisSeconds(w.End), Y: 90}, {X: axisSeconds(w.Start), Y: 90}})
		if err != nil {
			return nil, err
		}
		pg.Color, pg.LineStyle = windowFill, lineStyle(windowLine, 2)
		p.Add(pg)
		if i == 0 {
			p.Legend.Add(windowLegend(opts.Windows), pg)
		}
	}
	if opts.MinAlt > 0 {
		r := rule{At: opts.MinAlt.Degrees(), Style: lineStyle(black, 1.2, 6, 4),
			Label: fmt.Sprintf("limit %g°", opts.MinAlt.Degrees()), Text: textStyle(noteSize, black)}
		p.Add(r)
	}

	// The Moon.
	moonLines, err := curveLines(curves.Times, curves.MoonAlt, lineStyle(moonBlue, 1.6, 5, 3))
	if err != nil {
		return nil, err
	}
	for _, l := range moonLines {
		p.Add(l)
	}
	moonName := fmt.Sprintf("Moon, %.0f %% lit", 100*sky.MoonIllumination)
	if len(moonLines) > 0 {
		p.Legend.Add(moonName, moonLines[0])
	}

	// The target.
	name := opts.TargetName
	if name == "" {
		name = "target"
	}
	switch {
	case opts.Withheld != "":
		p.Add(cornerNote{Text: opts.Withheld, Style: textStyle(labelSize, targetRed), Top: true, Left: true})
	case curves.TargetAlt != nil:
		ls, err := curveLines(curves.Times, curves.TargetAlt, lineStyle(targetRed, 2.6))
		if err != nil {
			return nil, err
		}
		for _, l := range ls {
			p.Add(l)
		}
		if len(ls) > 0 {
			p.Legend.Add(name, ls[0])
		} else {
			p.Add(cornerNote{Text: name + ": no prediction for this night", Style: textStyle(labelSize, targetRed), Top: true, Left: true})
		}
	}
	if b := opts.Best; b != nil && opts.Withheld == "" {
		x, y := axisSeconds(b.UTC), b.Pointing.Alt.Degrees()
		sc, err := plotter.NewScatter(plotter.XYs{{X: x, Y: y}})
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle = draw.GlyphStyle{Color: black, Radius: 5, Shape: draw.RingGlyph{}}
		p.Add(sc)
		lab := fmt.Sprintf("best %s UTC, %.0f° high, azimuth %.0f°", hhmm(b.UTC), y, b.Pointing.Az.Degrees())
		st := textStyle(noteSize, black)
		st.XAlign, st.YAlign = draw.XCenter, draw.YBottom
		dy := vg.Length(9)
		if y > 78 { // no room above: below the marker
			st.YAlign, dy = draw.YTop, -9
		}
		p.Add(note{X: x, Y: y, DY: dy, Text: lab, Style: st, Box: true})
		p.Legend.Add("best time", sc)
	}
	p.X.Min, p.X.Max = x0, x1
	p.Y.Min, p.Y.Max = 0, 90
	return p, nil
}

// noDarkNote says why the chart shows no dark window, "" when it has one.
func noDarkNote(sky ephem.NightSky) string {
	switch {
	case ephem.Happens(sky.DarkStart):
		return ""
	case sky.PolarDay:
		return fmt.Sprintf("the Sun does not set this night\n(its lowest: %.1f°): no darkness", sky.SunMinAlt.Degrees())
	}
	return fmt.Sprintf("no astronomical darkness: the Sun\nstays above −18° (its lowest: %.1f°)", sky.SunMinAlt.Degrees())
}

// shadeSpan returns the axis span of the Sun below alt: from dusk to dawn,
// an event that does not happen in the night standing for the chart's edge
// when the Sun does get below alt (ok false when it never does).
func shadeSpan(sky ephem.NightSky, alt astro.Angle, dusk, dawn astro.JD, x0, x1 float64) (from, to float64, ok bool) {
	if !(sky.SunMinAlt < alt) {
		return 0, 0, false
	}
	from, to = x0, x1
	if ephem.Happens(dusk) {
		from = axisSeconds(dusk)
	}
	if ephem.Happens(dawn) {
		to = axisSeconds(dawn)
	}
	return from, to, to > from
}

// curveLines returns the lines of an altitude curve, one for each run of
// finite samples (a failed prediction breaks the curve).
func curveLines(ts []astro.JD, alt []astro.Angle, ls draw.LineStyle) ([]*plotter.Line, error) {
	var out []*plotter.Line
	var run plotter.XYs
	flush := func() error {
		if len(run) >= 2 {
			l, err := plotter.NewLine(run)
			if err != nil {
				return err
			}
			l.LineStyle = ls
			out = append(out, l)
		}
		run = nil
		return nil
	}
	for i, a := range alt {
		if !finite(float64(a)) {
			if err := flush(); err != nil {
				return nil, err
			}
			continue
		}
		run = append(run, plotter.XY{X: axisSeconds(ts[i]), Y: a.Degrees()})
	}
	if err := flush(); err != nil {
		return nil, err
	}
	return out, nil
}

// windowLegend describes the windows: "observable 03:10–07:45 UTC", with
// every part when there are several.
func windowLegend(ws []plan.Window) string {
	parts := make([]string, len(ws))
	for i, w := range ws {
		parts[i] = hhmm(w.Start) + "–" + hhmm(w.End)
	}
	return "observable " + strings.Join(parts, ", ") + " UTC"
}

// altTicks are the altitude axis's ticks: labels every 15°, minor ticks
// every 5°.
func altTicks() []plot.Tick {
	var ts []plot.Tick
	for a := 0; a <= 90; a += 5 {
		t := plot.Tick{Value: float64(a)}
		if a%15 == 0 {
			t.Label = fmt.Sprint(a)
		}
		ts = append(ts, t)
	}
	return ts
}

// zoneLabel names a local time zone for an axis label: "local time
// Europe/Paris", or for the site's mean solar time "local mean time
// LMT-06:46".
func zoneLabel(loc *time.Location) string {
	name := loc.String()
	if strings.HasPrefix(name, "LMT") {
		return "local mean time " + name
	}
	return "local time " + name
}

// siteName names a site for a title, its coordinates when it has no name.
func siteName(s astro.Site) string {
	if s.Name != "" {
		return s.Name
	}
	return fmt.Sprintf("%.2f°, %.2f°", s.Lat.Degrees(), s.Lon.Degrees())
}
