package obs

import (
	"errors"
	"strconv"
	"unicode"
	"unicode/utf8"

	"arcfit/astro"
)

// Sentinel errors wrapped by [*ParseError]; test for them with errors.Is.
// ErrSyntax and ErrRange are astro's, so that one errors.Is test covers the
// field parsers of both packages.
var (
	// ErrSyntax reports text that does not have the expected form.
	ErrSyntax = astro.ErrSyntax
	// ErrRange reports a value outside its valid range.
	ErrRange = astro.ErrRange
	// ErrHeader reports a missing or unusable header line: no header at all,
	// a required column missing, a column with a name the reader cannot use.
	ErrHeader = errors.New("bad header")
	// ErrDuplicateColumn reports two columns for one quantity (dec twice, or
	// ra and ra_deg).
	ErrDuplicateColumn = errors.New("duplicate column")
	// ErrFieldCount reports a row with more or fewer fields than its header.
	ErrFieldCount = errors.New("wrong number of fields")
	// ErrFormat reports a file that is not in a format the reader takes: a
	// ';'-separated file, binary data, ADES XML, a second object in one file.
	ErrFormat = errors.New("unsupported file format")
	// ErrUnknownSite reports a site name found neither in the sites given nor
	// in the file itself.
	ErrUnknownSite = errors.New("unknown site")
	// ErrDuplicateSite reports a sites file that defines one name twice with
	// different values.
	ErrDuplicateSite = errors.New("site defined twice")
	// ErrNoMotion reports a track whose positions all coincide within their
	// uncertainties, so that no motion can be measured from it.
	ErrNoMotion = errors.New("no detectable motion")
)

// maxGot is the longest offending text, in characters, that a ParseError
// quotes before it cuts the text short with "…".
const maxGot = 40

// ParseError is the error of the readers: where the trouble is and what was
// expected there. Line and Column are 1-based; Column counts characters (not
// bytes) of the line after any byte order mark, 0 when the error concerns the
// whole line or file.
type ParseError struct {
	File         string
	Line, Column int
	Field        string // the column or field name, such as "dec"; "" if none
	Want         string // what was expected, such as "degrees within ±90"
	Got          string // the offending text, "" if none
	Hint         string // a suggestion for the user, "" if none
	Err          error  // the sentinel: ErrSyntax, ErrRange, ErrHeader, …
}

// Error returns the one-line message
//
//	file:line:col: field: want …, got "…" (hint)
//
// with Got quoted (control characters escaped) and cut short after 40
// characters, so that a line of binary garbage still gives one short line.
func (e *ParseError) Error() string {
	s := position(e.File, e.Line, e.Column)
	if e.Field != "" {
		s += fieldName(e.Field) + ": "
	}
	switch {
	case e.Want != "":
		s += "want " + e.Want
		if e.Got != "" {
			s += ", got " + quoteGot(e.Got)
		}
	case e.Err != nil:
		s += e.Err.Error()
	}
	if e.Hint != "" {
		s += " (" + e.Hint + ")"
	}
	return s
}

// Unwrap returns the sentinel the error wraps.
func (e *ParseError) Unwrap() error { return e.Err }

// fieldName returns the field name f for a message: as it is, or quoted
// (control characters escaped, shortened as Got) when it holds a character
// that is not printable, such as a line break in a JSON key, so that the
// message stays on one line.
func fieldName(f string) string {
	for _, r := range f {
		if !unicode.IsPrint(r) {
			return quoteGot(f)
		}
	}
	return f
}

// quoteGot quotes s for an error message, shortened to maxGot characters.
func quoteGot(s string) string {
	n := 0
	for i := range s {
		if n == maxGot {
			return strconv.Quote(s[:i]) + "…"
		}
		n++
	}
	return strconv.Quote(s)
}

// columnOf returns the 1-based character column of byte offset off in line.
func columnOf(line string, off int) int {
	if off > len(line) {
		off = len(line)
	}
	if off < 0 {
		off = 0
	}
	return utf8.RuneCountInString(line[:off]) + 1
}
