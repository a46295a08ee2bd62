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
// t(z) = dt is bracketed and found by the Illinois variant of regula falsi
// (bisection where it stalls). Then f = 1 − y/r₁, g = A·√(y/mu),
// ġ = 1 − y/r₂ and
//
//	v₁ = (r⃗₂ − f·r⃗₁)/g,   v₂ = (ġ·r⃗₂ − r⃗₁)/g.
//
// The second form of A has no cancellation for small Δθ (the short arcs of
// ranging, where r⃗₁ and r⃗₂ are a fraction of a degree apart seen from the
// Sun).
//
// Reference: Bate, Mueller & White, Fundamentals of Astrodynamics (1971),
// §5.3 (the universal-variable solution of the Gauss problem); Curtis,
// Orbital Mechanics for Engineering Students (2005), §5.3, Algorithm 5.2;
// Dowell & Jarratt, BIT 11 (1971), 168 (the Illinois method).
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
	// F(z) = √mu·t(z) − √mu·dt, continued below the zero of y by y itself
	// (F is then increasing through the whole real line).
	F := func(z float64) (float64, float64) {
		_, _, c, s := ephem.Stumpff(z)
		y := n1 + n2 + A*(z*s-1)/math.Sqrt(c)
		if y <= 0 {
			return y - target, y
		}
		x := math.Sqrt(y / c)
		return x*x*x*s + A*math.Sqrt(y) - target, y
	}
	const zMax = 4 * math.Pi * math.Pi
	hi := zMax * (1 - 1e-9)
	fhi, _ := F(hi)
	if !(fhi > 0) {
		return r3.Vec{}, r3.Vec{}, false // would need more than one revolution
	}
	lo := 0.0
	flo, _ := F(lo)
	if flo > 0 {
		hi, fhi = lo, flo
		lo = -1
		for {
			flo, _ = F(lo)
			if flo < 0 {
				break
			}
			hi, fhi = lo, flo
			lo *= 4
			if lo < -4e5 { // the Stumpff functions overflow soon after
				return r3.Vec{}, r3.Vec{}, false
			}
		}
	}
	z := lo
	side := 0
	for range 200 {
		if flo == 0 {
			z = lo
			break
		}
		z = (lo*fhi - hi*flo) / (fhi - flo)
		if !(z > lo && z < hi) {
			z = 0.5 * (lo + hi)
		}
		fz, _ := F(z)
		if fz == 0 || hi-lo <= 1e-15*math.Max(1, math.Abs(z)) {
			break
		}
		if fz < 0 {
			lo, flo = z, fz
			if side == -1 {
				fhi *= 0.5
			}
			side = -1
		} else {
			hi, fhi = z, fz
			if side == 1 {
				flo *= 0.5
			}
			side = 1
		}
		if math.Abs(fz) <= 1e-15*target {
			break
		}
	}
	_, y := F(z)
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

// rgFinite reports whether every component of v is finite.
func rgFinite(v r3.Vec) bool {
	s := v.X + v.Y + v.Z
	return !math.IsNaN(s) && !math.IsInf(s, 0) && !math.IsInf(v.X, 0) && !math.IsInf(v.Y, 0) && !math.IsInf(v.Z, 0)
}
