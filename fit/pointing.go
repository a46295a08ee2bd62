package fit

import (
	"errors"
	"fmt"

	"arcfit/astro"
	"arcfit/ephem"
)

// Pointing is where a predicted position stands in the observer's sky and how
// far it is from the Sun.
type Pointing struct {
	// Topocentric is false for a geocentric prediction; Alt and Az are then
	// zero.
	Topocentric bool
	// Alt is the altitude refracted for standard conditions (10 °C,
	// 1010 hPa), Az the azimuth from north through east, [0, 2π).
	Alt, Az astro.Angle
	// SunElongation is the angle between the predicted position and the
	// Sun's astrometric place seen by the same observer; SunAlt the Sun's
	// refracted altitude (zero at the geocentre).
	SunElongation astro.Angle
	SunAlt        astro.Angle
	// NearSun reports SunElongation < ephem.NearSunLimit (15°): pointing
	// there can blind an observer and destroy equipment.
	NearSun bool
}

// PointingOf returns the altitude, azimuth and Sun elongation of the
// prediction p (its astrometric ICRS RA, Dec for p.Site at p.UTC).
//
// The steps: TT and UT1 from UTC (UT1 = UTC, as the fit itself takes it, an
// error of up to 13″ in hour angle); the apparent place of date by
// astro.ApparentPlace (annual aberration and bias-precession-nutation;
// diurnal aberration, at most 0.32″, is left out); the local hour angle from
// Greenwich apparent sidereal time and the site's east longitude; azimuth and
// geometric altitude by astro.EquatorialToHorizontal (Meeus eqs. 13.5, 13.6);
// refraction by astro.RefractionSaemundsson (Meeus eq. 16.5) at 1010 hPa and
// 10 °C, faded to zero between true altitudes −1° and −5° as ephem.Astrometric
// does, so both report the same altitude. The Sun is ephem.PlaceOfBody's.
//
// Accuracy: against ERFA's atco13 on the demo scenario's noise-free truth
// (see pointing_test.go) within the refraction model's 5 % difference from
// ERFA's plus about 1″.
//
// Errors: a time the time-scale tables reject or the Sun's series cannot
// take. Warnings (a stale leap-second table) do not stop it.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 12, 13, 16;
// Explanatory Supplement to the Astronomical Almanac (2013), ch. 7.
func PointingOf(p Prediction) (Pointing, error) {
	var pt Pointing
	sun, err := ephem.PlaceOfBody(ephem.Sun, p.UTC, ephem.Observer{Site: p.Site})
	if err != nil && sun.UTC == (astro.JD{}) {
		return pt, fmt.Errorf("fit: the Sun's place: %v", err)
	}
	pt.SunElongation = astro.Separation(sun.RA, sun.Dec, p.RA, p.Dec)
	pt.NearSun = pt.SunElongation < ephem.NearSunLimit
	if p.Site == nil {
		return pt, nil
	}
	pt.Topocentric = true
	pt.SunAlt = sun.Alt
	tt, err := astro.UTCToTT(p.UTC)
	if err != nil && !errors.Is(err, astro.ErrStaleTable) && !errors.Is(err, astro.ErrUTCBefore1972) {
		return pt, fmt.Errorf("fit: pointing time: %v", err)
	}
	ut1 := astro.UTCToUT1(p.UTC, 0)
	raApp, decApp := astro.ApparentPlace(p.RA, p.Dec, tt)
	lst := astro.LocalSiderealTime(astro.GreenwichApparentSiderealTime(ut1, tt), p.Site.Lon)
	az, alt := astro.EquatorialToHorizontal(astro.LocalHourAngle(lst, raApp), decApp, p.Site.Lat)
	pt.Az, pt.Alt = az, alt+standardRefraction(alt)
	return pt, nil
}

// standardRefraction is the refraction at a true altitude alt for 1010 hPa
// and 10 °C, faded linearly to zero between −1° and −5° (ephem's choice for
// bodies below the horizon).
func standardRefraction(alt astro.Angle) astro.Angle {
	const lo, hi = -5 * astro.Degree, -1 * astro.Degree
	p, t := astro.StandardPressureHPa, astro.StandardTemperatureC
	switch {
	case alt <= lo:
		return 0
	case alt < hi:
		return astro.RefractionSaemundsson(hi, p, t) * (alt - lo) / (hi - lo)
	}
	return astro.RefractionSaemundsson(alt, p, t)
}
