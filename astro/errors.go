package astro

import (
	"errors"
	"strconv"
)

// Sentinel errors, wrapped by the errors the parsers and conversions return;
// test for them with errors.Is.
var (
	// ErrSyntax reports text that does not have the expected form.
	ErrSyntax = errors.New("invalid syntax")
	// ErrRange reports a value outside its valid range (minutes ≥ 60, |Dec| > 90°…).
	ErrRange = errors.New("value out of range")
	// ErrStaleTable reports a date beyond the last date an embedded table (the
	// leap seconds, ΔT) is known to be good. It is a warning: the function that
	// returns it still returns its best value, as encoding/csv returns a record
	// with ErrFieldCount.
	ErrStaleTable = errors.New("date beyond the embedded table's known-good span")
	// ErrUnsupportedDate reports a date outside the span arcfit supports for a
	// conversion (for example UTC before 1960, which has no leap-second meaning).
	ErrUnsupportedDate = errors.New("date outside the supported span")
)

// FieldError is the error of a parser that reads one field of text (an angle,
// a time). Offset is the 0-based byte offset in the field where the trouble
// starts, so that a file reader can add it to the field's column; Want says
// what was expected there. Err is ErrSyntax or ErrRange (or another sentinel of
// this package).
type FieldError struct {
	Offset int    // 0-based byte offset of the trouble within the field
	Want   string // what was expected, such as "minutes 0–59"
	Got    string // the offending text
	Err    error  // ErrSyntax, ErrRange, …
}

// Error returns "want …, got "…"", one line: Got is quoted as a Go string
// (strconv.Quote), so a control character such as a carriage return shows
// as an escape, never as a line break.
func (e *FieldError) Error() string {
	if e.Got == "" {
		return "want " + e.Want
	}
	return "want " + e.Want + ", got " + strconv.Quote(e.Got)
}

// Unwrap returns the sentinel the error wraps.
func (e *FieldError) Unwrap() error { return e.Err }
