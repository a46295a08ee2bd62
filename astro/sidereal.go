package astro

import "math"

// GMST polynomial of IAU 2006 in arcseconds, argument t in Julian centuries
// of TT since J2000.0 (IERS Conventions 2010, eq. 5.32; Capitaine, Wallace,
// Chapront 2003). The coefficients are transcribed from memory of eq. 5.32;
// the test against ERFA's gmst06 (testdata/erfa_sidereal.txt) confirms them.
var gmst2006Arcsec = [...]float64{
	0.014506,
	4612.156534,
	1.3915817,
	-0.00000044,
	-0.000029956,
	-0.0000000368,
}

// GreenwichMeanSiderealTime returns Greenwich mean sidereal time, consistent
// with the IAU 2006 precession, at the instant given both as UT1 (ut1, for the
// Earth's rotation) and as TT (tt, for the precession of the equinox), in
// [0, 2π):
//
//	GMST = θ(UT1) + (0.014506 + 4612.156534 t + 1.3915817 t² − 0.00000044 t³
//	                 − 0.000029956 t⁴ − 0.0000000368 t⁵)″,   t = (JD(TT) − 2451545.0)/36525
//
// where θ is [EarthRotationAngle]. GMST is the hour angle of the mean equinox
// of date; it depends on TT only through the slow polynomial, so a TT wrong by
// a minute moves it by less than 1 µs. Accuracy: that of the model (0.01 µas
// over 1900–2100 against ERFA's gmst06, see the tests); rounding below 1 µas.
//
// Reference: IERS Conventions (2010), IERS Technical Note 36, ch. 5, eq. 5.32;
// Capitaine, N., Wallace, P. T., Chapront, J., "Expressions for IAU 2000
// precession quantities", A&A 412, 567–586 (2003).
func GreenwichMeanSiderealTime(ut1, tt JD) Angle {
	t := tt.CenturiesSinceJ2000()
	p := 0.0
	for i := len(gmst2006Arcsec) - 1; i >= 0; i-- {
		p = p*t + gmst2006Arcsec[i]
	}
	return (EarthRotationAngle(ut1) + Angle(p)*Arcsecond).Normalized()
}

// GreenwichMeanSiderealTime1982 returns Greenwich mean sidereal time by the
// IAU 1982 expression (Aoki et al. 1982) in the form Meeus gives it, at the
// UT1 instant ut1 (a date on another scale is read as if it were UT1), in
// [0, 2π):
//
//	θ0 = 280.46061837° + 360.98564736629° (JD − 2451545.0) + 0.000387933° T² − T³/38710000°,
//	T = (JD − 2451545.0)/36525                                   (Meeus eq. 12.4)
//
// The whole days of the two-part date are dropped from the 360° × days term
// before the sum, so the result keeps the resolution of the date. This is the
// sidereal time of the IAU 1976 precession; it differs from
// [GreenwichMeanSiderealTime] by about 3 ms in 1987 (Meeus 12.a). Use it to
// reproduce older almanacs and Meeus' examples.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 12, eq. 12.4;
// Aoki, S. et al., "The new definition of Universal Time", A&A 105, 359 (1982).
func GreenwichMeanSiderealTime1982(ut1 JD) Angle {
	d1 := ut1.Day - J2000
	d2 := ut1.Frac
	t := (d1 + d2) / DaysPerJulianCentury
	// 360.98564736629° D = 360° D + 0.98564736629° D; 360° D counts only its
	// fraction of a revolution.
	_, f1 := math.Modf(d1)
	_, f2 := math.Modf(d2)
	deg := 280.46061837 + 0.98564736629*(d1+d2) + 0.000387933*t*t - t*t*t/38710000
	rev := f1 + f2 + deg/360
	return Angle(2 * math.Pi * fracRev(rev)).Normalized()
}

// LocalSiderealTime returns the local sidereal time at east longitude lon
// (east positive, radians) for the Greenwich sidereal time gst, mean or
// apparent as gst is: LST = GST + λ, reduced to [0, 2π).
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 12 and
// ch. 13 (with Meeus' west-positive longitude L, LST = θ0 − L).
func LocalSiderealTime(gst, lon Angle) Angle {
	return (gst + lon).Normalized()
}

// LocalHourAngle returns the local hour angle H = LST − α of an object of right
// ascension ra (on the same equator and equinox as lst), reduced to (−π, π]:
// negative before the object crosses the upper meridian (east of it), positive
// after (west).
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 13
// (H = θ − α, measured westward from the south meridian). (The agreed name
// HourAngle is taken by the unit constant [HourAngle] of constants.go.)
func LocalHourAngle(lst, ra Angle) Angle {
	return (lst - ra).Wrapped()
}
