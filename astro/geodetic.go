package astro

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Ellipsoid is a reference ellipsoid of revolution: its equatorial radius
// (semi-major axis) a in kilometres and its flattening f = (a − b)/a.
type Ellipsoid struct {
	EquatorialRadiusKm float64
	Flattening         float64
}

// WGS84 is the World Geodetic System 1984 ellipsoid, a = 6378.137 km,
// f = 1/298.257223563, the one arcfit's site latitudes and heights refer to.
//
// Reference: NIMA Technical Report TR8350.2, 3rd ed. (2000), ch. 3.
var WGS84 = Ellipsoid{EquatorialRadiusKm: WGS84EquatorialRadiusKm, Flattening: WGS84Flattening}

// IAU1976 is the ellipsoid of the IAU (1976) System of Astronomical
// Constants, a = 6378.140 km, f = 1/298.257, which Meeus uses in ch. 11.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 11, p. 82;
// IAU (1976) System of Astronomical Constants.
var IAU1976 = Ellipsoid{EquatorialRadiusKm: 6378.140, Flattening: 1 / 298.257}

// GeocentricParallax returns the quantities ρ sin φ′ and ρ cos φ′ of a place
// at geodetic latitude lat and height heightM metres above the ellipsoid e,
// where ρ is the distance from the Earth's centre in units of the equatorial
// radius a and φ′ the geocentric latitude:
//
//	tan u    = (b/a) tan φ,   b/a = 1 − f
//	ρ sin φ′ = (b/a) sin u + (H/a) sin φ
//	ρ cos φ′ = cos u + (H/a) cos φ
//
// The reduced latitude u is taken with atan2, so the poles (φ = ±90°) are
// exact. These are the inputs of the topocentric parallax (Meeus ch. 40).
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 11 (p. 82,
// example 11.a).
func GeocentricParallax(e Ellipsoid, lat Angle, heightM float64) (rhoSinPhi, rhoCosPhi float64) {
	ba := 1 - e.Flattening
	sp, cp := math.Sincos(float64(lat))
	su, cu := math.Sincos(math.Atan2(ba*sp, cp))
	hr := heightM / (e.EquatorialRadiusKm * 1000)
	return ba*su + hr*sp, cu + hr*cp
}

// GeodeticToCartesian returns the terrestrial Cartesian position, in au, of
// the place at geodetic latitude lat, east longitude lon and height heightM
// metres above the ellipsoid e: x towards longitude 0 on the equator, y
// towards 90° east, z towards the north pole.
//
//	x = a ρ cos φ′ cos λ,   y = a ρ cos φ′ sin λ,   z = a ρ sin φ′
//
// with ρ sin φ′, ρ cos φ′ from [GeocentricParallax]. Equivalently
// x = (aC + h) cos φ cos λ, …, z = (aS + h) sin φ with C = 1/√(cos²φ + (1−f)² sin²φ),
// S = (1−f)² C (Explanatory Supplement, 1992, §4.22; section number from
// memory).
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 11;
// Seidelmann (ed.), Explanatory Supplement to the Astronomical Almanac (1992), §4.22.
func GeodeticToCartesian(e Ellipsoid, lat, lon Angle, heightM float64) r3.Vec {
	rs, rc := GeocentricParallax(e, lat, heightM)
	aAU := e.EquatorialRadiusKm / AUKm
	sl, cl := math.Sincos(float64(lon))
	return r3.Vec{X: aAU * rc * cl, Y: aAU * rc * sl, Z: aAU * rs}
}

// ITRS returns the site's position in the International Terrestrial
// Reference System, in au, from its geodetic latitude, east longitude and
// height on the WGS84 ellipsoid ([GeodeticToCartesian] with [WGS84]).
// The difference between WGS84 (as realised today) and the ITRF, centimetres,
// is neglected.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 11;
// NIMA TR8350.2 (2000) for the ellipsoid.
func (s Site) ITRS() r3.Vec {
	return GeodeticToCartesian(WGS84, s.Lat, s.Lon, s.HeightM)
}
