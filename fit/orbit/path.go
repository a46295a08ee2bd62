package orbit

import (
	"errors"
	"fmt"
	"math"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// Path is an orbit propagated once to a set of TDB instants, its anchors:
// an arc's observations, or the instants of a prediction. The computed place
// for an observer near an anchor ([Path.Observe]) is formed by a two-body
// step from the state integrated there to the light-time instant t − τ.
//
// The step neglects the perturbation over τ: the planets' acceleration
// relative to the Sun's, a_p (direct minus indirect term), moves the body by
// ½·a_p·τ² against the two-body step, which subtends
//
//	½·a_p·τ²/Δ = a_p·Δ/(2c²)   (τ = Δ/c, c² = 29 979 au²/day²)
//
// at the observer: for a main-belt object with Jupiter on its side
// (a_p ≲ GM_J/(2.6 au)² + GM_J/(5.2 au)² ≈ 5e-8 au/day², GM_J = 2.83e-7
// au³/day² of DE405) seen at Δ = 8.7 au (τ = 0.05 d, the longest of an
// amateur's targets) it is 7e-12 rad (1.5e-6″); for a comet 0.1 au from
// Jupiter (a_p ≈ 2.8e-5 au/day²) at Δ = 6 au, 3e-4″; for a body passing the
// Earth (a_p = GM_E/Δ², GM_E = 8.89e-10 au³/day²) it is GM_E/(2c²Δ) =
// 1.5e-14 rad/Δ(au), 3e-5″ at 15 000 km. Within a step of one minute (the
// rate of a prediction) the same figures hold with τ replaced by 1 min.
//
// A Path of a two-body State (Motion nil) integrates nothing: its places are
// those of [State.Observe], bit for bit.
type Path struct {
	// State is the orbit propagated; Anchors the TDB instants, in the order
	// asked.
	State   State
	Anchors []astro.JD
	// Encounters are the close approaches the integration found between
	// the epoch and the anchors; Steps the integrator's steps.
	Encounters []Encounter
	Steps      int

	states [][6]float64  // at each anchor; nil for a two-body State
	stm    [][36]float64 // ∂states[k]/∂x(epoch), row-major, when asked
}

// Propagate integrates the state's Motion once from the epoch to every TDB
// instant of tdbs (duplicates integrated once), with the state transition
// matrices when stm is true, and returns the Path. For a two-body State
// (Motion nil) nothing is integrated and stm must be false (the two-body
// fit forms its partial derivatives by differences).
//
// Errors: those of the Motion (an integration that cannot meet its
// tolerance, an instant beyond the planetary theory's span), wrapped; a
// result of the wrong shape or not finite.
func (s State) Propagate(tdbs []astro.JD, stm bool) (*Path, error) {
	p := &Path{State: s, Anchors: append([]astro.JD(nil), tdbs...)}
	if s.Motion == nil {
		if stm {
			return nil, errNoMotion
		}
		return p, nil
	}
	if !s.Valid() {
		return nil, errors.New("orbit: state not finite")
	}
	uniq, idx := uniqueInstants(tdbs)
	res, err := s.Motion.Propagate(s.Epoch, stateVector(s), uniq, stm)
	if err != nil {
		return nil, fmt.Errorf("orbit: %w", err)
	}
	if res == nil || len(res.States) != len(uniq) || (stm && len(res.STM) != len(uniq)) {
		return nil, fmt.Errorf("orbit: the %s propagation returned a result of the wrong shape", s.Motion.Name())
	}
	p.states = make([][6]float64, len(tdbs))
	if stm {
		p.stm = make([][36]float64, len(tdbs))
	}
	for i, j := range idx {
		p.states[i] = res.States[j]
		for _, v := range p.states[i] {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("orbit: the %s propagation to %v gave a state that is not finite", s.Motion.Name(), tdbs[i])
			}
		}
		if stm {
			p.stm[i] = res.STM[j]
		}
	}
	p.Encounters = append([]Encounter(nil), res.Encounters...)
	p.Steps = res.Steps
	return p, nil
}

// uniqueInstants returns the distinct instants of ts in their first order
// and, for each element of ts, the index of its instant there.
func uniqueInstants(ts []astro.JD) ([]astro.JD, []int) {
	seen := make(map[[2]float64]int, len(ts))
	uniq := make([]astro.JD, 0, len(ts))
	idx := make([]int, len(ts))
	for i, t := range ts {
		k := [2]float64{t.Day, t.Frac}
		j, ok := seen[k]
		if !ok {
			j = len(uniq)
			seen[k] = j
			uniq = append(uniq, t)
		}
		idx[i] = j
	}
	return uniq, idx
}

// Anchor returns the state at anchor k as a two-body State at that instant
// (Motion nil): the osculating orbit there, good for short steps.
func (p *Path) Anchor(k int) (State, error) {
	if p.states == nil {
		pos, vel, err := p.State.At(p.Anchors[k])
		if err != nil {
			return State{}, err
		}
		return State{Epoch: p.Anchors[k], Pos: pos, Vel: vel}, nil
	}
	x := p.states[k]
	return State{Epoch: p.Anchors[k], Pos: r3.Vec{X: x[0], Y: x[1], Z: x[2]}, Vel: r3.Vec{X: x[3], Y: x[4], Z: x[5]}}, nil
}

// STM returns the state transition matrix ∂x(anchor k)/∂x(epoch), row-major,
// when the path was propagated with it.
func (p *Path) STM(k int) ([36]float64, bool) {
	if p.stm == nil {
		return [36]float64{}, false
	}
	return p.stm[k], true
}

// Observe returns where the orbit is seen by the observer g, from anchor k
// (an instant near g.TDB): the place of [State.Observe] for the two-body
// orbit osculating at the anchor (its light time by a two-body step). For a
// two-body Path it is s.Observe(g) exactly.
func (p *Path) Observe(k int, g ephem.ObserverGeometry) (Seen, error) {
	if p.states == nil {
		return p.State.Observe(g)
	}
	a, err := p.Anchor(k)
	if err != nil {
		return Seen{}, err
	}
	return a.Observe(g)
}

// observePartials returns the place of [Path.Observe] from anchor k and the
// partial derivatives of its direction u (a unit vector) with respect to the
// state at the epoch, ∂u/∂x₀ (3×6), by the chain rule
//
//	∂u/∂x₀ = (I − u·uᵀ)/Δ · ∂p/∂x_a · Φ_a,
//
// Φ_a the state transition matrix to the anchor and p the observer-to-body
// vector p = h(t − τ) − τ·Ṡ − O (as [ephem.ObserverGeometry.Direction] forms
// it). The light time τ = |p|/c moves with p, dτ = u·dp/c, so
//
//	dp = (I − w·uᵀ/(c + u·w)) · dh,   w = ḣ(t − τ) + Ṡ,
//
// and dh = ∂h/∂x_a·dx_a for the two-body step Δt = t − τ − t_a from the
// anchor, taken to the order that matters: ∂h/∂r_a = I + ½Δt²·A and
// ∂h/∂v_a = Δt·I + Δt³/6·A, A = GM/r³·(3·r̂r̂ᵀ − I) the gradient of the
// Sun's acceleration (Taylor series of the motion). The next terms are of
// relative order Δt³·GM·v/r⁴: below 1e-9 for a light-time step (Δt ≤ 0.05 d,
// v ≤ 0.03 au/day) at r ≥ 1 au and 2e-7 at r = 0.3 au, far below what the
// partials serve (they steer the correction and shape the covariance).
//
// Reference: Montenbruck & Gill, Satellite Orbits (2000), §7.1 (the
// partials of an observation through the state transition matrix) and
// §3.1 (the gradient of a point mass's acceleration); Explanatory
// Supplement to the Astronomical Almanac (2013), ch. 7 (light time).
func (p *Path) observePartials(k int, g ephem.ObserverGeometry) (Seen, [3][6]float64, error) {
	var du [3][6]float64
	if p.stm == nil {
		return Seen{}, du, errNoMotion
	}
	a, err := p.Anchor(k)
	if err != nil {
		return Seen{}, du, err
	}
	seen, err := a.Observe(g)
	if err != nil {
		return Seen{}, du, err
	}
	dt := (g.TDB.Day - a.Epoch.Day) + (g.TDB.Frac - a.Epoch.Frac) - seen.TauDays
	_, vh, err := ephem.PropagateUniversal(a.Pos, a.Vel, dt, ephem.GMSun)
	if err != nil {
		return Seen{}, du, fmt.Errorf("orbit: %w", err)
	}
	// ∂h/∂x_a, 3×6.
	r := r3.Norm(a.Pos)
	rh := r3.Scale(1/r, a.Pos)
	gm := ephem.GMSun / (r * r * r)
	rv := [3]float64{rh.X, rh.Y, rh.Z}
	var mh [3][6]float64
	for i := range 3 {
		for j := range 3 {
			aij := gm * 3 * rv[i] * rv[j]
			if i == j {
				aij -= gm
			}
			mh[i][j] = 0.5 * dt * dt * aij
			mh[i][j+3] = dt * dt * dt / 6 * aij
			if i == j {
				mh[i][j]++
				mh[i][j+3] += dt
			}
		}
	}
	u := seen.Dir
	uv := [3]float64{u.X, u.Y, u.Z}
	w := r3.Add(vh, g.SunBaryVel)
	wv := [3]float64{w.X, w.Y, w.Z}
	den := astro.SpeedOfLightAUDay + r3.Dot(u, w)
	// dp/dx_a = (I − w·uᵀ/den)·mh, then du/dx_a = (I − u·uᵀ)·dp/dx_a / Δ.
	var dp, dua [3][6]float64
	for j := range 6 {
		ud := uv[0]*mh[0][j] + uv[1]*mh[1][j] + uv[2]*mh[2][j]
		for i := range 3 {
			dp[i][j] = mh[i][j] - wv[i]*ud/den
		}
		up := uv[0]*dp[0][j] + uv[1]*dp[1][j] + uv[2]*dp[2][j]
		for i := range 3 {
			dua[i][j] = (dp[i][j] - uv[i]*up) / seen.DeltaAU
		}
	}
	phi := &p.stm[k]
	for i := range 3 {
		for j := range 6 {
			s := 0.0
			for l := range 6 {
				s += dua[i][l] * phi[l*6+j]
			}
			du[i][j] = s
		}
	}
	return seen, du, nil
}

// residualPartials returns the partial derivatives of the residual
// (dE, dN) = [Residual](ra, dec, c) of the observed place (ra, dec) about the
// computed direction c when c moves by du (3×n, n ≤ 6 parameters): the
// exact derivative of the standard coordinates about c, the local east e
// and north n = c × e moving with c,
//
//	dE = o·de/(o·c) − (o·e)(o·dc)/(o·c)²,   dN likewise with n,
//	de = (I − e·eᵀ)·(ẑ × dc)/|ẑ × c|,   dn = dc × e + c × de,
//
// o the observed unit vector (at a pole e is fixed, de = 0).
func residualPartials(ra, dec astro.Angle, c r3.Vec, du *[3][6]float64) (dEdx, dNdx [6]float64) {
	o := astro.UnitVector(ra, dec)
	e, n := EastNorth(c)
	w := r3.Dot(o, c)
	oe, on := r3.Dot(o, e), r3.Dot(o, n)
	h := math.Hypot(c.X, c.Y)
	for j := range 6 {
		dc := r3.Vec{X: du[0][j], Y: du[1][j], Z: du[2][j]}
		var de r3.Vec
		if h > 1e-15 {
			da := r3.Vec{X: -dc.Y, Y: dc.X}
			de = r3.Scale(1/h, r3.Sub(da, r3.Scale(r3.Dot(e, da), e)))
		}
		dn := r3.Add(r3.Cross(dc, e), r3.Cross(c, de))
		dw := r3.Dot(o, dc)
		dEdx[j] = r3.Dot(o, de)/w - oe*dw/(w*w)
		dNdx[j] = r3.Dot(o, dn)/w - on*dw/(w*w)
	}
	return dEdx, dNdx
}
