package astro

// EquatorialToEcliptic returns the ecliptic longitude and latitude of the
// direction (ra, dec), for the obliquity eps between the equator and the
// ecliptic of the frame:
//
//	tan λ = (sin α cos ε + tan δ sin ε) / cos α
//	sin β = sin δ cos ε − cos δ sin ε sin α
//
// computed as the rotation R1(ε) of the unit vector, which keeps full
// precision at the poles. For the ecliptic and equinox of J2000.0 use
// eps = [MeanObliquity2006] (or [MeanObliquity1980], as VSOP87 and Meeus do) at
// J2000.0; for the ecliptic of date with the true equator, [TrueObliquity].
//
// Inputs in radians; outputs: lon in [0, 2π), lat in [−π/2, π/2].
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 13, eqs. 13.1–13.2.
func EquatorialToEcliptic(ra, dec, eps Angle) (lon, lat Angle) {
	lon, lat, _ = Spherical(RotX(eps).MulVec(UnitVector(ra, dec)))
	return lon, lat
}

// EclipticToEquatorial returns the right ascension and declination of the
// ecliptic direction (lon, lat), for the obliquity eps:
//
//	tan α = (sin λ cos ε − tan β sin ε) / cos λ
//	sin δ = sin β cos ε + cos β sin ε sin λ
//
// computed as the rotation R1(−ε) of the unit vector; the inverse of
// [EquatorialToEcliptic].
//
// Inputs in radians; outputs: ra in [0, 2π), dec in [−π/2, π/2].
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 13, eqs. 13.3–13.4.
func EclipticToEquatorial(lon, lat, eps Angle) (ra, dec Angle) {
	ra, dec, _ = Spherical(RotX(-eps).MulVec(UnitVector(lon, lat)))
	return ra, dec
}
