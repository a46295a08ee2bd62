package astro

import (
	"fmt"
	"math"
	"time"
)

// Calendar selects the calendar in which a date is written.
type Calendar int

// The calendars. Years are astronomical (year 0 is 1 BC, −584 is 585 BC).
const (
	// Gregorian is the Gregorian calendar, proleptic before 1582 October 15.
	Gregorian Calendar = iota
	// Julian is the Julian calendar, proleptic after 1582 October 4.
	Julian
	// CalendarAuto is Meeus' convention: the Julian calendar up to 1582 October 4,
	// the Gregorian from 1582 October 15 (JD 2299160.5) on. The ten days between
	// do not exist; a date written in them is read in the Julian calendar.
	CalendarAuto
)

// String returns "Gregorian", "Julian" or "auto".
func (c Calendar) String() string {
	switch c {
	case Gregorian:
		return "Gregorian"
	case Julian:
		return "Julian"
	case CalendarAuto:
		return "auto"
	}
	return fmt.Sprintf("Calendar(%d)", int(c))
}

// gregorianStartJDN is the Julian day number (at noon) of 1582 October 15, the
// first day of the Gregorian calendar (Meeus, ch. 7, p. 63: Z < 2299161 is Julian).
const gregorianStartJDN = 2299161

// floorDiv returns ⌊a/b⌋ for b > 0.
func floorDiv(a, b int64) int64 {
	q := a / b
	if (a%b != 0) && (a < 0) {
		q--
	}
	return q
}

// dayNumber returns the Julian day number (the Julian date at noon) of the
// calendar date year-month-day, with month 1–12 and any integer day (day 0 is
// the last day of the previous month). It is Meeus' eq. 7.1 in exact integer
// arithmetic: INT(365.25(Y+4716)) = ⌊1461(Y+4716)/4⌋, INT(30.6001(M+1)) =
// ⌊153(M+1)/5⌋ for the months 3…14 the formula uses, and ⌊⌋ for INT so that
// the count runs on before JD 0.
func dayNumber(year, month, day int64, gregorian bool) int64 {
	if month <= 2 {
		year--
		month += 12
	}
	var b int64
	if gregorian {
		a := floorDiv(year, 100)
		b = 2 - a + floorDiv(a, 4)
	}
	return floorDiv(1461*(year+4716), 4) + floorDiv(153*(month+1), 5) + day + b - 1524
}

// dateOfDayNumber returns the calendar date of the Julian day number z, by
// Meeus' inverse algorithm (ch. 7, p. 63) in exact integer arithmetic:
// α = ⌊(Z − 1867216.25)/36524.25⌋ = ⌊(4Z − 7468865)/146097⌋,
// C = ⌊(B − 122.1)/365.25⌋ = ⌊(20B − 2442)/7305⌋,
// E = ⌊(B − D)/30.6001⌋ = ⌊10000(B − D)/306001⌋.
func dateOfDayNumber(z int64, gregorian bool) (year, month, day int64) {
	a := z
	if gregorian {
		alpha := floorDiv(4*z-7468865, 146097)
		a = z + 1 + alpha - floorDiv(alpha, 4)
	}
	b := a + 1524
	c := floorDiv(20*b-2442, 7305)
	d := floorDiv(1461*c, 4)
	e := floorDiv(10000*(b-d), 306001)
	day = b - d - floorDiv(306001*e, 10000)
	if e < 14 {
		month = e - 1
	} else {
		month = e - 13
	}
	if month > 2 {
		year = c - 4716
	} else {
		year = c - 4715
	}
	return year, month, day
}

// normMonth carries a month outside 1–12 into the year.
func normMonth(year, month int64) (int64, int64) {
	k := floorDiv(month-1, 12)
	return year + k, month - 12*k
}

// CalendarToJD returns the Julian date of the calendar date year-month-day in
// calendar cal. day may be fractional (day 4.81 is the 4th at 19h26m24s); a
// month outside 1–12 or a day beyond the month is counted on (month 13 is
// January of the next year, January 32 is February 1). The scale is whatever
// scale the date is written in. NaN or ±Inf day gives NaN.
//
// The result is one float64, resolving about 5e-10 day near the present.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 7, eq. 7.1 and
// examples 7.a, 7.b (evaluated in exact integer arithmetic, see dayNumber).
func CalendarToJD(year, month int, day float64, cal Calendar) float64 {
	if math.IsNaN(day) || math.IsInf(day, 0) {
		return math.NaN()
	}
	y, m := normMonth(int64(year), int64(month))
	greg := cal == Gregorian
	if cal == CalendarAuto {
		greg = y > 1582 || (y == 1582 && (m > 10 || (m == 10 && day >= 15)))
	}
	// Day number of day 0 of the month, then the (fractional) day: JD = Z0 + day − 0.5.
	z0 := dayNumber(y, m, 0, greg)
	return float64(z0) + (day - 0.5)
}

// JDToCalendar returns the calendar date (year, month, fractional day) of the
// Julian date jd in calendar cal. With CalendarAuto, dates before JD 2299160.5
// (1582 October 15, 0h) are in the Julian calendar. The fraction of the day is
// exact: it is jd minus the preceding midnight. NaN or ±Inf jd gives day NaN.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 7, p. 63 and
// example 7.c (evaluated in exact integer arithmetic, see dateOfDayNumber).
func JDToCalendar(jd float64, cal Calendar) (year, month int, day float64) {
	if math.IsNaN(jd) || math.IsInf(jd, 0) || math.Abs(jd) > 1e15 {
		return 0, 0, math.NaN()
	}
	zf := math.Floor(jd + 0.5)
	f := jd - (zf - 0.5) // exact: both terms are within a day of each other
	if f < 0 {           // jd + 0.5 rounded up across an integer
		zf--
		f = jd - (zf - 0.5)
	}
	z := int64(zf)
	greg := cal == Gregorian || (cal == CalendarAuto && z >= gregorianStartJDN)
	y, m, d := dateOfDayNumber(z, greg)
	return int(y), int(m), float64(d) + f
}

// IsLeapYear reports whether year (astronomical numbering) has 366 days in
// calendar cal; with CalendarAuto, years up to 1582 follow the Julian rule.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 7, p. 62.
func IsLeapYear(year int, cal Calendar) bool {
	if cal == Julian || (cal == CalendarAuto && year <= 1582) {
		return year%4 == 0
	}
	return year%4 == 0 && (year%100 != 0 || year%400 == 0)
}

// DaysInMonth returns the number of days of month (1–12) of year in calendar
// cal, or 0 for a month outside 1–12. (With CalendarAuto, 1582 October still
// counts 31 day numbers, of which the 5th–14th do not exist.)
func DaysInMonth(year, month int, cal Calendar) int {
	switch month {
	case 1, 3, 5, 7, 8, 10, 12:
		return 31
	case 4, 6, 9, 11:
		return 30
	case 2:
		if IsLeapYear(year, cal) {
			return 29
		}
		return 28
	}
	return 0
}

// DayOfWeek returns the day of the week of the civil date (on the scale of jd)
// that contains the Julian date jd: ⌊jd + 1.5⌋ mod 7, 0 being Sunday. NaN or
// ±Inf jd gives time.Weekday(−1), which is no day.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 7, p. 65, example 7.e.
func DayOfWeek(jd float64) time.Weekday {
	if math.IsNaN(jd) || math.IsInf(jd, 0) {
		return time.Weekday(-1)
	}
	w := math.Mod(math.Floor(jd+1.5), 7)
	if w < 0 {
		w += 7
	}
	return time.Weekday(int(w))
}

// DayOfYear returns the ordinal day (1–366) of a Gregorian date:
//
//	N = ⌊275M/9⌋ − K·⌊(M + 9)/12⌋ + D − 30,  K = 1 in a leap year, else 2.
//
// It returns 0 for a month outside 1–12 or a day outside the month.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 7, p. 65, examples
// 7.f and 7.g.
func DayOfYear(year, month, day int) int {
	if month < 1 || month > 12 || day < 1 || day > DaysInMonth(year, month, Gregorian) {
		return 0
	}
	k := 2
	if IsLeapYear(year, Gregorian) {
		k = 1
	}
	return 275*month/9 - k*((month+9)/12) + day - 30
}

// DateOfDayOfYear returns the Gregorian month and day of ordinal day n (1–366)
// of year, the inverse of [DayOfYear], or (0, 0) for n outside the year.
func DateOfDayOfYear(year, n int) (month, day int) {
	for m := 1; m <= 12; m++ {
		dm := DaysInMonth(year, m, Gregorian)
		if n >= 1 && n <= dm {
			return m, n
		}
		n -= dm
	}
	return 0, 0
}

// maxCalendarYear bounds the years DateTimeToJD accepts, so that day counts
// stay exact.
const maxCalendarYear = 1000000

// DateTimeToJD returns the two-part Julian date of a Gregorian calendar date
// and time of day on scale s: Day is the preceding midnight, Frac the fraction
// of the day.
//
// Fields must lie in their ranges (month 1–12, day within the month, hour 0–23,
// minute 0–59, second in [0, 60)); otherwise the error wraps [ErrRange]. On a
// UTC day that ends with a leap second (per the embedded table) the second may
// reach 60.999… in the last minute, and Frac counts in seconds of that
// 86401-s day (ERFA's quasi-Julian-date convention), so that 23:59:60.5
// precedes the next day's 0h. The seconds are added to the whole seconds before
// the one division, so Frac carries the full precision of second.
//
// Reference: the day count is Meeus, Astronomical Algorithms, 2nd ed., eq. 7.1;
// the leap-second day convention is that of the IAU SOFA/ERFA library's
// two-part UTC (SOFA Time Scale and Calendar Tools, 2021, §4.4, "quasi-JD").
func DateTimeToJD(year, month, day, hour, minute int, second float64, s Scale) (JD, error) {
	if year < -maxCalendarYear || year > maxCalendarYear {
		return JD{}, fmt.Errorf("astro: year %d not in ±%d: %w", year, maxCalendarYear, ErrRange)
	}
	if month < 1 || month > 12 {
		return JD{}, fmt.Errorf("astro: month %d not in 1–12: %w", month, ErrRange)
	}
	if dm := DaysInMonth(year, month, Gregorian); day < 1 || day > dm {
		return JD{}, fmt.Errorf("astro: day %d not in 1–%d for %04d-%02d: %w", day, dm, year, month, ErrRange)
	}
	if hour < 0 || hour > 23 {
		return JD{}, fmt.Errorf("astro: hour %d not in 0–23: %w", hour, ErrRange)
	}
	if minute < 0 || minute > 59 {
		return JD{}, fmt.Errorf("astro: minute %d not in 0–59: %w", minute, ErrRange)
	}
	z := dayNumber(int64(year), int64(month), int64(day), true)
	length := SecondsPerDay
	if s == UTC {
		length = utcDaySeconds(z - 2400001)
	}
	limit := 60.0
	if hour == 23 && minute == 59 {
		limit = 60 + (length - SecondsPerDay)
	}
	if !(second >= 0 && second < limit) { // also rejects NaN
		if limit > 60 {
			return JD{}, fmt.Errorf("astro: second %g not in [0, %g) (a leap second ends %04d-%02d-%02d): %w",
				second, limit, year, month, day, ErrRange)
		}
		return JD{}, fmt.Errorf("astro: second %g not in [0, %g) (60 only in a UTC leap second): %w", second, limit, ErrRange)
	}
	frac := (float64(hour*3600+minute*60) + second) / length
	if frac >= 1 {
		frac = math.Nextafter(1, 0)
	}
	return JD{Day: float64(z) - 0.5, Frac: frac, Scale: s}, nil
}

// DateTime returns the Gregorian calendar date and time of day of j on j's own
// scale, the inverse of [DateTimeToJD]. For UTC, an instant within a leap
// second shows as 23:59:60.x. The second is not rounded (it lies in [0, 60), or
// [0, 61) in a leap second); use [FormatISO8601] for rounded text. A non-finite
// j gives zeros and a NaN second.
func (j JD) DateTime() (year, month, day, hour, minute int, second float64) {
	n := j.Normalized()
	if math.IsNaN(n.Day) || math.IsInf(n.Day, 0) || math.IsNaN(n.Frac) || math.Abs(n.Day) > 1e15 {
		return 0, 0, 0, 0, 0, math.NaN()
	}
	z := int64(n.Day + 0.5)
	y, m, d := dateOfDayNumber(z, true)
	length := SecondsPerDay
	if j.Scale == UTC {
		length = utcDaySeconds(z - 2400001)
	}
	sec := n.Frac * length
	h := int(sec / 3600)
	if h > 23 {
		h = 23
	}
	sec -= float64(h * 3600)
	mi := int(sec / 60)
	if mi > 59 {
		mi = 59
	}
	sec -= float64(mi * 60)
	if sec < 0 {
		sec = 0
	}
	return int(y), int(m), int(d), h, mi, sec
}
