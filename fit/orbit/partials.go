package orbit

import (
	"fmt"
	"math"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/mat"
)

// fdRelStep is the relative step of the central differences: the step in a
// position component is fdRelStep·|r|, in a velocity component fdRelStep·|v|.
//
// The choice: a central difference has a truncation error of order
// (h/L)²·|∂r/∂x| (L the length over which the residuals curve, ≳ 0.01 au even
// at a close approach; ≳ 1 au usually) and a rounding error of order
// ε_r/h (ε_r ≈ 1e-15 rad·Δ, the rounding of a computed direction). With
// h = 1e-6·|r| ≈ 2.5e-6 au the first is about 1e-12 relative at L = 1 au
// (6e-8 at 0.01 au), the second about 4e-10 relative: near the optimum
// h ≈ ε^(1/3)·scale of Press et al., Numerical Recipes, 3rd ed. (2007), §5.7,
// and far below what the fit needs (the Jacobian only steers the iteration
// and shapes the covariance; 1e-6 relative in it is 1e-6 relative in σ).
const fdRelStep = 1e-6

// fdSteps returns the central-difference steps for the parameter vector x,
// each made exactly representable as (x + h) − x (Press et al. 2007, §5.7).
func fdSteps(x [6]float64) [6]float64 {
	rs := math.Sqrt(x[0]*x[0] + x[1]*x[1] + x[2]*x[2])
	vs := math.Sqrt(x[3]*x[3] + x[4]*x[4] + x[5]*x[5])
	if !(vs > 0) && rs > 0 {
		vs = math.Sqrt(ephem.GMSun / rs) // circular speed: the scale of a velocity
	}
	var h [6]float64
	for k := range h {
		s := rs
		if k >= 3 {
			s = vs
		}
		step := fdRelStep * s
		t := x[k] + step
		h[k] = t - x[k]
	}
	return h
}

// jacobianFD forms the whitened Jacobian ∂r/∂x at x by central differences
// (steps [fdSteps]; one-sided where one side leaves the admissible region)
// and stores it in c.jac with its columns scaled to unit
// length; it returns the column norms d (J = c.jac · diag(d)). A zero column
// (a parameter the observations do not see) keeps d = 1.
func (c *corrector) jacobianFD(x [6]float64) ([6]float64, error) {
	h := fdSteps(x)
	m := len(c.r)
	if c.jac == nil || c.jac.RawMatrix().Rows != m {
		c.jac = mat.NewDense(m, 6, nil)
	}
	var d [6]float64
	for k := 0; k < 6; k++ {
		if !(h[k] > 0) {
			return d, fmt.Errorf("orbit: zero finite-difference step for parameter %d", k)
		}
		xp, xm := x, x
		xp[k] += h[k]
		xm[k] -= h[k]
		// A side that cannot be evaluated (the orbit leaves the admissible
		// region there) falls back to a one-sided difference from x.
		var errP, errM error
		c.rp, _, errP = c.residuals(xp, c.rp)
		c.rm, _, errM = c.residuals(xm, c.rm)
		lo, hi, span := c.rm, c.rp, 2*h[k]
		switch {
		case errP != nil && errM != nil:
			return d, errP
		case errP != nil:
			hi, span = c.r, h[k]
		case errM != nil:
			lo, span = c.r, h[k]
		}
		if len(lo) != m || len(hi) != m {
			return d, fmt.Errorf("orbit: residual count changed during differencing")
		}
		norm := 0.0
		for i := 0; i < m; i++ {
			g := (hi[i] - lo[i]) / span
			c.jac.Set(i, k, g)
			norm += g * g
		}
		norm = math.Sqrt(norm)
		if norm == 0 || math.IsNaN(norm) || math.IsInf(norm, 0) {
			if math.IsNaN(norm) || math.IsInf(norm, 0) {
				return d, fmt.Errorf("orbit: partial derivative %d not finite", k)
			}
			norm = 1
		}
		d[k] = norm
		for i := 0; i < m; i++ {
			c.jac.Set(i, k, c.jac.At(i, k)/norm)
		}
	}
	return d, nil
}

// jacobian forms the whitened, column-scaled Jacobian at x: by central
// differences for two-body motion ([corrector.jacobianFD]), from the state
// transition matrix for a Motion ([corrector.jacobianSTM]).
func (c *corrector) jacobian(x [6]float64) ([6]float64, error) {
	if c.motion == nil {
		return c.jacobianFD(x)
	}
	return c.jacobianSTM(x)
}

// jacobianSTM forms the whitened Jacobian ∂r/∂x at x from one integration of
// the orbit with its variational equations to every used observation: each
// observation's rows are the partials of its residual on the tangent plane
// with respect to the computed direction ([residualPartials]) times those of
// the direction with respect to the state at the epoch through the light
// time and the state transition matrix ([Path.observePartials]), whitened as
// the residuals are ([Observation.Whitened] is linear). The columns are
// scaled to unit length as in [corrector.jacobianFD]; it returns the column
// norms.
func (c *corrector) jacobianSTM(x [6]float64) ([6]float64, error) {
	var d [6]float64
	st := c.state(x)
	ts := make([]astro.JD, 0, len(c.obs))
	for i := range c.obs {
		if c.obs[i].Used {
			ts = append(ts, c.obs[i].Geo.TDB)
		}
	}
	p, err := st.Propagate(ts, true)
	if err != nil {
		return d, err
	}
	m := 2 * len(ts)
	if m != len(c.r) {
		return d, fmt.Errorf("orbit: residual count changed during differencing")
	}
	if c.jac == nil || c.jac.RawMatrix().Rows != m {
		c.jac = mat.NewDense(m, 6, nil)
	}
	k := 0
	for i := range c.obs {
		o := &c.obs[i]
		if !o.Used {
			continue
		}
		seen, du, err := p.observePartials(k, o.Geo)
		if err != nil {
			return d, err
		}
		gE, gN := residualPartials(o.RA, o.Dec, seen.Dir, &du)
		for j := range 6 {
			w1, w2 := o.Whitened(gE[j], gN[j])
			c.jac.Set(2*k, j, w1)
			c.jac.Set(2*k+1, j, w2)
		}
		k++
	}
	for j := range 6 {
		norm := 0.0
		for i := range m {
			g := c.jac.At(i, j)
			norm += g * g
		}
		norm = math.Sqrt(norm)
		if math.IsNaN(norm) || math.IsInf(norm, 0) {
			return d, fmt.Errorf("orbit: partial derivative %d not finite", j)
		}
		if norm == 0 {
			norm = 1
		}
		d[j] = norm
		for i := range m {
			c.jac.Set(i, j, c.jac.At(i, j)/norm)
		}
	}
	return d, nil
}
