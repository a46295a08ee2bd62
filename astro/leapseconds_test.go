package astro

import (
	"errors"
	"strings"
	"testing"
)

// TestTAIMinusUTCERFA checks TAI − UTC against erfa.dat (python3-erfa 2.0.0.1,
// testdata/erfa_time.csv) at 400 UTC instants 1972–2100, including both sides
// of every leap second. ERFA's own table ends in 2017 and flags later years
// "dubious" (status 1) while still giving 37 s, which is the IERS value
// through the embedded table's expiry.
func TestTAIMinusUTCERFA(t *testing.T) {
	for _, r := range erfaTimeRows(t, "utc") {
		utc := JD{Day: atof(t, r[6]), Frac: atof(t, r[7]), Scale: UTC}
		want := atof(t, r[8])
		got, err := TAIMinusUTC(utc)
		if err != nil && !errors.Is(err, ErrStaleTable) {
			t.Errorf("TAIMinusUTC(%s): %v", strings.Join(r[:6], " "), err)
			continue
		}
		if got != want {
			t.Errorf("TAIMinusUTC(%s) = %v s, want %v s (erfa.dat)", strings.Join(r[:6], " "), got, want)
		}
		stale := utc.Day >= LeapSecondsValidUntil.Day
		if stale != (err != nil) {
			t.Errorf("TAIMinusUTC(%s): err = %v, want a stale-table warning only from %s", strings.Join(r[:6], " "), err, LeapSecondsValidUntilDate)
		}
	}
}

func TestTAIMinusUTCTable(t *testing.T) {
	// 27 positive leap seconds from 1972 to 2016, TAI − UTC 10 s on 1972 Jan 1
	// and 37 s from 2017 Jan 1 (IERS Bulletin C 68, and the leap-second list itself).
	if n := len(leapSecondTable) - 1; n != 27 {
		t.Errorf("leap seconds in the table: %d, want 27 (IERS Bulletin C)", n)
	}
	first, last := leapSecondTable[0], leapSecondTable[len(leapSecondTable)-1]
	if first.mjd != 41317 || first.taiMinusUTC != 10 || last.mjd != 57754 || last.taiMinusUTC != 37 {
		t.Errorf("table runs %+v … %+v, want MJD 41317 (1972-01-01) 10 s … MJD 57754 (2017-01-01) 37 s (IERS list)", first, last)
	}
	// The source file states "File expires on 28 June 2027".
	if LeapSecondsValidUntilDate != "2027-06-28" || LeapSecondsValidUntil.Day != 2461584.5 {
		t.Errorf("valid until %s (JD %v), want 2027-06-28 (JD 2461584.5, leap-seconds.list #@ 4023129600)", LeapSecondsValidUntilDate, LeapSecondsValidUntil.Day)
	}
	// Day lengths: 86401 s on 2016 Dec 31 (IERS Bulletin C 52), 86400 s the day before.
	if got := utcDaySeconds(57753); got != 86401 {
		t.Errorf("length of 2016-12-31 = %v s, want 86401 (IERS Bulletin C 52)", got)
	}
	if got := utcDaySeconds(57752); got != 86400 {
		t.Errorf("length of 2016-12-30 = %v s, want 86400", got)
	}
}

func TestTAIMinusUTCWarnings(t *testing.T) {
	before := JD{Day: 2461583.5, Frac: 0.5, Scale: UTC} // 2027-06-27 12h
	if v, err := TAIMinusUTC(before); err != nil || v != 37 {
		t.Errorf("TAIMinusUTC(2027-06-27) = %v, %v; want 37, nil", v, err)
	}
	after := JD{Day: 2462502.5, Frac: 0, Scale: UTC} // 2030-01-01
	v, err := TAIMinusUTC(after)
	if v != 37 || !errors.Is(err, ErrStaleTable) || !strings.Contains(err.Error(), "2027-06-28") || !strings.Contains(err.Error(), "2030-01-01") {
		t.Errorf("TAIMinusUTC(2030-01-01) = %v, %v; want 37 with a stale-table warning naming 2027-06-28 and the date", v, err)
	}
	if _, err := TAIMinusUTC(JD{Day: 2441316.5, Frac: 0.5, Scale: UTC}); !errors.Is(err, ErrUnsupportedDate) {
		t.Errorf("TAIMinusUTC(1971-12-31): err = %v, want ErrUnsupportedDate", err)
	}
	if _, err := TAIMinusUTC(JD{Day: 2441317.5, Scale: UTC}); err != nil {
		t.Errorf("TAIMinusUTC(1972-01-01 0h): err = %v, want nil", err)
	}
}
