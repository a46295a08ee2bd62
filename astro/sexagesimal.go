package astro

import (
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
)

// The sexagesimal notation: reading and writing right ascension in hours,
// minutes and seconds of time, and declination in degrees, minutes and seconds
// of arc.
//
// Reader decisions (design.md, "Input formats"): 24:00:00 is 0h; minutes or
// seconds of 60 or more are errors, never rolled over; a sign belongs to the
// whole angle, so -00 12 30 is negative; the Unicode minus U+2212 is a minus;
// a declination beyond ±90° is an error; NaN and Inf are errors (the grammar
// below has no letters in it).

// unicodeMinus is U+2212 MINUS SIGN, read as '-'.
const unicodeMinus = '\u2212'

// sexagesimal is a parsed sexagesimal field before units are applied.
type sexagesimal struct {
	neg     bool    // a minus sign was given (even if the value is zero)
	value   float64 // |value| in the unit of the first field
	nfields int     // 1, 2 or 3
	start   int     // byte offset of the first digit in the original string
}

// ParseSexagesimal reads a signed sexagesimal number: an optional sign ('+',
// '-' or the Unicode minus U+2212), then one to three fields separated by
// colons or by runs of spaces or tabs (one kind of separator throughout):
//
//	D          a decimal number, "12.7528"
//	D:M        "12:45.17"  (M may be fractional)
//	D:M:S      "12:45:10.21", "12 45 10.21"  (S may be fractional)
//
// Leading fields are unsigned integers; only the last field may have a decimal
// point, and then with digits on both sides of it; there is no exponent.
// Minutes and seconds must be below 60. Spaces and tabs around the number are
// ignored. The sign applies to the whole value, so "-00 12 30" is −0.208333….
//
// value = sign·(D + M/60 + S/3600), in the unit of the first field (degrees
// or hours: the caller decides). A leading field has no upper limit here; the
// callers [ParseRA] and [ParseDec] check their ranges.
//
// Errors are *[FieldError] with Offset the 0-based byte offset in s of the
// offending character and Err either [ErrSyntax] or [ErrRange] (minutes or
// seconds ≥ 60).
//
// Reference: none; the sexagesimal notation of positional astronomy is common
// practice, and the reader decisions are arcfit's (design.md).
func ParseSexagesimal(s string) (value float64, err error) {
	p, err := parseSexagesimal(s)
	if err != nil {
		return 0, err
	}
	if p.neg {
		return -p.value, nil
	}
	return p.value, nil
}

func isBlank(c byte) bool { return c == ' ' || c == '\t' }

func isDigit(c byte) bool { return c >= '0' && c <= '9' }

// parseSexagesimal implements ParseSexagesimal, keeping the sign apart so that
// a negative zero can be told from a zero.
func parseSexagesimal(s string) (sexagesimal, error) {
	var p sexagesimal
	i := 0
	for i < len(s) && isBlank(s[i]) {
		i++
	}
	end := len(s)
	for end > i && isBlank(s[end-1]) {
		end--
	}
	if i == end {
		return p, &FieldError{Offset: i, Want: "a number", Got: s, Err: ErrSyntax}
	}
	switch {
	case s[i] == '+':
		i++
	case s[i] == '-':
		p.neg = true
		i++
	case strings.HasPrefix(s[i:], string(unicodeMinus)):
		p.neg = true
		i += utf8.RuneLen(unicodeMinus)
	}
	p.start = i

	var fields [3]float64
	var sep byte // 0 until the first separator is seen; ':' or ' '
	n := 0
	for {
		// One field: digits, and for the last field optionally '.' digits.
		fs := i
		for i < end && isDigit(s[i]) {
			i++
		}
		if i == fs {
			return p, syntaxAt(s, i, fieldWant(n))
		}
		if i < end && s[i] == '.' {
			i++
			fd := i
			for i < end && isDigit(s[i]) {
				i++
			}
			if i == fd {
				return p, syntaxAt(s, i, "a digit after the decimal point")
			}
			if i < end {
				// A fraction is allowed in the last field only.
				return p, syntaxAt(s, i, "the end of the number (only the last field may have a fraction)")
			}
		}
		v, perr := strconv.ParseFloat(s[fs:i], 64)
		if perr != nil || math.IsInf(v, 0) {
			return p, &FieldError{Offset: fs, Want: "a number of reasonable size", Got: s[fs:i], Err: ErrRange}
		}
		if n > 0 && v >= 60 {
			unit := "minutes"
			if n == 2 {
				unit = "seconds"
			}
			return p, &FieldError{Offset: fs, Want: unit + " below 60", Got: s[fs:i], Err: ErrRange}
		}
		fields[n] = v
		n++
		if i == end {
			break
		}
		// A separator.
		c := s[i]
		var this byte
		switch {
		case c == ':':
			this = ':'
		case isBlank(c):
			this = ' '
		default:
			return p, syntaxAt(s, i, "a digit, ':' or a space")
		}
		if sep != 0 && this != sep {
			return p, syntaxAt(s, i, "the same separator throughout (colons or spaces)")
		}
		sep = this
		if n == 3 {
			return p, syntaxAt(s, i, "at most three fields")
		}
		if this == ':' {
			i++
		} else {
			for i < end && isBlank(s[i]) {
				i++
			}
		}
	}
	p.nfields = n
	switch n {
	case 1:
		p.value = fields[0]
	case 2:
		p.value = (fields[0]*60 + fields[1]) / 60
	case 3:
		p.value = (fields[0]*3600 + fields[1]*60 + fields[2]) / 3600
	}
	if math.IsInf(p.value, 0) { // a leading field near the float64 limit overflows ×60
		return p, &FieldError{Offset: p.start, Want: "a number of reasonable size", Got: s[p.start:end], Err: ErrRange}
	}
	return p, nil
}

// syntaxAt returns an ErrSyntax FieldError at byte offset i of s, quoting the
// character found there.
func syntaxAt(s string, i int, want string) *FieldError {
	got := "end of text"
	if i < len(s) {
		r, size := utf8.DecodeRuneInString(s[i:])
		if r == utf8.RuneError && size <= 1 {
			got = s[i : i+1] // a byte that is not UTF-8: FieldError.Error quotes it
		} else {
			got = string(r)
		}
	}
	return &FieldError{Offset: i, Want: want, Got: got, Err: ErrSyntax}
}

func fieldWant(n int) string {
	switch n {
	case 0:
		return "a digit"
	case 1:
		return "a digit of the minutes"
	default:
		return "a digit of the seconds"
	}
}

// ParseRA reads a right ascension in hours: "10:21:33.512", "10 21 33.512",
// "10:21.5" (hours and decimal minutes) or decimal hours "10.3593", with the
// grammar of [ParseSexagesimal]; spaces and tabs around it are ignored.
//
// The result is in [0, 2π). Exactly 24h (24:00:00) is read as 0h. A value
// beyond 24h is an [ErrRange] error whose Want suggests degrees were meant;
// a minus sign is an [ErrRange] error (a right ascension is never negative,
// even −0); a plus sign is accepted. Errors are *[FieldError].
//
// Reference: none; right ascension in hours, 15° to the hour, is common
// practice.
func ParseRA(s string) (Angle, error) {
	p, err := parseSexagesimal(s)
	if err != nil {
		return 0, err
	}
	if p.neg {
		return 0, &FieldError{Offset: p.start - signLen(s, p.start), Want: "a right ascension in hours 0–24, without a minus sign", Got: strings.TrimSpace(s), Err: ErrRange}
	}
	if p.value > 24 {
		return 0, &FieldError{Offset: p.start, Want: "a right ascension in hours 0–24; for degrees use the ra_deg column", Got: strings.TrimSpace(s), Err: ErrRange}
	}
	if p.value == 24 {
		return 0, nil
	}
	return AngleFromHours(p.value).Normalized(), nil
}

// signLen returns the byte length of the sign that ends at offset start of s.
func signLen(s string, start int) int {
	if strings.HasSuffix(s[:start], string(unicodeMinus)) {
		return utf8.RuneLen(unicodeMinus)
	}
	return 1
}

// ParseDec reads a declination in degrees: "+12:45:10.21", "-00 12 30.0",
// "−00:12:30" (Unicode minus), "12:45.17" (degrees and decimal minutes) or
// decimal degrees "12.7528", with the grammar of [ParseSexagesimal]; the sign
// is optional for a positive value and applies to the whole angle.
//
// The result is in [−π/2, π/2]; a value beyond ±90° is an [ErrRange] error.
// Errors are *[FieldError].
//
// Reference: none; common practice.
func ParseDec(s string) (Angle, error) {
	p, err := parseSexagesimal(s)
	if err != nil {
		return 0, err
	}
	if p.value > 90 {
		return 0, &FieldError{Offset: p.start, Want: "a declination in degrees between −90 and +90", Got: strings.TrimSpace(s), Err: ErrRange}
	}
	d := AngleFromDegrees(p.value)
	if p.neg {
		d = -d
	}
	return d, nil
}

// maxDecimals is the largest number of decimals FormatHMS and FormatDMS print.
const maxDecimals = 9

var pow10 = [maxDecimals + 1]float64{1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9}

// FormatHMS writes a as a right ascension in hours, minutes and seconds of time
// with the given number of decimals of a second, "10:21:33.512". The angle is
// first reduced to [0, 2π); it is rounded to the last printed place (half away
// from zero) and the carry propagated, so 59.9996 s with three decimals prints
// as the next minute, and a value that rounds to 24h prints as 00:00:00.
// decimals is clamped to 0…9. NaN and ±Inf print as "NaN", "+Inf", "-Inf".
//
// Round trip: [ParseRA] of the result gives back an angle that FormatHMS prints
// as the same text.
//
// Accuracy: the last printed digit is correctly rounded except where the angle
// lies within a few ulps of a rounding boundary (near 24h a double resolves
// about 1.2e-11 s, a hundredth of the last digit at 9 decimals).
//
// Reference: none; common practice (the whole angle is rounded before it is
// split into fields, so no field can print as 60).
func FormatHMS(a Angle, decimals int) string {
	if s, bad := nonFinite(a); bad {
		return s
	}
	decimals = clampDecimals(decimals)
	scale := pow10[decimals]
	turn := 86400 * scale // units of 10^-decimals s in 24h
	u := math.Round(a.Normalized().Hours() * 3600 * scale)
	if u >= turn {
		u -= turn
	}
	return splitFormat(u, scale, decimals)
}

// FormatDMS writes a in degrees, minutes and seconds of arc with the given
// number of decimals of an arcsecond, always signed: "+12:45:10.21",
// "-00:12:30.00". Degrees have at least two digits ("+05:…", "+123:…"). The
// angle is not reduced; it is rounded to the last printed place (half away from
// zero) with the carry propagated, and a value that rounds to zero prints with
// '+'. decimals is clamped to 0…9. NaN and ±Inf print as "NaN", "+Inf", "-Inf".
//
// Round trip: [ParseDec] (for |a| ≤ 90°) or [ParseSexagesimal] of the result
// gives back an angle that FormatDMS prints as the same text.
//
// Accuracy: as for FormatHMS; at 9 decimals and angles beyond about 100° the
// last digit is at the resolution of a double and may differ by one from
// another correct implementation.
//
// Reference: none; common practice.
func FormatDMS(a Angle, decimals int) string {
	if s, bad := nonFinite(a); bad {
		return s
	}
	decimals = clampDecimals(decimals)
	scale := pow10[decimals]
	u := math.Round(math.Abs(a.Arcseconds()) * scale)
	sign := "+"
	if a < 0 && u > 0 {
		sign = "-"
	}
	return sign + splitFormat(u, scale, decimals)
}

func nonFinite(a Angle) (string, bool) {
	switch {
	case math.IsNaN(float64(a)):
		return "NaN", true
	case math.IsInf(float64(a), 1):
		return "+Inf", true
	case math.IsInf(float64(a), -1):
		return "-Inf", true
	}
	return "", false
}

func clampDecimals(d int) int {
	return max(0, min(d, maxDecimals))
}

// splitFormat prints u units of 1/scale second as first:mm:ss.fff.
func splitFormat(u, scale float64, decimals int) string {
	perMin := 60 * scale
	perFirst := 3600 * scale
	first := math.Floor(u / perFirst)
	rest := u - first*perFirst
	m := math.Floor(rest / perMin)
	rest -= m * perMin
	sec := math.Floor(rest / scale)
	frac := rest - sec*scale
	var b strings.Builder
	b.Grow(16 + decimals)
	b.WriteString(pad2(strconv.FormatFloat(first, 'f', 0, 64)))
	b.WriteByte(':')
	b.WriteString(pad2(strconv.FormatFloat(m, 'f', 0, 64)))
	b.WriteByte(':')
	b.WriteString(pad2(strconv.FormatFloat(sec, 'f', 0, 64)))
	if decimals > 0 {
		b.WriteByte('.')
		f := strconv.FormatFloat(frac, 'f', 0, 64)
		for range decimals - len(f) {
			b.WriteByte('0')
		}
		b.WriteString(f)
	}
	return b.String()
}

func pad2(s string) string {
	if len(s) < 2 {
		return "0" + s
	}
	return s
}
