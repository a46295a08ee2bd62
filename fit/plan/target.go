package plan

import (
	"errors"
	"fmt"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit"
)

// Target is anything that predicts where a moving object is: its astrometric
// ICRS place for a site (nil: the geocentre) at a UTC instant, with the search
// region's covariance, the rate of motion and, when known, the magnitude and
// the validity horizon. *fit.SavedFit and [ElementsTarget] satisfy it, and
// [Positioner] too.
type Target interface {
	Predict(utc astro.JD, site *astro.Site) (fit.Prediction, error)
}

// Positioner is an optional interface of a [Target]: its astrometric ICRS
// place alone, without the covariance and the rate. [Night] samples the
// target's altitude through a whole night; a target whose full prediction is
// costly (a covariance by numerical differences) can offer its place this
// way. The place must be the one Predict gives, or, where Predict's region
// comes from sampled orbits, the fitted orbit's place, which lies inside
// that region (*fit.SavedFit's Position).
type Positioner interface {
	Position(utc astro.JD, site *astro.Site) (ra, dec astro.Angle, err error)
}

// ElementsTarget is a published element set as a [Target]: its predictions
// are those of fit.PredictElements (two-body motion, light time, the search
// region from the set's stated σ, a point when it states none).
type ElementsTarget struct {
	Elements ephem.Elements
}

// Predict returns fit.PredictElements(e.Elements, utc, site).
func (e ElementsTarget) Predict(utc astro.JD, site *astro.Site) (fit.Prediction, error) {
	return fit.PredictElements(e.Elements, utc, site)
}

// Position returns the astrometric ICRS place of ephem.PlaceOfElements for
// the site (nil: the geocentre) at utc, the place Predict gives without its
// covariance. A stale leap-second table or a UTC before 1972 is no error
// here (the place is still computed), as in fit.PredictElements.
func (e ElementsTarget) Position(utc astro.JD, site *astro.Site) (ra, dec astro.Angle, err error) {
	pl, err := ephem.PlaceOfElements(e.Elements, utc, ephem.Observer{Site: site, NoRefraction: true})
	if err != nil && !(errors.Is(err, astro.ErrStaleTable) || errors.Is(err, astro.ErrUTCBefore1972)) {
		return 0, 0, fmt.Errorf("plan: %v", err)
	}
	return pl.RA, pl.Dec, nil
}

// Both targets of the package's callers offer the cheap place.
var (
	_ Positioner = (*fit.SavedFit)(nil)
	_ Positioner = ElementsTarget{}
)
