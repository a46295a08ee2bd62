package orbit

import (
	"math"

	"arcfit/astro"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// rgAnchor is the track's direction at the instant of one observation (the
// anchor), fitted to that night's observations from the same site, as a
// function of the distance: the trial orbits of the ranging pass through
// two anchors.
//
// Model: on the tangent plane at the anchor observation's direction c, the
// observed standard coordinates are those of a geocentric track moving
// uniformly, displaced by the diurnal parallax of a body at distance ρ,
//
//	x_j = a_x + b_x·τ_j − (G_j·e)/ρ,   y_j = a_y + b_y·τ_j − (G_j·n)/ρ,
//
// τ_j the time from the anchor (days), G_j the site's geocentric position
// (au), e and n the local east and north at c. The weighted least-squares
// estimate (each observation whitened by its 2×2 covariance) is linear in
// the data, so the topocentric place at the anchor is
//
//	x(ρ) = x₀ + k_x/ρ,   y(ρ) = y₀ + k_y/ρ
//
// with (x₀, y₀) the fit to the observed coordinates and (k_x, k_y) the fit to
// the parallax columns minus the anchor's own parallax; its covariance (that
// of (a_x, a_y)) does not depend on ρ. With a single observation (or all at
// one instant) the anchor is that observation, with its own covariance.
//
// Reference: the diurnal parallax, Smart, Textbook on Spherical Astronomy,
// 6th ed. (1977); weighted least squares, Björck, Numerical Methods for
// Least Squares Problems (1996), ch. 1–2.
type rgAnchor struct {
	obs     int    // the anchor observation, index into the observations
	c, e, n r3.Vec // tangent point (the observed direction) and its east, north
	x0, y0  float64
	kx, ky  float64       // radians·au
	l       [2][2]float64 // lower Cholesky factor of the place's covariance, radians
	nFit    int           // observations in the fit
}

// rgNewAnchor fits the anchor at obs[k] to the observations members (which
// include k).
func rgNewAnchor(obs []Observation, members []int, k int) rgAnchor {
	o := &obs[k]
	a := rgAnchor{obs: k, c: astro.UnitVector(o.RA, o.Dec), nFit: 1}
	a.e, a.n = EastNorth(a.c)
	own := func() {
		sE, sN, rho := o.SigmaRA, o.SigmaDec, o.Corr
		a.l = [2][2]float64{{sE, 0}, {rho * sN, sN * math.Sqrt(1-rho*rho)}}
	}
	own()
	t0 := o.Geo.TDB
	span := 0.0
	for _, j := range members {
		span = math.Max(span, math.Abs(rgDays(obs[j].Geo.TDB, t0)))
	}
	if len(members) < 2 || span < 60*rgSameTimeDays {
		return a
	}
	m := len(members)
	// Whitened design (columns a_x, b_x·s, a_y, b_y·s; τ scaled by the span
	// s for conditioning) and two right-hand sides: the data and the
	// parallax column (G·e, G·n).
	design := mat.NewDense(2*m, 4, nil)
	rhs := mat.NewDense(2*m, 2, nil)
	gk := obs[k].Geo.GeoPos
	for r, j := range members {
		oj := &obs[j]
		tau := rgDays(oj.Geo.TDB, t0) / span
		x, y := Residual(oj.RA, oj.Dec, a.c)
		g := oj.Geo.GeoPos
		cols := [4][2]float64{{1, 0}, {tau, 0}, {0, 1}, {0, tau}}
		for c, v := range cols {
			w1, w2 := oj.Whitened(v[0], v[1])
			design.Set(2*r, c, w1)
			design.Set(2*r+1, c, w2)
		}
		d := [2][2]float64{{x, y}, {r3.Dot(g, a.e), r3.Dot(g, a.n)}}
		for c, v := range d {
			w1, w2 := oj.Whitened(v[0], v[1])
			rhs.Set(2*r, c, w1)
			rhs.Set(2*r+1, c, w2)
		}
	}
	var qr mat.QR
	qr.Factorize(design)
	if qr.Cond() > 1e10 {
		return a
	}
	var sol mat.Dense
	if err := qr.SolveTo(&sol, false, rhs); err != nil {
		return a
	}
	// Covariance of (a_x, a_y): entries 0 and 2 of (MᵀM)⁻¹ (M the whitened
	// design, well conditioned after the scaling of τ).
	var ata mat.SymDense
	ata.SymOuterK(1, design.T())
	var ch mat.Cholesky
	if !ch.Factorize(&ata) {
		return a
	}
	var cov mat.SymDense
	if err := ch.InverseTo(&cov); err != nil {
		return a
	}
	cxx, cxy, cyy := cov.At(0, 0), cov.At(0, 2), cov.At(2, 2)
	if !(cxx > 0) || !(cyy > 0) || !(cxx*cyy-cxy*cxy > 0) || !rgFiniteF(sol.At(0, 0)+sol.At(2, 0)) {
		return a
	}
	a.x0, a.y0 = sol.At(0, 0), sol.At(2, 0)
	// Fitted parallax column at the anchor minus the anchor's own parallax;
	// a_x(ρ) adds +fit(G·e)/ρ, the place subtracts (G_k·e)/ρ.
	a.kx = sol.At(0, 1) - r3.Dot(gk, a.e)
	a.ky = sol.At(2, 1) - r3.Dot(gk, a.n)
	l00 := math.Sqrt(cxx)
	l10 := cxy / l00
	a.l = [2][2]float64{{l00, 0}, {l10, math.Sqrt(cyy - l10*l10)}}
	a.nFit = m
	return a
}

// dir returns the anchor's direction for the distance rho (au), displaced
// by s·L·(z1, z2) on the tangent plane (s = 0: the fitted place).
func (a *rgAnchor) dir(rho, s, z1, z2 float64) r3.Vec {
	x := a.x0 + a.kx/rho + s*a.l[0][0]*z1
	y := a.y0 + a.ky/rho + s*(a.l[1][0]*z1+a.l[1][1]*z2)
	return r3.Unit(r3.Add(a.c, r3.Add(r3.Scale(x, a.e), r3.Scale(y, a.n))))
}
