package ephem

import (
	"math"

	"arcfit/astro"

	"gonum.org/v1/gonum/spatial/r3"
)

// topocentric moves the geocentric direction (ra, dec) at distance distAU to
// the site at geocentric position site (au, same axes): the direction of
// distAU·u(ra, dec) − site.
func topocentric(ra, dec astro.Angle, distAU float64, site r3.Vec) (astro.Angle, astro.Angle) {
	if !(distAU > r3.Norm(site)) || math.IsInf(distAU, 0) {
		return astro.Angle(math.NaN()), astro.Angle(math.NaN())
	}
	v := r3.Sub(r3.Scale(distAU, astro.UnitVector(ra, dec)), site)
	lon, lat, _ := astro.Spherical(v)
	return lon.Normalized(), lat
}

// TopocentricCorrection returns the topocentric right ascension and
// declination, seen from site, of a body whose geocentric direction, in ICRS
// (GCRS) axes, is (ra, dec) at the geocentric distance distAU (au):
//
//	ρ = distAU · (cos δ cos α, cos δ sin α, sin δ) − r_site,   (α′, δ′) = direction of ρ
//
// with r_site from [astro.SitePositionGCRS](site, ut1, tt). The vector
// subtraction is exact for any distance; it is the rigorous method of Meeus
// ch. 40 (eqs. 40.2–40.3) in vector form, in the ICRS instead of the true
// equator of date. Use it for astrometric places; for apparent places of date
// use [TopocentricCorrectionOfDate] (the two frames differ by precession, which
// would turn the Moon's 1° parallax by up to 20″ if mixed up).
//
// Inputs: ra, dec in radians; distAU > the site's geocentric distance (about
// 4.26e-5 au); site geodetic WGS84; the instant as UT1 (Earth rotation) and TT.
// Output: α′ in [0, 2π), δ′. For distAU not above the site's distance, or not
// finite, both are NaN.
// Accuracy: that of the site vector (polar motion neglected, about 15 m; 2 mas
// at 0.01 au, 0.01″ for the Moon).
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 40, eqs.
// 40.2–40.3, example 40.a; ch. 11 for the site's geocentric coordinates.
func TopocentricCorrection(ra, dec astro.Angle, distAU float64, site astro.Site, ut1, tt astro.JD) (raTopo, decTopo astro.Angle) {
	pos, _ := astro.SitePositionGCRS(site, ut1, tt)
	return topocentric(ra, dec, distAU, pos)
}

// TopocentricCorrectionOfDate is [TopocentricCorrection] for a geocentric
// direction (ra, dec) referred to the true equator and equinox of date (an
// apparent place, as in Meeus): the site vector is
//
//	r_site = R3(−θ0) · r_ITRS,   θ0 = [astro.GreenwichApparentSiderealTime](ut1, tt)
//
// which is Meeus' eqs. 40.2–40.3 with H = θ0 − L − α, carried out by vector
// subtraction instead of the tangent formulas.
//
// Inputs, outputs and accuracy as for [TopocentricCorrection].
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 40, eqs.
// 40.2–40.3, example 40.a.
func TopocentricCorrectionOfDate(ra, dec astro.Angle, distAU float64, site astro.Site, ut1, tt astro.JD) (raTopo, decTopo astro.Angle) {
	pos := astro.RotZ(-astro.GreenwichApparentSiderealTime(ut1, tt)).MulVec(site.ITRS())
	return topocentric(ra, dec, distAU, pos)
}
