package obs

import (
	"encoding/json"
	"fmt"
	"math"
	"sort"
	"time"

	"arcfit/astro"
)

// Summary is what an observation set holds, at a glance: how many
// measurements, from which sites, on how many nights, over what arc, how good,
// how fast the object moved on each night, and what looks wrong. It is the
// content of the inspect command; its fields carry their units in their names
// and in their JSON keys.
type Summary struct {
	File   string `json:"file"`
	Format string `json:"format"`
	// Count is the number of rows read; Used the number kept (duplicates are
	// read but not used).
	Count int `json:"observation_count"`
	Used  int `json:"used_count"`
	// Sites lists the sites the observations name, in order of first use.
	Sites []SiteUse `json:"sites"`
	// NightCount is the number of distinct local dates in Nights (two sites
	// observing on the same local date count as one night).
	NightCount int `json:"night_count"`
	// First and Last are the UTC times of the first and last used
	// observation, FirstUTC and LastUTC the same in ISO 8601 to 0.01 s ("" for
	// an empty set); ArcDays is Last − First in days and ArcHours the same in
	// hours.
	First    astro.JD `json:"-"`
	Last     astro.JD `json:"-"`
	FirstUTC string   `json:"first_utc"`
	LastUTC  string   `json:"last_utc"`
	ArcDays  float64  `json:"arc_days"`
	ArcHours float64  `json:"arc_hours"`
	// MeanSigmaArcsec is the mean over the used observations of the mean of
	// their two per-coordinate 1-σ uncertainties, in arcseconds.
	MeanSigmaArcsec float64 `json:"mean_sigma_arcsec"`
	// Nights are the groups of used observations taken on one night at one
	// site, in time order of their first observation.
	Nights []Night `json:"nights"`
	// Warnings are what the summary found doubtful, in a fixed order: few
	// observations, a single night, duplicates, nights without detectable
	// motion, a whole set without motion ([Set.CheckMotion]), sites without a
	// known longitude.
	Warnings []Note `json:"warnings"`
	// ReaderWarnings are the reader's own warnings, "file:line:col: warning: …".
	ReaderWarnings []string `json:"reader_warnings"`
}

// SiteUse is one site named by the observations and how often.
type SiteUse struct {
	// Name is the site's name as the observations give it; "" for
	// observations without a site (geocentric).
	Name string `json:"name"`
	// Count is the number of used observations from the site.
	Count int `json:"count"`
	// Known reports whether the site's position is known (from the sites
	// given or the file itself); LatDeg, LonDeg (east positive) and HeightM
	// are its geodetic WGS84 position when Known, zero otherwise.
	Known   bool    `json:"known"`
	LatDeg  float64 `json:"lat_deg"`
	LonDeg  float64 `json:"lon_deg"`
	HeightM float64 `json:"height_m"`
}

// Night is one night's observations from one site and the motion they show.
type Night struct {
	// Date is the local date of the evening the night begins on, YYYY-MM-DD.
	// A night runs from local noon to the next local noon, in the site's
	// local mean solar time (UTC + east longitude/15° hours); for a site of
	// unknown longitude, from noon to noon UTC, and LocalTime is false.
	Date      string `json:"date"`
	Site      string `json:"site"`
	LocalTime bool   `json:"local_mean_time"`
	// Count is the number of used observations in the night.
	Count int `json:"count"`
	// First and Last are the UTC times of the night's first and last
	// observation, FirstUTC and LastUTC the same in ISO 8601 to 0.01 s;
	// SpanMin is Last − First in minutes.
	First    astro.JD `json:"-"`
	Last     astro.JD `json:"-"`
	FirstUTC string   `json:"first_utc"`
	LastUTC  string   `json:"last_utc"`
	SpanMin  float64  `json:"span_min"`
	// HasRate reports whether a rate could be measured (at least two
	// observations at different times). When it is false the rate fields are
	// NaN in Go and null in JSON.
	HasRate bool `json:"has_rate"`
	// RateArcsecPerMin is the rate of motion on the sky in arcseconds per
	// minute of time, from a weighted straight-line fit of the tangent-plane
	// coordinates against time; RateSigmaArcsecPerMin its formal 1-σ
	// uncertainty from the stated σ of the observations.
	RateArcsecPerMin      float64 `json:"rate_arcsec_per_min"`
	RateSigmaArcsecPerMin float64 `json:"rate_sigma_arcsec_per_min"`
	// PADeg is the position angle of the motion, degrees from north through
	// east, in [0, 360).
	PADeg float64 `json:"pa_deg"`
	// TravelledArcsec is the arc travelled over the night, the fitted rate
	// times SpanMin, in arcseconds.
	TravelledArcsec float64 `json:"travelled_arcsec"`
	// Moving reports whether the motion is detected above the noise: the
	// fitted rate differs from zero by more than the 3-σ equivalent of a
	// two-dimensional χ² (χ² > 11.83, probability 0.27 % for no motion).
	Moving bool `json:"moving"`
}

// Note is one warning of a [Summary]: a short code that does not change
// between versions, for programs, and a sentence for people.
type Note struct {
	// Code is one of "few-observations", "single-night", "duplicate",
	// "no-motion", "no-motion-arc", "night-utc".
	Code string `json:"code"`
	// Line is the line in the file the note is about, 0 when it concerns the
	// whole set.
	Line int `json:"line,omitempty"`
	// Msg is the warning in words.
	Msg string `json:"message"`
}

// chi2Moving is the χ² threshold with two degrees of freedom at the 3-σ
// equivalent probability 0.9973: for two degrees of freedom the χ² survival
// function is exp(−x/2), so x = −2 ln(0.0027) = 11.83 (exact algebra, not a
// table).
const chi2Moving = 11.83

// Summarize returns the summary of set. The sites are those of a sites file
// (nil for none); the set's own Sites are used too, and win for a name both
// give. Only used observations count towards nights, arc, σ and rates.
//
// Nights: an observation at UTC Julian date t from a site of east longitude λ
// belongs to the night numbered floor(t + λ/2π), the Julian day number of the
// local mean noon that begins it, written as the calendar date of that noon.
// Rates: for each night with at least two observations at different times,
// the observations are projected on the tangent plane at the night's first
// observation (astro.TangentPlane) and ξ, η are fitted as straight lines in
// time, each weighted by 1/σ² of its coordinate:
//
//	b = Σ w (t − t̄) x / Σ w (t − t̄)²,   σ_b = 1 / √(Σ w (t − t̄)²),   t̄ = Σ w t / Σ w
//
// the rate is √(b_ξ² + b_η²) and its position angle atan2(b_ξ, b_η), north
// through east. The straight line ignores the curvature of the path within a
// night, a few milliarcseconds per hour for a main-belt asteroid.
//
// Reference: the weighted straight-line fit, Bevington & Robinson, Data
// Reduction and Error Analysis for the Physical Sciences, 3rd ed. (2003),
// ch. 6, eqs. 6.12 and 6.21 (written here about the weighted mean time, which
// makes the slope and intercept uncorrelated).
func Summarize(set *Set, sites map[string]astro.Site) Summary {
	s := Summary{File: set.File, Format: set.Format, Count: len(set.Obs)}
	known := make(map[string]astro.Site, len(sites)+len(set.Sites))
	for k, v := range sites {
		known[k] = v
	}
	for k, v := range set.Sites {
		known[k] = v
	}

	var used []Observation
	siteIndex := map[string]int{}
	var sigmaSum float64
	for _, o := range set.Obs {
		if !o.Used {
			s.Warnings = append(s.Warnings, Note{Code: "duplicate", Line: o.Line,
				Msg: fmt.Sprintf("line %d repeats an earlier row exactly; it is counted once", o.Line)})
			continue
		}
		used = append(used, o)
		sigmaSum += (o.SigmaRA + o.SigmaDec).Arcseconds() / 2
		i, ok := siteIndex[o.Site]
		if !ok {
			i = len(s.Sites)
			siteIndex[o.Site] = i
			u := SiteUse{Name: o.Site}
			if st, ok := known[o.Site]; ok {
				u.Known = true
				u.LatDeg, u.LonDeg, u.HeightM = st.Lat.Degrees(), st.Lon.Degrees(), st.HeightM
			}
			s.Sites = append(s.Sites, u)
		}
		s.Sites[i].Count++
	}
	s.Used = len(used)
	for _, w := range set.Warnings {
		s.ReaderWarnings = append(s.ReaderWarnings, w.String())
	}
	// The duplicate notes go after the set-wide ones; collect them aside.
	dups := s.Warnings
	s.Warnings = nil

	if len(used) > 0 {
		s.First, s.Last = used[0].Time, used[len(used)-1].Time
		for _, o := range used { // sorted by the reader; do not rely on it
			if o.Time.Before(s.First) {
				s.First = o.Time
			}
			if s.Last.Before(o.Time) {
				s.Last = o.Time
			}
		}
		s.FirstUTC, s.LastUTC = astro.FormatISO8601(s.First, 2), astro.FormatISO8601(s.Last, 2)
		s.ArcDays = s.Last.Sub(s.First)
		s.ArcHours = s.ArcDays * 24
		s.MeanSigmaArcsec = sigmaSum / float64(len(used))
	}

	s.Nights = groupNights(used, known)
	dates := map[string]bool{}
	for _, n := range s.Nights {
		dates[n.Date] = true
	}
	s.NightCount = len(dates)

	if len(used) < 3 {
		s.Warnings = append(s.Warnings, Note{Code: "few-observations",
			Msg: fmt.Sprintf("only %d observation(s) in use: no orbit can be determined from fewer than three", len(used))})
	}
	if s.NightCount == 1 {
		s.Warnings = append(s.Warnings, Note{Code: "single-night",
			Msg: "all observations are from one night: an orbit from them is poorly constrained and its predictions drift fast"})
	}
	s.Warnings = append(s.Warnings, dups...)
	for _, n := range s.Nights {
		if n.HasRate && !n.Moving {
			s.Warnings = append(s.Warnings, Note{Code: "no-motion",
				Msg: fmt.Sprintf("night of %s at %s: no motion detected above the noise (%d observations over %.1f min)",
					n.Date, siteLabel(n.Site), n.Count, n.SpanMin)})
		}
	}
	if len(used) >= 2 && set.CheckMotion() != nil {
		s.Warnings = append(s.Warnings, Note{Code: "no-motion-arc",
			Msg: "no two positions of the whole set differ by more than the noise: a track without motion cannot be fitted"})
	}
	for _, u := range s.Sites {
		switch {
		case u.Known:
		case u.Name == "":
			s.Warnings = append(s.Warnings, Note{Code: "night-utc",
				Msg: "observations without a site: their nights are counted from noon to noon UTC"})
		default:
			s.Warnings = append(s.Warnings, Note{Code: "night-utc",
				Msg: fmt.Sprintf("site %s has no known position: its nights are counted from noon to noon UTC", siteLabel(u.Name))})
		}
	}
	return s
}

// siteLabel names a site in a sentence.
func siteLabel(name string) string {
	if name == "" {
		return "(none)"
	}
	return fmt.Sprintf("%q", name)
}

// nightNumber returns the Julian day number of the local mean noon that begins
// the night of the UTC instant t at east longitude lon: floor(t + lon/2π).
func nightNumber(t astro.JD, lon astro.Angle) float64 {
	return math.Floor(t.Day + (t.Frac + float64(lon)/(2*math.Pi)))
}

// dateOfNoon returns the calendar date (proleptic Gregorian, YYYY-MM-DD) whose
// noon has the Julian day number n. JD 2440588 is 1970-01-01 12h (Meeus,
// Astronomical Algorithms, 2nd ed., ch. 7: JD 2440587.5 is 1970 Jan 1.0).
func dateOfNoon(n float64) string {
	days := int64(n) - 2440588
	return time.Unix(days*86400, 0).UTC().Format("2006-01-02")
}

type nightKey struct {
	site string
	num  float64
}

// groupNights groups the used observations by site and night and measures
// each night's motion.
func groupNights(used []Observation, known map[string]astro.Site) []Night {
	groups := map[nightKey][]Observation{}
	var order []nightKey
	for _, o := range used {
		st, ok := known[o.Site]
		lon := astro.Angle(0)
		if ok {
			lon = st.Lon
		}
		k := nightKey{o.Site, nightNumber(o.Time, lon)}
		if _, seen := groups[k]; !seen {
			order = append(order, k)
		}
		groups[k] = append(groups[k], o)
	}
	nights := make([]Night, 0, len(order))
	for _, k := range order {
		g := groups[k]
		_, ok := known[k.site]
		n := Night{Date: dateOfNoon(k.num), Site: k.site, LocalTime: ok, Count: len(g)}
		n.First, n.Last = g[0].Time, g[0].Time
		for _, o := range g {
			if o.Time.Before(n.First) {
				n.First = o.Time
			}
			if n.Last.Before(o.Time) {
				n.Last = o.Time
			}
		}
		n.FirstUTC, n.LastUTC = astro.FormatISO8601(n.First, 2), astro.FormatISO8601(n.Last, 2)
		n.SpanMin = n.Last.Sub(n.First) * 24 * 60
		nightRate(&n, g)
		nights = append(nights, n)
	}
	sort.SliceStable(nights, func(i, j int) bool { return nights[i].First.Before(nights[j].First) })
	return nights
}

// nightRate fits the night's motion (see [Summarize]) into n.
func nightRate(n *Night, g []Observation) {
	n.RateArcsecPerMin, n.RateSigmaArcsecPerMin = math.NaN(), math.NaN()
	n.PADeg, n.TravelledArcsec = math.NaN(), math.NaN()
	if len(g) < 2 || n.SpanMin == 0 {
		return
	}
	tp := astro.TangentPlane{RA0: g[0].RA, Dec0: g[0].Dec}
	xi := make([]float64, len(g))
	eta := make([]float64, len(g))
	tMin := make([]float64, len(g))
	for i, o := range g {
		x, e, err := tp.Project(o.RA, o.Dec)
		if err != nil { // more than 90° in one night: no straight line to fit
			return
		}
		xi[i], eta[i] = x, e
		tMin[i] = o.Time.Sub(n.First) * 24 * 60
	}
	bx, sx, okx := slope(tMin, xi, g, func(o Observation) float64 { return float64(o.SigmaRA) })
	be, se, oke := slope(tMin, eta, g, func(o Observation) float64 { return float64(o.SigmaDec) })
	if !okx || !oke {
		return
	}
	rate := math.Hypot(bx, be)
	n.HasRate = true
	n.RateArcsecPerMin = astro.Angle(rate).Arcseconds()
	if rate > 0 {
		n.RateSigmaArcsecPerMin = astro.Angle(math.Sqrt(bx*bx*sx*sx+be*be*se*se) / rate).Arcseconds()
	} else {
		n.RateSigmaArcsecPerMin = astro.Angle(math.Hypot(sx, se) / math.Sqrt2).Arcseconds()
	}
	n.PADeg = astro.Angle(math.Atan2(bx, be)).Normalized().Degrees()
	n.TravelledArcsec = n.RateArcsecPerMin * n.SpanMin
	n.Moving = (bx/sx)*(bx/sx)+(be/se)*(be/se) > chi2Moving
}

// slope returns the weighted least-squares slope of y against t and its
// formal 1-σ uncertainty, weights 1/σ² with σ from sigma; ok is false when
// the times do not spread or a σ is not positive.
func slope(t, y []float64, g []Observation, sigma func(Observation) float64) (b, sb float64, ok bool) {
	var sw, swt float64
	for i, o := range g {
		s := sigma(o)
		if !(s > 0) {
			return 0, 0, false
		}
		w := 1 / (s * s)
		sw += w
		swt += w * t[i]
	}
	tbar := swt / sw
	var stt, sty float64
	for i, o := range g {
		s := sigma(o)
		w := 1 / (s * s)
		d := t[i] - tbar
		stt += w * d * d
		sty += w * d * y[i]
	}
	if !(stt > 0) {
		return 0, 0, false
	}
	return sty / stt, 1 / math.Sqrt(stt), true
}

// MarshalJSON writes the night with its NaN rate fields as null.
func (n Night) MarshalJSON() ([]byte, error) {
	type plain Night // no methods: no recursion
	opt := func(v float64) *float64 {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil
		}
		return &v
	}
	return json.Marshal(struct {
		plain
		RateArcsecPerMin      *float64 `json:"rate_arcsec_per_min"`
		RateSigmaArcsecPerMin *float64 `json:"rate_sigma_arcsec_per_min"`
		PADeg                 *float64 `json:"pa_deg"`
		TravelledArcsec       *float64 `json:"travelled_arcsec"`
	}{plain(n), opt(n.RateArcsecPerMin), opt(n.RateSigmaArcsecPerMin), opt(n.PADeg), opt(n.TravelledArcsec)})
}
