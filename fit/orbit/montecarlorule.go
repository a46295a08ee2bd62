package orbit

import (
	"fmt"
	"math"

	"arcfit/astro"
)

// The thresholds of the sampling rule ([ChooseSampling], [CompareLinear]).
const (
	// RuleMinNights: arcs of fewer nights are sampled by ranging. With one
	// or two nights the distance is known only within a long, curved region
	// (the admissible region of Milani et al. 2004) that no covariance
	// describes.
	RuleMinNights = 3
	// RuleExtrapolation: a prediction farther from the arc than this many
	// times the arc's length is sampled from the covariance (the linear
	// propagation of an orbit's covariance degrades as the extrapolation
	// grows; common practice).
	RuleExtrapolation = 1.0
	// RuleSizeChange and RuleCentreSigmas: a sampled region whose 1σ
	// semi-axes differ from the linear ones by more than 20 %, or whose
	// centre lies more than 0.5σ (of the linear covariance) from the
	// linear place, shows the linear answer to be wrong.
	RuleSizeChange   = 0.2
	RuleCentreSigmas = 0.5
)

// SamplingChoice is the outcome of the sampling rule.
type SamplingChoice struct {
	// Method is [SamplingLinear], [SamplingCovariance] or [SamplingRanging].
	Method string
	// Reason says why, in plain words.
	Reason string
}

// ChooseSampling states when to sample orbits instead of trusting the linear
// propagation of the covariance, for a prediction at the UTC instant at from
// the used observations obs:
//
//   - fewer than [RuleMinNights] nights (a gap of more than 7.2 h starts a
//     new one), or no usable covariance (haveCov false): [SamplingRanging];
//   - else, a prediction more than [RuleExtrapolation] × the arc's length
//     before its start or after its end: [SamplingCovariance];
//   - else [SamplingLinear] — to be confirmed by [CompareLinear] when a
//     sampled region is at hand.
func ChooseSampling(obs []Observation, at astro.JD, haveCov bool) SamplingChoice {
	first, last := math.Inf(1), math.Inf(-1)
	var times []float64
	for i := range obs {
		if !obs[i].Used {
			continue
		}
		t := obs[i].Geo.UTC.Float()
		if !rgFiniteF(t) {
			continue
		}
		times = append(times, t)
		first, last = math.Min(first, t), math.Max(last, t)
	}
	nights := rgCountNights(times)
	if nights < RuleMinNights {
		return SamplingChoice{Method: SamplingRanging,
			Reason: fmt.Sprintf("an arc of %d night(s): the distance is not determined well enough for a covariance to describe the orbits", nights)}
	}
	if !haveCov {
		return SamplingChoice{Method: SamplingRanging, Reason: "no usable covariance of the orbit"}
	}
	arc := last - first
	t := at.Float()
	gap := math.Max(first-t, t-last)
	if gap > RuleExtrapolation*arc {
		return SamplingChoice{Method: SamplingCovariance,
			Reason: fmt.Sprintf("a prediction %.1f d from an arc of %.1f d: beyond %g× the arc the linear propagation is not trusted", gap, arc, RuleExtrapolation)}
	}
	return SamplingChoice{Method: SamplingLinear,
		Reason: fmt.Sprintf("%d nights and a prediction within %g× the arc of %.1f d", nights, RuleExtrapolation, arc)}
}

// rgCountNights counts the groups of times (days) separated by gaps of more
// than 7.2 h.
func rgCountNights(times []float64) int {
	if len(times) == 0 {
		return 0
	}
	ts := append([]float64(nil), times...)
	for i := 1; i < len(ts); i++ { // insertion sort: arcs are short lists
		for j := i; j > 0 && ts[j] < ts[j-1]; j-- {
			ts[j], ts[j-1] = ts[j-1], ts[j]
		}
	}
	n := 1
	for i := 1; i < len(ts); i++ {
		if ts[i]-ts[i-1] > rgNightGapDays {
			n++
		}
	}
	return n
}

// CompareLinear reports whether a sampled region r disagrees with the linear
// prediction at (ra, dec) with sky covariance covArcsec2 (RA·cos δ, Dec;
// arcsec²): a 1σ semi-axis changed by more than [RuleSizeChange] (relative
// to the linear one), or the sampled centre more than [RuleCentreSigmas]
// from the linear place in the linear covariance's metric. When it does,
// the sampled region is the one to report; reason says what differs.
func CompareLinear(ra, dec astro.Angle, covArcsec2 [2][2]float64, r *SampledRegion) (differ bool, reason string) {
	linA, linB, _ := smpAxes(covArcsec2, 1)
	mcA, mcB, _ := smpAxes(r.CovArcsec2, 1)
	if !(linA > 0) {
		return true, "the linear covariance is degenerate"
	}
	var why []string
	if d := mcA/linA - 1; math.Abs(d) > RuleSizeChange {
		why = append(why, fmt.Sprintf("semi-major axis %+.0f%%", 100*d))
	}
	if linB > 0 {
		if d := mcB/linB - 1; math.Abs(d) > RuleSizeChange {
			why = append(why, fmt.Sprintf("semi-minor axis %+.0f%%", 100*d))
		}
	}
	x, y := Residual(r.RA, r.Dec, astro.UnitVector(ra, dec))
	as := float64(astro.Arcsecond)
	x, y = x/as, y/as
	a, b, c := covArcsec2[0][0], covArcsec2[0][1], covArcsec2[1][1]
	det := a*c - b*b
	m := math.Inf(1)
	if det > 0 {
		m = math.Sqrt((c*x*x - 2*b*x*y + a*y*y) / det)
	}
	if m > RuleCentreSigmas {
		why = append(why, fmt.Sprintf("centre %.2gσ from the linear place", m))
	}
	if len(why) == 0 {
		return false, "the sampled region agrees with the linear one"
	}
	reason = "the sampled region differs from the linear one:"
	for k, w := range why {
		if k > 0 {
			reason += ","
		}
		reason += " " + w
	}
	return true, reason
}
