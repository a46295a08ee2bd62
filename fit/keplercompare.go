package fit

import (
	"fmt"
	"math"
	"sort"

	"arcfit/astro"
	"arcfit/fit/orbit"
)

// keplerRow fits the two-body orbit for the comparison and cross-validates
// it night by night, in the same terms as the sky-plane rows.
func keplerRow(tr *Track, s Settings) ModelRow {
	of, err := FitOrbit(tr, s)
	return orbitRow(tr, Kepler(), of, err, determineFold)
}

// determineFold fits a fold's two-body orbit as the whole track's is fitted
// ([orbit.Determine]), without rejecting outliers.
func determineFold(obs []orbit.Observation) (*orbit.Solution, error) {
	return orbit.Determine(obs, orbit.Options{KeepAll: true})
}

// orbitRow returns the comparison row of the orbit fit of (err when it
// could not be fitted) for the model m, cross-validated with the fold fit.
func orbitRow(tr *Track, m Model, of *OrbitFit, err error, fold foldFit) ModelRow {
	row := ModelRow{Model: m.Name(), Spec: m, NumParams: 6, RMSArcsec: math.NaN(), Chi2DoF: math.NaN(), BIC: math.NaN(),
		CVErrorArcsec: math.NaN(), CVSEArcsec: math.NaN(), CVNormRMS: math.NaN()}
	if err != nil {
		row.Err = err.Error()
		return row
	}
	sol := of.Solution
	row.Orbit = of
	row.RMSArcsec = sol.RMSArcsec
	row.Chi2DoF = sol.Chi2DoF
	if n := 2 * sol.NumUsed; n > 0 {
		row.BIC = sol.Chi2 + 6*math.Log(float64(n))
	}
	row.CV = orbitCrossValidate(tr, of, fold)
	row.CVErrorArcsec, row.CVSEArcsec, row.CVNormRMS = row.CV.RMSArcsec, row.CV.SEArcsec, row.CV.NormRMS
	return row
}

// foldFit fits the orbit of one cross-validation fold (the observations
// with a night's Used cleared).
type foldFit func(obs []orbit.Observation) (*orbit.Solution, error)

// orbitCrossValidate leaves out each night in turn, fits the orbit to the
// others with fold ([determineFold] for the two-body orbit) and predicts
// the observations of the night left out: the misses and their normalised
// χ² against the observation's covariance plus the fold's linear prediction
// covariance, pooled as [CrossValidate] pools them (RMS of the misses, its
// standard error from the spread of the folds' mean squares, the normalised
// RMS). With fewer than [MinCVNights] nights it is not available (NaN).
// The fold's predictions of the night left out come from
// orbit.Solution.PredictAll for each site (one integration per site for a
// perturbed orbit).
func orbitCrossValidate(tr *Track, of *OrbitFit, fold foldFit) CrossValidation {
	cv := CrossValidation{RMSArcsec: math.NaN(), SEArcsec: math.NaN(), NormRMS: math.NaN(), ObsScale: math.NaN(),
		NormMS: math.NaN(), DoF: math.NaN(), PValue: math.NaN(), ModelErrorArcsec: math.NaN()}
	night := map[int]int{}
	var nights []int
	seen := map[int]bool{}
	for _, p := range tr.Points {
		if p.Used {
			night[p.ObsIndex] = p.Night
			if !seen[p.Night] {
				seen[p.Night] = true
				nights = append(nights, p.Night)
			}
		}
	}
	sort.Ints(nights)
	if len(nights) < MinCVNights || of.Obs == nil {
		return cv
	}
	flagged := map[int]bool{}
	for _, r := range of.Solution.Residuals {
		if r.Flagged {
			flagged[r.Index] = true
		}
	}
	as := astro.Arcsecond.Radians()
	var sumSq, sumChi2 float64
	var n int
	var foldMS []float64
	for _, k := range nights {
		obs := make([]orbit.Observation, len(of.Obs))
		copy(obs, of.Obs)
		var left []int
		for i := range obs {
			nk, ok := night[obs[i].Index]
			if !ok || !obs[i].Used || flagged[obs[i].Index] {
				obs[i].Used = false
				continue
			}
			if nk == k {
				obs[i].Used = false
				left = append(left, i)
			}
		}
		fsol, err := fold(obs)
		if err != nil {
			cv.Failed = append(cv.Failed, k)
			cv.Notes = append(cv.Notes, fmt.Sprintf("night %d: the orbit of the other nights could not be determined: %v", k+1, err))
			continue
		}
		preds := foldPredictions(fsol, of.Obs, left, tr)
		var foldSq float64
		var foldN int
		for j, i := range left {
			o := of.Obs[i]
			p, ok := preds[j]
			if !ok {
				continue
			}
			dE, dN := orbit.Residual(o.RA, o.Dec, astro.UnitVector(p.RA, p.Dec))
			dE, dN = dE/as, dN/as
			cObs := [2][2]float64{{sq(o.SigmaRA / as), o.Corr * o.SigmaRA * o.SigmaDec / (as * as)}, {0, sq(o.SigmaDec / as)}}
			cObs[1][0] = cObs[0][1]
			c := [2][2]float64{{cObs[0][0] + p.CovArcsec2[0][0], cObs[0][1] + p.CovArcsec2[0][1]},
				{cObs[1][0] + p.CovArcsec2[1][0], cObs[1][1] + p.CovArcsec2[1][1]}}
			det := c[0][0]*c[1][1] - c[0][1]*c[1][0]
			chi2 := (c[1][1]*dE*dE - 2*c[0][1]*dE*dN + c[0][0]*dN*dN) / det
			cv.Misses = append(cv.Misses, CVMiss{ObsIndex: o.Index, Night: k, DRAArcsec: dE, DDecArcsec: dN, Chi2: chi2,
				ObsCovArcsec2: cObs, PredCovArcsec2: p.CovArcsec2})
			sumSq += dE*dE + dN*dN
			sumChi2 += chi2
			foldSq += dE*dE + dN*dN
			foldN++
			n++
		}
		if foldN > 0 {
			cv.Folds++
			foldMS = append(foldMS, foldSq/(2*float64(foldN)))
		}
	}
	if n == 0 {
		return cv
	}
	ms := sumSq / (2 * float64(n))
	cv.RMSArcsec = math.Sqrt(ms)
	cv.NormRMS = math.Sqrt(sumChi2 / (2 * float64(n)))
	if len(foldMS) >= 2 {
		var m, v float64
		for _, x := range foldMS {
			m += x
		}
		m /= float64(len(foldMS))
		for _, x := range foldMS {
			v += (x - m) * (x - m)
		}
		v /= float64(len(foldMS) - 1)
		// The standard error of the mean square, carried to the RMS:
		// se(√ms) ≈ se(ms)/(2√ms).
		cv.SEArcsec = math.Sqrt(v/float64(len(foldMS))) / (2 * cv.RMSArcsec)
	}
	return cv
}

// foldPredictions predicts the observations left (indices into obs) with
// the fold's orbit fsol: Solution.Predict one by one for a two-body orbit,
// Solution.PredictAll per site for a perturbed one. A prediction that fails
// is missing from the map.
func foldPredictions(fsol *orbit.Solution, obs []orbit.Observation, left []int, tr *Track) map[int]orbit.SkyPrediction {
	out := map[int]orbit.SkyPrediction{}
	siteOf := func(o orbit.Observation) *astro.Site {
		if o.Site == "" {
			return nil
		}
		st := tr.Sites[o.Site]
		return &st
	}
	if fsol.State.Motion == nil {
		for j, i := range left {
			if p, err := fsol.Predict(obs[i].Geo.UTC, siteOf(obs[i])); err == nil {
				out[j] = p
			}
		}
		return out
	}
	bySite := map[string][]int{}
	var order []string
	for j, i := range left {
		if _, ok := bySite[obs[i].Site]; !ok {
			order = append(order, obs[i].Site)
		}
		bySite[obs[i].Site] = append(bySite[obs[i].Site], j)
	}
	for _, name := range order {
		js := bySite[name]
		ts := make([]astro.JD, len(js))
		for k, j := range js {
			ts[k] = obs[left[j]].Geo.UTC
		}
		ps, err := fsol.PredictAll(ts, siteOf(obs[left[js[0]]]))
		if err != nil {
			continue
		}
		for k, j := range js {
			out[j] = ps[k]
		}
	}
	return out
}

func sq(x float64) float64 { return x * x }

// zeroNaN returns x, or 0 when x is NaN.
func zeroNaN(x float64) float64 {
	if math.IsNaN(x) {
		return 0
	}
	return x
}

// chooseKepler decides whether the orbit row replaces the sky-plane model
// the auto rule picked (index sky): the orbit is used whenever it was
// determined and fits the data — its χ²/dof no worse than the chosen
// sky-plane model's beyond the χ² noise, r·(1 + 3√(2/dof)) with
// r = max(1, χ²/dof of that model) — and, when it was cross-validated, the
// orbits fitted without each night predict that night within their own
// uncertainty: the normalised mean square of the misses (each miss over the
// observation's and the fold's prediction covariance) at most 1 + 3/√F for
// F folds (its expectation 1 plus three standard deviations, counting each
// night as one pair of independent coordinates, which is conservative when
// a night's misses are correlated). The raw cross-validated error is not
// compared with the sky-plane models': an orbit fitted to one night fewer is
// honestly less certain, and its folds' misses are larger for that reason,
// not because the model is wrong. The reason goes to Comparison.Reason.
//
// Why prefer it: a two-body orbit is the physical model, so it extrapolates
// beyond the arc where a polynomial in time does not (see [Horizon]).
func chooseKepler(c *Comparison, tr *Track, sky int) (int, string) {
	k := -1
	for i, r := range c.Rows {
		if r.Spec.Kind == KindKepler {
			k = i
		}
	}
	if k < 0 {
		return sky, ""
	}
	kr := c.Rows[k]
	if kr.Orbit == nil {
		return sky, "kepler not used: " + oneLineReason(kr.Err)
	}
	sol := kr.Orbit.Solution
	if kr.Orbit.RangingOnly && tr.NumNights < 2 {
		return sky, "kepler not used: one night cannot determine an orbit (its region, from sampled orbits, is given with --model kepler); a second night would help"
	}
	if sky < 0 {
		return sky, ""
	}
	sr := c.Rows[sky]
	if why := orbitDataTest(kr, sr); why != "" {
		return sky, "kepler not used: " + why
	}
	return k, fmt.Sprintf("kepler: the two-body orbit fits the data (χ²/dof %.2f, within the %s fit's %.2f and its χ² noise) and, unlike a polynomial in time, extrapolates beyond the arc; started from %s",
		sol.Chi2DoF, sr.Model, sr.Chi2DoF, startName(sol.Start))
}

// orbitDataTest applies the data tests of [chooseKepler] to the orbit row
// kr against the sky-plane row sr: "" when the orbit passes, else why not
// (its χ²/dof beyond the sky-plane fit's within the χ² noise, or folds that
// miss beyond their own uncertainty).
func orbitDataTest(kr, sr ModelRow) string {
	sol := kr.Orbit.Solution
	r := math.Max(1, sr.Chi2DoF)
	limit := r
	if sol.DoF > 0 {
		limit = r * (1 + 3*math.Sqrt(2/float64(sol.DoF)))
	}
	if !(sol.Chi2DoF <= limit) {
		return fmt.Sprintf("its χ²/dof %.2f exceeds %.2f (the %s fit's, within its χ² noise)", sol.Chi2DoF, limit, sr.Model)
	}
	if nm := kr.CVNormRMS; !math.IsNaN(nm) && kr.CV.Folds > 0 {
		limit := 1 + 3/math.Sqrt(float64(kr.CV.Folds))
		if nm*nm > limit {
			return fmt.Sprintf("the orbits fitted without each night miss it by %.2f times their own uncertainty (normalised mean square %.2f, above %.2f)", nm, nm*nm, limit)
		}
	}
	return ""
}

// startName names the start method for people.
func startName(m string) string {
	switch m {
	case orbit.MethodGauss:
		return "Gauss's method"
	case orbit.MethodRanging:
		return "the search over distance (ranging)"
	}
	return m
}

// oneLineReason shortens an error text to its first line.
func oneLineReason(s string) string {
	for i, c := range s {
		if c == '\n' {
			return s[:i]
		}
	}
	return s
}
