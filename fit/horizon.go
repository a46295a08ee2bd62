package fit

import (
	"fmt"
	"math"

	"arcfit/astro"
)

// Parameters of the horizon search (see [Horizon]).
const (
	// HorizonSigma is the σ level of the chosen model's ellipse that the
	// competing models' spread is measured against, independent of the
	// --sigma asked for the printed ellipse.
	HorizonSigma = 3.0
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
// The rule, in plain words: the chosen model is trusted as long as the other
// models that fit the data about as well still predict positions inside its
// own 3-σ ellipse. Beyond the arc's end the models' predictions drift apart;
// the horizon is the first extrapolation distance at which the largest
// separation between the chosen model's geocentric prediction and a
// competitor's exceeds the semi-major axis of the chosen model's HorizonSigma
// (3) ellipse at that time. A competitor is any other fitted model whose
// χ²/dof is within three standard deviations of the chosen model's, i.e.
//
//	χ²/dof ≤ r·(1 + 3·√(2/dof)),   r = max(1, χ²/dof of the chosen model)
//
// (the χ² of dof degrees of freedom has mean dof and variance 2·dof); a model
// the data reject, such as a straight line through a curved track, is no
// competitor. The search steps through log-spaced distances from 0.01 to
// HorizonMaxArcs (10) arc lengths beyond each end and refines the first
// crossing by bisection. A crossing not reached gives HorizonMaxArcs arc
// lengths (a lower bound); when there is no competitor at all the horizon is
// one arc length, the common-practice rule of thumb that a sky-plane
// polynomial is not to be extrapolated beyond about its own arc (common
// practice, not derived from these data).
//
// Because the spread is compared with the model's own σ, a noisier track
// does not by itself give a shorter horizon: its ellipse grows with the
// noise in step with the competitors' scatter. What shortens the horizon is
// motion the chosen model leaves out that another model sees (curvature, a
// kink) or a competitor whose extra terms, at the size the data allow, grow
// faster than the chosen model's ellipse.
//
// Reference: the comparison of competing models' extrapolations with the
// prediction's own uncertainty is the model-uncertainty check of Draper, D.,
// "Assessment and propagation of model uncertainty", J. R. Stat. Soc. B 57
// (1995), 45–97, §2; the χ² mean and variance, Press et al., Numerical
// Recipes, 3rd ed. (2007), §6.14.8 (from memory of the section number).
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
	var names []string
	for _, row := range c.Rows {
		s := row.Solution
		if s == nil || s == ch || s.DoF <= 0 {
			continue
		}
		if s.Chi2DoF <= r*(1+3*math.Sqrt(2/float64(s.DoF))) {
			comp = append(comp, s)
			names = append(names, row.Model)
		}
	}
	if len(comp) == 0 {
		return horizonResult{days: arc, before: arc, after: arc,
			rule: fmt.Sprintf("no other model fits the data as well as %s; horizon set to one arc length (%.3g d), a rule of thumb", ch.Model.Name(), arc)}
	}
	// excess returns spread − semi-major axis at distance d beyond an end
	// (dir +1 after the last, −1 before the first observation).
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
		semi := p0.Ellipse(HorizonSigma).SemiMajorArcsec
		spread := 0.0
		for _, s := range comp {
			p, err := s.Predict(utc, nil)
			if err != nil {
				return 0, err
			}
			sep := float64(astro.Separation(p0.RA, p0.Dec, p.RA, p.Dec)) / float64(astro.Arcsecond)
			spread = math.Max(spread, sep)
		}
		return spread - semi, nil
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
	res.rule = fmt.Sprintf("%s's %g-σ ellipse holds the predictions of %v out to %s%.3g d after and %s%.3g d before the arc (%.3g d long)",
		ch.Model.Name(), HorizonSigma, names, bound(hitA), after, bound(hitB), before, arc)
	return res
}
