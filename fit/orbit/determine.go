package orbit

import (
	"errors"
	"fmt"
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
func Determine(obs []Observation, opt Options) (*Solution, error) {
	if _, err := opt.resolved(); err != nil {
		return nil, err
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
