package astro

import "math"

// Earth rotation angle, IAU 2000 (IERS Conventions 2010, eq. 5.15):
//
//	θ(Tu) = 2π (0.7790572732640 + 1.00273781191135448 Tu),   Tu = JD(UT1) − 2451545.0
const (
	eraAtJ2000Rev = 0.7790572732640     // θ at J2000.0 UT1, revolutions
	eraRateRev    = 1.00273781191135448 // revolutions per UT1 day
)

// EarthRotationRadPerDay is the Earth's rate of rotation with respect to the
// Celestial Intermediate Origin, 2π × 1.00273781191135448 radians per day of
// 86400 UT1 seconds (about 7.292115e-5 rad/s), the rate of
// [EarthRotationAngle].
//
// Reference: IERS Conventions (2010), IERS Technical Note 36, ch. 5, eq. 5.15.
const EarthRotationRadPerDay = 2 * math.Pi * eraRateRev

// EarthRotationAngle returns the Earth rotation angle θ, the angle between the
// Celestial and the Terrestrial Intermediate Origins measured along the equator
// of the Celestial Intermediate Pole, at the instant ut1 (a UT1 Julian date;
// a date on another scale is read as if it were UT1). The result is in [0, 2π).
//
//	θ(Tu) = 2π (0.7790572732640 + 1.00273781191135448 Tu),   Tu = JD(UT1) − 2451545.0
//
// The whole revolutions in Tu are dropped from each part of the two-part date
// before the sum, so the result keeps the full resolution of the date (about
// 1e-16 of a day of Frac): the rounding error is below 1e-12 rad (0.2 µas)
// over 1900–2100, whatever the split of the date between its two parts, as long
// as neither part is far larger than the date itself.
//
// Reference: IERS Conventions (2010), IERS Technical Note 36, ch. 5, eq. 5.15;
// Capitaine, Guinot, McCarthy, "Definition of the Celestial Ephemeris Origin and
// of UT1 in the International Celestial Reference Frame", A&A 355, 398 (2000).
func EarthRotationAngle(ut1 JD) Angle {
	d1 := ut1.Day - J2000
	d2 := ut1.Frac
	// 1.00273781191135448 Tu = Tu + 0.00273781191135448 Tu; the first term
	// contributes only its fraction of a revolution.
	_, f1 := math.Modf(d1)
	_, f2 := math.Modf(d2)
	rev := f1 + f2 + eraAtJ2000Rev + (eraRateRev-1)*(d1+d2)
	return Angle(2 * math.Pi * fracRev(rev)).Normalized()
}

// fracRev returns x reduced to [0, 1).
func fracRev(x float64) float64 {
	x -= math.Floor(x)
	if x >= 1 {
		x = 0
	}
	return x
}
