package nbody

import (
	"fmt"
	"math"

	"arcfit/astro"
	"arcfit/ephem"
)

// forceModel evaluates the heliocentric acceleration of a massless object
// for one integration: the bodies taken into account, their GMs, and a view
// on the interpolant cache.
type forceModel struct {
	gm     [nBodies]float64 // 0 for a body left out
	active []body
	needE  bool    // the Earth's position is needed (Earth or Moon active)
	d0     float64 // the epoch, TDB days since J2000
	w      view
	evals  int
	// pos holds the bodies' heliocentric positions at the last evaluation.
	pos [nBodies][3]float64
	// extra is Options.extra (tests only).
	extra func(t float64, r [3]float64) [3]float64
}

func newForceModel(epoch astro.JD, omit []ephem.Body) (*forceModel, error) {
	m := &forceModel{d0: epoch.DaysSinceJ2000()}
	for b := range nBodies {
		m.gm[b] = bodies[b].gm
	}
	for _, o := range omit {
		found := false
		for b := range nBodies {
			if bodies[b].eb == o {
				m.gm[b] = 0
				found = true
			}
		}
		if !found {
			return nil, fmt.Errorf("nbody: Options.Omit: %v is not a perturbing body (want Mercury…Neptune or the Moon)", o)
		}
	}
	for b := range nBodies {
		if m.gm[b] != 0 {
			m.active = append(m.active, b)
			if b == bEarth || b == bMoon {
				m.needE = true
			}
		}
	}
	return m, nil
}

// positions fills m.pos with the heliocentric positions of the active bodies
// (and the Earth when the Moon is active) at t days from the epoch.
func (m *forceModel) positions(t float64) error {
	tau := m.d0 + t
	if m.needE {
		p, _, err := m.w.position(bEarth, tau, false)
		if err != nil {
			return err
		}
		m.pos[bEarth] = p
	}
	for _, b := range m.active {
		if b == bEarth {
			continue
		}
		p, _, err := m.w.position(b, tau, false)
		if err != nil {
			return err
		}
		if b == bMoon {
			e := m.pos[bEarth]
			p = [3]float64{e[0] + p[0], e[1] + p[1], e[2] + p[2]}
		}
		m.pos[b] = p
	}
	return nil
}

// state returns the heliocentric position and velocity of body b at t days
// from the epoch (for the close-approach bookkeeping).
func (m *forceModel) state(b body, t float64) (p, v [3]float64, err error) {
	tau := m.d0 + t
	p, v, err = m.w.position(b, tau, true)
	if err != nil || b != bMoon {
		return p, v, err
	}
	e, ev, err := m.w.position(bEarth, tau, true)
	if err != nil {
		return p, v, err
	}
	for q := range 3 {
		p[q] += e[q]
		v[q] += ev[q]
	}
	return p, v, nil
}

// accel writes into a the acceleration of the second-order system at t days
// from the epoch for the positions y: a[0:3] is the object's heliocentric
// acceleration
//
//	r̈ = −GM☉ r/r³ + Σ_j GM_j [ (r_j − r)/|r_j − r|³ − r_j/r_j³ ],
//
// the last term being the indirect term, the Sun's own acceleration towards
// each body, which does not depend on the object. When len(y) > 3, y[3:21]
// holds the 3×6 matrix Φr = ∂r/∂x0 (row-major) and a[3:21] receives
// G·Φr, G = ∂r̈/∂r the gravity-gradient matrix
//
//	G = −GM☉ (I/r³ − 3 r rᵀ/r⁵) − Σ_j GM_j (I/ρ_j³ − 3 ρ_j ρ_jᵀ/ρ_j⁵),  ρ_j = r − r_j,
//
// (the variational equations of a velocity-independent force, Φ̈r = G Φr).
//
// Reference: Danby, Fundamentals of Celestial Mechanics, 2nd ed. (1988),
// §9.1 (the heliocentric equations of the perturbed problem, direct and
// indirect parts); Montenbruck & Gill, Satellite Orbits (2000), §3.2 (point
// masses, indirect term) and §7.2 (variational equations, eq. 7.42).
func (m *forceModel) accel(t float64, y, a []float64) error {
	if err := m.positions(t); err != nil {
		return err
	}
	m.evals++
	x, yy, z := y[0], y[1], y[2]
	r2 := x*x + yy*yy + z*z
	r := math.Sqrt(r2)
	k := ephem.GMSun / (r2 * r)
	ax, ay, az := -k*x, -k*yy, -k*z
	stm := len(y) > 3
	var g [6]float64 // symmetric G: xx, xy, xz, yy, yz, zz
	if stm {
		k5 := 3 * k / r2
		g = [6]float64{k5*x*x - k, k5 * x * yy, k5 * x * z, k5*yy*yy - k, k5 * yy * z, k5*z*z - k}
	}
	for _, b := range m.active {
		gm := m.gm[b]
		p := &m.pos[b]
		dx, dy, dz := x-p[0], yy-p[1], z-p[2]
		d2 := dx*dx + dy*dy + dz*dz
		d := math.Sqrt(d2)
		kd := gm / (d2 * d)
		p2 := p[0]*p[0] + p[1]*p[1] + p[2]*p[2]
		kp := gm / (p2 * math.Sqrt(p2))
		ax -= kd*dx + kp*p[0]
		ay -= kd*dy + kp*p[1]
		az -= kd*dz + kp*p[2]
		if stm {
			k5 := 3 * kd / d2
			g[0] += k5*dx*dx - kd
			g[1] += k5 * dx * dy
			g[2] += k5 * dx * dz
			g[3] += k5*dy*dy - kd
			g[4] += k5 * dy * dz
			g[5] += k5*dz*dz - kd
		}
	}
	if m.extra != nil {
		e := m.extra(m.d0+t, [3]float64{x, yy, z})
		ax, ay, az = ax+e[0], ay+e[1], az+e[2]
	}
	a[0], a[1], a[2] = ax, ay, az
	if stm {
		phi := y[3:21]
		out := a[3:21]
		for c := range 6 {
			p0, p1, p2 := phi[c], phi[6+c], phi[12+c]
			out[c] = g[0]*p0 + g[1]*p1 + g[2]*p2
			out[6+c] = g[1]*p0 + g[3]*p1 + g[4]*p2
			out[12+c] = g[2]*p0 + g[4]*p1 + g[5]*p2
		}
	}
	if math.IsNaN(ax+ay+az) || math.IsInf(ax+ay+az, 0) {
		return errNonFinite
	}
	return nil
}
