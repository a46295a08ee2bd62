package orbit

import "fmt"

// Degeneracy says why Gauss's method cannot give an initial orbit.
type Degeneracy int

// The cases of [DegenerateError].
const (
	// DegenerateTooFew: fewer than three used observations at distinct times.
	DegenerateTooFew Degeneracy = iota + 1
	// DegenerateShortArc: all used observations within one hour.
	DegenerateShortArc
	// DegenerateStationary: no motion measurable above the noise.
	DegenerateStationary
	// DegenerateGreatCircle: the lines of sight of every triple tried lie on
	// one great circle (through the Sun, or not) within the measurement
	// error, so the track shows no curvature to give the distance.
	DegenerateGreatCircle
	// DegenerateNoSolution: no root of the eighth-degree equation gives a
	// physically admissible orbit.
	DegenerateNoSolution
)

// String returns a short name of the case: "too few observations", "arc
// under an hour", "stationary", "great circle", "no admissible solution".
func (d Degeneracy) String() string {
	switch d {
	case DegenerateTooFew:
		return "too few observations"
	case DegenerateShortArc:
		return "arc under an hour"
	case DegenerateStationary:
		return "stationary"
	case DegenerateGreatCircle:
		return "great circle"
	case DegenerateNoSolution:
		return "no admissible solution"
	}
	return fmt.Sprintf("Degeneracy(%d)", int(d))
}

// DegenerateError reports observations from which Gauss's method cannot
// determine an orbit. The caller may fall back to a method made for short
// arcs (a systematic search over the distance). Its text is one line:
//
//	orbit: Gauss's method: all 6 observations lie within 42 min; what would help: observations on a second night
type DegenerateError struct {
	Case   Degeneracy
	Reason string // what is wrong with the observations
	Hint   string // what would help
}

// Error returns the one-line message.
func (e *DegenerateError) Error() string {
	if e.Hint == "" {
		return "orbit: Gauss's method: " + e.Reason
	}
	return "orbit: Gauss's method: " + e.Reason + "; what would help: " + e.Hint
}
