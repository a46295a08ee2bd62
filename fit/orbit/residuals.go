package orbit

import (
	"math"

	"arcfit/astro"
)

// Whitened returns the observation's residual (dE, dN) (radians, see
// [Residual]) whitened by the Cholesky factor of its 2×2 covariance
// [[σE², ρσEσN], [ρσEσN, σN²]]: w1 = dE/σE, w2 = (dN − ρσN·w1)/(σN√(1−ρ²)),
// so that w1² + w2² is the observation's χ² contribution.
func (o *Observation) Whitened(dE, dN float64) (w1, w2 float64) {
	w1 = dE / o.SigmaRA
	w2 = (dN - o.Corr*o.SigmaDec*w1) / (o.SigmaDec * math.Sqrt(1-o.Corr*o.Corr))
	return w1, w2
}

// Residuals appends to dst the whitened residuals (two per used observation,
// in order, see [Observation.Whitened]) of the orbit s against obs and
// returns the extended slice and their sum of squares χ².
//
// A State with a Motion is propagated once to every used observation's
// instant ([State.Propagate]) and each place taken from there
// ([Path.Observe]); a two-body State propagates from its epoch for each.
//
// Errors: those of [State.Observe] (a propagation that fails, a light time
// that does not converge).
func (s State) Residuals(obs []Observation, dst []float64) ([]float64, float64, error) {
	path, idx, err := s.usedPath(obs, false)
	if err != nil {
		return dst, math.Inf(1), err
	}
	chi2 := 0.0
	for i := range obs {
		o := &obs[i]
		if !o.Used {
			continue
		}
		seen, err := path.Observe(idx[i], o.Geo)
		if err != nil {
			return dst, math.Inf(1), err
		}
		dE, dN := Residual(o.RA, o.Dec, seen.Dir)
		w1, w2 := o.Whitened(dE, dN)
		chi2 += w1*w1 + w2*w2
		dst = append(dst, w1, w2)
	}
	return dst, chi2, nil
}

// usedPath propagates s once to the instants of the used observations of obs
// (all of them when all is true) and returns the path with, for each
// observation, its anchor's index (−1 for one left out).
func (s State) usedPath(obs []Observation, all bool) (*Path, []int, error) {
	idx := make([]int, len(obs))
	ts := make([]astro.JD, 0, len(obs))
	for i := range obs {
		idx[i] = -1
		if obs[i].Used || all {
			idx[i] = len(ts)
			ts = append(ts, obs[i].Geo.TDB)
		}
	}
	p, err := s.Propagate(ts, false)
	return p, idx, err
}
