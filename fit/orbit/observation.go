package orbit

import (
	"errors"
	"fmt"
	"math"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/ephem"
)

// Observation is one measured position prepared for orbit fitting.
type Observation struct {
	// Index is the observation's index in the obs.Set it came from; Line its
	// line in the file.
	Index, Line int
	// Geo is the observer's geometry at the instant (its UTC, TT and TDB
	// included).
	Geo ephem.ObserverGeometry
	// RA, Dec are the observed astrometric ICRS place.
	RA, Dec astro.Angle
	// SigmaRA (on the sky, of Δα cos δ) and SigmaDec are the 1-σ
	// uncertainties in radians, Corr their correlation in (−1, 1).
	SigmaRA, SigmaDec float64
	Corr              float64
	// Site is the site name, "" for the geocentre.
	Site string
	// Mag is the measured magnitude, NaN when none; Band its band.
	Mag  float64
	Band string
	// Used is false for an observation the fit must not use (a reader-dropped
	// duplicate, or one flagged as an outlier).
	Used bool
}

// NewObservations prepares the observations of set for orbit fitting: for
// each, the observer's geometry from [ephem.ObserverGeometryAt] (UT1 taken
// equal to UTC; |UT1 − UTC| < 0.9 s moves a site by < 0.4 km, under 0.001″
// at 1 au), and the σ and correlation the file gives.
//
// sites are the known sites by name; the set's own Sites are used too and
// win for a name both give. An observation with Site "" is geocentric.
// Time-scale warnings (a stale leap-second table, UTC before 1972) are
// returned once each, the observations being valid.
//
// Errors: no used observation; a site name not among the sites; a σ that is
// not positive and finite, a correlation outside (−1, 1); a date the
// ephemeris cannot serve.
func NewObservations(set *obs.Set, sites map[string]astro.Site) ([]Observation, []string, error) {
	if set == nil || len(set.Obs) == 0 {
		return nil, nil, errors.New("orbit: no observations")
	}
	known := make(map[string]astro.Site, len(sites)+len(set.Sites))
	for k, v := range sites {
		known[k] = v
	}
	for k, v := range set.Sites {
		known[k] = v
	}
	out := make([]Observation, 0, len(set.Obs))
	var warnings []string
	seen := map[string]bool{}
	nUsed := 0
	for i := range set.Obs {
		o := &set.Obs[i]
		var site *astro.Site
		if o.Site != "" {
			s, ok := known[o.Site]
			if !ok {
				return nil, nil, fmt.Errorf("orbit: line %d: unknown site %q (not in the sites given)", o.Line, o.Site)
			}
			site = &s
		}
		sra, sdec := float64(o.SigmaRA), float64(o.SigmaDec)
		if !(sra > 0) || !(sdec > 0) || math.IsInf(sra, 0) || math.IsInf(sdec, 0) {
			return nil, nil, fmt.Errorf("orbit: line %d: σ must be positive and finite", o.Line)
		}
		if !(math.Abs(o.Corr) < 1) {
			return nil, nil, fmt.Errorf("orbit: line %d: correlation %g, want −1 < ρ < 1", o.Line, o.Corr)
		}
		g, err := ephem.ObserverGeometryAt(o.Time, site, 0)
		if err != nil {
			if !errors.Is(err, astro.ErrStaleTable) && !errors.Is(err, astro.ErrUTCBefore1972) {
				return nil, nil, fmt.Errorf("orbit: line %d: %w", o.Line, err)
			}
			if msg := err.Error(); !seen[msg] {
				seen[msg] = true
				warnings = append(warnings, msg)
			}
		}
		if o.Used {
			nUsed++
		}
		out = append(out, Observation{
			Index: i, Line: o.Line, Geo: g,
			RA: o.RA, Dec: o.Dec, SigmaRA: sra, SigmaDec: sdec, Corr: o.Corr,
			Site: o.Site, Mag: o.Mag, Band: o.Band, Used: o.Used,
		})
	}
	if nUsed == 0 {
		return nil, nil, errors.New("orbit: no used observations")
	}
	return out, warnings, nil
}
