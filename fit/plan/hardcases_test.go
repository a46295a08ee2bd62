package plan_test

import (
	"math"
	"strings"
	"testing"
	"time"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit/plan"
)

// The hard sites of the night plan: ±89° latitude, where the Sun's altitude
// hardly changes through the day (polar day, polar night, a day-long
// twilight), and the date line.

// sunDecSpan returns the least and greatest apparent declination of the Sun
// over the night's span (at its start, middle and end; the declination is
// monotonic over a day).
func sunDecSpan(t *testing.T, n ephem.NightSky) (lo, hi float64) {
	t.Helper()
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, u := range []astro.JD{n.Start, n.MoonTime, n.End} {
		tt, err := astro.UTCToTT(u)
		if err != nil && !strings.Contains(err.Error(), "table") {
			t.Fatal(err)
		}
		_, dec, _, err := ephem.SunApparentEquatorialOfDate(tt)
		if err != nil {
			t.Fatal(err)
		}
		lo, hi = math.Min(lo, dec.Degrees()), math.Max(hi, dec.Degrees())
	}
	return lo, hi
}

// TestPolarNights computes the nights at latitudes ±89° around the solstices
// and the equinox and checks them against the geometry of the sphere: the
// Sun's geometric altitude runs between its lower and upper culmination,
// |φ + δ| − 90° and 90° − |φ − δ| (an exact identity for a fixed δ; δ
// changes by up to 0.4° a day near the equinox, so the bounds are taken over
// the δ of the span), to 0.02° (NightAt finds the extremes "to about
// 0.01°"; the Sun's parallax of 8.8″ and the site's height do not matter at
// that level). The flags follow from the extremes: polar day when the
// lowest altitude is above −0.8333°, polar night when the highest is below
// it; no darkness, with the reason, when the lowest is above −18°; a dark
// window the whole span when the highest is below −18°. No time is NaN and
// every event lies in the span.
func TestPolarNights(t *testing.T) {
	type want struct{ polarDay, polarNight, noDark, darkAllSpan bool }
	cases := []struct {
		lat, lon float64
		date     string
		w        want
	}{
		{89, 0, "2027-06-20", want{polarDay: true, noDark: true}},
		{89, 180, "2027-06-20", want{polarDay: true, noDark: true}},
		{-89, 0, "2027-06-20", want{polarNight: true, darkAllSpan: true}},
		{-89, -180, "2027-06-20", want{polarNight: true, darkAllSpan: true}},
		{89, 0, "2026-12-21", want{polarNight: true, darkAllSpan: true}},
		{-89, 180, "2026-12-21", want{polarDay: true, noDark: true}},
		{89, 90, "2027-03-28", want{polarDay: true, noDark: true}},    // δ ≈ +3°: the Sun circles 2°–4° up
		{-89, 90, "2027-03-28", want{polarNight: true, noDark: true}}, // 2°–4° down: a day-long civil twilight
		{89, -45, "2027-03-08", want{polarNight: true, noDark: true}}, // δ ≈ −5°
		{-89, -45, "2026-10-08", want{polarDay: true, noDark: true}},  // δ ≈ −6°: the Sun circles 5°–7° up at 89° S
	}
	for _, c := range cases {
		site := astro.Site{Name: "Invented polar camp", Lat: astro.AngleFromDegrees(c.lat), Lon: astro.AngleFromDegrees(c.lon), HeightM: 10}
		d := parseDate(t, c.date)
		n, err := ephem.NightAt(d.Year, int(d.Month), d.Day, site, nil)
		if err != nil {
			t.Errorf("%+v %s: %v", c.lat, c.date, err)
			continue
		}
		lo, hi := sunDecSpan(t, n)
		phi := c.lat
		minLo, minHi := math.Abs(phi+lo)-90, math.Abs(phi+hi)-90
		maxLo, maxHi := 90-math.Abs(phi-lo), 90-math.Abs(phi-hi)
		const tol = 0.02
		if got := n.SunMinAlt.Degrees(); got < math.Min(minLo, minHi)-tol || got > math.Max(minLo, minHi)+tol {
			t.Errorf("lat %g %s: lowest Sun %.3f°, want |φ + δ| − 90° in [%.3f, %.3f]", c.lat, c.date, got, math.Min(minLo, minHi), math.Max(minLo, minHi))
		}
		if got := n.SunMaxAlt.Degrees(); got < math.Min(maxLo, maxHi)-tol || got > math.Max(maxLo, maxHi)+tol {
			t.Errorf("lat %g %s: highest Sun %.3f°, want 90° − |φ − δ| in [%.3f, %.3f]", c.lat, c.date, got, math.Min(maxLo, maxHi), math.Max(maxLo, maxHi))
		}
		if n.PolarDay != c.w.polarDay || n.PolarNight != c.w.polarNight {
			t.Errorf("lat %g %s: polar day %v night %v (Sun %.2f° to %.2f°), want %v %v", c.lat, c.date, n.PolarDay, n.PolarNight,
				n.SunMinAlt.Degrees(), n.SunMaxAlt.Degrees(), c.w.polarDay, c.w.polarNight)
		}
		switch {
		case c.w.noDark:
			if ephem.Happens(n.DarkStart) || !strings.Contains(n.DarkReason, "no astronomical darkness") {
				t.Errorf("lat %g %s: dark window %v–%v, reason %q; want none, with the reason", c.lat, c.date, n.DarkStart, n.DarkEnd, n.DarkReason)
			}
		case c.w.darkAllSpan:
			if n.DarkStart != n.Start || n.DarkEnd != n.End || !strings.Contains(n.DarkReason, "polar night") {
				t.Errorf("lat %g %s: dark window %v–%v (span %v–%v), reason %q; want the whole span, polar night", c.lat, c.date, n.DarkStart, n.DarkEnd, n.Start, n.End, n.DarkReason)
			}
		}
		for _, ev := range []astro.JD{n.Sunset, n.Sunrise, n.CivilDusk, n.CivilDawn, n.NauticalDusk, n.NauticalDawn, n.AstroDusk, n.AstroDawn, n.DarkStart, n.DarkEnd} {
			if !ephem.Happens(ev) {
				continue
			}
			if math.IsNaN(ev.Frac) || ev.Before(n.Start) || n.End.Before(ev) {
				t.Errorf("lat %g %s: event %v outside the span %v–%v", c.lat, c.date, ev, n.Start, n.End)
			}
		}
	}
}

// TestPolarDayPlan asks for a target's plan at 89° N in the polar day: no
// pointing table, the reason no_darkness in plain words naming the Sun's
// lowest altitude, and the later nights searched (none within 60 nights of
// the solstice: the Sun stays above −18° until September). At 89° S on the
// same night (the polar night) the plan either has windows inside the dark
// window, each at least the altitude limit at its best, or says why not.
func TestPolarDayPlan(t *testing.T) {
	tg := elementsTarget(t, "Invented-P2")
	d := parseDate(t, "2027-06-20")
	north := astro.Site{Name: "Invented north camp", Lat: astro.AngleFromDegrees(89), Lon: astro.AngleFromDegrees(-180), HeightM: 5}
	opts := plan.DefaultOptions()
	opts.Name = "Invented-P2"
	p, err := plan.Night(tg, d, north, opts)
	if err != nil {
		t.Fatal(err)
	}
	if p.Observable || p.Reason != plan.ReasonNoDarkness || len(p.Rows) != 0 || p.Best != nil {
		t.Errorf("89° N polar day: observable %v reason %v, %d rows; want no_darkness and no rows", p.Observable, p.Reason, len(p.Rows))
	}
	if !strings.Contains(p.Why, "dark") || !strings.Contains(p.Why, "22.4") || strings.Contains(p.Why, "NaN") || strings.Contains(p.Why, "\n") {
		t.Errorf("89° N polar day: why %q", p.Why)
	}
	if len(p.NextNights) != 0 || p.SearchedNights != plan.MaxSearchNights {
		t.Errorf("89° N polar day: next nights %v after searching %d; want none after %d", p.NextNights, p.SearchedNights, plan.MaxSearchNights)
	}

	south := astro.Site{Name: "Invented south camp", Lat: astro.AngleFromDegrees(-89), Lon: astro.AngleFromDegrees(180), HeightM: 2800}
	opts.NextNights = 0
	p, err = plan.Night(tg, d, south, opts)
	if err != nil {
		t.Fatal(err)
	}
	if p.Reason == plan.ReasonNoDarkness {
		t.Errorf("89° S polar night: no darkness? %q", p.Why)
	}
	if p.Observable {
		for _, w := range p.Windows {
			if w.Start.Before(p.Sky.DarkStart) || p.Sky.DarkEnd.Before(w.End) || !(w.Hours() > 0) {
				t.Errorf("89° S: window %v–%v outside the dark window %v–%v", w.Start, w.End, p.Sky.DarkStart, p.Sky.DarkEnd)
			}
		}
		if p.Best == nil || p.Best.Pointing.Alt < opts.MinAlt || math.IsNaN(float64(p.Best.Pointing.Alt)) {
			t.Errorf("89° S: best %+v", p.Best)
		}
	} else if p.Why == "" {
		t.Error("89° S: not observable and no reason given")
	}
}

// TestDateLineNights: a site at 180° E and one at 180° W are one place, and
// their nights (local mean time brought into (−180°, 180°], so UTC+12 for
// both) are the same instants; two sites 0.002° either side of the line
// have local mean times 24 h apart (UTC+12 and UTC−12), so the night of a
// date on the west side is the night of the next date on the east side, to
// the second. With --tz
// a zone far from UTC (Pacific/Kiritimati, UTC+14) the night of a date
// begins at local noon, 22:00 UTC of the day before, and the dark window of
// a mid-latitude winter night runs across UTC midnight at longitude 0.5° E.
func TestDateLineNights(t *testing.T) {
	events := func(n ephem.NightSky) []astro.JD {
		return []astro.JD{n.Start, n.End, n.Sunset, n.Sunrise, n.CivilDusk, n.CivilDawn, n.NauticalDusk, n.NauticalDawn, n.AstroDusk, n.AstroDawn, n.DarkStart, n.DarkEnd}
	}
	same := func(name string, a, b ephem.NightSky, tolSec float64) {
		t.Helper()
		ea, eb := events(a), events(b)
		for i := range ea {
			if ephem.Happens(ea[i]) != ephem.Happens(eb[i]) || (ephem.Happens(ea[i]) && math.Abs(ea[i].Sub(eb[i]))*86400 > tolSec) {
				t.Errorf("%s: event %d at %v and %v", name, i, ea[i], eb[i])
			}
		}
	}
	site := func(lat, lon float64) astro.Site {
		return astro.Site{Name: "Invented date-line reef", Lat: astro.AngleFromDegrees(lat), Lon: astro.AngleFromDegrees(lon), HeightM: 3}
	}
	for _, lat := range []float64{-17.2, 51.8, 89, -89} {
		e, err1 := ephem.NightAt(2027, 2, 20, site(lat, 180), nil)
		w, err2 := ephem.NightAt(2027, 2, 20, site(lat, -180), nil)
		if err1 != nil || err2 != nil {
			t.Fatal(err1, err2)
		}
		same("±180°", e, w, 0)
		e, err1 = ephem.NightAt(2027, 2, 21, site(lat, 179.999), nil)
		w, err2 = ephem.NightAt(2027, 2, 20, site(lat, -179.999), nil)
		if err1 != nil || err2 != nil {
			t.Fatal(err1, err2)
		}
		// 0.002° of longitude is 0.48 s of local mean time and of the Sun's
		// hour angle; the zone offsets are rounded to the second.
		same("179.999° E on the 21st, 179.999° W on the 20th", e, w, 2)
		if e.Local(e.Start).Format("2006-01-02 15:04") != "2027-02-21 12:00" || w.Local(w.Start).Format("2006-01-02 15:04") != "2027-02-20 12:00" {
			t.Errorf("local starts %v and %v", e.Local(e.Start), w.Local(w.Start))
		}
	}

	kiri, err := time.LoadLocation("Pacific/Kiritimati")
	if err != nil {
		t.Skipf("no zone database: %v", err)
	}
	n, err := ephem.NightAt(2027, 2, 20, site(1.9, -157.4), kiri)
	if err != nil {
		t.Fatal(err)
	}
	if got := astro.FormatISO8601(n.Start, 0); got != "2027-02-19T22:00:00Z" {
		t.Errorf("night of 2027-02-20 at UTC+14 starts %s, want 2027-02-19T22:00:00Z", got)
	}
	g, err := ephem.NightAt(2026, 12, 20, site(45, 0.5), time.UTC)
	if err != nil {
		t.Fatal(err)
	}
	y1, m1, d1, _, _, _ := g.DarkStart.DateTime()
	y2, m2, d2, _, _, _ := g.DarkEnd.DateTime()
	if [3]int{y1, m1, d1} != [3]int{2026, 12, 20} || [3]int{y2, m2, d2} != [3]int{2026, 12, 21} || !(g.DarkHours() > 10 && g.DarkHours() < 14) {
		t.Errorf("45° N, 0.5° E, 2026-12-20: dark %v to %v (%.2f h); want across UTC midnight, 10–14 h", g.DarkStart, g.DarkEnd, g.DarkHours())
	}
}
