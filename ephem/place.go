package ephem

import (
	"errors"
	"fmt"
	"math"

	"arcfit/astro"

	"gonum.org/v1/gonum/spatial/r3"
)

// Observer says where and how a body is seen: from a site on the Earth or
// from the geocentre, with the Earth-rotation offset and the air for
// refraction.
type Observer struct {
	// Site is the observing site (geodetic WGS84); nil means the geocentre,
	// for which there is no horizon.
	Site *astro.Site
	// DUT1Sec is UT1 − UTC in seconds for the day (IERS Bulletin A); 0 gives
	// UT1 to within 0.9 s, an error of up to 13″ in hour angle. |DUT1Sec| ≤ 1.
	DUT1Sec float64
	// PressureHPa and TemperatureC are the air at the site for refraction.
	// A pressure of 0 selects the standard conditions, 1010 hPa and 10 °C
	// (astro.StandardPressureHPa, astro.StandardTemperatureC), for both.
	PressureHPa, TemperatureC float64
	// NoRefraction reports the geometric (airless) altitude in Place.Alt.
	NoRefraction bool
}

// NearSunLimit is the elongation from the Sun inside which a target is near
// the Sun: pointing a telescope there can blind an observer and destroy
// equipment (design.md, "Cautions the tool shows").
const NearSunLimit = 15 * astro.Degree

// Place is where a body is seen at one instant.
type Place struct {
	UTC astro.JD // the instant of observation, UTC
	TT  astro.JD // the same instant, TT

	// RA and Dec are the astrometric place: the direction of the body's
	// light-time-corrected position from the observer, ICRS axes, as measured
	// against a star catalogue (topocentric for a site).
	RA, Dec astro.Angle
	// RAApp and DecApp are the apparent place of date (true equator and
	// equinox of date): RA, Dec with aberration for the observer's velocity
	// (diurnal part included) and bias-precession-nutation.
	RAApp, DecApp astro.Angle

	// Topocentric is false for the geocentre; Alt and Az are then zero and
	// Airmass NaN.
	Topocentric bool
	// Alt is the altitude above the horizon, refracted unless the observer
	// asked for NoRefraction; Az the azimuth from north through east.
	Alt, Az astro.Angle
	// Airmass is the relative air mass for the refracted altitude (+Inf below
	// the horizon, NaN at the geocentre).
	Airmass float64

	DeltaAU       float64     // distance from the observer, au (at the light-time instant)
	RAU           float64     // distance from the Sun, au (at the light-time instant)
	PhaseAngle    astro.Angle // Sun–body–observer angle
	Elongation    astro.Angle // Sun–observer–body angle
	LightTimeDays float64     // light time from the body to the observer, days
	// MoonSeparation is the angle between the body and the Moon as seen by
	// the observer (astrometric places).
	MoonSeparation astro.Angle
	// Mag is the predicted visual magnitude, NaN when unknown.
	Mag float64
}

// NearSun reports whether the place is within [NearSunLimit] of the Sun.
// Callers should warn before pointing there.
func (p Place) NearSun() bool { return p.Elongation < NearSunLimit }

// lightTimeTolDays is the convergence tolerance of the light-time iteration.
const lightTimeTolDays = 1e-12

// maxLightTimeIter bounds the light-time iteration; it converges by a factor
// of about v/c ≈ 1e-4 per step, so 4 steps are usual.
const maxLightTimeIter = 30

// instant is one moment on the time scales the place needs.
type instant struct {
	utc, tt, tdb, ut1 astro.JD
}

// newInstant converts utc to TT, TDB and UT1. warn is a warning (stale
// leap-second table, UTC before 1972); err is fatal.
func newInstant(utc astro.JD, dut1Sec float64) (in instant, warn, err error) {
	if utc.Scale != astro.UTC {
		return instant{}, nil, fmt.Errorf("ephem: time %v is on the %v scale, want UTC: %w", utc, utc.Scale, astro.ErrRange)
	}
	if !(math.Abs(dut1Sec) <= 1) {
		return instant{}, nil, fmt.Errorf("ephem: UT1−UTC = %g s, want |UT1−UTC| ≤ 1 s: %w", dut1Sec, astro.ErrRange)
	}
	tt, err := astro.UTCToTT(utc)
	if err != nil {
		if !errors.Is(err, astro.ErrStaleTable) && !errors.Is(err, astro.ErrUTCBefore1972) {
			return instant{}, nil, fmt.Errorf("ephem: %w", err)
		}
		warn = err
	}
	return instant{utc: utc, tt: tt, tdb: astro.TTToTDB(tt), ut1: astro.UTCToUT1(utc, dut1Sec)}, warn, nil
}

// checkObserver reports an observer that cannot be used.
func checkObserver(o Observer) error {
	if s := o.Site; s != nil {
		switch {
		case !(math.Abs(float64(s.Lat)) <= math.Pi/2):
			return fmt.Errorf("ephem: site %q: latitude %g°, want −90° to 90°: %w", s.Name, s.Lat.Degrees(), astro.ErrRange)
		case math.IsNaN(float64(s.Lon)) || math.IsInf(float64(s.Lon), 0):
			return fmt.Errorf("ephem: site %q: longitude is not finite: %w", s.Name, astro.ErrRange)
		case !(s.HeightM >= -1000 && s.HeightM <= 20000):
			return fmt.Errorf("ephem: site %q: height %g m, want −1000 to 20000 m: %w", s.Name, s.HeightM, astro.ErrRange)
		}
	}
	if o.PressureHPa != 0 {
		if err := astro.CheckRefractionConditions(o.PressureHPa, o.TemperatureC); err != nil {
			return fmt.Errorf("ephem: %w", err)
		}
	}
	return nil
}

// observerState is the observer's barycentric state at one instant, with the
// Sun's, all in ICRS axes.
type observerState struct {
	pos, vel       r3.Vec // observer, barycentric
	sunPos, sunVel r3.Vec // Sun, barycentric
	earthVel       r3.Vec // Earth's centre, barycentric velocity
	geo            r3.Vec // observer from the Earth's centre
}

// skySource gives a place what it needs of the Earth, the Sun, the Moon and
// the equator of date at one instant. [seriesSky] computes each from its
// series; an ephemeris table interpolates them over a run of rows (see
// [EphemerisTable]).
type skySource interface {
	// earth is the Earth's heliocentric ICRS state, [HeliocentricICRS].
	earth(tdb astro.JD) (pos, vel r3.Vec, err error)
	// sun is the Sun's barycentric ICRS state, [SunBarycentricICRS].
	sun(tdb astro.JD) (pos, vel r3.Vec)
	// moon is the geocentric Moon, [MoonGeocentricICRS].
	moon(tt astro.JD) r3.Vec
	// npb is [astro.BiasPrecessionNutationMatrix].
	npb(tt astro.JD) astro.Mat3
	// site is the site's geocentric GCRS state, [astro.SitePositionGCRS].
	site(s astro.Site, ut1, tt astro.JD) (pos, vel r3.Vec)
	// gast is [astro.GreenwichApparentSiderealTime].
	gast(ut1, tt astro.JD) astro.Angle
}

// seriesSky computes every quantity of [skySource] from its series.
type seriesSky struct{}

func (seriesSky) earth(tdb astro.JD) (r3.Vec, r3.Vec, error) { return HeliocentricICRS(Earth, tdb) }
func (seriesSky) sun(tdb astro.JD) (r3.Vec, r3.Vec)          { return SunBarycentricICRS(tdb) }
func (seriesSky) moon(tt astro.JD) r3.Vec                    { return MoonGeocentricICRS(tt) }
func (seriesSky) npb(tt astro.JD) astro.Mat3                 { return astro.BiasPrecessionNutationMatrix(tt) }
func (seriesSky) site(s astro.Site, ut1, tt astro.JD) (r3.Vec, r3.Vec) {
	return astro.SitePositionGCRS(s, ut1, tt)
}
func (seriesSky) gast(ut1, tt astro.JD) astro.Angle {
	return astro.GreenwichApparentSiderealTime(ut1, tt)
}

// stateOf returns the observer's barycentric state at the instant in.
func stateOf(site *astro.Site, in instant) (observerState, error) {
	return stateWith(site, in, seriesSky{})
}

// stateWith is [stateOf] with the Earth, the Sun and the site from sky.
func stateWith(site *astro.Site, in instant, sky skySource) (observerState, error) {
	eh, ev, err := sky.earth(in.tdb)
	if err != nil {
		return observerState{}, err
	}
	sp, sv := sky.sun(in.tdb)
	st := observerState{pos: r3.Add(eh, sp), vel: r3.Add(ev, sv), sunPos: sp, sunVel: sv}
	st.earthVel = st.vel
	if site != nil {
		p, v := sky.site(*site, in.ut1, in.tt)
		st.geo = p
		st.pos = r3.Add(st.pos, p)
		st.vel = r3.Add(st.vel, v)
	}
	return st, nil
}

// lightTime iterates the light time τ for a body whose heliocentric ICRS
// position at a TDB instant is helio, seen from the observer state st at
// tdb. It returns p = X(t − τ) − O(t) (barycentric X), the heliocentric
// position h at t − τ and τ in days. The Sun's barycentric position at t − τ
// is taken as S(t) − τ·Ṡ(t) (its acceleration, about 1e-8 au/day², moves it
// by 5e-11 au in 0.1 d).
func lightTime(helio func(tdb astro.JD) (r3.Vec, error), st observerState, tdb astro.JD) (p, h r3.Vec, tau float64, err error) {
	for range maxLightTimeIter {
		h, err = helio(tdb.AddDays(-tau))
		if err != nil {
			return r3.Vec{}, r3.Vec{}, 0, err
		}
		x := r3.Add(h, r3.Sub(st.sunPos, r3.Scale(tau, st.sunVel)))
		p = r3.Sub(x, st.pos)
		next := r3.Norm(p) / astro.SpeedOfLightAUDay
		if !(next < 1e6) { // NaN, or beyond any body of the solar system
			return r3.Vec{}, r3.Vec{}, 0, fmt.Errorf("ephem: light time %g days: %w", next, astro.ErrRange)
		}
		done := math.Abs(next-tau) <= lightTimeTolDays
		tau = next
		if done {
			return p, h, tau, nil
		}
	}
	return r3.Vec{}, r3.Vec{}, 0, fmt.Errorf("ephem: light time did not converge to %g d in %d steps: %w", lightTimeTolDays, maxLightTimeIter, astro.ErrRange)
}

// sunHelio is the Sun's heliocentric position: the origin.
func sunHelio(astro.JD) (r3.Vec, error) { return r3.Vec{}, nil }

// angleBetween returns the angle between two non-zero vectors, accurate at
// every angle (atan2 of |a × b| and a·b).
func angleBetween(a, b r3.Vec) astro.Angle {
	return astro.Angle(math.Atan2(r3.Norm(r3.Cross(a, b)), r3.Dot(a, b)))
}

// TopocentricAstrometricDirection returns the astrometric direction of a body
// seen from site (nil: the geocentre) at the instant utc: the unit vector of
//
//	X(t − τ) − O(t),   τ = |X(t − τ) − O(t)|/c  (iterated to 1e-12 d)
//
// in ICRS axes, with X the body's barycentric position (helioPosAtTDB, its
// heliocentric ICRS position in au at a TDB instant, plus the Sun's offset of
// [SunBarycentricICRS]) and O the observer's (the Earth's VSOP87 position,
// [EarthBarycentricICRS], plus the site's geocentric position,
// [astro.SitePositionGCRS], with UT1 = UTC + dut1Sec). No aberration, no light
// deflection. It also returns the distance deltaAU = |X(t − τ) − O(t)| and τ
// in days. This is the vector form the orbit fitter differentiates.
//
// Errors: utc not a UTC date, |dut1Sec| > 1, a date outside the VSOP87 span,
// an error of helioPosAtTDB, or a light time that does not converge. A
// warning (leap-second table stale, UTC before 1972 read as UT) comes with a
// valid result and wraps [astro.ErrStaleTable] or [astro.ErrUTCBefore1972].
//
// Accuracy: that of the Earth's VSOP87 position (within 1.9e-7 au of ERFA's
// epv00, see [HeliocentricICRS]), which subtends about 0.02″/Δ (Δ in au) at
// worst in practice: against an ERFA computation with epv00 and the same
// two-body positions the astrometric place agrees to 0.032″ for Δ ≥ 1 au and
// 0.096″ at Δ = 0.23 au (measured in the tests).
//
// Reference: Explanatory Supplement to the Astronomical Almanac (2013), ch. 7
// (astrometric place, light time); Meeus, Astronomical Algorithms, 2nd ed.,
// ch. 33 (light-time iteration).
func TopocentricAstrometricDirection(helioPosAtTDB func(tdb astro.JD) (r3.Vec, error), utc astro.JD, site *astro.Site, dut1Sec float64) (dir r3.Vec, deltaAU, tauDays float64, err error) {
	if err := checkObserver(Observer{Site: site}); err != nil {
		return r3.Vec{}, 0, 0, err
	}
	in, warn, err := newInstant(utc, dut1Sec)
	if err != nil {
		return r3.Vec{}, 0, 0, err
	}
	st, err := stateOf(site, in)
	if err != nil {
		return r3.Vec{}, 0, 0, err
	}
	p, _, tau, err := lightTime(helioPosAtTDB, st, in.tdb)
	if err != nil {
		return r3.Vec{}, 0, 0, err
	}
	d := r3.Norm(p)
	return r3.Scale(1/d, p), d, tau, warn
}

// Astrometric returns the place of a body seen by the observer o at the
// instant utc, the body given by its heliocentric ICRS position (au) at a TDB
// instant, helioTarget. It is the common part of [PlaceOfBody] and
// [PlaceOfElements]; Mag is NaN.
//
// The steps:
//
//   - times: TT from UTC (leap seconds; before 1972 UTC is read as UT and
//     ΔT is used), TDB = TT + the periodic terms, UT1 = UTC + o.DUT1Sec;
//   - the observer's barycentric position and velocity O, Ȯ: the Earth from
//     VSOP87 with the Sun's barycentric offset ([EarthBarycentricICRS]) and the
//     site ([astro.SitePositionGCRS]; no polar motion);
//   - the astrometric place: the direction of X(t − τ) − O(t), τ iterated to
//     1e-12 d (see [TopocentricAstrometricDirection]);
//   - the apparent place: annual and diurnal aberration for Ȯ
//     ([astro.Aberration], relativistic), then bias-precession-nutation of
//     date ([astro.ApparentDirection]); no light deflection (up to 0.004″ at
//     45° from the Sun, 1.75″ at its limb);
//   - alt/az: hour angle from Greenwich apparent sidereal time and the site's
//     longitude, [astro.EquatorialToHorizontal] (Meeus eqs. 13.5, 13.6), then,
//     unless o.NoRefraction, Saemundsson's refraction for the observer's air
//     ([astro.RefractionSaemundsson], Meeus eq. 16.5). The refraction is faded
//     linearly to zero between true altitudes −1° and −5° (our own choice, so
//     that bodies well below the horizon keep their geometric altitude);
//     Airmass from [astro.AirmassKastenYoung] at the refracted altitude
//     (refracted even when o.NoRefraction is set);
//   - RAU = |h(t − τ)|, DeltaAU = |X(t − τ) − O(t)|; PhaseAngle at the body
//     between the directions to the Sun and to the observer; Elongation at
//     the observer between the astrometric Sun (itself light-time corrected)
//     and the body. For the Sun itself both are 0;
//   - MoonSeparation: the angle between the body and the Moon's astrometric
//     place ([MoonGeocentricICRS], light time included), good to the Moon
//     series' 10″.
//
// Errors and warnings as [TopocentricAstrometricDirection], and an observer
// with a latitude outside ±90°, a height outside −1 km…20 km or implausible
// air (see [astro.CheckRefractionConditions]).
//
// Accuracy (against ERFA, testdata/erfa_places.txt; see the tests): for
// element-set bodies (the same two-body positions) the astrometric and
// apparent places, the unrefracted altitude and the azimuth within 0.1″ for
// Δ ≥ 0.23 au (0.03″ for Δ ≥ 1 au; the Earth's position error over Δ
// below that); the refraction about 5 % above ERFA's refco model.
//
// Reference: Explanatory Supplement to the Astronomical Almanac (2013),
// ch. 7; Meeus, Astronomical Algorithms, 2nd ed., ch. 13, 16, 33 and 41
// (phase angle and elongation).
func Astrometric(helioTarget func(tdb astro.JD) (r3.Vec, error), utc astro.JD, o Observer) (Place, error) {
	return astrometricWith(helioTarget, utc, o, seriesSky{})
}

// astrometricWith is [Astrometric] with the Earth, the Sun, the Moon and the
// equator of date from sky.
func astrometricWith(helioTarget func(tdb astro.JD) (r3.Vec, error), utc astro.JD, o Observer, sky skySource) (Place, error) {
	if err := checkObserver(o); err != nil {
		return Place{}, err
	}
	in, warn, err := newInstant(utc, o.DUT1Sec)
	if err != nil {
		return Place{}, err
	}
	pl, err := placeWith(helioTarget, in, o, sky)
	if err != nil {
		return Place{}, err
	}
	return pl, warn
}

// placeAt computes the place for the instant in (which may come without a
// UTC, for the geocentre).
func placeAt(helioTarget func(tdb astro.JD) (r3.Vec, error), in instant, o Observer) (Place, error) {
	return placeWith(helioTarget, in, o, seriesSky{})
}

// placeWith is placeAt with the Earth, the Sun, the Moon and the equator of
// date from sky.
func placeWith(helioTarget func(tdb astro.JD) (r3.Vec, error), in instant, o Observer, sky skySource) (Place, error) {
	st, err := stateWith(o.Site, in, sky)
	if err != nil {
		return Place{}, err
	}
	p, h, tau, err := lightTime(helioTarget, st, in.tdb)
	if err != nil {
		return Place{}, err
	}
	pl := Place{UTC: in.utc, TT: in.tt, LightTimeDays: tau, Mag: math.NaN(), Airmass: math.NaN()}
	pl.DeltaAU = r3.Norm(p)
	pl.RAU = r3.Norm(h)
	pl.RA, pl.Dec, _ = astro.Spherical(p)
	// astro.ApparentDirection, with the matrix from sky
	app := sky.npb(in.tt).MulVec(astro.Aberration(p, st.vel))
	pl.RAApp, pl.DecApp, _ = astro.Spherical(app)

	if pl.RAU > 0 {
		ps, _, _, err := lightTime(sunHelio, st, in.tdb)
		if err != nil {
			return Place{}, err
		}
		pl.Elongation = angleBetween(ps, p)
		pl.PhaseAngle = angleBetween(r3.Scale(-1, h), r3.Scale(-1, p))
	}
	pl.MoonSeparation = angleBetween(moonSeen(st, in.tt, sky), p)
	if o.Site != nil {
		pl.Topocentric = true
		gast := sky.gast(in.ut1, in.tt)
		ha := astro.LocalHourAngle(astro.LocalSiderealTime(gast, o.Site.Lon), pl.RAApp)
		az, alt := astro.EquatorialToHorizontal(ha, pl.DecApp, o.Site.Lat)
		refracted := alt + refraction(alt, o)
		pl.Az, pl.Alt = az, refracted
		if o.NoRefraction {
			pl.Alt = alt
		}
		pl.Airmass = astro.AirmassKastenYoung(refracted)
	}
	return pl, nil
}

// moonSeen returns the vector from the observer to the Moon's astrometric
// position, light time included: with the geocentric Moon m of
// [MoonGeocentricICRS] and τ = |m − g|/c,
//
//	m(t − τ) − τ·Ė − g
//
// (g the observer's geocentric position, Ė the Earth's barycentric velocity;
// the Earth's acceleration over 1.3 s is negligible).
func moonSeen(st observerState, tt astro.JD, sky skySource) r3.Vec {
	tau := r3.Norm(r3.Sub(sky.moon(tt), st.geo)) / astro.SpeedOfLightAUDay
	m := sky.moon(tt.AddDays(-tau))
	return r3.Sub(r3.Sub(m, r3.Scale(tau, st.earthVel)), st.geo)
}

// refraction returns the refraction to add to the true altitude alt for the
// observer's air (standard conditions when o.PressureHPa is 0), faded to zero
// between −1° and −5°.
func refraction(alt astro.Angle, o Observer) astro.Angle {
	p, t := o.PressureHPa, o.TemperatureC
	if p == 0 {
		p, t = astro.StandardPressureHPa, astro.StandardTemperatureC
	}
	const lo, hi = -5 * astro.Degree, -1 * astro.Degree
	switch {
	case alt <= lo:
		return 0
	case alt < hi:
		return astro.RefractionSaemundsson(hi, p, t) * (alt - lo) / (hi - lo)
	}
	return astro.RefractionSaemundsson(alt, p, t)
}

// PlaceOfBody returns the place of the body b (the Sun, the Moon, or a planet
// from Mercury to Neptune) seen by the observer o at the instant utc:
// [Astrometric] with b's VSOP87 position ([HeliocentricICRS]), or for the Moon
// the Earth's plus [MoonGeocentricICRS]. Mag is NaN. The Earth is refused.
//
// Accuracy (against ERFA, see the tests): the Sun's astrometric and apparent
// places within 0.05″ of epv00; the planets that of VSOP87 (Venus within
// 0.002 s and 0.001″ of Meeus' example 33.a; ERFA's plan94, good only to
// 4″–87″ heliocentric, agrees within its stated errors); the Moon that of
// Meeus' ch. 47 series (about 10″). Against JPL DE405 (geocentric, 200
// instants 1960–2060, ephem/testdata/de405_places.txt) the Sun's astrometric
// and apparent places are within 0.04″, and the planets' astrometric and
// apparent places within 0.06″ (Mercury, Venus), 0.09″ (Mars), 0.26″
// (Jupiter), 0.40″ (Saturn), 1.7″ (Uranus) and 3.2″ (Neptune, above 2″ from
// about 2034, an error of the DE200 orbit VSOP87 was fitted to; see
// [HeliocentricEclipticJ2000]).
//
// Reference: as [Astrometric]; Bretagnon & Francou (1988) for VSOP87.
func PlaceOfBody(b Body, utc astro.JD, o Observer) (Place, error) {
	return placeOfBodyWith(b, utc, o, seriesSky{})
}

// placeOfBodyWith is [PlaceOfBody] with the Earth, the Sun, the Moon and the
// equator of date from sky.
func placeOfBodyWith(b Body, utc astro.JD, o Observer, sky skySource) (Place, error) {
	switch {
	case b == Sun:
		return astrometricWith(sunHelio, utc, o, sky)
	case b == Earth:
		return Place{}, fmt.Errorf("ephem: the place of the Earth seen from the Earth is not defined")
	case b.IsPlanet():
		return astrometricWith(planetHelio(b), utc, o, sky)
	case b == Moon:
		return astrometricWith(moonHelioWith(sky), utc, o, sky)
	}
	return Place{}, fmt.Errorf("ephem: PlaceOfBody: %v is not a body", b)
}

// planetHelio returns the heliocentric ICRS position function of planet b.
func planetHelio(b Body) func(astro.JD) (r3.Vec, error) {
	return func(tdb astro.JD) (r3.Vec, error) {
		p, _, err := HeliocentricICRS(b, tdb)
		return p, err
	}
}

// moonHelio is the Moon's heliocentric ICRS position: the Earth's
// ([HeliocentricICRS]) plus the geocentric Moon ([MoonGeocentricICRS], its TT
// argument given the TDB date; the 2 ms difference moves the Moon by 2 mas).
func moonHelio(tdb astro.JD) (r3.Vec, error) {
	e, _, err := HeliocentricICRS(Earth, tdb)
	if err != nil {
		return r3.Vec{}, err
	}
	return r3.Add(e, MoonGeocentricICRS(ttScaled(tdb))), nil
}

// moonHelioWith is [moonHelio] with the Earth and the Moon from sky.
func moonHelioWith(sky skySource) func(astro.JD) (r3.Vec, error) {
	return func(tdb astro.JD) (r3.Vec, error) {
		e, _, err := sky.earth(tdb)
		if err != nil {
			return r3.Vec{}, err
		}
		return r3.Add(e, sky.moon(ttScaled(tdb))), nil
	}
}

// elementsHelio returns the heliocentric ICRS position function of an element
// set: [Elements.StateAt] turned from the ecliptic J2000 by
// [EclipticJ2000ToICRS].
func elementsHelio(el Elements) func(astro.JD) (r3.Vec, error) {
	if el.Validate() != nil {
		return func(tdb astro.JD) (r3.Vec, error) {
			p, _, err := el.StateAt(tdb)
			return EclipticJ2000ToICRS.MulVec(p), err
		}
	}
	// A valid set: StateAt without checking it again at every step of the
	// light-time iteration, and with its Gaussian vectors computed once.
	gp, gq := gaussianVectors(el.I, el.Node, el.Peri)
	return func(tdb astro.JD) (r3.Vec, error) {
		if !tbDynamicalDate(tdb) {
			p, _, err := el.StateAt(tdb)
			return EclipticJ2000ToICRS.MulVec(p), err
		}
		p, _, err := el.stateIn(tdb, gp, gq)
		return EclipticJ2000ToICRS.MulVec(p), err
	}
}

// DefaultSlopeG is the slope parameter taken when an element set has an
// absolute magnitude H but no G: 0.15, the value adopted with the H, G system
// for asteroids of unknown slope (Bowell et al. 1989; common practice).
const DefaultSlopeG = 0.15

// PlaceOfElements returns the place of the body with the heliocentric
// osculating elements el (ecliptic and equinox J2000, two-body motion,
// [Elements.StateAt]) seen by the observer o at the instant utc: [Astrometric]
// with the position turned to ICRS axes by [EclipticJ2000ToICRS]. Mag is the
// H, G magnitude ([AsteroidMagnitudeHG]) when el.H is known (el.G, or
// [DefaultSlopeG] when G is NaN), else NaN.
//
// Errors: those of [Astrometric] and of [Elements.Validate].
//
// Accuracy: against an independent two-body ERFA computation (see the tests),
// for e = 0.2, 0.6, 0.97 and 1, within 0.032″ in the astrometric place for
// Δ ≥ 1 au and 0.096″ at Δ = 0.23 au (see [Astrometric]).
//
// Reference: as [Astrometric]; Meeus, Astronomical Algorithms, 2nd ed.,
// ch. 33 (elliptic motion, light time).
func PlaceOfElements(el Elements, utc astro.JD, o Observer) (Place, error) {
	return placeOfElementsWith(el, utc, o, seriesSky{})
}

// placeOfElementsWith is [PlaceOfElements] with the Earth, the Sun, the Moon
// and the equator of date from sky.
func placeOfElementsWith(el Elements, utc astro.JD, o Observer, sky skySource) (Place, error) {
	if err := el.Validate(); err != nil {
		return Place{}, err
	}
	pl, err := astrometricWith(elementsHelio(el), utc, o, sky)
	if err != nil && pl.DeltaAU == 0 {
		return Place{}, err
	}
	pl.Mag = elementsMagnitude(el, pl)
	return pl, err
}

// elementsMagnitude is the H, G magnitude of an element set at a place.
func elementsMagnitude(el Elements, pl Place) float64 {
	if math.IsNaN(el.H) || math.IsInf(el.H, 0) {
		return math.NaN()
	}
	g := el.G
	if math.IsNaN(g) {
		g = DefaultSlopeG
	}
	return AsteroidMagnitudeHG(el.H, g, pl.RAU, pl.DeltaAU, pl.PhaseAngle)
}
