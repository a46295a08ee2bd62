package orbit

import (
	"errors"
	"fmt"
)

// Sentinels wrapped by [CorrectError]; test with errors.Is.
var (
	// ErrNotConverged: the iteration reached its limit, or stalled without
	// reaching a minimum of χ².
	ErrNotConverged = errors.New("orbit: differential correction did not converge")
	// ErrUndetermined: at the solution, some combination of the six
	// parameters is not determined by the observations (the condition number
	// of the scaled Jacobian exceeds [MaxCond]).
	ErrUndetermined = errors.New("orbit: orbit not determined by the observations")
	// ErrTooFewObservations: fewer used observations than the three a
	// six-parameter orbit needs (two coordinates each).
	ErrTooFewObservations = errors.New("orbit: too few observations for an orbit")
	// ErrInvalidStart: the starting state cannot be propagated to the
	// observations (not finite, at the Sun, a light time that fails).
	ErrInvalidStart = errors.New("orbit: invalid starting orbit")
)

// CorrectError reports a differential correction that produced no orbit:
// why, and what would help. Its text is one line:
//
//	orbit: differential correction did not converge in 50 iterations (χ²/dof 3.1e+04 at the last step): a longer arc, more nights, or another starting orbit would help
type CorrectError struct {
	// Reason says what went wrong; Hint what would help.
	Reason, Hint string
	// Iterations is the number of iterations taken (Jacobians formed).
	Iterations int
	// Chi2DoF is χ²/dof at the last accepted state, 0 when there was none
	// or no degree of freedom.
	Chi2DoF float64
	// Err is one of the sentinels [ErrNotConverged], [ErrUndetermined],
	// [ErrTooFewObservations], [ErrInvalidStart].
	Err error
}

// Error returns the one-line message.
func (e *CorrectError) Error() string {
	if e.Hint == "" {
		return "orbit: " + e.Reason
	}
	return fmt.Sprintf("orbit: %s: %s", e.Reason, e.Hint)
}

// Unwrap returns the sentinel.
func (e *CorrectError) Unwrap() error { return e.Err }
