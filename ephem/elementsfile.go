package ephem

import (
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
	"unicode/utf8"

	"arcfit/astro"
	"arcfit/astro/obs"
)

// The orbital-elements CSV of design.md: a header naming the columns
// (case-insensitive, any order), then one element set per row, heliocentric,
// ecliptic and equinox J2000:
//
//	name,epoch_tt,a_au,e,i_deg,node_deg,peri_deg,m_deg,h,g     (asteroid form)
//	name,q_au,e,i_deg,node_deg,peri_deg,tp_tt,h,g              (comet form)
//
// A file may hold both forms: with all of a_au, m_deg, q_au and tp_tt in the
// header, each row fills one pair and leaves the other empty.

// Sentinel errors of [ReadElements], besides obs.ErrSyntax, obs.ErrRange,
// obs.ErrHeader, obs.ErrDuplicateColumn, obs.ErrFieldCount and obs.ErrFormat.
var (
	// ErrDuplicateElements reports an elements file that defines one name
	// twice with different elements.
	ErrDuplicateElements = errors.New("element set defined twice")
	// ErrNoElements reports an elements file with a header and no element set.
	ErrNoElements = errors.New("no element sets")
)

// Limits the elements reader enforces. The date span is arcfit's supported
// span (design.md, "Input formats": 1800–2200), as TT Julian dates of 1800
// January 1 0h and 2201 January 1 0h (python3-erfa 2.0.0.1,
// erfa.cal2jd(1800,1,1) = 2400000.5 − 21504, erfa.cal2jd(2201,1,1) =
// 2400000.5 + 124958). The magnitude bounds are sanity bounds chosen for
// arcfit, not published figures: an absolute magnitude H outside −10…40 or a
// slope parameter G outside −1…2 is a typing error.
const (
	elementsFirstJD = 2378496.5
	elementsLastJD  = 2524958.5
	minAbsMagH      = -10.0
	maxAbsMagH      = 40.0
	minSlopeG       = -1.0
	maxSlopeG       = 2.0
)

// Column indexes of the elements CSV.
const (
	ecName = iota
	ecEpoch
	ecA
	ecE
	ecI
	ecNode
	ecPeri
	ecM
	ecQ
	ecTp
	ecH
	ecG
	ecSigA
	ecSigE
	ecSigI
	ecSigNode
	ecSigPeri
	ecSigM
	ecSigQ
	ecSigTp
	ecCount
)

// elementsColumns are the column names, indexed by the ec constants.
var elementsColumns = [ecCount]string{"name", "epoch_tt", "a_au", "e", "i_deg", "node_deg", "peri_deg", "m_deg", "q_au", "tp_tt", "h", "g",
	"sigma_a_au", "sigma_e", "sigma_i_deg", "sigma_node_deg", "sigma_peri_deg", "sigma_m_deg", "sigma_q_au", "sigma_tp_days"}

// elementsHeaderForms are the two forms of the header.
const elementsHeaderForms = "name,epoch_tt,a_au,e,i_deg,node_deg,peri_deg,m_deg[,h,g] " +
	"or name,q_au,e,i_deg,node_deg,peri_deg,tp_tt[,h,g]"

// bomUTF8 is the byte order mark some editors put at the start of a file.
const bomUTF8 = "\xef\xbb\xbf"

// ReadElementsFile reads the orbital-elements CSV at path with
// [ReadElements].
func ReadElementsFile(path string) ([]Elements, []obs.Warning, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, nil, fmt.Errorf("ephem: %w", err)
	}
	defer f.Close()
	return ReadElements(f, path)
}

// ReadElements reads an orbital-elements CSV from r (name is the file name
// used in messages) and returns the element sets in file order, with the
// warnings the reader noticed.
//
// The format (design.md, "Orbital elements, CSV"): a header naming the
// columns, case-insensitive and in any order, then one element set per row;
// heliocentric osculating elements, ecliptic and equinox J2000:
//
//	name      the object's name (names may contain spaces; quote one with a comma)
//	epoch_tt  epoch of the mean anomaly, TT (asteroid form; optional with q_au)
//	a_au      semi-major axis, au, > 0; the ellipse only (e < 1)
//	e         eccentricity, ≥ 0
//	i_deg     inclination to the ecliptic J2000, 0…180
//	node_deg  longitude of the ascending node, equinox J2000, −360…360
//	peri_deg  argument of perihelion, −360…360
//	m_deg     mean anomaly at epoch_tt, −360…360 (with a_au)
//	q_au      perihelion distance, au, > 0 (comet form, any e)
//	tp_tt     time of perihelion passage, TT (with q_au)
//	h, g      absolute magnitude and slope parameter of the H, G system
//	          (optional; empty means unknown, G then 0.15 in PlaceOfElements)
//
// A row gives either a_au and m_deg (with epoch_tt) or q_au and tp_tt, never
// both; e ≥ 1 needs q_au and tp_tt. epoch_tt and tp_tt are TT instants: a
// Julian date (2461406.5, or "JD 2461406.5") or an ISO 8601 date-time
// without a zone (2027-01-01T00:00:00, [astro.ParseISO8601Scale] with TT),
// within 1800–2200. Numbers are plain decimals: NaN, Inf, decimal commas and
// ';'-separated files are errors. '#' starts a comment line; a BOM, CRLF,
// quotes, tabs and blank lines are fine; a tab-separated file is read when its
// header has tabs and no comma. A column the reader does not use gets a
// warning naming it. A name given twice with the same elements gets a warning
// and counts once; with different elements it is an error wrapping
// [ErrDuplicateElements].
//
// Every error is a *obs.ParseError, one line, naming file, line and column
// (columns count characters after any BOM): "elements.csv:4:17: e: want
// e ≥ 0, got "-0.1"". Each element set returned passes [Elements.Validate].
func ReadElements(r io.Reader, name string) ([]Elements, []obs.Warning, error) {
	var b strings.Builder
	if _, err := io.Copy(&b, r); err != nil {
		return nil, nil, fmt.Errorf("ephem: reading %s: %w", name, err)
	}
	er := elementsReader{file: name}
	sets, err := er.read(strings.TrimPrefix(b.String(), bomUTF8))
	if err != nil {
		return nil, nil, err
	}
	return sets, er.warns, nil
}

// FindElements returns the element set named name from sets: the exact name,
// else the one name equal to it ignoring case and surrounding blanks. With
// name empty it returns the only set of a one-set list. The error lists the
// names there are.
func FindElements(sets []Elements, name string) (Elements, error) {
	if name == "" {
		if len(sets) == 1 {
			return sets[0], nil
		}
		return Elements{}, fmt.Errorf("ephem: %d element sets, name one of %s", len(sets), elementNames(sets))
	}
	for _, el := range sets {
		if el.Name == name {
			return el, nil
		}
	}
	var found []Elements
	for _, el := range sets {
		if strings.EqualFold(strings.TrimSpace(el.Name), strings.TrimSpace(name)) {
			found = append(found, el)
		}
	}
	if len(found) == 1 {
		return found[0], nil
	}
	return Elements{}, fmt.Errorf("ephem: no element set named %q (the file has %s)", name, elementNames(sets))
}

// elementNames lists the names of sets for a message, at most 10.
func elementNames(sets []Elements) string {
	var qs []string
	for i, el := range sets {
		if i == 10 {
			qs = append(qs, fmt.Sprintf("and %d more", len(sets)-10))
			break
		}
		qs = append(qs, strconv.Quote(el.Name))
	}
	if len(qs) == 0 {
		return "none"
	}
	return strings.Join(qs, ", ")
}

// elementsReader is the state of one read.
type elementsReader struct {
	file  string
	warns []obs.Warning
}

// csvField is one field of a line: its text, unquoted and trimmed, and the
// byte offset in the line where that text starts.
type csvField struct {
	s   string
	off int
}

// col returns the 1-based character column of byte offset off in line.
func col(line string, off int) int {
	off = max(0, min(off, len(line)))
	return utf8.RuneCountInString(line[:off]) + 1
}

// perr builds a ParseError at byte offset off of line lineNo.
func (er *elementsReader) perr(line string, lineNo, off int, field, want, got, hint string, err error) *obs.ParseError {
	return &obs.ParseError{File: er.file, Line: lineNo, Column: col(line, off), Field: field, Want: want, Got: got, Hint: hint, Err: err}
}

// read reads the whole text.
func (er *elementsReader) read(data string) ([]Elements, error) {
	var (
		idx        [ecCount]int // 1-based field index of each column, 0 if absent
		ncols      int
		headerLine int
		delim      byte = ','
		sets       []Elements
		definedAt  = map[string]int{}
		byName     = map[string]int{} // index in sets
		lineNo     int
	)
	for rest := data; rest != ""; {
		var line string
		if i := strings.IndexByte(rest, '\n'); i >= 0 {
			line, rest = rest[:i], rest[i+1:]
		} else {
			line, rest = rest, ""
		}
		line = strings.TrimSuffix(line, "\r")
		lineNo++
		t := strings.TrimLeft(line, " \t")
		if t == "" || t[0] == '#' {
			continue
		}
		if off, what := badText(line); off >= 0 {
			return nil, er.perr(line, lineNo, off, "", "text", what, "is this a CSV file?", obs.ErrFormat)
		}
		if headerLine == 0 && !strings.Contains(line, ",") && strings.Contains(strings.Trim(line, " \t"), "\t") {
			delim = '\t'
		}
		fields, off, want := splitCSV(line, delim)
		if want != "" {
			return nil, er.perr(line, lineNo, off, "", want, "", "", obs.ErrSyntax)
		}
		if headerLine == 0 {
			if err := er.header(line, lineNo, fields, &idx); err != nil {
				return nil, err
			}
			headerLine, ncols = lineNo, len(fields)
			continue
		}
		if len(fields) != ncols {
			e := er.perr(line, lineNo, len(line), "", fmt.Sprintf("%d fields as in the header on line %d, found %d", ncols, headerLine, len(fields)), "", "", obs.ErrFieldCount)
			if len(fields) > ncols {
				e.Column = col(line, fields[ncols].off)
				e.Hint = "a decimal comma? write 2.61, not 2,61; quote a name that holds a comma"
			}
			return nil, e
		}
		el, err := er.row(line, lineNo, fields, &idx)
		if err != nil {
			return nil, err
		}
		if k, ok := byName[el.Name]; ok {
			nf := fields[idx[ecName]-1]
			if !sameElements(sets[k], el) {
				return nil, er.perr(line, lineNo, nf.off, "name",
					fmt.Sprintf("each element set named once, but line %d gives other elements for it", definedAt[el.Name]), el.Name, "", ErrDuplicateElements)
			}
			er.warns = append(er.warns, obs.Warning{File: er.file, Line: lineNo, Column: col(line, nf.off),
				Msg: fmt.Sprintf("element set %q repeats line %d", el.Name, definedAt[el.Name])})
			continue
		}
		byName[el.Name] = len(sets)
		definedAt[el.Name] = lineNo
		sets = append(sets, el)
	}
	if headerLine == 0 {
		return nil, &obs.ParseError{File: er.file, Line: lineNo, Want: "a header naming " + elementsHeaderForms, Hint: "the file holds no header and no element sets", Err: obs.ErrHeader}
	}
	if len(sets) == 0 {
		return nil, &obs.ParseError{File: er.file, Line: lineNo, Want: "at least one element set after the header on line " + strconv.Itoa(headerLine), Err: ErrNoElements}
	}
	return sets, nil
}

// header reads the header line into idx.
func (er *elementsReader) header(line string, lineNo int, fields []csvField, idx *[ecCount]int) error {
	if i := strings.IndexByte(line, ';'); i >= 0 && !strings.Contains(line, ",") {
		return er.perr(line, lineNo, i, "", "fields separated by ','", line,
			"';'-separated files are not read: separate fields by ',' and write decimals with '.'", obs.ErrFormat)
	}
	for i, f := range fields {
		n := strings.ToLower(f.s)
		k := -1
		for j, c := range elementsColumns {
			if n == c {
				k = j
			}
		}
		if k < 0 {
			er.warns = append(er.warns, obs.Warning{File: er.file, Line: lineNo, Column: col(line, f.off), Msg: fmt.Sprintf("column %q is not used", f.s)})
			continue
		}
		if idx[k] != 0 {
			return er.perr(line, lineNo, f.off, f.s, fmt.Sprintf("one %s column, but column %d gives it too", elementsColumns[k], idx[k]), "", "", obs.ErrDuplicateColumn)
		}
		idx[k] = i + 1
	}
	missing := func(k int, why string) error {
		return er.perr(line, lineNo, 0, "", "a column "+elementsColumns[k]+why, "", "the header names "+elementsHeaderForms, obs.ErrHeader)
	}
	for _, k := range []int{ecName, ecE, ecI, ecNode, ecPeri} {
		if idx[k] == 0 {
			return missing(k, "")
		}
	}
	hasA, hasQ := idx[ecA] != 0 || idx[ecM] != 0, idx[ecQ] != 0 || idx[ecTp] != 0
	switch {
	case !hasA && !hasQ:
		return missing(ecA, " and m_deg, or q_au and tp_tt")
	case idx[ecA] != 0 && idx[ecM] == 0:
		return missing(ecM, ": a_au goes with m_deg")
	case idx[ecM] != 0 && idx[ecA] == 0:
		return missing(ecA, ": m_deg goes with a_au")
	case idx[ecQ] != 0 && idx[ecTp] == 0:
		return missing(ecTp, ": q_au goes with tp_tt")
	case idx[ecTp] != 0 && idx[ecQ] == 0:
		return missing(ecQ, ": tp_tt goes with q_au")
	case hasA && idx[ecEpoch] == 0:
		return missing(ecEpoch, ": the epoch of m_deg")
	}
	return nil
}

// row reads one element set.
func (er *elementsReader) row(line string, lineNo int, fields []csvField, idx *[ecCount]int) (Elements, error) {
	get := func(k int) (csvField, bool) {
		if idx[k] == 0 {
			return csvField{}, false
		}
		return fields[idx[k]-1], true
	}
	filled := func(k int) bool { f, ok := get(k); return ok && f.s != "" }
	bad := func(k int, want string, err error, hint string) error {
		f, _ := get(k)
		return er.perr(line, lineNo, f.off, elementsColumns[k], want, f.s, hint, err)
	}
	number := func(k int, want string, lo, hi float64) (float64, error) {
		f, _ := get(k)
		v, off, hint := parsePlainDecimal(f.s)
		if off >= 0 {
			if f.s == "" {
				return 0, er.perr(line, lineNo, f.off, elementsColumns[k], want, "", "the field is empty", obs.ErrSyntax)
			}
			return 0, er.perr(line, lineNo, f.off+off, elementsColumns[k], want, f.s, hint, obs.ErrSyntax)
		}
		if !(v >= lo && v <= hi) {
			return 0, bad(k, want, obs.ErrRange, "")
		}
		return v, nil
	}
	angle := func(k int, want string, lo, hi float64) (astro.Angle, error) {
		v, err := number(k, want, lo, hi)
		return astro.AngleFromDegrees(v), err
	}

	nf, _ := get(ecName)
	if nf.s == "" {
		return Elements{}, er.perr(line, lineNo, nf.off, "name", "a name for the element set", "", "the field is empty", obs.ErrSyntax)
	}
	el := Elements{Name: strings.Clone(nf.s), H: math.NaN(), G: math.NaN()}
	aForm := filled(ecA) || filled(ecM)
	qForm := filled(ecQ) || filled(ecTp)
	switch {
	case aForm && qForm:
		k := ecQ
		if !filled(ecQ) {
			k = ecTp
		}
		return Elements{}, bad(k, "one form per row: a_au,m_deg or q_au,tp_tt, not both", obs.ErrSyntax, "leave the other pair empty")
	case !aForm && !qForm:
		k := ecA
		if idx[ecA] == 0 {
			k = ecQ
		}
		f, _ := get(k)
		return Elements{}, er.perr(line, lineNo, f.off, elementsColumns[k], "a_au and m_deg, or q_au and tp_tt", "", "both pairs are empty", obs.ErrSyntax)
	}

	var err error
	if el.E, err = number(ecE, "an eccentricity e ≥ 0", 0, math.MaxFloat64); err != nil {
		return Elements{}, err
	}
	if el.I, err = angle(ecI, "an inclination in degrees, 0 to 180", 0, 180); err != nil {
		return Elements{}, err
	}
	if el.Node, err = angle(ecNode, "a longitude of the node in degrees, −360 to 360", -360, 360); err != nil {
		return Elements{}, err
	}
	if el.Peri, err = angle(ecPeri, "an argument of perihelion in degrees, −360 to 360", -360, 360); err != nil {
		return Elements{}, err
	}
	if idx[ecEpoch] != 0 && (aForm || filled(ecEpoch)) {
		if el.Epoch, err = er.ttDate(line, lineNo, fields[idx[ecEpoch]-1], "epoch_tt"); err != nil {
			return Elements{}, err
		}
	}
	if aForm {
		if el.E >= 1 {
			return Elements{}, bad(ecE, "e < 1 with a_au and m_deg", obs.ErrRange, "for e ≥ 1 give q_au and tp_tt")
		}
		if el.A, err = number(ecA, fmt.Sprintf("a > 0 au for an ellipse (e = %g)", el.E), math.SmallestNonzeroFloat64, math.MaxFloat64); err != nil {
			return Elements{}, err
		}
		if el.M, err = angle(ecM, "a mean anomaly in degrees, −360 to 360", -360, 360); err != nil {
			return Elements{}, err
		}
		el.Q = el.A * (1 - el.E)
	} else {
		if el.Q, err = number(ecQ, "a perihelion distance q > 0 au", math.SmallestNonzeroFloat64, math.MaxFloat64); err != nil {
			return Elements{}, err
		}
		if el.Tp, err = er.ttDate(line, lineNo, fields[idx[ecTp]-1], "tp_tt"); err != nil {
			return Elements{}, err
		}
	}
	if filled(ecH) {
		if el.H, err = number(ecH, "an absolute magnitude H from −10 to 40, or nothing", minAbsMagH, maxAbsMagH); err != nil {
			return Elements{}, err
		}
	}
	if filled(ecG) {
		if el.G, err = number(ecG, "a slope parameter G from −1 to 2, or nothing", minSlopeG, maxSlopeG); err != nil {
			return Elements{}, err
		}
	}
	if el.Sigma, err = er.sigmas(line, lineNo, fields, idx, aForm, filled, number); err != nil {
		return Elements{}, err
	}
	if err := el.Validate(); err != nil { // every value was checked above; this is a last guard
		return Elements{}, er.perr(line, lineNo, nf.off, "", "usable elements", "", oneLineText(err.Error()), obs.ErrRange)
	}
	return el, nil
}

// ttDate reads an epoch_tt or tp_tt field: a TT Julian date, with or without
// the "JD " prefix, or an ISO 8601 date-time without a zone, read as TT.
func (er *elementsReader) ttDate(line string, lineNo int, f csvField, field string) (astro.JD, error) {
	const want = "a TT Julian date (2461406.5) or an ISO 8601 date-time without a zone (2027-01-01T00:00:00), 1800–2200"
	s, off := f.s, 0
	if len(s) >= 2 && strings.EqualFold(s[:2], "JD") {
		t := strings.TrimLeft(s[2:], " ")
		off = len(s) - len(t)
		s = t
	}
	if s == "" {
		return astro.JD{}, er.perr(line, lineNo, f.off, field, want, f.s, "the field is empty", obs.ErrSyntax)
	}
	var j astro.JD
	if v, voff, hint := parsePlainDecimal(s); voff < 0 {
		j = astro.NewJD(v, astro.TT)
	} else if off > 0 || !strings.Contains(s, "-") {
		return astro.JD{}, er.perr(line, lineNo, f.off+off+voff, field, want, f.s, hint, obs.ErrSyntax)
	} else {
		var err error
		if j, err = astro.ParseISO8601Scale(s, astro.TT); err != nil {
			var fe *astro.FieldError
			o, sentinel := 0, error(obs.ErrSyntax)
			if errors.As(err, &fe) {
				o, sentinel = fe.Offset, fe.Err
			}
			hint := ""
			if fe != nil {
				hint = fe.Want
			}
			return astro.JD{}, er.perr(line, lineNo, f.off+o, field, want, f.s, hint, sentinel)
		}
	}
	if v := j.Float(); !(v >= elementsFirstJD && v < elementsLastJD) {
		return astro.JD{}, er.perr(line, lineNo, f.off, field, want, f.s, "outside arcfit's span 1800–2200", obs.ErrRange)
	}
	return j, nil
}

// sameElements reports whether two element sets are equal (NaN H or G
// equal to NaN).
func sameElements(a, b Elements) bool {
	eq := func(x, y float64) bool { return x == y || math.IsNaN(x) && math.IsNaN(y) }
	return a.Name == b.Name && a.Epoch == b.Epoch && a.A == b.A && a.E == b.E && a.I == b.I &&
		a.Node == b.Node && a.Peri == b.Peri && a.M == b.M && a.Q == b.Q && a.Tp == b.Tp &&
		eq(a.H, b.H) && eq(a.G, b.G) && (a.Sigma == nil) == (b.Sigma == nil) && (a.Sigma == nil || *a.Sigma == *b.Sigma)
}

// sigmas reads the optional 1-σ columns of a row: none filled gives nil;
// otherwise every σ of the row's form must be given (a_au, e, i, node, peri,
// m for the asteroid form; q_au, e, i, node, peri, tp for the comet form),
// each finite and ≥ 0, and none of the other form's.
func (er *elementsReader) sigmas(line string, lineNo int, fields []csvField, idx *[ecCount]int, aForm bool,
	filled func(int) bool, number func(int, string, float64, float64) (float64, error)) (*ElementSigma, error) {
	given := false
	for k := ecSigA; k <= ecSigTp; k++ {
		given = given || filled(k)
	}
	if !given {
		return nil, nil
	}
	need := []int{ecSigA, ecSigE, ecSigI, ecSigNode, ecSigPeri, ecSigM}
	other := []int{ecSigQ, ecSigTp}
	form := "a_au,m_deg"
	if !aForm {
		need = []int{ecSigQ, ecSigE, ecSigI, ecSigNode, ecSigPeri, ecSigTp}
		other = []int{ecSigA, ecSigM}
		form = "q_au,tp_tt"
	}
	for _, k := range other {
		if filled(k) {
			f := fields[idx[k]-1]
			return nil, er.perr(line, lineNo, f.off, elementsColumns[k], "no "+elementsColumns[k]+" on a row in the "+form+" form", f.s, "leave it empty", obs.ErrSyntax)
		}
	}
	var v [ecCount]float64
	for _, k := range need {
		if !filled(k) {
			off := len(line)
			if idx[k] != 0 {
				off = fields[idx[k]-1].off
			}
			return nil, er.perr(line, lineNo, off, elementsColumns[k], "every σ of the row's elements, or none", "",
				"a row with some σ must give "+elementsColumns[k]+" too", obs.ErrSyntax)
		}
		x, err := number(k, "a 1-σ uncertainty ≥ 0", 0, math.MaxFloat64)
		if err != nil {
			return nil, err
		}
		v[k] = x
	}
	return &ElementSigma{A: v[ecSigA], E: v[ecSigE], I: astro.AngleFromDegrees(v[ecSigI]), Node: astro.AngleFromDegrees(v[ecSigNode]),
		Peri: astro.AngleFromDegrees(v[ecSigPeri]), M: astro.AngleFromDegrees(v[ecSigM]), Q: v[ecSigQ], TpDays: v[ecSigTp]}, nil
}

// parsePlainDecimal reads a plain decimal number: an optional sign ('+', '-'
// or the Unicode minus U+2212), digits with at most one decimal point, and an
// optional exponent. It returns the value and off = −1, or the byte offset
// where the text stops being such a number with a hint. NaN, Inf,
// hexadecimal, digit separators and values that overflow are refused.
func parsePlainDecimal(s string) (v float64, off int, hint string) {
	i := 0
	neg := false
	switch {
	case strings.HasPrefix(s, "+"):
		i = 1
	case strings.HasPrefix(s, "-"):
		i, neg = 1, true
	case strings.HasPrefix(s, "\u2212"):
		i, neg = len("\u2212"), true
	}
	start := i
	digits := 0
	for i < len(s) && s[i] >= '0' && s[i] <= '9' {
		i++
		digits++
	}
	if i < len(s) && s[i] == '.' {
		i++
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
			digits++
		}
	}
	stop := func(i int) (float64, int, string) {
		l := strings.ToLower(s)
		switch {
		case strings.Contains(l, "nan") || strings.Contains(l, "inf"):
			return 0, 0, "a finite number is needed"
		case i < len(s) && s[i] == ',':
			return 0, i, "a decimal comma? write 2.61, not 2,61"
		}
		return 0, i, ""
	}
	if digits == 0 {
		return stop(i)
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		i++
		if i < len(s) && (s[i] == '+' || s[i] == '-') {
			i++
		}
		e := i
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
		}
		if i == e {
			return stop(i)
		}
	}
	if i != len(s) {
		return stop(i)
	}
	v, err := strconv.ParseFloat(s[start:], 64)
	if err != nil || math.IsInf(v, 0) {
		return 0, 0, "the number is too large"
	}
	if neg {
		v = -v
	}
	return v, -1, ""
}

// splitCSV splits line into fields separated by delim. A field may be quoted
// with '"' (a doubled quote inside stands for one, RFC 4180 §2) and must then
// end on its line; blanks around a field are dropped (spaces, and tabs when
// the separator is ','). On trouble it returns the byte offset and what was
// wanted there.
func splitCSV(line string, delim byte) (fields []csvField, off int, want string) {
	pad := func(c byte) bool { return c == ' ' || c == '\t' && delim != '\t' }
	i := 0
	for {
		for i < len(line) && pad(line[i]) {
			i++
		}
		if i < len(line) && line[i] == '"' {
			var b strings.Builder
			j := i + 1
			for {
				k := strings.IndexByte(line[j:], '"')
				if k < 0 {
					return nil, i, "a closing quote '\"' on the same line"
				}
				b.WriteString(line[j : j+k])
				j += k + 1
				if j < len(line) && line[j] == '"' {
					b.WriteByte('"')
					j++
					continue
				}
				break
			}
			for j < len(line) && pad(line[j]) {
				j++
			}
			if j < len(line) && line[j] != delim {
				return nil, j, "a separator after the closing quote"
			}
			s := b.String()
			lead := len(s) - len(strings.TrimLeft(s, " \t"))
			fields = append(fields, csvField{s: strings.TrimSpace(s), off: i + 1 + lead})
			if j >= len(line) {
				return fields, 0, ""
			}
			i = j + 1
			continue
		}
		end := len(line)
		if k := strings.IndexByte(line[i:], delim); k >= 0 {
			end = i + k
		}
		s := line[i:end]
		for len(s) > 0 && pad(s[len(s)-1]) {
			s = s[:len(s)-1]
		}
		if strings.IndexByte(s, '"') >= 0 {
			return nil, i + strings.IndexByte(s, '"'), "a quote only around a whole field"
		}
		fields = append(fields, csvField{s: s, off: i})
		if end >= len(line) {
			return fields, 0, ""
		}
		i = end + 1
	}
}

// badText returns the byte offset of the first character of line that has
// no place in a text file (a control character other than tab, bytes that
// are not UTF-8) and what it is, or −1.
func badText(line string) (int, string) {
	for i := 0; i < len(line); {
		c := line[i]
		if c >= utf8.RuneSelf {
			r, size := utf8.DecodeRuneInString(line[i:])
			if r == utf8.RuneError && size == 1 {
				return i, "bytes that are not UTF-8"
			}
			i += size
			continue
		}
		if c == '\r' {
			return i, "a carriage return inside the line"
		}
		if c != '\t' && (c < 0x20 || c == 0x7f) {
			return i, "binary data"
		}
		i++
	}
	return -1, ""
}

// oneLineText keeps a message on one line.
func oneLineText(s string) string { return strings.Join(strings.Fields(s), " ") }
