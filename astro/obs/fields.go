package obs

import (
	"math"
	"strconv"
	"strings"

	"arcfit/astro"
)

// Field readers shared by the CSV and ADES readers. Each returns the value
// or a *fieldTrouble that says where in the field (a byte offset) the trouble
// is and what was wanted; the file readers add file, line and column.

// fieldTrouble is a field reader's error before it is placed in a file.
type fieldTrouble struct {
	off  int    // byte offset within the field
	want string // what was expected
	got  string // the offending text ("" for the whole field)
	hint string
	err  error // sentinel
}

// Supported span of observation times (design.md, "Input formats": 1800–2200),
// as UTC Julian dates of 1800 January 1 0h and 2201 January 1 0h; from
// python3-erfa 2.0.0.1, erfa.cal2jd(1800,1,1) = 2400000.5 − 21504 and
// erfa.cal2jd(2201,1,1) = 2400000.5 + 124958.
const (
	jdSpanStart = 2378496.5
	jdSpanEnd   = 2524958.5
	// jd1972 is 1972 January 1 0h UTC (erfa.cal2jd(1972,1,1) = 2400000.5 +
	// 41317): before it "UTC" is read as UT, with a warning.
	jd1972 = 2441317.5
)

// Value limits the readers enforce. They are sanity bounds chosen for arcfit,
// not published figures: a σ above 1° or a magnitude brighter than the Sun
// (−26.7) or fainter than +40 is a typing error, not a measurement.
const (
	maxSigmaArcsec = 3600.0
	minMag         = -30.0
	maxMag         = 40.0
)

const unicodeMinus = "\u2212"

// parseDecimal reads a plain decimal number: an optional sign ('+', '-' or
// the Unicode minus), digits with at most one decimal point, and an optional
// exponent. NaN, Inf, hexadecimal and digit separators are refused, as is a
// result that overflows float64.
func parseDecimal(s string) (float64, *fieldTrouble) {
	if s == "" {
		return 0, &fieldTrouble{want: "a number", err: ErrSyntax}
	}
	i := 0
	neg := false
	switch {
	case s[0] == '+':
		i = 1
	case s[0] == '-':
		i, neg = 1, true
	case strings.HasPrefix(s, unicodeMinus):
		i, neg = len(unicodeMinus), true
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
	if digits == 0 {
		return 0, numberTrouble(s, i)
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
			return 0, numberTrouble(s, i)
		}
	}
	if i != len(s) {
		return 0, numberTrouble(s, i)
	}
	v, err := strconv.ParseFloat(s[start:], 64)
	if err != nil || math.IsInf(v, 0) {
		return 0, &fieldTrouble{want: "a number of reasonable size", got: s, err: ErrRange}
	}
	if neg {
		v = -v
	}
	return v, nil
}

// numberTrouble describes a number that stops making sense at offset i.
func numberTrouble(s string, i int) *fieldTrouble {
	t := &fieldTrouble{off: i, want: "a decimal number", got: s, err: ErrSyntax}
	l := strings.ToLower(s)
	switch {
	case strings.Contains(l, "nan") || strings.Contains(l, "inf"):
		t.want = "a finite decimal number"
		t.off = 0
	case i < len(s) && s[i] == ',':
		t.hint = "decimal comma? write 12.5, not 12,5"
	}
	return t
}

// sexagesimalWant returns the want text of a sexagesimal RA or Dec field.
const (
	raWant  = "hours 0–24 as HH:MM:SS.sss, HH MM SS.sss or decimal hours"
	decWant = "±DD:MM:SS or degrees within ±90"
)

// parseRAHours reads the sexagesimal ra column with astro.ParseRA.
func parseRAHours(s string) (astro.Angle, *fieldTrouble) {
	a, err := astro.ParseRA(s)
	if err != nil {
		return 0, astroTrouble(s, err, raWant)
	}
	return a, nil
}

// parseDecDegrees reads the sexagesimal dec column with astro.ParseDec.
func parseDecDegrees(s string) (astro.Angle, *fieldTrouble) {
	a, err := astro.ParseDec(s)
	if err != nil {
		return 0, astroTrouble(s, err, decWant)
	}
	return a, nil
}

// astroTrouble turns an astro parser error into a fieldTrouble, keeping its
// offset and its own want when it has one.
func astroTrouble(s string, err error, want string) *fieldTrouble {
	t := &fieldTrouble{want: want, got: s, err: ErrSyntax}
	if fe, ok := err.(*astro.FieldError); ok {
		t.off = fe.Offset
		if fe.Want != "" {
			t.want = fe.Want
		}
		if fe.Err != nil {
			t.err = fe.Err
		}
	}
	if l := strings.ToLower(s); strings.Contains(l, "nan") || strings.Contains(l, "inf") {
		t.off, t.want, t.err = 0, want+" (a finite number)", ErrSyntax
	}
	if strings.Contains(s, ",") {
		t.hint = "decimal comma? write 12.5, not 12,5"
	}
	return t
}

// parseRADegrees reads right ascension in decimal degrees, 0 ≤ ra ≤ 360
// (360 is read as 0, as 24h is).
func parseRADegrees(s string) (astro.Angle, *fieldTrouble) {
	v, t := parseDecimal(s)
	if t != nil {
		t.want = "right ascension in degrees 0–360"
		return 0, t
	}
	if v < 0 || v > 360 {
		return 0, &fieldTrouble{want: "right ascension in degrees 0–360", got: s, err: ErrRange}
	}
	if v == 360 {
		v = 0
	}
	return astro.AngleFromDegrees(v), nil
}

// parseDecDecimal reads declination in decimal degrees within ±90.
func parseDecDecimal(s string) (astro.Angle, *fieldTrouble) {
	v, t := parseDecimal(s)
	if t != nil {
		t.want = "declination in degrees within ±90"
		return 0, t
	}
	if v < -90 || v > 90 {
		return 0, &fieldTrouble{want: "declination in degrees within ±90", got: s, err: ErrRange}
	}
	return astro.AngleFromDegrees(v), nil
}

// parseSigma reads a 1-σ uncertainty in arcseconds, 0 < σ ≤ 3600.
func parseSigma(s string) (astro.Angle, *fieldTrouble) {
	v, t := parseDecimal(s)
	const want = "an uncertainty in arcseconds, above 0 and at most 3600"
	if t != nil {
		t.want = want
		return 0, t
	}
	if !(v > 0) || v > maxSigmaArcsec {
		return 0, &fieldTrouble{want: want, got: s, err: ErrRange}
	}
	return astro.AngleFromArcseconds(v), nil
}

// parseCorr reads a correlation coefficient, −1 < c < 1.
func parseCorr(s string) (float64, *fieldTrouble) {
	v, t := parseDecimal(s)
	const want = "a correlation coefficient between −1 and 1 (exclusive)"
	if t != nil {
		t.want = want
		return 0, t
	}
	if !(v > -1 && v < 1) {
		return 0, &fieldTrouble{want: want, got: s, err: ErrRange}
	}
	return v, nil
}

// parseMag reads a magnitude, −30 ≤ mag ≤ 40.
func parseMag(s string) (float64, *fieldTrouble) {
	v, t := parseDecimal(s)
	const want = "a magnitude between −30 and +40"
	if t != nil {
		t.want = want
		return 0, t
	}
	if v < minMag || v > maxMag {
		return 0, &fieldTrouble{want: want, got: s, err: ErrRange}
	}
	return v, nil
}

// timeWant is the want text of a time field.
const timeWant = "a UTC time in ISO 8601 with a zone (2027-02-03T21:14:05.2Z) or JD and a Julian date (JD 2461440.38478)"

// parseTime reads a time field: ISO 8601 with a zone (astro.ParseISO8601),
// or, when allowJD, "JD " and a UTC Julian date. The date must lie in the
// supported span 1800–2200; pre1972 reports a date before 1972 January 1,
// where "UTC" is read as UT.
func parseTime(s string, allowJD bool) (j astro.JD, pre1972 bool, t *fieldTrouble) {
	if len(s) >= 2 && (s[0] == 'J' || s[0] == 'j') && (s[1] == 'D' || s[1] == 'd') {
		if !allowJD {
			return j, false, &fieldTrouble{want: "an ISO 8601 time with a zone (2027-02-03T21:14:05.2Z)", got: s, err: ErrSyntax}
		}
		j, t = parseJD(s)
	} else {
		var err error
		j, err = astro.ParseISO8601(s)
		if err != nil {
			t = astroTrouble(s, err, timeWant)
			if _, bad := parseDecimal(s); bad == nil && allowJD {
				t.off = 0
				t.want = timeWant
				t.hint = "a Julian date needs its prefix: JD " + s
			}
		}
	}
	if t != nil {
		return j, false, t
	}
	j = j.Normalized()
	if d := j.Float(); !(d >= jdSpanStart && d < jdSpanEnd) {
		return j, false, &fieldTrouble{want: "a date in the supported span 1800–2200", got: s, err: ErrRange}
	}
	return j, j.Float() < jd1972, nil
}

// parseJD reads "JD" (any case), blanks, and a Julian date in plain decimal
// digits. The integer and fractional parts are read apart, so that the date
// keeps the precision of the text.
func parseJD(s string) (astro.JD, *fieldTrouble) {
	i := 2
	for i < len(s) && (s[i] == ' ' || s[i] == '\t') {
		i++
	}
	const want = "a Julian date after JD, such as JD 2461440.38478"
	start := i
	for i < len(s) && s[i] >= '0' && s[i] <= '9' {
		i++
	}
	if i == start || i-start > 9 {
		return astro.JD{}, &fieldTrouble{off: start, want: want, got: s, err: ErrSyntax}
	}
	intEnd := i
	if i < len(s) && s[i] == '.' {
		i++
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
		}
	}
	if i != len(s) {
		return astro.JD{}, &fieldTrouble{off: i, want: want, got: s, err: ErrSyntax}
	}
	day, err := strconv.ParseFloat(s[start:intEnd], 64)
	if err != nil {
		return astro.JD{}, &fieldTrouble{off: start, want: want, got: s, err: ErrSyntax}
	}
	frac := 0.0
	if intEnd+1 < len(s) {
		if frac, err = strconv.ParseFloat(s[intEnd:], 64); err != nil {
			return astro.JD{}, &fieldTrouble{off: intEnd, want: want, got: s, err: ErrSyntax}
		}
	}
	return astro.JD{Day: day, Frac: frac, Scale: astro.UTC}, nil
}
