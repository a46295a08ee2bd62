package fit

import (
	"errors"
	"fmt"
	"math"

	"arcfit/astro"

	"gonum.org/v1/gonum/spatial/r3"
)

// Ellipse is a search region on the sky: the error ellipse of a 2×2 sky
// covariance at Sigma standard deviations.
type Ellipse struct {
	Sigma                            float64 // the σ level it is drawn at
	SemiMajorArcsec, SemiMinorArcsec float64
	PA                               astro.Angle // of the major axis, north through east, [0, π)
}

// Prediction is where a fitted model puts the object at one instant, as seen
// from one site.
type Prediction struct {
	UTC  astro.JD
	Site *astro.Site // nil = geocentre
	// Model is the model's name (poly1 … piecewise).
	Model string
	// RA, Dec are the astrometric ICRS place for the site (geocentric when
	// Site is nil, or when the solution applies no parallax).
	RA, Dec astro.Angle
	// CovArcsec2 is the 2×2 covariance of the position in RA·cos δ (index 0)
	// and Dec (index 1), arcsec².
	CovArcsec2 [2][2]float64
	// RateArcsecPerMin is the rate of motion on the sky and RatePA its
	// direction, north through east, [0, 2π).
	RateArcsecPerMin float64
	RatePA           astro.Angle
	// BeyondHorizon and HorizonDays are filled by the model-choice layer;
	// HorizonDays is NaN when unknown.
	BeyondHorizon bool
	HorizonDays   float64
	// Mag is the predicted visual magnitude, NaN when unknown; DeltaAU the
	// distance from the observer, NaN when the model has none (a sky-plane
	// fit without a fitted distance).
	Mag     float64
	DeltaAU float64
	// Method says how the covariance was obtained: "linear" (propagated
	// through the model's Jacobian) or "montecarlo" (from sampled orbits,
	// whose offsets from RA, Dec on the tangent plane, RA·cos δ and Dec in
	// arcsec, are in Samples).
	Method  string
	Samples [][2]float64
	// SampleWeights are the samples' weights (summing to 1 less any lost
	// weight), in the order of Samples.
	SampleWeights []float64
}

// rateStepDays is the half-step of the central difference for the rate:
// one minute (the curvature of a main-belt path changes the rate over ±1 min
// by parts in 10⁷; the rounding error of the difference is ~1e-16/7e-4 of
// the position, negligible).
const rateStepDays = 1.0 / 1440

// Predict returns the position and covariance of the fitted model at UTC
// instant utc as seen from site (nil = geocentre).
//
// The geocentric track ξ_g(τ), η_g(τ) is evaluated at τ = (TT − EpochTT)/
// TimeScaleDays; for a site, the parallax −u·(gξ·r, gη·r) is added, where r is
// the site's GCRS position (au, astro.SitePositionGCRS with UT1 ≈ UTC) and
// gξ, gη are the gradients of the standard coordinates at the geocentric
// topocentric direction (the same first-order term the fit uses). u is the fitted or
// fixed inverse distance; a solution without one (ParallaxOff, or all
// observations geocentric) predicts the same place for every site.
//
// The covariance propagates the parameter covariance with the 2×p Jacobian
// G = ∂(ξ, η)/∂params (basis values, and −gξ·r, −gη·r for u): C_plane =
// G Cov Gᵀ, then to the sky (RA·cos δ, Dec) with the inverse of the
// projection's Jacobian at the predicted point, C_sky = J⁻¹ C_plane J⁻ᵀ
// (J is the identity at the tangent point and differs from it by the
// meridian convergence ≈ Δα sin δ elsewhere). The rate is the central
// difference of the full topocentric prediction over ±1 min, carried to the
// sky the same way.
//
// Errors: utc not a finite UTC date; a time the time-scale tables reject.
//
// Reference: covariance propagation, Press et al., Numerical Recipes, 3rd ed.
// (2007), §15.6; parallax to first order, Meeus, Astronomical Algorithms, 2nd
// ed. (1998), ch. 40; the inverse projection, Calabretta & Greisen (2002),
// A&A 395, 1077, §5.1.3.
func (s *Solution) Predict(utc astro.JD, site *astro.Site) (Prediction, error) {
	if utc.Scale != astro.UTC {
		return Prediction{}, fmt.Errorf("fit: prediction time must be UTC, got %v", utc.Scale)
	}
	if f := utc.Float(); math.IsNaN(f) || math.IsInf(f, 0) {
		return Prediction{}, errors.New("fit: prediction time is not finite")
	}
	tt, err := astro.UTCToTT(utc)
	if err != nil && !errors.Is(err, astro.ErrStaleTable) && !errors.Is(err, astro.ErrUTCBefore1972) {
		return Prediction{}, fmt.Errorf("fit: prediction time: %v", err)
	}
	var st *astro.Site
	if site != nil {
		c := *site
		st = &c
	}
	tDays := tt.Sub(s.Track.EpochTT)
	frame := newPlaneFrame(s.Track.Plane)
	np := len(s.Params)
	g := make([]float64, 2*np)
	xi, eta := s.topocentric(frame, tDays, utc, tt, st, g)
	// Plane covariance G Cov Gᵀ.
	var cp [2][2]float64
	for a := 0; a < 2; a++ {
		for b := 0; b < 2; b++ {
			var sum float64
			for i := 0; i < np; i++ {
				gi := g[a*np+i]
				if gi == 0 {
					continue
				}
				for j := 0; j < np; j++ {
					sum += gi * s.Cov.At(i, j) * g[b*np+j]
				}
			}
			cp[a][b] = sum
		}
	}
	jinv := inv2(frame.skyToPlane(xi, eta))
	cs := congruence(jinv, cp)
	as2 := astro.Arcsecond.Radians() * astro.Arcsecond.Radians()
	pr := Prediction{UTC: utc, Site: st, Model: s.Model.Name(), HorizonDays: math.NaN(), Mag: math.NaN(), DeltaAU: math.NaN(), Method: "linear"}
	if u := s.InvDistance; u > 0 && !math.IsInf(u, 0) {
		pr.DeltaAU = 1 / u
	}
	for a := 0; a < 2; a++ {
		for b := 0; b < 2; b++ {
			pr.CovArcsec2[a][b] = cs[a][b] / as2
		}
	}
	pr.CovArcsec2[0][1] = 0.5 * (pr.CovArcsec2[0][1] + pr.CovArcsec2[1][0])
	pr.CovArcsec2[1][0] = pr.CovArcsec2[0][1]
	if m := s.ModelErrorArcsec; m > 0 && !math.IsInf(m, 0) {
		pr.CovArcsec2[0][0] += m * m
		pr.CovArcsec2[1][1] += m * m
	}
	pr.RA, pr.Dec = s.Track.Plane.Deproject(xi, eta)

	// Rate: central difference of the topocentric prediction.
	x1, e1 := s.topocentric(frame, tDays+rateStepDays, utc.AddDays(rateStepDays), tt.AddDays(rateStepDays), st, nil)
	x0, e0 := s.topocentric(frame, tDays-rateStepDays, utc.AddDays(-rateStepDays), tt.AddDays(-rateStepDays), st, nil)
	dxi, deta := (x1-x0)/2, (e1-e0)/2 // radians per minute
	dE := jinv[0][0]*dxi + jinv[0][1]*deta
	dN := jinv[1][0]*dxi + jinv[1][1]*deta
	pr.RateArcsecPerMin = astro.Angle(math.Hypot(dE, dN)).Arcseconds()
	pr.RatePA = astro.Angle(math.Atan2(dE, dN)).Normalized()
	if !predictionFinite(pr) {
		return Prediction{}, fmt.Errorf("fit: the %s model gives no finite position at %s (its parameters are out of range)", pr.Model, astro.FormatISO8601(utc, 0))
	}
	return pr, nil
}

// predictionFinite reports whether the place, the covariance and the rate of
// a prediction are finite: parameters far out of range (a damaged fit file)
// can overflow the projection or the parallax, and a NaN must not pass for a
// position.
func predictionFinite(p Prediction) bool {
	for _, x := range []float64{float64(p.RA), float64(p.Dec), p.CovArcsec2[0][0], p.CovArcsec2[0][1], p.CovArcsec2[1][1], p.RateArcsecPerMin, float64(p.RatePA)} {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}

// topocentric returns the predicted ξ, η at tDays (TT − EpochTT) for site st
// (nil = geocentre) and, when g is not nil, writes the Jacobian rows
// ∂ξ/∂params (g[0:np]) and ∂η/∂params (g[np:2np]).
func (s *Solution) topocentric(frame planeFrame, tDays float64, utc, tt astro.JD, st *astro.Site, g []float64) (xi, eta float64) {
	xi, eta = s.geocentric(tDays)
	q := s.Model.NumPerCoord()
	np := len(s.Params)
	if g != nil {
		f := g[:q]
		s.Model.basis(f, tDays/s.Track.TimeScaleDays, s.Track.TimeScaleDays)
		copy(g[np+q:np+2*q], f)
	}
	u := s.InvDistance
	if st == nil || math.IsNaN(u) {
		return xi, eta
	}
	r, _ := astro.SitePositionGCRS(*st, astro.UTCToUT1(utc, 0), tt)
	// The fit projects the site vector with the gradients at the observed,
	// topocentric direction; so does the prediction: a first pass at the
	// geocentric direction, a second at the topocentric one it gives (the
	// gradients change by ~p·ρ, 0.1 mas for a 5″ parallax 1° from the
	// tangent point; after the second pass by ~p²).
	gx, ge := frame.gradients(frame.direction(xi, eta))
	px, pe := r3.Dot(gx, r), r3.Dot(ge, r)
	gx, ge = frame.gradients(frame.direction(xi-u*px, eta-u*pe))
	px, pe = r3.Dot(gx, r), r3.Dot(ge, r)
	if g != nil && s.FitsInvDistance() {
		g[np-1] = -px
		g[2*np-1] = -pe
	}
	return xi - u*px, eta - u*pe
}

// Ellipse returns the error ellipse of the prediction at nSigma standard
// deviations: with the sky covariance [a b; b c] (RA·cos δ, Dec), the
// eigenvalues
//
//	λ± = (a + c)/2 ± √(((a − c)/2)² + b²)
//
// give the semi-axes nSigma·√λ±, and the major axis makes the angle
// θ = ½ atan2(2b, a − c) with the east axis, so its position angle from north
// through east is PA = atan2(cos θ, sin θ), reduced to [0, π). A circle has
// PA 0. nSigma is a per-axis scale (the 2-dof coverage of the 3-σ ellipse is
// 1 − exp(−9/2) = 98.9 %).
//
// Reference: Press et al., Numerical Recipes, 3rd ed. (2007), §11.1 (the
// Jacobi rotation, tan 2θ = 2b/(a − c)) and §15.6 (confidence ellipses).
func (p Prediction) Ellipse(nSigma float64) Ellipse {
	a, b, c := p.CovArcsec2[0][0], p.CovArcsec2[0][1], p.CovArcsec2[1][1]
	mid := (a + c) / 2
	rad := math.Hypot((a-c)/2, b)
	l1, l2 := mid+rad, mid-rad
	if l2 < 0 {
		l2 = 0 // rounding of a near-degenerate covariance
	}
	th := 0.5 * math.Atan2(2*b, a-c)
	pa := math.Atan2(math.Cos(th), math.Sin(th))
	if rad == 0 {
		pa = 0
	}
	pa = math.Mod(pa, math.Pi)
	if pa < 0 {
		pa += math.Pi
	}
	return Ellipse{
		Sigma:           nSigma,
		SemiMajorArcsec: nSigma * math.Sqrt(l1),
		SemiMinorArcsec: nSigma * math.Sqrt(l2),
		PA:              astro.Angle(pa),
	}
}
