package astro

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

// TestParseISO8601ERFA parses ISO 8601 text built from the fields of the utc
// rows of testdata/erfa_time.csv (leap seconds included) and compares with
// erfa.dtf2d, to the 2e-11 day resolution of dtf2d's output.
func TestParseISO8601ERFA(t *testing.T) {
	for _, r := range erfaTimeRows(t, "utc") {
		y, mo, d, h, mi := atoi(t, r[0]), atoi(t, r[1]), atoi(t, r[2]), atoi(t, r[3]), atoi(t, r[4])
		sec := atof(t, r[5])
		whole := math.Floor(sec)
		text := fmt.Sprintf("%04d-%02d-%02dT%02d:%02d:%02d.%06dZ", y, mo, d, h, mi, int(whole), int(math.Round((sec-whole)*1e6)))
		u1, u2 := atof(t, r[6]), atof(t, r[7])
		j, err := ParseISO8601(text)
		if err != nil {
			t.Errorf("ParseISO8601(%q): %v", text, err)
			continue
		}
		if j.Scale != UTC || j.Day != u1 || math.Abs(j.Frac-u2) > 2e-11 {
			t.Errorf("ParseISO8601(%q) = %v, want %.1f+%.15f (erfa.dtf2d)", text, j, u1, u2)
		}
		// Format at six decimals and read back: the same text.
		if got := FormatISO8601(j, 6); got != text {
			t.Errorf("FormatISO8601(ParseISO8601(%q), 6) = %q", text, got)
		}
	}
}

func TestParseISO8601Forms(t *testing.T) {
	tests := []struct {
		in, same, src string
	}{
		{"2027-02-03T22:14:05+01:00", "2027-02-03T21:14:05Z", "ISO 8601-1 §5.4: offset east of UTC"},
		{"2027-02-03T22:14:05+0100", "2027-02-03T21:14:05Z", "ISO 8601-1 basic-format offset"},
		{"2027-02-03T22:14:05+01", "2027-02-03T21:14:05Z", "ISO 8601-1 hour-only offset"},
		{"2027-02-03T20:14:05-01:00", "2027-02-03T21:14:05Z", "negative offset"},
		{"2027-02-03T20:14:05\u221201:00", "2027-02-03T21:14:05Z", "Unicode minus as minus (design.md)"},
		{"2027-02-03 21:14:05Z", "2027-02-03T21:14:05Z", "RFC 3339 §5.6 note: space for T"},
		{"2027-02-03t21:14:05z", "2027-02-03T21:14:05Z", "RFC 3339 §5.6: lowercase t, z"},
		{"2027-02-03T21:14Z", "2027-02-03T21:14:00Z", "ISO 8601-1 reduced precision hh:mm"},
		{"2027-01-01T00:30:00+01:00", "2026-12-31T23:30:00Z", "offset carries into the previous day and year"},
		{"2027-02-28T23:30:00-01:00", "2027-03-01T00:30:00Z", "offset carries into the next month"},
		{"2017-01-01T00:59:60.5+01:00", "2016-12-31T23:59:60.5Z", "the 2016 leap second written in UTC+1 (IERS Bulletin C 52)"},
		{"2027-02-03T21:14:05.20Z", "2027-02-03T21:14:05.2000000000000000000001Z", "any number of decimals"},
	}
	for _, tc := range tests {
		a, err := ParseISO8601(tc.in)
		if err != nil {
			t.Errorf("ParseISO8601(%q): %v [%s]", tc.in, err, tc.src)
			continue
		}
		b, err := ParseISO8601(tc.same)
		if err != nil {
			t.Errorf("ParseISO8601(%q): %v", tc.same, err)
			continue
		}
		if a != b {
			t.Errorf("ParseISO8601(%q) = %v, want %v = ParseISO8601(%q) [%s]", tc.in, a, b, tc.same, tc.src)
		}
	}
	// Precision: the fraction is built from the digits, so 1 µs steps survive
	// (the two-part JD resolves ~1e-11 s).
	a, _ := ParseISO8601("2027-02-03T21:14:05.000001Z")
	b, _ := ParseISO8601("2027-02-03T21:14:05.000002Z")
	if s := (b.Frac - a.Frac) * 86400; math.Abs(s-1e-6) > 1e-10 {
		t.Errorf("1 µs apart parses as %.6g s apart", s)
	}
}

func TestParseISO8601Errors(t *testing.T) {
	tests := []struct {
		name, in string
		offset   int
		err      error
		want     string // part of FieldError.Want
	}{
		{"empty", "", 0, ErrSyntax, "date and time"},
		{"no zone", "2027-02-03T21:14:05", 19, ErrSyntax, "add Z for UTC or an offset such as +01:00"},
		{"date only", "2027-02-03", 10, ErrSyntax, "time of day"},
		{"leap second on a common day", "2027-02-03T23:59:60Z", 17, ErrRange, "leap second"},
		{"leap second at 23:59 local but not UTC", "2016-12-31T23:59:60+01:00", 17, ErrRange, "leap second"},
		{"leap second before the day's end", "2016-12-31T23:58:60Z", 17, ErrRange, "leap second"},
		{"second 61", "2016-12-31T23:59:61Z", 17, ErrRange, "seconds 00–59"},
		{"24:00:00", "2027-02-03T24:00:00Z", 11, ErrRange, "next day"},
		{"hour 25", "2027-02-03T25:00:00Z", 11, ErrRange, "hour 00–23"},
		{"month 13", "2027-13-03T21:14:05Z", 5, ErrRange, "month 01–12"},
		{"month 00", "2027-00-03T21:14:05Z", 5, ErrRange, "month 01–12"},
		{"Feb 30", "2027-02-30T21:14:05Z", 8, ErrRange, "day 01–28"},
		{"Feb 29 common year", "2027-02-29T21:14:05Z", 8, ErrRange, "day 01–28"},
		{"day 00", "2027-02-00T21:14:05Z", 8, ErrRange, "day 01–28"},
		{"minute 60", "2027-02-03T21:60:05Z", 14, ErrRange, "minutes 00–59"},
		{"second 75", "2027-02-03T21:14:75Z", 17, ErrRange, "seconds 00–59"},
		{"garbage", "yesterday evening", 0, ErrSyntax, "four-digit year"},
		{"two-digit year", "27-02-03T21:14:05Z", 2, ErrSyntax, "four-digit year"},
		{"slashes", "2027/02/03T21:14:05Z", 4, ErrSyntax, "'-' after the year"},
		{"one-digit month", "2027-2-03T21:14:05Z", 6, ErrSyntax, "two-digit month"},
		{"bad separator", "2027-02-03X21:14:05Z", 10, ErrSyntax, "'T'"},
		{"Unicode digit", "2027-02-03T2１:14:05Z", 12, ErrSyntax, "two-digit hour"},
		{"Unicode letter in zone", "2027-02-03T21:14:05Ω", 19, ErrSyntax, "Z or an offset"},
		{"decimal comma", "2027-02-03T21:14:05,2Z", 19, ErrSyntax, "decimal comma"},
		{"point without digits", "2027-02-03T21:14:05.Z", 20, ErrSyntax, "digits after the decimal point"},
		{"fractional minutes", "2027-02-03T21:14.5Z", 16, ErrSyntax, "Z or an offset"},
		{"offset hour 24", "2027-02-03T21:14:05+24:00", 20, ErrRange, "offset hour"},
		{"offset minute 60", "2027-02-03T21:14:05+01:60", 23, ErrRange, "offset minutes"},
		{"offset one digit", "2027-02-03T21:14:05+1", 21, ErrSyntax, "offset hour"},
		{"text after zone", "2027-02-03T21:14:05Z junk", 20, ErrSyntax, "end of the text"},
		{"leading space", " 2027-02-03T21:14:05Z", 0, ErrSyntax, "four-digit year"},
		{"trailing space", "2027-02-03T21:14:05Z ", 20, ErrSyntax, "end of the text"},
		{"signed year", "+2027-02-03T21:14:05Z", 0, ErrSyntax, "four-digit year"},
		{"invalid UTF-8", "2027-02-03T21:14:05\xff", 19, ErrSyntax, "Z or an offset"},
		{"NUL byte", "2027-02-03T21:14:05\x00Z", 19, ErrSyntax, "Z or an offset"},
	}
	for _, tc := range tests {
		_, err := ParseISO8601(tc.in)
		var fe *FieldError
		if !errors.As(err, &fe) {
			t.Errorf("ParseISO8601(%q) [%s]: err = %v, want a *FieldError", tc.in, tc.name, err)
			continue
		}
		if fe.Offset != tc.offset || !errors.Is(err, tc.err) || !strings.Contains(fe.Want, tc.want) {
			t.Errorf("ParseISO8601(%q) [%s]: offset %d, %v, want %q; want offset %d, %v, want containing %q",
				tc.in, tc.name, fe.Offset, fe.Err, fe.Want, tc.offset, tc.err, tc.want)
		}
	}
}

func TestParseISO8601Scale(t *testing.T) {
	tt, err := ParseISO8601Scale("2027-01-01T00:00:00", TT)
	if err != nil || tt.Scale != TT || tt.Day != 2461406.5 || tt.Frac != 0 {
		t.Errorf("ParseISO8601Scale(2027-01-01T00:00:00, TT) = %v, %v; want JD 2461406.5 TT (erfa.cal2jd 2027 1 1 = MJD 61406)", tt, err)
	}
	if _, err := ParseISO8601Scale("2027-01-01T00:00:00Z", TT); !errors.Is(err, ErrSyntax) {
		t.Errorf("a TT time with Z: err = %v, want ErrSyntax", err)
	}
	if _, err := ParseISO8601Scale("2016-12-31T23:59:60", TT); !errors.Is(err, ErrRange) {
		t.Errorf("23:59:60 TT: err = %v, want ErrRange (no leap seconds in TT)", err)
	}
	if got := FormatISO8601(tt, 3); got != "2027-01-01T00:00:00.000" {
		t.Errorf("FormatISO8601(TT) = %q, want no zone letter", got)
	}
	if j, err := ParseISO8601Scale("2027-02-03T21:14:05Z", UTC); err != nil || j.Scale != UTC {
		t.Errorf("ParseISO8601Scale(…, UTC) = %v, %v", j, err)
	}
}

func TestFormatISO8601(t *testing.T) {
	mk := func(y, mo, d, h, mi int, s float64, sc Scale) JD {
		j, err := DateTimeToJD(y, mo, d, h, mi, s, sc)
		if err != nil {
			t.Fatal(err)
		}
		return j
	}
	tests := []struct {
		name string
		in   JD
		dec  int
		want string
	}{
		{"design example", mk(2027, 2, 3, 21, 14, 5.2, UTC), 2, "2027-02-03T21:14:05.20Z"},
		{"59.996 s carries into the minute", mk(2027, 2, 3, 21, 14, 59.996, UTC), 2, "2027-02-03T21:15:00.00Z"},
		{"carry into the next year", mk(2026, 12, 31, 23, 59, 59.9996, UTC), 3, "2027-01-01T00:00:00.000Z"},
		{"no decimals rounds", mk(2027, 2, 3, 21, 14, 5.5, UTC), 0, "2027-02-03T21:14:06Z"},
		{"leap second shown as :60", mk(2016, 12, 31, 23, 59, 60.75, UTC), 3, "2016-12-31T23:59:60.750Z"},
		{"59.9996 before the leap second stays in the day", mk(2016, 12, 31, 23, 59, 59.9996, UTC), 3, "2016-12-31T23:59:60.000Z"},
		{"leap second rounds into the next day", mk(2016, 12, 31, 23, 59, 60.9996, UTC), 3, "2017-01-01T00:00:00.000Z"},
		{"TT has no zone", mk(2027, 2, 3, 21, 14, 5.2, TT), 1, "2027-02-03T21:14:05.2"},
		{"decimals clamped to 9", mk(2027, 2, 3, 21, 14, 5.123456789, UTC), 15, "2027-02-03T21:14:05.123456789Z"},
		{"negative decimals as 0", mk(2027, 2, 3, 21, 14, 5.2, UTC), -3, "2027-02-03T21:14:05Z"},
		{"NaN", JD{Day: math.NaN(), Scale: UTC}, 2, "NaN"},
	}
	for _, tc := range tests {
		if got := FormatISO8601(tc.in, tc.dec); got != tc.want {
			t.Errorf("FormatISO8601(%s, %d) = %q, want %q", tc.name, tc.dec, got, tc.want)
		}
	}
	// Round trip at printed precision over many instants.
	for i := 0; i < 2000; i++ {
		j := JD{Day: 2441317.5 + float64(i*37), Frac: math.Mod(float64(i)*0.6180339887, 1), Scale: UTC}
		text := FormatISO8601(j, 6)
		back, err := ParseISO8601(text)
		if err != nil {
			t.Fatalf("ParseISO8601(FormatISO8601(%v)) = %q: %v", j, text, err)
		}
		if s := ((back.Day - j.Day) + (back.Frac - j.Frac)) * 86400; math.Abs(s) > 0.5e-6+1e-9 {
			t.Errorf("round trip of %v via %q: Δ %.3g s, want ≤ 0.5 µs", j, text, s)
		}
	}
}

// FuzzParseISO8601 checks that the parser never panics and that what it
// accepts formats and parses back to the same instant at the text's precision.
func FuzzParseISO8601(f *testing.F) {
	for _, s := range []string{
		"2027-02-03T21:14:05.20Z", "2027-02-03T22:14:05+01:00", "2027-02-03 21:14:05Z",
		"2016-12-31T23:59:60.5Z", "2017-01-01T00:59:60+01:00", "2027-02-03T21:14Z",
		"2027-02-03T21:14:05", "2027-02-30T00:00:00Z", "2027-02-03T24:00:00Z", "", "\xff",
		"2027-02-03T20:14:05\u221201:00", "0000-01-01T00:00:00Z", "9999-12-31T23:59:59.999999999999Z",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		j, err := ParseISO8601(s)
		if err != nil {
			var fe *FieldError
			if !errors.As(err, &fe) || fe.Offset < 0 || fe.Offset > len(s) || fe.Want == "" {
				t.Fatalf("ParseISO8601(%q): error %v is not a positioned *FieldError", s, err)
			}
			return
		}
		if j.Scale != UTC || !(j.Frac >= 0 && j.Frac < 1) {
			t.Fatalf("ParseISO8601(%q) = %v", s, j)
		}
		text := FormatISO8601(j, 9)
		if text[0] == '+' || text[0] == '-' {
			return // rounding or the offset moved the instant out of years 0000–9999, which the parser does not read
		}
		back, err := ParseISO8601(text)
		if err != nil {
			t.Fatalf("ParseISO8601(%q) → %v → %q: %v", s, j, text, err)
		}
		if d := ((back.Day - j.Day) + (back.Frac - j.Frac)) * 86400; math.Abs(d) > 0.5e-9+1e-10 {
			t.Fatalf("%q → %q: Δ %.3g s", s, text, d)
		}
	})
}

func BenchmarkParseISO8601(b *testing.B) {
	b.ReportAllocs()
	var sink float64
	for i := 0; i < b.N; i++ {
		j, _ := ParseISO8601("2027-02-03T21:14:05.20Z")
		sink += j.Frac
	}
	benchSinkFloat = sink
}

func BenchmarkFormatISO8601(b *testing.B) {
	b.ReportAllocs()
	j := JD{Day: 2461439.5, Frac: 0.885, Scale: UTC}
	var n int
	for i := 0; i < b.N; i++ {
		n += len(FormatISO8601(j, 2))
	}
	benchSinkFloat = float64(n)
}
