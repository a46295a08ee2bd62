package fit

import (
	"errors"
	"fmt"
	"math"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit/orbit"
)

// OrbitFit is the two-body orbit model fitted to a track's observations: the
// differentially corrected orbit, its elements with their uncertainties and
// its class.
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
}

// FitOrbit determines the two-body orbit of the track's observations
// ([orbit.Determine]: Gauss's method or, for short arcs, the search over the
// topocentric distance, then the differential correction with the outlier
// rule of the sky-plane fit; s.KeepAll and s.RejectChi2 apply).
//
// Errors: a track without its observation set (loaded from a fit file), and
// those of orbit.NewObservations and orbit.Determine, which say what would
// help (more nights, a longer arc).
func FitOrbit(tr *Track, s Settings) (*OrbitFit, error) {
	if tr == nil || tr.Set == nil {
		return nil, errors.New("fit: the orbit needs the observations themselves, not a saved track")
	}
	obs, warns, err := orbit.NewObservations(tr.Set, tr.Sites)
	if err != nil {
		return nil, err
	}
	sol, err := orbit.Determine(obs, orbit.Options{KeepAll: s.KeepAll, RejectChi2: s.RejectChi2})
	if err != nil {
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
// (nil: the geocentre) as a [Prediction] with model "kepler": the linear
// propagation of the orbit's covariance ([orbit.Solution.Predict]), with
// the magnitude from the fitted H when the observations had magnitudes.
// Prediction.Method says "linear".
func (f *OrbitFit) Predict(utc astro.JD, site *astro.Site) (Prediction, error) {
	if utc.Scale != astro.UTC {
		return Prediction{}, fmt.Errorf("fit: prediction time must be UTC, got %v", utc.Scale)
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
	return predictionOfSky(sp, st), nil
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
