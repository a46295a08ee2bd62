package orbit

import (
	"fmt"
	"math"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// State is a heliocentric orbit: position (au) and velocity (au/day) in ICRS
// axes at the TDB instant Epoch, moved by its Motion: two-body motion about
// the Sun with GM = ephem.GMSun when Motion is nil (the default), else the
// force model Motion names ([NBody]: the Sun, the planets and the Moon).
// Pos and Vel are then the osculating state at the epoch.
type State struct {
	Epoch    astro.JD // TDB
	Pos, Vel r3.Vec
	// Motion is the force model; nil for two-body motion.
	Motion Motion
}

// At returns the state's position and velocity at the TDB instant tdb: by
// two-body motion ([ephem.PropagateUniversal], universal variables) when
// Motion is nil, else by one integration of Motion.
func (s State) At(tdb astro.JD) (pos, vel r3.Vec, err error) {
	if s.Motion != nil {
		p, err := s.Propagate([]astro.JD{tdb}, false)
		if err != nil {
			return r3.Vec{}, r3.Vec{}, err
		}
		x := p.states[0]
		return r3.Vec{X: x[0], Y: x[1], Z: x[2]}, r3.Vec{X: x[3], Y: x[4], Z: x[5]}, nil
	}
	dt := (tdb.Day - s.Epoch.Day) + (tdb.Frac - s.Epoch.Frac)
	return ephem.PropagateUniversal(s.Pos, s.Vel, dt, ephem.GMSun)
}

// Valid reports whether every component is finite and the position non-zero.
func (s State) Valid() bool {
	for _, x := range [...]float64{s.Pos.X, s.Pos.Y, s.Pos.Z, s.Vel.X, s.Vel.Y, s.Vel.Z} {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return r3.Norm(s.Pos) > 0
}

// Energy returns the two-body specific orbital energy v²/2 − GM/r
// (au²/day²); negative for a bound (elliptic) orbit.
func (s State) Energy() float64 {
	return 0.5*r3.Dot(s.Vel, s.Vel) - ephem.GMSun/r3.Norm(s.Pos)
}

// Elements returns the osculating heliocentric elements of the state at its
// epoch, ecliptic and equinox J2000 ([ephem.ElementsFromState] after
// [ephem.ICRSToEclipticJ2000]).
func (s State) Elements() (ephem.Elements, error) {
	p := ephem.ICRSToEclipticJ2000.MulVec(s.Pos)
	v := ephem.ICRSToEclipticJ2000.MulVec(s.Vel)
	return ephem.ElementsFromState(p, v, s.Epoch, ephem.GMSun)
}

// StateFromElements returns the ICRS state of an element set at the TDB
// instant epoch ([ephem.Elements.StateAt], turned by
// [ephem.EclipticJ2000ToICRS]).
func StateFromElements(el ephem.Elements, epoch astro.JD) (State, error) {
	p, v, err := el.StateAt(epoch)
	if err != nil {
		return State{}, err
	}
	return State{Epoch: epoch, Pos: ephem.EclipticJ2000ToICRS.MulVec(p), Vel: ephem.EclipticJ2000ToICRS.MulVec(v)}, nil
}

// Seen is the computed place of an orbit for one observer and instant.
type Seen struct {
	Dir     r3.Vec  // astrometric direction, ICRS unit vector
	DeltaAU float64 // distance from the observer at the light-time instant
	TauDays float64 // light time
	// Helio is the body's heliocentric position at t − τ (au), RAU its norm.
	Helio r3.Vec
	RAU   float64
}

// Observe returns where the orbit s is seen by the observer g: the
// astrometric direction of the light-time-retarded heliocentric position
// (see [ephem.ObserverGeometry.Direction]). A State with a Motion is
// integrated to g.TDB and the light time taken by a two-body step from
// there ([Path.Observe]); for many observers, [State.Propagate] once and
// [Path.Observe] each.
func (s State) Observe(g ephem.ObserverGeometry) (Seen, error) {
	if s.Motion != nil {
		p, err := s.Propagate([]astro.JD{g.TDB}, false)
		if err != nil {
			return Seen{}, err
		}
		return p.Observe(0, g)
	}
	var helio r3.Vec
	f := func(tdb astro.JD) (r3.Vec, error) {
		p, _, err := s.At(tdb)
		helio = p
		return p, err
	}
	dir, d, tau, err := g.Direction(f)
	if err != nil {
		return Seen{}, fmt.Errorf("orbit: %w", err)
	}
	return Seen{Dir: dir, DeltaAU: d, TauDays: tau, Helio: helio, RAU: r3.Norm(helio)}, nil
}

// Residual returns the observed minus computed place on the tangent plane at
// the computed direction c (a unit vector): dE along the local east (Δα cos δ)
// and dN along the local north (Δδ), radians — the standard coordinates of
// the observed direction about c (Calabretta & Greisen 2002, A&A 395, 1077,
// §5.1.3, gnomonic projection). At a celestial pole the east is taken along
// the ICRS y axis.
func Residual(ra, dec astro.Angle, c r3.Vec) (dE, dN float64) {
	o := astro.UnitVector(ra, dec)
	e, n := EastNorth(c)
	w := r3.Dot(o, c)
	return r3.Dot(o, e) / w, r3.Dot(o, n) / w
}

// EastNorth returns the unit vectors of the local east and north at the
// direction c (a unit vector): e = ẑ × c / |ẑ × c|, n = c × e; at a pole e is
// the ICRS y axis.
func EastNorth(c r3.Vec) (e, n r3.Vec) {
	e = r3.Vec{X: -c.Y, Y: c.X}
	if h := math.Hypot(e.X, e.Y); h > 1e-15 {
		e = r3.Scale(1/h, e)
	} else {
		e = r3.Vec{Y: 1}
	}
	return e, r3.Cross(c, e)
}
