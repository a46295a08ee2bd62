package obs

import (
	"strconv"

	"arcfit/astro"
)

// Observation is one measured position of the moving object.
type Observation struct {
	// Line is the 1-based line of the observation in its file.
	Line int
	// Time is the instant of the measurement, a UTC Julian date.
	Time astro.JD
	// RA and Dec are the astrometric ICRS right ascension and declination.
	RA, Dec astro.Angle
	// SigmaRA and SigmaDec are the 1-σ uncertainties; SigmaRA is measured on
	// the sky (the uncertainty of Δα cos δ), not in right ascension itself.
	SigmaRA, SigmaDec astro.Angle
	// Corr is the correlation coefficient of the RA and Dec errors, in
	// (−1, 1); 0 when the file gives none.
	Corr float64
	// Site is the name or code of the observing site, "" when the row names
	// none and no default was given (the caller decides; the reader does not
	// guess a site).
	Site string
	// Mag is the measured magnitude, math.NaN() when the row gives none.
	Mag float64
	// Band is the photometric band of Mag, "" when none is given.
	Band string
	// Used is false for a row dropped by the reader (an exact duplicate of an
	// earlier row), true otherwise.
	Used bool

	// siteCol is the 1-based column of the site field, 0 when the site came
	// from the default; it lets ResolveSites point at the field.
	siteCol int
}

// Warning is something the reader noticed but did not reject: an unused
// column, an exact duplicate row, a default uncertainty, a date before 1972.
type Warning struct {
	File         string
	Line, Column int // 1-based; 0 when the warning is about the whole file
	Msg          string
}

// String returns "file:line:col: warning: msg", or "file: warning: msg" for
// a warning about the whole file.
func (w Warning) String() string {
	return position(w.File, w.Line, w.Column) + "warning: " + w.Msg
}

// position formats "file:line:col: ", leaving out the zero parts.
func position(file string, line, col int) string {
	s := file
	if s == "" {
		if line == 0 {
			return "obs: "
		}
		s = "<input>"
	}
	if line > 0 {
		s += ":" + strconv.Itoa(line)
		if col > 0 {
			s += ":" + strconv.Itoa(col)
		}
	}
	return s + ": "
}

// Set is what one observation file holds.
type Set struct {
	// File is the name the file was read under, as used in messages.
	File string
	// Format is "csv" or "ades-psv".
	Format string
	// Object is the object's designation when the file gives one (the ADES
	// permID, provID or trkSub); "" otherwise.
	Object string
	// Obs are the observations sorted by time; the sort is stable, so rows at
	// one instant keep their order in the file.
	Obs []Observation
	// Warnings are the reader's warnings in file order.
	Warnings []Warning
	// Sites are the sites the file itself defines (ADES WGS84 station
	// positions), by the name the observations carry in Site.
	Sites map[string]astro.Site
	// Meta holds the ADES header lines ("# version=2017", "! mpcCode …") as
	// written, trimmed; nil for CSV.
	Meta []string
}

// Used returns the number of observations with Used set.
func (s *Set) Used() int {
	n := 0
	for i := range s.Obs {
		if s.Obs[i].Used {
			n++
		}
	}
	return n
}

// ReadOptions control [Read].
type ReadOptions struct {
	// Format is "" to recognise the format from the content, or "csv" or
	// "ades-psv" to insist on one.
	Format string
	// DefaultSigmaArcsec is the 1-σ uncertainty, in arcseconds, given to rows
	// without one. 0 means DefaultSigmaArcsec (1″) and a warning saying so;
	// a negative value, NaN or ±Inf is an error.
	DefaultSigmaArcsec float64
	// Sites are the known sites (from a sites file). When it is non-nil, every
	// site a row names must be in Sites or among the file's own sites; when it
	// is nil, names are kept unchecked and [Set.ResolveSites] checks them later.
	Sites map[string]astro.Site
	// DefaultSite is the site given to rows that name none ("" for none: such
	// rows keep Site "", a geocentric observation, and the caller decides).
	DefaultSite string
}

// DefaultSigmaArcsec is the 1-σ uncertainty per coordinate, in arcseconds,
// that [Read] assumes for rows without one when ReadOptions.DefaultSigmaArcsec
// is 0. One arcsecond is the middle of the 0.3″–2″ that amateur astrometry
// typically reaches (a common-practice figure, not a measured one).
const DefaultSigmaArcsec = 1.0
