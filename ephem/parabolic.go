package ephem

import (
	"fmt"
	"math"

	"arcfit/astro"
)

// ParabolicMotion returns the true anomaly ν and the heliocentric distance r
// (au) of a body on a parabolic orbit (e = 1) with perihelion distance q (au),
// dtDays days after the perihelion passage (negative before it), moving about
// the Sun with GM = [GMSun] (k = [GaussK]).
//
// Barker's equation, in Meeus' form:
//
//	W = 3k/(q·√(2q))·(t − T),  s³ + 3s − W = 0,  s = tan(ν/2),  r = q·(1 + s²)
//
// The cubic is solved in closed form as s = 2·sinh(asinh(W/2)/3), the
// hyperbolic form of Cardano's solution, which has no cancellation for small W
// (Meeus writes it as s = Y − 1/Y, Y = ∛(W/2 + √(W²/4 + 1)); the two are equal).
//
// Errors: q ≤ 0, or q or dtDays not finite.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 34 "Parabolic
// Motion", Example 34.a (p. 243).
func ParabolicMotion(q, dtDays float64) (nu astro.Angle, r float64, err error) {
	if err := checkConic("ParabolicMotion", q, 1, dtDays); err != nil {
		return 0, 0, err
	}
	s := barkerS(q, dtDays, GMSun)
	return astro.Angle(2 * math.Atan(s)), q * (1 + s*s), nil
}

// barkerS returns s = tan(ν/2) from Barker's equation, with k = √gm.
func barkerS(q, dt, gm float64) float64 {
	w := 3 * math.Sqrt(gm/(2*q)) / q * dt
	return 2 * math.Sinh(math.Asinh(0.5*w)/3)
}

// parabolicPlane returns the position (au) and velocity (au/day) in the
// orbital plane, x towards perihelion:
//
//	x = q(1 − s²), y = 2qs, vx = −√(gm/2q)·2s/(1 + s²), vy = √(gm/2q)·2/(1 + s²)
//
// (the velocity from the vis-viva components of a conic with p = 2q).
func parabolicPlane(q, dt, gm float64) (x, y, vx, vy float64, err error) {
	s := barkerS(q, dt, gm)
	if math.IsInf(s, 0) || math.IsNaN(s) {
		return 0, 0, 0, 0, twoBodyRangeError(fmt.Sprintf("ephem: parabolic motion: time %g days from perihelion out of range", dt))
	}
	u := 1 + s*s
	c := math.Sqrt(gm/(2*q)) * 2 / u
	return q * (1 - s) * (1 + s), 2 * q * s, -c * s, c, nil
}
