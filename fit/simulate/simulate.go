package simulate

import (
	"errors"
	"fmt"
	"math"
	"runtime"
	"sort"
	"strconv"
	"sync"
	"time"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit"
	"arcfit/fit/plan"
)

// Limits of [Config].
const (
	// MaxPerNight bounds Config.PerNight: 10,000 a night, one every few
	// seconds of a long night.
	MaxPerNight = 10000
	// MaxNights and MaxSites bound the nights and the sites of one run.
	MaxNights = 366
	MaxSites  = 100
	// MaxSamples bounds PerNight × nights × sites: a million observations.
	MaxSamples = 1000000
	// MinCadence and MaxCadence bound Config.Cadence, a whole number of
	// seconds.
	MinCadence = time.Second
	MaxCadence = 24 * time.Hour
	// MaxSigmaArcsec is the largest noise, 3600″ (the largest σ the
	// observation reader takes).
	MaxSigmaArcsec = 3600.0
	// MaxMagSigma bounds Config.MagSigma, in magnitudes.
	MaxMagSigma = 5.0
)

// Defaults of [DefaultConfig].
const (
	// DefaultPerNight is four observations a night, the common minimum of a
	// follow-up (a few positions to show the motion; common practice).
	DefaultPerNight = 4
	// DefaultCadence is 20 minutes between observations.
	DefaultCadence = 20 * time.Minute
	// DefaultSigmaArcsec is 1″ per coordinate, the middle of the 0.3″–2″ of
	// amateur astrometry (obs.DefaultSigmaArcsec; common practice).
	DefaultSigmaArcsec = 1.0
)

// Config says what to simulate.
type Config struct {
	// Target is the object: plan.ElementsTarget (two-body motion), or any
	// other plan.Target, such as a *fit.SavedFit, through its Predict.
	Target plan.Target
	// Name names the object in the runs' sentences ("" reads "the
	// target"); Source describes it for the file's header, such as
	// `element set "Demo-1" of elements.csv`.
	Name, Source string
	// Sites observe on every night, in this order; their names, distinct and
	// not empty, go into the file's site column.
	Sites []astro.Site
	// Nights are the local dates of the evenings (the night that begins on
	// that evening, in each site's local mean solar time), in any order;
	// each once.
	Nights []plan.Date
	// PerNight is the number of observations each site makes each night,
	// 1 to MaxPerNight; Cadence the interval between them, a whole number
	// of seconds from MinCadence to MaxCadence.
	PerNight int
	Cadence  time.Duration
	// SigmaArcsec is the 1-σ noise per coordinate (RA on the sky), arcsec,
	// above 0 and at most MaxSigmaArcsec; it is also the σ written.
	SigmaArcsec float64
	// MagSigma is the 1-σ noise of the magnitudes, 0 (none) to MaxMagSigma.
	MagSigma float64
	// Seed seeds the noise.
	Seed uint64
	// MinAlt is the lowest refracted altitude of an observation, 0° to
	// plan.MaxMinAlt.
	MinAlt astro.Angle
	// Workers is the number of nights and sites worked on at once; 0 means
	// runtime.GOMAXPROCS(0).
	Workers int
}

// DefaultConfig returns a Config with the defaults: four observations a
// night 20 minutes apart, 1″ of noise, no magnitude noise, seed 1, the
// altitude limit of plan.DefaultMinAlt (25°). Target, Sites and Nights are
// left to the caller.
func DefaultConfig() Config {
	return Config{PerNight: DefaultPerNight, Cadence: DefaultCadence, SigmaArcsec: DefaultSigmaArcsec,
		Seed: 1, MinAlt: plan.DefaultMinAlt}
}

// Validate reports the first setting out of its range.
func (c Config) Validate() error {
	switch {
	case c.Target == nil:
		return errors.New("simulate: no target")
	case len(c.Sites) == 0:
		return errors.New("simulate: no site")
	case len(c.Sites) > MaxSites:
		return fmt.Errorf("simulate: %d sites: want at most %d", len(c.Sites), MaxSites)
	case len(c.Nights) == 0:
		return errors.New("simulate: no night")
	case len(c.Nights) > MaxNights:
		return fmt.Errorf("simulate: %d nights: want at most %d", len(c.Nights), MaxNights)
	case c.PerNight < 1 || c.PerNight > MaxPerNight:
		return fmt.Errorf("simulate: %d observations a night: want 1 to %d", c.PerNight, MaxPerNight)
	case c.Cadence < MinCadence || c.Cadence > MaxCadence || c.Cadence%time.Second != 0:
		return fmt.Errorf("simulate: cadence %v: want a whole number of seconds from %v to %v", c.Cadence, MinCadence, MaxCadence)
	case !(c.SigmaArcsec > 0) || c.SigmaArcsec > MaxSigmaArcsec:
		return fmt.Errorf("simulate: noise %v″: want above 0 and at most %g″", c.SigmaArcsec, MaxSigmaArcsec)
	case !(c.MagSigma >= 0) || c.MagSigma > MaxMagSigma:
		return fmt.Errorf("simulate: magnitude noise %v: want 0 to %g", c.MagSigma, MaxMagSigma)
	case !(c.MinAlt >= 0) || c.MinAlt > plan.MaxMinAlt:
		return fmt.Errorf("simulate: altitude limit %g°: want 0° to %g°", c.MinAlt.Degrees(), plan.MaxMinAlt.Degrees())
	case c.Workers < 0:
		return fmt.Errorf("simulate: %d workers: want 0 (one per core) or more", c.Workers)
	}
	if n := c.PerNight * len(c.Nights) * len(c.Sites); n > MaxSamples {
		return fmt.Errorf("simulate: %d observations asked for: want at most %d", n, MaxSamples)
	}
	names := map[string]bool{}
	for _, s := range c.Sites {
		if s.Name == "" {
			return errors.New("simulate: a site without a name (the file's site column needs one)")
		}
		if names[s.Name] {
			return fmt.Errorf("simulate: site %q given twice", s.Name)
		}
		names[s.Name] = true
	}
	nights := map[plan.Date]bool{}
	for _, d := range c.Nights {
		if _, err := plan.NewDate(d.Year, d.Month, d.Day); err != nil {
			return fmt.Errorf("simulate: %v", err)
		}
		if nights[d] {
			return fmt.Errorf("simulate: night %v given twice", d)
		}
		nights[d] = true
	}
	return nil
}

// Sample is one synthetic observation.
type Sample struct {
	// UTC is the instant, on a whole second, as written.
	UTC astro.JD
	// Site is the site's name, as written; Night the night it belongs to.
	Site  string
	Night plan.Date
	// RA and Dec are the noisy astrometric ICRS place as written (to 1e-9°).
	RA, Dec astro.Angle
	// SigmaArcsec is the σ written, the noise's.
	SigmaArcsec float64
	// Mag is the noisy magnitude as written (to 0.01), NaN when the target
	// has none.
	Mag float64
	// TrueRA, TrueDec and TrueMag are the noise-free place and magnitude.
	TrueRA, TrueDec astro.Angle
	TrueMag         float64
	// NoiseEastArcsec and NoiseNorthArcsec are the deviates drawn (before
	// the rounding of the written place).
	NoiseEastArcsec, NoiseNorthArcsec float64
	// Alt is the object's refracted altitude (10 °C, 1010 hPa) and SunAlt the
	// Sun's geometric altitude at the instant.
	Alt, SunAlt astro.Angle
	// BeyondHorizon reports a prediction of a fit beyond its validity
	// horizon (never for an element set).
	BeyondHorizon bool
}

// NightRun is what one site made of one night.
type NightRun struct {
	Night plan.Date
	Site  string
	// Reason says whether the object was observable and Why, when not, in
	// plain words (those of plan.Night).
	Reason plan.Reason
	Why    string
	// Window is the window holding the best time, Best and BestAlt the best
	// time and altitude (zero when not observable).
	Window  plan.Window
	Best    astro.JD
	BestAlt astro.Angle
	// Made is the number of observations made; Cut those that would have
	// fallen beyond the window's end, Dropped those that failed the check
	// of darkness and altitude at the window's edge.
	Made, Cut, Dropped int
	// BeyondHorizon counts the observations beyond a fit's validity horizon.
	BeyondHorizon int
}

// Result is a simulation's outcome.
type Result struct {
	Config Config
	// Samples are the observations in time order (ties: nights, sites in
	// the Config's order).
	Samples []Sample
	// Runs are the nights and sites, nights in the Config's order, then
	// sites.
	Runs []NightRun
	// Warnings are remarks that do not stop the simulation (a stale
	// leap-second table).
	Warnings []string
}

// Run simulates the observations cfg asks for; see the package
// documentation for the method.
//
// A night on which the object cannot be observed from a site gives a NightRun
// with its reason and no samples; that is no error (the Result may hold no
// sample at all). Errors: cfg out of range ([Config.Validate]), a night or
// site that plan.Night rejects (a date outside the ephemerides' span, a site
// beyond ±90°).
func (c Config) Run() (*Result, error) {
	if err := c.Validate(); err != nil {
		return nil, err
	}
	type job struct {
		run     NightRun
		samples []Sample
		warns   []string
		err     error
	}
	jobs := make([]job, len(c.Nights)*len(c.Sites))
	workers := c.Workers
	if workers == 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = max(1, min(workers, len(jobs)))
	next := make(chan int)
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for j := range next {
				night, site := c.Nights[j/len(c.Sites)], c.Sites[j%len(c.Sites)]
				jobs[j].run, jobs[j].samples, jobs[j].warns, jobs[j].err = c.night(night, site)
			}
		}()
	}
	for j := range jobs {
		next <- j
	}
	close(next)
	wg.Wait()

	res := &Result{Config: c}
	seen := map[string]bool{}
	for _, j := range jobs {
		if j.err != nil {
			return nil, j.err
		}
		res.Runs = append(res.Runs, j.run)
		for _, w := range j.warns {
			if !seen[w] {
				seen[w] = true
				res.Warnings = append(res.Warnings, w)
			}
		}
	}
	pos, mag := newGaussian(c.Seed, streamPositions), newGaussian(c.Seed, streamMagnitudes)
	for k := range jobs {
		for i := range jobs[k].samples {
			s := &jobs[k].samples[i]
			e := pos.next()
			n := pos.next()
			c.addNoise(s, e, n)
			if !math.IsNaN(s.TrueMag) {
				s.Mag = roundMag(s.TrueMag + c.MagSigma*mag.next())
			}
			res.Samples = append(res.Samples, *s)
		}
	}
	sort.SliceStable(res.Samples, func(i, j int) bool { return res.Samples[i].UTC.Before(res.Samples[j].UTC) })
	return res, nil
}

// Streams of the generator: one for positions, one for magnitudes (the
// words "pos" and "mag" in ASCII).
const (
	streamPositions  = 0x706f73
	streamMagnitudes = 0x6d6167
)

// addNoise offsets the sample's true place by e and n (standard deviates)
// times the noise on the tangent plane, and rounds it as written.
func (c Config) addNoise(s *Sample, e, n float64) {
	s.NoiseEastArcsec, s.NoiseNorthArcsec = c.SigmaArcsec*e, c.SigmaArcsec*n
	as := astro.Arcsecond.Radians()
	tp := astro.TangentPlane{RA0: s.TrueRA, Dec0: s.TrueDec}
	ra, dec := tp.Deproject(s.NoiseEastArcsec*as, s.NoiseNorthArcsec*as)
	s.RA, s.Dec = writtenRA(ra), writtenDec(dec)
	s.SigmaArcsec = c.SigmaArcsec
}

// The written forms: degrees to 9 decimals, magnitudes to 2.
const (
	degDecimals = 9
	magDecimals = 2
)

// writtenRA returns ra as the file writes it and the reader reads it.
func writtenRA(ra astro.Angle) astro.Angle {
	v := parseWritten(formatDeg(ra.Normalized().Degrees()))
	if v >= 360 {
		v = 0 // the reader reads 360 as 0
	}
	return astro.AngleFromDegrees(v)
}

// writtenDec returns dec as the file writes it and the reader reads it.
func writtenDec(dec astro.Angle) astro.Angle {
	return astro.AngleFromDegrees(math.Max(-90, math.Min(90, parseWritten(formatDeg(dec.Degrees())))))
}

func roundMag(m float64) float64 { return parseWritten(formatMag(m)) }

func formatDeg(v float64) string { return strconv.FormatFloat(v, 'f', degDecimals, 64) }
func formatMag(v float64) string { return strconv.FormatFloat(v, 'f', magDecimals, 64) }

// parseWritten reads back a number this package formatted.
func parseWritten(s string) float64 {
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		panic("simulate: formatted number does not parse: " + s)
	}
	return v
}

// formatTime formats a UTC instant to the whole second, as written.
func formatTime(t astro.JD) string { return astro.FormatISO8601(t, 0) }

// wholeSecond returns t rounded to a whole UTC second, as the file writes it
// and the reader reads it.
func wholeSecond(t astro.JD) (astro.JD, error) {
	j, err := astro.ParseISO8601(formatTime(t))
	if err != nil {
		return astro.JD{}, err
	}
	return j.Normalized(), nil
}

// edgeMarginSec keeps the observations this many seconds inside the window:
// its ends are found by bisection to 0.5 s (fit/plan), so a time in the last
// half-second could lie on the wrong side.
const edgeMarginSec = 1.0

// darkAltitude is the Sun's geometric altitude below which the sky is dark
// (astronomical twilight, Explanatory Supplement (1992) §9.33).
var darkAltitude = ephem.AstronomicalTwilight.Altitude()

// night makes the noise-free samples of one night at one site.
func (c Config) night(date plan.Date, site astro.Site) (NightRun, []Sample, []string, error) {
	run := NightRun{Night: date, Site: site.Name}
	opts := plan.DefaultOptions()
	opts.Name, opts.MinAlt, opts.Step, opts.NextNights = c.Name, c.MinAlt, plan.MaxStep, 0
	p, err := plan.Night(c.Target, date, site, opts)
	if err != nil {
		return run, nil, nil, fmt.Errorf("simulate: the night of %v at %s: %w", date, site.Name, err)
	}
	warns := append([]string(nil), p.Warnings...)
	run.Reason, run.Why = p.Reason, p.Why
	if !p.Observable {
		return run, nil, warns, nil
	}
	run.Window, run.Best, run.BestAlt = p.Window, p.Best.UTC, p.Best.Pointing.Alt
	cad := c.Cadence.Seconds()
	span := float64(c.PerNight-1) * cad / 86400
	// The window less edgeMarginSec at each end: its ends are found to
	// about 0.25 s, so that the first and last seconds are not in doubt.
	w := plan.Window{Start: p.Window.Start.AddSeconds(edgeMarginSec), End: p.Window.End.AddSeconds(-edgeMarginSec)}
	if w.End.Before(w.Start) {
		w.End = w.Start
	}
	start := p.Best.UTC.AddDays(-span / 2)
	if w.End.Before(start.AddDays(span)) {
		start = w.End.AddDays(-span)
	}
	if start.Before(w.Start) {
		start = w.Start
	}
	// The first whole second at or after start; the one before when the
	// run would otherwise overrun the window's end by that rounding.
	first, err := wholeSecond(start.AddSeconds(0.5))
	if err != nil {
		return run, nil, nil, fmt.Errorf("simulate: %v", err)
	}
	if e := first.AddDays(span); w.End.Before(e) && !first.AddSeconds(-1).Before(w.Start) {
		if first, err = wholeSecond(first.AddSeconds(-1)); err != nil {
			return run, nil, nil, fmt.Errorf("simulate: %v", err)
		}
	}
	var out []Sample
	st := site
	for k := 0; k < c.PerNight; k++ {
		t := first.AddSeconds(float64(k) * cad)
		if t, err = wholeSecond(t); err != nil {
			return run, nil, nil, fmt.Errorf("simulate: %v", err)
		}
		if w.End.Before(t) {
			run.Cut = c.PerNight - k
			break
		}
		s, ok, err := c.truth(t, &st)
		if err != nil {
			return run, nil, nil, fmt.Errorf("simulate: %v at %s from %s", err, formatTime(t), site.Name)
		}
		if !ok {
			run.Dropped++
			continue
		}
		s.Night = date
		if s.BeyondHorizon {
			run.BeyondHorizon++
		}
		out = append(out, s)
	}
	run.Made = len(out)
	return run, out, warns, nil
}

// truth returns the noise-free sample at t from site, and whether the sky is
// dark and the object high enough then.
func (c Config) truth(t astro.JD, site *astro.Site) (Sample, bool, error) {
	s := Sample{UTC: t, Site: site.Name, TrueMag: math.NaN(), Mag: math.NaN()}
	if et, ok := c.Target.(plan.ElementsTarget); ok {
		pl, err := ephem.PlaceOfElements(et.Elements, t, ephem.Observer{Site: site, NoRefraction: true})
		if err != nil && !tolerable(err) {
			return s, false, err
		}
		s.TrueRA, s.TrueDec = pl.RA, pl.Dec
		if !math.IsInf(pl.Mag, 0) {
			s.TrueMag = pl.Mag
		}
	} else {
		pr, err := c.Target.Predict(t, site)
		if err != nil {
			return s, false, err
		}
		s.TrueRA, s.TrueDec, s.BeyondHorizon = pr.RA, pr.Dec, pr.BeyondHorizon
		if !math.IsInf(pr.Mag, 0) {
			s.TrueMag = pr.Mag
		}
	}
	pt, err := fit.PointingOf(fit.Prediction{UTC: t, Site: site, RA: s.TrueRA, Dec: s.TrueDec})
	if err != nil {
		return s, false, err
	}
	sun, err := ephem.PlaceOfBody(ephem.Sun, t, ephem.Observer{Site: site, NoRefraction: true})
	if err != nil && !tolerable(err) {
		return s, false, err
	}
	s.Alt, s.SunAlt = pt.Alt, sun.Alt
	return s, s.Alt >= c.MinAlt && s.SunAlt <= darkAltitude, nil
}

// tolerable reports the warnings of the places (a stale leap-second table, a
// UTC before 1972) under which the place is still computed.
func tolerable(err error) bool {
	return errors.Is(err, astro.ErrStaleTable) || errors.Is(err, astro.ErrUTCBefore1972)
}
