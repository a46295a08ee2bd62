package ephem

import (
	"errors"
	"fmt"
	"math"

	"arcfit/astro"
)

// MoonPhase names one of the four principal phases of the Moon.
type MoonPhase int

// The principal phases, in the order of the lunation: the apparent geocentric
// ecliptic longitude of the Moon exceeds the Sun's by 0°, 90°, 180° and 270°
// (Meeus, Astronomical Algorithms, 2nd ed., ch. 49).
const (
	NewMoon MoonPhase = iota
	FirstQuarter
	FullMoon
	LastQuarter
)

var moonPhaseNames = [...]string{"new moon", "first quarter", "full moon", "last quarter"}

// String returns the phase's English name in lower case ("full moon"), or
// "MoonPhase(n)" for a value that names no phase.
func (p MoonPhase) String() string {
	if p >= 0 && int(p) < len(moonPhaseNames) {
		return moonPhaseNames[p]
	}
	return fmt.Sprintf("MoonPhase(%d)", int(p))
}

// PhaseEvent is a principal phase of the Moon and its instant, on the TT scale.
type PhaseEvent struct {
	Phase MoonPhase
	Time  astro.JD // TT
}

// The span over which MoonPhasesBetween is offered: 1800-01-01 to 2200-01-01
// TT, the span arcfit supports for its dates.
var (
	moonPhaseFirst = astro.NewJD(2378496.5, astro.TT) // 1800 January 1 0h
	moonPhaseLast  = astro.NewJD(2524593.5, astro.TT) // 2200 January 1 0h
)

// meanSynodicRate is the mean rate of the Moon's elongation, 2π per mean
// synodic month of 29.530589 d (the rate of D in Meeus' eq. 47.2,
// 445267.1114°/century, is the same to 1e-8); only the starting guesses of the
// solver use it.
var meanSynodicRate = moon47Elongation[1] * (math.Pi / 180) / astro.DaysPerJulianCentury

// sunApparentLonOfDate returns the Sun's apparent geocentric ecliptic longitude
// on the mean equinox of date (no nutation): the VSOP87 Earth turned to the
// ecliptic of date by [EclipticPrecession1976], reversed, less the aberration
// 20.4898″/R (Meeus, ch. 25, eq. 25.10, which with the light time of the Sun
// gives its apparent place). The 0.1″ difference between VSOP87's ecliptic and
// the FK5 one is neglected (0.2 s of a phase time).
func sunApparentLonOfDate(tt astro.JD) (astro.Angle, error) {
	tdb := astro.TTToTDB(tt)
	pos, _, err := HeliocentricEclipticJ2000(Earth, tdb)
	if err != nil {
		return 0, err
	}
	v := EclipticPrecession1976(tdb).MulVec(pos)
	lon, _, r := astro.Spherical(v)
	return lon + math.Pi - astro.Angle(20.4898/r)*astro.Arcsecond, nil
}

// moonElongation returns the Moon's apparent longitude less the Sun's, both on
// the ecliptic of date (nutation cancels), wrapped to (−π, π] after removing
// target. The Moon is the geometric one at tt − τ, τ = Δ/c, its light time at
// its actual distance (rather than the mean light time of Meeus' L′).
func moonElongation(tt astro.JD, target astro.Angle) (astro.Angle, error) {
	sun, err := sunApparentLonOfDate(tt)
	if err != nil {
		return 0, err
	}
	_, _, distKm := moonMeeus47(tt.CenturiesSinceJ2000())
	moon, _, _ := MoonEclipticOfDate(tt.AddSeconds(-distKm / astro.SpeedOfLightKmS))
	return (moon - sun - target).Wrapped(), nil
}

// solvePhase finds by Newton's method, from the guess t, the instant near t at
// which the elongation equals target; the derivative is a central difference
// over ±0.01 d. It stops when the step is below 1e-8 d (1 ms).
func solvePhase(t astro.JD, target astro.Angle) (astro.JD, error) {
	const h = 0.01
	for range 20 {
		f, err := moonElongation(t, target)
		if err != nil {
			return t, err
		}
		fp, err := moonElongation(t.AddDays(h), target)
		if err != nil {
			return t, err
		}
		fm, err := moonElongation(t.AddDays(-h), target)
		if err != nil {
			return t, err
		}
		rate := float64((fp - fm).Wrapped()) / (2 * h)
		if !(rate > 0) {
			return t, errors.New("ephem: moon phase: elongation not increasing")
		}
		dt := -float64(f) / rate
		t = t.AddDays(dt).Normalized()
		if math.Abs(dt) < 1e-8 {
			return t, nil
		}
	}
	return t, errors.New("ephem: moon phase: solver did not converge")
}

// MoonPhasesBetween lists the principal phases of the Moon with instants in
// [from, to), in time order. Each instant is the one at which the Moon's
// apparent geocentric ecliptic longitude exceeds the Sun's by 0°, 90°, 180° or
// 270° (Meeus' definition, ch. 49), solved from the Moon of
// [MoonEclipticOfDate] (Meeus ch. 47) at tt − Δ/c, its light time, and the
// Sun's apparent longitude from VSOP87 with the aberration of Meeus eq. 25.10;
// the nutation cancels. This is the solving route, not Meeus' ch. 49 series.
//
// Inputs: from and to, TT (or TDB) Julian dates, within 1800-01-01 .. 2200-01-01
// TT; to before from gives an error, to = from an empty list.
// Output: the events, Time on the TT scale.
// Accuracy: the error of the Moon's longitude (about 10″ for Meeus ch. 47,
// 18″ at worst) divided by the relative motion of 0.5″ per second: typically
// some seconds, 40 s at worst. Meeus 49.a and 49.b are reproduced to 4.8 s and
// 3.4 s; an ERFA-based solution (moon98, epv00) to 0.84 s at worst over 168
// phases 1900–2100.
// Errors: a date outside the span wraps [astro.ErrUnsupportedDate]; a scale
// other than TT or TDB, or a non-finite date, is an error.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 49 (definition
// of the phases), ch. 47 (Moon), ch. 25, eq. 25.10 (aberration of the Sun);
// Bretagnon & Francou (1988) for VSOP87.
func MoonPhasesBetween(from, to astro.JD) ([]PhaseEvent, error) {
	for _, j := range []astro.JD{from, to} {
		if j.Scale != astro.TT && j.Scale != astro.TDB {
			return nil, fmt.Errorf("ephem: moon phases: want a TT or TDB date, got %v", j.Scale)
		}
		if math.IsNaN(j.Float()) || math.IsInf(j.Float(), 0) {
			return nil, errors.New("ephem: moon phases: date is not finite")
		}
		if j.Sub(moonPhaseFirst) < 0 || j.Sub(moonPhaseLast) > 0 {
			return nil, fmt.Errorf("ephem: moon phases: %.1f outside 1800-2200: %w", j.Float(), astro.ErrUnsupportedDate)
		}
	}
	if to.Sub(from) < 0 {
		return nil, errors.New("ephem: moon phases: end before start")
	}
	from.Scale, to.Scale = astro.TT, astro.TT // TDB − TT < 2 ms
	el, err := moonElongation(from, 0)
	if err != nil {
		return nil, err
	}
	quarter := astro.Angle(math.Pi / 2)
	e := float64(el.Normalized())
	q := int(math.Floor(e/float64(quarter))) + 1
	guess := from.AddDays((float64(q)*float64(quarter) - e) / meanSynodicRate)
	var events []PhaseEvent
	for {
		target := astro.Angle(q%4) * quarter
		t, err := solvePhase(guess, target)
		if err != nil {
			return events, err
		}
		if t.Sub(to) >= 0 {
			return events, nil
		}
		if t.Sub(from) >= 0 {
			events = append(events, PhaseEvent{Phase: MoonPhase(q % 4), Time: t})
		}
		q++
		guess = t.AddDays(float64(quarter) / meanSynodicRate)
	}
}
