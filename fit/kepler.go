package fit

import (
	"errors"
	"fmt"
	"math"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit/orbit"
)

// OrbitFit is an orbit model fitted to a track's observations — the
// two-body orbit (model kepler) or the orbit perturbed by the planets
// (model nbody, Solution.State.Motion set): the differentially corrected
// orbit, its elements with their uncertainties and its class.
type OrbitFit struct {
	// Solution is the corrected orbit with its covariance and residuals.
	Solution *orbit.Solution
	// Obs are the observations as the orbit fit used them (observer
	// geometry computed once); nil for an orbit loaded from a fit file.
	Obs []orbit.Observation
	// Elements are the osculating heliocentric elements at the epoch
	// (ecliptic and equinox J2000), Sigma their 1-σ uncertainties, Class the
	// plain orbit class.
	Elements ephem.Elements
	Sigma    orbit.ElementSigma
	Class    orbit.Class
	// Warnings are time-scale warnings of the observations.
	Warnings []string
	// MonteCarlo sets the sampling used when the rule of
	// orbit.ChooseSampling asks for it; the zero value is the default.
	MonteCarlo orbit.MonteCarloSettings
	// NoSampling turns the Monte Carlo regions off (linear propagation only).
	NoSampling bool
	// RangingOnly reports an orbit model made from the ranging cloud alone
	// (an arc of fewer than three nights the correction could not settle):
	// every prediction is sampled.
	RangingOnly bool

	// samples caches the sampled orbits by method (they do not depend on
	// the prediction time).
	samples map[string]*orbit.OrbitSamples
	// nb caches the perturbed orbit's integrations (nil for two-body
	// motion); see nbodypredict.go.
	nb *nbodyCache
}

// FitOrbit determines the two-body orbit of the track's observations
// ([orbit.Determine]: Gauss's method or, for short arcs, the search over the
// topocentric distance, then the differential correction with the outlier
// rule of the sky-plane fit; s.KeepAll and s.RejectChi2 apply). On an arc of
// fewer than three nights where the correction cannot settle on one orbit,
// the model is the cloud of orbits consistent with the data, sampled by
// statistical ranging (RangingOnly; see rangingFit).
//
// Errors: a track without its observation set (loaded from a fit file), and
// those of orbit.NewObservations and orbit.Determine, which say what would
// help (more nights, a longer arc).
func FitOrbit(tr *Track, s Settings) (*OrbitFit, error) {
	return fitOrbitMotion(tr, s, nil)
}

// fitOrbitMotion is [FitOrbit] with the dynamics m (nil: two-body motion).
func fitOrbitMotion(tr *Track, s Settings, m orbit.Motion) (*OrbitFit, error) {
	if tr == nil || tr.Set == nil {
		return nil, errors.New("fit: the orbit needs the observations themselves, not a saved track")
	}
	obs, warns, err := orbit.NewObservations(tr.Set, tr.Sites)
	if err != nil {
		return nil, err
	}
	sol, err := orbit.Determine(obs, orbit.Options{KeepAll: s.KeepAll, RejectChi2: s.RejectChi2, Motion: m})
	if err != nil {
		if ch := orbit.ChooseSampling(obs, obs[len(obs)-1].Geo.UTC, false); ch.Method == orbit.SamplingRanging {
			if of, rerr := rangingFit(obs, warns, err); rerr == nil {
				if m != nil {
					of.setMotion(m)
				}
				return of, nil
			}
		}
		return nil, err
	}
	return newOrbitFit(sol, obs, warns)
}

// newOrbitFit completes an orbit solution with its elements and class.
func newOrbitFit(sol *orbit.Solution, obs []orbit.Observation, warns []string) (*OrbitFit, error) {
	el, sg, err := sol.Elements()
	if err != nil {
		return nil, fmt.Errorf("fit: the orbit's elements: %w", err)
	}
	return &OrbitFit{Solution: sol, Obs: obs, Elements: el, Sigma: sg, Class: orbit.Classify(el), Warnings: warns}, nil
}

// Predict returns the orbit's place at the UTC instant utc seen from site
// (nil: the geocentre) as a [Prediction] with model "kepler", with the
// magnitude from the fitted H when the observations had magnitudes.
//
// The search region: the linear propagation of the orbit's covariance
// ([orbit.Solution.Predict]) unless the sampling rule of
// [orbit.ChooseSampling] says the orbit is too weakly determined for it
// (fewer than its minimum of nights: orbits sampled by ranging; a
// prediction far beyond the arc: orbits sampled from the covariance, used
// when their region differs from the linear one, [orbit.CompareLinear]).
// Then the region is the sampled orbits' (their
// weighted mean place and covariance, propagated non-linearly), Method
// "montecarlo" and Samples the offsets of the sampled places. An orbit read
// from a fit file has no observations, so it samples from its covariance
// and keeps the linear region when the two agree. A sampling that fails
// leaves the linear region.
//
// A perturbed orbit (model nbody) predicts from the integration of the
// orbit and of its sampled orbits to an instant near utc, then by a short
// two-body step (see [OrbitFit.Prepare] and nbodypredict.go).
func (f *OrbitFit) Predict(utc astro.JD, site *astro.Site) (Prediction, error) {
	return f.predict(utc, site, true)
}

// PredictLinear is [OrbitFit.Predict] without the sampled regions: the
// fitted orbit's place and the linear propagation of its covariance,
// whatever the sampling rule would ask for. Where Predict's region is
// sampled, its centre (the samples' weighted mean) may differ from this
// place by a fraction of the region. It is the cheap answer for where the
// object stands on the sky (a night's altitudes); the search region to print
// is Predict's.
func (f *OrbitFit) PredictLinear(utc astro.JD, site *astro.Site) (Prediction, error) {
	return f.predict(utc, site, false)
}

// predict is Predict, with the sampled regions when sampling is true.
func (f *OrbitFit) predict(utc astro.JD, site *astro.Site, sampling bool) (Prediction, error) {
	if utc.Scale != astro.UTC {
		return Prediction{}, fmt.Errorf("fit: prediction time must be UTC, got %v", utc.Scale)
	}
	if f.Solution.State.Motion != nil {
		return f.predictNBody(utc, site, sampling)
	}
	var st *astro.Site
	if site != nil {
		c := *site
		st = &c
	}
	sp, err := f.Solution.Predict(utc, st)
	if err != nil {
		return Prediction{}, err
	}
	lin := predictionOfSky(sp, st)
	if f.NoSampling || !sampling {
		return lin, nil
	}
	method := orbit.SamplingCovariance
	if f.Obs != nil {
		method = orbit.ChooseSampling(f.Obs, utc, true).Method
	}
	if f.RangingOnly && f.Obs != nil {
		method = orbit.SamplingRanging
	}
	if method == orbit.SamplingLinear {
		return lin, nil
	}
	g, err := ephem.ObserverGeometryAt(utc, st, 0)
	if err != nil && !errors.Is(err, astro.ErrStaleTable) && !errors.Is(err, astro.ErrUTCBefore1972) {
		return lin, nil
	}
	set, err := f.sampled(method)
	if err != nil {
		return lin, nil
	}
	r, err := set.Predict(g, f.MonteCarlo)
	if err != nil {
		return lin, nil
	}
	return sampledPrediction(lin, sp, r, method), nil
}

// sampledPrediction returns the prediction of the sampled region r drawn by
// method, or the linear one lin (of sp) when the orbits were drawn from the
// covariance and their region agrees with it ([orbit.CompareLinear]).
func sampledPrediction(lin Prediction, sp orbit.SkyPrediction, r *orbit.SampledRegion, method string) Prediction {
	if method == orbit.SamplingCovariance {
		if differ, _ := orbit.CompareLinear(sp.RA, sp.Dec, sp.CovArcsec2, r); !differ {
			return lin // the linear answer holds
		}
	}
	p := lin
	p.RA, p.Dec, p.CovArcsec2, p.Method = r.RA, r.Dec, r.CovArcsec2, "montecarlo"
	if r.DeltaAU > 0 {
		p.DeltaAU = r.DeltaAU
	}
	p.Samples, p.SampleWeights = r.Offsets()
	return p
}

// sampled returns the orbits sampled by method, drawing them once.
func (f *OrbitFit) sampled(method string) (*orbit.OrbitSamples, error) {
	if method == orbit.SamplingLinear {
		method = orbit.SamplingCovariance
	}
	if s, ok := f.samples[method]; ok {
		return s, nil
	}
	var s *orbit.OrbitSamples
	var err error
	if method == orbit.SamplingRanging && f.Obs != nil {
		s, err = orbit.RangingOrbits(f.Obs, f.MonteCarlo)
	} else {
		s, err = orbit.CovarianceOrbits(f.Solution.State, f.Solution.Cov, f.MonteCarlo)
	}
	if err != nil {
		return nil, err
	}
	if m := f.Solution.State.Motion; m != nil {
		for i := range s.States {
			s.States[i].Motion = m // ranging draws two-body orbits over the arc
		}
	}
	if f.samples == nil {
		f.samples = map[string]*orbit.OrbitSamples{}
	}
	f.samples[method] = s
	return s, nil
}

// predictionOfSky turns an orbit prediction into a Prediction.
func predictionOfSky(sp orbit.SkyPrediction, st *astro.Site) Prediction {
	p := Prediction{UTC: sp.UTC, Site: st, Model: Kepler().Name(), RA: sp.RA, Dec: sp.Dec, CovArcsec2: sp.CovArcsec2,
		RateArcsecPerMin: sp.RateArcsecPerMin, RatePA: sp.RatePA, HorizonDays: math.NaN(), Mag: sp.Mag, DeltaAU: sp.DeltaAU,
		Method: sp.Method, Samples: sp.Samples}
	if p.Method == "" {
		p.Method = "linear"
	}
	return p
}
