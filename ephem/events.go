package ephem

import (
	"errors"
	"fmt"
	"math"

	"arcfit/astro"

	"gonum.org/v1/gonum/spatial/r3"
)

// EventKind says what happens at an [Event].
type EventKind int

// The kinds of event. For a twilight, Set is the dusk (the Sun going down
// through the twilight's altitude) and Rise the dawn.
const (
	Rise         EventKind = iota + 1 // the body comes up through the threshold altitude
	Set                               // the body goes down through the threshold altitude
	Transit                           // upper meridian transit (hour angle 0)
	LowerTransit                      // lower meridian transit (hour angle 12h)
)

var eventKindNames = [...]string{Rise: "rise", Set: "set", Transit: "transit", LowerTransit: "lower transit"}

// String returns the kind's name in lower case ("rise"), or "EventKind(n)"
// for a value that names no kind.
func (k EventKind) String() string {
	if k > 0 && int(k) < len(eventKindNames) {
		return eventKindNames[k]
	}
	return fmt.Sprintf("EventKind(%d)", int(k))
}

// Event is a rise, set or transit of a body seen from a site.
type Event struct {
	Kind EventKind
	// Time is the instant of the event, UTC.
	Time astro.JD
	// Alt is the geometric (airless) topocentric altitude of the body's
	// centre at Time, and Az its azimuth from north through east. For a rise
	// or set Alt is the threshold the function was given; [Crossings], which
	// knows only an altitude function, leaves Az zero.
	Alt, Az astro.Angle
}

// Visibility says whether a body crosses a threshold altitude during a span
// of time, or stays on one side of it.
type Visibility int

// The visibilities. The zero value is RisesAndSets.
const (
	RisesAndSets Visibility = iota // at least one crossing in the span
	AlwaysAbove                    // above the threshold during the whole span (circumpolar, polar day)
	AlwaysBelow                    // below the threshold during the whole span (polar night)
)

var visibilityNames = [...]string{RisesAndSets: "rises and sets", AlwaysAbove: "always above", AlwaysBelow: "always below"}

// String returns the visibility in words ("always above"), or
// "Visibility(n)" for a value that names none.
func (v Visibility) String() string {
	if v >= 0 && int(v) < len(visibilityNames) {
		return visibilityNames[v]
	}
	return fmt.Sprintf("Visibility(%d)", int(v))
}

// Standard altitudes of rise and set: the geometric altitude of the body's
// centre when its upper limb (or, for a point source, the body) appears on
// an ideal horizon, with the standard refraction at the horizon of 34′.
const (
	// HorizonRefraction is the standard refraction at the horizon, 34′
	// (Meeus, Astronomical Algorithms, 2nd ed., ch. 15, p. 101–102).
	HorizonRefraction astro.Angle = 34 * astro.Arcminute
	// StarRiseAltitude is h0 for stars and planets, −0°34′ = −0.5667°
	// (Meeus, ch. 15, p. 102).
	StarRiseAltitude = -HorizonRefraction
	// SunRiseAltitude is h0 for the Sun, −0°50′ = −0.8333°: 34′ of refraction
	// and a semidiameter of 16′ (Meeus, ch. 15, p. 102; design.md: "the Sun's
	// upper limb on the horizon with standard refraction").
	SunRiseAltitude astro.Angle = -50 * astro.Arcminute
)

// moonRadiusRatio is k, the Moon's radius in units of the Earth's equatorial
// radius, as Meeus uses it for h0 of the Moon (ch. 15, p. 102: 0.7275 = 1 − k).
const moonRadiusRatio = 0.2725

// DefaultEventStepDays is the sampling step of [RiseSet], [MoonRiseSet],
// [Transits] and the night of [NightAt]: 10 minutes. The Moon's altitude
// changes by at most 2.5° in that time and the Sun's by 2.5°; a pair of
// crossings closer together than that is caught by the grazing test of
// [Crossings].
const DefaultEventStepDays = 10.0 / 1440

// rootTolDays is the width to which the root finder narrows a bracket, 0.05 s.
const rootTolDays = 0.05 / astro.SecondsPerDay

// maxSamples bounds the number of samples of one search.
const maxSamples = 1 << 20

// isWarning reports whether err is one of the warnings that come with a valid
// value (a stale leap-second or ΔT table, UTC before 1972 read as UT).
func isWarning(err error) bool {
	return errors.Is(err, astro.ErrStaleTable) || errors.Is(err, astro.ErrUTCBefore1972)
}

// scalarFunc is a function of the time in days since a start instant; it
// keeps the first warning it met.
type scalarFunc struct {
	f    func(t astro.JD) (float64, error)
	from astro.JD
	warn error
}

func (s *scalarFunc) at(x float64) (float64, error) {
	v, err := s.f(s.from.AddDays(x))
	if err != nil {
		if !isWarning(err) {
			return 0, err
		}
		if s.warn == nil {
			s.warn = err
		}
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("ephem: function value %g at %v is not finite", v, s.from.AddDays(x))
	}
	return v, nil
}

// samples is a function sampled on a grid of times xs (days since a start).
type samples struct {
	xs, vs []float64
}

// sample evaluates s on n+1 equally spaced times over [0, span].
func sample(s *scalarFunc, span, step float64) (samples, error) {
	if !(step > 0) || math.IsInf(step, 0) {
		return samples{}, fmt.Errorf("ephem: sampling step %g days, want > 0: %w", step, astro.ErrRange)
	}
	if !(span > 0) || math.IsInf(span, 0) {
		return samples{}, fmt.Errorf("ephem: span %g days, want > 0: %w", span, astro.ErrRange)
	}
	n := int(math.Ceil(span / step))
	if n > maxSamples {
		return samples{}, fmt.Errorf("ephem: span %g d in steps of %g d needs more than %d samples: %w", span, step, maxSamples, astro.ErrRange)
	}
	if n < 2 {
		n = 2
	}
	sm := samples{xs: make([]float64, n+1), vs: make([]float64, n+1)}
	for i := 0; i <= n; i++ {
		x := span * float64(i) / float64(n)
		v, err := s.at(x)
		if err != nil {
			return samples{}, err
		}
		sm.xs[i], sm.vs[i] = x, v
	}
	return sm, nil
}

// crossing is a root of a sampled function minus a threshold.
type crossing struct {
	x      float64 // days since the start
	rising bool
}

// crossingsOf returns the instants at which the sampled function s crosses
// threshold, in order. Each sign change between two samples is refined by
// [refineRoot]. Where three samples on one side of the threshold have the
// middle one nearest to it (a maximum below it or a minimum above it), the
// vertex of the parabola through them is evaluated too; if the function is
// on the other side there, the two crossings on either side of it are found.
// That catches a body that grazes the threshold between two samples.
func crossingsOf(s *scalarFunc, sm samples, threshold float64) ([]crossing, error) {
	g := func(x float64) (float64, error) {
		v, err := s.at(x)
		return v - threshold, err
	}
	var out []crossing
	xs, vs := sm.xs, sm.vs
	for i := 0; i+1 < len(xs); i++ {
		a, b := vs[i]-threshold, vs[i+1]-threshold
		if (a < 0) != (b < 0) {
			x, err := refineRoot(g, xs[i], xs[i+1], a, b)
			if err != nil {
				return nil, err
			}
			out = append(out, crossing{x: x, rising: b >= 0})
			continue
		}
		if i == 0 {
			continue
		}
		p := vs[i-1] - threshold
		if (p < 0) != (a < 0) || !(math.Abs(a) < math.Abs(p) && math.Abs(a) <= math.Abs(b)) {
			continue
		}
		// Vertex of the parabola through (x[i-1], p), (x[i], a), (x[i+1], b).
		h0, h1 := xs[i]-xs[i-1], xs[i+1]-xs[i]
		d0, d1 := (a-p)/h0, (b-a)/h1
		curv := (d1 - d0) / (h0 + h1)
		if curv == 0 {
			continue
		}
		xv := 0.5*(xs[i-1]+xs[i]) - d0/(2*curv)
		if !(xv > xs[i-1] && xv < xs[i+1]) {
			continue
		}
		gv, err := g(xv)
		if err != nil {
			return nil, err
		}
		if (gv < 0) == (a < 0) {
			continue
		}
		// Two crossings: before and after the vertex. Replace the sign
		// change that the loop would otherwise not see.
		lo, hi := xs[i-1], xs[i+1]
		fl, fh := p, b
		if xv > xs[i] {
			lo, fl = xs[i], a
		}
		if xv < xs[i] {
			hi, fh = xs[i], a
		}
		x1, err := refineRoot(g, lo, xv, fl, gv)
		if err != nil {
			return nil, err
		}
		x2, err := refineRoot(g, xv, hi, gv, fh)
		if err != nil {
			return nil, err
		}
		// The crossing before the vertex may lie in [x[i-1], x[i]], an
		// interval already passed; keep the order.
		out = append(out, crossing{x: x1, rising: gv >= 0}, crossing{x: x2, rising: fh >= 0})
	}
	return out, nil
}

// refineRoot narrows the bracket [a, b] of a root of g, ga = g(a) and
// gb = g(b) of opposite signs, to rootTolDays by the Illinois variant of the
// regula falsi: a false-position step, and when the same end is kept twice the
// function value at the other end is halved. Steps that would land within
// half the tolerance of an end are moved to that distance, so the bracket
// itself shrinks below the tolerance.
//
// Reference: Dowell, M., Jarratt, P., "A modified regula falsi method for
// computing the root of an equation", BIT 11, 168–174 (1971).
func refineRoot(g func(float64) (float64, error), a, b, ga, gb float64) (float64, error) {
	const half = rootTolDays / 2
	side := 0
	for iter := 0; iter < 200 && b-a > rootTolDays; iter++ {
		x := (a*gb - b*ga) / (gb - ga)
		if iter%8 == 7 || !(x > a && x < b) { // a bisection now and then bounds the work
			x = 0.5 * (a + b)
		}
		x = math.Max(a+half, math.Min(b-half, x))
		gx, err := g(x)
		if err != nil {
			return 0, err
		}
		if gx == 0 {
			return x, nil
		}
		if (gx < 0) == (ga < 0) {
			a, ga = x, gx
			if side == -1 {
				gb /= 2
			}
			side = -1
		} else {
			b, gb = x, gx
			if side == 1 {
				ga /= 2
			}
			side = 1
		}
	}
	return 0.5 * (a + b), nil
}

// visibilityOf classifies a sampled function without crossings.
func visibilityOf(sm samples, threshold float64, n int) Visibility {
	switch {
	case n > 0:
		return RisesAndSets
	case sm.vs[0] >= threshold:
		return AlwaysAbove
	}
	return AlwaysBelow
}

// Crossings returns the instants between from and to (UTC) at which the
// function f, an altitude for example, crosses threshold: Rise where f goes
// up through it, Set where it goes down, with Alt = threshold and Az zero, in
// time order.
//
// Method: f is sampled at equal steps of at most step days over [from, to];
// each sign change of f − threshold between two samples is bracketed and
// refined by the Illinois regula falsi (Dowell & Jarratt 1971) to 0.05 s; a
// local extremum of the samples near the threshold is probed at the vertex of
// the parabola through three samples, so that a pair of crossings between two
// samples (a body grazing the horizon) is found too. Crossings closer
// together than about a third of the step that the parabola does not reveal
// can still be missed; take a step short against the time in which f can turn
// back through the threshold (10 min, [DefaultEventStepDays], for rise and
// set of the Sun, the Moon and the planets).
//
// An error of f ends the search, except the warnings that come with a valid
// value (errors wrapping [astro.ErrStaleTable] or [astro.ErrUTCBefore1972]):
// the value is used and the first such warning is returned with the events.
// from and to must be UTC dates with from before to.
//
// Reference: Dowell, M., Jarratt, P., BIT 11, 168–174 (1971) for the
// refinement; the sampling and bracketing are the usual practice (Meeus,
// Astronomical Algorithms, 2nd ed., ch. 5 on finding a zero by interpolation).
func Crossings(f func(utc astro.JD) (alt astro.Angle, err error), from, to astro.JD, threshold astro.Angle, step float64) ([]Event, error) {
	s, sm, err := sampleSpan(func(t astro.JD) (float64, error) {
		a, err := f(t)
		return float64(a), err
	}, from, to, step)
	if err != nil {
		return nil, err
	}
	cs, err := crossingsOf(s, sm, float64(threshold))
	if err != nil {
		return nil, err
	}
	ev := make([]Event, len(cs))
	for i, c := range cs {
		ev[i] = Event{Kind: Set, Time: from.AddDays(c.x), Alt: threshold}
		if c.rising {
			ev[i].Kind = Rise
		}
	}
	return ev, s.warn
}

// sampleSpan checks the span and samples f over it.
func sampleSpan(f func(t astro.JD) (float64, error), from, to astro.JD, step float64) (*scalarFunc, samples, error) {
	if from.Scale != astro.UTC || to.Scale != astro.UTC {
		return nil, samples{}, fmt.Errorf("ephem: event search from %v to %v, want UTC dates: %w", from.Scale, to.Scale, astro.ErrRange)
	}
	span := to.Sub(from)
	if !(span > 0) {
		return nil, samples{}, fmt.Errorf("ephem: event search from %v to %v: the end is not after the start: %w", from, to, astro.ErrRange)
	}
	s := &scalarFunc{f: f, from: from}
	sm, err := sample(s, span, step)
	if err != nil {
		return nil, samples{}, err
	}
	return s, sm, nil
}

// horizon is where a body is on the sky of a site at one instant.
type horizon struct {
	alt, az astro.Angle // geometric topocentric altitude of the centre; azimuth from north through east
	ha      astro.Angle // topocentric apparent hour angle, (−π, π]
	distAU  float64     // topocentric distance
}

// target is a body whose place the events need: its heliocentric ICRS
// position function, or the Moon, for which horizonOf uses a faster
// equivalent of [moonHelio].
type target struct {
	helio func(astro.JD) (r3.Vec, error)
	moon  bool
}

// horizonOf returns the geometric topocentric altitude, azimuth, hour angle
// and distance of the body b seen from o.Site at the instant utc. It is the
// alt/az part of [Astrometric] (the same astrometric and apparent place,
// sidereal time and conversion), without the distances, angles and Moon
// separation the events do not need. For the Moon the Earth's heliocentric
// position at t − τ (τ ≈ 1.3 s) is taken as E(t) − τ·Ė(t) instead of a new
// VSOP87 evaluation: the Earth's acceleration moves it by 1e-14 au in that
// time.
func horizonOf(b target, utc astro.JD, o Observer) (horizon, error) {
	if o.Site == nil {
		return horizon{}, errors.New("ephem: rise, set and transit need a site, not the geocentre")
	}
	in, warn, err := newInstant(utc, o.DUT1Sec)
	if err != nil {
		return horizon{}, err
	}
	st, err := stateOf(o.Site, in)
	if err != nil {
		return horizon{}, err
	}
	helio := b.helio
	if b.moon {
		earth := r3.Sub(r3.Sub(st.pos, st.geo), st.sunPos)
		earthVel := r3.Sub(st.earthVel, st.sunVel)
		tdb := in.tdb
		helio = func(t astro.JD) (r3.Vec, error) {
			dt := t.Sub(tdb)
			return r3.Add(r3.Add(earth, r3.Scale(dt, earthVel)), MoonGeocentricICRS(t)), nil
		}
	}
	p, _, _, err := lightTime(helio, st, in.tdb)
	if err != nil {
		return horizon{}, err
	}
	ra, dec, _ := astro.Spherical(astro.ApparentDirection(p, st.vel, in.tt))
	gast := astro.GreenwichApparentSiderealTime(in.ut1, in.tt)
	ha := astro.LocalHourAngle(astro.LocalSiderealTime(gast, o.Site.Lon), ra)
	az, alt := astro.EquatorialToHorizontal(ha, dec, o.Site.Lat)
	return horizon{alt: alt, az: az, ha: ha, distAU: r3.Norm(p)}, warn
}

// helioOf returns the heliocentric ICRS position function of a body.
func helioOf(b Body) (target, error) {
	switch {
	case b == Sun:
		return target{helio: sunHelio}, nil
	case b == Moon:
		return target{helio: moonHelio, moon: true}, nil
	case b == Earth:
		return target{}, errors.New("ephem: the Earth does not rise or set for an observer on it")
	case b.IsPlanet():
		return target{helio: planetHelio(b)}, nil
	}
	return target{}, fmt.Errorf("ephem: %v is not a body", b)
}

// checkEventObserver rejects an observer without a site or with a bad one.
func checkEventObserver(o Observer) error {
	if o.Site == nil {
		return errors.New("ephem: rise, set and transit need a site, not the geocentre")
	}
	return checkObserver(o)
}

// riseSetOf finds the crossings of value(horizon) through threshold and
// turns them into events with the body's azimuth.
func riseSetOf(helio target, value func(horizon) float64, from, to astro.JD, o Observer, threshold astro.Angle) ([]Event, Visibility, error) {
	if err := checkEventObserver(o); err != nil {
		return nil, 0, err
	}
	s, sm, err := sampleSpan(func(t astro.JD) (float64, error) {
		h, err := horizonOf(helio, t, o)
		return value(h), err
	}, from, to, DefaultEventStepDays)
	if err != nil {
		return nil, 0, err
	}
	cs, err := crossingsOf(s, sm, float64(threshold))
	if err != nil {
		return nil, 0, err
	}
	ev, err := crossingEvents(helio, cs, from, o, threshold)
	if err != nil {
		return nil, 0, err
	}
	return ev, visibilityOf(sm, float64(threshold), len(cs)), s.warn
}

// crossingEvents turns crossings into events, with the azimuth at each.
func crossingEvents(helio target, cs []crossing, from astro.JD, o Observer, threshold astro.Angle) ([]Event, error) {
	ev := make([]Event, len(cs))
	for i, c := range cs {
		t := from.AddDays(c.x)
		h, err := horizonOf(helio, t, o)
		if err != nil && !isWarning(err) {
			return nil, err
		}
		ev[i] = Event{Kind: Set, Time: t, Alt: threshold, Az: h.az}
		if c.rising {
			ev[i].Kind = Rise
		}
	}
	return ev, nil
}

// RiseSet returns the rises and sets of the body b (the Sun, the Moon or a
// planet) seen by the observer o between from and to (UTC): the instants at
// which the geometric topocentric altitude of b's centre crosses h0, in time
// order, found by [Crossings]' method with 10-minute samples. h0 is Meeus'
// "standard altitude", the geometric altitude of the centre at the apparent
// rise or set; it carries the refraction: [StarRiseAltitude] (−0.5667°) for
// planets, [SunRiseAltitude] (−0.8333°) for the Sun, and see [MoonRiseSet]
// for the Moon's upper limb. o.NoRefraction and o's air are not used.
//
// When b does not cross h0 in the span, the slice is empty and the
// Visibility says whether b stays above (circumpolar, polar day) or below
// (polar night) it. Errors: a date not on the UTC scale or an empty span, an
// observer without a site or with a bad one, a body that is not the Sun, the
// Moon or a planet other than the Earth, a date outside VSOP87's span.
// Warnings (stale leap-second table) come with the events.
//
// Accuracy: the positions are those of [PlaceOfBody] (the Sun within 0.05″);
// against ERFA-computed altitudes bisected to 0.01 s (testdata/erfa_events.txt)
// sunrise, sunset and the twilights agree within 0.2 s over 154 nights (see the
// tests for the measured figure). The instant of a real sunrise depends on
// the actual refraction, up to minutes near the horizon.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 15 (h0, the
// definition of rise and set); the root finder as [Crossings].
func RiseSet(b Body, from, to astro.JD, o Observer, h0 astro.Angle) ([]Event, Visibility, error) {
	helio, err := helioOf(b)
	if err != nil {
		return nil, 0, err
	}
	return riseSetOf(helio, func(h horizon) float64 { return float64(h.alt) }, from, to, o, h0)
}

// moonLimbAltitude is the geometric topocentric altitude of the Moon's upper
// limb: the centre's altitude plus the topocentric semidiameter
// s = asin(k R⊕ / Δ), k = 0.2725, R⊕ = 6378.14 km, Δ the topocentric distance.
func moonLimbAltitude(h horizon) float64 {
	s := math.Asin(moonRadiusRatio * astro.IAU1976.EquatorialRadiusKm / (h.distAU * astro.AUKm))
	return float64(h.alt) + s
}

// MoonRiseSet returns the rises and sets of the Moon seen by the observer o
// between from and to (UTC), in time order: the instants at which the Moon's
// upper limb is on the horizon with the standard refraction, i.e. at which
//
//	h + s = −34′,   s = asin(k R⊕ / Δ),  k = 0.2725, R⊕ = 6378.14 km,
//
// with h the geometric topocentric altitude of the Moon's centre and Δ its
// topocentric distance (s is the topocentric semidiameter, 14.7′–16.8′).
// This is Meeus' h0 = 0.7275 π − 34′ taken to the topocentric altitude,
// where the parallax π is already included (Meeus: geocentric altitude, h0
// built from π and k). Event.Alt is the threshold −34′ of the limb.
// Visibility, errors and warnings as [RiseSet].
//
// Accuracy: the Moon of [MoonGeocentricICRS] (Meeus ch. 47, about 10″);
// against ERFA's moon98 (the same series) with the same definition,
// bisected to 0.01 s, within 0.05 s over 154 nights (see the tests).
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 15, p. 102
// (h0 of the Moon, k = 0.2725, 34′ of refraction); ch. 40 (topocentric
// place).
func MoonRiseSet(from, to astro.JD, o Observer) ([]Event, Visibility, error) {
	return riseSetOf(target{helio: moonHelio, moon: true}, moonLimbAltitude, from, to, o, StarRiseAltitude)
}

// Transits returns the upper and lower meridian transits of the body b seen
// by the observer o between from and to (UTC), in time order: the instants
// at which the topocentric apparent hour angle is 0 (Transit) or 12h
// (LowerTransit), with the geometric altitude and the azimuth there. The
// hour angle is sampled every 10 minutes; each pass of it through 0 or 12h
// (not the wrap from +12h to −12h) is refined as in [Crossings].
// Errors and warnings as [RiseSet].
//
// Accuracy: that of the positions ([PlaceOfBody]); against ERFA the Moon's
// transits agree within 0.05 s (see the tests).
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 15 (transit at
// hour angle 0) and ch. 13 (hour angle).
func Transits(b Body, from, to astro.JD, o Observer) ([]Event, error) {
	helio, err := helioOf(b)
	if err != nil {
		return nil, err
	}
	if err := checkEventObserver(o); err != nil {
		return nil, err
	}
	var out []Event
	var warn error
	for _, kind := range []EventKind{Transit, LowerTransit} {
		shift := astro.Angle(0)
		if kind == LowerTransit {
			shift = math.Pi
		}
		s, sm, err := sampleSpan(func(t astro.JD) (float64, error) {
			h, err := horizonOf(helio, t, o)
			return float64((h.ha - shift).Wrapped()), err
		}, from, to, DefaultEventStepDays)
		if err != nil {
			return nil, err
		}
		g := func(x float64) (float64, error) { return s.at(x) }
		for i := 0; i+1 < len(sm.xs); i++ {
			a, b := sm.vs[i], sm.vs[i+1]
			if !(a < 0 && b >= 0 && b-a < math.Pi) {
				continue
			}
			x, err := refineRoot(g, sm.xs[i], sm.xs[i+1], a, b)
			if err != nil {
				return nil, err
			}
			t := from.AddDays(x)
			h, err := horizonOf(helio, t, o)
			if err != nil && !isWarning(err) {
				return nil, err
			}
			out = append(out, Event{Kind: kind, Time: t, Alt: h.alt, Az: h.az})
		}
		if warn == nil {
			warn = s.warn
		}
	}
	sortEvents(out)
	return out, warn
}

// sortEvents sorts events by time (insertion sort: the lists are short).
func sortEvents(ev []Event) {
	for i := 1; i < len(ev); i++ {
		for j := i; j > 0 && ev[j].Time.Sub(ev[j-1].Time) < 0; j-- {
			ev[j], ev[j-1] = ev[j-1], ev[j]
		}
	}
}
