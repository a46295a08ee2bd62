package orbit

import (
	"math"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// stmVariational returns the state transition matrix Φ(t, t0) = ∂x(t)/∂x(t0)
// of two-body motion over dtDays, by integrating the variational equations
//
//	dΦ/dt = [[0, I], [G(r), 0]] Φ,   G = μ/r³ (3 r̂ r̂ᵀ − I),  Φ(t0) = I
//
// along the orbit st (positions from its two-body propagation) with the
// classical fixed-step fourth-order Runge–Kutta method (Press et al.,
// Numerical Recipes, 3rd ed. (2007), §17.1), steps of at most 0.02 d.
// The gravity gradient G is that of Battin, An Introduction to the
// Mathematics and Methods of Astrodynamics (1999), §9.7.
func stmVariational(t *testing.T, st State, dtDays float64) [6][6]float64 {
	t.Helper()
	n := int(math.Ceil(math.Abs(dtDays)/0.02)) + 1
	h := dtDays / float64(n)
	var phi [6][6]float64
	for i := 0; i < 6; i++ {
		phi[i][i] = 1
	}
	grad := func(tau float64) [3][3]float64 {
		p, _, err := st.At(st.Epoch.AddDays(tau))
		if err != nil {
			t.Fatal(err)
		}
		r := r3.Norm(p)
		u := r3.Scale(1/r, p)
		k := ephem.GMSun / (r * r * r)
		uv := [3]float64{u.X, u.Y, u.Z}
		var g [3][3]float64
		for a := 0; a < 3; a++ {
			for b := 0; b < 3; b++ {
				g[a][b] = 3 * k * uv[a] * uv[b]
			}
			g[a][a] -= k
		}
		return g
	}
	deriv := func(g [3][3]float64, y [6][6]float64) [6][6]float64 {
		var d [6][6]float64
		for j := 0; j < 6; j++ {
			for a := 0; a < 3; a++ {
				d[a][j] = y[a+3][j]
				s := 0.0
				for b := 0; b < 3; b++ {
					s += g[a][b] * y[b][j]
				}
				d[a+3][j] = s
			}
		}
		return d
	}
	axpy := func(y [6][6]float64, s float64, d [6][6]float64) [6][6]float64 {
		for i := range y {
			for j := range y[i] {
				y[i][j] += s * d[i][j]
			}
		}
		return y
	}
	tau := 0.0
	for step := 0; step < n; step++ {
		g0, gm, g1 := grad(tau), grad(tau+h/2), grad(tau+h)
		k1 := deriv(g0, phi)
		k2 := deriv(gm, axpy(phi, h/2, k1))
		k3 := deriv(gm, axpy(phi, h/2, k2))
		k4 := deriv(g1, axpy(phi, h, k3))
		for i := range phi {
			for j := range phi[i] {
				phi[i][j] += h / 6 * (k1[i][j] + 2*k2[i][j] + 2*k3[i][j] + k4[i][j])
			}
		}
		tau += h
	}
	return phi
}

// The finite-difference Jacobian of the fit against an independent one from
// the variational equations, chained with the light-time-corrected
// derivative of the direction:
//
//	dp = dh − w (p̂·dh)/(c + p̂·w),   w = ḣ + Ṡ   (p = h(t − τ) + S − τṠ − O, τ = |p|/c)
//	d(ΔE, ΔN) = −(e, n)·dp/Δ        (O − C at o = c, the tangent plane)
//	dh = Φ_r·(δr₀, δv₀) at t − τ
//
// Agreement: the central differences err by ~1e-9 relative (rounding,
// see fdRelStep) plus ~1e-12 (truncation); RK4 with 0.02-d steps on orbits
// whose shortest time scale r/v exceeds 40 d errs by (0.02/40)⁴ ≈ 1e-13.
// Each column must agree to 1e-7 of its norm (measured: about 1e-9).
func TestJacobianAgainstVariational(t *testing.T) {
	for _, c := range dcCases() {
		ts, ss := c.schedule()
		obs := dcSynthObservations(t, c.el, ts, ss, 0.5, nil)
		obs[3].Corr = 0.4 // a correlated observation exercises the whitening
		truth := c.truth(t)
		x := stateVector(truth)
		cr := newCorrector(obs, truth.Epoch)
		var err error
		cr.r, _, err = cr.residuals(x, cr.r)
		if err != nil {
			t.Fatal(err)
		}
		d, err := cr.jacobianFD(x)
		if err != nil {
			t.Fatal(err)
		}
		m := len(cr.r)
		stm := mat.NewDense(m, 6, nil)
		cLight := astro.SpeedOfLightAUDay
		for i := range obs {
			o := &obs[i]
			seen, err := truth.Observe(o.Geo)
			if err != nil {
				t.Fatal(err)
			}
			dt := (o.Geo.TDB.Day - truth.Epoch.Day) + (o.Geo.TDB.Frac - truth.Epoch.Frac) - seen.TauDays
			phi := stmVariational(t, truth, dt)
			_, vh, err := truth.At(truth.Epoch.AddDays(dt))
			if err != nil {
				t.Fatal(err)
			}
			w := r3.Add(vh, o.Geo.SunBaryVel)
			ph := seen.Dir
			e, n := EastNorth(ph)
			for k := 0; k < 6; k++ {
				dh := r3.Vec{X: phi[0][k], Y: phi[1][k], Z: phi[2][k]}
				dp := r3.Sub(dh, r3.Scale(r3.Dot(ph, dh)/(cLight+r3.Dot(ph, w)), w))
				dE := -r3.Dot(e, dp) / seen.DeltaAU
				dN := -r3.Dot(n, dp) / seen.DeltaAU
				w1, w2 := o.Whitened(dE, dN)
				stm.Set(2*i, k, w1)
				stm.Set(2*i+1, k, w2)
			}
		}
		worst := 0.0
		for k := 0; k < 6; k++ {
			diff, norm := 0.0, 0.0
			for i := 0; i < m; i++ {
				fd := cr.jac.At(i, k) * d[k]
				a := stm.At(i, k)
				diff += (fd - a) * (fd - a)
				norm += a * a
			}
			rel := math.Sqrt(diff / norm)
			worst = math.Max(worst, rel)
			if rel > 1e-7 {
				t.Errorf("%s: column %d: finite differences and variational equations differ by %.3g relative", c.name, k, rel)
			}
		}
		t.Logf("%s: worst column disagreement %.2g relative", c.name, worst)
	}
}
