package fit

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// nightSpan is the time span of one night's used observations, in TT days
// from the track's epoch.
type nightSpan struct {
	night      int
	first, end float64
	count      int
}

// usedNightSpans returns the nights that hold used observations, in time
// order of their first observation, with their first and last times.
func usedNightSpans(tr *Track) []nightSpan {
	idx := map[int]int{}
	var spans []nightSpan
	for _, p := range tr.Points {
		if !p.Used {
			continue
		}
		i, ok := idx[p.Night]
		if !ok {
			idx[p.Night] = len(spans)
			spans = append(spans, nightSpan{night: p.Night, first: p.T, end: p.T, count: 1})
			continue
		}
		s := &spans[i]
		s.first = math.Min(s.first, p.T)
		s.end = math.Max(s.end, p.T)
		s.count++
	}
	sort.SliceStable(spans, func(a, b int) bool { return spans[a].first < spans[b].first })
	return spans
}

// GapKnots returns the candidate knots of the piecewise-linear model: one at
// the mid-point of each gap between consecutive nights of the track, in TT
// days from the track's epoch, increasing. The mid-point lies halfway between
// the last used observation of one night and the first of the next; nights
// whose observations overlap in time (two sites far apart in longitude) give
// no knot. A track observed on one night has none.
//
// Placing the knots in the unobserved gaps keeps every segment's slope
// measured by whole nights and makes the path's change of direction happen
// where no observation says otherwise; with one knot per gap the path has a
// separate straight segment for each night.
func GapKnots(tr *Track) []float64 {
	spans := usedNightSpans(tr)
	var knots []float64
	for i := 1; i < len(spans); i++ {
		a, b := spans[i-1], spans[i]
		if !(a.end < b.first) {
			continue
		}
		knots = append(knots, 0.5*(a.end+b.first))
	}
	return knots
}

// BIC returns the Bayesian information criterion of a solution,
//
//	BIC = χ² + k ln n
//
// with χ² the unscaled weighted sum of squared residuals of the used,
// unflagged observations (Solution.Chi2), k the number of fitted parameters
// (motion coefficients and, when fitted, the inverse distance) and n the
// number of data, two per used, unflagged observation (ξ and η). For
// Gaussian errors of known σ, −2 ln L = χ² + const, so this is Schwarz's
// criterion −2 ln L + k ln n up to a constant common to all models fitted to
// the same data. Lower is better.
//
// Reference: Schwarz, G., "Estimating the dimension of a model", Annals of
// Statistics 6 (1978), 461–464; Kass, R. E., Raftery, A. E., "Bayes factors",
// J. Am. Stat. Assoc. 90 (1995), 773–795, §4.1.
func BIC(s *Solution) float64 {
	n := 2 * s.NumUsed
	if n <= 0 {
		return math.NaN()
	}
	return s.Chi2 + float64(len(s.Params))*math.Log(float64(n))
}

// ErrNoGap reports a track without a gap between nights, where the
// piecewise-linear model has no knot to place.
var ErrNoGap = errors.New("fit: piecewise: no gap between nights to place a knot in (observations from one night)")

// SelectKnots chooses the knots of the piecewise-linear model for the track:
// it starts from [GapKnots] (one knot per gap between nights) and removes
// knots by backward elimination on [BIC]: at each step it refits the model
// without each remaining knot in turn and drops the knot whose removal lowers
// BIC the most; it stops when no removal lowers BIC or when one knot is
// left. The piecewise model keeps at least one knot, since without knots it
// is the straight line poly1, which the comparison holds anyway. A model
// that cannot be fitted (a segment without the data to fix its slope) loses
// first the knot whose removal repairs it best.
//
// Outliers: the model with all knots is fitted with the settings s (outlier
// rejection included); the elimination then fits the same points without the
// ones that fit flagged, with no further rejection, so that every BIC
// compared is over the same data. The returned solution is the chosen model
// fitted to the whole track with s.
//
// The error is ErrNoGap when the track has no gap between nights, or the
// fit's error when no model with a knot can be fitted.
//
// Reference: backward elimination, Miller, A., Subset Selection in
// Regression, 2nd ed., Chapman & Hall (2002), §3.3; the criterion, Schwarz
// (1978) (see [BIC]).
func SelectKnots(tr *Track, s Settings) (Model, *Solution, error) {
	m, err := selectKnotsModel(tr, GapKnots(tr), s)
	if err != nil {
		return m, nil, err
	}
	sol, err := Fit(tr, m, s)
	return m, sol, err
}

// selectKnotsModel is the elimination of SelectKnots from the given knots.
func selectKnotsModel(tr *Track, knots []float64, s Settings) (Model, error) {
	if len(knots) == 0 {
		return Piecewise(nil), ErrNoGap
	}
	cur := Piecewise(knots)
	// The inverse plane Jacobians are the same for every candidate: computed
	// once for the track and for the points the elimination fits.
	jinv := planeJacobians(tr)
	sol, err := fitWith(tr, cur, s, nil, jinv, false, nil)
	work, ws := tr, s
	if err == nil && !s.KeepAll {
		work, ws = withoutFlagged(tr, sol), s
		ws.KeepAll = true
	}
	workJ := subsetJacobians(tr, work, jinv)
	// The candidates' fits are compared by their BIC only: lean fits.
	fitWork := func(m Model) (*Solution, error) { return fitWith(work, m, ws, nil, workJ, true, nil) }
	// Repair a model that cannot be fitted: drop, one at a time, the knot
	// whose removal gives the lowest BIC among the fits that succeed.
	for err != nil {
		if len(cur.Knots) <= 1 {
			return cur, err
		}
		var bestSol *Solution
		bestI := -1
		for i := range cur.Knots {
			s2, e2 := fitWork(Piecewise(without(cur.Knots, i)))
			if e2 == nil && (bestSol == nil || BIC(s2) < BIC(bestSol)) {
				bestI, bestSol = i, s2
			}
		}
		if bestSol == nil {
			cur = Piecewise(cur.Knots[:len(cur.Knots)-1])
			sol, err = fitWork(cur)
			continue
		}
		cur, sol, err = Piecewise(without(cur.Knots, bestI)), bestSol, nil
	}
	bic := BIC(sol)
	for len(cur.Knots) > 1 {
		bestI, bestBIC := -1, bic
		for i := range cur.Knots {
			s2, e2 := fitWork(Piecewise(without(cur.Knots, i)))
			if e2 != nil {
				continue
			}
			if b := BIC(s2); b < bestBIC {
				bestI, bestBIC = i, b
			}
		}
		if bestI < 0 {
			break
		}
		cur = Piecewise(without(cur.Knots, bestI))
		bic = bestBIC
	}
	return cur, nil
}

// withoutFlagged returns the track without the points sol flagged as
// outliers.
func withoutFlagged(tr *Track, sol *Solution) *Track {
	flagged := map[int]bool{}
	for _, r := range sol.Residuals {
		if r.Flagged {
			flagged[r.ObsIndex] = true
		}
	}
	if len(flagged) == 0 {
		return tr
	}
	return tr.Subset(func(p Point) bool { return !flagged[p.ObsIndex] })
}

// without returns a copy of x without element i.
func without(x []float64, i int) []float64 {
	out := make([]float64, 0, len(x)-1)
	out = append(out, x[:i]...)
	return append(out, x[i+1:]...)
}

// segments returns the number of straight segments of a piecewise-linear
// model, one more than its knots; for a polynomial it returns 0.
func segments(m Model) int {
	if m.Kind != KindPiecewise {
		return 0
	}
	return len(m.Knots) + 1
}

// describeKnots writes a model's knots for messages.
func describeKnots(m Model) string {
	if m.Kind != KindPiecewise {
		return ""
	}
	return fmt.Sprintf("%d knot(s), %d segments", len(m.Knots), segments(m))
}
