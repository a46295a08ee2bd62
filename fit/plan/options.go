package plan

import (
	"fmt"
	"math"
	"time"

	"arcfit/astro"
)

// Defaults of [Options], as [DefaultOptions] sets them.
const (
	// DefaultMinAlt is the lowest altitude at which a target counts as
	// observable: 25°, airmass 2.4, a common working limit for faint targets
	// (common practice; the default).
	DefaultMinAlt = 25 * astro.Degree
	// DefaultStep is the interval of the table's rows.
	DefaultStep = 30 * time.Minute
	// DefaultSigma is the level of the search ellipse, as predict's --sigma.
	DefaultSigma = 3.0
	// DefaultFOVArcmin is the field of view the search region is compared
	// with, in arcminutes, as predict's --fov.
	DefaultFOVArcmin = 30.0
	// DefaultNextNights is how many later observable nights are listed when
	// the night asked for is not one.
	DefaultNextNights = 3
	// MaxSearchNights is how far the search for later nights goes, and the
	// default of Options.SearchNights.
	MaxSearchNights = 60
)

// Limits of the options.
const (
	// MinStep and MaxStep bound Options.Step.
	MinStep = time.Minute
	MaxStep = 24 * time.Hour
	// MaxMinAlt bounds Options.MinAlt from above (the limit must leave some
	// sky); its lower bound is 0°, the horizon.
	MaxMinAlt = 89 * astro.Degree
)

// Options control [Night]. Start from [DefaultOptions]: the zero value is not
// usable (a zero Step, Sigma or FOV is refused).
type Options struct {
	// Name names the target in the plan's sentences; "" reads "the target".
	Name string
	// Location is the local time of the night; nil is the site's local mean
	// solar time (ephem.LocalMeanTime).
	Location *time.Location
	// MinAlt is the lowest refracted altitude at which the target counts as
	// observable, 0° to 89°.
	MinAlt astro.Angle
	// Step is the interval of the rows, MinStep to MaxStep. Rows fall on
	// multiples of Step counted from local midnight.
	Step time.Duration
	// Sigma is the level of the search ellipse in standard deviations (> 0).
	Sigma float64
	// FOVArcmin is the field of view, arcminutes (> 0).
	FOVArcmin float64
	// AllowNearSun gives the rows even when the target is within 15° of the
	// Sun (the caution stays).
	AllowNearSun bool
	// NextNights is how many later observable nights to list when this one
	// is not observable (0: no search); SearchNights how many nights after
	// this one to try at most (1 to MaxSearchNights).
	NextNights, SearchNights int
}

// DefaultOptions returns the defaults: MinAlt 25°, Step 30 min, Sigma 3, FOV
// 30′, no rows near the Sun, up to 3 later nights searched over up to 60.
func DefaultOptions() Options {
	return Options{MinAlt: DefaultMinAlt, Step: DefaultStep, Sigma: DefaultSigma, FOVArcmin: DefaultFOVArcmin,
		NextNights: DefaultNextNights, SearchNights: MaxSearchNights}
}

// Validate reports the first option out of its range.
func (o Options) Validate() error {
	switch {
	case !(o.MinAlt >= 0 && o.MinAlt <= MaxMinAlt):
		return fmt.Errorf("plan: minimum altitude %g°: want 0° to %g°", o.MinAlt.Degrees(), MaxMinAlt.Degrees())
	case o.Step < MinStep || o.Step > MaxStep:
		return fmt.Errorf("plan: step %v: want %v to %v", o.Step, MinStep, MaxStep)
	case !(o.Sigma > 0) || math.IsInf(o.Sigma, 0):
		return fmt.Errorf("plan: σ level %v: want a positive number", o.Sigma)
	case !(o.FOVArcmin > 0) || math.IsInf(o.FOVArcmin, 0):
		return fmt.Errorf("plan: field of view %v′: want a positive number of arcminutes", o.FOVArcmin)
	case o.NextNights < 0:
		return fmt.Errorf("plan: %d next nights: want 0 or more", o.NextNights)
	case o.NextNights > 0 && (o.SearchNights < 1 || o.SearchNights > MaxSearchNights):
		return fmt.Errorf("plan: search over %d nights: want 1 to %d", o.SearchNights, MaxSearchNights)
	}
	return nil
}

// Date is a civil date: the date of a night's evening in local time.
type Date struct {
	Year  int
	Month time.Month
	Day   int
}

// NewDate returns the date year-month-day, or an error when there is no such
// date (2027-02-30) or it lies outside 1800–2200, arcfit's span.
func NewDate(year int, month time.Month, day int) (Date, error) {
	t := time.Date(year, month, day, 12, 0, 0, 0, time.UTC)
	if t.Year() != year || t.Month() != month || t.Day() != day {
		return Date{}, fmt.Errorf("plan: %04d-%02d-%02d is not a date", year, int(month), day)
	}
	if year < 1800 || year > 2200 {
		return Date{}, fmt.Errorf("plan: %04d-%02d-%02d lies outside 1800–2200", year, int(month), day)
	}
	return Date{year, month, day}, nil
}

// AddDays returns the date n days later (earlier for n < 0).
func (d Date) AddDays(n int) Date {
	t := time.Date(d.Year, d.Month, d.Day+n, 12, 0, 0, 0, time.UTC)
	return Date{t.Year(), t.Month(), t.Day()}
}

// String returns the date as YYYY-MM-DD.
func (d Date) String() string { return fmt.Sprintf("%04d-%02d-%02d", d.Year, int(d.Month), d.Day) }
