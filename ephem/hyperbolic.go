package ephem

import (
	"fmt"
	"math"

	"arcfit/astro"
)

// SolveKeplerHyperbolic returns the hyperbolic anomaly H, the root of the
// hyperbolic form of Kepler's equation
//
//	M = e·sinh H − H
//
// for the eccentricity e > 1 and the mean anomaly m = n·(t − T) (radians; n is
// the mean motion k/|a|^1.5). H is dimensionless, with the sign of m.
//
// Method: the residual is evaluated as (e − 1)·H + e·(sinh H − H) − M, with
// sinh H − H from its Taylor series for |H| < 1, which keeps its relative
// accuracy for e just above 1 and small H. Newton's iteration starts from the
// smaller of the root of the cubic (e − 1)·H + e·H³/6 = M and ln(2M/e + 1.8)
// (Danby's starting value for large M) and is kept inside the bracket
// asinh(M/e) ≤ H ≤ asinh(M/(e − 1)), falling back to bisection; the residual is
// increasing and convex for H ≥ 0, so the iteration converges for every e > 1
// and every finite m.
//
// Errors: e ≤ 1 or not finite, m NaN or infinite, or an H so large that
// sinh H overflows (wrapping [astro.ErrRange]).
//
// Reference: Danby, Fundamentals of Celestial Mechanics, 2nd ed. (1988),
// ch. 6 (the hyperbolic Kepler equation and its starting values); the
// bracketing is that of Meeus, Astronomical Algorithms, 2nd ed., ch. 30.
func SolveKeplerHyperbolic(e float64, m float64) (H float64, err error) {
	if !(e > 1) || math.IsInf(e, 1) {
		return 0, twoBodyRangeError(fmt.Sprintf("ephem: SolveKeplerHyperbolic: eccentricity e = %g, want e > 1", e))
	}
	if math.IsNaN(m) || math.IsInf(m, 0) {
		return 0, twoBodyRangeError(fmt.Sprintf("ephem: SolveKeplerHyperbolic: mean anomaly %g is not a finite number", m))
	}
	sign := 1.0
	if m < 0 {
		sign, m = -1, -m
	}
	h := keplerHyperbolicReduced(e, m)
	if math.IsInf(math.Sinh(h), 0) || math.IsNaN(h) {
		return 0, twoBodyRangeError(fmt.Sprintf("ephem: SolveKeplerHyperbolic: mean anomaly %g too large for e = %g", sign*m, e))
	}
	return sign * h, nil
}

// keplerHyperbolicReduced solves e·sinh H − H = m for e > 1, m ≥ 0.
func keplerHyperbolicReduced(e, m float64) float64 {
	if m == 0 {
		return 0
	}
	cubic := tbDepressedCubic(6*(e-1)/e, 6*m/e)
	lo := math.Asinh(m / e)
	hi := math.Min(math.Asinh(m/(e-1)), cubic) // the cubic root is an upper bound
	if hi < lo {
		hi = lo
	}
	x := math.Min(cubic, math.Log(2*m/e+1.8))
	if !(x > lo && x < hi) {
		x = 0.5 * (lo + hi)
	}
	for range 60 {
		f := (e-1)*x + e*sinhMinusX(x) - m
		if f == 0 {
			return x
		}
		if f > 0 {
			hi = x
		} else {
			lo = x
		}
		s := math.Sinh(0.5 * x)
		fp := (e - 1) + 2*e*s*s // e·cosh H − 1 without cancellation
		next := x - f/fp
		if !(next > lo && next < hi) {
			next = 0.5 * (lo + hi)
		}
		if math.Abs(next-x) <= 4e-16*x || next == lo || next == hi {
			return next
		}
		x = next
	}
	for hi-lo > 2e-16*hi {
		mid := 0.5 * (lo + hi)
		if mid <= lo || mid >= hi {
			break
		}
		if (e-1)*mid+e*sinhMinusX(mid)-m > 0 {
			hi = mid
		} else {
			lo = mid
		}
	}
	return 0.5 * (lo + hi)
}

// HyperbolicMotion returns the true anomaly ν and the heliocentric distance r
// (au) of a body on a hyperbolic orbit (e > 1) with perihelion distance q (au),
// dtDays days after the perihelion passage (negative before it), moving about
// the Sun with GM = [GMSun].
//
//	|a| = q/(e − 1),  M = k·dt/|a|^1.5,  e·sinh H − H = M,
//	tan(ν/2) = √((e + 1)/(e − 1))·tanh(H/2),  r = q + 2|a|·e·sinh²(H/2)
//
// (the last is |a|·(e·cosh H − 1) without cancellation).
//
// Errors: q ≤ 0, e ≤ 1, or any input not finite.
//
// Reference: Danby, Fundamentals of Celestial Mechanics, 2nd ed. (1988),
// ch. 6 (hyperbolic orbits); Meeus, Astronomical Algorithms, 2nd ed., ch. 35
// introduction, for the definitions of q, e and t − T.
func HyperbolicMotion(q, e, dtDays float64) (nu astro.Angle, r float64, err error) {
	if err := checkConic("HyperbolicMotion", q, e, dtDays); err != nil {
		return 0, 0, err
	}
	if !(e > 1) {
		return 0, 0, twoBodyRangeError(fmt.Sprintf("ephem: HyperbolicMotion: eccentricity e = %g, want e > 1", e))
	}
	x, y, _, _, err := hyperbolicPlane(q, e, dtDays, GMSun)
	if err != nil {
		return 0, 0, err
	}
	return astro.Angle(math.Atan2(y, x)), math.Hypot(x, y), nil
}

// hyperbolicPlane returns the position (x towards perihelion, y along the
// motion at perihelion; au) and velocity (au/day) in the orbital plane.
func hyperbolicPlane(q, e, dt, gm float64) (x, y, vx, vy float64, err error) {
	a := q / (e - 1)
	n := math.Sqrt(gm/a) / a
	h, err := SolveKeplerHyperbolic(e, n*dt)
	if err != nil {
		return 0, 0, 0, 0, err
	}
	sh := math.Sinh(0.5 * h)
	two := 2 * a * sh * sh // |a|·(cosh H − 1)
	r := q + e*two
	x = q - two
	y = a * math.Sqrt((e-1)*(e+1)) * math.Sinh(h)
	vx = -math.Sqrt(gm*a) * math.Sinh(h) / r
	vy = math.Sqrt(gm*q*(1+e)) * math.Cosh(h) / r
	return x, y, vx, vy, nil
}

// checkConic checks the common inputs of the conic solvers.
func checkConic(fn string, q, e, dt float64) error {
	switch {
	case !(q > 0) || math.IsInf(q, 1):
		return twoBodyRangeError(fmt.Sprintf("ephem: %s: perihelion distance q = %g au, want a finite q > 0", fn, q))
	case !(e >= 0) || math.IsInf(e, 1):
		return twoBodyRangeError(fmt.Sprintf("ephem: %s: eccentricity e = %g, want a finite e ≥ 0", fn, e))
	case math.IsNaN(dt) || math.IsInf(dt, 0):
		return twoBodyRangeError(fmt.Sprintf("ephem: %s: time from perihelion %g days is not a finite number", fn, dt))
	}
	return nil
}
