package orbit

import (
	"errors"
	"fmt"
	"math"

	"arcfit/ephem"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// GaussInput is the data of Gauss's method for three observations of a body
// moving about one attracting centre, in any consistent units of length and
// time (au and days about the Sun; km and seconds about the Earth).
type GaussInput struct {
	// T are the three observation times, strictly increasing. With a light-
	// time correction they are the times the light arrived.
	T [3]float64
	// L are the unit vectors along the three lines of sight, from the
	// observer towards the body.
	L [3]r3.Vec
	// R are the observer's positions relative to the attracting centre at
	// the times T.
	R [3]r3.Vec
	// Mu is the centre's gravitational parameter, length³/time², > 0.
	Mu float64
	// C is the speed of light, length/time, for the light-time correction
	// of the refinement: the body seen at T[i] at distance ρ[i] was there at
	// T[i] − ρ[i]/C. Zero leaves the times uncorrected (a satellite seen from
	// the ground: light time is below a millisecond).
	C float64
	// CentreVel is, for each observation, the attracting centre's velocity in
	// the frame in which light travels straight (for the Sun, its velocity
	// about the solar-system barycentre). The body seen along L[i] at
	// distance ρ[i] is then at R[i] + ρ[i]·(L[i] + CentreVel[i]/C) relative
	// to the centre at T[i] − ρ[i]/C: the centre's displacement during the
	// light time, to first order. Zero vectors for none; ignored when C = 0.
	CentreVel [3]r3.Vec
	// MinRange is the smallest admissible distance from the observer: a
	// solution with any ρ[i] ≤ MinRange is rejected (0 rejects ρ ≤ 0).
	MinRange float64
	// MinRadius is the smallest admissible distance from the centre at the
	// three observations (the planet's radius, for a satellite); 0 for none.
	MinRadius float64
	// NoRefinement returns the first approximation only (the f and g series
	// truncated after their first terms), without the iterative refinement.
	NoRefinement bool
}

// GaussSolution is one solution of Gauss's method: the body's position and
// velocity relative to the centre at the middle observation.
type GaussSolution struct {
	// Pos and Vel are the position and velocity at the time Epoch.
	Pos, Vel r3.Vec
	// Epoch is the time of Pos and Vel: T[1] − Range[1]/C with a light-time
	// correction, T[1] without.
	Epoch float64
	// Range are the distances ρ from the observer at the three observations.
	Range [3]float64
	// Root is the root of the eighth-degree equation (the middle distance
	// from the centre, first approximation) the solution started from.
	Root float64
	// Iterations is the number of Newton steps of the refinement (over all
	// its light-time passes); Converged reports whether it converged. When the refinement fails (diverges,
	// or leaves the admissible region) the first approximation is returned
	// with Converged false.
	Iterations int
	Converged  bool
}

// Convergence and limits of the refinement.
const (
	// gaussTol is the size of the fixed-point residual (position and
	// velocity relative to their own sizes) at which the refinement stops:
	// the fixed point reached to rounding.
	gaussTol = 1e-13
	// gaussFloor: a residual below this that Newton's method no longer
	// halves in a step is at the rounding floor (about 1e-13 for these
	// propagations) and counts as converged.
	gaussFloor = 1e-10
	// gaussLightTol is the relative change of the distances between two
	// light-time passes at which the times count as converged: 1e-11 of
	// 10 au moves a time by 6e-12 d.
	gaussLightTol = 1e-11
	// gaussMaxNewton bounds the Newton steps for one set of times, and
	// gaussMaxLightPasses the light-time passes.
	gaussMaxNewton      = 40
	gaussMaxLightPasses = 8
	// gaussFDStep is the relative step of the finite-difference Jacobian.
	gaussFDStep = 1e-7
	// gaussMinD0 is the smallest |D0| (the triple product of the three unit
	// lines of sight) the method accepts: below it the lines of sight are
	// coplanar to rounding.
	gaussMinD0 = 1e-14
)

// Gauss returns every admissible solution of Gauss's method of initial orbit
// determination for the three observations of in, each at the middle time.
//
// With τ1 = T1 − T2, τ3 = T3 − T2, τ = τ3 − τ1, the cross products
// p1 = L2×L3, p2 = L1×L3, p3 = L1×L2, D0 = L1·p1 and Dij = Ri·pj, the
// middle distance ρ2 = A + μB/r2³ with
//
//	A = (−D12·τ3/τ + D22 + D32·τ1/τ)/D0,
//	B = (D12·(τ3² − τ²)·τ3/τ + D32·(τ² − τ1²)·τ1/τ)/(6·D0),
//
// and r2² = ρ2² + 2ρ2·E + R2², E = R2·L2, give the eighth-degree equation
//
//	r2⁸ + a·r2⁶ + b·r2³ + c = 0,
//	a = −(A² + 2A·E + R2²),  b = −2μB(A + E),  c = −μ²B².
//
// Every real positive root is taken (companion-matrix eigenvalues polished
// by Newton's method; at most three by Descartes' rule). For each, the f and g series truncated after their first
// terms give c1 = (τ3/τ)(1 + μ(τ² − τ3²)/(6r2³)), c3 = −(τ1/τ)(1 + μ(τ² −
// τ1²)/(6r2³)), the three distances from c1·r1 − r2 + c3·r3 = 0 (r_i = R_i +
// ρ_i·L_i, solved by Cramer's rule: ρ1 = w·p1/(c1·D0), ρ2 = w·p2/D0,
// ρ3 = w·p3/(c3·D0) with w = −(c1R1 − R2 + c3R3)), and the velocity
// v2 = (−f3·r1 + f1·r3)/(f1·g3 − f3·g1). A root whose distances are not all
// above MinRange, or whose positions come within MinRadius of the centre, is
// rejected.
//
// The refinement then replaces the series by the exact f and g of the
// current (r2, v2) for the intervals τ1, τ3 (two-body motion by universal
// variables, [ephem.PropagateUniversal], f and g read off the propagated
// position p = f·r2 + g·v2 as f = (p×v2)·h/h², g = (r2×p)·h/h², h = r2×v2),
// c1 = g3/(f1g3 − f3g1), c3 = −g1/(f1g3 − f3g1), and solves again for the
// distances and v2: a map G from (r2, v2) to the next (r2, v2) whose fixed
// point is the exact solution. Curtis iterates G itself; that can diverge
// (it does for a comet near perihelion, and oscillates for Curtis's own
// example), so the fixed point G(x) = x is found here by Newton's method,
// with a finite-difference Jacobian and step halving while the residual
// |G(x) − x| (position and velocity relative to their sizes) does not
// decrease, to 1e-13. The light time is an outer iteration: the times
// T_i − ρ_i/C from the current distances, the fixed point for those times,
// and again until the times no longer change.
//
// With a light-time correction the lines of sight enter the equations as
// L_i + CentreVel_i/C (see [GaussInput.CentreVel]); they are then not exactly
// unit vectors, and the first approximation uses |L2|² in place of 1:
// a = −(|L2|²A² + 2AE + R2²), b = −2μB(|L2|²A + E), c = −|L2|²μ²B².
//
// Errors: invalid input (times not increasing, non-finite vectors, μ ≤ 0,
// lines of sight not unit vectors); the lines of sight coplanar to rounding
// (|D0| < 1e-14), or no admissible root, as a *[DegenerateError].
//
// Reference: Curtis, Orbital Mechanics for Engineering Students (2005),
// §5.10, Algorithms 5.5 (Gauss's method) and 5.6 (its iterative improvement
// with universal-variable f and g) (section and algorithm numbers from
// memory); Gauss, Theoria motus corporum coelestium (1809), book II. The
// light-time correction of the observation times is common practice.
func Gauss(in GaussInput) ([]GaussSolution, error) {
	if err := in.check(); err != nil {
		return nil, err
	}
	los := in.lines()
	p1 := r3.Cross(los[1], los[2])
	p2 := r3.Cross(los[0], los[2])
	p3 := r3.Cross(los[0], los[1])
	d0 := r3.Dot(los[0], p1)
	scale := r3.Norm(los[0]) * r3.Norm(los[1]) * r3.Norm(los[2])
	if !(math.Abs(d0) >= gaussMinD0*scale) {
		return nil, &DegenerateError{Case: DegenerateGreatCircle,
			Reason: fmt.Sprintf("the three lines of sight are coplanar to rounding (D0 = %.3g)", d0),
			Hint:   "observations whose track shows curvature: a longer arc, or a third night"}
	}
	tau1 := in.T[0] - in.T[1]
	tau3 := in.T[2] - in.T[1]
	tau := tau3 - tau1
	d12 := r3.Dot(in.R[0], p2)
	d22 := r3.Dot(in.R[1], p2)
	d32 := r3.Dot(in.R[2], p2)
	A := (-d12*tau3/tau + d22 + d32*tau1/tau) / d0
	B := (d12*(tau3*tau3-tau*tau)*tau3/tau + d32*(tau*tau-tau1*tau1)*tau1/tau) / (6 * d0)
	E := r3.Dot(in.R[1], los[1])
	l2 := r3.Norm2(los[1])
	R2sq := r3.Norm2(in.R[1])
	mu := in.Mu
	a := -(l2*A*A + 2*A*E + R2sq)
	b := -2 * mu * B * (l2*A + E)
	c := -l2 * mu * mu * B * B

	g := gaussGeom{in: &in, los: los, p: [3]r3.Vec{p1, p2, p3}, d0: d0}
	var sols []GaussSolution
	for _, x := range octicPositiveRoots(a, b, c) {
		first, ok := g.firstApproximation(x)
		if !ok {
			continue
		}
		sol := first
		if !in.NoRefinement {
			sol = g.refine(first)
		}
		sols = append(sols, sol)
	}
	if len(sols) == 0 {
		return nil, &DegenerateError{Case: DegenerateNoSolution,
			Reason: "no root of the eighth-degree equation gives positive distances from the observer",
			Hint:   "observations better spread over a longer arc"}
	}
	return sols, nil
}

// check reports invalid input to [Gauss].
func (in *GaussInput) check() error {
	if !(in.Mu > 0) || math.IsInf(in.Mu, 0) {
		return fmt.Errorf("orbit: Gauss: μ = %g, want a finite μ > 0", in.Mu)
	}
	if !(in.C >= 0) || math.IsInf(in.C, 0) {
		return fmt.Errorf("orbit: Gauss: speed of light %g, want a finite C ≥ 0 (0 for none)", in.C)
	}
	if !(in.MinRange >= 0) || !(in.MinRadius >= 0) || math.IsInf(in.MinRange, 0) || math.IsInf(in.MinRadius, 0) {
		return fmt.Errorf("orbit: Gauss: MinRange %g, MinRadius %g, want finite values ≥ 0", in.MinRange, in.MinRadius)
	}
	for i := range 3 {
		if math.IsNaN(in.T[i]) || math.IsInf(in.T[i], 0) {
			return fmt.Errorf("orbit: Gauss: time %d is not finite", i+1)
		}
		if !gaussFinite(in.L[i]) || !gaussFinite(in.R[i]) || !gaussFinite(in.CentreVel[i]) {
			return fmt.Errorf("orbit: Gauss: vectors of observation %d are not finite", i+1)
		}
		if math.Abs(r3.Norm(in.L[i])-1) > 1e-9 {
			return fmt.Errorf("orbit: Gauss: line of sight %d has length %g, want a unit vector", i+1, r3.Norm(in.L[i]))
		}
	}
	if !(in.T[0] < in.T[1] && in.T[1] < in.T[2]) {
		return fmt.Errorf("orbit: Gauss: times %g, %g, %g, want strictly increasing", in.T[0], in.T[1], in.T[2])
	}
	return nil
}

// lines returns the effective lines of sight L_i + CentreVel_i/C.
func (in *GaussInput) lines() [3]r3.Vec {
	los := in.L
	if in.C > 0 {
		for i := range 3 {
			los[i] = r3.Add(los[i], r3.Scale(1/in.C, in.CentreVel[i]))
		}
	}
	return los
}

// gaussGeom is the fixed geometry of one application of Gauss's method.
type gaussGeom struct {
	in  *GaussInput
	los [3]r3.Vec // effective lines of sight
	p   [3]r3.Vec // p1 = L2×L3, p2 = L1×L3, p3 = L1×L2
	d0  float64
}

// ranges solves c1·r1 − r2 + c3·r3 = 0 for the three distances (Cramer's
// rule with the triple products of the lines of sight).
func (g *gaussGeom) ranges(c1, c3 float64) [3]float64 {
	R := g.in.R
	w := r3.Scale(-1, r3.Add(r3.Sub(r3.Scale(c1, R[0]), R[1]), r3.Scale(c3, R[2])))
	return [3]float64{
		r3.Dot(w, g.p[0]) / (c1 * g.d0),
		r3.Dot(w, g.p[1]) / g.d0,
		r3.Dot(w, g.p[2]) / (c3 * g.d0),
	}
}

// positions returns r_i = R_i + ρ_i·L_i.
func (g *gaussGeom) positions(rho [3]float64) [3]r3.Vec {
	var r [3]r3.Vec
	for i := range 3 {
		r[i] = r3.Add(g.in.R[i], r3.Scale(rho[i], g.los[i]))
	}
	return r
}

// admissible reports whether the distances and positions are finite, the
// distances above MinRange and the positions outside MinRadius.
func (g *gaussGeom) admissible(rho [3]float64, r [3]r3.Vec, v r3.Vec) bool {
	for i := range 3 {
		if !(rho[i] > g.in.MinRange) || math.IsInf(rho[i], 0) || !gaussFinite(r[i]) {
			return false
		}
		if !(r3.Norm(r[i]) > g.in.MinRadius) {
			return false
		}
	}
	return gaussFinite(v)
}

// gaussFG holds the Lagrange coefficients f and g of the two outer
// observations relative to the middle one.
type gaussFG struct{ f1, g1, f3, g3 float64 }

// firstApproximation returns the solution of the truncated f and g series for
// the root x (the middle distance from the centre).
func (g *gaussGeom) firstApproximation(x float64) (GaussSolution, bool) {
	T := g.in.T
	tau1, tau3 := T[0]-T[1], T[2]-T[1]
	tau := tau3 - tau1
	u := g.in.Mu / (x * x * x)
	c1 := tau3 / tau * (1 + u*(tau*tau-tau3*tau3)/6)
	c3 := -tau1 / tau * (1 + u*(tau*tau-tau1*tau1)/6)
	rho := g.ranges(c1, c3)
	r := g.positions(rho)
	fg := gaussFG{
		f1: 1 - 0.5*u*tau1*tau1, g1: tau1 - u*tau1*tau1*tau1/6,
		f3: 1 - 0.5*u*tau3*tau3, g3: tau3 - u*tau3*tau3*tau3/6,
	}
	v := gaussVelocity(r[0], r[2], fg)
	if !g.admissible(rho, r, v) {
		return GaussSolution{}, false
	}
	return GaussSolution{Pos: r[1], Vel: v, Epoch: g.epoch(rho), Range: rho, Root: x}, true
}

// epoch returns the time of the middle position, T2 − ρ2/C.
func (g *gaussGeom) epoch(rho [3]float64) float64 {
	if g.in.C > 0 {
		return g.in.T[1] - rho[1]/g.in.C
	}
	return g.in.T[1]
}

// refine finds the fixed point of the exact f and g map from the first
// approximation sol, with the light-time correction of the times. It returns
// sol with Converged false when that fails.
func (g *gaussGeom) refine(sol GaussSolution) GaussSolution {
	rho := sol.Range
	r2, v2 := sol.Pos, sol.Vel
	steps := 0
	for range gaussMaxLightPasses {
		t := g.lightTimes(rho)
		res, n, ok := g.newton(t, r2, v2)
		steps += n
		if !ok {
			sol.Iterations = steps
			return sol
		}
		moved := 0.0
		for i := range 3 {
			moved = math.Max(moved, math.Abs(res.rho[i]-rho[i])/res.rho[i])
		}
		rho, r2, v2 = res.rho, res.r2, res.v2
		if g.in.C == 0 || moved <= gaussLightTol {
			return GaussSolution{Pos: r2, Vel: v2, Epoch: g.epoch(rho), Range: rho, Root: sol.Root,
				Iterations: steps, Converged: true}
		}
	}
	sol.Iterations = steps
	return sol
}

// lightTimes returns the times T_i − ρ_i/C (T_i without a light-time
// correction).
func (g *gaussGeom) lightTimes(rho [3]float64) [3]float64 {
	t := g.in.T
	if g.in.C > 0 {
		for i := range 3 {
			t[i] -= rho[i] / g.in.C
		}
	}
	return t
}

// gaussStep is one evaluation of the exact f and g map.
type gaussStep struct {
	rho    [3]float64
	r2, v2 r3.Vec
}

// step evaluates the map G at (r2, v2) for the times t: exact f and g, the
// distances and the new middle position and velocity. ok is false when the
// propagation fails or the result is not admissible.
func (g *gaussGeom) step(t [3]float64, r2, v2 r3.Vec) (gaussStep, bool) {
	f1, g1, ok1 := gaussExactFG(r2, v2, t[0]-t[1], g.in.Mu)
	f3, g3, ok3 := gaussExactFG(r2, v2, t[2]-t[1], g.in.Mu)
	if !ok1 || !ok3 {
		return gaussStep{}, false
	}
	fg := gaussFG{f1: f1, g1: g1, f3: f3, g3: g3}
	den := f1*g3 - f3*g1
	if den == 0 || math.IsNaN(den) || math.IsInf(den, 0) {
		return gaussStep{}, false
	}
	rho := g.ranges(g3/den, -g1/den)
	r := g.positions(rho)
	v := gaussVelocity(r[0], r[2], fg)
	if !g.admissible(rho, r, v) {
		return gaussStep{}, false
	}
	return gaussStep{rho: rho, r2: r[1], v2: v}, true
}

// newton solves G(x) = x for x = (r2, v2) at the times t by Newton's method
// from (r2, v2), in variables scaled by |r2| and |v2|. It returns the map's
// value at the solution, the number of steps and whether it converged.
func (g *gaussGeom) newton(t [3]float64, r2, v2 r3.Vec) (gaussStep, int, bool) {
	sr, sv := r3.Norm(r2), r3.Norm(v2)
	if !(sr > 0) || !(sv > 0) {
		return gaussStep{}, 0, false
	}
	pack := func(r, v r3.Vec) [6]float64 {
		return [6]float64{r.X / sr, r.Y / sr, r.Z / sr, v.X / sv, v.Y / sv, v.Z / sv}
	}
	unpack := func(x [6]float64) (r3.Vec, r3.Vec) {
		return r3.Vec{X: x[0] * sr, Y: x[1] * sr, Z: x[2] * sr}, r3.Vec{X: x[3] * sv, Y: x[4] * sv, Z: x[5] * sv}
	}
	// resid returns G(x) − x (scaled), its norm and G's value.
	resid := func(x [6]float64) ([6]float64, float64, gaussStep, bool) {
		r, v := unpack(x)
		st, ok := g.step(t, r, v)
		if !ok {
			return [6]float64{}, math.Inf(1), gaussStep{}, false
		}
		gx := pack(st.r2, st.v2)
		var f [6]float64
		n := 0.0
		for i := range 6 {
			f[i] = gx[i] - x[i]
			n += f[i] * f[i]
		}
		return f, math.Sqrt(n), st, true
	}
	x := pack(r2, v2)
	f, norm, st, ok := resid(x)
	if !ok {
		return gaussStep{}, 0, false
	}
	jac := mat.NewDense(6, 6, nil)
	rhs := mat.NewVecDense(6, nil)
	var dx mat.VecDense
	for it := 1; it <= gaussMaxNewton; it++ {
		if norm <= gaussTol {
			return st, it - 1, true
		}
		for j := range 6 {
			xj := x
			xj[j] += gaussFDStep
			fj, _, _, okj := resid(xj)
			if !okj {
				xj[j] = x[j] - gaussFDStep
				fj, _, _, okj = resid(xj)
				if !okj {
					return gaussStep{}, it, false
				}
			}
			h := xj[j] - x[j]
			for i := range 6 {
				jac.Set(i, j, (fj[i]-f[i])/h)
			}
		}
		for i := range 6 {
			rhs.SetVec(i, -f[i])
		}
		if err := dx.SolveVec(jac, rhs); err != nil {
			var c mat.Condition
			if !errors.As(err, &c) {
				return gaussStep{}, it, false
			}
		}
		lambda := 1.0
		improved := false
		for range 30 {
			var xn [6]float64
			for i := range 6 {
				xn[i] = x[i] + lambda*dx.AtVec(i)
			}
			fn, nn, stn, okn := resid(xn)
			if okn && nn < norm {
				stalled := nn > 0.5*norm && nn <= gaussFloor
				x, f, norm, st = xn, fn, nn, stn
				if stalled {
					return st, it, true
				}
				improved = true
				break
			}
			lambda /= 2
		}
		if !improved {
			// No step reduces the residual: at the rounding floor, or stuck.
			return st, it, norm <= gaussFloor
		}
	}
	return st, gaussMaxNewton, norm <= gaussFloor
}

// gaussVelocity returns v2 = (−f3·r1 + f1·r3)/(f1·g3 − f3·g1), from r1 = f1·r2 +
// g1·v2 and r3 = f3·r2 + g3·v2 (Curtis 2005, §5.10).
func gaussVelocity(r1, r3v r3.Vec, c gaussFG) r3.Vec {
	return r3.Scale(1/(c.f1*c.g3-c.f3*c.g1), r3.Sub(r3.Scale(c.f1, r3v), r3.Scale(c.f3, r1)))
}

// gaussExactFG returns the exact Lagrange coefficients f and g of the two-body
// motion from (r, v) over dt: the position dt later, p = f·r + g·v, from
// [ephem.PropagateUniversal], gives f = (p×v)·h/h² and g = (r×p)·h/h² with
// h = r×v (the propagated position lies in the orbital plane).
func gaussExactFG(r, v r3.Vec, dt, mu float64) (f, g float64, ok bool) {
	p, _, err := ephem.PropagateUniversal(r, v, dt, mu)
	if err != nil {
		return 0, 0, false
	}
	h := r3.Cross(r, v)
	h2 := r3.Norm2(h)
	if !(h2 > 0) {
		return 0, 0, false
	}
	f = r3.Dot(r3.Cross(p, v), h) / h2
	g = r3.Dot(r3.Cross(r, p), h) / h2
	return f, g, !math.IsNaN(f+g) && !math.IsInf(f+g, 0)
}

// gaussFinite reports whether every component of v is finite.
func gaussFinite(v r3.Vec) bool {
	return !math.IsNaN(v.X) && !math.IsNaN(v.Y) && !math.IsNaN(v.Z) &&
		!math.IsInf(v.X, 0) && !math.IsInf(v.Y, 0) && !math.IsInf(v.Z, 0)
}
