package astro

import "math"

// PositionAngle returns the position angle of the direction (ra2, dec2) as
// seen from (ra1, dec1): the angle at point 1 from the direction of the north
// pole through east (increasing right ascension) to the great circle towards
// point 2, in [0, 2π). Inputs in radians, in one frame.
//
//	Δα = α2 − α1
//	P  = atan2(cos δ2 sin Δα, sin δ2 cos δ1 − cos δ2 sin δ1 cos Δα)
//
// with the denominator evaluated as sin(δ2 − δ1) + 2 sin δ1 cos δ2 sin²(Δα/2),
// which keeps its digits for close pairs. For a point 1 at a pole, "north" is
// the direction along the meridian of ra1 (away from the pole); for coincident
// points the result is 0. It is never NaN for finite inputs.
//
// Accuracy: limited by the rounding of the two components, about 1e-16 rad
// divided by the separation in radians.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 48, eq. 48.5 (the
// position angle χ of the Moon's bright limb, which is this formula with the
// Sun as point 2); Smart, Textbook on Spherical Astronomy, 6th ed. (1977), the
// four-parts formula of the spherical triangle pole–point 1–point 2.
func PositionAngle(ra1, dec1, ra2, dec2 Angle) Angle {
	p, _ := sepComponents(ra1, dec1, ra2, dec2)
	return Angle(math.Atan2(p.e, p.n)).Normalized()
}
