package orbit

import (
	"errors"
	"fmt"
	"math"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// SkyPrediction is where a fitted orbit puts the body at one instant for one
// observer, with the uncertainty of the position.
type SkyPrediction struct {
	UTC  astro.JD
	Site *astro.Site // nil = geocentre
	// Method says how the uncertainty was obtained: "linear" (the covariance
	// propagated through the Jacobian, [Solution.Predict]) or "montecarlo"
	// (from sampled orbits).
	Method string
	// RA, Dec are the astrometric ICRS place seen from Site.
	RA, Dec astro.Angle
	// CovArcsec2 is the 2×2 covariance of the position in RA·cos δ (index 0)
	// and Dec (index 1), arcsec².
	CovArcsec2 [2][2]float64
	// RateArcsecPerMin is the rate of motion on the sky and RatePA its
	// direction, north through east, [0, 2π).
	RateArcsecPerMin float64
	RatePA           astro.Angle
	// DeltaAU and RAU are the distances from the observer and from the Sun
	// (at the light-time instant).
	DeltaAU, RAU float64
	// PhaseAngle is the Sun–body–observer angle, Elongation the
	// Sun–observer–body angle.
	PhaseAngle, Elongation astro.Angle
	// Mag is the predicted visual magnitude from the fitted H, G; NaN when
	// the solution has no H.
	Mag float64
	// Samples are the positions of sampled orbits as offsets from RA, Dec on
	// the tangent plane (RA·cos δ, Dec), arcsec; nil for Method "linear".
	Samples [][2]float64
	// Encounters are the close approaches the integration from the orbit's
	// epoch to the instant found; nil for two-body motion.
	Encounters []Encounter
}

// predictRateStepDays is the half-step of the central difference for the
// rate: one minute. The rate of a main-belt object changes over ±1 min by
// parts in 10⁷; the rounding of the difference is ~1e-15 rad / 7e-4 d.
const predictRateStepDays = 1.0 / 1440

// Predict returns the place of the fitted orbit at the UTC instant utc seen
// from site (nil: the geocentre), with its linear uncertainty.
//
// The place is that of [State.Observe] (light time, the site's position,
// UTC → TT → TDB; UT1 taken equal to UTC) for the observer geometry of
// [ephem.ObserverGeometryAt]. The covariance propagates the state covariance
// through the 2×6 Jacobian G of the place on the tangent plane at the
// predicted direction (east, north) with respect to the state, formed by
// central differences (the steps of the fit, fdSteps): C = G Cov Gᵀ, in
// arcsec². The rate is the central difference of the place over ±1 min
// (the site moving with the Earth), carried to the tangent plane. Δ, r, the
// phase angle and the elongation come from the same computation; the
// elongation takes the Sun's direction as −(observer's heliocentric
// position), which differs from the light-time-corrected one by < 0.01″.
//
// The linear propagation holds while the region is small compared with the
// curvature of the problem; far from the arc, or for a short arc, use
// sampling.
//
// An orbit with a Motion is integrated once from its epoch to the instant
// with its variational equations ([State.Propagate]); the place and the
// rate come from the state integrated there by two-body steps (its light
// time, ±1 min: see [Path] for what they neglect), and the Jacobian G is
// formed from the state transition matrix Φ through the light time
// ([Path.observePartials]): the covariance Φ·Cov·Φᵀ of the state at the
// instant, carried to the sky. For many instants, [Solution.PredictAll]
// integrates once.
//
// Errors: utc not a finite UTC date; a time the ephemeris cannot serve; an
// orbit that cannot be propagated to utc.
//
// Reference: Press et al., Numerical Recipes, 3rd ed. (2007), §15.6
// (propagation of the covariance), §5.7 (central differences); the tangent
// plane, Calabretta & Greisen (2002), A&A 395, 1077, §5.1.3.
func (s *Solution) Predict(utc astro.JD, site *astro.Site) (SkyPrediction, error) {
	if utc.Scale != astro.UTC {
		return SkyPrediction{}, fmt.Errorf("orbit: prediction time must be UTC, got %v", utc.Scale)
	}
	if f := utc.Float(); math.IsNaN(f) || math.IsInf(f, 0) {
		return SkyPrediction{}, errors.New("orbit: prediction time is not finite")
	}
	var st *astro.Site
	if site != nil {
		c := *site
		st = &c
	}
	geo := func(t astro.JD) (ephem.ObserverGeometry, error) {
		g, err := ephem.ObserverGeometryAt(t, st, 0)
		if err != nil && !errors.Is(err, astro.ErrStaleTable) && !errors.Is(err, astro.ErrUTCBefore1972) {
			return g, fmt.Errorf("orbit: prediction time: %w", err)
		}
		return g, nil
	}
	g, err := geo(utc)
	if err != nil {
		return SkyPrediction{}, err
	}
	if s.State.Motion != nil {
		p, err := s.State.Propagate([]astro.JD{g.TDB}, true)
		if err != nil {
			return SkyPrediction{}, fmt.Errorf("orbit: prediction at %s: %w", astro.FormatISO8601(utc, 0), err)
		}
		return s.predictFrom(p, 0, utc, st, g, geo)
	}
	seen, err := s.State.Observe(g)
	if err != nil {
		return SkyPrediction{}, fmt.Errorf("orbit: prediction at %s: %w", astro.FormatISO8601(utc, 0), err)
	}
	c := seen.Dir
	e, n := EastNorth(c)
	project := func(d r3.Vec) (float64, float64) {
		w := r3.Dot(d, c)
		return r3.Dot(d, e) / w, r3.Dot(d, n) / w
	}
	pr := SkyPrediction{UTC: utc, Site: st, Method: "linear", DeltaAU: seen.DeltaAU, RAU: seen.RAU,
		PhaseAngle: phaseAngle(seen), Elongation: angleBetweenVec(r3.Scale(-1, g.HelioPos), c)}
	pr.RA, pr.Dec, _ = astro.Spherical(c)
	pr.RA = pr.RA.Normalized()
	pr.Mag = s.Magnitude(seen)

	// Jacobian of (east, north) with respect to the state.
	x0 := stateVector(s.State)
	h := fdSteps(x0)
	var jac [2][6]float64
	for k := 0; k < 6; k++ {
		xp, xm := x0, x0
		xp[k] += h[k]
		xm[k] -= h[k]
		sp, err := stateOfVector(s.State.Epoch, xp).Observe(g)
		if err != nil {
			return SkyPrediction{}, fmt.Errorf("orbit: prediction covariance: %w", err)
		}
		sm, err := stateOfVector(s.State.Epoch, xm).Observe(g)
		if err != nil {
			return SkyPrediction{}, fmt.Errorf("orbit: prediction covariance: %w", err)
		}
		ep, np := project(sp.Dir)
		em, nm := project(sm.Dir)
		jac[0][k] = (ep - em) / (2 * h[k])
		jac[1][k] = (np - nm) / (2 * h[k])
	}
	pr.CovArcsec2 = skyCovArcsec2(jac, s.Cov)

	// Rate over ±1 min.
	var ends [2][2]float64
	for i, dt := range [2]float64{predictRateStepDays, -predictRateStepDays} {
		gi, err := geo(utc.AddDays(dt))
		if err != nil {
			return SkyPrediction{}, err
		}
		si, err := s.State.Observe(gi)
		if err != nil {
			return SkyPrediction{}, fmt.Errorf("orbit: prediction rate: %w", err)
		}
		ends[i][0], ends[i][1] = project(si.Dir)
	}
	dE := (ends[0][0] - ends[1][0]) / 2 // radians per minute
	dN := (ends[0][1] - ends[1][1]) / 2
	pr.RateArcsecPerMin = astro.Angle(math.Hypot(dE, dN)).Arcseconds()
	pr.RatePA = astro.Angle(math.Atan2(dE, dN)).Normalized()
	return pr, nil
}

// PredictAll returns [Solution.Predict] at each UTC instant of utcs for the
// site (nil: the geocentre). An orbit with a Motion is integrated once to
// all the instants; a two-body orbit is predicted at each in turn.
//
// Errors: those of [Solution.Predict], for the first instant that fails.
func (s *Solution) PredictAll(utcs []astro.JD, site *astro.Site) ([]SkyPrediction, error) {
	out := make([]SkyPrediction, 0, len(utcs))
	if s.State.Motion == nil {
		for _, t := range utcs {
			p, err := s.Predict(t, site)
			if err != nil {
				return nil, err
			}
			out = append(out, p)
		}
		return out, nil
	}
	var st *astro.Site
	if site != nil {
		c := *site
		st = &c
	}
	geo := predictGeometry(st)
	gs := make([]ephem.ObserverGeometry, len(utcs))
	ts := make([]astro.JD, len(utcs))
	for i, utc := range utcs {
		if utc.Scale != astro.UTC {
			return nil, fmt.Errorf("orbit: prediction time must be UTC, got %v", utc.Scale)
		}
		if f := utc.Float(); math.IsNaN(f) || math.IsInf(f, 0) {
			return nil, errors.New("orbit: prediction time is not finite")
		}
		g, err := geo(utc)
		if err != nil {
			return nil, err
		}
		gs[i], ts[i] = g, g.TDB
	}
	p, err := s.State.Propagate(ts, true)
	if err != nil {
		return nil, fmt.Errorf("orbit: prediction: %w", err)
	}
	for i, utc := range utcs {
		pr, err := s.predictFrom(p, i, utc, st, gs[i], geo)
		if err != nil {
			return nil, err
		}
		out = append(out, pr)
	}
	return out, nil
}

// predictGeometry returns the observer geometry of site at a UTC instant
// for a prediction (a stale leap-second table or UTC before 1972 is no
// error).
func predictGeometry(st *astro.Site) func(t astro.JD) (ephem.ObserverGeometry, error) {
	return func(t astro.JD) (ephem.ObserverGeometry, error) {
		g, err := ephem.ObserverGeometryAt(t, st, 0)
		if err != nil && !errors.Is(err, astro.ErrStaleTable) && !errors.Is(err, astro.ErrUTCBefore1972) {
			return g, fmt.Errorf("orbit: prediction time: %w", err)
		}
		return g, nil
	}
}

// predictFrom is [Solution.Predict] from anchor k of the path p (integrated
// with its state transition matrix to g.TDB): the place, Δ, r and the
// angles as [Solution.Predict] forms them, the covariance through Φ and the
// light time, the rate by two-body steps of ±1 min from the anchor.
func (s *Solution) predictFrom(p *Path, k int, utc astro.JD, st *astro.Site, g ephem.ObserverGeometry,
	geo func(astro.JD) (ephem.ObserverGeometry, error)) (SkyPrediction, error) {
	seen, du, err := p.observePartials(k, g)
	if err != nil {
		return SkyPrediction{}, fmt.Errorf("orbit: prediction at %s: %w", astro.FormatISO8601(utc, 0), err)
	}
	c := seen.Dir
	e, n := EastNorth(c)
	project := func(d r3.Vec) (float64, float64) {
		w := r3.Dot(d, c)
		return r3.Dot(d, e) / w, r3.Dot(d, n) / w
	}
	pr := SkyPrediction{UTC: utc, Site: st, Method: "linear", DeltaAU: seen.DeltaAU, RAU: seen.RAU,
		PhaseAngle: phaseAngle(seen), Elongation: angleBetweenVec(r3.Scale(-1, g.HelioPos), c),
		Encounters: append([]Encounter(nil), p.Encounters...)}
	pr.RA, pr.Dec, _ = astro.Spherical(c)
	pr.RA = pr.RA.Normalized()
	pr.Mag = s.Magnitude(seen)
	// G = ∂(east, north)/∂x₀: at the tangent point the projection's
	// derivative along a unit-vector change du is (e·du, n·du).
	var jac [2][6]float64
	for j := range 6 {
		dc := r3.Vec{X: du[0][j], Y: du[1][j], Z: du[2][j]}
		jac[0][j], jac[1][j] = r3.Dot(e, dc), r3.Dot(n, dc)
	}
	pr.CovArcsec2 = skyCovArcsec2(jac, s.Cov)
	var ends [2][2]float64
	for i, dt := range [2]float64{predictRateStepDays, -predictRateStepDays} {
		gi, err := geo(utc.AddDays(dt))
		if err != nil {
			return SkyPrediction{}, err
		}
		si, err := p.Observe(k, gi)
		if err != nil {
			return SkyPrediction{}, fmt.Errorf("orbit: prediction rate: %w", err)
		}
		ends[i][0], ends[i][1] = project(si.Dir)
	}
	dE := (ends[0][0] - ends[1][0]) / 2
	dN := (ends[0][1] - ends[1][1]) / 2
	pr.RateArcsecPerMin = astro.Angle(math.Hypot(dE, dN)).Arcseconds()
	pr.RatePA = astro.Angle(math.Atan2(dE, dN)).Normalized()
	return pr, nil
}

// MovedTo returns the solution carried to each TDB instant of tdbs by one
// integration of its Motion with the variational equations: at each
// instant, the orbit osculating there as a two-body State (Motion nil, good
// for short steps: see [Path]) with the covariance propagated through the
// integration,
//
//	Cov(t) = Φ(t)·Cov·Φ(t)ᵀ,   Φ(t) = ∂x(t)/∂x(epoch),
//
// and the solution's H, G and figures; and the path, whose Encounters are
// the close approaches between the epoch and the instants. A prediction
// from a moved solution near its instant is [Solution.Predict] of the
// perturbed orbit to the step's accuracy.
//
// Errors: a two-body solution (it has no integration to carry it); those
// of [State.Propagate].
//
// Reference: Montenbruck & Gill, Satellite Orbits (2000), §7.2.2 (the
// covariance propagated by the state transition matrix).
func (s *Solution) MovedTo(tdbs []astro.JD) ([]*Solution, *Path, error) {
	if s.State.Motion == nil {
		return nil, nil, errNoMotion
	}
	if s.Cov == nil || s.Cov.SymmetricDim() != 6 {
		return nil, nil, errors.New("orbit: the solution has no 6×6 covariance to carry")
	}
	p, err := s.State.Propagate(tdbs, true)
	if err != nil {
		return nil, nil, err
	}
	out := make([]*Solution, len(tdbs))
	for k := range tdbs {
		a, err := p.Anchor(k)
		if err != nil {
			return nil, nil, err
		}
		phi, _ := p.STM(k)
		cov := mat.NewSymDense(6, nil)
		var pc [6][6]float64 // Φ·Cov
		for i := range 6 {
			for j := range 6 {
				v := 0.0
				for l := range 6 {
					v += phi[i*6+l] * s.Cov.At(l, j)
				}
				pc[i][j] = v
			}
		}
		for i := range 6 {
			for j := i; j < 6; j++ {
				v := 0.0
				for l := range 6 {
					v += pc[i][l] * phi[j*6+l]
				}
				cov.SetSym(i, j, v)
			}
		}
		m := *s
		m.State, m.Cov = a, cov
		m.Residuals, m.Notes, m.Encounters = nil, nil, nil
		out[k] = &m
	}
	return out, p, nil
}

// skyCovArcsec2 returns the 2×2 sky covariance J·C·Jᵀ (arcsec²) of the 6×6
// state covariance cov (au, au/day) through the Jacobian jac of the tangent-
// plane place (radians) with respect to the state: the linear propagation of
// a covariance (Press et al., Numerical Recipes, 3rd ed. (2007), §15.6).
func skyCovArcsec2(jac [2][6]float64, cov *mat.SymDense) [2][2]float64 {
	as2 := astro.Arcsecond.Radians() * astro.Arcsecond.Radians()
	var c [2][2]float64
	for a := 0; a < 2; a++ {
		for b := a; b < 2; b++ {
			v := 0.0
			for i := 0; i < 6; i++ {
				for j := 0; j < 6; j++ {
					v += jac[a][i] * cov.At(i, j) * jac[b][j]
				}
			}
			c[a][b] = v / as2
			c[b][a] = v / as2
		}
	}
	return c
}
