package astro

import "math"

// EquatorialToHorizontal returns the azimuth and the geometric altitude of a
// direction of hour angle ha (west positive) and declination dec, seen from
// geodetic latitude lat. Azimuth runs from north through east, in [0, 2π);
// altitude is in [−π/2, π/2]. No refraction is applied.
//
// With the horizon components north, east and up of the unit vector,
//
//	north = cos φ sin δ − sin φ cos δ cos H
//	east  = −cos δ sin H
//	up    = sin φ sin δ + cos φ cos δ cos H
//	A = atan2(east, north),   h = atan2(up, √(north² + east²))
//
// which is Meeus' eqs. 13.5 and 13.6 with his azimuth, measured westward from
// the south, turned by 180°: A(Meeus) = A − 180°. The atan2 form keeps full
// precision near the zenith and the poles; at the zenith itself (and at a pole
// of the sky seen from a pole of the Earth) the azimuth is undefined and the
// result is the one atan2 gives.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 13,
// eqs. 13.5 and 13.6.
func EquatorialToHorizontal(ha, dec, lat Angle) (az, alt Angle) {
	sh, ch := math.Sincos(float64(ha))
	sd, cd := math.Sincos(float64(dec))
	sp, cp := math.Sincos(float64(lat))
	north := cp*sd - sp*cd*ch
	east := -cd * sh
	up := sp*sd + cp*cd*ch
	az = Angle(math.Atan2(east, north)).Normalized()
	alt = Angle(math.Atan2(up, math.Hypot(north, east)))
	return az, alt
}

// HorizontalToEquatorial returns the hour angle, in (−π, π] and west
// positive, and the declination of the direction of azimuth az (from north
// through east) and geometric altitude alt, seen from geodetic latitude lat.
// It inverts [EquatorialToHorizontal]:
//
//	x = cos φ sin h − sin φ cos h cos A   (= cos δ cos H)
//	y = −cos h sin A                      (= cos δ sin H)
//	z = sin φ sin h + cos φ cos h cos A   (= sin δ)
//	H = atan2(y, x),   δ = atan2(z, √(x² + y²))
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 13 (the
// inverse of eqs. 13.5 and 13.6, with azimuth from the north).
func HorizontalToEquatorial(az, alt, lat Angle) (ha, dec Angle) {
	sa, ca := math.Sincos(float64(az))
	sh, chh := math.Sincos(float64(alt))
	sp, cp := math.Sincos(float64(lat))
	x := cp*sh - sp*chh*ca
	y := -chh * sa
	z := sp*sh + cp*chh*ca
	ha = Angle(math.Atan2(y, x)).Wrapped()
	dec = Angle(math.Atan2(z, math.Hypot(x, y)))
	return ha, dec
}
