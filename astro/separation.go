package astro

import "math"

// Separation returns the angle between the directions (ra1, dec1) and
// (ra2, dec2), in [0, π]. The inputs are spherical coordinates in one frame,
// radians (right ascension and declination, or longitude and latitude).
//
// It uses the spherical case of Vincenty's inverse formula, which is accurate
// to rounding at every separation, including 0 and π, where the cosine and
// haversine formulas lose digits:
//
//	Δα = α2 − α1
//	x  = sin δ1 sin δ2 + cos δ1 cos δ2 cos Δα
//	y² = (cos δ2 sin Δα)² + (cos δ1 sin δ2 − sin δ1 cos δ2 cos Δα)²
//	d  = atan2(y, x)
//
// The second term of y is evaluated as sin(δ2 − δ1) + 2 sin δ1 cos δ2 sin²(Δα/2),
// an identity that keeps its digits when the two points are close.
//
// Accuracy: a few units of 1e-16 rad at any separation (measured against
// ERFA's seps: see separation_test.go).
//
// Reference: Vincenty, T., "Direct and inverse solutions of geodesics on the
// ellipsoid with application of nested equations", Survey Review 23 (1975),
// 88–93, the inverse formula with zero flattening; Meeus, Astronomical
// Algorithms, 2nd ed., ch. 17 (the angular separation, eq. 17.1, and its
// numerical trouble near 0 and 180°).
func Separation(ra1, dec1, ra2, dec2 Angle) Angle {
	x, y := sepComponents(ra1, dec1, ra2, dec2)
	return Angle(math.Atan2(math.Hypot(x.e, x.n), y))
}

// sepParts holds the components of the direction of point 2 as seen from
// point 1 on the tangent plane there: e towards east, n towards north, each
// multiplied by the sine of the separation.
type sepParts struct{ e, n float64 }

// sepComponents returns the east and north components (scaled by sin d) and
// cos d of the direction from point 1 to point 2.
func sepComponents(ra1, dec1, ra2, dec2 Angle) (sepParts, float64) {
	dra := float64(ra2 - ra1)
	sdra, cdra := math.Sincos(dra)
	sd1, cd1 := math.Sincos(float64(dec1))
	sd2, cd2 := math.Sincos(float64(dec2))
	h := math.Sin(dra / 2)
	e := cd2 * sdra
	n := math.Sin(float64(dec2-dec1)) + 2*sd1*cd2*h*h
	c := sd1*sd2 + cd1*cd2*cdra
	return sepParts{e: e, n: n}, c
}
