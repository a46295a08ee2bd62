package ephem

import (
	"fmt"
	"math"

	"arcfit/astro"
)

// NearParabolicMotion returns the true anomaly ν and the heliocentric distance r
// (au) of a body with perihelion distance q (au) and eccentricity e,
// dtDays days after the perihelion passage (negative before it), moving about
// the Sun with GM = [GMSun]. It is meant for e near 1, where the elliptic and
// hyperbolic forms of Kepler's equation lose accuracy, but is valid for every
// e ≥ 0.
//
// Meeus solves this case (his ch. 35) with Landgraf's series; here the same
// problem is solved with universal variables, which cover every conic in one
// equation. With β = GM·(1 − e)/q (that is GM/a) and the Stumpff functions
// c₂, c₃ of x = β·s², the universal Kepler equation from perihelion is
//
//	q·s + GM·e·s³·c₃(β s²) = t − T
//
// (left side increasing in s; solved by Newton's iteration inside a bracket,
// from the parabolic root of q·s + GM·e·s³/6 = t − T), and then
//
//	r = q + GM·e·s²·c₂,  x = q − GM·s²·c₂,  y = √(GM·q·(1 + e))·s·c₁,  ν = atan2(y, x).
//
// For an ellipse the time is first reduced to within half a period of the
// perihelion passage.
//
// Accuracy: ν to about 1e-15 rad and r to about 1e-16 relative for |t − T| up
// to some periods; the six test cases of Meeus ch. 35 are reproduced to his
// printed digits.
//
// Errors: q ≤ 0, e < 0, or any input not finite.
//
// Reference: Danby, Fundamentals of Celestial Mechanics, 2nd ed. (1988),
// ch. 6, §6.9 (universal variables, Stumpff functions); Meeus, Astronomical
// Algorithms, 2nd ed. (1998), ch. 35 "Near-parabolic Motion", test cases p. 247.
func NearParabolicMotion(q, e, dtDays float64) (nu astro.Angle, r float64, err error) {
	if err := checkConic("NearParabolicMotion", q, e, dtDays); err != nil {
		return 0, 0, err
	}
	x, y, _, _, err := nearParabolicPlane(q, e, dtDays, GMSun)
	if err != nil {
		return 0, 0, err
	}
	return astro.Angle(math.Atan2(y, x)), math.Hypot(x, y), nil
}

// nearParabolicPlane returns the position (au) and velocity (au/day) in the
// orbital plane, x towards perihelion, by the universal Kepler equation from
// perihelion (see [NearParabolicMotion]). The velocity is
//
//	vx = −GM·s·c₁/r,  vy = √(GM·q·(1 + e))·c₀/r
//
// from the f and g functions ḟ = −GM·s·c₁/(r·q), ġ = 1 − GM·s²·c₂/r.
func nearParabolicPlane(q, e, dt, gm float64) (x, y, vx, vy float64, err error) {
	beta := gm * (1 - e) / q
	if beta > 0 { // ellipse: reduce to within half a period of perihelion
		period := 2 * math.Pi * gm / (beta * math.Sqrt(beta))
		dt -= period * math.Round(dt/period)
	}
	sign := 1.0
	if dt < 0 {
		sign, dt = -1, -dt
	}
	s := 0.0
	if dt > 0 {
		lo, hi := 0.0, dt/q
		if beta > 0 {
			hi = math.Min(hi, math.Pi/math.Sqrt(beta))
		}
		s = tbDepressedCubic(6*q/(gm*e), 6*dt/(gm*e))
		if e == 0 {
			s = dt / q
		}
		if !(s > lo && s < hi) {
			s = 0.5 * (lo + hi)
		}
		converged := false
		for range 100 {
			_, _, c2, c3 := Stumpff(beta * s * s)
			f := q*s + gm*e*s*s*s*c3 - dt
			if f == 0 {
				converged = true
				break
			}
			if f > 0 {
				hi = s
			} else {
				lo = s
			}
			fp := q + gm*e*s*s*c2
			next := s - f/fp
			if !(next > lo && next < hi) {
				next = 0.5 * (lo + hi)
			}
			done := math.Abs(next-s) <= 4e-16*s || next == lo || next == hi
			s = next
			if done {
				converged = true
				break
			}
		}
		if !converged || math.IsNaN(s) {
			return 0, 0, 0, 0, fmt.Errorf("ephem: near-parabolic motion: no convergence for q = %g au, e = %g, t − T = %g d", q, e, sign*dt)
		}
	}
	s *= sign
	c0, c1, c2, _ := Stumpff(beta * s * s)
	if math.IsInf(c0, 0) || math.IsNaN(c0) {
		return 0, 0, 0, 0, twoBodyRangeError(fmt.Sprintf("ephem: near-parabolic motion: time %g days from perihelion out of range", sign*dt))
	}
	gs2c2 := gm * s * s * c2
	r := q + e*gs2c2
	v0 := math.Sqrt(gm * q * (1 + e))
	x = q - gs2c2
	y = v0 * s * c1
	vx = -gm * s * c1 / r
	vy = v0 * c0 / r
	return x, y, vx, vy, nil
}
