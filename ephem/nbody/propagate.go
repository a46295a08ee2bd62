// Package nbody integrates heliocentric orbits under the gravity of the Sun
// and the planets.
package nbody

import (
	"errors"

	"arcfit/astro"
)

// Options control [Propagate]. The zero value is the default.
type Options struct {
	// Tolerance is the integrator's local error tolerance (relative, per
	// step); 0 means the default.
	Tolerance float64
	// STM asks for the state transition matrix ∂x(t)/∂x(epoch) at each
	// requested instant (the variational equations are integrated too).
	STM bool
}

// Encounter is a close approach found during an integration: within 0.05 au
// of the Earth, or inside the Hill sphere of a planet.
type Encounter struct {
	// Body is the planet ("Earth", "Jupiter", …) or "Moon".
	Body string
	// TDB is the instant of least distance, DistanceAU that distance.
	TDB        astro.JD
	DistanceAU float64
	// HillAU is the body's Hill-sphere radius (au).
	HillAU float64
}

// Result holds the states of one integration.
type Result struct {
	// States are the heliocentric ICRS position (au) and velocity (au/day)
	// at each requested instant, in the order asked.
	States [][6]float64
	// STM holds, when asked, ∂States[i]/∂x(epoch), row-major.
	STM [][36]float64
	// Encounters lists the close approaches between the epoch and the
	// requested instants, in time order.
	Encounters []Encounter
	// Steps is the number of integrator steps taken (both directions).
	Steps int
}

// ErrNotImplemented is returned until the integrator lands.
var ErrNotImplemented = errors.New("nbody: not implemented")

// Propagate integrates the heliocentric ICRS state x (au, au/day) at the TDB
// instant epoch to each TDB instant in ts (any order, before or after the
// epoch) under the Sun and the planets, and returns the states there.
func Propagate(epoch astro.JD, x [6]float64, ts []astro.JD, opt Options) (*Result, error) {
	return nil, ErrNotImplemented
}
