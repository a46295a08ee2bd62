package ephem

import (
	"errors"
	"fmt"
	"math"

	"arcfit/astro"
)

// MaxTableRows is the most rows [EphemerisTable] computes in one call: a
// million rows (a year at 30-second steps) is beyond any sensible table and
// far more often a step typed in the wrong unit.
const MaxTableRows = 1_000_000

// Span of the ephemeris tables: arcfit's supported span (design.md, "Input
// formats": 1800–2200), as UTC Julian dates of 1800 January 1 0h and 2201
// January 1 0h (python3-erfa 2.0.0.1, erfa.cal2jd(1800,1,1) = 2400000.5 −
// 21504, erfa.cal2jd(2201,1,1) = 2400000.5 + 124958). Inside it every body
// of the package is computed within its stated accuracy; before 1972 UTC is
// read as UT.
const (
	TableFirstJD = 2378496.5
	TableLastJD  = 2524958.5
)

// TableTarget is what an ephemeris table is made for: a body of the solar
// system, or, when Elements is not nil, the body with those orbital elements.
type TableTarget struct {
	Body     Body      // Sun, Moon, or Mercury…Neptune; used when Elements is nil
	Elements *Elements // an element set; takes precedence over Body
}

// Name returns the target's name: the body's English name or the element
// set's name.
func (t TableTarget) Name() string {
	if t.Elements != nil {
		return t.Elements.Name
	}
	return t.Body.String()
}

// PlaceAt returns the target's place seen by o at the instant utc:
// [PlaceOfElements] for an element set, else [PlaceOfBody]. Errors and
// warnings are theirs.
func (t TableTarget) PlaceAt(utc astro.JD, o Observer) (Place, error) {
	if t.Elements != nil {
		return PlaceOfElements(*t.Elements, utc, o)
	}
	return PlaceOfBody(t.Body, utc, o)
}

// TableTimes returns the instants of a table from from to to (UTC) at steps
// of stepDays days: from + k·stepDays for k = 0, 1, … while the instant is not
// after to (a last step that overshoots to by less than 1e-9 d, 86 µs, from
// rounding counts as reaching it). Each instant is computed from from, not
// by summing steps, so no error accumulates. The steps are of the UTC Julian
// date, so on a day with a leap second a step of n seconds lasts n of the
// day's 86401 seconds × 86400/86401; a step of whole days always lands at the
// same time of day.
//
// Errors: from or to not UTC, not finite, or outside the table span
// [TableFirstJD, TableLastJD) (wrapping [astro.ErrUnsupportedDate]); to
// before from; stepDays ≤ 0 or not finite; more than [MaxTableRows] rows (all
// wrapping [astro.ErrRange]).
func TableTimes(from, to astro.JD, stepDays float64) ([]astro.JD, error) {
	if from.Scale != astro.UTC || to.Scale != astro.UTC {
		return nil, fmt.Errorf("ephem: table times on the %v and %v scales, want UTC: %w", from.Scale, to.Scale, astro.ErrRange)
	}
	for _, j := range []astro.JD{from, to} {
		if v := j.Float(); !(v >= TableFirstJD && v < TableLastJD) {
			return nil, fmt.Errorf("ephem: %s is outside the span of the ephemerides, 1800-01-01 to 2201-01-01 UTC: %w",
				astro.FormatISO8601(j, 0), astro.ErrUnsupportedDate)
		}
	}
	span := to.Sub(from)
	switch {
	case span < 0:
		return nil, fmt.Errorf("ephem: the table ends (%s) before it starts (%s): %w",
			astro.FormatISO8601(to, 0), astro.FormatISO8601(from, 0), astro.ErrRange)
	case !(stepDays > 0) || math.IsInf(stepDays, 0):
		return nil, fmt.Errorf("ephem: step of %g days, want a step > 0: %w", stepDays, astro.ErrRange)
	}
	const slackDays = 1e-9
	steps := math.Floor((span + slackDays) / stepDays)
	if steps+1 > MaxTableRows {
		return nil, fmt.Errorf("ephem: %.0f rows from %s to %s at steps of %g d, more than the %d a table may have: %w",
			steps+1, astro.FormatISO8601(from, 0), astro.FormatISO8601(to, 0), stepDays, MaxTableRows, astro.ErrRange)
	}
	n := int(steps) + 1
	times := make([]astro.JD, n)
	for k := range times {
		times[k] = from.AddDays(float64(k) * stepDays).Normalized()
	}
	return times, nil
}

// EphemerisTable returns the places of target seen by the observer o at the
// instants of [TableTimes](from, to, stepDays), one [Place] a row, in time
// order.
//
// The errors are those of TableTimes and of the target's place
// ([PlaceOfBody], [PlaceOfElements]); the first fatal one ends the table and
// no places are returned. A warning — the leap-second table stale past its
// date, or UTC before 1972 read as UT — does not: the places are all returned
// with the first such warning as err, which then wraps [astro.ErrStaleTable]
// or [astro.ErrUTCBefore1972]; test with errors.Is.
//
// Accuracy: that of the places (see [Astrometric], [PlaceOfBody],
// [PlaceOfElements]); the table adds nothing.
func EphemerisTable(target TableTarget, from, to astro.JD, stepDays float64, o Observer) ([]Place, error) {
	if target.Elements == nil && target.Body != Sun && target.Body != Moon && (!target.Body.IsPlanet() || target.Body == Earth) {
		return nil, fmt.Errorf("ephem: no table for %v: want the Sun, the Moon, a planet other than the Earth, or an element set", target.Body)
	}
	if target.Elements != nil {
		if err := target.Elements.Validate(); err != nil {
			return nil, err
		}
	}
	times, err := TableTimes(from, to, stepDays)
	if err != nil {
		return nil, err
	}
	places := make([]Place, 0, len(times))
	var warn error
	for _, t := range times {
		p, err := target.PlaceAt(t, o)
		if err != nil {
			if !errors.Is(err, astro.ErrStaleTable) && !errors.Is(err, astro.ErrUTCBefore1972) {
				return nil, err
			}
			if warn == nil {
				warn = err
			}
		}
		places = append(places, p)
	}
	return places, warn
}
