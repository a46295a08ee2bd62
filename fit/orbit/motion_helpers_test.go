package orbit

import (
	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/ephem/nbody"

	"gonum.org/v1/gonum/spatial/r3"
)

// tbMotion is a Motion that moves a state by two-body motion
// (ephem.PropagateUniversal) with the state transition matrix by central
// differences of the same propagation (steps 1e-6 of |r| and |v|, the fit's
// fdSteps): dynamics whose answers the two-body path already gives, to test
// the batch path of a Motion (one propagation to all the instants, the light
// time by a step from there, the partials through the STM) against it.
//
// The STM's error: central differences of a propagation whose rounding is
// ~1e-15 relative (PropagateUniversal's round trip returns to 1e-13 au over
// thousands of days) with steps of 1e-6 relative err by ~1e-9 relative
// (rounding over the step) and ~1e-12 (truncation, (h/L)² with L ≳ 1 au).
type tbMotion struct{}

func (tbMotion) Name() string { return "twobody-test" }

func (tbMotion) Propagate(epoch astro.JD, x [6]float64, ts []astro.JD, stm bool) (*nbody.Result, error) {
	prop := func(x [6]float64, t astro.JD) ([6]float64, error) {
		dt := (t.Day - epoch.Day) + (t.Frac - epoch.Frac)
		p, v, err := ephem.PropagateUniversal(r3.Vec{X: x[0], Y: x[1], Z: x[2]}, r3.Vec{X: x[3], Y: x[4], Z: x[5]}, dt, ephem.GMSun)
		return [6]float64{p.X, p.Y, p.Z, v.X, v.Y, v.Z}, err
	}
	res := &nbody.Result{States: make([][6]float64, len(ts))}
	if stm {
		res.STM = make([][36]float64, len(ts))
	}
	h := fdSteps(x)
	for i, t := range ts {
		s, err := prop(x, t)
		if err != nil {
			return nil, err
		}
		res.States[i] = s
		if !stm {
			continue
		}
		for j := range 6 {
			xp, xm := x, x
			xp[j] += h[j]
			xm[j] -= h[j]
			sp, err := prop(xp, t)
			if err != nil {
				return nil, err
			}
			sm, err := prop(xm, t)
			if err != nil {
				return nil, err
			}
			for k := range 6 {
				res.STM[i][k*6+j] = (sp[k] - sm[k]) / (2 * h[j])
			}
		}
	}
	return res, nil
}
