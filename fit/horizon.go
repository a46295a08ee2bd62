package fit

import (
	"fmt"
	"math"

	"arcfit/astro"
)

// Parameters of the horizon search (see [Horizon]).
const (
	// HorizonChi2 is the level of the 2-dof χ² of the difference between a
	// competitor's prediction and the chosen model's beyond which they
	// disagree: 11.83 = −2 ln 0.0027, the 3-σ equivalent (exact for 2 dof,
	// as DefaultRejectChi2), independent of the --sigma asked for the
	// printed ellipse.
	HorizonChi2 = 11.83
	// HorizonMaxArcs is how far the search goes, in arc lengths beyond each
	// end of the arc; a horizon not reached by then is reported as this far
	// (and the rule says "at least").
	HorizonMaxArcs = 10.0
	// horizonMinArcs is the first extrapolation distance of the grid, in
	// arc lengths; horizonGrid the number of grid points (log-spaced) up to
	// HorizonMaxArcs.
	horizonMinArcs = 0.01
	horizonGrid    = 31
)

// horizonResult is the outcome of the horizon search.
type horizonResult struct {
	days, before, after float64
	rule                string
}

// Horizon returns the validity horizon of the comparison's chosen model in
// days beyond the ends of the arc, the smaller of the horizons before the
// first and after the last observation (Compare stores both).
//
// The rule, in plain words: the chosen model is trusted as long as no other
// model that fits the data about as well predicts a place significantly
// different from it. A competitor is any other fitted model whose χ²/dof is
// within three standard deviations of the chosen model's,
//
//	χ²/dof ≤ r·(1 + 3·√(2/dof)),   r = max(1, χ²/dof of the chosen model)
//
// (the χ² of dof degrees of freedom has mean dof and variance 2·dof), so that
// a model the data reject, such as a straight line through a curved track,
// is no competitor. Beyond the arc's ends the geocentric predictions drift
// apart; at each distance the difference Δ (RA·cos δ, Dec) between a
// competitor's prediction and the chosen one's is tested with
//
//	Δᵀ V⁻¹ Δ > HorizonChi2 (11.83, the 3-σ equivalent for 2 dof)
//
// where V is the covariance of the difference: V_comp − V_chosen when the
// competitor contains the chosen model (a polynomial of higher degree, or
// the piecewise model against poly1) and that matrix is positive definite —
// for nested linear least-squares fits of the same data the difference of an
// efficient and a consistent estimate has exactly that covariance when the
// chosen model is right — and V_comp + V_chosen (the two treated as
// independent, a conservative test) otherwise. The horizon is the first
// distance at which any competitor fails the test. The search steps through
// log-spaced distances from 0.01 to HorizonMaxArcs (10) arc lengths beyond
// each end and refines the first failure by bisection; a horizon not reached
// gives HorizonMaxArcs arc lengths (a lower bound, "at least"). When there is
// no competitor at all the horizon is one arc length, the rule of thumb that
// a sky-plane polynomial is not to be extrapolated beyond about its own arc
// (common practice, not derived from these data).
//
// Why not compare the spread with the chosen model's own ellipse alone: a
// more flexible competitor scatters by its own, larger σ at the arc's end,
// so that rule puts the horizon at the arc's edge for almost any track
// (measured on invented straight-line tracks of 4.15 d: 0.03–0.4 d).
// Because every σ here scales with the noise, a noisier track does not by
// itself give a shorter horizon — its ellipse grows instead; what shortens
// the horizon is structure that competing acceptable models extrapolate
// differently (curvature seen as a kink, a kink seen as curvature).
//
// Reference: Hausman, J. A., "Specification tests in econometrics",
// Econometrica 46 (1978), 1251–1271, Lemma 2.1 (the covariance of the
// difference of an efficient and a consistent estimator); Draper, D.,
// "Assessment and propagation of model uncertainty", J. R. Stat. Soc. B 57
// (1995), 45–97 (competing models' predictions as a measure of model
// uncertainty); the χ² mean and variance, a textbook fact (from memory).
func Horizon(c *Comparison) (days float64) { return horizon(c).days }

// horizon computes the horizons of both ends; see [Horizon].
func horizon(c *Comparison) horizonResult {
	nan := horizonResult{days: math.NaN(), before: math.NaN(), after: math.NaN()}
	if c == nil || c.Solution == nil {
		nan.rule = "no chosen model"
		return nan
	}
	ch := c.Solution
	tr := ch.Track
	first, last := tr.ArcTT()
	arc := last - first
	if !(arc > 0) {
		nan.rule = "the arc has no length"
		return nan
	}
	r := math.Max(1, ch.Chi2DoF)
	var comp []*Solution
	var nested []bool
	var names []string
	for _, row := range c.Rows {
		s := row.Solution
		if s == nil || s == ch || s.DoF <= 0 {
			continue
		}
		if s.Chi2DoF <= r*(1+3*math.Sqrt(2/float64(s.DoF))) {
			comp = append(comp, s)
			nested = append(nested, contains(s.Model, ch.Model))
			names = append(names, row.Model)
		}
	}
	if len(comp) == 0 {
		return horizonResult{days: arc, before: arc, after: arc,
			rule: fmt.Sprintf("no other model fits the data as well as %s; horizon set to one arc length (%.3g d), a rule of thumb", ch.Model.Name(), arc)}
	}
	// excess returns the largest test statistic of the competitors minus
	// HorizonChi2 at distance d beyond an end (dir +1 after the last, −1
	// before the first observation).
	excess := func(d float64, dir int) (float64, error) {
		t := last + d
		if dir < 0 {
			t = first - d
		}
		utc, err := astro.TTToUTC(tr.EpochTT.AddDays(t))
		if err != nil && utc == (astro.JD{}) {
			return 0, err
		}
		p0, err := ch.Predict(utc, nil)
		if err != nil {
			return 0, err
		}
		worst := math.Inf(-1)
		for i, s := range comp {
			p, err := s.Predict(utc, nil)
			if err != nil {
				return 0, err
			}
			worst = math.Max(worst, divergenceChi2(p0, p, nested[i]))
		}
		return worst - HorizonChi2, nil
	}
	side := func(dir int) (float64, bool, error) {
		prev := 0.0
		for j := 0; j < horizonGrid; j++ {
			d := arc * horizonMinArcs * math.Pow(HorizonMaxArcs/horizonMinArcs, float64(j)/float64(horizonGrid-1))
			e, err := excess(d, dir)
			if err != nil {
				return math.NaN(), false, err
			}
			if e > 0 {
				lo, hi := prev, d
				for k := 0; k < 40 && hi-lo > 1e-4*arc; k++ {
					mid := 0.5 * (lo + hi)
					em, err := excess(mid, dir)
					if err != nil {
						return math.NaN(), false, err
					}
					if em > 0 {
						hi = mid
					} else {
						lo = mid
					}
				}
				return 0.5 * (lo + hi), true, nil
			}
			prev = d
		}
		return HorizonMaxArcs * arc, false, nil
	}
	after, hitA, errA := side(+1)
	before, hitB, errB := side(-1)
	if errA != nil || errB != nil {
		err := errA
		if err == nil {
			err = errB
		}
		nan.rule = "horizon not found: " + err.Error()
		return nan
	}
	res := horizonResult{before: before, after: after, days: math.Min(before, after)}
	bound := func(hit bool) string {
		if hit {
			return ""
		}
		return "at least "
	}
	res.rule = fmt.Sprintf("%s agrees with %v within 3σ out to %s%.3g d after and %s%.3g d before the arc (%.3g d long)",
		ch.Model.Name(), names, bound(hitA), after, bound(hitB), before, arc)
	return res
}

// contains reports whether model big contains model small as a special case
// (nested linear models): a polynomial of higher degree contains one of lower
// degree, and any piecewise-linear model contains the straight line.
func contains(big, small Model) bool {
	if small.Kind != KindPoly {
		return false
	}
	if big.Kind == KindPoly {
		return big.Degree > small.Degree
	}
	return small.Degree == 1
}

// divergenceChi2 returns Δᵀ V⁻¹ Δ for the difference Δ of prediction p from
// p0 (RA·cos δ and Dec, arcsec, at p0's place) with V = C − C0 when nested
// and that is positive definite, else V = C + C0 (see [Horizon]).
func divergenceChi2(p0, p Prediction, nested bool) float64 {
	cd := math.Cos(float64(p0.Dec))
	de := float64((p.RA - p0.RA).Wrapped()) * cd / float64(astro.Arcsecond)
	dn := float64(p.Dec-p0.Dec) / float64(astro.Arcsecond)
	var v [2][2]float64
	sign := 1.0
	if nested {
		sign = -1
	}
	for i := 0; i < 2; i++ {
		for j := 0; j < 2; j++ {
			v[i][j] = p.CovArcsec2[i][j] + sign*p0.CovArcsec2[i][j]
		}
	}
	det := v[0][0]*v[1][1] - v[0][1]*v[1][0]
	if nested && !(v[0][0] > 0 && det > 0) {
		return divergenceChi2(p0, p, false)
	}
	if !(det > 0) {
		return 0
	}
	return (v[1][1]*de*de - 2*v[0][1]*de*dn + v[0][0]*dn*dn) / det
}
