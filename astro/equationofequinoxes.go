package astro

import "math"

// EquationOfEquinoxes returns the equation of the equinoxes at the TT instant
// tt, the right ascension of the mean equinox of date measured on the true
// equator from the true equinox (GAST − GMST), in radians:
//
//	Eq = Δψ cos εA + 0.00264″ sin Ω + 0.000063″ sin 2Ω
//	Ω  = 125°02′40.280″ − (5 × 360° + 134°08′10.539″) T + 7.455″ T² + 0.008″ T³
//
// with Δψ from [Nutation1980] (IAU 1980), εA from [MeanObliquity2006], Ω the
// mean longitude of the Moon's ascending node and T in Julian centuries of TT
// since J2000.0. The two terms in Ω are the complementary terms the IERS
// Conventions (1996) added to the equation of the equinoxes for the 1980
// nutation (the values and the expression for Ω are quoted from memory; Ω is
// the same as Meeus' ch. 22 expression 125.04452° − 1934.136261° T + …, and
// the tests confirm the whole against ERFA's eqeq94). Taking the IAU 2006
// mean obliquity instead of the IAU 1980 one changes the result by less than
// 1e-6″.
//
// Accuracy: that of the IAU 1980 nutation, a few mas (a fraction of a
// millisecond of time) against IAU 2000A.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 12 (the
// correction Δψ cos ε) and ch. 22 (Ω); IERS Conventions (1996), IERS Technical
// Note 21, ch. 5 (the complementary terms).
func EquationOfEquinoxes(tt JD) Angle {
	t := tt.CenturiesSinceJ2000()
	omArcsec := 450160.280 + t*(-(5*1296000+482890.539)+t*(7.455+t*0.008))
	om := math.Mod(omArcsec, 1296000) * float64(Arcsecond)
	dpsi, _ := Nutation1980(tt)
	epsA := MeanObliquity2006(tt)
	ct := (0.00264*math.Sin(om) + 0.000063*math.Sin(2*om)) * float64(Arcsecond)
	return dpsi*Angle(math.Cos(float64(epsA))) + Angle(ct)
}

// GreenwichApparentSiderealTime returns Greenwich apparent sidereal time, the
// hour angle of the true equinox of date, at the instant given both as UT1
// (ut1) and as TT (tt), in [0, 2π):
//
//	GAST = GMST(UT1, TT) + Eq(TT)
//
// with GMST of IAU 2006 ([GreenwichMeanSiderealTime]) and the equation of the
// equinoxes of the IAU 1980 nutation ([EquationOfEquinoxes]). It is the angle
// that pairs with [BiasPrecessionNutationMatrix]: R3(GAST) · NPB takes GCRS
// coordinates to the terrestrial frame (polar motion aside).
//
// Accuracy: it departs from the IAU 2006/2000A GAST (ERFA's gst06a) by the
// difference of the two nutations in Δψ cos ε, a few mas (below 1 ms of time)
// over 1900–2100; see the tests for the measured figure.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 12;
// IERS Conventions (2010), IERS Technical Note 36, ch. 5 (eq. 5.32 for GMST).
func GreenwichApparentSiderealTime(ut1, tt JD) Angle {
	return (GreenwichMeanSiderealTime(ut1, tt) + EquationOfEquinoxes(tt)).Normalized()
}
