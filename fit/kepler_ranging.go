package fit

import (
	"errors"
	"fmt"
	"math"

	"arcfit/astro"
	"arcfit/fit/orbit"

	"gonum.org/v1/gonum/mat"
)

// rangingFit makes an orbit model from the ranging cloud alone, for an arc
// of fewer than orbit.RuleMinNights nights on which the differential
// correction could not settle on one orbit: the orbits consistent with the
// data are sampled by statistical ranging ([orbit.RangingOrbits]); the
// heaviest becomes the nominal orbit, the weighted covariance of the
// samples (all propagated to its epoch) its covariance, and every
// prediction comes from the cloud (RangingOnly). corrErr is the
// correction's error, kept in the notes.
func rangingFit(obs []orbit.Observation, warns []string, corrErr error) (*OrbitFit, error) {
	var mc orbit.MonteCarloSettings
	set, err := orbit.RangingOrbits(obs, mc)
	if err != nil {
		return nil, err
	}
	if len(set.States) < 7 {
		return nil, errors.New("fit: too few orbits fit the data for a region")
	}
	best := 0
	for i, w := range set.Weights {
		if w > set.Weights[best] {
			best = i
		}
	}
	nominal := set.States[best]
	var mean [6]float64
	xs := make([][6]float64, 0, len(set.States))
	ws := make([]float64, 0, len(set.States))
	wsum := 0.0
	for i, st := range set.States {
		p, v, err := st.At(nominal.Epoch)
		if err != nil {
			continue
		}
		x := [6]float64{p.X, p.Y, p.Z, v.X, v.Y, v.Z}
		xs = append(xs, x)
		ws = append(ws, set.Weights[i])
		wsum += set.Weights[i]
		for k := range x {
			mean[k] += set.Weights[i] * x[k]
		}
	}
	if !(wsum > 0) {
		return nil, errors.New("fit: the ranging orbits could not be propagated to a common epoch")
	}
	for k := range mean {
		mean[k] /= wsum
	}
	cov := mat.NewSymDense(6, nil)
	var w2 float64
	for i, x := range xs {
		w := ws[i] / wsum
		w2 += w * w
		for a := 0; a < 6; a++ {
			for b := a; b < 6; b++ {
				cov.SetSym(a, b, cov.At(a, b)+w*(x[a]-mean[a])*(x[b]-mean[b]))
			}
		}
	}
	if w2 < 1 {
		cov.ScaleSym(1/(1-w2), cov)
	}
	sol := &orbit.Solution{State: nominal, Cov: cov, Start: orbit.MethodRanging, G: 0.15, H: math.NaN(), HSigma: math.NaN()}
	as := astro.Arcsecond.Radians()
	var sumSq float64
	first, last := math.Inf(1), math.Inf(-1)
	for i := range obs {
		o := &obs[i]
		r := orbit.ObsResidual{Index: o.Index, Line: o.Line, UTC: o.Geo.UTC, Used: o.Used}
		if seen, err := nominal.Observe(o.Geo); err == nil {
			dE, dN := orbit.Residual(o.RA, o.Dec, seen.Dir)
			w1, w2 := o.Whitened(dE, dN)
			r.DEArcsec, r.DNArcsec, r.Chi2 = dE/as, dN/as, w1*w1+w2*w2
		}
		if o.Used {
			sol.NumUsed++
			sol.Chi2 += r.Chi2
			sumSq += r.DEArcsec*r.DEArcsec + r.DNArcsec*r.DNArcsec
			t := o.Geo.UTC.Float()
			if t < first {
				first, sol.FirstUTC = t, o.Geo.UTC
			}
			if t > last {
				last, sol.LastUTC = t, o.Geo.UTC
			}
		}
		sol.Residuals = append(sol.Residuals, r)
	}
	sol.DoF = max(0, 2*sol.NumUsed-6)
	if sol.DoF > 0 {
		sol.Chi2DoF = sol.Chi2 / float64(sol.DoF)
	}
	if sol.NumUsed > 0 {
		sol.RMSArcsec = math.Sqrt(sumSq / (2 * float64(sol.NumUsed)))
	}
	sol.Cond = math.NaN()
	sol.Notes = append(sol.Notes,
		fmt.Sprintf("the arc does not determine one orbit (%v); the region comes from %d orbits consistent with the data, sampled over the distance (statistical ranging; effective number %.0f)",
			oneLineReason(corrErr.Error()), len(set.States), set.EffectiveN),
		"the elements are those of the most probable sampled orbit; their σ are the spread of the samples, and the region is wide and curved: a second or third night will shrink it greatly")
	of, err := newOrbitFit(sol, obs, warns)
	if err != nil {
		return nil, err
	}
	of.RangingOnly = true
	of.Class = orbit.Class{Name: "not determined",
		Reason: "the orbits that fit so short an arc span several classes; the most probable sampled one is " + of.Class.String()}
	of.samples = map[string]*orbit.OrbitSamples{orbit.SamplingRanging: set}
	return of, nil
}
