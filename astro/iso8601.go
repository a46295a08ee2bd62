package astro

import (
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
)

// isoForm is the form the ISO 8601 parser reads, for error messages.
const isoForm = "YYYY-MM-DDThh:mm:ss.sssZ"

// isoParser walks one ISO 8601 date-time string.
type isoParser struct {
	s   string
	pos int
}

// fail returns a *FieldError at offset off: the text from there to the next
// separator (or one rune, if it is not ASCII) is Got.
func (p *isoParser) fail(off int, want string, err error) error {
	got := ""
	if off < len(p.s) {
		r, n := utf8.DecodeRuneInString(p.s[off:])
		if r >= utf8.RuneSelf || r < ' ' {
			got = p.s[off : off+n] // a byte that is not UTF-8 too: Error quotes it
		} else {
			end := off
			for end < len(p.s) && end-off < 16 && p.s[end] >= ' ' && p.s[end] < utf8.RuneSelf {
				end++
			}
			got = p.s[off:end]
		}
	}
	return &FieldError{Offset: off, Want: want, Got: got, Err: err}
}

// digits reads exactly n ASCII digits.
func (p *isoParser) digits(n int, want string) (int, error) {
	v := 0
	for i := 0; i < n; i++ {
		if p.pos >= len(p.s) || p.s[p.pos] < '0' || p.s[p.pos] > '9' {
			return 0, p.fail(p.pos, want, ErrSyntax)
		}
		v = v*10 + int(p.s[p.pos]-'0')
		p.pos++
	}
	return v, nil
}

// expect reads the byte c.
func (p *isoParser) expect(c byte, want string) error {
	if p.pos >= len(p.s) || p.s[p.pos] != c {
		return p.fail(p.pos, want, ErrSyntax)
	}
	p.pos++
	return nil
}

// isoFields are the fields of a date-time as written.
type isoFields struct {
	year, month, day, hour, minute, second int
	frac                                   string // digits after the decimal point
	zoneMin                                int    // offset east of UTC in minutes
	hasZone                                bool
	offSecond                              int // byte offset of the seconds field (or of the minute if none)
}

// parseFields reads date, time of day and (optional) zone, checking syntax and
// the ranges that do not depend on the leap-second table.
func (p *isoParser) parseFields() (isoFields, error) {
	var f isoFields
	var err error
	if p.s == "" {
		return f, &FieldError{Offset: 0, Want: "a date and time such as 2027-02-03T21:14:05Z", Err: ErrSyntax}
	}
	if f.year, err = p.digits(4, "a four-digit year ("+isoForm+")"); err != nil {
		return f, err
	}
	if err = p.expect('-', "'-' after the year ("+isoForm+")"); err != nil {
		return f, err
	}
	offMonth := p.pos
	if f.month, err = p.digits(2, "a two-digit month 01–12"); err != nil {
		return f, err
	}
	if f.month < 1 || f.month > 12 {
		return f, p.fail(offMonth, "a month 01–12", ErrRange)
	}
	if err = p.expect('-', "'-' after the month ("+isoForm+")"); err != nil {
		return f, err
	}
	offDay := p.pos
	if f.day, err = p.digits(2, "a two-digit day of the month"); err != nil {
		return f, err
	}
	if dm := DaysInMonth(f.year, f.month, Gregorian); f.day < 1 || f.day > dm {
		return f, p.fail(offDay, "a day 01–"+strconv.Itoa(dm)+" for "+p.s[:7], ErrRange)
	}
	if p.pos == len(p.s) {
		return f, p.fail(p.pos, "a time of day after the date, such as T21:14:05Z (a date alone is ambiguous)", ErrSyntax)
	}
	if c := p.s[p.pos]; c != 'T' && c != 't' && c != ' ' {
		return f, p.fail(p.pos, "'T' (or a space) between date and time ("+isoForm+")", ErrSyntax)
	}
	p.pos++
	offHour := p.pos
	if f.hour, err = p.digits(2, "a two-digit hour 00–23"); err != nil {
		return f, err
	}
	if f.hour > 23 {
		want := "an hour 00–23"
		if f.hour == 24 {
			want = "an hour 00–23 (write 24:00 as 00:00 of the next day)"
		}
		return f, p.fail(offHour, want, ErrRange)
	}
	if err = p.expect(':', "':' after the hour (hh:mm:ss)"); err != nil {
		return f, err
	}
	offMinute := p.pos
	if f.minute, err = p.digits(2, "two-digit minutes 00–59"); err != nil {
		return f, err
	}
	if f.minute > 59 {
		return f, p.fail(offMinute, "minutes 00–59", ErrRange)
	}
	f.offSecond = offMinute
	if p.pos < len(p.s) && p.s[p.pos] == ':' {
		p.pos++
		f.offSecond = p.pos
		if f.second, err = p.digits(2, "two-digit seconds 00–59"); err != nil {
			return f, err
		}
		if f.second > 60 {
			return f, p.fail(f.offSecond, "seconds 00–59 (60 only in a leap second)", ErrRange)
		}
		if p.pos < len(p.s) && (p.s[p.pos] == '.' || p.s[p.pos] == ',') {
			if p.s[p.pos] == ',' {
				return f, p.fail(p.pos, "'.' before the decimals of the second (no decimal comma)", ErrSyntax)
			}
			p.pos++
			start := p.pos
			for p.pos < len(p.s) && p.s[p.pos] >= '0' && p.s[p.pos] <= '9' {
				p.pos++
			}
			if p.pos == start {
				return f, p.fail(p.pos, "digits after the decimal point", ErrSyntax)
			}
			f.frac = p.s[start:p.pos]
		}
	}
	if p.pos == len(p.s) {
		return f, nil
	}
	offZone := p.pos
	sign := 0
	switch {
	case p.s[p.pos] == 'Z' || p.s[p.pos] == 'z':
		p.pos++
		f.hasZone = true
	case p.s[p.pos] == '+':
		sign = 1
		p.pos++
	case p.s[p.pos] == '-':
		sign = -1
		p.pos++
	case strings.HasPrefix(p.s[p.pos:], "\u2212"): // the Unicode minus sign is a minus
		sign = -1
		p.pos += len("\u2212")
	default:
		return f, p.fail(offZone, "Z or an offset such as +01:00 after the time", ErrSyntax)
	}
	if sign != 0 {
		f.hasZone = true
		offZH := p.pos
		zh, err := p.digits(2, "a two-digit offset hour (±hh:mm)")
		if err != nil {
			return f, err
		}
		if zh > 23 {
			return f, p.fail(offZH, "an offset hour 00–23", ErrRange)
		}
		zm := 0
		if p.pos < len(p.s) {
			if p.s[p.pos] == ':' {
				p.pos++
			}
			offZM := p.pos
			if zm, err = p.digits(2, "two-digit offset minutes (±hh:mm)"); err != nil {
				return f, err
			}
			if zm > 59 {
				return f, p.fail(offZM, "offset minutes 00–59", ErrRange)
			}
		}
		f.zoneMin = sign * (zh*60 + zm)
	}
	if p.pos != len(p.s) {
		return f, p.fail(p.pos, "the end of the text after the zone", ErrSyntax)
	}
	return f, nil
}

// toJD converts the fields (already in range) to a JD on scale sc, applying the
// zone offset and, for UTC, the leap-second rule.
func (p *isoParser) toJD(f isoFields, sc Scale) (JD, error) {
	minutes := int64(f.hour*60+f.minute) - int64(f.zoneMin)
	z := dayNumber(int64(f.year), int64(f.month), int64(f.day), true) + floorDiv(minutes, 1440)
	minutes -= 1440 * floorDiv(minutes, 1440)
	length := SecondsPerDay
	if sc == UTC {
		length = utcDaySeconds(z - 2400001)
	}
	limit := 60
	if minutes == 1439 {
		limit = 60 + int(length-SecondsPerDay)
	}
	if f.second >= limit {
		want := "seconds 00–59 (60 only in a leap second: 23:59:60 UTC at the end of a day with one inserted, per the table known good until " + LeapSecondsValidUntilDate + ")"
		if limit < 60 {
			want = "seconds 00–58 (this UTC day ends with a negative leap second)"
		}
		return JD{}, p.fail(f.offSecond, want, ErrRange)
	}
	frac := 0.0
	if f.frac != "" {
		v, err := strconv.ParseFloat("0."+f.frac, 64)
		if err != nil { // not reached: only digits were accepted
			return JD{}, p.fail(f.offSecond, "a decimal fraction of a second", ErrSyntax)
		}
		frac = v
	}
	dayFrac := (float64(minutes*60+int64(f.second)) + frac) / length
	if dayFrac >= 1 {
		dayFrac = math.Nextafter(1, 0)
	}
	return JD{Day: float64(z) - 0.5, Frac: dayFrac, Scale: sc}, nil
}

// ParseISO8601 reads an ISO 8601 (RFC 3339 profile) date and time and returns
// the UTC Julian date (a quasi JD on leap-second days, see [JD]). Accepted:
//
//	2027-02-03T21:14:05.20Z       fractional seconds to any number of digits
//	2027-02-03T22:14:05+01:00     an offset east of UTC (also +0100, +01, or −01:00 with U+2212)
//	2027-02-03 21:14:05Z          a space instead of T
//	2027-02-03T21:14Z             seconds may be left out
//
// 't' and 'z' may be lowercase, as RFC 3339 allows. A zone is required (a time
// without one is an error with the hint to add Z or an offset); a date alone
// is an error (a day is not an instant). Hours run 00–23: 24:00 is an error
// (write 00:00 of the next day); minutes and seconds 00–59, never rolled
// over; 60 seconds only in the leap second at 23:59:60 UTC (after the offset is
// applied) of a day on which the embedded table inserts one. Expanded
// (signed or five-digit) years, week and ordinal dates, decimal commas and
// surrounding spaces are not accepted; trim the field first.
//
// The Julian date is built from the integer fields and the decimal digits of
// the second in one division, so it keeps the precision of the text (about
// 1e-11 s). Every error is a *[FieldError] whose Offset is the byte offset of
// the offending character and whose Err is [ErrSyntax] or [ErrRange].
//
// Reference: ISO 8601-1:2019, §5.4 (calendar date and time of day); RFC 3339
// (2002), §5.6 (the internet profile, lowercase letters, ±hh:mm).
func ParseISO8601(s string) (JD, error) {
	p := isoParser{s: s}
	f, err := p.parseFields()
	if err != nil {
		return JD{}, err
	}
	if !f.hasZone {
		return JD{}, p.fail(len(s), "a zone: add Z for UTC or an offset such as +01:00", ErrSyntax)
	}
	return p.toJD(f, UTC)
}

// ParseISO8601Scale reads an ISO 8601 date and time written on the time scale
// sc. For UTC it is [ParseISO8601]. For the other scales (TT, TDB, TAI, UT1) the
// text must have no zone letter or offset, as in "2027-01-01T00:00:00" read as
// TT, and 60 seconds are never valid; otherwise the forms and errors are those of
// ParseISO8601.
func ParseISO8601Scale(s string, sc Scale) (JD, error) {
	if sc == UTC {
		return ParseISO8601(s)
	}
	p := isoParser{s: s}
	f, err := p.parseFields()
	if err != nil {
		return JD{}, err
	}
	if f.hasZone {
		off := strings.IndexAny(s[10:], "Zz+-\u2212")
		return JD{}, p.fail(10+off, "no zone: a "+sc.String()+" time is written without Z or an offset", ErrSyntax)
	}
	return p.toJD(f, sc)
}

// maxISODecimals is the most decimals of the second FormatISO8601 writes; a
// two-part JD resolves about 1e-11 s.
const maxISODecimals = 9

// FormatISO8601 writes j as an ISO 8601 date and time with decimals digits of
// the second (0–9; outside that range it is clamped), rounded to nearest with
// the carry into minutes, hours and days (59.996 s with two decimals becomes
// the next minute). A UTC date is written with "Z" and shows a leap second as
// 23:59:60; a date on another scale is written without a zone, as
// [ParseISO8601Scale] reads it. Years outside 0000–9999 are written with a
// sign. A non-finite date gives "NaN".
//
// Reference: ISO 8601-1:2019, §5.4; RFC 3339 (2002), §5.6.
func FormatISO8601(j JD, decimals int) string {
	if decimals < 0 {
		decimals = 0
	}
	if decimals > maxISODecimals {
		decimals = maxISODecimals
	}
	n := j.Normalized()
	if math.IsNaN(n.Day) || math.IsNaN(n.Frac) || math.Abs(n.Day) > maxAbsJD {
		return "NaN"
	}
	z := int64(n.Day + 0.5)
	length := SecondsPerDay
	if j.Scale == UTC {
		length = utcDaySeconds(z - 2400001)
	}
	unit := int64(1)
	for i := 0; i < decimals; i++ {
		unit *= 10
	}
	ticks := int64(math.Round(n.Frac * length * float64(unit)))
	if day := int64(length) * unit; ticks >= day {
		ticks -= day
		z++
	}
	sec := ticks / unit
	sub := ticks % unit
	h := sec / 3600
	if h > 23 {
		h = 23
	}
	sec -= h * 3600
	mi := sec / 60
	if mi > 59 {
		mi = 59
	}
	sec -= mi * 60
	y, m, d := dateOfDayNumber(z, true)

	var b strings.Builder
	b.Grow(32)
	if y < 0 || y > 9999 {
		if y < 0 {
			b.WriteByte('-')
			y = -y
		} else {
			b.WriteByte('+')
		}
	}
	pad(&b, y, 4)
	b.WriteByte('-')
	pad(&b, m, 2)
	b.WriteByte('-')
	pad(&b, d, 2)
	b.WriteByte('T')
	pad(&b, h, 2)
	b.WriteByte(':')
	pad(&b, mi, 2)
	b.WriteByte(':')
	pad(&b, sec, 2)
	if decimals > 0 {
		b.WriteByte('.')
		pad(&b, sub, decimals)
	}
	if j.Scale == UTC {
		b.WriteByte('Z')
	}
	return b.String()
}

// pad writes v ≥ 0 with at least width digits.
func pad(b *strings.Builder, v int64, width int) {
	s := strconv.FormatInt(v, 10)
	for i := len(s); i < width; i++ {
		b.WriteByte('0')
	}
	b.WriteString(s)
}
