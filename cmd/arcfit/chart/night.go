package chart

import (
	"errors"
	"fmt"
	"math"

	"arcfit/ephem"
	"arcfit/fit"
	"arcfit/fit/plan"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// The night chart's size: 16 × 7 inches, 1536 × 672 pixels in PNG, about
// a laptop screen; the sky panel takes half of it.
const (
	nightWidth  = 16 * vg.Inch
	nightHeight = 7 * vg.Inch
	skyShare    = 0.5
)

// NightFigure returns the night chart of a target's plan: on the left the
// search region on the sky ([SkyRegion]) at the best time, with the track
// through the plan's rows; on the right the altitudes through the night
// ([Altitude]) with the twilights, the Moon, the limit and the window. One
// image with both, so that one look at 2 a.m. answers both questions: where
// to point and how big a field to search, and how long the target stays up.
//
// curves are the night's altitudes ([SampleNight] of the same target and
// sky). When the target is not observable the sky panel is drawn at the
// instant of its highest altitude in darkness (the plan's nearest row), and
// says so; when the plan has no rows (no darkness, a failed prediction, or
// a target near the Sun whose rows are withheld) the sky panel says why
// instead of drawing a region. A target near the Sun gets no altitude curve
// either unless the plan has its rows (Options.AllowNearSun).
//
// Errors: a nil plan; those of [SkyRegion] and [Altitude].
func NightFigure(p *plan.NightPlan, curves NightCurves) (*Figure, error) {
	if p == nil {
		return nil, errors.New("chart: no night plan")
	}
	ao := AltitudeOptions{TargetName: p.Name, MinAlt: p.Options.MinAlt, Windows: p.Windows, Best: p.Best,
		Title: fmt.Sprintf("%s: altitude, night of %v at %s", p.Name, p.Date, siteName(p.Sky.Site))}
	if !p.Observable && p.Why != "" {
		ao.Note = wrapWords("Not observable: "+p.Why+".", 80)
	}
	if p.RowsWithheld {
		ao.Withheld = fmt.Sprintf("%s is within %.0f° of the Sun:\nno pointing drawn", p.Name, ephem.NearSunLimit.Degrees())
	}
	altPanel, err := Altitude(p.Sky, curves, ao)
	if err != nil {
		return nil, err
	}
	altPanel.Share = 1 - skyShare

	var skyPanel Panel
	at, ok := skyInstant(p)
	switch {
	case ok:
		so := SkyOptions{FOVArcmin: p.Options.FOVArcmin, Sigma: p.Options.Sigma}
		if p.Observable {
			so.Title = fmt.Sprintf("%s: where to point at the best time, %s UTC", p.Name, hhmm(at.UTC))
		} else {
			so.Title = fmt.Sprintf("%s: NOT observable; its place at %s UTC, highest in darkness", p.Name, hhmm(at.UTC))
		}
		track := make([]fit.Prediction, len(p.Rows))
		for i, r := range p.Rows {
			track[i] = r.Prediction
		}
		if skyPanel, err = SkyRegion(at, track, so); err != nil {
			return nil, err
		}
	default:
		skyPanel = Panel{Plot: messagePlot(p.Name+": no search region", noRegionWhy(p))}
	}
	skyPanel.Share = skyShare
	return &Figure{Width: nightWidth, Height: nightHeight, Panels: []Panel{skyPanel, altPanel}}, nil
}

// NightSkyFigure returns the altitude chart of a night without a target:
// the twilights and the Moon ([Altitude]), on its own.
func NightSkyFigure(sky ephem.NightSky, curves NightCurves) (*Figure, error) {
	alt, err := Altitude(sky, curves, AltitudeOptions{})
	if err != nil {
		return nil, err
	}
	return &Figure{Width: 10 * vg.Inch, Height: 6.25 * vg.Inch, Panels: []Panel{alt}}, nil
}

// skyInstant returns the prediction the sky panel is drawn at: the best
// time's, or when not observable the row nearest the highest altitude in
// darkness; false when the plan has neither.
func skyInstant(p *plan.NightPlan) (fit.Prediction, bool) {
	if p.Best != nil {
		return p.Best.Prediction, true
	}
	if len(p.Rows) == 0 {
		return fit.Prediction{}, false
	}
	best, d := 0, math.Inf(1)
	for i, r := range p.Rows {
		if dd := math.Abs(r.UTC.Sub(p.HighestDark)); dd < d {
			best, d = i, dd
		}
	}
	return p.Rows[best].Prediction, true
}

// noRegionWhy says why the plan has no search region to draw.
func noRegionWhy(p *plan.NightPlan) string {
	switch {
	case p.RowsWithheld:
		return fmt.Sprintf("%s is %.0f° from the Sun, within %.0f°.\nPointing a telescope near the Sun can blind\nand destroy equipment: no pointing is drawn.",
			p.Name, p.SunElongation.Degrees(), ephem.NearSunLimit.Degrees())
	case p.Why != "":
		return wrapWords("Not observable: "+p.Why+".", 48)
	}
	return "No prediction for this night."
}

// messagePlot returns a plot without axes that shows a title and a message
// in its middle.
func messagePlot(title, msg string) *plot.Plot {
	p := newPlot(title, "", "")
	p.HideAxes()
	st := textStyle(labelSize, targetRed)
	st.XAlign, st.YAlign = draw.XCenter, draw.YCenter
	p.Add(note{X: 0.5, Y: 0.5, Text: msg, Style: st})
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = 0, 1, 0, 1
	return p
}

// wrapWords breaks s into lines of at most width characters at spaces.
func wrapWords(s string, width int) string {
	var out []rune
	n := 0
	word := []rune{}
	flush := func() {
		if len(word) == 0 {
			return
		}
		if n > 0 && n+1+len(word) > width {
			out = append(out, '\n')
			n = 0
		} else if n > 0 {
			out = append(out, ' ')
			n++
		}
		out = append(out, word...)
		n += len(word)
		word = word[:0]
	}
	for _, r := range s {
		if r == ' ' || r == '\n' {
			flush()
			continue
		}
		word = append(word, r)
	}
	flush()
	return string(out)
}
