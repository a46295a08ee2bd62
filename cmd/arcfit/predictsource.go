package main

import (
	"fmt"
	"strings"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit"
)

// predictInput is what predict predicts from: a fit (of an observation
// file, or loaded from a fit file) or a published element set.
type predictInput struct {
	file     string // the input's name, for messages
	model    string // the model's name
	header   string // the first line of the text output
	sites    map[string]astro.Site
	saved    *fit.SavedFit   // nil for an element set
	elements *ephem.Elements // nil for a fit
	warnings []string
}

// orbit returns the input's orbit model (nil for a sky-plane model or an
// element set).
func (in *predictInput) orbit() *fit.OrbitFit {
	if in.saved == nil {
		return nil
	}
	return in.saved.Orbit
}

// predict returns the prediction at utc for site.
func (in *predictInput) predict(utc astro.JD, site *astro.Site) (fit.Prediction, error) {
	if in.elements != nil {
		return fit.PredictElements(*in.elements, utc, site)
	}
	return in.saved.Predict(utc, site)
}

// predictSource reads the input the options name: --elements, a fit file or
// an observation file (fitted here).
func predictSource(o predictOptions, sites map[string]astro.Site) (*predictInput, error) {
	if o.elementsFile != "" {
		for _, f := range fitOnlyFlags {
			if o.changed[f] {
				return nil, usagef("--%s acts on fitting; --elements gives a published element set, not observations", f)
			}
		}
		sets, ws, err := ephem.ReadElementsFile(o.elementsFile)
		if err != nil {
			return nil, inputError(err)
		}
		el, err := ephem.FindElements(sets, o.name)
		if err != nil {
			return nil, usagef("%s: %s", o.elementsFile, strings.TrimPrefix(err.Error(), "ephem: "))
		}
		_, s, err := resolveSiteFlag(o.site, sites)
		if err != nil {
			return nil, err
		}
		in := &predictInput{file: o.elementsFile, model: fit.ElementsModelName, sites: s, elements: &el}
		for _, w := range ws {
			in.warnings = append(in.warnings, w.String())
		}
		unc := "no uncertainty stated: the search region is a point"
		if el.Sigma != nil {
			unc = "search region from the stated 1-σ of the elements, taken as independent"
		}
		in.header = fmt.Sprintf("%s: element set %q (two-body motion; %s)", o.elementsFile, el.Name, unc)
		if el.Sigma == nil {
			in.warnings = append(in.warnings, fmt.Sprintf("%s: element set %q states no uncertainty; the search region printed is a point, not a promise (add sigma_ columns, or fit observations)", o.elementsFile, el.Name))
		}
		return in, nil
	}
	data, err := readInput(o.file)
	if err != nil {
		return nil, err
	}
	in := &predictInput{file: o.file}
	if fit.IsFitFile(data) {
		for _, f := range fitOnlyFlags {
			if o.changed[f] {
				return nil, usagef("--%s acts on fitting; %s is a fit file, fitted already (give the observation file instead)", f, o.file)
			}
		}
		saved, err := fit.ParseFitFile(data, o.file)
		if err != nil {
			return nil, inputError(err)
		}
		merged := map[string]astro.Site{}
		for k, v := range saved.Solution.Track.Sites {
			merged[k] = v
		}
		for k, v := range sites {
			merged[k] = v
		}
		_, s, err := resolveSiteFlag(o.site, merged)
		if err != nil {
			return nil, err
		}
		in.saved, in.sites = saved, s
		in.warnings = append(in.warnings, sourceCheck(saved.Solution.Track)...)
	} else {
		defaultSite, s, err := resolveSiteFlag(o.site, sites)
		if err != nil {
			return nil, err
		}
		a, err := analyse(o.modelOptions, data, horizonTimes(o.times), nil, s, defaultSite)
		if err != nil {
			return nil, err
		}
		in.sites, in.saved = s, a.saved
		in.warnings = append(in.warnings, a.warnings...)
	}
	sol := in.saved.Solution
	first, last := sol.Track.ArcTT()
	in.model = sol.Model.Name()
	in.header = fmt.Sprintf("%s: model %s, fitted to %d observations over %.2f d", o.file, sol.Model, sol.NumUsed, last-first)
	if of := in.saved.Orbit; of != nil {
		in.model = of.ModelName()
		in.header = fmt.Sprintf("%s: model kepler, a two-body orbit (%s) fitted to %d observations over %.2f d", o.file, of.Class, of.Solution.NumUsed, last-first)
		if of.Dynamics() == "nbody" {
			in.header = fmt.Sprintf("%s: model nbody, an orbit perturbed by the planets (%s) fitted to %d observations over %.2f d; osculating elements at epoch %s TDB",
				o.file, of.Class, of.Solution.NumUsed, last-first, astro.FormatISO8601(of.Elements.Epoch, 0))
		}
	}
	return in, nil
}

// horizonTimes returns the earliest and the latest of the instants ts (nil
// for none): what the model comparison needs to know of a prediction's
// horizon, without predicting every model at every instant.
func horizonTimes(ts []astro.JD) []astro.JD {
	if len(ts) == 0 {
		return nil
	}
	lo, hi := ts[0], ts[0]
	for _, t := range ts[1:] {
		if t.Sub(lo) < 0 {
			lo = t
		}
		if t.Sub(hi) > 0 {
			hi = t
		}
	}
	if lo == hi {
		return []astro.JD{lo}
	}
	return []astro.JD{lo, hi}
}
