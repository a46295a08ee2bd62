package astro

import (
	"fmt"
	"math"
)

// leapSecondStep is one entry of the leap-second table (leapseconds_table.go):
// from UTC day mjd on, TAI − UTC is taiMinusUTC seconds.
type leapSecondStep struct {
	mjd         int64
	taiMinusUTC int64
}

// leapSecondsFirstMJD is 1972 January 1, the start of the table and of UTC with
// whole-second steps.
var leapSecondsFirstMJD = leapSecondTable[0].mjd

// taiMinusUTCOnDay returns TAI − UTC in seconds on UTC day mjd (an integer MJD)
// and false before 1972 January 1, where the table has no value.
func taiMinusUTCOnDay(mjd int64) (float64, bool) {
	if mjd < leapSecondsFirstMJD {
		return 0, false
	}
	lo, hi := 0, len(leapSecondTable)-1 // find the last step with step.mjd ≤ mjd
	for lo < hi {
		mid := (lo + hi + 1) / 2
		if leapSecondTable[mid].mjd <= mjd {
			lo = mid
		} else {
			hi = mid - 1
		}
	}
	return float64(leapSecondTable[lo].taiMinusUTC), true
}

// utcDaySeconds returns the length in SI seconds of UTC day mjd: 86400, 86401
// on a day that ends with a leap second, 86399 on one that ends with a negative
// leap second. Days before 1972 and days beyond the table count 86400 s.
func utcDaySeconds(mjd int64) float64 {
	a, ok1 := taiMinusUTCOnDay(mjd)
	b, ok2 := taiMinusUTCOnDay(mjd + 1)
	if !ok1 || !ok2 {
		return SecondsPerDay
	}
	return SecondsPerDay + (b - a)
}

// utcDayMJD returns the integer MJD of the UTC day that holds the normalized
// UTC date n.
func utcDayMJD(n JD) int64 { return int64(n.Day - MJDOffset) }

// isoDate formats the Gregorian date of an integer MJD as YYYY-MM-DD.
func isoDate(mjd int64) string {
	y, m, d := dateOfDayNumber(mjd+2400001, true)
	return fmt.Sprintf("%04d-%02d-%02d", y, m, d)
}

// staleLeapError returns the warning for a UTC day beyond the table. Its
// message is formatted only when asked for: a table of many instants beyond
// the table's date gets this warning for every instant and reads it once.
func staleLeapError(mjd int64, dat float64) error {
	return &staleLeapWarning{mjd: mjd, dat: dat}
}

// staleLeapWarning is the error of [staleLeapError]; it wraps ErrStaleTable.
type staleLeapWarning struct {
	mjd int64
	dat float64
}

func (w *staleLeapWarning) Error() string {
	return fmt.Sprintf("astro: %s is beyond the leap-second table, known good until %s; TAI−UTC = %g s assumed (update the table): %v",
		isoDate(w.mjd), LeapSecondsValidUntilDate, w.dat, ErrStaleTable)
}

func (w *staleLeapWarning) Unwrap() error { return ErrStaleTable }

// checkLeapDay returns nil for a UTC day covered by the table, a warning
// wrapping ErrStaleTable for a day on or after the table's expiry, and an error
// wrapping ErrUnsupportedDate for a day before 1972.
func checkLeapDay(mjd int64) (float64, error) {
	dat, ok := taiMinusUTCOnDay(mjd)
	if !ok {
		return 0, fmt.Errorf("astro: %s: no TAI−UTC before 1972-01-01 (read such a time as UT, see UTCToTT): %w",
			isoDate(mjd), ErrUnsupportedDate)
	}
	if mjd >= leapSecondsValidUntilMJD {
		return dat, staleLeapError(mjd, dat)
	}
	return dat, nil
}

// TAIMinusUTC returns TAI − UTC in seconds at the UTC date utc, from the
// embedded IERS leap-second table (leapseconds_table.go), which starts at 1972
// January 1.
//
// Before 1972 it returns an error wrapping [ErrUnsupportedDate] (UTC then ran at
// a different rate from TAI and is not modelled). On or after
// [LeapSecondsValidUntil] it returns the last value with a warning wrapping
// [ErrStaleTable] that names the table's date. A non-finite date gives an error
// wrapping [ErrRange]. utc must be on the UTC scale; another scale is a
// programming error and panics.
//
// Reference: IERS Bulletin C and the IERS leap-second list (see the table's
// header for the file and version).
func TAIMinusUTC(utc JD) (seconds float64, err error) {
	mustScale("TAIMinusUTC", utc, UTC)
	n, err := finiteNormalized(utc)
	if err != nil {
		return 0, err
	}
	return checkLeapDay(utcDayMJD(n))
}

// mustScale panics when j is not on scale s: passing a date on the wrong
// scale is a programming error, as in [JD.Sub].
func mustScale(fn string, j JD, s Scale) {
	if j.Scale != s {
		panic(fmt.Sprintf("astro: %s of a %v date, want %v", fn, j.Scale, s))
	}
}

// maxAbsJD bounds the Julian dates the conversions accept (about ±2.7e12
// years), so that day counts stay exact in int64 arithmetic.
const maxAbsJD = 1e15

// finiteNormalized returns j normalized, or an error wrapping ErrRange when it
// is not a finite date.
func finiteNormalized(j JD) (JD, error) {
	n := j.Normalized()
	if math.IsNaN(n.Day) || math.IsNaN(n.Frac) || math.Abs(n.Day) > maxAbsJD {
		return n, fmt.Errorf("astro: Julian date %v+%v is not a finite date: %w", j.Day, j.Frac, ErrRange)
	}
	return n, nil
}
