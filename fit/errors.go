package fit

import (
	"errors"
	"fmt"
	"strings"
)

// Errors of [Fit]; test for them with errors.Is.
var (
	// ErrTooFewObservations reports fewer observations (at distinct times)
	// than a model needs; the error is a *TooFewError.
	ErrTooFewObservations = errors.New("fit: too few observations for the model")
	// ErrSingular reports a rank-deficient design: the data cannot separate
	// the model's parameters (a knot with no observations on one side,
	// observations that do not span the model's time dependence).
	ErrSingular = errors.New("fit: singular design")
	// ErrParallaxNotEstimable reports that the inverse distance cannot be
	// estimated: with it the design is rank-deficient, without it it is not
	// (the parallax is indistinguishable from the motion terms, as for a
	// single site with observations at one hour angle).
	ErrParallaxNotEstimable = errors.New("fit: the inverse distance cannot be estimated from these observations")
)

// TooFewError is the error of a fit with fewer observations than its model
// needs. Need and Have count observations at distinct times; Allowed lists the
// polynomial models (poly1, poly2, poly3) the data do allow with the same
// parallax setting.
type TooFewError struct {
	Model      string
	Need, Have int
	Allowed    []string
}

// Error says what the model needs and which models the data allow.
func (e *TooFewError) Error() string {
	allowed := "none of the models"
	if len(e.Allowed) > 0 {
		allowed = strings.Join(e.Allowed, ", ")
	}
	return fmt.Sprintf("fit: %s needs observations at %d or more distinct times, have %d; these data allow %s",
		e.Model, e.Need, e.Have, allowed)
}

// Unwrap returns ErrTooFewObservations.
func (e *TooFewError) Unwrap() error { return ErrTooFewObservations }
