package orbit

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// rgMode is the most probable θ of the ranging sampler (see [mcDim]) and
// the Laplace approximation of the posterior there.
type rgMode struct {
	th   [mcDim]float64
	chi2 float64
	cov  *mat.SymDense // (JᵀJ)⁻¹ of the whitened residuals
	st   State         // the orbit of th
}

// rgModeMaxIter bounds the Levenberg–Marquardt iterations of [rgProblem.mode].
const rgModeMaxIter = 40

// residualsAt returns the whitened residuals (appended to dst[:0]) and χ² of
// the orbit of θ against the used observations; ok is false for an
// inadmissible orbit.
func (p *rgProblem) residualsAt(th [mcDim]float64, dst []float64) ([]float64, float64, bool) {
	if dst == nil {
		dst = make([]float64, 0, 2*len(p.all))
	}
	rho, rhoB := th[0], th[0]+th[1]*p.dt
	if !(rho > 0) || !(rhoB > 0) {
		return dst, math.Inf(1), false
	}
	st, ok := p.orbit(rho, rhoB, p.a.dir(rho, 1, th[2], th[3]), p.b.dir(rhoB, 1, th[4], th[5]))
	if !ok {
		return dst, math.Inf(1), false
	}
	chi2, r, full := p.chi2(st, p.all, math.Inf(1), dst[:0])
	return r, chi2, full
}

// mode minimises χ² over all six parameters θ from the distances (rhoA,
// rhoB) with the anchors at their fitted places (ζ = 0), by
// Levenberg–Marquardt on the whitened residuals (forward differences:
// steps 1e-7 relative in ρA and ρB, 1e-4 σ in the offsets; damping
// λ·diag(JᵀJ)), and returns the minimum with the covariance (JᵀJ)⁻¹ there:
// the Laplace approximation of the posterior, the start of the sampler's
// proposal. ok is false when the start is inadmissible or JᵀJ singular.
//
// Reference: Levenberg (1944), Q. Appl. Math. 2, 164; Marquardt (1963),
// J. SIAM 11, 431; Press et al., Numerical Recipes, 3rd ed. (2007), §15.5
// (the method), §15.6 (covariance (JᵀJ)⁻¹ of a least-squares fit).
func (p *rgProblem) mode(rhoA, rhoB float64) (rgMode, bool) {
	th := [mcDim]float64{rhoA, (rhoB - rhoA) / p.dt}
	r, chi2, ok := p.residualsAt(th, make([]float64, 0, 2*len(p.all)))
	if !ok {
		return rgMode{}, false
	}
	m := len(r)
	jac := mat.NewDense(m, mcDim, nil)
	var side, trial []float64
	jacobian := func() bool {
		for k := range mcDim {
			h := 1e-4
			switch k {
			case 0:
				h = 1e-7 * th[0]
			case 1:
				h = 1e-7 * (th[0] + th[1]*p.dt) / p.dt
			}
			tk := th
			tk[k] += h
			var ok bool
			side, _, ok = p.residualsAt(tk, side)
			if !ok {
				h = -h
				tk[k] = th[k] + h
				if side, _, ok = p.residualsAt(tk, side); !ok {
					return false
				}
			}
			for j := range m {
				jac.Set(j, k, (side[j]-r[j])/h)
			}
		}
		return true
	}
	var jtj mat.SymDense
	grad := mat.NewVecDense(mcDim, nil)
	lambda := 1e-3
	for range rgModeMaxIter {
		if !jacobian() {
			break
		}
		jtj.SymOuterK(1, jac.T())
		grad.MulVec(jac.T(), mat.NewVecDense(m, r))
		improved, done := false, false
		for lambda < 1e12 {
			a := mat.NewSymDense(mcDim, nil)
			a.CopySym(&jtj)
			for k := range mcDim {
				a.SetSym(k, k, jtj.At(k, k)*(1+lambda))
			}
			var ch mat.Cholesky
			if !ch.Factorize(a) {
				lambda *= 10
				continue
			}
			var step mat.VecDense
			if err := ch.SolveVecTo(&step, grad); err != nil {
				lambda *= 10
				continue
			}
			tn := th
			for k := range mcDim {
				tn[k] -= step.AtVec(k)
			}
			var c2 float64
			var ok bool
			trial, c2, ok = p.residualsAt(tn, trial)
			if ok && c2 < chi2 {
				done = chi2-c2 <= 1e-9*c2+1e-12
				th, chi2 = tn, c2
				r, trial = trial, r
				lambda = math.Max(lambda/10, 1e-12)
				improved = true
				break
			}
			lambda *= 10
		}
		if !improved || done {
			break
		}
	}
	if !jacobian() {
		return rgMode{}, false
	}
	jtj.SymOuterK(1, jac.T())
	var ch mat.Cholesky
	if !ch.Factorize(&jtj) {
		return rgMode{}, false
	}
	cov := mat.NewSymDense(mcDim, nil)
	if err := ch.InverseTo(cov); err != nil {
		return rgMode{}, false
	}
	rho, rhoB := th[0], th[0]+th[1]*p.dt
	st, ok := p.orbit(rho, rhoB, p.a.dir(rho, 1, th[2], th[3]), p.b.dir(rhoB, 1, th[4], th[5]))
	if !ok {
		return rgMode{}, false
	}
	return rgMode{th: th, chi2: chi2, cov: cov, st: st}, true
}
