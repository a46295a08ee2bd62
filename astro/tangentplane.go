package astro

import (
	"errors"
	"math"
)

// TangentPlane is the gnomonic (central) projection of the celestial sphere
// onto the plane tangent to it at (RA0, Dec0). Its coordinates are the
// standard coordinates ξ (towards east, increasing right ascension) and η
// (towards north), in radians of a sphere of unit radius: a point at angular
// distance ρ from the tangent point lies at distance tan ρ from the origin.
type TangentPlane struct {
	RA0, Dec0 Angle // the tangent point, radians
}

// minCosRho is the smallest cos ρ that Project accepts (see Project).
const minCosRho = 1e-12

// ErrBehindPlane reports a point 90° or more from the tangent point, which has
// no image on the tangent plane.
var ErrBehindPlane = errors.New("astro: point 90° or more from the tangent point")

// Project returns the standard coordinates ξ, η (radians) of the direction
// (ra, dec) (radians) about the tangent point p:
//
//	cos ρ = sin δ sin δ0 + cos δ cos δ0 cos(α − α0)
//	ξ = cos δ sin(α − α0) / cos ρ
//	η = (sin δ cos δ0 − cos δ sin δ0 cos(α − α0)) / cos ρ
//
// It returns [ErrBehindPlane] when cos ρ ≤ 1e-12, that is when the point is 90°
// or more from the tangent point (to within 1e-12 rad, where rounding decides
// the side and the image would lie beyond 10¹² anyway), and an error when the
// inputs are not finite.
//
// Accuracy: rounding only; [TangentPlane.Deproject] inverts it to better than
// 1e-12 rad for points within 80° of the tangent point.
//
// Reference: Calabretta, M. R., Greisen, E. W., "Representations of celestial
// coordinates in FITS", Astron. Astrophys. 395 (2002), 1077–1122, §5.1.3 (the
// gnomonic projection TAN, R_θ = cot θ with native latitude θ = 90° − ρ);
// the standard coordinates of photographic astrometry, Smart, Textbook on
// Spherical Astronomy, 6th ed. (1977), ch. XI.
func (p TangentPlane) Project(ra, dec Angle) (xi, eta float64, err error) {
	sd, cd := math.Sincos(float64(dec))
	sd0, cd0 := math.Sincos(float64(p.Dec0))
	sda, cda := math.Sincos(float64(ra - p.RA0))
	den := sd*sd0 + cd*cd0*cda
	if math.IsNaN(den) {
		return 0, 0, errors.New("astro: tangent plane: coordinates not finite")
	}
	if den <= minCosRho {
		return 0, 0, ErrBehindPlane
	}
	xi = cd * sda / den
	eta = (sd*cd0 - cd*sd0*cda) / den
	if math.IsInf(xi, 0) || math.IsInf(eta, 0) {
		return 0, 0, ErrBehindPlane
	}
	return xi, eta, nil
}

// Deproject returns the direction (ra in [0, 2π), dec) whose standard
// coordinates about the tangent point p are ξ, η (radians); it inverts
// [TangentPlane.Project] for every finite ξ, η:
//
//	α = α0 + atan2(ξ, cos δ0 − η sin δ0)
//	δ = atan2(sin δ0 + η cos δ0, √(ξ² + (cos δ0 − η sin δ0)²))
//
// The atan2 forms keep full accuracy at the poles and across 0h.
// Non-finite ξ or η give NaN.
//
// Reference: Calabretta & Greisen (2002), A&A 395, 1077, §5.1.3 (TAN) with the
// spherical rotation of §2.3; the same inverse in Smart (1977), ch. XI.
func (p TangentPlane) Deproject(xi, eta float64) (ra, dec Angle) {
	sd0, cd0 := math.Sincos(float64(p.Dec0))
	den := cd0 - eta*sd0
	ra = (p.RA0 + Angle(math.Atan2(xi, den))).Normalized()
	dec = Angle(math.Atan2(sd0+eta*cd0, math.Hypot(xi, den)))
	return ra, dec
}
