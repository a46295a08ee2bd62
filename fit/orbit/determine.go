package orbit

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"
)

// SolutionMaxEccentricity is the largest eccentricity of a corrected orbit
// Determine keeps: larger than the starts' limit [StartMaxEccentricity],
// because a weakly determined arc (a comet seen on two nights) can fit best
// with a strongly hyperbolic orbit that is consistent with the data, and
// its covariance, not a cut, should say how little is known. The speed limit
// of the correction (a hyperbolic excess below 100 km/s) still applies; an
// interstellar visitor's e ≈ 3.4 (from memory) lies inside both.
const SolutionMaxEccentricity = 10.0

// Determine finds the orbit of the used observations: initial orbits from
// Gauss's method ([GaussStarts]), each differentially corrected ([Correct]);
// when Gauss's method gives no start, or none of its starts converges to an
// admissible orbit, the starts of the search over the topocentric distance
// ([RangingStarts]) are corrected instead.
//
// Of the converged solutions, those with e below [SolutionMaxEccentricity]
// are admissible; among them the one with the most used observations (the
// outlier rejection may flag different ones for different orbits), then the
// lowest χ², is kept. Its Start is the method of its starting orbit; Notes
// say how many starts were tried and converged and carry the start's notes.
//
// Errors: when no start is found, an error wrapping the errors of both
// methods (*[DegenerateError], *[RangingError]); when starts were found but
// none converged to an admissible orbit, the *[CorrectError] of the first
// (best) start, its Reason saying how many were tried.
//
// With a Motion in opt (the perturbed motion, [NBody]), a two-body orbit is
// determined first as above and then corrected with the Motion from its
// state ([Correct], the observations' Used flags as given, so that the
// outlier rule starts afresh): on an arc of up to 60 days the two-body orbit
// of the whole arc, whose solution lies within the basin of the perturbed
// one; on a longer arc that of its middle month, extended by doublings
// ([extendArc]), each solution starting the next correction. Each way is
// the fallback of the other. Start is the method of the two-body start;
// the first note says how the perturbed correction followed.
func Determine(obs []Observation, opt Options) (*Solution, error) {
	if _, err := opt.resolved(); err != nil {
		return nil, err
	}
	if opt.Motion != nil {
		return determineMotion(obs, opt)
	}
	gs, gErr := GaussStarts(obs)
	best, tried, firstErr := correctStarts(obs, gs, opt)
	var rErr error
	if best == nil {
		var rs []Start
		rs, rErr = RangingStarts(obs)
		var n int
		var e2 error
		best, n, e2 = correctStarts(obs, rs, opt)
		tried += n
		if firstErr == nil {
			firstErr = e2
		}
	}
	if best != nil {
		return best, nil
	}
	if tried == 0 {
		return nil, fmt.Errorf("orbit: no starting orbit: %w; %w", unprefixed(gErr), unprefixed(rErr))
	}
	var ce *CorrectError
	if errors.As(firstErr, &ce) {
		c := *ce
		c.Reason = fmt.Sprintf("none of %d starting orbit(s) gave an admissible orbit; the first: %s", tried, ce.Reason)
		return nil, &c
	}
	return nil, firstErr
}

// determineMotion is [Determine] with opt.Motion. An arc of up to
// 2·arcFirstDays: the two-body orbit of the whole arc corrected with the
// Motion ([viaTwoBody]), failing that the arc extended from its middle
// ([extendArc]); a longer arc the other way round.
func determineMotion(obs []Observation, opt Options) (*Solution, error) {
	first, last := math.Inf(1), math.Inf(-1)
	for i := range obs {
		if obs[i].Used {
			t := obs[i].Geo.TDB.Float()
			first, last = math.Min(first, t), math.Max(last, t)
		}
	}
	if last-first > 2*arcFirstDays {
		sol, errX := extendArc(obs, opt)
		if errX == nil {
			return sol, nil
		}
		sol, err := viaTwoBody(obs, opt)
		if err == nil {
			return sol, nil
		}
		return nil, errX
	}
	sol, err := viaTwoBody(obs, opt)
	if err == nil {
		return sol, nil
	}
	sol, errX := extendArc(obs, opt)
	if errX == nil {
		return sol, nil
	}
	return nil, err
}

// viaTwoBody determines the two-body orbit of the whole arc ([Determine]
// with no Motion) and corrects it with opt.Motion ([Correct], the
// observations' Used flags as given).
func viaTwoBody(obs []Observation, opt Options) (*Solution, error) {
	m := opt.Motion
	two := opt
	two.Motion = nil
	sol2, err := Determine(obs, two)
	if err != nil {
		return nil, err
	}
	st := sol2.State
	st.Motion = m
	sol, err := Correct(obs, st, opt)
	if err != nil {
		return nil, err
	}
	if el, eErr := sol.State.Elements(); eErr != nil || !(el.E < SolutionMaxEccentricity) {
		return nil, &CorrectError{Reason: fmt.Sprintf("the %s correction ended on an inadmissible orbit", m.Name()),
			Hint: "a longer arc or more nights would help", Err: ErrNotConverged}
	}
	sol.Start = sol2.Start
	sol.Notes = append([]string{fmt.Sprintf("%s: the two-body orbit (from a %s start, χ²/dof %.3g) corrected with the %s dynamics (χ²/dof %.3g)",
		m.Name(), sol2.Start, sol2.Chi2DoF, m.Name(), sol.Chi2DoF)}, sol.Notes...)
	return sol, nil
}

// Arc extension of [extendArc]: the first sub-arc spans arcFirstDays about
// the middle of the arc (at least arcMinObs observations on arcMinNights
// nights), each next one arcGrowth times as long.
const (
	arcFirstDays = 30
	arcGrowth    = 2
	arcMinObs    = 6
	arcMinNights = 3
)

// errArcTooShort: the arc is no longer than its first sub-arc, so extending
// it adds nothing.
var errArcTooShort = errors.New("orbit: the arc is too short to extend")

// extendArc determines the orbit of a long arc by extending it: the
// two-body orbit ([Determine]) of the observations within 15 days of the
// arc's middle (widened until it holds 6 observations on 3 nights), then
// corrected with opt.Motion ([Correct]) on sub-arcs twice as long each time,
// centred on the same instant, until the whole arc is in. Over a month the
// planets move an orbit by far less than the two-body fit's basin; each
// doubling starts within the basin of the next solution. Gauss's method on
// three observations months apart, or the two-body orbit of a whole year,
// can miss that basin (a near-Earth object's path over a year is far from a
// conic seen from the Earth).
// Extending the arc by steps, each solution starting the next correction,
// is common practice in orbit determination.
func extendArc(obs []Observation, opt Options) (*Solution, error) {
	var ts []float64
	for i := range obs {
		if obs[i].Used {
			ts = append(ts, obs[i].Geo.TDB.Float())
		}
	}
	if len(ts) < arcMinObs {
		return nil, errArcTooShort
	}
	sort.Float64s(ts)
	first, last := ts[0], ts[len(ts)-1]
	mid := ts[len(ts)/2]
	within := func(half float64) ([]Observation, int, int) {
		sub := make([]Observation, len(obs))
		copy(sub, obs)
		var times []float64
		for i := range sub {
			if !sub[i].Used {
				continue
			}
			if math.Abs(sub[i].Geo.TDB.Float()-mid) > half {
				sub[i].Used = false
				continue
			}
			times = append(times, sub[i].Geo.TDB.Float())
		}
		return sub, len(times), rgCountNights(times)
	}
	half := arcFirstDays / 2.0
	full := math.Max(mid-first, last-mid)
	sub, n, nights := within(half)
	for (n < arcMinObs || nights < arcMinNights) && half < full {
		half *= arcGrowth
		sub, n, nights = within(half)
	}
	if half >= full {
		return nil, errArcTooShort
	}
	two := opt
	two.Motion = nil
	sol, err := Determine(sub, two)
	if err != nil {
		return nil, err
	}
	start := sol.Start
	steps := []string{fmt.Sprintf("%.0f d", 2*half)}
	st := sol.State
	st.Motion = opt.Motion
	for half < full {
		half *= arcGrowth
		if half >= full {
			sub = obs
		} else {
			sub, _, _ = within(half)
		}
		sol, err = Correct(sub, st, opt)
		if err != nil {
			return nil, err
		}
		st = sol.State
		steps = append(steps, fmt.Sprintf("%.0f d", math.Min(2*half, last-first)))
	}
	if el, eErr := sol.State.Elements(); eErr != nil || !(el.E < SolutionMaxEccentricity) {
		return nil, &CorrectError{Reason: fmt.Sprintf("the %s correction of the extended arc ended on an inadmissible orbit", opt.Motion.Name()),
			Hint: "a check of the observations", Err: ErrNotConverged}
	}
	sol.Start = start
	sol.Notes = append([]string{fmt.Sprintf("%s: the two-body orbit of the middle of the arc (from a %s start) corrected with the %s dynamics on arcs of %s",
		opt.Motion.Name(), start, opt.Motion.Name(), strings.Join(steps, ", "))}, sol.Notes...)
	return sol, nil
}

// correctStarts corrects each start and returns the best admissible
// solution (nil when none), the number of starts tried and the first error.
func correctStarts(obs []Observation, starts []Start, opt Options) (*Solution, int, error) {
	var best *Solution
	var firstErr error
	converged := 0
	for _, st := range starts {
		sol, err := Correct(obs, st.State, opt)
		if err == nil {
			if el, eErr := sol.State.Elements(); eErr != nil || !(el.E < SolutionMaxEccentricity) {
				e := fmt.Sprintf("%.3g", el.E)
				if eErr != nil {
					e = eErr.Error()
				}
				err = &CorrectError{Reason: fmt.Sprintf("the correction from the %s start ended on an inadmissible orbit (e = %s)", st.Method, e),
					Hint: "a longer arc or more nights would help", Err: ErrNotConverged}
			}
		}
		if err != nil {
			if firstErr == nil {
				firstErr = err
			}
			continue
		}
		converged++
		sol.Start = st.Method
		for _, n := range st.Notes {
			sol.Notes = append(sol.Notes, "start: "+n)
		}
		if best == nil || sol.NumUsed > best.NumUsed || (sol.NumUsed == best.NumUsed && sol.Chi2 < best.Chi2) {
			best = sol
		}
	}
	if best != nil {
		best.Notes = append([]string{fmt.Sprintf("orbit from a %s start: %d start(s) tried, %d converged to an admissible orbit; the best kept",
			best.Start, len(starts), converged)}, best.Notes...)
	}
	return best, len(starts), firstErr
}

// unprefixed returns err with its message stripped of a leading "orbit: ",
// for joining two package errors into one line; nil stays a plain note.
func unprefixed(err error) error {
	if err == nil {
		return errors.New("no start and no reason given")
	}
	return prefixStripped{err}
}

// prefixStripped wraps an error, printing it without the package prefix.
type prefixStripped struct{ err error }

func (p prefixStripped) Error() string { return strings.TrimPrefix(p.err.Error(), "orbit: ") }
func (p prefixStripped) Unwrap() error { return p.err }
