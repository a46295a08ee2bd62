package chart

import (
	"errors"
	"fmt"
	"math"
	"time"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit"
	"arcfit/fit/plan"
)

// NightCurves are the altitudes of the target, the Moon and the Sun through
// a night, sampled for the altitude chart.
type NightCurves struct {
	// Times are the sampling instants, UTC, in time order.
	Times []astro.JD
	// TargetAlt is the target's refracted altitude (10 °C, 1010 hPa) at
	// each instant, NaN where its prediction failed; nil without a target.
	TargetAlt []astro.Angle
	// MoonAlt is the Moon's refracted altitude; SunAlt the Sun's geometric
	// altitude (the twilights are defined without refraction).
	MoonAlt, SunAlt []astro.Angle
}

// DefaultCurveStep is the sampling interval of [SampleNight]: the altitude
// of a body changes by at most 15°/h × 5 min = 1.25° between samples, which
// a line through them follows to 0.01° (the curvature bound of
// fit/plan's window search).
const DefaultCurveStep = 5 * time.Minute

// SampleNight samples the altitudes of the target t (nil: none), the Moon
// and the Sun over the night sky, every step (0: [DefaultCurveStep]) from an
// hour before sunset to an hour after sunrise, within the night's span
// (local noon to noon); the whole span when the Sun does not set or rise.
// The target's altitude is fit.PointingOf's of its place (the place alone
// when the target is a plan.Positioner), the Moon's that of
// ephem.PlaceOfBody.
//
// Errors: a step out of 1 min to 1 h; a Moon or Sun place the ephemerides
// cannot give. A target whose prediction fails at an instant gets NaN there.
func SampleNight(t plan.Target, sky ephem.NightSky, step time.Duration) (NightCurves, error) {
	if step == 0 {
		step = DefaultCurveStep
	}
	if step < time.Minute || step > time.Hour {
		return NightCurves{}, fmt.Errorf("chart: curve step %v: want 1m to 1h", step)
	}
	if !ephem.Happens(sky.Start) || !ephem.Happens(sky.End) {
		return NightCurves{}, errors.New("chart: the night has no span")
	}
	from, to := curveSpan(sky)
	site := sky.Site
	n := int(math.Ceil(to.Sub(from)*86400/step.Seconds())) + 1
	c := NightCurves{Times: make([]astro.JD, 0, n)}
	pos, cheap := t.(plan.Positioner)
	for i := 0; i < n; i++ {
		utc := from.AddSeconds(float64(i) * step.Seconds())
		if i == n-1 {
			utc = to
		}
		c.Times = append(c.Times, utc)
		moon, err := ephem.PlaceOfBody(ephem.Moon, utc, ephem.Observer{Site: &site})
		if err != nil && moon.UTC == (astro.JD{}) {
			return NightCurves{}, fmt.Errorf("chart: the Moon's place: %v", err)
		}
		sun, err := ephem.PlaceOfBody(ephem.Sun, utc, ephem.Observer{Site: &site, NoRefraction: true})
		if err != nil && sun.UTC == (astro.JD{}) {
			return NightCurves{}, fmt.Errorf("chart: the Sun's place: %v", err)
		}
		c.MoonAlt = append(c.MoonAlt, moon.Alt)
		c.SunAlt = append(c.SunAlt, sun.Alt)
		if t == nil {
			continue
		}
		alt := astro.Angle(math.NaN())
		var pr fit.Prediction
		var perr error
		if cheap {
			pr = fit.Prediction{UTC: utc, Site: &site}
			pr.RA, pr.Dec, perr = pos.Position(utc, &site)
		} else {
			pr, perr = t.Predict(utc, &site)
		}
		if perr == nil {
			if pt, err := fit.PointingOf(pr); err == nil {
				alt = pt.Alt
			}
		}
		c.TargetAlt = append(c.TargetAlt, alt)
	}
	return c, nil
}

// curveSpan returns the instants the night's curves run between: an hour
// before sunset to an hour after sunrise, within the night's span.
func curveSpan(sky ephem.NightSky) (from, to astro.JD) {
	from, to = sky.Start, sky.End
	if ephem.Happens(sky.Sunset) {
		if t := sky.Sunset.AddDays(-1.0 / 24); sky.Start.Before(t) {
			from = t
		}
	}
	if ephem.Happens(sky.Sunrise) {
		if t := sky.Sunrise.AddDays(1.0 / 24); t.Before(sky.End) {
			to = t
		}
	}
	return from, to
}
