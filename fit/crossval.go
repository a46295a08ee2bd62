package fit

import (
	"fmt"
	"math"
	"strings"

	"arcfit/astro"
)

// CVMiss is one observation of a left-out night as predicted by the model
// fitted to the other nights.
type CVMiss struct {
	ObsIndex int // index into the obs.Set's Obs
	Night    int // the left-out night
	// DRAArcsec, DDecArcsec are observed minus predicted, in RA·cos δ and in
	// Dec, arcseconds.
	DRAArcsec, DDecArcsec float64
	// Chi2 is the miss normalised by the observation's covariance plus the
	// prediction's: dᵀ (C_obs + C_pred)⁻¹ d, two degrees of freedom.
	Chi2 float64
}

// CrossValidation is the leave-one-night-out cross-validation of one model.
type CrossValidation struct {
	// RMSArcsec is the RMS of the misses, RA·cos δ and Dec pooled
	// (√(Σ(ΔRA·cosδ² + ΔDec²)/2N)), arcseconds; NaN when unavailable.
	RMSArcsec float64
	// SEArcsec is the standard error of RMSArcsec from the spread of the
	// folds' mean squared misses (see [CrossValidate]); NaN with fewer than
	// two folds.
	SEArcsec float64
	// NormRMS is √(Σ χ²/2N) of the misses normalised by the observation's
	// and the prediction's covariance: about 1 when the model and its
	// covariance are right, larger when the model fails between nights.
	NormRMS float64
	// Folds is the number of nights left out and predicted; Failed lists
	// the nights (track night indices) for which the model could not be
	// fitted to the others, with the reasons in Notes.
	Folds  int
	Failed []int
	Notes  []string
	// Misses are the predicted observations, night by night.
	Misses []CVMiss
}

// MinCVNights is the number of observed nights leave-one-night-out
// cross-validation needs: with two, each fold would fit one night and
// extrapolate it across the whole gap, a test of the gap's length more than of
// the model.
const MinCVNights = 3

// CrossValidate returns the leave-one-night-out cross-validated prediction
// error of the model of full, a fit of the whole track. For each night k of
// the track it fits the same model, with the same settings, to the other
// nights (Track.Subset) and predicts night k's used observations at their own
// times for their own sites; observations that the full fit flagged as
// outliers are not scored. For a piecewise-linear model each fold chooses its
// own knots as the full track's were chosen (one per gap between the fold's
// nights, then [SelectKnots]' backward elimination), since the knot choice is
// part of the model's procedure; a fold left with one night fits a straight
// line.
//
// The miss of an observation is d = observed − predicted on the tangent
// plane, turned into RA·cos δ and Dec by the inverse of the plane's local
// Jacobian; its χ² uses the observation's covariance plus the prediction's,
// C_pred = g Cov gᵀ with g the point's design row. RMSArcsec pools all
// misses. Its standard error follows from the folds' mean squared misses
// MS_k (one per night):
//
//	SE(MS) = sd(MS_k)/√K,   SE(RMS) = SE(MS)/(2·RMS)
//
// (the second by the delta method).
//
// RMSArcsec is NaN when the track has fewer than MinCVNights nights, or
// when no fold could be fitted. A fold whose fit fails (too few observations
// left, a singular design) is skipped and listed in Failed and Notes; the
// RMS is then over the other folds.
//
// Reference: Stone, M., "Cross-validatory choice and assessment of
// statistical predictions", J. R. Stat. Soc. B 36 (1974), 111–147; Hastie,
// Tibshirani & Friedman, The Elements of Statistical Learning, 2nd ed.
// (2009), §7.10 (K-fold cross-validation, its standard error from the folds,
// §7.10.1); leaving out whole nights keeps each night's correlated errors
// (site, weather, reference stars) out of its own prediction, as in
// grouped ("leave-one-group-out") cross-validation.
func CrossValidate(full *Solution) CrossValidation { return crossValidate(full, nil) }

// crossValidate is [CrossValidate] with the inverse plane Jacobians of the
// full track's points when the caller has them (nil computes them).
func crossValidate(full *Solution, jinv [][2][2]float64) CrossValidation {
	cv := CrossValidation{RMSArcsec: math.NaN(), SEArcsec: math.NaN(), NormRMS: math.NaN()}
	tr := full.Track
	spans := usedNightSpans(tr)
	if len(spans) < MinCVNights {
		cv.Notes = append(cv.Notes, fmt.Sprintf("cross-validation needs at least %d nights (%d observed)", MinCVNights, len(spans)))
		return cv
	}
	flagged := make([]bool, len(tr.Points))
	for i, r := range full.Residuals {
		if i < len(flagged) {
			flagged[i] = r.Flagged
		}
	}
	flaggedObs := map[int]bool{}
	for i, f := range flagged {
		if f {
			flaggedObs[tr.Points[i].ObsIndex] = true
		}
	}
	// The design of the whole track, built once: a polynomial fold is fitted
	// on it, restricted to the fold's points, which gives the fit of the
	// fold's Subset; a piecewise fold, with knots of its own, fits its
	// Subset with a design of its own (from the same Jacobians).
	fitU := full.Settings.Parallax == ParallaxFit && tr.hasSite()
	fd := newDesign(tr, full.Model, full.Settings, fitU, jinv)
	defer fd.release()
	keep := make([]int, 0, len(tr.Points))
	only := make([]bool, len(tr.Points))
	var sumSq, sumChi2 float64
	var foldMS []float64
	for _, sp := range spans {
		k := sp.night
		in := func(p Point) bool { return p.Night != k && !flaggedObs[p.ObsIndex] }
		var sol *Solution
		var err error
		if full.Model.Kind != KindPiecewise {
			for i, p := range tr.Points {
				only[i] = in(p)
			}
			sol, err = fitWith(tr, full.Model, full.Settings.foldSettings(), fd, nil, true, only)
		} else {
			keep = keep[:0]
			for i, p := range tr.Points {
				if in(p) {
					keep = append(keep, i)
				}
			}
			sol, err = fitFold(tr.Subset(in), full.Model, full.Settings, fd.gather(keep))
		}
		if err != nil {
			cv.Failed = append(cv.Failed, k)
			cv.Notes = append(cv.Notes, fmt.Sprintf("night %d left out: %v", k+1, strings.TrimPrefix(err.Error(), "fit: ")))
			continue
		}
		var foldSq float64
		nFold := 0
		for i, p := range tr.Points {
			if p.Night != k || !p.Used || flagged[i] {
				continue
			}
			m := missAt(sol, fd.jinv[i], p)
			m.Night = k
			cv.Misses = append(cv.Misses, m)
			sq := m.DRAArcsec*m.DRAArcsec + m.DDecArcsec*m.DDecArcsec
			sumSq += sq
			sumChi2 += m.Chi2
			foldSq += sq
			nFold++
		}
		if nFold > 0 {
			cv.Folds++
			foldMS = append(foldMS, foldSq/float64(2*nFold))
		}
	}
	n := len(cv.Misses)
	if n == 0 {
		return cv
	}
	cv.RMSArcsec = math.Sqrt(sumSq / float64(2*n))
	cv.NormRMS = math.Sqrt(sumChi2 / float64(2*n))
	if k := len(foldMS); k >= 2 {
		var mean float64
		for _, v := range foldMS {
			mean += v
		}
		mean /= float64(k)
		var ss float64
		for _, v := range foldMS {
			ss += (v - mean) * (v - mean)
		}
		seMS := math.Sqrt(ss/float64(k-1)) / math.Sqrt(float64(k))
		if cv.RMSArcsec > 0 {
			cv.SEArcsec = seMS / (2 * cv.RMSArcsec)
		}
	}
	return cv
}

// fitFold fits the model to a fold's track with no further outlier
// rejection (the full fit's flagged points are already left out), with the
// fold's design d when the caller has it (see [fitWith]). A piecewise
// model keeps the full track's knots that have fold data on both sides, one
// per gap of the fold (several knots in one gap become that gap's mid-point);
// a fold left with one night fits a straight line.
func fitFold(sub *Track, m Model, s Settings, d *design) (*Solution, error) {
	s = s.foldSettings()
	if m.Kind != KindPiecewise {
		return fitWith(sub, m, s, d, nil, true, nil)
	}
	spans := usedNightSpans(sub)
	var knots []float64
	for i := 1; i < len(spans); i++ {
		a, b := spans[i-1], spans[i]
		n, last := 0, 0.0
		for _, k := range m.Knots {
			if k > a.end && k < b.first {
				n, last = n+1, k
			}
		}
		switch {
		case n == 1:
			knots = append(knots, last)
		case n > 1:
			knots = append(knots, 0.5*(a.end+b.first))
		}
	}
	// The fold's own knots change the basis: a new design, with the
	// Jacobians of d's points.
	var jinv [][2][2]float64
	if d != nil {
		jinv = make([][2][2]float64, len(sub.Points))
		for i := range jinv {
			jinv[i] = d.jinv[d.src(i)]
		}
	}
	return fitWith(sub, Piecewise(knots), s, nil, jinv, true, nil)
}

// missAt returns the miss of point p under the solution: the observed minus
// the modelled topocentric standard coordinates (the same model equation the
// fit uses, ξ = Σ c_j b_j(τ) − u·SiteXi), turned into RA·cos δ and Dec, and
// its χ² with the observation's and the prediction's covariance; jinv is
// the inverse of the projection's Jacobian at p (see planeJacobians).
func missAt(sol *Solution, jinv [2][2]float64, p Point) CVMiss {
	m := sol.Model
	nb := m.NumPerCoord()
	var bbuf [8]float64
	b := bbuf[:0]
	if nb <= len(bbuf) {
		b = bbuf[:nb]
	} else {
		b = make([]float64, nb)
	}
	scale := sol.Track.TimeScaleDays
	m.basis(b, p.T/scale, scale)
	par := sol.Params
	var xi, eta float64
	for j := 0; j < nb; j++ {
		xi += par[j] * b[j]
		eta += par[nb+j] * b[j]
	}
	u, uFitted := solutionInvDistance(sol)
	xi -= u * p.SiteXi
	eta -= u * p.SiteEta
	dxi, deta := p.Xi-xi, p.Eta-eta

	// Prediction covariance in the plane: g Cov gᵀ for the rows
	// gξ = (b, 0, −SiteXi), gη = (0, b, −SiteEta).
	var cxx, cxe, cee float64
	if sol.Cov != nil {
		np := len(par)
		row := func(i int, coord int) float64 { // design element (coord 0 = ξ, 1 = η) of parameter i
			switch {
			case i < nb:
				if coord == 0 {
					return b[i]
				}
				return 0
			case i < 2*nb:
				if coord == 1 {
					return b[i-nb]
				}
				return 0
			case uFitted && i == 2*nb:
				if coord == 0 {
					return -p.SiteXi
				}
				return -p.SiteEta
			}
			return 0
		}
		for i := 0; i < np; i++ {
			gx, ge := row(i, 0), row(i, 1)
			if gx == 0 && ge == 0 {
				continue
			}
			for j := 0; j < np; j++ {
				hx, he := row(j, 0), row(j, 1)
				if hx == 0 && he == 0 {
					continue
				}
				c := sol.Cov.At(i, j)
				cxx += gx * c * hx
				cxe += gx * c * he
				cee += ge * c * he
			}
		}
	}
	sxe := p.Corr * p.SigmaXi * p.SigmaEta
	ctot := [2][2]float64{
		{p.SigmaXi*p.SigmaXi + cxx, sxe + cxe},
		{sxe + cxe, p.SigmaEta*p.SigmaEta + cee},
	}
	det := ctot[0][0]*ctot[1][1] - ctot[0][1]*ctot[1][0]
	chi2 := math.NaN()
	if det > 0 {
		chi2 = (ctot[1][1]*dxi*dxi - 2*ctot[0][1]*dxi*deta + ctot[0][0]*deta*deta) / det
	}
	// Plane offsets to sky offsets (east = RA·cos δ, north = Dec).
	de := jinv[0][0]*dxi + jinv[0][1]*deta
	dn := jinv[1][0]*dxi + jinv[1][1]*deta
	return CVMiss{
		ObsIndex:   p.ObsIndex,
		DRAArcsec:  de / float64(astro.Arcsecond),
		DDecArcsec: dn / float64(astro.Arcsecond),
		Chi2:       chi2,
	}
}

// solutionInvDistance returns the inverse distance the solution's
// predictions use (0 when the parallax is off or there is none) and whether it
// is a fitted parameter (the last one).
func solutionInvDistance(sol *Solution) (u float64, fitted bool) {
	u = sol.InvDistance
	if math.IsNaN(u) {
		u = 0
	}
	return u, sol.FitsInvDistance()
}

// foldSettings returns the settings of a cross-validation fold: s without
// outlier rejection.
func (s Settings) foldSettings() Settings {
	s.KeepAll = true
	return s
}
