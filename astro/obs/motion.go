package obs

import (
	"fmt"
	"math"

	"arcfit/astro"
)

// motionSigmas is how many combined standard deviations two positions must
// lie apart for [Set.CheckMotion] to call the motion detected: the usual 3σ
// detection threshold (common practice).
const motionSigmas = 3.0

// CheckMotion reports whether the used observations show motion above their
// noise. It returns nil when some two positions lie more than 3σ apart, σ
// being the two positions' uncertainties (the larger coordinate σ of each)
// added in quadrature; otherwise an error wrapping [ErrNoMotion] (also for
// fewer than two used observations). The search is the two-pass farthest-
// point scan — the row farthest from the first, then the row farthest from
// that — which finds at least half the largest separation and stops at the
// first pair that shows motion.
//
// A track with no detectable motion gives a meaningless prediction; fitting
// commands should refuse it (design.md, "Input formats").
func (s *Set) CheckMotion() error {
	first := -1
	n := 0
	for i := range s.Obs {
		if s.Obs[i].Used {
			if first < 0 {
				first = i
			}
			n++
		}
	}
	if n < 2 {
		return fmt.Errorf("obs: %s: %w: %d usable observation(s), at least two are needed", s.File, ErrNoMotion, n)
	}
	ref := first
	for pass := 0; pass < 2; pass++ {
		far, farSep := ref, -1.0
		for i := range s.Obs {
			o := &s.Obs[i]
			if !o.Used || i == ref {
				continue
			}
			sep := float64(astro.Separation(s.Obs[ref].RA, s.Obs[ref].Dec, o.RA, o.Dec))
			if sep > motionSigmas*math.Hypot(sigmaOf(&s.Obs[ref]), sigmaOf(o)) {
				return nil
			}
			if sep > farSep {
				far, farSep = i, sep
			}
		}
		ref = far
	}
	return fmt.Errorf("obs: %s: %w: all %d positions coincide within %g σ of their uncertainties", s.File, ErrNoMotion, n, motionSigmas)
}

// sigmaOf returns the larger of an observation's two coordinate σ, radians.
func sigmaOf(o *Observation) float64 {
	return math.Max(float64(o.SigmaRA), float64(o.SigmaDec))
}
