package astro

import (
	"fmt"
	"math"
)

// JD is a Julian date in two parts, Day + Frac, on an explicit time scale.
//
// Any split of the date between the two parts is valid; the sum is the Julian
// date. Keeping the larger part in Day (for example the date of the preceding
// noon or midnight) and the rest in Frac keeps the resolution near 1e-16 of a
// day, some tens of picoseconds, where one float64 Julian date resolves only about
// 40 µs. Constructors here put the integer day (ending in .5, the preceding
// midnight) in Day and a fraction in [0, 1) in Frac.
//
// For UTC the date is ERFA's quasi Julian date: on a day that ends with a leap
// second the fraction of the day is counted in seconds of that 86401-s day, so
// 23:59:60.5 has a Frac just below 1 and never collides with the next day's 0h.
type JD struct {
	Day, Frac float64
	Scale     Scale
}

// NewJD returns the Julian date jd on scale s, split into the preceding midnight
// and the fraction of the day.
func NewJD(jd float64, s Scale) JD {
	return JD{Day: jd, Frac: 0, Scale: s}.Normalized()
}

// NewMJD returns the Julian date of the Modified Julian Date mjd on scale s.
func NewMJD(mjd float64, s Scale) JD {
	day := math.Floor(mjd)
	return JD{Day: day + MJDOffset, Frac: mjd - day, Scale: s}
}

// Normalized returns j with Day at a midnight (an integer plus one half) and
// Frac in [0, 1), the same date to within rounding of the sum.
func (j JD) Normalized() JD {
	d := math.Floor(j.Day-0.5) + 0.5
	f := (j.Day - d) + j.Frac
	k := math.Floor(f)
	return JD{Day: d + k, Frac: f - k, Scale: j.Scale}
}

// Float returns the Julian date as one float64 (resolution about 40 µs).
func (j JD) Float() float64 { return j.Day + j.Frac }

// MJD returns the Modified Julian Date, JD − 2400000.5.
func (j JD) MJD() float64 { return (j.Day - MJDOffset) + j.Frac }

// AddDays returns j moved by days on its own scale.
func (j JD) AddDays(days float64) JD {
	return JD{Day: j.Day, Frac: j.Frac + days, Scale: j.Scale}.Normalized()
}

// AddSeconds returns j moved by sec SI seconds on its own scale.
func (j JD) AddSeconds(sec float64) JD { return j.AddDays(sec / SecondsPerDay) }

// Sub returns j − k in days. Both dates must be on the same scale; mixing
// scales is a programming error and panics.
func (j JD) Sub(k JD) float64 {
	if j.Scale != k.Scale {
		panic(fmt.Sprintf("astro: JD.Sub of %v and %v dates", j.Scale, k.Scale))
	}
	return (j.Day - k.Day) + (j.Frac - k.Frac)
}

// DaysSinceJ2000 returns j − 2451545.0 in days of j's own scale.
func (j JD) DaysSinceJ2000() float64 { return (j.Day - J2000) + j.Frac }

// CenturiesSinceJ2000 returns (j − 2451545.0)/36525, the Julian centuries since
// J2000.0 that the published series take as their argument T.
func (j JD) CenturiesSinceJ2000() float64 { return j.DaysSinceJ2000() / DaysPerJulianCentury }

// Before reports whether j is earlier than k (same scale).
func (j JD) Before(k JD) bool { return j.Sub(k) < 0 }

// String formats j as "JD 2451545.000000000 TT".
func (j JD) String() string {
	n := j.Normalized()
	return fmt.Sprintf("JD %.1f+%.12f %v", n.Day, n.Frac, n.Scale)
}
