package astro

import (
	"errors"
	"fmt"
	"math"
)

// ErrUTCBefore1972 is the warning of [UTCToTT] and [TTToUTC] for dates before
// 1972 January 1: there a "UTC" time is read as UT (UT1) and converted with the
// ΔT model, TT = UT + ΔT. The value returned with it is valid; test for it with
// errors.Is and go on.
var ErrUTCBefore1972 = errors.New("UTC before 1972 read as UT, converted with ΔT")

// utc1972TAI is 1972 January 1 0h UTC on the TAI scale (TAI − UTC = 10 s then;
// IERS leap-second list), as MJD and seconds.
const (
	mjd1972      = 41317
	tai1972Start = 10.0
)

// UTCToTAI returns the TAI date of the UTC date utc, TAI = UTC + (TAI − UTC).
// On a day that ends with a leap second, utc is a quasi Julian date (see [JD]):
// its fraction counts seconds of the 86401-s day, so 23:59:60.5 UTC becomes the
// TAI instant 0.5 s after 23:59:59 + 1 s.
//
// Errors are those of [TAIMinusUTC]: before 1972 an error wrapping
// [ErrUnsupportedDate] and a zero JD; beyond [LeapSecondsValidUntil] the value
// with a warning wrapping [ErrStaleTable].
//
// Reference: IERS Conventions (2010), ch. 10 (definition of UTC); the quasi-JD
// convention of the SOFA/ERFA time routines.
func UTCToTAI(utc JD) (JD, error) {
	mustScale("UTCToTAI", utc, UTC)
	n, err := finiteNormalized(utc)
	if err != nil {
		return JD{}, err
	}
	mjd := utcDayMJD(n)
	dat, err := checkLeapDay(mjd)
	if err != nil && !errors.Is(err, ErrStaleTable) {
		return JD{}, err
	}
	length := utcDaySeconds(mjd)
	return JD{Day: n.Day, Frac: (n.Frac*length + dat) / SecondsPerDay, Scale: TAI}.Normalized(), err
}

// TAIToUTC returns the UTC date (a quasi JD on leap-second days, see [JD]) of
// the TAI date tai, the inverse of [UTCToTAI]. A TAI instant inside an inserted
// leap second comes out as 23:59:60.x UTC.
//
// Errors: before 1972 January 1 0h UTC an error wrapping [ErrUnsupportedDate];
// beyond [LeapSecondsValidUntil] the value with a warning wrapping
// [ErrStaleTable].
func TAIToUTC(tai JD) (JD, error) {
	mustScale("TAIToUTC", tai, TAI)
	n, err := finiteNormalized(tai)
	if err != nil {
		return JD{}, err
	}
	mjd := utcDayMJD(n) // the TAI day; UTC lags by 10–37 s, so its day is this one or the one before
	for _, d := range [...]int64{mjd, mjd - 1} {
		dat, ok := taiMinusUTCOnDay(d)
		if !ok {
			continue
		}
		sec := (float64(mjd-d)*SecondsPerDay - dat) + n.Frac*SecondsPerDay
		length := utcDaySeconds(d)
		if sec >= 0 && sec < length {
			_, warn := checkLeapDay(d)
			return JD{Day: float64(d) + MJDOffset, Frac: sec / length, Scale: UTC}, warn
		}
	}
	_, err = checkLeapDay(mjd - 1) // before 1972: ErrUnsupportedDate
	if err == nil {
		err = fmt.Errorf("astro: TAI date %v has no UTC: %w", tai, ErrUnsupportedDate)
	}
	return JD{}, err
}

// TAIToTT returns the TT date of the TAI date tai, TT = TAI + 32.184 s.
//
// Reference: IAU 1991 Resolution A4 (recommendation IV); IERS Conventions (2010), ch. 10.
func TAIToTT(tai JD) JD {
	mustScale("TAIToTT", tai, TAI)
	return JD{Day: tai.Day, Frac: tai.Frac + TTMinusTAISeconds/SecondsPerDay, Scale: TT}.Normalized()
}

// TTToTAI returns the TAI date of the TT date tt, TAI = TT − 32.184 s.
//
// Reference: IAU 1991 Resolution A4; IERS Conventions (2010), ch. 10.
func TTToTAI(tt JD) JD {
	mustScale("TTToTAI", tt, TT)
	return JD{Day: tt.Day, Frac: tt.Frac - TTMinusTAISeconds/SecondsPerDay, Scale: TAI}.Normalized()
}

// UTCToTT returns the TT date of the UTC date utc.
//
// From 1972 on, TT = UTC + (TAI − UTC) + 32.184 s, with the warnings of
// [UTCToTAI] (ErrStaleTable beyond the leap-second table). Before 1972 the
// time is read as UT and TT = UT + ΔT from [DeltaT]; the value comes with a
// warning wrapping [ErrUTCBefore1972].
func UTCToTT(utc JD) (JD, error) {
	mustScale("UTCToTT", utc, UTC)
	n, err := finiteNormalized(utc)
	if err != nil {
		return JD{}, err
	}
	if utcDayMJD(n) < mjd1972 {
		ut := n
		ut.Scale = UT1
		tt, dtErr := UT1ToTT(ut)
		if dtErr != nil && !errors.Is(dtErr, ErrStaleTable) {
			return JD{}, dtErr
		}
		return tt, fmt.Errorf("astro: %s is before 1972, read as UT (TT = UT + ΔT): %w", isoDate(utcDayMJD(n)), ErrUTCBefore1972)
	}
	tai, err := UTCToTAI(n)
	if err != nil && !errors.Is(err, ErrStaleTable) {
		return JD{}, err
	}
	return TAIToTT(tai), err
}

// TTToUTC returns the UTC date of the TT date tt, the inverse of [UTCToTT]:
// from 1972 on through TAI (warnings as [TAIToUTC]); before 1972 January 1 0h
// UTC as UT = TT − ΔT with a warning wrapping [ErrUTCBefore1972] (the result
// is then a UT instant labelled UTC).
func TTToUTC(tt JD) (JD, error) {
	mustScale("TTToUTC", tt, TT)
	n, err := finiteNormalized(tt)
	if err != nil {
		return JD{}, err
	}
	tai := TTToTAI(n)
	start := JD{Day: mjd1972 + MJDOffset, Frac: tai1972Start / SecondsPerDay, Scale: TAI}
	if tai.Sub(start) < 0 {
		ut, dtErr := TTToUT1(n)
		if dtErr != nil && !errors.Is(dtErr, ErrStaleTable) {
			return JD{}, dtErr
		}
		ut.Scale = UTC
		return ut, fmt.Errorf("astro: %s is before 1972, given as UT (UT = TT − ΔT): %w", isoDate(utcDayMJD(ut)), ErrUTCBefore1972)
	}
	return TAIToUTC(tai)
}

// UTCToUT1 returns the UT1 date of the UTC date utc, UT1 = UTC + (UT1 − UTC),
// with dut1Sec the value of UT1 − UTC in seconds for that day (from IERS
// Bulletin A or B; |UT1 − UTC| < 0.9 s by the definition of UTC, so 0 gives UT1
// to better than 0.9 s). On a leap-second day the quasi-JD fraction is counted
// in seconds of the 86401-s day first, so UT1 stays continuous.
//
// Reference: IERS Conventions (2010), ch. 5 and 10.
func UTCToUT1(utc JD, dut1Sec float64) JD {
	mustScale("UTCToUT1", utc, UTC)
	n := utc.Normalized()
	length := SecondsPerDay
	if !math.IsNaN(n.Day) && math.Abs(n.Day) <= maxAbsJD {
		length = utcDaySeconds(utcDayMJD(n))
	}
	return JD{Day: n.Day, Frac: (n.Frac*length + dut1Sec) / SecondsPerDay, Scale: UT1}.Normalized()
}

// UT1ToUTC returns the UTC date of the UT1 date ut1, the inverse of
// [UTCToUT1] for the same dut1Sec = UT1 − UTC. Within about a second after a
// leap second one UT1 instant and one offset fit two UTC readings; a negative
// offset (the value before a positive leap second) picks the reading in the
// leap-second day, a positive one the reading in the next day. Beyond [LeapSecondsValidUntil]
// the value comes with a warning wrapping [ErrStaleTable] (a leap second could
// change the day's length); a non-finite date or offset is an error wrapping
// [ErrRange].
func UT1ToUTC(ut1 JD, dut1Sec float64) (JD, error) {
	mustScale("UT1ToUTC", ut1, UT1)
	n, err := finiteNormalized(ut1)
	if err != nil {
		return JD{}, err
	}
	if math.IsNaN(dut1Sec) || math.Abs(dut1Sec) > 1e6 {
		return JD{}, fmt.Errorf("astro: UT1−UTC %g s is not a usable offset: %w", dut1Sec, ErrRange)
	}
	mjd := utcDayMJD(n)
	// Near a leap second two UTC readings map to the same UT1 with one offset.
	// A negative UT1 − UTC is the value before a (positive) leap second, a
	// positive one the value after it: take the earlier day first when it is negative.
	order := [...]int64{mjd, mjd - 1, mjd + 1}
	if dut1Sec < 0 {
		order = [...]int64{mjd - 1, mjd, mjd + 1}
	}
	for _, d := range order {
		sec := float64(mjd-d)*SecondsPerDay + (n.Frac*SecondsPerDay - dut1Sec)
		length := utcDaySeconds(d)
		if sec >= 0 && sec < length {
			var warn error
			if d >= leapSecondsValidUntilMJD {
				dat, _ := taiMinusUTCOnDay(d)
				warn = staleLeapError(d, dat)
			}
			return JD{Day: float64(d) + MJDOffset, Frac: sec / length, Scale: UTC}, warn
		}
	}
	// |dut1Sec| beyond a day: fall back to plain day arithmetic.
	return JD{Day: n.Day, Frac: n.Frac - dut1Sec/SecondsPerDay, Scale: UTC}.Normalized(), nil
}

// TTToUT1 returns the UT1 date of the TT date tt, UT1 = TT − ΔT, with ΔT from
// the model [DeltaT] evaluated at tt's Julian epoch. Its warnings are those of
// DeltaT (ErrStaleTable beyond the last observed or predicted value). When
// UT1 − UTC is known, UTCToUT1(TTToUTC(tt), dut1) is better; when ΔT itself is
// known, use [TTToUT1DeltaT].
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 10 (ΔT = TD − UT).
func TTToUT1(tt JD) (JD, error) {
	mustScale("TTToUT1", tt, TT)
	dt, err := DeltaT(tt.JulianEpoch())
	if err != nil && !errors.Is(err, ErrStaleTable) {
		return JD{}, err
	}
	return TTToUT1DeltaT(tt, dt), err
}

// UT1ToTT returns the TT date of the UT1 date ut1, TT = UT1 + ΔT, with ΔT from
// [DeltaT] at the Julian epoch of the TT result (found by one fixed-point step,
// so that [TTToUT1] inverts it exactly). Warnings as [TTToUT1].
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 10, example 10.b.
func UT1ToTT(ut1 JD) (JD, error) {
	mustScale("UT1ToTT", ut1, UT1)
	dt, err := DeltaT(ut1.JulianEpoch())
	if err != nil && !errors.Is(err, ErrStaleTable) {
		return JD{}, err
	}
	// Evaluate ΔT once more at the TT epoch, so that TTToUT1 inverts this exactly.
	dt, err = DeltaT(UT1ToTTDeltaT(ut1, dt).JulianEpoch())
	return UT1ToTTDeltaT(ut1, dt), err
}

// TTToUT1DeltaT returns UT1 = TT − ΔT for a given ΔT in seconds (for example
// ΔT = 32.184 s + (TAI − UTC) − (UT1 − UTC) from IERS data).
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 10.
func TTToUT1DeltaT(tt JD, deltaTSec float64) JD {
	mustScale("TTToUT1DeltaT", tt, TT)
	return JD{Day: tt.Day, Frac: tt.Frac - deltaTSec/SecondsPerDay, Scale: UT1}.Normalized()
}

// UT1ToTTDeltaT returns TT = UT1 + ΔT for a given ΔT in seconds.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 10, example 10.b.
func UT1ToTTDeltaT(ut1 JD, deltaTSec float64) JD {
	mustScale("UT1ToTTDeltaT", ut1, UT1)
	return JD{Day: ut1.Day, Frac: ut1.Frac + deltaTSec/SecondsPerDay, Scale: TT}.Normalized()
}

// JulianEpoch returns the Julian epoch of j in years, 2000.0 + (JD − 2451545.0)/365.25,
// on j's own scale: the decimal year that [DeltaT] takes.
//
// Reference: Lieske, J. H., "Precession matrix based on IAU (1976) system of
// astronomical constants", Astron. Astrophys. 73, 282–284 (1979), eq. (3).
func (j JD) JulianEpoch() float64 { return 2000 + j.DaysSinceJ2000()/365.25 }

// tdbTerm is one term A·T^p·sin(ωT + φ) of TDB − TT, A in seconds, ω in
// radians per Julian century, φ in radians.
type tdbTerm struct {
	amp, freq, phase float64
	power            int
}

// tdbTerms are the leading terms of the Fairhead & Bretagnon (1990) series for
// TDB − TT at the geocentre, as printed in Kaplan (2005), USNO Circular 179,
// eq. 2.6 (coefficients recalled from memory of that publication; confirmed by
// the comparison with ERFA's full series in timescales_test.go).
var tdbTerms = [...]tdbTerm{
	{0.001657, 628.3076, 6.2401, 0},
	{0.000022, 575.3385, 4.2970, 0},
	{0.000014, 1256.6152, 6.1969, 0},
	{0.000005, 606.9777, 4.0212, 0},
	{0.000005, 52.9691, 0.4444, 0},
	{0.000002, 21.3299, 5.5431, 0},
	{0.000010, 628.3076, 4.2490, 1},
}

// TDBMinusTT returns TDB − TT in seconds at the geocentre for the date j (TT or
// TDB; the difference of argument is immaterial), from the seven leading terms
// of the Fairhead & Bretagnon (1990) series:
//
//	TDB − TT = 0.001657 sin(628.3076 T + 6.2401) + 0.000022 sin(575.3385 T + 4.2970)
//	         + 0.000014 sin(1256.6152 T + 6.1969) + 0.000005 sin(606.9777 T + 4.0212)
//	         + 0.000005 sin(52.9691 T + 0.4444) + 0.000002 sin(21.3299 T + 5.5431)
//	         + 0.000010 T sin(628.3076 T + 4.2490)   (seconds),
//
// T in Julian centuries from J2000.0. Against the full series (ERFA dtdb,
// geocentric) the error is below 10 µs over 1900–2100 (see the report in
// timescales_test.go); the topocentric terms (≤ 2 µs) are left out.
//
// Reference: Kaplan, G. H., The IAU Resolutions on Astronomical Reference
// Systems, Time Scales, and Earth Rotation Models, USNO Circular 179 (2005),
// eq. 2.6; Fairhead, L., Bretagnon, P., Astron. Astrophys. 229, 240–247 (1990).
func TDBMinusTT(j JD) float64 {
	t := j.CenturiesSinceJ2000()
	var s float64
	for _, k := range tdbTerms {
		v := k.amp * math.Sin(k.freq*t+k.phase)
		if k.power == 1 {
			v *= t
		}
		s += v
	}
	return s
}

// TTToTDB returns the TDB date of the TT date tt, TDB = TT + [TDBMinusTT].
func TTToTDB(tt JD) JD {
	mustScale("TTToTDB", tt, TT)
	return JD{Day: tt.Day, Frac: tt.Frac + TDBMinusTT(tt)/SecondsPerDay, Scale: TDB}.Normalized()
}

// TDBToTT returns the TT date of the TDB date tdb, TT = TDB − [TDBMinusTT]
// (evaluated at the TDB date; the error of that is below 1e-12 s).
func TDBToTT(tdb JD) JD {
	mustScale("TDBToTT", tdb, TDB)
	return JD{Day: tdb.Day, Frac: tdb.Frac - TDBMinusTT(tdb)/SecondsPerDay, Scale: TT}.Normalized()
}
