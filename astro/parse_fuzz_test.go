package astro

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// checkFieldError checks that err is a *FieldError with an offset inside s
// and a one-line message.
func checkFieldError(t *testing.T, fn, s string, err error) {
	t.Helper()
	var fe *FieldError
	if !errors.As(err, &fe) || fe.Offset < 0 || fe.Offset > len(s) {
		t.Fatalf("%s(%q): error %v is not a *FieldError with an offset in the text", fn, s, err)
	}
	if msg := err.Error(); msg == "" || strings.ContainsAny(msg, "\n\r") {
		t.Fatalf("%s(%q): error not one line: %q", fn, s, msg)
	}
}

// FuzzParseSexagesimal checks the sexagesimal grammar under the RA and Dec
// readers: an error is a positioned *FieldError; an accepted value is
// finite, and the sign applies to the whole value (the text with a leading
// minus, when it had no sign, reads as the negated value).
func FuzzParseSexagesimal(f *testing.F) {
	for _, s := range []string{"12:45:10.21", "12 45 10.21", "-00 12 30", "\u221200:12:30", "12.7528", "12:45.17", "1:60", "1::2", "99999999999999999999:59:59.9", "\t+3\t4\t5 "} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		v, err := ParseSexagesimal(s)
		if err != nil {
			checkFieldError(t, "ParseSexagesimal", s, err)
			return
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Fatalf("ParseSexagesimal(%q) = %v", s, v)
		}
		tr := strings.TrimLeft(s, " \t")
		if tr == "" || tr[0] == '+' || tr[0] == '-' || strings.HasPrefix(tr, "\u2212") {
			return
		}
		n, err := ParseSexagesimal("-" + tr)
		if err != nil || n != -v {
			t.Fatalf("ParseSexagesimal(%q) = %v but ParseSexagesimal(%q) = %v, %v", s, v, "-"+tr, n, err)
		}
	})
}

// FuzzParseISO8601Scale reads times on TT, as the elements file writes its
// epochs: an error is a positioned *FieldError; an accepted instant is on TT
// with its fraction in [0, 1), and written back without a zone (to 1 ns) it
// reads back within 1 ns.
func FuzzParseISO8601Scale(f *testing.F) {
	for _, s := range []string{"2027-01-01T00:00:00", "2027-01-01T00:00:00Z", "2016-12-31T23:59:60", "1800-01-01T00:00:00.000000001",
		"2199-12-31T23:59:59.999999999", "2027-01-01 12:00", "2027-01-01T12:00:00+01:00", "2027-01-01"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		j, err := ParseISO8601Scale(s, TT)
		if err != nil {
			checkFieldError(t, "ParseISO8601Scale", s, err)
			return
		}
		if j.Scale != TT || !(j.Frac >= 0 && j.Frac < 1) || math.IsInf(j.Day, 0) || math.IsNaN(j.Day) {
			t.Fatalf("ParseISO8601Scale(%q, TT) = %v", s, j)
		}
		text := FormatISO8601(j, 9)
		if text[0] == '+' || text[0] == '-' {
			return // outside years 0000–9999 after rounding, which the reader does not take
		}
		if strings.HasSuffix(text, "Z") {
			t.Fatalf("a TT time written with a zone: %q", text)
		}
		back, err := ParseISO8601Scale(text, TT)
		if err != nil {
			t.Fatalf("ParseISO8601Scale(%q) → %v → %q: %v", s, j, text, err)
		}
		if d := ((back.Day - j.Day) + (back.Frac - j.Frac)) * SecondsPerDay; math.Abs(d) > 0.5e-9+1e-10 {
			t.Fatalf("%q → %q: Δ %.3g s", s, text, d)
		}
	})
}
