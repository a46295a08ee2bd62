package ephem

import (
	"fmt"
	"math"

	"arcfit/astro"
)

// SolveKepler returns the eccentric anomaly E of an elliptic orbit, the root of
// Kepler's equation
//
//	M = E − e·sin E
//
// for the eccentricity e, 0 ≤ e < 1, and the mean anomaly m (radians, any
// value). E is returned in the same revolution as m: if m = 2πk + m′ with m′ in
// [−π, π], then E = 2πk + E′ with E′ in [−π, π], so that E − e·sin E gives m
// back.
//
// Method: the residual is evaluated as (1 − e)·E + e·(E − sin E) − M, with
// E − sin E from its Taylor series for |E| < 1, so that it keeps its relative
// accuracy when e is near 1 and E near 0 (the hard case of Meeus ch. 30). The
// starting value is the root of the cubic (1 − e)·E + e·E³/6 = M. Newton's
// iteration (Meeus ch. 30, second method) is kept inside the bracket
// M ≤ E ≤ min(M + e, π), which always holds the root (the bracket of Meeus'
// third, binary-search method); a step that would leave it is replaced by
// bisection. Since E − e·sin E is increasing and convex on [0, π] the
// iteration converges for every e in [0, 1) and every M; a bisection finish
// after 60 Newton steps is a guard that the tests have never seen used.
//
// Accuracy: E to within a few units in the last place of max(|E|, tiny) for
// |m| ≤ π; for larger |m| the reduction of m to (−π, π] adds the rounding of
// m itself. Meeus' case e = 0.99, M = 0.2 rad is reproduced to 1e-15 rad.
//
// Errors: e outside [0, 1), or m NaN or infinite (wrapping [astro.ErrRange]).
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 30 "Equation
// of Kepler", Examples 30.a and 30.b and the case e = 0.99, M = 0.2 rad of p. 205.
func SolveKepler(e float64, m astro.Angle) (E astro.Angle, err error) {
	if !(e >= 0 && e < 1) {
		return 0, twoBodyRangeError(fmt.Sprintf("ephem: SolveKepler: eccentricity e = %g, want 0 ≤ e < 1", e))
	}
	mm := float64(m)
	if math.IsNaN(mm) || math.IsInf(mm, 0) {
		return 0, twoBodyRangeError(fmt.Sprintf("ephem: SolveKepler: mean anomaly %g rad is not a finite number", mm))
	}
	red := tbWrap(mm)
	turns := mm - red // a whole number of revolutions
	sign := 1.0
	if red < 0 {
		sign, red = -1, -red
	}
	return astro.Angle(turns + sign*keplerReduced(e, red)), nil
}

// keplerReduced solves Kepler's equation for 0 ≤ e < 1 and 0 ≤ m ≤ π.
func keplerReduced(e, m float64) float64 {
	if e == 0 || m == 0 {
		return m
	}
	lo, hi := m, math.Min(m+e, math.Pi)
	x := tbDepressedCubic(6*(1-e)/e, 6*m/e)
	if !(x > lo && x < hi) {
		x = 0.5 * (lo + hi)
	}
	for range 60 {
		f := keplerResidual(e, x, m)
		if f == 0 {
			return x
		}
		if f > 0 {
			hi = x
		} else {
			lo = x
		}
		s := math.Sin(0.5 * x)
		fp := (1 - e) + 2*e*s*s // 1 − e·cos E without cancellation
		next := x - f/fp
		if !(next > lo && next < hi) {
			next = 0.5 * (lo + hi)
		}
		if math.Abs(next-x) <= 4e-16*x || next == lo || next == hi {
			return next
		}
		x = next
	}
	for hi-lo > 2e-16*hi { // bisection finish
		mid := 0.5 * (lo + hi)
		if mid <= lo || mid >= hi {
			break
		}
		if keplerResidual(e, mid, m) > 0 {
			hi = mid
		} else {
			lo = mid
		}
	}
	return 0.5 * (lo + hi)
}

// keplerResidual returns E − e·sin E − m, evaluated without the cancellation
// of E − sin E near 0.
func keplerResidual(e, x, m float64) float64 {
	return (1-e)*x + e*xMinusSin(x) - m
}

// xMinusSin returns x − sin x, from the Taylor series x³/3! − x⁵/5! + … for
// |x| < 1 (relative accuracy near 1e-16), directly otherwise.
func xMinusSin(x float64) float64 {
	if math.Abs(x) >= 1 {
		return x - math.Sin(x)
	}
	return x * x * x * tbOddSeries(-x*x)
}

// sinhMinusX returns sinh x − x, from the Taylor series x³/3! + x⁵/5! + … for
// |x| < 1, directly otherwise.
func sinhMinusX(x float64) float64 {
	if math.Abs(x) >= 1 {
		return math.Sinh(x) - x
	}
	return x * x * x * tbOddSeries(x*x)
}

// tbInvOddFactorial holds 1/(2n+3)! for n = 0…9 (exact factorials).
var tbInvOddFactorial = [...]float64{
	1.0 / 6, 1.0 / 120, 1.0 / 5040, 1.0 / 362880, 1.0 / 39916800,
	1.0 / 6227020800, 1.0 / 1307674368000, 1.0 / 355687428096000,
	1.0 / 121645100408832000, 1.0 / 51090942171709440000,
}

// tbOddSeries returns Σ uⁿ/(2n+3)!, n = 0…9, for |u| < 1 (Horner's scheme).
// The truncation error is below 1e-22.
func tbOddSeries(u float64) float64 {
	sum := 0.0
	for n := len(tbInvOddFactorial) - 1; n >= 0; n-- {
		sum = tbInvOddFactorial[n] + u*sum
	}
	return sum
}

// tbDepressedCubic returns the real root of y³ + p·y = q for p ≥ 0, by the
// hyperbolic form of Cardano's solution, y = 2√(p/3)·sinh(asinh(3q/(2p)·√(3/p))/3),
// which is free of the cancellation of the radical form (common practice).
func tbDepressedCubic(p, q float64) float64 {
	if p == 0 || math.IsInf(p, 1) && q == 0 {
		return math.Cbrt(q)
	}
	if math.IsInf(p, 1) {
		return 0
	}
	r := math.Sqrt(p / 3)
	return 2 * r * math.Sinh(math.Asinh(1.5*q/(p*r))/3)
}

// twoBodyError is the error of the two-body solvers for input out of range. Its
// text is one line, prefixed "ephem: "; it wraps [astro.ErrRange].
type twoBodyError struct{ msg string }

func (e *twoBodyError) Error() string { return e.msg }
func (e *twoBodyError) Unwrap() error { return astro.ErrRange }

func twoBodyRangeError(msg string) error { return &twoBodyError{msg: msg} }
