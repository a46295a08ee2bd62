package astro

import "gonum.org/v1/gonum/spatial/r3"

// SitePositionGCRS returns the geocentric position (au) and velocity (au per
// day) of the site s in GCRS axes, the axes of the ICRS, at the instant given
// both as UT1 (ut1, for the Earth's rotation) and as TT (tt, for precession
// and nutation):
//
//	pos = (NPB)ᵀ · R3(−GAST) · r,        r = s.ITRS()
//	vel = (NPB)ᵀ · R3(−GAST) · (ω ẑ × r), ω = EarthRotationRadPerDay
//
// with NPB from [BiasPrecessionNutationMatrix] and GAST from
// [GreenwichApparentSiderealTime]. The day of the velocity is 86400 UT1
// seconds (it differs from a TT day by the excess length of day, parts in
// 1e8). The velocity neglects the slow turning of the pole itself (precession
// and nutation move the site by less than 1 µm/s).
//
// Polar motion is neglected: the pole wanders by up to about 0.5″ (some 15 m
// at the Earth's surface) from the ITRS pole, so the position can be off by
// that much. For the topocentric parallax of a body at 0.01 au this is about
// 2 mas. The IAU 1980 nutation in NPB and in GAST departs from IAU 2000A by a few
// mas in the direction of the pole, centimetres here.
//
// Reference: IERS Conventions (2010), IERS Technical Note 36, ch. 5, eq. 5.1
// (GCRS = Q·R·W·ITRS), in its equinox-based form with W = I; Meeus, Astronomical
// Algorithms, 2nd ed. (1998), ch. 11 (the site's geocentric coordinates).
func SitePositionGCRS(s Site, ut1, tt JD) (pos, vel r3.Vec) {
	r := s.ITRS()
	m := BiasPrecessionNutationMatrix(tt).T().Mul(RotZ(-GreenwichApparentSiderealTime(ut1, tt)))
	w := EarthRotationRadPerDay
	return m.MulVec(r), m.MulVec(r3.Vec{X: -w * r.Y, Y: w * r.X, Z: 0})
}
