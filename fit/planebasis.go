package fit

import (
	"math"

	"arcfit/astro"

	"gonum.org/v1/gonum/spatial/r3"
)

// planeFrame holds the unit vectors of a tangent plane: P0 towards the
// tangent point, E0 and N0 its local east and north, so that a direction u
// has standard coordinates ξ = u·E0 / u·P0, η = u·N0 / u·P0 (the gnomonic
// projection, Calabretta & Greisen 2002, §5.1.3, written with vectors).
type planeFrame struct {
	p0, e0, n0 r3.Vec
}

func newPlaneFrame(tp astro.TangentPlane) planeFrame {
	sa, ca := math.Sincos(float64(tp.RA0))
	sd, cd := math.Sincos(float64(tp.Dec0))
	return planeFrame{
		p0: r3.Vec{X: cd * ca, Y: cd * sa, Z: sd},
		e0: r3.Vec{X: -sa, Y: ca, Z: 0},
		n0: r3.Vec{X: -sd * ca, Y: -sd * sa, Z: cd},
	}
}

// direction returns the unit vector of the plane point (ξ, η):
// u = (P0 + ξ E0 + η N0)/√(1 + ξ² + η²), the inverse of the projection.
func (f planeFrame) direction(xi, eta float64) r3.Vec {
	v := r3.Add(f.p0, r3.Add(r3.Scale(xi, f.e0), r3.Scale(eta, f.n0)))
	return r3.Scale(1/r3.Norm(v), v)
}

// gradients returns the gradients gξ, gη of the standard coordinates with
// respect to a small displacement d of the unit vector u:
//
//	dξ = gξ·d,  gξ = (E0 − ξ P0)/(u·P0)
//	dη = gη·d,  gη = (N0 − η P0)/(u·P0)
//
// obtained by differentiating ξ = u·E0/u·P0 (quotient rule). They are exact
// first derivatives at u; a displacement along u itself changes nothing
// (gξ·u = 0).
func (f planeFrame) gradients(u r3.Vec) (gxi, geta r3.Vec) {
	c := r3.Dot(u, f.p0)
	xi := r3.Dot(u, f.e0) / c
	eta := r3.Dot(u, f.n0) / c
	gxi = r3.Scale(1/c, r3.Sub(f.e0, r3.Scale(xi, f.p0)))
	geta = r3.Scale(1/c, r3.Sub(f.n0, r3.Scale(eta, f.p0)))
	return gxi, geta
}

// localEastNorth returns the unit vectors of local east (increasing RA) and
// north at the direction u. At a celestial pole, where east is undefined, the
// tangent point's own axes are used.
func localEastNorth(u r3.Vec) (e, n r3.Vec) {
	h := math.Hypot(u.X, u.Y)
	if h < 1e-15 {
		return r3.Vec{X: 0, Y: 1}, r3.Vec{X: -1}
	}
	e = r3.Vec{X: -u.Y / h, Y: u.X / h}
	n = r3.Cross(u, e)
	return e, n
}

// skyToPlane returns the Jacobian J = ∂(ξ, η)/∂(east, north) at the plane
// point (ξ, η): a small offset on the sky of dE (RA·cos δ) and dN (Dec) radians
// moves the point by (dξ, dη) = J (dE, dN). At the tangent point J is the
// identity; 1° away it departs from a rotation by parts in 10⁴ (the
// 1/cos ρ and 1/cos² ρ scales of the gnomonic projection) and the rotation
// angle is the convergence of the meridians, about Δα sin δ.
//
// It is computed in closed form from the expressions of direction,
// gradients and localEastNorth: with ρ = √(1 + ξ² + η²) (|P0 + ξE0 + ηN0|,
// the three axes being orthonormal), u = (P0 + ξE0 + ηN0)/ρ, u·P0 = 1/ρ, so
// gξ = ρ(E0 − ξP0), gη = ρ(N0 − ηP0); with h = √(u_x² + u_y²) the local east
// is (−u_y, u_x, 0)/h and north u × east = (−u_z u_x/h, −u_z u_y/h, h). This
// is the same algebra without the square roots of the general vector norms
// (it differs from composing the three functions by rounding only), which
// makes it cheap enough to run for every point of a large fit.
func (f planeFrame) skyToPlane(xi, eta float64) [2][2]float64 {
	rho := math.Sqrt(1 + xi*xi + eta*eta)
	ir := 1 / rho
	ux := (f.p0.X + xi*f.e0.X + eta*f.n0.X) * ir
	uy := (f.p0.Y + xi*f.e0.Y + eta*f.n0.Y) * ir
	uz := (f.p0.Z + xi*f.e0.Z + eta*f.n0.Z) * ir
	gx := r3.Scale(rho, r3.Sub(f.e0, r3.Scale(xi, f.p0)))
	ge := r3.Scale(rho, r3.Sub(f.n0, r3.Scale(eta, f.p0)))
	var e, n r3.Vec
	if h := math.Sqrt(ux*ux + uy*uy); h < 1e-15 {
		e, n = localEastNorth(r3.Vec{X: ux, Y: uy, Z: uz}) // at a pole
	} else {
		ih := 1 / h
		e = r3.Vec{X: -uy * ih, Y: ux * ih}
		n = r3.Vec{X: -uz * ux * ih, Y: -uz * uy * ih, Z: h}
	}
	return [2][2]float64{
		{r3.Dot(gx, e), r3.Dot(gx, n)},
		{r3.Dot(ge, e), r3.Dot(ge, n)},
	}
}

// inv2 returns the inverse of a 2×2 matrix (misuse panics on a singular one).
func inv2(m [2][2]float64) [2][2]float64 {
	det := m[0][0]*m[1][1] - m[0][1]*m[1][0]
	return [2][2]float64{
		{m[1][1] / det, -m[0][1] / det},
		{-m[1][0] / det, m[0][0] / det},
	}
}

// congruence returns M C Mᵀ for 2×2 matrices (the propagation of a covariance).
func congruence(m, c [2][2]float64) [2][2]float64 {
	var t, r [2][2]float64
	for i := 0; i < 2; i++ {
		for j := 0; j < 2; j++ {
			t[i][j] = m[i][0]*c[0][j] + m[i][1]*c[1][j]
		}
	}
	for i := 0; i < 2; i++ {
		for j := 0; j < 2; j++ {
			r[i][j] = t[i][0]*m[j][0] + t[i][1]*m[j][1]
		}
	}
	return r
}
