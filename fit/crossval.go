package fit

import (
	"fmt"
	"math"
	"strings"

	"arcfit/astro"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
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
	// ObsCovArcsec2 is the observation's stated covariance and
	// PredCovArcsec2 the covariance of the fold's prediction at it, both in
	// RA·cos δ (index 0) and Dec (index 1), arcsec².
	ObsCovArcsec2, PredCovArcsec2 [2][2]float64
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
	// ObsScale, NormMS, DoF, PValue and ModelErrorArcsec calibrate the
	// model error between nights (see [CrossValidate]): r = max(1, χ²/dof of
	// the full fit), the factor the fit applied to the stated observation
	// covariance; the normalised mean square Σ dᵀ(r·C_obs + C_pred)⁻¹d / 2N
	// of the misses; its effective number of degrees of freedom ν; the
	// probability P(χ²_ν ≥ ν·NormMS) of a normalised mean square at least
	// this large for a right model; and the model error s per coordinate,
	// arcseconds, that brings the normalised mean square to 1 when PValue is
	// below ModelErrorLevel (0 otherwise). NaN when unavailable.
	ObsScale, NormMS, DoF, PValue, ModelErrorArcsec float64
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

// ModelErrorLevel is the significance level of the test for a model error
// between nights (see [CrossValidate]): a model whose left-out nights are
// missed by more than its covariance explains, with a probability below 1 %
// for a right model, is given a model error. 1 % is the conventional level
// of a "highly significant" result (common practice; Fisher, Statistical
// Methods for Research Workers (1925), ch. III, §20).
const ModelErrorLevel = 0.01

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
// The model error. Each miss d (RA·cos δ, Dec) of a right model has the
// covariance C = r·C_obs + C_pred, with r = max(1, χ²/dof of the full fit)
// the scale the fit already applies to the stated observation covariance;
// so the normalised mean square
//
//	NMS = Σ_i d_iᵀ C_i⁻¹ d_i / 2N
//
// is about 1. Its spread is not that of a χ² of 2N degrees of freedom: the
// misses of one night share the error of the one fold that predicts them,
// which for a fold extrapolating past the end of the arc can be most of
// their covariance, and the folds share nights. Every miss is a linear
// function of the observations, so with the whitened misses z_i =
// C_i^(−½) d_i (unit covariance each) and Isserlis' theorem
// (Cov(|z_i|², |z_j|²) = 2‖Cov(z_i, z_j)‖_F² for Gaussian vectors) the
// variance V of the sum S = Σ_i |z_i|² follows from the cross-covariances of
// the misses. Within the fold of night k, Cov(d_i, d_j) = G_i Cov_k G_jᵀ
// (G_i the design rows at point i, Cov_k the fold's parameter covariance),
// which gives
//
//	Var S_k = 2·(2n_k + tr((Cov_k A_k)²) − Σ_i tr((C_pred,i C_i⁻¹)²)),
//	A_k = Σ_i G_iᵀ C_i⁻¹ G_i
//
// (the trace counts every pair; the subtracted sum takes out i = j, whose
// correlation is the identity, counted by the 2n_k); between the folds of
// nights k and j, Cov(d_i, d_l) = G_i M G_lᵀ gives Cov(S_k, S_j) =
// 2·tr(M A_j Mᵀ A_k), with M in calibrationSums. (The cross terms are left
// out for a piecewise model, whose folds have knots of their own, and when a
// fold failed.) Satterthwaite's approximation then matches S to a scaled χ²
// with the same mean and variance: ν = 2E²/V with E = 2N, at most 2N
// (independent misses) and, with few nights, below the 2K of K independent
// nights. The normalised mean square is significantly above 1 when
//
//	PValue = P(χ²_ν ≥ ν·NMS) < ModelErrorLevel,
//
// and then the model error s is the root of
//
//	Σ_i d_iᵀ (C_i + s²I)⁻¹ d_i = 2N,
//
// found by Newton's method from s² = 0 (the left side is decreasing and
// convex in s², so the iterates rise monotonically to the root): the
// spread the model's misses show beyond what its covariance explains, taken
// as an independent error of s per coordinate. Without a significant excess
// ModelErrorArcsec is 0.
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
// grouped ("leave-one-group-out") cross-validation. The variance of a sum of
// squared Gaussian variables: Isserlis, L., Biometrika 12 (1918), 134–139
// (the fourth moments of a normal distribution). The effective degrees of
// freedom: Satterthwaite, F. E., "An approximate distribution of estimates
// of variance components", Biometrics Bulletin 2 (1946), 110–114 (on
// invented tracks of each model's own form the test adds a model error in
// 0.4–0.7 % of 1,000 realisations at the 1 % level, see
// modelerror_test.go). The χ²
// test of a normalised sum of squares: Bevington & Robinson (2003), ch. 11;
// Press et al., Numerical Recipes, 3rd ed. (2007), §6.2 (the incomplete
// gamma function) and §14.3.
func CrossValidate(full *Solution) CrossValidation { return crossValidate(full, nil) }

// crossValidate is [CrossValidate] with the design of the full fit when the
// caller has it (nil, or a design that does not serve the model, builds one):
// its night blocks, left by the full fit, give the polynomial folds without
// refactorising any observation rows (see design.factorNights).
func crossValidate(full *Solution, fd *design) CrossValidation {
	cv := CrossValidation{RMSArcsec: math.NaN(), SEArcsec: math.NaN(), NormRMS: math.NaN(),
		ObsScale: math.NaN(), NormMS: math.NaN(), DoF: math.NaN(), PValue: math.NaN(), ModelErrorArcsec: math.NaN()}
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
	if !fd.fits(tr, full.Model, full.Settings, fitU) {
		fd = newDesign(tr, full.Model, full.Settings, fitU, nil)
		defer fd.release()
	}
	keep := make([]int, 0, len(tr.Points))
	only := make([]bool, len(tr.Points))
	var sumSq, sumChi2 float64
	var foldMS []float64
	// The calibration of the model error: the normalised squares with the
	// fit's observation scale r, their number (2 per miss) and variance.
	r := 1.0
	if full.Chi2DoF > 1 {
		r = full.Chi2DoF
	}
	var folds []*foldPredictor
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
		pred := newFoldPredictor(sol, r)
		for i, p := range tr.Points {
			if p.Night != k || !p.Used || flagged[i] {
				continue
			}
			m := pred.missAt(fd.jinv[i], p)
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
		pred.finish()
		folds = append(folds, pred)
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
	// The folds' sums are correlated through the nights they share; the
	// cross terms need every night's information and one parameter layout
	// for all folds (a polynomial model; a piecewise fold has knots of its
	// own).
	cross := full.Model.Kind != KindPiecewise && len(cv.Failed) == 0
	calN, calSum, calVar := calibrationSums(folds, cross)
	if calN > 0 && calVar > 0 {
		e := float64(2 * calN)
		cv.ObsScale = r
		cv.NormMS = calSum / e
		cv.DoF = 2 * e * e / calVar
		cv.PValue = distuv.ChiSquared{K: cv.DoF}.Survival(cv.DoF * cv.NormMS)
		cv.ModelErrorArcsec = 0
		if cv.PValue < ModelErrorLevel {
			cv.ModelErrorArcsec = math.Sqrt(modelErrorVariance(cv.Misses, r))
		}
	}
	return cv
}

// calibrationSums returns the number of misses the calibration uses, the sum
// of their normalised squares and its variance for a right model: the sum
// of the folds' variances (foldPredictor.variance) and, with cross, the
// covariances of the folds' sums (see [CrossValidate]),
//
//	Cov(S_k, S_j) = 2·tr(M A_j Mᵀ A_k),
//	M = Cov_k H_kj Cov_j − Cov_k − Cov_j,
//
// with Cov_k the parameter covariance of the fold without night k, A_k as in
// foldPredictor.variance and H_kj the information Σ Gᵀ(r·C_obs)⁻¹G of the
// nights other than k and j: the misses d_i (night k) and d_l (night j) of
// the two folds have Cov(d_i, d_l) = G_i M G_lᵀ, from the estimates' own
// covariances and cross-covariance for independent observations.
func calibrationSums(folds []*foldPredictor, cross bool) (n int, sum, variance float64) {
	np := -1
	for _, f := range folds {
		n += f.n
		sum += f.sumChi2
		variance += f.variance()
		if f.cov == nil || (np >= 0 && f.np != np) {
			cross = false
		}
		np = f.np
	}
	if !cross || len(folds) < 2 {
		return n, sum, variance
	}
	// The folds' matrices as gonum matrices (views of their arrays).
	cov := make([]*mat.Dense, len(folds))
	a := make([]*mat.Dense, len(folds))
	h := make([]*mat.Dense, len(folds))
	htot := mat.NewDense(np, np, nil)
	for k, f := range folds {
		cov[k] = mat.NewDense(np, np, f.cov)
		a[k] = mat.NewDense(np, np, f.a)
		h[k] = mat.NewDense(np, np, f.h)
		htot.Add(htot, h[k])
	}
	hkj, m := mat.NewDense(np, np, nil), mat.NewDense(np, np, nil)
	t, u, w := mat.NewDense(np, np, nil), mat.NewDense(np, np, nil), mat.NewDense(np, np, nil)
	for k := range folds {
		ck, ak, hk := cov[k], a[k], h[k]
		for j := k + 1; j < len(folds); j++ {
			cj, aj, hj := cov[j], a[j], h[j]
			hkj.Sub(htot, hk)
			hkj.Sub(hkj, hj)
			w.Mul(ck, hkj)
			m.Mul(w, cj)
			m.Sub(m, ck)
			m.Sub(m, cj)
			t.Mul(m, aj) // M A_j
			u.Mul(m.T(), ak)
			w.Mul(t, u) // M A_j Mᵀ A_k
			// Cov(S_k, S_j) and Cov(S_j, S_k).
			variance += 2 * 2 * mat.Trace(w)
		}
	}
	return n, sum, variance
}

// modelErrorVariance returns s², arcsec², the root of
//
//	Σ_i d_iᵀ (r·C_obs,i + C_pred,i + s²I)⁻¹ d_i = 2N
//
// over the misses with a positive definite covariance (see [CrossValidate]),
// by Newton's method from 0; 0 when the sum at s² = 0 is not above 2N.
func modelErrorVariance(misses []CVMiss, r float64) float64 {
	// f(t) = Σ dᵀ(C + tI)⁻¹d − 2N and f'(t) = −Σ |(C + tI)⁻¹d|².
	f := func(t float64) (val, der float64) {
		n := 0
		for _, m := range misses {
			a := r*m.ObsCovArcsec2[0][0] + m.PredCovArcsec2[0][0] + t
			b := r*m.ObsCovArcsec2[0][1] + m.PredCovArcsec2[0][1]
			c := r*m.ObsCovArcsec2[1][1] + m.PredCovArcsec2[1][1] + t
			det := a*c - b*b
			if !(det > 0) || !(a > 0) {
				continue
			}
			x, y := m.DRAArcsec, m.DDecArcsec
			ix := (c*x - b*y) / det // (C + tI)⁻¹ d
			iy := (a*y - b*x) / det
			val += x*ix + y*iy
			der -= ix*ix + iy*iy
			n++
		}
		return val - float64(2*n), der
	}
	t := 0.0
	for iter := 0; iter < 100; iter++ {
		v, d := f(t)
		if !(v > 0) || !(d < 0) {
			break
		}
		next := t - v/d
		if next-t <= 1e-12*next {
			t = next
			break
		}
		t = next
	}
	return t
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

// foldPredictor evaluates a fold's solution at the points of the night left
// out (see missAt): the parameters, the covariance as a dense row-major
// array, and the basis buffer, set up once per fold.
//
// It also accumulates, over the fold's misses, what the calibration of the
// model error needs (see [CrossValidate]), with the observation covariance
// scaled by r: the normalised squares, their number, and the terms of the
// variance of their sum.
type foldPredictor struct {
	sol     *Solution
	nb, np  int
	u       float64
	uFitted bool
	cov     []float64 // np × np, row-major; nil when the solution has none
	b       []float64 // basis values at the current point

	r       float64
	n       int     // misses with a positive definite covariance
	sumChi2 float64 // Σ dᵀ(r·C_obs + C_pred)⁻¹d
	selfTr  float64 // Σ tr((C_pred C⁻¹)²)
	// ga accumulates A = Σ Gᵀ C⁻¹ G and gh the information Σ Gᵀ(r·C_obs)⁻¹G
	// of the night left out; finish puts them in a and h (np × np,
	// row-major).
	ga, gh gramSum
	a, h   []float64
}

// newFoldPredictor prepares the evaluation of sol's misses, with the
// observation covariance scaled by r for the calibration.
func newFoldPredictor(sol *Solution, r float64) *foldPredictor {
	f := &foldPredictor{sol: sol, nb: sol.Model.NumPerCoord(), np: len(sol.Params), r: r}
	f.u, f.uFitted = solutionInvDistance(sol)
	f.b = make([]float64, f.nb)
	if sol.Cov != nil {
		f.cov = make([]float64, f.np*f.np)
		for i := 0; i < f.np; i++ {
			for j := 0; j < f.np; j++ {
				f.cov[i*f.np+j] = sol.Cov.At(i, j)
			}
		}
		f.ga, f.gh = newGramSum(f.nb), newGramSum(f.nb)
	}
	return f
}

// variance returns the variance of the fold's sum of normalised squares for
// a right model, 2·(2n + tr((Cov·A)²) − Σ tr((C_pred C⁻¹)²)) (see
// [CrossValidate]).
func (f *foldPredictor) variance() float64 {
	v := float64(2*f.n) - f.selfTr
	if f.cov != nil {
		np := f.np
		ca := make([]float64, np*np) // Cov·A
		for i := 0; i < np; i++ {
			for k := 0; k < np; k++ {
				c := f.cov[i*np+k]
				if c == 0 {
					continue
				}
				for j := 0; j < np; j++ {
					ca[i*np+j] += c * f.a[k*np+j]
				}
			}
		}
		for i := 0; i < np; i++ {
			for j := 0; j < np; j++ {
				v += ca[i*np+j] * ca[j*np+i]
			}
		}
	}
	return 2 * v
}

// missAt returns the miss of point p under the fold's solution: the observed
// minus the modelled topocentric standard coordinates (the same model
// equation the fit uses, ξ = Σ c_j b_j(τ) − u·SiteXi), turned into RA·cos δ
// and Dec, and its χ² with the observation's and the prediction's
// covariance; jinv is the inverse of the projection's Jacobian at p (see
// planeJacobians).
func (f *foldPredictor) missAt(jinv [2][2]float64, p Point) CVMiss {
	sol, nb, np, b := f.sol, f.nb, f.np, f.b
	scale := sol.Track.TimeScaleDays
	sol.Model.basis(b, p.T/scale, scale)
	par := sol.Params
	var xi, eta float64
	for j := 0; j < nb; j++ {
		xi += par[j] * b[j]
		eta += par[nb+j] * b[j]
	}
	xi -= f.u * p.SiteXi
	eta -= f.u * p.SiteEta
	dxi, deta := p.Xi-xi, p.Eta-eta

	// Prediction covariance in the plane: g Cov gᵀ for the rows
	// gξ = (b, 0, uξ), gη = (0, b, uη), with uξ = −SiteXi, uη = −SiteEta
	// when the inverse distance is fitted (0 otherwise), block by block.
	var cxx, cxe, cee, ux, ue float64
	if f.uFitted {
		ux, ue = -p.SiteXi, -p.SiteEta
	}
	if cv := f.cov; cv != nil {
		for i, bi := range b {
			if bi == 0 {
				continue // a hinge before its knot
			}
			ra := cv[i*np : i*np+np]           // row of the i-th ξ coefficient
			rb := cv[(nb+i)*np : (nb+i)*np+np] // row of the i-th η coefficient
			var sxx, sxe, see float64
			for j, bj := range b {
				sxx += ra[j] * bj
				sxe += ra[nb+j] * bj
				see += rb[nb+j] * bj
			}
			cxx += bi * sxx
			cxe += bi * sxe
			cee += bi * see
		}
		if f.uFitted {
			u := np - 1
			var au, bu float64 // Cov(ξ coefficients, u)·b and Cov(η coefficients, u)·b
			for i, bi := range b {
				au += cv[i*np+u] * bi
				bu += cv[(nb+i)*np+u] * bi
			}
			cuu := cv[u*np+u]
			cxx += 2*ux*au + ux*ux*cuu
			cee += 2*ue*bu + ue*ue*cuu
			cxe += ux*bu + ue*au + ux*ue*cuu
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
	cobs := [2][2]float64{{p.SigmaXi * p.SigmaXi, sxe}, {sxe, p.SigmaEta * p.SigmaEta}}
	cpred := [2][2]float64{{cxx, cxe}, {cxe, cee}}
	f.calibrate(cobs, cpred, ux, ue, dxi, deta)
	// Plane offsets to sky offsets (east = RA·cos δ, north = Dec).
	de := jinv[0][0]*dxi + jinv[0][1]*deta
	dn := jinv[1][0]*dxi + jinv[1][1]*deta
	as2 := astro.Arcsecond.Radians() * astro.Arcsecond.Radians()
	co, cp := congruence(jinv, cobs), congruence(jinv, cpred)
	for i := 0; i < 2; i++ {
		for j := 0; j < 2; j++ {
			co[i][j] /= as2
			cp[i][j] /= as2
		}
	}
	return CVMiss{
		ObsIndex:       p.ObsIndex,
		DRAArcsec:      de / float64(astro.Arcsecond),
		DDecArcsec:     dn / float64(astro.Arcsecond),
		Chi2:           chi2,
		ObsCovArcsec2:  co,
		PredCovArcsec2: cp,
	}
}

// calibrate adds a miss (dξ, dη on the plane) with the plane covariances of
// the observation and of the prediction to the fold's sums for the model
// error: with C = r·C_obs + C_pred and W = C⁻¹, the normalised square
// dᵀWd, tr((C_pred W)²) and GᵀWG, for the design rows gξ = (b, 0, uξ) and
// gη = (0, b, uη) (b the basis values the caller left in f.b; uξ, uη the u
// column's entries, 0 without it). The χ² and the traces are invariant under
// the plane-to-sky map, so the plane serves.
func (f *foldPredictor) calibrate(cobs, cpred [2][2]float64, ux, ue, dxi, deta float64) {
	c00 := f.r*cobs[0][0] + cpred[0][0]
	c01 := f.r*cobs[0][1] + cpred[0][1]
	c11 := f.r*cobs[1][1] + cpred[1][1]
	det := c00*c11 - c01*c01
	if !(det > 0) || !(c00 > 0) {
		return
	}
	w00, w01, w11 := c11/det, -c01/det, c00/det
	f.n++
	f.sumChi2 += w00*dxi*dxi + 2*w01*dxi*deta + w11*deta*deta
	// M = C_pred W; tr(M²) = m00² + 2·m01·m10 + m11².
	m00 := cpred[0][0]*w00 + cpred[0][1]*w01
	m01 := cpred[0][0]*w01 + cpred[0][1]*w11
	m10 := cpred[1][0]*w00 + cpred[1][1]*w01
	m11 := cpred[1][0]*w01 + cpred[1][1]*w11
	f.selfTr += m00*m00 + 2*m01*m10 + m11*m11
	if f.cov == nil {
		return
	}
	f.ga.add(f.b, ux, ue, w00, w01, w11)
	o00, o01, o11 := f.r*cobs[0][0], f.r*cobs[0][1], f.r*cobs[1][1]
	if od := o00*o11 - o01*o01; od > 0 {
		f.gh.add(f.b, ux, ue, o11/od, -o01/od, o00/od)
	}
}

// gramSum accumulates Σ GᵀWG over points with the design rows
// gξ = (b, 0, uξ) and gη = (0, b, uη) (b the nb basis values, the u entries
// present when the model fits the inverse distance) and symmetric 2×2
// weights W = [w00 w01; w01 w11], by blocks: Σ w·bbᵀ for each weight, the
// u column Σ b·(W u)_ξ, Σ b·(W u)_η, and Σ uᵀWu.
type gramSum struct {
	nb       int
	k00, k01 []float64 // nb × nb
	k11      []float64
	v0, v1   []float64 // nb
	uu       float64
}

func newGramSum(nb int) gramSum {
	return gramSum{nb: nb, k00: make([]float64, nb*nb), k01: make([]float64, nb*nb), k11: make([]float64, nb*nb),
		v0: make([]float64, nb), v1: make([]float64, nb)}
}

// add adds one point.
func (g *gramSum) add(b []float64, ux, ue, w00, w01, w11 float64) {
	nb := g.nb
	p0 := w00*ux + w01*ue
	p1 := w01*ux + w11*ue
	for i, bi := range b {
		r0, r1, r2 := g.k00[i*nb:(i+1)*nb], g.k01[i*nb:(i+1)*nb], g.k11[i*nb:(i+1)*nb]
		for j, bj := range b {
			x := bi * bj
			r0[j] += w00 * x
			r1[j] += w01 * x
			r2[j] += w11 * x
		}
		g.v0[i] += bi * p0
		g.v1[i] += bi * p1
	}
	g.uu += ux*p0 + ue*p1
}

// matrix returns Σ GᵀWG as an np × np row-major array (np = 2nb, plus 1
// with the u column).
func (g *gramSum) matrix(np int) []float64 {
	nb := g.nb
	m := make([]float64, np*np)
	for i := 0; i < nb; i++ {
		for j := 0; j < nb; j++ {
			m[i*np+j] = g.k00[i*nb+j]
			m[i*np+nb+j] = g.k01[i*nb+j]
			m[(nb+i)*np+j] = g.k01[j*nb+i]
			m[(nb+i)*np+nb+j] = g.k11[i*nb+j]
		}
	}
	if np > 2*nb {
		u := np - 1
		for i := 0; i < nb; i++ {
			m[i*np+u], m[u*np+i] = g.v0[i], g.v0[i]
			m[(nb+i)*np+u], m[u*np+nb+i] = g.v1[i], g.v1[i]
		}
		m[u*np+u] = g.uu
	}
	return m
}

// finish assembles the fold's A and H (see calibrationSums) once its misses
// are in.
func (f *foldPredictor) finish() {
	if f.cov != nil {
		f.a = f.ga.matrix(f.np)
		f.h = f.gh.matrix(f.np)
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
