package orbit

import (
	"math"

	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// rgLambert solves Lambert's problem for the short way: the two-body orbit
// about a centre of gravitational parameter mu (au³/day²) that is at r1 and,
// dt days later (dt > 0), at r2, with a transfer angle Δθ in [0, π) about
// r1 × r2. It returns the velocities (au/day) at both ends, or ok = false
// when there is no such single-revolution orbit (Δθ within rounding of π,
// the iteration failing, a result not finite).
//
// Method: universal variables. With the Stumpff functions C(z) = c₂(z),
// S(z) = c₃(z) ([ephem.Stumpff]),
//
//	A = sin Δθ·√(r₁r₂/(1 − cos Δθ)) = √(r₁r₂ + r⃗₁·r⃗₂)
//	y(z) = r₁ + r₂ + A·(z·S(z) − 1)/√C(z)
//	√mu·t(z) = (y/C)^(3/2)·S + A·√y
//
// t(z) increases from 0 (where y = 0) to ∞ (z → 4π²); the root of
// t(z) = dt is found by Newton's method from z = 0 (the parabola) with the
// derivative of [rgLambertF], kept inside the bracket the iterates build
// (bisection where a step leaves it). Then f = 1 − y/r₁, g = A·√(y/mu),
// ġ = 1 − y/r₂ and
//
//	v₁ = (r⃗₂ − f·r⃗₁)/g,   v₂ = (ġ·r⃗₂ − r⃗₁)/g.
//
// The second form of A has no cancellation for small Δθ (the short arcs of
// ranging, where r⃗₁ and r⃗₂ are a fraction of a degree apart seen from the
// Sun).
//
// Reference: Bate, Mueller & White, Fundamentals of Astrodynamics (1971),
// ch. 5 (the universal-variable solution of the Gauss problem); Curtis,
// Orbital Mechanics for Engineering Students (2005), §5.3, Algorithm 5.2.
func rgLambert(r1, r2 r3.Vec, dt, mu float64) (v1, v2 r3.Vec, ok bool) {
	n1, n2 := r3.Norm(r1), r3.Norm(r2)
	if !(dt > 0) || !(n1 > 0) || !(n2 > 0) || math.IsInf(dt, 0) {
		return r3.Vec{}, r3.Vec{}, false
	}
	a2 := n1*n2 + r3.Dot(r1, r2)
	if !(a2 > 1e-24*n1*n2) { // Δθ within about 1e-12 rad of π: the plane is undefined
		return r3.Vec{}, r3.Vec{}, false
	}
	A := math.Sqrt(a2)
	target := math.Sqrt(mu) * dt
	const zMax = 4 * math.Pi * math.Pi
	lo, hi := math.Inf(-1), zMax
	z := 0.0
	converged := false
	for range 100 {
		f, fp := rgLambertF(z, n1, n2, A, target)
		if f == 0 {
			converged = true
			break
		}
		if f < 0 {
			lo = z
		} else {
			hi = z
		}
		next := z - f/fp
		if !(next > lo && next < hi) || math.IsNaN(next) {
			switch {
			case math.IsInf(lo, -1):
				next = z - 2*math.Max(1, math.Abs(z)) // step down until F < 0
				if next < -4e5 {                      // the Stumpff functions overflow soon after
					return r3.Vec{}, r3.Vec{}, false
				}
			default:
				next = 0.5 * (lo + hi)
			}
		}
		done := math.Abs(next-z) <= 1e-14*math.Max(1, math.Abs(z)) || math.Abs(f) <= 1e-15*target
		z = next
		if done {
			converged = true
			break
		}
	}
	if !converged || !(z < zMax) {
		return r3.Vec{}, r3.Vec{}, false
	}
	_, _, c, s := ephem.Stumpff(z)
	y := n1 + n2 + A*(z*s-1)/math.Sqrt(c)
	if !(y > 0) {
		return r3.Vec{}, r3.Vec{}, false
	}
	f := 1 - y/n1
	g := A * math.Sqrt(y/mu)
	gd := 1 - y/n2
	v1 = r3.Scale(1/g, r3.Sub(r2, r3.Scale(f, r1)))
	v2 = r3.Scale(1/g, r3.Sub(r3.Scale(gd, r2), r1))
	if !rgFinite(v1) || !rgFinite(v2) {
		return r3.Vec{}, r3.Vec{}, false
	}
	return v1, v2, true
}

// rgLambertF returns F(z) = √mu·t(z) − √mu·dt of [rgLambert] (target =
// √mu·dt) and dF/dz, continued below the zero of y by F = y − target (F is
// then increasing on the whole line). The derivative follows from
// y′ = A·((S + zS′)/√C − (zS − 1)·C′/(2C^(3/2))), x = √(y/C),
// x′ = (y′/C − y·C′/C²)/(2x) and F′ = 3x²x′S + x³S′ + A·y′/(2√y), with the
// Stumpff identities C′ = (1 − zS − 2C)/(2z), S′ = (C − 3S)/(2z) (they
// follow from the series C = Σ(−z)ᵏ/(2k + 2)!, S = Σ(−z)ᵏ/(2k + 3)!; Bate,
// Mueller & White 1971, ch. 4), or the differentiated series
// −1/24 + z/360 − z²/13440 and −1/120 + z/2520 − z²/120960 for |z| < 0.01.
func rgLambertF(z, n1, n2, A, target float64) (f, fp float64) {
	_, _, c, s := ephem.Stumpff(z)
	var dc, ds float64
	if math.Abs(z) < 0.01 {
		dc = -1.0/24 + z/360 - z*z/13440
		ds = -1.0/120 + z/2520 - z*z/120960
	} else {
		dc = (1 - z*s - 2*c) / (2 * z)
		ds = (c - 3*s) / (2 * z)
	}
	sc := math.Sqrt(c)
	y := n1 + n2 + A*(z*s-1)/sc
	dy := A * ((s+z*ds)/sc - (z*s-1)*dc/(2*c*sc))
	if y <= 0 {
		return y - target, dy
	}
	x := math.Sqrt(y / c)
	dx := (dy/c - y*dc/(c*c)) / (2 * x)
	sy := math.Sqrt(y)
	return x*x*x*s + A*sy - target, 3*x*x*dx*s + x*x*x*ds + A*dy/(2*sy)
}

// rgFinite reports whether every component of v is finite.
func rgFinite(v r3.Vec) bool {
	s := v.X + v.Y + v.Z
	return !math.IsNaN(s) && !math.IsInf(s, 0) && !math.IsInf(v.X, 0) && !math.IsInf(v.Y, 0) && !math.IsInf(v.Z, 0)
}
