package fit

import (
	"errors"
	"fmt"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/fit/orbit"
)

// RegionOptions control [OrbitRegion]. The zero value fits a two-body
// orbit with the default settings and sampling.
type RegionOptions struct {
	// Dynamics is orbit.DynamicsTwoBody ("twobody", or "") for the kepler
	// model or orbit.DynamicsNBody ("nbody") for the perturbed orbit.
	Dynamics string
	// Settings are the fit's (outlier rule; the parallax settings of the
	// sky-plane models do not apply to an orbit).
	Settings Settings
	// MonteCarlo sets the sampled regions (their seed, number, workers);
	// NoSampling keeps the linear regions only.
	MonteCarlo orbit.MonteCarloSettings
	NoSampling bool
}

// OrbitRegion fits an orbit to the observation set (sites: the known sites
// by name) with the dynamics of o and returns its predictions — place and
// search region, by the sampling rule of [OrbitFit.Predict] — at each UTC
// instant of at for site (nil: the geocentre), with the fit. It is the
// path of `arcfit predict OBS --model kepler|nbody`, as a library call: the
// track ([NewTrack]), the orbit ([FitOrbit] or [FitNBody]), the
// integrations to all the instants at once ([OrbitFit.Prepare]), the
// predictions.
//
// Errors: an unknown dynamics; those of NewTrack, of the fit, and of the
// first prediction that fails.
func OrbitRegion(set *obs.Set, sites map[string]astro.Site, at []astro.JD, site *astro.Site, o RegionOptions) ([]Prediction, *OrbitFit, error) {
	m, err := orbit.ParseMotion(o.Dynamics)
	if err != nil {
		return nil, nil, err
	}
	if set == nil {
		return nil, nil, errors.New("fit: no observations")
	}
	tr, err := NewTrack(set, sites)
	if err != nil {
		return nil, nil, err
	}
	of, err := fitOrbitMotion(tr, o.Settings, m)
	if err != nil {
		return nil, nil, err
	}
	of.MonteCarlo, of.NoSampling = o.MonteCarlo, o.NoSampling
	if err := of.Prepare(at); err != nil {
		return nil, of, err
	}
	out := make([]Prediction, 0, len(at))
	for _, u := range at {
		p, err := of.Predict(u, site)
		if err != nil {
			return nil, of, fmt.Errorf("fit: prediction at %s: %w", astro.FormatISO8601(u, 0), err)
		}
		out = append(out, p)
	}
	return out, of, nil
}
