package ephem

import (
	"errors"
	"fmt"
	"math"
	"runtime"
	"sync"
	"sync/atomic"

	"arcfit/astro"

	"gonum.org/v1/gonum/spatial/r3"
)

// MaxTableRows is the most rows [EphemerisTable] computes in one call: a
// million rows (a year at 30-second steps) is beyond any sensible table and
// far more often a step typed in the wrong unit.
const MaxTableRows = 1_000_000

// Span of the ephemeris tables: arcfit's supported span (design.md, "Input
// formats": 1800–2200), as UTC Julian dates of 1800 January 1 0h and 2201
// January 1 0h (python3-erfa 2.0.0.1, erfa.cal2jd(1800,1,1) = 2400000.5 −
// 21504, erfa.cal2jd(2201,1,1) = 2400000.5 + 124958). Inside it every body
// of the package is computed within its stated accuracy; before 1972 UTC is
// read as UT.
const (
	TableFirstJD = 2378496.5
	TableLastJD  = 2524958.5
)

// TableTarget is what an ephemeris table is made for: a body of the solar
// system, or, when Elements is not nil, the body with those orbital elements.
type TableTarget struct {
	Body     Body      // Sun, Moon, or Mercury…Neptune; used when Elements is nil
	Elements *Elements // an element set; takes precedence over Body
}

// Name returns the target's name: the body's English name or the element
// set's name.
func (t TableTarget) Name() string {
	if t.Elements != nil {
		return t.Elements.Name
	}
	return t.Body.String()
}

// PlaceAt returns the target's place seen by o at the instant utc:
// [PlaceOfElements] for an element set, else [PlaceOfBody]. Errors and
// warnings are theirs.
func (t TableTarget) PlaceAt(utc astro.JD, o Observer) (Place, error) {
	if t.Elements != nil {
		return PlaceOfElements(*t.Elements, utc, o)
	}
	return PlaceOfBody(t.Body, utc, o)
}

// TableTimes returns the instants of a table from from to to (UTC) at steps
// of stepDays days: from + k·stepDays for k = 0, 1, … while the instant is not
// after to (a last step that overshoots to by less than 1e-9 d, 86 µs, from
// rounding counts as reaching it). Each instant is computed from from, not
// by summing steps, so no error accumulates. The steps are of the UTC Julian
// date, so on a day with a leap second a step of n seconds lasts n of the
// day's 86401 seconds × 86400/86401; a step of whole days always lands at the
// same time of day.
//
// Errors: from or to not UTC, not finite, or outside the table span
// [TableFirstJD, TableLastJD) (wrapping [astro.ErrUnsupportedDate]); to
// before from; stepDays ≤ 0 or not finite; more than [MaxTableRows] rows (all
// wrapping [astro.ErrRange]).
func TableTimes(from, to astro.JD, stepDays float64) ([]astro.JD, error) {
	if from.Scale != astro.UTC || to.Scale != astro.UTC {
		return nil, fmt.Errorf("ephem: table times on the %v and %v scales, want UTC: %w", from.Scale, to.Scale, astro.ErrRange)
	}
	for _, j := range []astro.JD{from, to} {
		if v := j.Float(); !(v >= TableFirstJD && v < TableLastJD) {
			return nil, fmt.Errorf("ephem: %s is outside the span of the ephemerides, 1800-01-01 to 2201-01-01 UTC: %w",
				astro.FormatISO8601(j, 0), astro.ErrUnsupportedDate)
		}
	}
	span := to.Sub(from)
	switch {
	case span < 0:
		return nil, fmt.Errorf("ephem: the table ends (%s) before it starts (%s): %w",
			astro.FormatISO8601(to, 0), astro.FormatISO8601(from, 0), astro.ErrRange)
	case !(stepDays > 0) || math.IsInf(stepDays, 0):
		return nil, fmt.Errorf("ephem: step of %g days, want a step > 0: %w", stepDays, astro.ErrRange)
	}
	const slackDays = 1e-9
	steps := math.Floor((span + slackDays) / stepDays)
	if steps+1 > MaxTableRows {
		return nil, fmt.Errorf("ephem: %.0f rows from %s to %s at steps of %g d, more than the %d a table may have: %w",
			steps+1, astro.FormatISO8601(from, 0), astro.FormatISO8601(to, 0), stepDays, MaxTableRows, astro.ErrRange)
	}
	n := int(steps) + 1
	times := make([]astro.JD, n)
	for k := range times {
		times[k] = from.AddDays(float64(k) * stepDays).Normalized()
	}
	return times, nil
}

// EphemerisTable returns the places of target seen by the observer o at the
// instants of [TableTimes](from, to, stepDays), one [Place] a row, in time
// order.
//
// The rows are computed on a worker per core (runtime.GOMAXPROCS(0)), each
// row from its own instant, so the table does not depend on the number of
// workers. Where the rows are dense (at least tableSkyMinRows rows within a
// run of tableSkyDays days) the quantities that every row needs and that
// change slowly — the Earth's heliocentric state, the Sun's barycentric
// state, the geocentric Moon, the bias-precession-nutation matrix and the
// equation of the equinoxes — are computed at the tableSkyNodes Chebyshev
// nodes of the run and interpolated at each row (Chebyshev interpolation,
// Press et al., Numerical Recipes, 3rd ed. (2007), §5.8, eqs. 5.8.7–5.8.8;
// the method of the JPL ephemerides). The interpolation departs from the
// series by parts in 1e-15 of the Earth's position (see the tests), far
// below every accuracy stated here; sparser rows are computed from the
// series directly, as [TableTarget.PlaceAt] does.
//
// The errors are those of TableTimes and of the target's place
// ([PlaceOfBody], [PlaceOfElements]); the first fatal one (in row order) ends
// the table and no places are returned. A warning — the leap-second table
// stale past its date, or UTC before 1972 read as UT — does not: the places
// are all returned with the first such warning as err, which then wraps
// [astro.ErrStaleTable] or [astro.ErrUTCBefore1972]; test with errors.Is.
//
// Accuracy: that of the places (see [Astrometric], [PlaceOfBody],
// [PlaceOfElements]); the table adds nothing.
func EphemerisTable(target TableTarget, from, to astro.JD, stepDays float64, o Observer) ([]Place, error) {
	if target.Elements == nil && target.Body != Sun && target.Body != Moon && (!target.Body.IsPlanet() || target.Body == Earth) {
		return nil, fmt.Errorf("ephem: no table for %v: want the Sun, the Moon, a planet other than the Earth, or an element set", target.Body)
	}
	if target.Elements != nil {
		if err := target.Elements.Validate(); err != nil {
			return nil, err
		}
	}
	times, err := TableTimes(from, to, stepDays)
	if err != nil {
		return nil, err
	}
	places := make([]Place, len(times))
	runs := tableRuns(times)
	workers := max(1, min(runtime.GOMAXPROCS(0), len(runs)))
	var next atomic.Int64
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				k := int(next.Add(1)) - 1
				if k >= len(runs) {
					return
				}
				runs[k].compute(target, times, o, places)
			}
		}()
	}
	wg.Wait()
	var warn error
	for _, r := range runs {
		if r.fatal != nil {
			return nil, r.fatal
		}
		if warn == nil {
			warn = r.warn
		}
	}
	return places, warn
}

// placeWith is [TableTarget.PlaceAt] with the Earth, the Sun, the Moon and the
// equator of date from sky.
func (t TableTarget) placeWith(utc astro.JD, o Observer, sky skySource) (Place, error) {
	if t.Elements != nil {
		return placeOfElementsWith(*t.Elements, utc, o, sky)
	}
	return placeOfBodyWith(t.Body, utc, o, sky)
}

// The interpolation of a table's sky (see [EphemerisTable]). A run of rows
// spans at most tableSkyDays days; the quantities are sampled at
// tableSkyNodes Chebyshev nodes over it. The fastest motion they hold is the
// Moon's (about 1 rad/day in its largest short-period terms): the error of
// the degree-16 interpolant over 8 days is then below 1e-16 of the values
// (Press et al. 2007, §5.8, the truncation bound), and a run of 51 or more
// rows costs less than computing its rows from the series.
const (
	tableSkyDays    = 8.0
	tableSkyNodes   = 17
	tableSkyMinRows = 3 * tableSkyNodes
	// tableSkyMarginDays widens the interpolated span beyond the first and
	// last rows: the Moon is taken at the row's instant less its light time
	// (under 1.4 s), and TDB departs from TT by under 2 ms.
	tableSkyMarginDays = 1e-4
)

// tableRun is a run of consecutive rows [lo, hi) of a table, computed by one
// worker, with the first fatal error and the first warning of its rows.
type tableRun struct {
	lo, hi      int
	fatal, warn error
}

// tableMinRuns is the number of runs a large table is cut into at least, so
// that the workers share it; it does not depend on their number, so neither
// does the table.
const tableMinRuns = 16

// tableRuns cuts the instants into runs of at most tableSkyDays days and at
// most a tableMinRuns-th of the rows (but no fewer than 4·tableSkyMinRows).
func tableRuns(times []astro.JD) []tableRun {
	n := len(times)
	maxRows := max(4*tableSkyMinRows, (n+tableMinRuns-1)/tableMinRuns)
	var runs []tableRun
	for i := 0; i < n; {
		j := i + 1
		for j < n && j-i < maxRows && times[j].Sub(times[i]) < tableSkyDays {
			j++
		}
		runs = append(runs, tableRun{lo: i, hi: j})
		i = j
	}
	return runs
}

// compute fills places[r.lo:r.hi] and records the run's errors.
func (r *tableRun) compute(target TableTarget, times []astro.JD, o Observer, places []Place) {
	var sky skySource = seriesSky{}
	if r.hi-r.lo >= tableSkyMinRows {
		first, err1 := astro.UTCToTT(times[r.lo])
		last, err2 := astro.UTCToTT(times[r.hi-1])
		if usableTT(err1) && usableTT(err2) {
			if cs, err := newChebSky(first, -tableSkyMarginDays, last.Sub(first)+tableSkyMarginDays); err == nil {
				sky = cs
			}
		}
	}
	for i := r.lo; i < r.hi; i++ {
		p, err := target.placeWith(times[i], o, sky)
		if err != nil {
			if !errors.Is(err, astro.ErrStaleTable) && !errors.Is(err, astro.ErrUTCBefore1972) {
				r.fatal = err
				return
			}
			if r.warn == nil {
				r.warn = err
			}
		}
		places[i] = p
	}
}

// usableTT reports whether a TT from astro.UTCToTT came with no error or a
// warning only.
func usableTT(err error) bool {
	return err == nil || errors.Is(err, astro.ErrStaleTable) || errors.Is(err, astro.ErrUTCBefore1972)
}

// The quantities chebSky interpolates, in its coefficient array.
const (
	skyEarthPos = 0  // 3: Earth heliocentric position (HeliocentricICRS)
	skyEarthVel = 3  // 3: its velocity
	skySunPos   = 6  // 3: Sun barycentric position (SunBarycentricICRS)
	skySunVel   = 9  // 3: its velocity
	skyMoon     = 12 // 3: geocentric Moon (MoonGeocentricICRS)
	skyNPB      = 15 // 9: bias-precession-nutation matrix, row by row
	skyEqEq     = 24 // 1: equation of the equinoxes, radians
	skyCount    = 25
)

// chebSky is a [skySource] that interpolates over a span of days lo…hi from
// ref (days of TDB for the Earth and the Sun, of TT for the rest; the scale
// of ref is not used). An instant outside the span is computed from the
// series ([seriesSky]).
type chebSky struct {
	ref    astro.JD
	lo, hi float64
	c      [skyCount][tableSkyNodes]float64
}

// newChebSky samples the quantities at the Chebyshev nodes of the span and
// turns the samples into Chebyshev coefficients:
//
//	x_k = cos(π(k + ½)/N),  c_j = (2/N) Σ_k f(x_k) cos(πj(k + ½)/N)
//
// (N = tableSkyNodes; c_0 halved, so that f(x) ≈ Σ_j c_j T_j(x)), Press et
// al., Numerical Recipes, 3rd ed. (2007), §5.8, eq. 5.8.7. Errors: those of
// [HeliocentricICRS] at a node.
func newChebSky(ref astro.JD, lo, hi float64) (*chebSky, error) {
	const n = tableSkyNodes
	c := &chebSky{ref: ref, lo: lo, hi: hi}
	var f [skyCount][n]float64
	for k := range n {
		x := math.Cos(math.Pi * (float64(k) + 0.5) / n)
		d := 0.5*(lo+hi) + 0.5*(hi-lo)*x
		tdb := astro.JD{Day: ref.Day, Frac: ref.Frac + d, Scale: astro.TDB}.Normalized()
		tt := astro.JD{Day: ref.Day, Frac: ref.Frac + d, Scale: astro.TT}.Normalized()
		ep, ev, err := HeliocentricICRS(Earth, tdb)
		if err != nil {
			return nil, err
		}
		sp, sv := SunBarycentricICRS(tdb)
		m := MoonGeocentricICRS(tt)
		for q, v := range []r3.Vec{ep, ev, sp, sv, m} {
			f[3*q][k], f[3*q+1][k], f[3*q+2][k] = v.X, v.Y, v.Z
		}
		npb := astro.BiasPrecessionNutationMatrix(tt)
		for i := range 3 {
			for j := range 3 {
				f[skyNPB+3*i+j][k] = npb[i][j]
			}
		}
		f[skyEqEq][k] = float64(astro.EquationOfEquinoxes(tt))
	}
	for j := range n {
		var cos [n]float64
		for k := range n {
			cos[k] = math.Cos(math.Pi * float64(j) * (float64(k) + 0.5) / n)
		}
		scale := 2.0 / n
		if j == 0 {
			scale = 1.0 / n
		}
		for q := range skyCount {
			var s float64
			for k := range n {
				s += f[q][k] * cos[k]
			}
			c.c[q][j] = scale * s
		}
	}
	return c, nil
}

// basis sets t to the Chebyshev polynomials T_0…T_{N−1} at the instant j
// (T_{k+1} = 2x·T_k − T_{k−1}); false when j lies outside the span.
func (c *chebSky) basis(j astro.JD, t *[tableSkyNodes]float64) bool {
	d := (j.Day - c.ref.Day) + (j.Frac - c.ref.Frac)
	x := (2*d - (c.lo + c.hi)) / (c.hi - c.lo)
	if !(math.Abs(x) <= 1) {
		return false
	}
	t[0], t[1] = 1, x
	for k := 2; k < tableSkyNodes; k++ {
		t[k] = 2*x*t[k-1] - t[k-2]
	}
	return true
}

// value returns quantity q with the basis t (highest degree first).
func (c *chebSky) value(q int, t *[tableSkyNodes]float64) float64 {
	var s float64
	for k := tableSkyNodes - 1; k >= 0; k-- {
		s += c.c[q][k] * t[k]
	}
	return s
}

func (c *chebSky) vec(q int, t *[tableSkyNodes]float64) r3.Vec {
	return r3.Vec{X: c.value(q, t), Y: c.value(q+1, t), Z: c.value(q+2, t)}
}

func (c *chebSky) earth(tdb astro.JD) (r3.Vec, r3.Vec, error) {
	var t [tableSkyNodes]float64
	if !c.basis(tdb, &t) {
		return seriesSky{}.earth(tdb)
	}
	return c.vec(skyEarthPos, &t), c.vec(skyEarthVel, &t), nil
}

func (c *chebSky) sun(tdb astro.JD) (r3.Vec, r3.Vec) {
	var t [tableSkyNodes]float64
	if !c.basis(tdb, &t) {
		return seriesSky{}.sun(tdb)
	}
	return c.vec(skySunPos, &t), c.vec(skySunVel, &t)
}

func (c *chebSky) moon(tt astro.JD) r3.Vec {
	var t [tableSkyNodes]float64
	if !c.basis(tt, &t) {
		return seriesSky{}.moon(tt)
	}
	return c.vec(skyMoon, &t)
}

func (c *chebSky) npb(tt astro.JD) astro.Mat3 {
	var t [tableSkyNodes]float64
	if !c.basis(tt, &t) {
		return seriesSky{}.npb(tt)
	}
	var m astro.Mat3
	for i := range 3 {
		for j := range 3 {
			m[i][j] = c.value(skyNPB+3*i+j, &t)
		}
	}
	return m
}

// gast is GMST + the interpolated equation of the equinoxes, the sum of
// [astro.GreenwichApparentSiderealTime].
func (c *chebSky) gast(ut1, tt astro.JD) astro.Angle {
	var t [tableSkyNodes]float64
	if !c.basis(tt, &t) {
		return seriesSky{}.gast(ut1, tt)
	}
	return (astro.GreenwichMeanSiderealTime(ut1, tt) + astro.Angle(c.value(skyEqEq, &t))).Normalized()
}

// site is the formula of [astro.SitePositionGCRS] with the interpolated
// matrix and sidereal time.
func (c *chebSky) site(s astro.Site, ut1, tt astro.JD) (r3.Vec, r3.Vec) {
	r := s.ITRS()
	m := c.npb(tt).T().Mul(astro.RotZ(-c.gast(ut1, tt)))
	w := astro.EarthRotationRadPerDay
	return m.MulVec(r), m.MulVec(r3.Vec{X: -w * r.Y, Y: w * r.X, Z: 0})
}
