package astro

import (
	"fmt"
	"math"
)

// deltaTStepTable is ΔT in seconds at first, first+step, … (years).
type deltaTStepTable struct {
	first, step float64
	sec         []float64
}

// deltaTMonthTable is ΔT in seconds on the 1st of each month at 0h, from
// firstYear-firstMonth on.
type deltaTMonthTable struct {
	firstYear, firstMonth int
	sec                   []float64
}

// deltaTPoly is ΔT = Σ coef[k]·u^k with u = (year − origin)·scale, for years
// below upTo.
type deltaTPoly struct {
	upTo, origin, scale float64
	coef                []float64
}

// deltaTTaperEnd is the year at which Espenak & Meeus' 2050–2150 expression
// meets their long-term parabola, −20 + 32u² (the upTo of the 2050–2150 branch).
var deltaTTaperEnd = deltaTPolynomials[len(deltaTPolynomials)-2].upTo

// evalDeltaTPoly evaluates the polynomial of the branch that holds year.
func evalDeltaTPoly(year float64) float64 {
	for _, p := range deltaTPolynomials {
		if year < p.upTo {
			u := (year - p.origin) * p.scale
			var s float64
			for k := len(p.coef) - 1; k >= 0; k-- { // Horner's rule
				s = s*u + p.coef[k]
			}
			return s
		}
	}
	return math.NaN() // not reached: the last branch has upTo = +Inf
}

// interpolate3 returns the three-point interpolation of y1, y2, y3 (equally
// spaced) at n steps from the middle value y2:
//
//	y = y2 + n/2 (a + b + n c),  a = y2 − y1, b = y3 − y2, c = b − a.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 3, eq. 3.3.
func interpolate3(y1, y2, y3, n float64) float64 {
	a, b := y2-y1, y3-y2
	return y2 + n/2*(a+b+n*(b-a))
}

// historic returns ΔT from the half-yearly table by three-point interpolation.
func (t deltaTStepTable) at(year float64) float64 {
	x := (year - t.first) / t.step
	i := int(math.Round(x))
	if i < 1 {
		i = 1
	}
	if i > len(t.sec)-2 {
		i = len(t.sec) - 2
	}
	return interpolate3(t.sec[i-1], t.sec[i], t.sec[i+1], x-float64(i))
}

// epochOfMonth returns the Julian epoch of the 1st of the k-th month of the
// table, 0h.
func (t deltaTMonthTable) epochOfMonth(k int) float64 {
	y, m := normMonth(int64(t.firstYear), int64(t.firstMonth+k))
	z := dayNumber(y, m, 1, true)
	return 2000 + (float64(z)-0.5-J2000)/365.25
}

// span returns the Julian epochs of the first and last values.
func (t deltaTMonthTable) span() (first, last float64) {
	return t.epochOfMonth(0), t.epochOfMonth(len(t.sec) - 1)
}

// at returns ΔT by linear interpolation between the monthly values (ΔT's
// curvature, at most about 1 s/yr², makes that good to about 1 ms).
func (t deltaTMonthTable) at(year float64) float64 {
	first, _ := t.span()
	k := int((year - first) * 12) // first guess, then step to the bracketing month
	if k < 0 {
		k = 0
	}
	if k > len(t.sec)-2 {
		k = len(t.sec) - 2
	}
	for k > 0 && t.epochOfMonth(k) > year {
		k--
	}
	for k < len(t.sec)-2 && t.epochOfMonth(k+1) <= year {
		k++
	}
	e0, e1 := t.epochOfMonth(k), t.epochOfMonth(k+1)
	return t.sec[k] + (year-e0)/(e1-e0)*(t.sec[k+1]-t.sec[k])
}

// DeltaTObservedUntil is the Julian epoch of the last observed ΔT value in the
// embedded table (1st of the month); from there to [LeapSecondsValidUntil]
// DeltaT takes UT1 = UTC, and beyond that it extrapolates.
var DeltaTObservedUntil = func() float64 { _, last := deltaTMonthly.span(); return last }()

// DeltaT returns ΔT = TT − UT1 in seconds for the Julian epoch year (see
// [JD.JulianEpoch]; a decimal year, 2027.5 is mid-2027). It is a model for
// when UT1 − UTC is not known; where it is, ΔT = 32.184 s + (TAI − UTC) −
// (UT1 − UTC) exactly. The model, piece by piece:
//
//   - before 1657: the polynomials of Espenak & Meeus (2006); their uncertainty
//     grows from about 20 s in 1600 to hours in antiquity;
//   - 1657 to 1973 February: the half-yearly table of observed values,
//     three-point interpolation (Meeus eq. 3.3); at 1657 the model steps by
//     3.7 s from the polynomial to the table;
//   - 1973 February to [DeltaTObservedUntil]: monthly values derived from IERS
//     Earth-orientation data, linear interpolation. Against the observed ΔT
//     from IERS-B (astropy 5.2.1's bundled table), every 15 days 1962–2022,
//     the model is within 43 ms before 1973 (the half-yearly table misses the
//     seasonal variation) and 31 ms after (5 ms typical; the worst in late
//     2022, where the package's monthly values are preliminary);
//   - from there to [LeapSecondsValidUntil]: 32.184 s + (TAI − UTC), that is
//     UT1 = UTC, wrong by less than 0.9 s (the bound on |UT1 − UTC| that defines
//     UTC);
//   - beyond: the Espenak & Meeus polynomials for 2005–2050 and 2050–2150, plus
//     an offset that makes ΔT continuous at the end of the leap-second table
//     and falls linearly to zero at 2150, where their long-term parabola
//     −20 + 32u², u = (year − 1820)/100, takes over — the same kind of linear
//     join Espenak & Meeus use between 2050 and 2150. This is an
//     extrapolation, returned with a warning wrapping [ErrStaleTable]; it grew
//     by about 0.7 s a year in the 2020s, where the true ΔT hardly changed.
//
// Before 1800 and after 2200 nothing fails, but the values are those of a
// model of the Earth's rotation with errors of minutes and more. A NaN or
// infinite year is an error wrapping [ErrRange].
//
// Reference: Espenak, F., Meeus, J., Five Millennium Canon of Solar Eclipses:
// −1999 to +3000, NASA/TP-2006-214141 (2006), §2.6 (polynomial expressions for
// ΔT); Meeus, Astronomical Algorithms, 2nd ed., ch. 10; tables and
// coefficients as shipped in the npm package astronomia 4.2.0 (see
// deltat_table.go).
func DeltaT(year float64) (seconds float64, err error) {
	if math.IsNaN(year) || math.IsInf(year, 0) {
		return 0, fmt.Errorf("astro: ΔT for year %v: %w", year, ErrRange)
	}
	monthFirst, monthLast := deltaTMonthly.span()
	switch {
	case year < deltaTHistoric.first:
		return evalDeltaTPoly(year), nil
	case year < monthFirst:
		return deltaTHistoric.at(year), nil
	case year <= monthLast:
		return deltaTMonthly.at(year), nil
	}
	leapEnd := LeapSecondsValidUntil.JulianEpoch()
	if year < leapEnd {
		mjd := int64(math.Floor((year-2000)*365.25 + J2000 - MJDOffset))
		dat, _ := taiMinusUTCOnDay(mjd)
		return TTMinusTAISeconds + dat, nil
	}
	// Extrapolation: continuous at join, offset tapering to zero at deltaTTaperEnd.
	join := math.Max(leapEnd, monthLast)
	datLast, _ := taiMinusUTCOnDay(leapSecondsValidUntilMJD - 1)
	atJoin := TTMinusTAISeconds + datLast
	if join == monthLast {
		atJoin = deltaTMonthly.sec[len(deltaTMonthly.sec)-1]
	}
	dt := evalDeltaTPoly(year)
	if year < deltaTTaperEnd {
		offset := atJoin - evalDeltaTPoly(join)
		dt += offset * (deltaTTaperEnd - year) / (deltaTTaperEnd - join)
	}
	return dt, fmt.Errorf("astro: ΔT for %.2f extrapolated (observed values to %.2f, leap-second table known good until %s): %w",
		year, monthLast, LeapSecondsValidUntilDate, ErrStaleTable)
}
