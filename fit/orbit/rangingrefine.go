package orbit

import (
	"math"
)

// rgFit is a minimum of χ² over the two distances of A and B.
type rgFit struct {
	rhoA, rhoB float64
	chi2       float64 // against the used observations
	st         State
	iters      int
	polished   bool // improved by the six-parameter polish ([rgProblem.mode])
}

// Constants of the refinement.
const (
	// rgFDStep is the forward-difference step in ln ρ: 1e-7, a change of
	// 1e-7 relative in the distance (for a residual computed to about 1e-15
	// rad the rounding error of the derivative stays below 1e-8 of σ per
	// unit ln ρ; Press et al., Numerical Recipes, 3rd ed. (2007), §5.7).
	rgFDStep = 1e-7
	// rgMaxRefine bounds the Levenberg–Marquardt iterations.
	rgMaxRefine = 60
)

// refine minimises the χ² of the orbit through the anchors A and B (at their
// fitted places) over x = (ln ρA, ln ρB), from the node (rhoA, rhoB), by
// Levenberg–Marquardt on the whitened residuals of the used observations
// (forward-difference Jacobian, damping λ·diag(JᵀJ)). A step to an
// inadmissible orbit counts as one that does not lower χ². It returns
// ok = false when the starting node itself is not admissible.
//
// Reference: Levenberg (1944), Q. Appl. Math. 2, 164; Marquardt (1963),
// J. SIAM 11, 431; Press et al., Numerical Recipes, 3rd ed. (2007), §15.5.
func (p *rgProblem) refine(rhoA, rhoB float64) (rgFit, bool) {
	type eval struct {
		r    []float64
		chi2 float64
		st   State
	}
	at := func(x [2]float64, buf []float64) (eval, bool) {
		if buf == nil {
			buf = make([]float64, 0, 2*len(p.all))
		}
		ra, rb := math.Exp(x[0]), math.Exp(x[1])
		st, ok := p.orbit(ra, rb, p.a.dir(ra, 0, 0, 0), p.b.dir(rb, 0, 0, 0))
		if !ok {
			return eval{r: buf}, false
		}
		chi2, r, full := p.chi2(st, p.all, math.Inf(1), buf[:0])
		if !full {
			return eval{r: r}, false
		}
		return eval{r: r, chi2: chi2, st: st}, true
	}
	x := [2]float64{math.Log(rhoA), math.Log(rhoB)}
	cur, ok := at(x, nil)
	if !ok {
		return rgFit{}, false
	}
	m := len(cur.r)
	jac := [2][]float64{make([]float64, m), make([]float64, m)}
	var trial, side eval
	lambda := 1e-3
	iters := 0
	for iters < rgMaxRefine {
		iters++
		for k := range 2 {
			h := rgFDStep
			xk := x
			xk[k] += h
			var ok bool
			side, ok = at(xk, side.r)
			if !ok {
				h = -h
				xk[k] = x[k] + h
				if side, ok = at(xk, side.r); !ok {
					return rgFit{rhoA: math.Exp(x[0]), rhoB: math.Exp(x[1]), chi2: cur.chi2, st: cur.st, iters: iters}, true
				}
			}
			for j := range m {
				jac[k][j] = (side.r[j] - cur.r[j]) / h
			}
		}
		var a [2][2]float64
		var g [2]float64
		for j := range m {
			for k := range 2 {
				g[k] += jac[k][j] * cur.r[j]
				for l := range 2 {
					a[k][l] += jac[k][j] * jac[l][j]
				}
			}
		}
		improved := false
		for lambda < 1e12 {
			b00, b11 := a[0][0]*(1+lambda), a[1][1]*(1+lambda)
			det := b00*b11 - a[0][1]*a[1][0]
			if !(det > 0) || !rgFiniteF(det) {
				lambda *= 10
				continue
			}
			d0 := -(b11*g[0] - a[0][1]*g[1]) / det
			d1 := -(b00*g[1] - a[1][0]*g[0]) / det
			xn := [2]float64{x[0] + d0, x[1] + d1}
			var ok bool
			trial, ok = at(xn, trial.r)
			if ok && trial.chi2 < cur.chi2 {
				dec := cur.chi2 - trial.chi2
				x = xn
				cur, trial = trial, cur
				lambda = math.Max(lambda/10, 1e-12)
				improved = true
				if dec <= 1e-10*cur.chi2+1e-12 || (math.Abs(d0) < 1e-12 && math.Abs(d1) < 1e-12) {
					return rgFit{rhoA: math.Exp(x[0]), rhoB: math.Exp(x[1]), chi2: cur.chi2, st: cur.st, iters: iters}, true
				}
				break
			}
			lambda *= 10
		}
		if !improved {
			break
		}
	}
	return rgFit{rhoA: math.Exp(x[0]), rhoB: math.Exp(x[1]), chi2: cur.chi2, st: cur.st, iters: iters}, true
}
