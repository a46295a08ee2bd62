package obs

import (
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
	"strconv"
	"strings"

	"arcfit/astro"
)

// The format names of [Set.Format] and [ReadOptions.Format].
const (
	FormatCSV     = "csv"
	FormatADESPSV = "ades-psv"
)

// Read reads an observation file from r; name is the file name used in
// messages. The format is opts.Format, or recognised from the content when
// that is "": a file whose first line that is not blank or a '#' comment
// holds '|' field separators, or that starts with an ADES "# version=" line,
// is ADES PSV; anything else is the CSV of design.md.
//
// The observations come back sorted by time (a stable sort: rows at one
// instant keep their file order), with their line numbers. An exact
// duplicate of an earlier row is kept with Used false and a warning. When
// opts.Sites is non-nil every site must be known (see [Set.ResolveSites]).
// A track whose positions all coincide within their uncertainties gets a
// warning here; [Set.CheckMotion] returns it as an error for callers that
// fit.
//
// Errors are *[ParseError] (file:line:col, one line); the first error in the
// file stops the reading and no Set is returned.
func Read(r io.Reader, name string, opts ReadOptions) (*Set, error) {
	sig := opts.DefaultSigmaArcsec
	if math.IsNaN(sig) || math.IsInf(sig, 0) || sig < 0 || sig > maxSigmaArcsec {
		return nil, fmt.Errorf("obs: default sigma %v arcsec: want a value above 0 and at most %v", sig, maxSigmaArcsec)
	}
	data, err := readAll(r)
	if err != nil {
		return nil, fmt.Errorf("obs: reading %s: %w", name, err)
	}
	format := opts.Format
	if format == "" {
		if format, err = detectFormat(data, name); err != nil {
			return nil, err
		}
	}
	rd := newReader(name, opts, data)
	switch format {
	case FormatCSV:
		err = rd.readCSV()
	case FormatADESPSV:
		err = rd.readADES()
	default:
		return nil, fmt.Errorf("obs: unknown format %q (want %q or %q)", format, FormatCSV, FormatADESPSV)
	}
	if err != nil {
		return nil, err
	}
	rd.set.Format = format
	if err := rd.finish(); err != nil {
		return nil, err
	}
	return rd.set, nil
}

// ReadFile reads the observation file at path with [Read]; messages name the
// file by path.
func ReadFile(path string, opts ReadOptions) (*Set, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("obs: %w", err)
	}
	defer f.Close()
	return Read(f, path, opts)
}

// detectFormat recognises the format of an observation file from its content.
func detectFormat(data, name string) (string, error) {
	ls := lineScanner{data: data}
	for {
		line, ok := ls.next()
		if !ok {
			return FormatCSV, nil // the CSV reader says what is missing
		}
		t := firstNonBlank(line)
		switch {
		case t == "":
			continue
		case strings.HasPrefix(t, "<"):
			return "", &ParseError{File: name, Line: ls.n, Column: columnOf(line, len(line)-len(t)),
				Want: "observations as CSV or ADES PSV", Got: t, Hint: "ADES XML is not read; write the PSV form", Err: ErrFormat}
		case strings.HasPrefix(t, "#"):
			if strings.HasPrefix(strings.TrimLeft(t[1:], " \t"), "version") {
				return FormatADESPSV, nil
			}
			continue
		case strings.HasPrefix(t, "!"):
			return FormatADESPSV, nil
		case strings.Contains(t, "|"):
			return FormatADESPSV, nil
		default:
			return FormatCSV, nil
		}
	}
}

// reader holds the state shared by the CSV and ADES readers.
type reader struct {
	file  string
	opts  ReadOptions
	data  string
	set   *Set
	sigma astro.Angle // the default σ

	intern map[string]string

	noSigma       bool // the file has no σ at all: one warning
	emptySigma    int  // rows with an empty σ field
	emptySigmaAt  int  // first such line
	pre1972       int  // rows before 1972
	pre1972At     int  // first such line
	pre1972Column int
}

func newReader(name string, opts ReadOptions, data string) *reader {
	sig := opts.DefaultSigmaArcsec
	if sig == 0 {
		sig = DefaultSigmaArcsec
	}
	return &reader{
		file:   name,
		opts:   opts,
		data:   data,
		set:    &Set{File: name, Obs: make([]Observation, 0, strings.Count(data, "\n")+1)},
		sigma:  astro.AngleFromArcseconds(sig),
		intern: make(map[string]string),
	}
}

// internString returns a copy of s shared by all equal strings of the file,
// so that an observation does not keep the whole file text alive.
func (r *reader) internString(s string) string {
	if v, ok := r.intern[s]; ok {
		return v
	}
	c := strings.Clone(s)
	r.intern[c] = c
	return c
}

// warn adds a warning.
func (r *reader) warn(line, col int, format string, args ...any) {
	r.set.Warnings = append(r.set.Warnings, Warning{File: r.file, Line: line, Column: col, Msg: fmt.Sprintf(format, args...)})
}

// fieldError places a field reader's trouble in the file.
func (r *reader) fieldError(line string, lineNo int, f field, name string, t *fieldTrouble) *ParseError {
	got := t.got
	if got == "" {
		got = f.s
	}
	want := t.want
	if f.s == "" {
		want += ", got an empty field"
	}
	return &ParseError{File: r.file, Line: lineNo, Column: columnOf(line, f.off+t.off), Field: name,
		Want: want, Got: got, Hint: t.hint, Err: t.err}
}

// checkLine rejects a line holding binary data or bytes that are not UTF-8.
func (r *reader) checkLine(line string, lineNo int) error {
	off, what := checkText(line)
	if off < 0 {
		return nil
	}
	return textError(r.file, line, lineNo, off, what)
}

func textError(file, line string, lineNo, off int, what string) *ParseError {
	e := &ParseError{File: file, Line: lineNo, Column: columnOf(line, off), Want: "UTF-8 text", Got: what, Err: ErrFormat}
	if what == "a carriage return inside the line" {
		e.Hint = "lines must end in LF or CRLF, not CR alone"
	}
	if what == "binary data" {
		e.Hint = "this does not look like a text file"
	}
	// Got is a description here, not the text: print it unquoted.
	e.Want = "UTF-8 text, found " + what
	e.Got = ""
	return e
}

// notePre1972 records a row dated before 1972.
func (r *reader) notePre1972(lineNo, col int) {
	if r.pre1972 == 0 {
		r.pre1972At, r.pre1972Column = lineNo, col
	}
	r.pre1972++
}

// noteEmptySigma records a row whose σ field is empty.
func (r *reader) noteEmptySigma(lineNo int) {
	if r.emptySigma == 0 {
		r.emptySigmaAt = lineNo
	}
	r.emptySigma++
}

// finish adds the summary warnings, sorts, marks duplicates and checks sites.
func (r *reader) finish() error {
	s := r.set
	sig := strconv.FormatFloat(r.sigma.Arcseconds(), 'g', -1, 64)
	if r.noSigma && len(s.Obs) > 0 {
		if r.opts.DefaultSigmaArcsec == 0 {
			r.warn(0, 0, "no uncertainty given: every row gets the default %s″ per coordinate", sig)
		}
	}
	if r.emptySigma > 0 {
		r.warn(r.emptySigmaAt, 0, "%d row(s) with an empty uncertainty, from this line on, get %s″ per coordinate", r.emptySigma, sig)
	}
	if r.pre1972 > 0 {
		r.warn(r.pre1972At, r.pre1972Column, "%d row(s) before 1972, from this line on: UTC is read as UT (converted with ΔT)", r.pre1972)
	}
	if !slices.IsSortedFunc(s.Obs, compareTime) {
		slices.SortStableFunc(s.Obs, compareTime)
	}
	r.markDuplicates()
	if r.opts.Sites != nil {
		if err := s.ResolveSites(r.opts.Sites, ""); err != nil {
			return err
		}
	}
	if err := s.CheckMotion(); err != nil && errors.Is(err, ErrNoMotion) {
		r.warn(0, 0, "%v", strings.TrimPrefix(err.Error(), "obs: "))
	}
	slices.SortStableFunc(s.Warnings, func(a, b Warning) int { return a.Line - b.Line })
	return nil
}

// compareTime orders observations by time (normalised JDs compare by Day,
// then Frac).
func compareTime(a, b Observation) int {
	switch {
	case a.Time.Day < b.Time.Day:
		return -1
	case a.Time.Day > b.Time.Day:
		return 1
	case a.Time.Frac < b.Time.Frac:
		return -1
	case a.Time.Frac > b.Time.Frac:
		return 1
	}
	return 0
}

// obsKey is what makes two observations at one instant exact duplicates.
type obsKey struct {
	ra, dec, sra, sdec, corr, mag uint64
	site, band                    string
}

func keyOf(o *Observation) obsKey {
	return obsKey{
		math.Float64bits(float64(o.RA)), math.Float64bits(float64(o.Dec)),
		math.Float64bits(float64(o.SigmaRA)), math.Float64bits(float64(o.SigmaDec)),
		math.Float64bits(o.Corr), math.Float64bits(o.Mag), o.Site, o.Band,
	}
}

// markDuplicates sets Used false on every row that repeats an earlier row
// exactly (same time, position, uncertainties, site, magnitude and band),
// with a warning. The observations must be sorted by time.
func (r *reader) markDuplicates() {
	obs := r.set.Obs
	for i := 0; i < len(obs); {
		j := i + 1
		for j < len(obs) && compareTime(obs[i], obs[j]) == 0 {
			j++
		}
		if j-i > 1 {
			seen := make(map[obsKey]int, j-i)
			for k := i; k < j; k++ {
				key := keyOf(&obs[k])
				if first, ok := seen[key]; ok {
					obs[k].Used = false
					r.warn(obs[k].Line, 0, "repeats line %d exactly; counted once", first)
					continue
				}
				seen[key] = obs[k].Line
			}
		}
		i = j
	}
}

// ResolveSites gives every observation without a site the site defaultSite
// (when it is not ""), then checks that every site named is in sites or in
// the file's own s.Sites. The first unknown site, in file order, gives a
// *ParseError wrapping [ErrUnknownSite] at the row's line and the site
// field's column (column 0 when the name came from defaultSite). [Read] calls
// it when ReadOptions.Sites is non-nil; a caller that read without a sites
// file calls it once it has one.
func (s *Set) ResolveSites(sites map[string]astro.Site, defaultSite string) error {
	var bad *Observation
	for i := range s.Obs {
		o := &s.Obs[i]
		if o.Site == "" {
			if defaultSite == "" {
				continue
			}
			o.Site, o.siteCol = defaultSite, 0
		}
		if _, ok := sites[o.Site]; ok {
			continue
		}
		if _, ok := s.Sites[o.Site]; ok {
			continue
		}
		if bad == nil || o.Line < bad.Line {
			bad = o
		}
	}
	if bad == nil {
		return nil
	}
	e := &ParseError{File: s.File, Line: bad.Line, Column: bad.siteCol, Field: "site",
		Want: "a site defined in the sites file", Got: bad.Site, Err: ErrUnknownSite,
		Hint: "add it to the sites file: name,lat_deg,lon_deg,height_m"}
	if bad.siteCol == 0 {
		e.Hint = "the default site is not in the sites file"
	}
	return e
}
