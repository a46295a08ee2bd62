package orbit

import (
	"errors"
	"fmt"
	"math"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// SkySample is one sampled orbit's place at the prediction instant.
type SkySample struct {
	// RA, Dec are the astrometric ICRS place for the observer.
	RA, Dec astro.Angle
	// Weight is the orbit's weight (those of a region sum to 1 less its
	// LostWeight).
	Weight float64
	// DeltaAU is the distance from the observer, au.
	DeltaAU float64
}

// SampledRegion is a search region from sampled orbits propagated
// non-linearly to one instant: their weighted mean place and the sample
// covariance on the tangent plane there.
type SampledRegion struct {
	// UTC is the prediction instant.
	UTC astro.JD
	// Method is the sampling method of the orbits ([SamplingCovariance] or
	// [SamplingRanging]).
	Method string
	// RA, Dec are the centre: the deprojection of the weighted mean of the
	// samples' standard coordinates about their mean direction.
	RA, Dec astro.Angle
	// CovArcsec2 is the weighted sample covariance of the places on the
	// tangent plane at (RA, Dec), in RA·cos δ (index 0, east) and Dec
	// (index 1, north), arcsec², with the reliability-weight correction
	// 1/(1 − Σw²).
	CovArcsec2 [2][2]float64
	// DeltaAU is the weighted mean distance from the observer, au.
	DeltaAU float64
	// Samples are the places, in the order of the orbits; an orbit that
	// could not be propagated to the instant is left out.
	Samples []SkySample
	// Failed counts the orbits left out; Far the samples more than 80° from
	// the centre (kept in Samples, left out of the covariance, counted
	// outside every ellipse). LostWeight is the weight of both.
	Failed, Far int
	LostWeight  float64
	// EffectiveN is Kish's effective sample size of the weights used.
	EffectiveN float64
	// Notes are the orbits' notes and remarks on the region, one line each.
	Notes []string

	// xi, eta are the samples' standard coordinates about (RA, Dec), arcsec;
	// NaN for a failed or far sample.
	xi, eta []float64
}

// RegionEllipse is the ellipse of a [SampledRegion] at a σ level, with the
// share of the samples' weight inside it.
type RegionEllipse struct {
	Sigma                            float64 // the σ level it is drawn at
	SemiMajorArcsec, SemiMinorArcsec float64
	PA                               astro.Angle // of the major axis, north through east, [0, π)
	// Inside is the weight of the samples inside the ellipse: 1 − exp(−σ²/2)
	// (98.9 % at 3σ) for a Gaussian cloud, less for a curved or long-tailed
	// one.
	Inside float64
}

// smpFarCos is the cosine of 80°: samples farther than that from the centre
// have no useful place on its tangent plane (tan 80° = 5.7).
var smpFarCos = math.Cos(80 * math.Pi / 180)

// Predict propagates every orbit of the set to the observer geometry at
// (two-body motion, light time, [State.Observe]; an orbit with a Motion is
// integrated to the instant, the orbits in parallel) and returns the search
// region they give. s.Workers and s.Progress are used; s.N and s.Seed are
// not.
//
// The centre: the weighted mean of the unit vectors gives a first tangent
// point c₀; the weighted mean (ξ̄, η̄) of the samples' standard coordinates
// about c₀ (gnomonic projection, [Residual]) is deprojected to the centre c,
// and the samples are projected again about c (their weighted mean there
// is then zero to second order in the cloud's size). The covariance is
//
//	C = Σ wᵢ·dᵢ·dᵢᵀ / (1 − Σ wᵢ²),   dᵢ = (ξᵢ − ξ̄, ηᵢ − η̄)
//
// (weights normalised over the samples used), in arcsec².
//
// Errors: no orbits; every orbit failing to propagate; settings out of range.
//
// Reference: Calabretta & Greisen, A&A 395 (2002), 1077, §5.1.3 (gnomonic
// projection); the weighted covariance with reliability weights: Galassi et
// al., GNU Scientific Library Reference Manual, 3rd ed. (2009), statistics
// chapter, "Weighted Samples"; Kish, Survey Sampling (1965) (effective
// sample size).
func (o *OrbitSamples) Predict(at ephem.ObserverGeometry, s MonteCarloSettings) (*SampledRegion, error) {
	rs, err := o.PredictAll([]ephem.ObserverGeometry{at}, s)
	if err != nil {
		return nil, err
	}
	return rs[0], nil
}

// PredictAll returns the regions of [OrbitSamples.Predict] at each observer
// geometry of ats. Each orbit with a Motion is integrated once to all the
// instants ([State.Propagate]), the orbits in parallel across s.Workers
// goroutines; a two-body orbit is propagated from its epoch to each.
//
// Errors: those of [OrbitSamples.Predict], for the first instant that
// fails.
func (o *OrbitSamples) PredictAll(ats []ephem.ObserverGeometry, s MonteCarloSettings) ([]*SampledRegion, error) {
	if o == nil || len(o.States) == 0 {
		return nil, errors.New("orbit: Monte Carlo: no sampled orbits to propagate")
	}
	if len(o.Weights) != len(o.States) {
		return nil, fmt.Errorf("orbit: Monte Carlo: %d weights for %d orbits", len(o.Weights), len(o.States))
	}
	s.N = len(o.States)
	s, err := s.resolved()
	if err != nil {
		return nil, err
	}
	n, m := len(o.States), len(ats)
	tdbs := make([]astro.JD, m)
	for j := range ats {
		tdbs[j] = ats[j].TDB
	}
	dirs := make([][]r3.Vec, m)
	samples := make([][]SkySample, m)
	okAt := make([][]bool, m)
	for j := range ats {
		dirs[j], samples[j], okAt[j] = make([]r3.Vec, n), make([]SkySample, n), make([]bool, n)
	}
	prog := mcNewProgress(s.Progress, n)
	mcRun(n, s.Workers, prog, func() func(i int) {
		return func(i int) {
			st := o.States[i]
			var path *Path
			if st.Motion != nil {
				var err error
				if path, err = st.Propagate(tdbs, false); err != nil {
					return
				}
			}
			for j := range ats {
				var seen Seen
				var err error
				if path != nil {
					seen, err = path.Observe(j, ats[j])
				} else {
					seen, err = st.Observe(ats[j])
				}
				if err != nil || !rgFinite(seen.Dir) || !rgFiniteF(seen.DeltaAU) {
					continue
				}
				ra, dec, _ := astro.Spherical(seen.Dir)
				dirs[j][i] = seen.Dir
				samples[j][i] = SkySample{RA: ra, Dec: dec, Weight: o.Weights[i], DeltaAU: seen.DeltaAU}
				okAt[j][i] = true
			}
		}
	})
	prog.finish()
	out := make([]*SampledRegion, m)
	for j := range ats {
		r, err := o.region(ats[j], dirs[j], samples[j], okAt[j])
		if err != nil {
			return nil, err
		}
		out[j] = r
	}
	return out, nil
}

// region forms the search region of [OrbitSamples.Predict] at the
// geometry at from the sampled places (valid where okAt).
func (o *OrbitSamples) region(at ephem.ObserverGeometry, dirs []r3.Vec, samples []SkySample, okAt []bool) (*SampledRegion, error) {
	n := len(o.States)
	r := &SampledRegion{UTC: at.UTC, Method: o.Method, Notes: append([]string(nil), o.Notes...)}
	// Keep the orbits that reached the instant, in order.
	k := 0
	for i := range n {
		if !okAt[i] {
			r.Failed++
			r.LostWeight += o.Weights[i]
			continue
		}
		samples[k], dirs[k] = samples[i], dirs[i]
		k++
	}
	samples, dirs = samples[:k], dirs[:k]
	r.Samples = samples
	var sum r3.Vec
	for i := range samples {
		sum = r3.Add(sum, r3.Scale(samples[i].Weight, dirs[i]))
	}
	if k == 0 || !(r3.Norm(sum) > 0) {
		return nil, fmt.Errorf("orbit: Monte Carlo: none of the %d orbits could be propagated to %v", n, at.UTC)
	}
	// Centre: the mean direction, moved to the weighted mean of the
	// standard coordinates about it.
	c := r3.Unit(sum)
	var sw, sx, sy float64
	for i := range samples {
		if r3.Dot(dirs[i], c) < smpFarCos {
			continue
		}
		x, y := Residual(samples[i].RA, samples[i].Dec, c)
		w := samples[i].Weight
		sw, sx, sy = sw+w, sx+w*x, sy+w*y
	}
	if !(sw > 0) {
		return nil, errors.New("orbit: Monte Carlo: the sampled places carry no weight near their mean")
	}
	e, nn := EastNorth(c)
	c = r3.Unit(r3.Add(c, r3.Add(r3.Scale(sx/sw, e), r3.Scale(sy/sw, nn))))
	r.RA, r.Dec, _ = astro.Spherical(c)
	// Standard coordinates about the centre (arcsec), the weighted mean and
	// covariance.
	r.xi, r.eta = make([]float64, k), make([]float64, k)
	var sw2, sxx, sxy, syy, sd, mx, my float64
	sw = 0
	as := float64(astro.Arcsecond)
	for i := range samples {
		r.xi[i], r.eta[i] = math.NaN(), math.NaN()
		if r3.Dot(dirs[i], c) < smpFarCos {
			r.Far++
			r.LostWeight += samples[i].Weight
			continue
		}
		x, y := Residual(samples[i].RA, samples[i].Dec, c)
		r.xi[i], r.eta[i] = x/as, y/as
		w := samples[i].Weight
		sw += w
		mx += w * r.xi[i]
		my += w * r.eta[i]
		sd += w * samples[i].DeltaAU
	}
	if !(sw > 0) {
		return nil, errors.New("orbit: Monte Carlo: the sampled places carry no weight near their centre")
	}
	mx /= sw
	my /= sw
	for i := range samples {
		if math.IsNaN(r.xi[i]) {
			continue
		}
		w := samples[i].Weight / sw
		dx, dy := r.xi[i]-mx, r.eta[i]-my
		sw2 += w * w
		sxx += w * dx * dx
		sxy += w * dx * dy
		syy += w * dy * dy
	}
	corr := 1.0
	if sw2 < 1 {
		corr = 1 / (1 - sw2)
	}
	r.CovArcsec2 = [2][2]float64{{sxx * corr, sxy * corr}, {sxy * corr, syy * corr}}
	r.DeltaAU = sd / sw
	r.EffectiveN = 1 / sw2
	if r.Failed > 0 || r.Far > 0 {
		r.Notes = append(r.Notes, fmt.Sprintf("%d orbit(s) could not be propagated to the instant and %d lie more than 80° from the centre: %.2g%% of the weight is outside every ellipse",
			r.Failed, r.Far, 100*r.LostWeight))
	}
	return r, nil
}

// Ellipse returns the region's error ellipse at nSigma standard deviations,
// with the convention of the sky-plane fit's prediction ellipse (package
// fit, Prediction.Ellipse): for the covariance [a b; b c] (east, north) the
// eigenvalues λ± = (a + c)/2 ± √(((a − c)/2)² + b²) give the semi-axes
// nSigma·√λ±, and the major axis, at θ = ½·atan2(2b, a − c) from east, has
// the position angle atan2(cos θ, sin θ) from north through east, in [0, π)
// (0 for a circle). Inside is the weight of the samples whose Mahalanobis
// distance from the centre, d² = (x − x̄)ᵀC⁻¹(x − x̄), is at most nSigma².
//
// Reference: Press et al., Numerical Recipes, 3rd ed. (2007), §11.1 (the
// Jacobi rotation) and §15.6 (confidence ellipses).
func (r *SampledRegion) Ellipse(nSigma float64) RegionEllipse {
	a, b, pa := smpAxes(r.CovArcsec2, nSigma)
	return RegionEllipse{Sigma: nSigma, SemiMajorArcsec: a, SemiMinorArcsec: b, PA: pa, Inside: r.inside(nSigma)}
}

// smpAxes returns the semi-axes (arcsec) and the position angle of the
// major axis of the nSigma ellipse of the sky covariance cov (arcsec²; see
// [SampledRegion.Ellipse]).
func smpAxes(cov [2][2]float64, nSigma float64) (major, minor float64, pa astro.Angle) {
	a, b, c := cov[0][0], cov[0][1], cov[1][1]
	mid := (a + c) / 2
	rad := math.Hypot((a-c)/2, b)
	l1, l2 := math.Max(mid+rad, 0), math.Max(mid-rad, 0)
	p := 0.0
	if rad > 0 {
		th := 0.5 * math.Atan2(2*b, a-c)
		p = math.Mod(math.Atan2(math.Cos(th), math.Sin(th)), math.Pi)
		if p < 0 {
			p += math.Pi
		}
	}
	return nSigma * math.Sqrt(l1), nSigma * math.Sqrt(l2), astro.Angle(p)
}

// inside returns the weight of the samples within nSigma (Mahalanobis) of
// the centre of the sample covariance.
func (r *SampledRegion) inside(nSigma float64) float64 {
	a, b, c := r.CovArcsec2[0][0], r.CovArcsec2[0][1], r.CovArcsec2[1][1]
	det := a*c - b*b
	var mx, my, sw float64
	for i, s := range r.Samples {
		if math.IsNaN(r.xi[i]) {
			continue
		}
		mx += s.Weight * r.xi[i]
		my += s.Weight * r.eta[i]
		sw += s.Weight
	}
	if !(sw > 0) {
		return 0
	}
	mx /= sw
	my /= sw
	in := 0.0
	k2 := nSigma * nSigma
	for i, s := range r.Samples {
		if math.IsNaN(r.xi[i]) {
			continue
		}
		dx, dy := r.xi[i]-mx, r.eta[i]-my
		var d2 float64
		if det > 1e-300*(a*c+1e-300) && det > 0 {
			d2 = (c*dx*dx - 2*b*dx*dy + a*dy*dy) / det
		} else if dx == 0 && dy == 0 {
			d2 = 0
		} else {
			d2 = math.Inf(1)
		}
		if d2 <= k2 {
			in += s.Weight
		}
	}
	return math.Min(in, 1)
}

// Mahalanobis returns the Mahalanobis distance of the place (ra, dec) from
// the region's centre under its covariance, in σ: the value to compare with
// the σ level of an ellipse (a place is inside the nσ ellipse when it is at
// most n). It is +Inf for a place more than 80° away or a degenerate
// covariance.
func (r *SampledRegion) Mahalanobis(ra, dec astro.Angle) float64 {
	c := astro.UnitVector(r.RA, r.Dec)
	if r3.Dot(astro.UnitVector(ra, dec), c) < smpFarCos {
		return math.Inf(1)
	}
	x, y := Residual(ra, dec, c)
	as := float64(astro.Arcsecond)
	x, y = x/as, y/as
	var mx, my, sw float64
	for i, s := range r.Samples {
		if i < len(r.xi) && !math.IsNaN(r.xi[i]) {
			mx += s.Weight * r.xi[i]
			my += s.Weight * r.eta[i]
			sw += s.Weight
		}
	}
	if sw > 0 {
		x, y = x-mx/sw, y-my/sw
	}
	a, b, cc := r.CovArcsec2[0][0], r.CovArcsec2[0][1], r.CovArcsec2[1][1]
	det := a*cc - b*b
	if !(det > 0) {
		return math.Inf(1)
	}
	return math.Sqrt((cc*x*x - 2*b*x*y + a*y*y) / det)
}

// Offsets returns the samples' standard coordinates about the centre
// (RA, Dec), arcsec, east (RA·cos δ) then north, with their weights, leaving
// out the Far samples: the form of a prediction's sampled positions.
func (r *SampledRegion) Offsets() (offsets [][2]float64, weights []float64) {
	for i, s := range r.Samples {
		if i >= len(r.xi) || math.IsNaN(r.xi[i]) {
			continue
		}
		offsets = append(offsets, [2]float64{r.xi[i], r.eta[i]})
		weights = append(weights, s.Weight)
	}
	return offsets, weights
}
