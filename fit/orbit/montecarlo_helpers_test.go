package orbit

import (
	"testing"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// mcVec and mcState convert between a State and its six components.
func mcVec(s State) [6]float64 {
	return [6]float64{s.Pos.X, s.Pos.Y, s.Pos.Z, s.Vel.X, s.Vel.Y, s.Vel.Z}
}

func mcState(epoch astro.JD, x [6]float64) State {
	return State{Epoch: epoch, Pos: r3.Vec{X: x[0], Y: x[1], Z: x[2]}, Vel: r3.Vec{X: x[3], Y: x[4], Z: x[5]}}
}

// mcSteps are central-difference steps: 1e-6 of |r| for the positions and
// of |v| for the velocities (Press et al., Numerical Recipes, 3rd ed.
// (2007), §5.7: h ≈ ε^(1/3) times the scale).
func mcSteps(s State) [6]float64 {
	hp, hv := 1e-6*r3.Norm(s.Pos), 1e-6*r3.Norm(s.Vel)
	return [6]float64{hp, hp, hp, hv, hv, hv}
}

// mcLaplaceCov returns (JᵀJ)⁻¹ for the whitened residuals of obs about the
// state st, J by central differences: the covariance of a least-squares
// orbit at st (Press et al. 2007, §15.6), computed here independently of
// the package's differential correction.
func mcLaplaceCov(tb testing.TB, st State, obs []Observation) *mat.SymDense {
	tb.Helper()
	x := mcVec(st)
	h := mcSteps(st)
	var cols [6][]float64
	for k := range 6 {
		xp, xm := x, x
		xp[k] += h[k]
		xm[k] -= h[k]
		rp, _, err := mcState(st.Epoch, xp).Residuals(obs, nil)
		if err != nil {
			tb.Fatal(err)
		}
		rm, _, err := mcState(st.Epoch, xm).Residuals(obs, nil)
		if err != nil {
			tb.Fatal(err)
		}
		cols[k] = make([]float64, len(rp))
		for j := range rp {
			cols[k][j] = (rp[j] - rm[j]) / (2 * h[k])
		}
	}
	jtj := mat.NewSymDense(6, nil)
	for a := range 6 {
		for b := a; b < 6; b++ {
			s := 0.0
			for j := range cols[a] {
				s += cols[a][j] * cols[b][j]
			}
			jtj.SetSym(a, b, s)
		}
	}
	var ch mat.Cholesky
	if !ch.Factorize(jtj) {
		tb.Fatal("JᵀJ not positive definite")
	}
	cov := mat.NewSymDense(6, nil)
	if err := ch.InverseTo(cov); err != nil {
		tb.Fatal(err)
	}
	return cov
}

// mcSkyJacobian returns ∂(E, N)/∂x (radians per au, au/day) of the place of
// st seen by g, on the tangent plane at the nominal place, by central
// differences.
func mcSkyJacobian(tb testing.TB, st State, g ephem.ObserverGeometry) (jac [2][6]float64, c r3.Vec) {
	tb.Helper()
	seen, err := st.Observe(g)
	if err != nil {
		tb.Fatal(err)
	}
	c = seen.Dir
	e, n := EastNorth(c)
	x := mcVec(st)
	h := mcSteps(st)
	for k := range 6 {
		xp, xm := x, x
		xp[k] += h[k]
		xm[k] -= h[k]
		sp, err1 := mcState(st.Epoch, xp).Observe(g)
		sm, err2 := mcState(st.Epoch, xm).Observe(g)
		if err1 != nil || err2 != nil {
			tb.Fatal(err1, err2)
		}
		// Standard coordinates about c (gnomonic, as Residual).
		ep, np := r3.Dot(sp.Dir, e)/r3.Dot(sp.Dir, c), r3.Dot(sp.Dir, n)/r3.Dot(sp.Dir, c)
		em, nm := r3.Dot(sm.Dir, e)/r3.Dot(sm.Dir, c), r3.Dot(sm.Dir, n)/r3.Dot(sm.Dir, c)
		jac[0][k] = (ep - em) / (2 * h[k])
		jac[1][k] = (np - nm) / (2 * h[k])
	}
	return jac, c
}

// mcThreeNights returns an arc of 4 observations a night from Alder Ridge on
// three nights spanning span days, starting on the night of 2027 Feb 10.
func mcThreeNights(span float64) ([]astro.JD, []*astro.Site) {
	var ts []astro.JD
	var ss []*astro.Site
	for _, d := range []float64{0, span / 2, span} {
		for k := range 4 {
			ts = append(ts, astro.JD{Day: 2461447.5 + d, Frac: 0.125 + 0.02*float64(k), Scale: astro.UTC})
			ss = append(ss, rgAlderRidge)
		}
	}
	return ts, ss
}
