package plan

import (
	"errors"
	"fmt"
	"math"
	"time"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit"

	"gonum.org/v1/gonum/spatial/r3"
)

// NightPlan is where and when to point at one target on one night at one
// site: the result of [Night].
type NightPlan struct {
	// Name is the target's name as given in the options ("the target" when
	// none was).
	Name string
	Date Date
	// Sky is the night's sky: the Sun's events, the dark window, the Moon.
	Sky ephem.NightSky
	// Options are the options the plan was made with.
	Options Options

	// Observable is true when the target stands at least Options.MinAlt
	// high during astronomical darkness, and is not near the Sun; Reason
	// says why not, and Why in plain words (empty when observable).
	Observable bool
	Reason     Reason
	Why        string

	// Windows are the stretches of the dark window in which the target is
	// above the limit, in time order (two or more when it dips below the
	// limit in the night, as a circumpolar target at lower culmination).
	// Window is the one holding Best; the zero Window when not observable.
	Windows []Window
	Window  Window
	// Best is the target at its highest altitude within the windows; nil
	// when not observable.
	Best *Point
	// HighestDark and HighestDarkAlt are the target's highest altitude
	// during the dark window and its instant (zero without darkness or when
	// the prediction fails); below the limit, they say how close it comes.
	HighestDark    astro.JD
	HighestDarkAlt astro.Angle

	// SunElongation is the target's angle from the Sun at SunCheckTime, the
	// middle of the dark window (local midnight when there is none); NearSun
	// reports it below ephem.NearSunLimit (15°).
	SunElongation astro.Angle
	SunCheckTime  astro.JD
	NearSun       bool

	// Rows are the target at every multiple of Options.Step (counted from
	// local midnight) within the dark window, in time order. None without
	// darkness, none when the prediction fails, and none when the target is
	// near the Sun unless Options.AllowNearSun (RowsWithheld then says so).
	Rows         []Point
	RowsWithheld bool

	// Cautions are design.md's cautions that apply, in plain words: the Sun
	// within 15°, a prediction beyond the fit's validity horizon, a search
	// region wider than the field.
	Cautions []string
	// Warnings are conditions that do not stop the plan (a stale
	// leap-second table).
	Warnings []string

	// NextNights are, when the night is not observable, the first later
	// nights that are (at most Options.NextNights of them), and
	// SearchedNights how many nights after Date were tried.
	NextNights     []NextNight
	SearchedNights int
}

// Point is the target at one instant of the night.
type Point struct {
	UTC        astro.JD
	Prediction fit.Prediction
	Pointing   fit.Pointing
	// RAApp and DecApp are the apparent place of date (true equator and
	// equinox of date) of the prediction's astrometric place,
	// astro.ApparentPlace: what a mount that takes coordinates of date wants.
	RAApp, DecApp astro.Angle
	// Airmass is astro.AirmassKastenYoung at the refracted altitude (+Inf
	// below the horizon).
	Airmass float64
	// Ellipse is the search region at Options.Sigma; RegionArcmin its major
	// axis (the full length, twice the semi-major axis) in arcminutes and
	// RegionFields that over Options.FOVArcmin.
	Ellipse      fit.Ellipse
	RegionArcmin float64
	RegionFields float64
	// MoonSeparation is the angle between the target and the Moon seen from
	// the site (astrometric places); MoonAlt the Moon's refracted altitude;
	// MoonIllumination its illuminated fraction (0–1).
	MoonSeparation   astro.Angle
	MoonAlt          astro.Angle
	MoonIllumination float64
	// InWindow reports that the instant lies in one of the plan's windows.
	InWindow bool
}

// NextNight is a later night on which the target is observable.
type NextNight struct {
	Date Date
	// Window is the stretch holding the best time; Windows all of them.
	Window  Window
	Windows []Window
	// Best and BestAlt are the instant and altitude of the highest altitude
	// within the windows.
	Best    astro.JD
	BestAlt astro.Angle
}

// Night returns the plan for target t on the night of date (the night that
// begins on that date's evening in local time) at site.
//
// The night's sky is ephem.NightAt's (local noon to local noon, in
// opts.Location or the site's mean solar time). The target's altitude is
// that of fit.PointingOf (refracted for 10 °C and 1010 hPa) of its place;
// its windows and best time within the dark window are found as described in
// the package documentation, to about a second. The reasons, the rows, the
// cautions and the search for later nights are those of [NightPlan].
//
// Errors: options out of range ([Options.Validate]), an invalid date or site,
// a date outside the ephemerides' span (those of ephem.NightAt). A target
// whose prediction fails is no error: the plan says ReasonPredictionFailed
// and why. A stale leap-second table goes to Warnings.
//
// Reference: see the package documentation.
func Night(t Target, date Date, site astro.Site, opts Options) (*NightPlan, error) {
	if err := opts.Validate(); err != nil {
		return nil, err
	}
	if _, err := NewDate(date.Year, date.Month, date.Day); err != nil {
		return nil, err
	}
	if t == nil {
		return nil, errors.New("plan: no target")
	}
	name := opts.Name
	if name == "" {
		name = "the target"
	}
	ev, err := evaluate(t, date, site, opts)
	if err != nil {
		return nil, err
	}
	p := &NightPlan{Name: name, Date: date, Sky: ev.sky, Options: opts, Reason: ev.reason,
		Observable: ev.reason == Observable, Windows: ev.win.windows,
		HighestDark: ev.win.highest, HighestDarkAlt: ev.win.highestAlt,
		SunElongation: ev.elong, SunCheckTime: ev.ref, NearSun: ev.elong < ephem.NearSunLimit,
		Warnings: ev.warnings}
	if ev.predictErr != nil {
		p.NearSun = false
	}
	p.Why = p.why(ev)
	site = ev.sky.Site
	if p.Observable {
		p.Window = p.Windows[ev.win.bestWindow]
		best, err := p.point(t, &site, ev.win.best)
		if err != nil {
			return nil, err
		}
		p.Best = &best
	}
	if ev.predictErr == nil && ephem.Happens(ev.sky.DarkStart) {
		if p.NearSun && !opts.AllowNearSun {
			p.RowsWithheld = true
		} else if err := p.rows(t, &site); err != nil {
			p.Reason, p.Observable, p.Best, p.Rows = ReasonPredictionFailed, false, nil, nil
			p.Why = fmt.Sprintf("the prediction fails: %v", err)
		}
	}
	p.Cautions = p.cautions()
	if !p.Observable && opts.NextNights > 0 {
		if err := p.searchNext(t, site); err != nil {
			return nil, err
		}
	}
	return p, nil
}

// evaluation is one night's verdict for a target.
type evaluation struct {
	sky        ephem.NightSky
	warnings   []string
	ref        astro.JD
	elong      astro.Angle
	win        windowResult
	reason     Reason
	predictErr error
}

// evaluate computes the night's sky, the target's elongation from the Sun,
// its windows and the reason.
func evaluate(t Target, date Date, site astro.Site, opts Options) (*evaluation, error) {
	sky, err := ephem.NightAt(date.Year, int(date.Month), date.Day, site, opts.Location)
	ev := &evaluation{sky: sky, win: windowResult{bestWindow: -1}}
	if err != nil {
		if !errors.Is(err, astro.ErrStaleTable) {
			return nil, fmt.Errorf("plan: the night of %v: %w", date, err)
		}
		ev.warnings = append(ev.warnings, err.Error())
	}
	st := sky.Site
	f := altitudeOf(t, &st)
	dark := ephem.Happens(sky.DarkStart)
	ev.ref = sky.MoonTime // local midnight
	if dark {
		ev.ref = sky.DarkStart.AddDays(0.5 * sky.DarkEnd.Sub(sky.DarkStart))
	}
	if _, ev.elong, err = f(ev.ref); err != nil {
		ev.reason, ev.predictErr = ReasonPredictionFailed, err
		return ev, nil
	}
	if dark {
		if ev.win, err = findWindows(f, sky.DarkStart, sky.DarkEnd, opts.MinAlt); err != nil {
			ev.reason, ev.predictErr = ReasonPredictionFailed, err
			return ev, nil
		}
	}
	switch {
	case ev.elong < ephem.NearSunLimit:
		ev.reason = ReasonNearSun
	case !dark:
		ev.reason = ReasonNoDarkness
	case len(ev.win.windows) == 0:
		ev.reason = ReasonBelowLimit
	default:
		ev.reason = Observable
	}
	return ev, nil
}

// why says in plain words why the target cannot be observed.
func (p *NightPlan) why(ev *evaluation) string {
	sky := ev.sky
	switch p.Reason {
	case ReasonPredictionFailed:
		return fmt.Sprintf("the prediction fails: %v", ev.predictErr)
	case ReasonNearSun:
		s := fmt.Sprintf("%s is %.1f° from the Sun, within %.0f°: it is lost in the Sun's glare", p.Name, ev.elong.Degrees(), ephem.NearSunLimit.Degrees())
		if ephem.Happens(sky.DarkStart) {
			s += " and stays below the horizon while the sky is dark"
		}
		return s
	case ReasonNoDarkness:
		return fmt.Sprintf("the sky does not get astronomically dark at this site on this night: the Sun stays above −18° (its lowest is %.1f°)",
			sky.SunMinAlt.Degrees())
	case ReasonBelowLimit:
		return fmt.Sprintf("%s stays below %g° throughout the dark window (its highest then is %.1f°)",
			p.Name, p.Options.MinAlt.Degrees(), ev.win.highestAlt.Degrees())
	}
	return ""
}

// point computes the target at instant t.
func (p *NightPlan) point(t Target, site *astro.Site, utc astro.JD) (Point, error) {
	pr, err := t.Predict(utc, site)
	if err != nil {
		return Point{}, fmt.Errorf("plan: %v", err)
	}
	pt, err := fit.PointingOf(pr)
	if err != nil {
		return Point{}, fmt.Errorf("plan: %v", err)
	}
	tt, err := astro.UTCToTT(utc)
	if err != nil && !errors.Is(err, astro.ErrStaleTable) && !errors.Is(err, astro.ErrUTCBefore1972) {
		return Point{}, fmt.Errorf("plan: %v", err)
	}
	pp := Point{UTC: utc, Prediction: pr, Pointing: pt, Airmass: astro.AirmassKastenYoung(pt.Alt)}
	pp.RAApp, pp.DecApp = astro.ApparentPlace(pr.RA, pr.Dec, tt)
	pp.Ellipse = pr.Ellipse(p.Options.Sigma)
	pp.RegionArcmin = 2 * pp.Ellipse.SemiMajorArcsec / 60
	pp.RegionFields = pp.RegionArcmin / p.Options.FOVArcmin
	moon, err := ephem.PlaceOfBody(ephem.Moon, utc, ephem.Observer{Site: site})
	if err != nil && moon.UTC == (astro.JD{}) {
		return Point{}, fmt.Errorf("plan: the Moon's place: %v", err)
	}
	pp.MoonSeparation = astro.Separation(moon.RA, moon.Dec, pr.RA, pr.Dec)
	pp.MoonAlt = moon.Alt
	earth, _, err := ephem.HeliocentricICRS(ephem.Earth, astro.TTToTDB(tt))
	if err != nil {
		return Point{}, fmt.Errorf("plan: %v", err)
	}
	_, pp.MoonIllumination = ephem.MoonIllumination(ephem.MoonGeocentricICRS(tt), r3.Scale(-1, earth))
	for _, w := range p.Windows {
		pp.InWindow = pp.InWindow || w.Contains(utc)
	}
	return pp, nil
}

// rows fills the rows at every multiple of the step within the dark window.
func (p *NightPlan) rows(t Target, site *astro.Site) error {
	for _, utc := range stepTimes(p.Sky, p.Options.Step) {
		pt, err := p.point(t, site, utc)
		if err != nil {
			return err
		}
		p.Rows = append(p.Rows, pt)
	}
	return nil
}

// stepTimes returns the instants within the sky's dark window that fall on
// multiples of step counted from local midnight (the local midnight of the
// dark window's start, at that instant's offset from UTC).
func stepTimes(sky ephem.NightSky, step time.Duration) []astro.JD {
	start, end := sky.Local(sky.DarkStart), sky.Local(sky.DarkEnd)
	midnight := time.Date(start.Year(), start.Month(), start.Day(), 0, 0, 0, 0, start.Location())
	k := math.Ceil(float64(start.Sub(midnight)) / float64(step))
	first := midnight.Add(time.Duration(k) * step)
	var out []astro.JD
	for tm := first; !tm.After(end); tm = tm.Add(step) {
		if j, err := jdOfTime(tm); err == nil {
			out = append(out, j)
		}
	}
	return out
}

// jdOfTime converts a time.Time to a UTC JD.
func jdOfTime(t time.Time) (astro.JD, error) {
	u := t.UTC()
	return astro.DateTimeToJD(u.Year(), int(u.Month()), u.Day(), u.Hour(), u.Minute(),
		float64(u.Second())+float64(u.Nanosecond())/1e9, astro.UTC)
}

// searchNext tries the nights after p.Date until p.Options.NextNights
// observable ones are found or p.Options.SearchNights have been tried.
func (p *NightPlan) searchNext(t Target, site astro.Site) error {
	for k := 1; k <= p.Options.SearchNights && len(p.NextNights) < p.Options.NextNights; k++ {
		d := p.Date.AddDays(k)
		ev, err := evaluate(t, d, site, p.Options)
		p.SearchedNights = k
		if err != nil {
			return err
		}
		if ev.reason != Observable {
			continue
		}
		p.NextNights = append(p.NextNights, NextNight{Date: d, Window: ev.win.windows[ev.win.bestWindow],
			Windows: ev.win.windows, Best: ev.win.best, BestAlt: ev.win.bestAlt})
	}
	return nil
}

// cautions returns design.md's cautions that apply to the plan.
func (p *NightPlan) cautions() []string {
	var out []string
	if p.NearSun {
		c := fmt.Sprintf("CAUTION: %s is %.1f° from the Sun on this night, within %.0f°. Pointing a telescope, finder or binoculars near the Sun can blind you and destroy equipment; do not point there while the Sun is up.",
			p.Name, p.SunElongation.Degrees(), ephem.NearSunLimit.Degrees())
		if p.RowsWithheld {
			c += " No pointing table is given for it."
		}
		out = append(out, c)
	}
	var beyond *Point
	if p.Best != nil && p.Best.Prediction.BeyondHorizon {
		beyond = p.Best
	}
	for i := range p.Rows {
		if beyond == nil && p.Rows[i].Prediction.BeyondHorizon {
			beyond = &p.Rows[i]
		}
	}
	if beyond != nil {
		at := "the best time"
		if beyond != p.Best {
			at = astro.FormatISO8601(beyond.UTC, 0)
		}
		out = append(out, fmt.Sprintf("caution: at %s the prediction lies beyond the fit's validity horizon (%.2f d beyond the arc): the model is not to be trusted there and the object may lie outside the search region.",
			at, beyond.Prediction.HorizonDays))
	}
	if p.Best != nil && p.Best.RegionFields > 1 {
		out = append(out, fmt.Sprintf("note: at the best time the %g-σ search region is %.1f fields wide (major axis %.1f′ against a %g′ field): plan a mosaic or a wider field.",
			p.Options.Sigma, p.Best.RegionFields, p.Best.RegionArcmin, p.Options.FOVArcmin))
	}
	return out
}
