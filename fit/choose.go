package fit

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"

	"arcfit/astro"
)

// ModelRow is one line of the model comparison.
type ModelRow struct {
	// Model is the model's name (poly1, poly2, poly3, piecewise); Spec the
	// model itself, with the knots of a piecewise model.
	Model string
	Spec  Model
	// NumParams is the number of fitted parameters (motion coefficients and,
	// when fitted, the inverse distance).
	NumParams int
	// RMSArcsec is the fit's pooled RMS residual (RA·cos δ and Dec) of the
	// used, unflagged observations; Chi2DoF its χ²/dof; BIC its [BIC].
	RMSArcsec, Chi2DoF, BIC float64
	// CVErrorArcsec is the leave-one-night-out cross-validated RMS miss
	// ([CrossValidate]), NaN when fewer than 3 nights or no fold could be
	// fitted; CVSEArcsec its standard error, CVNormRMS the normalised RMS
	// miss, CV the whole cross-validation (with the calibration of the
	// model error: CV.NormMS, CV.DoF, CV.PValue, CV.ModelErrorArcsec).
	CVErrorArcsec float64
	CVSEArcsec    float64
	CVNormRMS     float64
	CV            CrossValidation
	// Pred is the prediction at the first requested time, nil if none was
	// requested or the model could not be fitted; Preds holds one per
	// requested time.
	Pred  *Prediction
	Preds []Prediction
	// Err says why the model could not be fitted or predicted, "" when it
	// was.
	Err string
	// Chosen marks the row picked by the auto rule.
	Chosen bool
	// Solution is the model's fit of the whole track (nil when Err is set,
	// and for the kepler row, whose fit is Orbit).
	Solution *Solution
	// Orbit is the kepler row's two-body orbit or the nbody row's perturbed
	// one (nil otherwise, or when Err is set).
	Orbit *OrbitFit
}

// Comparison is the result of fitting and comparing the candidate models.
type Comparison struct {
	Rows []ModelRow
	// Chosen is the name of the chosen model, Reason why, in plain words.
	Chosen string
	Reason string
	// Solution is the chosen model's fit.
	Solution *Solution
	// HorizonDays is the validity horizon ([Horizon]): how far beyond either
	// end of the arc, in days, the chosen model's predictions are trusted;
	// HorizonBeforeDays and HorizonAfterDays are the two ends' horizons
	// (HorizonDays is the smaller). HorizonRule says how they were found.
	HorizonDays       float64
	HorizonBeforeDays float64
	HorizonAfterDays  float64
	HorizonRule       string
	// Notes are remarks on the comparison (skipped models, failed folds).
	Notes []string
	// Orbit is the orbit when the chosen model is kepler or nbody (Solution
	// is then the best sky-plane model); nil otherwise.
	Orbit *OrbitFit
}

// CandidateModels returns the models to compare for the track, with the
// default [Settings] for the knot selection; see [CandidateModelsWith].
func CandidateModels(tr *Track) []Model { return CandidateModelsWith(tr, Settings{}) }

// CandidateModelsWith returns the models to compare for the track: poly1,
// poly2 and poly3 as far as the data allow them — a model is allowed when the
// 2·n equations of the n used observations exceed its motion parameters plus
// one (the inverse distance), leaving at least one degree of freedom — and,
// when the track has a gap between nights, the piecewise-linear model with
// the knots [SelectKnots] keeps under the settings s (all gap knots when the
// selection cannot fit any, so that the comparison shows why).
func CandidateModelsWith(tr *Track, s Settings) []Model {
	n := tr.NumUsed()
	var out []Model
	for d := 1; d <= 3; d++ {
		m := Poly(d)
		if 2*n > m.NumMotionParams()+1 {
			out = append(out, m)
		}
	}
	if knots := GapKnots(tr); len(knots) > 0 {
		m, err := selectKnotsModel(tr, knots, s)
		if err != nil {
			m = Piecewise(knots)
		}
		out = append(out, m)
	}
	// The two-body orbit needs the observations themselves (a track read
	// from a fit file has none) and at least three of them.
	if tr.Set != nil && n >= 3 {
		out = append(out, Kepler())
	}
	return out
}

// ErrNoModel reports a comparison in which no model could be fitted.
var ErrNoModel = errors.New("fit: no model could be fitted")

// Compare fits every model to the track with the settings s, scores it by
// its RMS residual, χ²/dof, [BIC] and leave-one-night-out cross-validated
// error ([CrossValidate]), sets each solution's model error from its
// cross-validation (Solution.ModelErrorArcsec, with a note saying so; see
// [CrossValidate] for the test and the rule), predicts it at the times at
// for the site (nil for the geocentre), picks one by the auto rule and
// derives the validity horizon ([Horizon]), setting BeyondHorizon and
// HorizonDays of every prediction. The horizon compares the models' formal
// covariances; the predictions carry the model error.
//
// The auto rule, in plain words:
//
//   - When cross-validation is available for at least two models (three or
//     more nights), take the lowest cross-validated error; then choose the
//     simplest model (fewest parameters; among equals, the lower error) whose
//     cross-validated error is within one standard error of that lowest one —
//     the "one-standard-error rule", which treats differences smaller than
//     the cross-validation's own scatter as ties and gives them to the
//     simpler model.
//   - Otherwise choose the lowest BIC; models within 1e-9 of it (relative)
//     tie and go to the simpler.
//
// Comparison.Reason says which rule decided, with the numbers, and whether
// BIC agrees.
//
// The orbit models come after: the kepler row replaces the sky-plane choice
// when it fits the data ([chooseKepler]); then, when the planets matter —
// the arc and the horizon of the predictions at span more than
// [NBodySpanDays], or the orbit integrated with the planets through the arc
// and to the predictions passes within 0.05 au of the Earth or inside a
// planet's Hill sphere — the perturbed orbit (the nbody row, corrected from
// the kepler row's orbit) is fitted and replaces the choice when it passes
// the same data tests, the reason saying why. An nbody model in models is
// always fitted (and chosen only by that rule). Models that cannot be fitted keep a row with Err set. When no
// model can be fitted Compare returns the error of the simplest (a
// *TooFewError for too few observations says which models the data allow).
//
// Reference: the one-standard-error rule, Breiman, L., Friedman, J. H.,
// Olshen, R. A., Stone, C. J., Classification and Regression Trees,
// Wadsworth (1984), §3.4.3; Hastie, Tibshirani & Friedman, The Elements of
// Statistical Learning, 2nd ed. (2009), §7.10.1. BIC: Schwarz (1978).
func Compare(tr *Track, models []Model, s Settings, at []astro.JD, site *astro.Site) (*Comparison, error) {
	if tr == nil {
		return nil, errors.New("fit: no track to compare models on")
	}
	if len(models) == 0 {
		return nil, errors.New("fit: no models to compare")
	}
	if s.ModelError != ModelErrorExcess && s.ModelError != ModelErrorCalibrated {
		return nil, fmt.Errorf("fit: unknown model-error rule %d", int(s.ModelError))
	}
	c := &Comparison{HorizonDays: math.NaN(), HorizonBeforeDays: math.NaN(), HorizonAfterDays: math.NaN()}
	jinv := planeJacobians(tr) // shared by every model's fit and folds
	var firstErr error
	firstErrParams := math.MaxInt
	var kepler *OrbitFit
	withNBody, withKepler := false, false
	for _, m := range models {
		if m.Kind == KindKepler {
			c.Rows = append(c.Rows, keplerRow(tr, s))
			kepler, withKepler = c.Rows[len(c.Rows)-1].Orbit, true
			continue
		}
		if m.Kind == KindNBody {
			withNBody = true
			continue // fitted below, from the kepler row's orbit
		}
		row := ModelRow{
			Model: m.Name(), Spec: m, NumParams: m.NumMotionParams(),
			RMSArcsec: math.NaN(), Chi2DoF: math.NaN(), BIC: math.NaN(),
			CVErrorArcsec: math.NaN(), CVSEArcsec: math.NaN(), CVNormRMS: math.NaN(),
		}
		if s.Parallax == ParallaxFit {
			row.NumParams++
		}
		// One design per model, shared by its fit and the folds of its
		// cross-validation (which reuse the fit's night blocks).
		d := newDesign(tr, m, s, s.Parallax == ParallaxFit && tr.hasSite(), jinv)
		sol, err := fitWith(tr, m, s, d, jinv, false, nil)
		if err != nil {
			d.release()
			row.Err = err.Error()
			if row.NumParams < firstErrParams {
				firstErr, firstErrParams = err, row.NumParams
			}
			c.Rows = append(c.Rows, row)
			continue
		}
		row.Solution = sol
		row.NumParams = len(sol.Params)
		row.RMSArcsec = sol.RMSArcsec
		row.Chi2DoF = sol.Chi2DoF
		row.BIC = BIC(sol)
		row.CV = crossValidate(sol, d)
		d.release()
		row.CVErrorArcsec = row.CV.RMSArcsec
		row.CVSEArcsec = row.CV.SEArcsec
		row.CVNormRMS = row.CV.NormRMS
		c.Rows = append(c.Rows, row)
	}
	// The perturbed orbit: fitted when asked for, or when the auto rule
	// says the planets matter (planetsMatter) for an orbit the comparison
	// has.
	var need nbodyNeed
	if withKepler || withNBody {
		need = planetsMatter(tr, kepler, at)
		if withNBody || need.need {
			c.Rows = append(c.Rows, nbodyRowFor(tr, s, kepler))
		}
	}
	best := chooseRow(c)
	if best < 0 {
		if firstErr == nil {
			firstErr = ErrNoModel
		}
		return nil, firstErr
	}
	c.Solution = c.Rows[best].Solution
	sky := best
	if k, why := chooseKepler(c, tr, best); k != best {
		c.Reason = why + "; among the sky-plane models " + c.Reason
		best = k
		c.Orbit = c.Rows[k].Orbit
	} else if why != "" {
		c.Notes = append(c.Notes, why)
	}
	if k, why := chooseNBody(c, tr, best, sky, need); k != best {
		if c.Orbit != nil {
			c.Reason = why + "; " + c.Reason
		} else {
			c.Reason = why + "; among the sky-plane models " + c.Reason
		}
		best = k
		c.Orbit = c.Rows[k].Orbit
	} else if why != "" {
		c.Notes = append(c.Notes, why)
	}
	c.Rows[best].Chosen = true
	c.Chosen = c.Rows[best].Model

	h := horizon(c)
	c.HorizonDays, c.HorizonBeforeDays, c.HorizonAfterDays, c.HorizonRule = h.days, h.before, h.after, h.rule

	// The horizon compares the models' formal covariances; the predictions
	// below carry each model's measured error between nights.
	for i := range c.Rows {
		row := &c.Rows[i]
		if row.Solution == nil {
			continue
		}
		m, note := modelError(row.CV, tr, s.ModelError)
		if m > 0 {
			row.Solution.ModelErrorArcsec = m
			row.Solution.Notes = append(row.Solution.Notes, note)
		}
	}

	first, last := tr.ArcTT()
	for i := range c.Rows {
		row := &c.Rows[i]
		if row.Orbit != nil && len(at) > 0 {
			for _, t := range at {
				p, err := row.Orbit.Predict(t, site)
				if err != nil {
					row.Err = err.Error()
					row.Preds = nil
					break
				}
				row.Preds = append(row.Preds, p)
			}
			if len(row.Preds) > 0 {
				row.Pred = &row.Preds[0]
			}
			continue
		}
		if row.Solution == nil || len(at) == 0 {
			continue
		}
		row.Preds = make([]Prediction, 0, len(at))
		for _, t := range at {
			p, err := row.Solution.Predict(t, site)
			if err != nil {
				row.Err = err.Error()
				row.Preds = nil
				break
			}
			markHorizon(&p, tr, first, last, h)
			row.Preds = append(row.Preds, p)
		}
		if len(row.Preds) > 0 {
			row.Pred = &row.Preds[0]
		}
	}
	for _, row := range c.Rows {
		for _, n := range row.CV.Notes {
			c.Notes = append(c.Notes, row.Model+": "+n)
		}
	}
	return c, nil
}

// ModelErrorRule says how [Compare] derives a model's error between nights
// from its leave-one-night-out cross-validation ([CrossValidate]).
type ModelErrorRule int

const (
	// ModelErrorExcess adds the excess of the cross-validated RMS miss over
	// the observations' scatter, √(CV² − σ̄²) when positive (σ̄² the mean of
	// the used observations' σ², both coordinates). It errs on the safe
	// side: a night left out is missed by the observation noise, the model's
	// bias and the fold's own prediction error, and only the first is
	// subtracted, so a right model fitted to few nights is widened by its
	// folds' extrapolation error (measured on invented three- and four-night
	// tracks of each model's own form: the truth inside the 3-σ ellipse in
	// 100 % of 1,000 realisations, against 99.2–99.6 % for the formal
	// covariance, with the ellipse's area a median 260–380 times the formal
	// one). On the invented demo and main-belt arcs it is what keeps the
	// bias of the chosen quadratic one day out (1.5–3″) inside the region, a
	// bias the calibrated rule cannot detect there.
	ModelErrorExcess ModelErrorRule = iota
	// ModelErrorCalibrated adds the model error s of the calibration in
	// [CrossValidate] (CrossValidation.ModelErrorArcsec): only when the
	// misses' normalised mean square is significantly above 1 (a χ² test at
	// ModelErrorLevel with Satterthwaite's effective degrees of freedom),
	// and then the s that brings it to 1. A right model gets none but at
	// the test's level (measured: in 0.4–0.7 % of 1,000 realisations, with
	// 99.2–99.6 % coverage); a bias that the folds' own uncertainty hides is
	// not detected.
	ModelErrorCalibrated
)

// String returns "excess" or "calibrated".
func (r ModelErrorRule) String() string {
	switch r {
	case ModelErrorExcess:
		return "excess"
	case ModelErrorCalibrated:
		return "calibrated"
	}
	return fmt.Sprintf("ModelErrorRule(%d)", int(r))
}

// modelError returns the model error (arcsec per coordinate) the rule
// derives from the cross-validation cv of a fit to tr, and the note that
// says so (0 and "" for none).
func modelError(cv CrossValidation, tr *Track, rule ModelErrorRule) (float64, string) {
	switch rule {
	case ModelErrorCalibrated:
		m := cv.ModelErrorArcsec
		if !(m > 0) || math.IsInf(m, 0) {
			return 0, ""
		}
		return m, fmt.Sprintf(
			"the nights left out were missed by more than the fit's uncertainty explains (normalised mean square %.2f on %.1f effective degrees of freedom, p = %.2g): a model error of %.2f″ per coordinate is added to every prediction's uncertainty",
			cv.NormMS, cv.DoF, cv.PValue, m)
	default:
		rms := cv.RMSArcsec
		if math.IsNaN(rms) || math.IsInf(rms, 0) {
			return 0, ""
		}
		meanVar := meanObsVarianceArcsec2(tr)
		excess := rms*rms - meanVar
		if !(excess > 0) {
			return 0, ""
		}
		m := math.Sqrt(excess)
		return m, fmt.Sprintf(
			"the nights left out were missed by %.2f″ RMS against the observations' %.2f″: the excess, %.2f″, is added to every prediction's uncertainty",
			rms, math.Sqrt(meanVar), m)
	}
}

// markHorizon sets a prediction's HorizonDays (the horizon on the side of the
// arc its time lies, the smaller one inside the arc) and BeyondHorizon
// (its time lies farther than that beyond the arc's nearer end).
func markHorizon(p *Prediction, tr *Track, first, last float64, h horizonResult) {
	tt, err := astro.UTCToTT(p.UTC)
	if err != nil && tt == (astro.JD{}) {
		p.HorizonDays = h.days
		return
	}
	t := tt.Sub(tr.EpochTT)
	switch {
	case t > last:
		p.HorizonDays = h.after
		p.BeyondHorizon = t-last > h.after
	case t < first:
		p.HorizonDays = h.before
		p.BeyondHorizon = first-t > h.before
	default:
		p.HorizonDays = h.days
		p.BeyondHorizon = false
	}
}

// chooseRow applies the auto rule of [Compare] and writes the reason; it
// returns the chosen row's index, −1 when no row was fitted.
func chooseRow(c *Comparison) int {
	var fitted []int
	for i, r := range c.Rows {
		if r.Solution != nil {
			fitted = append(fitted, i)
		}
	}
	if len(fitted) == 0 {
		return -1
	}
	// Simpler first: fewer parameters, then the order given.
	sort.SliceStable(fitted, func(a, b int) bool {
		return c.Rows[fitted[a]].NumParams < c.Rows[fitted[b]].NumParams
	})
	bicBest := fitted[0]
	for _, i := range fitted[1:] {
		if lowerBeyondTie(c.Rows[i].BIC, c.Rows[bicBest].BIC) {
			bicBest = i
		}
	}
	var withCV []int
	for _, i := range fitted {
		if !math.IsNaN(c.Rows[i].CVErrorArcsec) {
			withCV = append(withCV, i)
		}
	}
	if len(withCV) >= 2 {
		low := withCV[0]
		for _, i := range withCV[1:] {
			if c.Rows[i].CVErrorArcsec < c.Rows[low].CVErrorArcsec {
				low = i
			}
		}
		se := c.Rows[low].CVSEArcsec
		if math.IsNaN(se) {
			se = 0
		}
		limit := c.Rows[low].CVErrorArcsec + se
		pick := low
		for _, i := range withCV { // simplest first
			if c.Rows[i].CVErrorArcsec <= limit {
				if c.Rows[i].NumParams < c.Rows[pick].NumParams ||
					(c.Rows[i].NumParams == c.Rows[pick].NumParams && c.Rows[i].CVErrorArcsec < c.Rows[pick].CVErrorArcsec) {
					pick = i
				}
			}
		}
		r := c.Rows[pick]
		var b strings.Builder
		if pick == low {
			fmt.Fprintf(&b, "%s: lowest cross-validated error (%.3g″) of %d models", r.Model, r.CVErrorArcsec, len(withCV))
		} else {
			fmt.Fprintf(&b, "%s: the simplest model within one standard error (%.2g″) of the lowest cross-validated error (%s, %.3g″); its own is %.3g″",
				r.Model, se, c.Rows[low].Model, c.Rows[low].CVErrorArcsec, r.CVErrorArcsec)
		}
		if bicBest == pick {
			b.WriteString("; BIC agrees")
		} else {
			fmt.Fprintf(&b, "; BIC prefers %s (ΔBIC %.1f)", c.Rows[bicBest].Model, r.BIC-c.Rows[bicBest].BIC)
		}
		c.Reason = b.String()
		return pick
	}
	r := c.Rows[bicBest]
	why := "cross-validation is not available"
	nights := usedNightSpans(r.Solution.Track)
	if len(nights) < MinCVNights {
		why = fmt.Sprintf("cross-validation needs at least %d nights (%d observed)", MinCVNights, len(nights))
	} else if len(withCV) == 1 {
		why = "cross-validation was possible for one model only"
	}
	c.Reason = fmt.Sprintf("%s: lowest BIC (%.1f) of %d models; %s", r.Model, r.BIC, len(fitted), why)
	return bicBest
}

// lowerBeyondTie reports whether a is lower than b by more than the tie
// tolerance of 1e-9 (relative).
func lowerBeyondTie(a, b float64) bool {
	if math.IsNaN(a) {
		return false
	}
	if math.IsNaN(b) {
		return true
	}
	return a < b-1e-9*math.Max(math.Abs(b), 1)
}

// meanObsVarianceArcsec2 returns the mean of the used observations' σ² over
// both coordinates, in arcsec².
func meanObsVarianceArcsec2(tr *Track) float64 {
	as := astro.Arcsecond.Radians()
	var sum float64
	n := 0
	for _, p := range tr.Points {
		if !p.Used {
			continue
		}
		sum += (p.SigmaXi*p.SigmaXi + p.SigmaEta*p.SigmaEta) / (as * as)
		n += 2
	}
	if n == 0 {
		return 0
	}
	return sum / float64(n)
}
