package orbit

import (
	"errors"
	"fmt"
	"strings"

	"arcfit/astro"
	"arcfit/ephem/nbody"
)

// Motion is the force model that moves a [State] from its epoch. A State
// whose Motion is nil moves by two-body motion about the Sun
// ([ephem.PropagateUniversal]), the default, each place computed by one
// propagation from the epoch to its light-time instant. A State with a
// Motion is propagated once to all the instants a computation needs
// ([State.Propagate]); the places near each instant are then formed by a
// short two-body step from the state integrated there (see [Path]).
type Motion interface {
	// Name is the dynamics' name as files and JSON print it ("nbody").
	Name() string
	// Propagate moves the heliocentric ICRS state x (au, au/day) at the TDB
	// instant epoch to each TDB instant of ts (any order, either side of
	// the epoch), with the state transition matrices ∂x(t)/∂x(epoch) when
	// stm is true, in the form of [nbody.Result]. It must be safe for
	// concurrent use.
	Propagate(epoch astro.JD, x [6]float64, ts []astro.JD, stm bool) (*nbody.Result, error)
}

// Dynamics names, as [MotionName] gives them and [ParseMotion] reads them.
const (
	// DynamicsTwoBody: the Sun alone, GM = k² (a nil Motion).
	DynamicsTwoBody = "twobody"
	// DynamicsNBody: the Sun, the eight planets and the Moon ([NBody]).
	DynamicsNBody = "nbody"
)

// NBodyMotion is the perturbed motion of package ephem/nbody: the Sun, the
// eight planets and the Moon as point masses in the heliocentric frame (with
// its indirect term), integrated with step control, the variational
// equations giving the state transition matrix. Tolerance is the
// integrator's local tolerance (0: its default).
type NBodyMotion struct {
	Tolerance float64
}

// NBody is the perturbed motion with the integrator's default tolerance.
var NBody Motion = NBodyMotion{}

// Name returns "nbody".
func (NBodyMotion) Name() string { return DynamicsNBody }

// Propagate integrates with [nbody.Propagate].
func (m NBodyMotion) Propagate(epoch astro.JD, x [6]float64, ts []astro.JD, stm bool) (*nbody.Result, error) {
	return nbody.Propagate(epoch, x, ts, nbody.Options{Tolerance: m.Tolerance, STM: stm})
}

// Encounter is a close approach found by an integration: within 0.05 au of
// the Earth, or inside the Hill sphere of a planet ([nbody.Encounter]).
type Encounter = nbody.Encounter

// MotionName returns the name of the dynamics m: [DynamicsTwoBody] for nil,
// else m.Name().
func MotionName(m Motion) string {
	if m == nil {
		return DynamicsTwoBody
	}
	return m.Name()
}

// ParseMotion returns the Motion of a dynamics name (case and surrounding
// blanks ignored): nil for "twobody" (and ""), [NBody] for "nbody".
func ParseMotion(name string) (Motion, error) {
	switch strings.ToLower(strings.TrimSpace(name)) {
	case "", DynamicsTwoBody:
		return nil, nil
	case DynamicsNBody:
		return NBody, nil
	}
	return nil, fmt.Errorf("orbit: unknown dynamics %q (want %s or %s)", name, DynamicsTwoBody, DynamicsNBody)
}

// errNoMotion is returned by the batch path of a two-body State asked for
// what only an integration gives.
var errNoMotion = errors.New("orbit: a two-body state has no integrated path")
