package astro

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

// The hard cases of the time scales: instants written in ISO 8601 through a
// leap second, and the span 1800–2200 with the ΔT the library uses there.

// TestLeapSecondParsedToTT reads the UTC instants of erfa_time.csv that lie
// in the last two seconds of a leap-second day or the first second after it
// (23:59:59.5, 23:59:60, 23:59:60.75, 00:00:00.25) as ISO 8601 text, and
// checks the TT of the whole chain ParseISO8601 → UTCToTT against
// erfa.dtf2d + erfa.utctai + erfa.taitt (python3-erfa 2.0.0.1,
// testdata/erfa_time.csv), to 1 ns (ERFA's two-part dates resolve about
// 1e-11 s). TTToUTC brings the 23:59:60 instants back as 23:59:60.
func TestLeapSecondParsedToTT(t *testing.T) {
	n := 0
	for _, r := range erfaTimeRows(t, "utc") {
		h, m, s := atoi(t, r[3]), atoi(t, r[4]), atof(t, r[5])
		if !(h == 23 && m == 59 && s >= 59) && !(h == 0 && m == 0 && s < 1) {
			continue
		}
		text := fmt.Sprintf("%04d-%02d-%02dT%02d:%02d:%05.2fZ", atoi(t, r[0]), atoi(t, r[1]), atoi(t, r[2]), h, m, s)
		utc, err := ParseISO8601(text)
		if err != nil {
			t.Errorf("ParseISO8601(%q): %v", text, err)
			continue
		}
		tt, err := UTCToTT(utc)
		if err != nil && !errors.Is(err, ErrStaleTable) {
			t.Errorf("UTCToTT(%q): %v", text, err)
			continue
		}
		t1, t2 := atof(t, r[12]), atof(t, r[13])
		if d := secondsBetween(tt.Day, tt.Frac, t1, t2); math.Abs(d) > 1e-9 {
			t.Errorf("%s → TT %v, want %.1f+%.15f (erfa.utctai+taitt; Δ %.3g s)", text, tt, t1, t2, d)
		}
		back, _ := TTToUTC(tt)
		if got := FormatISO8601(back, 2); got != text {
			t.Errorf("TTToUTC(UTCToTT(%s)) prints %s", text, got)
		}
		n++
	}
	if n < 6 {
		t.Fatalf("only %d leap-second rows in erfa_time.csv", n)
	}
}

// TestLeapSecondTTContinuous steps through the leap second at the end of
// 2016 (TAI − UTC 36 s → 37 s on 2017 January 1, IERS Bulletin C 52) in
// quarter seconds of UTC, 23:59:58 to 00:00:02: TT advances by exactly a
// quarter second each step (1 µs tolerance, far below the second a slip
// would show), 23:59:60 is a valid time on that day alone, and each TT
// instant goes back to the text it came from.
func TestLeapSecondTTContinuous(t *testing.T) {
	var texts []string
	for q := 0; q < 4*3; q++ { // 23:59:58.00 … 23:59:60.75
		s := 58 + float64(q)/4
		texts = append(texts, fmt.Sprintf("2016-12-31T23:59:%05.2fZ", s))
	}
	for q := 0; q <= 8; q++ {
		texts = append(texts, fmt.Sprintf("2017-01-01T00:00:%05.2fZ", float64(q)/4))
	}
	var prev JD
	for i, text := range texts {
		utc, err := ParseISO8601(text)
		if err != nil {
			t.Fatalf("ParseISO8601(%q): %v", text, err)
		}
		tt, err := UTCToTT(utc)
		if err != nil && !errors.Is(err, ErrStaleTable) {
			t.Fatalf("UTCToTT(%q): %v", text, err)
		}
		if i > 0 {
			if d := tt.Sub(prev) * SecondsPerDay; math.Abs(d-0.25) > 1e-6 {
				t.Errorf("TT steps %.9f s from %s to %s, want 0.25 s", d, texts[i-1], text)
			}
		}
		back, _ := TTToUTC(tt)
		if got := FormatISO8601(back, 2); got != text {
			t.Errorf("TTToUTC(UTCToTT(%s)) prints %s", text, got)
		}
		prev = tt
	}
	// 23:59:60 only where the table inserts a leap second: 2016-12-31 and
	// 2015-06-30 did (IERS Bulletin C), 2015-12-31 and 2017-06-30 did not.
	for _, c := range []struct {
		text string
		ok   bool
	}{
		{"2016-12-31T23:59:60Z", true}, {"2015-06-30T23:59:60.999Z", true}, {"2017-01-01T00:59:60+01:00", true},
		{"2015-12-31T23:59:60Z", false}, {"2017-06-30T23:59:60Z", false}, {"2016-12-31T22:59:60Z", false}, {"2016-12-31T23:59:61Z", false},
	} {
		_, err := ParseISO8601(c.text)
		if (err == nil) != c.ok {
			t.Errorf("ParseISO8601(%q): error %v, want ok = %v", c.text, err, c.ok)
		}
		if err != nil && (!strings.Contains(err.Error(), "leap second") && !strings.Contains(err.Error(), "seconds")) {
			t.Errorf("ParseISO8601(%q): %q does not say what is wrong", c.text, err)
		}
	}
}

// TestTimeSpan1800To2200 walks the supported span, 1800–2200, month by
// month: ΔT is finite and moves by less than 0.5 s a month (its fastest
// change in the span is the 2.4 s a year of the long-term parabola at 2200,
// d/dy(32u²) = 0.64u s/yr with u = 3.8; Espenak & Meeus 2006); UTCToTT gives
// TT = UT + ΔT exactly before 1972 with the ErrUTCBefore1972 warning, the
// leap-second TT − UTC from 1972 to the table's end without a warning, and
// TT − UTC = 32.184 s + 37 s with the ErrStaleTable warning after it (the
// value is the last table entry, and the warning says so). At 2200 ΔT is the
// long-term parabola of Espenak & Meeus (2006) itself, −20 + 32u², u =
// (2200 − 1820)/100: 442.08 s. The values used are logged.
func TestTimeSpan1800To2200(t *testing.T) {
	prevDT := math.NaN()
	for y := 1800; y <= 2199; y++ {
		for m := 1; m <= 12; m++ {
			utc, err := DateTimeToJD(y, m, 1, 0, 0, 0, UTC)
			if err != nil {
				t.Fatalf("%d-%02d: %v", y, m, err)
			}
			year := utc.JulianEpoch()
			dt, dtErr := DeltaT(year)
			if math.IsNaN(dt) || math.IsInf(dt, 0) || (dtErr != nil && !errors.Is(dtErr, ErrStaleTable)) {
				t.Fatalf("DeltaT(%.3f) = %v, %v", year, dt, dtErr)
			}
			if !math.IsNaN(prevDT) && math.Abs(dt-prevDT) > 0.5 {
				t.Errorf("ΔT jumps %.3f s into %d-%02d", dt-prevDT, y, m)
			}
			prevDT = dt
			tt, err := UTCToTT(utc)
			ttMinusUTC := tt.Sub(JD{Day: utc.Day, Frac: utc.Frac, Scale: TT}) * SecondsPerDay
			switch {
			case y < 1972:
				want, _ := DeltaT(tt.JulianEpoch())
				if !errors.Is(err, ErrUTCBefore1972) || math.Abs(ttMinusUTC-want) > 1e-6 {
					t.Errorf("UTCToTT(%d-%02d-01) = UT + %.6f s, %v; want UT + ΔT = %.6f s with ErrUTCBefore1972", y, m, ttMinusUTC, err, want)
				}
			case utc.Sub(LeapSecondsValidUntil) < 0:
				dat, _ := TAIMinusUTC(utc)
				if err != nil || math.Abs(ttMinusUTC-(TTMinusTAISeconds+dat)) > 1e-6 {
					t.Errorf("UTCToTT(%d-%02d-01): TT − UTC = %.6f s, %v; want 32.184 + %g s", y, m, ttMinusUTC, err, dat)
				}
			default:
				if !errors.Is(err, ErrStaleTable) || math.Abs(ttMinusUTC-(TTMinusTAISeconds+37)) > 1e-6 ||
					!strings.Contains(err.Error(), "beyond the leap-second table") {
					t.Errorf("UTCToTT(%d-%02d-01): TT − UTC = %.6f s, %v; want 69.184 s with a stale-table warning", y, m, ttMinusUTC, err)
				}
			}
		}
	}
	dt2200, err := DeltaT(2200)
	if u := (2200.0 - 1820) / 100; math.Abs(dt2200-(-20+32*u*u)) > 1e-9 || !errors.Is(err, ErrStaleTable) {
		t.Errorf("DeltaT(2200) = %v, %v; want 442.08 s (Espenak & Meeus 2006 long-term parabola) with ErrStaleTable", dt2200, err)
	}
	for _, y := range []float64{1800, 1900, 1972, 2000, 2027, 2100, 2200} {
		v, _ := DeltaT(y)
		t.Logf("ΔT(%g) = %.2f s", y, v)
	}
}
