package astro

import "gonum.org/v1/gonum/spatial/r3"

// ApparentDirection returns the apparent direction of date (true equator and
// equinox of date) of a source whose astrometric ICRS direction is dir, seen
// by an observer with barycentric ICRS velocity velAUDay (au/day): annual
// aberration ([Aberration]), then the bias-precession-nutation rotation
// ([BiasPrecessionNutationMatrix]). Light deflection is not applied (up to
// 0.004″ at 45° from the Sun, 1.75″ at the limb).
//
// Inputs: dir, a non-zero vector (ICRS axes); velAUDay in au per day; tt, a
// TT Julian date. Output: a unit vector, true equator and equinox of date.
// Accuracy: with an exact velocity, that of [BiasPrecessionNutationMatrix]
// (about 0.03″ against IAU 2006/2000A).
//
// Reference: Explanatory Supplement to the Astronomical Almanac (2013), ch. 7
// (the order of the reductions); IERS Conventions (2010), ch. 5.
func ApparentDirection(dir, velAUDay r3.Vec, tt JD) r3.Vec {
	return BiasPrecessionNutationMatrix(tt).MulVec(Aberration(dir, velAUDay))
}

// ApparentPlace returns the apparent right ascension and declination of date
// (geocentric, true equator and equinox of date, as used for pointing) of the
// astrometric ICRS direction (ra, dec): a star's catalogue place moved to the
// date, or a body's light-time-corrected direction. It applies annual
// aberration for the Earth's velocity from [EarthVelocityApprox] and then
// [BiasPrecessionNutationMatrix]. Diurnal aberration (≤ 0.32″), light
// deflection and refraction are not applied.
//
// Inputs: ra, dec in radians (ICRS); tt, a TT Julian date.
// Outputs: raDate in [0, 2π), decDate, radians.
// Accuracy: within 0.05″ of ERFA's IAU 2006/2000A apparent place (ab with the
// epv00 velocity, then pnm06a) over 1900–2100; the measured worst case on 301
// instants and directions is 0.023″ (see the tests).
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 23; Explanatory
// Supplement to the Astronomical Almanac (2013), ch. 7.
func ApparentPlace(ra, dec Angle, tt JD) (raDate, decDate Angle) {
	v := EarthVelocityApprox(JD{Day: tt.Day, Frac: tt.Frac, Scale: TDB})
	raDate, decDate, _ = Spherical(ApparentDirection(UnitVector(ra, dec), v, tt))
	return raDate, decDate
}
