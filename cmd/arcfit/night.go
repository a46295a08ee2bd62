package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"
	_ "time/tzdata" // the IANA zone database for --tz, whatever the machine has

	"github.com/spf13/pflag"

	"arcfit/astro"
	"arcfit/cmd/arcfit/chart"
	"arcfit/ephem"
	"arcfit/fit/plan"
)

// nightOptions are the options of the night command.
type nightOptions struct {
	modelOptions        // file: the OBS|FIT argument (the target); sites, site and the fit flags
	date         string // --date YYYY-MM-DD: the evening's civil date
	tz           string // --tz: IANA zone name; "" = the site's local mean time
	json, csv    bool
	elementsFile string  // --elements: a published element set as the target
	name         string  // --name: the element set in --elements
	minAltDeg    float64 // --min-alt
	step         string  // --step: the rows' interval
	fovArcmin    float64 // --fov
	sigma        float64 // --sigma
	allowNearSun bool    // --allow-near-sun
	nextNights   int     // --next-nights
	chart        string  // --chart: the chart file to write, .png or .svg
	changed      map[string]bool
}

// maxNextNights is the most later nights --next-nights lists.
const maxNextNights = 10

// nightTargetFlags are the flags that act on a target only.
var nightTargetFlags = []string{"min-alt", "step", "fov", "sigma", "allow-near-sun", "next-nights", "name",
	"model", "keep-all", "distance", "no-parallax", "format", "obs-sigma"}

func nightCommand() *command {
	return &command{
		name:    "night",
		summary: "the night at a site, and where to point at a target: window, best time, table",
		usage: "arcfit night [OBS|FIT|--elements FILE [--name NAME]] --date DATE --site SITE [--sites FILE] [--tz ZONE]\n" +
			"             [--min-alt DEG] [--step DUR] [--fov ARCMIN] [--sigma N] [--allow-near-sun] [--next-nights N] [--chart FILE] [--json | --csv]",
		about: "Tells what the sky does on the night that begins on the evening of DATE at the site, from local noon " +
			"to the next local noon: sunset and sunrise (the Sun's upper limb on the horizon, standard refraction), " +
			"the civil, nautical and astronomical dusk and dawn (the Sun's centre at −6°, −12° and −18°), the dark " +
			"window (the Sun below −18°), the Moon's rises and sets, and its phase and illuminated fraction at local " +
			"midnight. Given a target — an observation file (fitted as fit does), a fit file saved by fit --save, or " +
			"an element set with --elements — it first says in plain words when to observe it: the window in which " +
			"it stands above --min-alt during astronomical darkness (in two parts when it dips below the limit in " +
			"the night), its best time (highest altitude), where to point (ICRS astrometric and of-date RA/Dec), how " +
			"large a region to search (the --sigma ellipse, in arcminutes and in fields of --fov), at which position " +
			"angle, how fast it moves (arcseconds a minute, for the exposure time), its predicted magnitude and the " +
			"Moon's distance and phase; then a table every --step through the dark window (rows on multiples of the " +
			"step from local midnight) with local time and UTC, RA/Dec, altitude and azimuth (refracted, 10 °C, " +
			"1010 hPa), airmass, search region, rate and Moon separation. When the target cannot be observed that " +
			"night it says why (within 15° of the Sun, no astronomical darkness at that latitude and date, below the " +
			"limit throughout the dark window, the prediction failing) and lists the next nights when it can " +
			"(--next-nights, three by default), searching up to 60 nights ahead. A target within 15° of the Sun gets a caution on standard error " +
			"and no pointing table unless --allow-near-sun: pointing a telescope near the Sun can blind and destroy " +
			"equipment. It says so when the prediction lies beyond the fit's validity horizon and when the search " +
			"region is wider than the field. Times are given in UTC and in local time: the IANA zone of --tz (such as " +
			"Europe/Paris), or by default the site's local mean solar time. Times are good to about a minute; the " +
			"real refraction moves rise and set, and a target's crossing of a low limit, by more at high latitude. " +
			"--chart FILE writes a chart, PNG or SVG as the file's extension says: with a target, one image of two " +
			"panels, the search region on the sky at the best time (north up, east left; the 1-, 2- and 3-sigma " +
			"ellipses, the sampled orbits when there are any, the --fov field, the track through the night, a scale " +
			"bar) and the altitudes through the night (the target, the Moon, the --min-alt limit and the window, " +
			"over the twilights shaded); without a target, the Moon's altitude over the twilights.",
		example: "arcfit night --date 2027-02-20 --site 44.52,-72.80,410 --tz America/New_York\n" +
			`arcfit night --date 2027-06-21 --site "Alder Ridge" --sites sites.csv --json` + "\n" +
			`arcfit night demo-fit.json --date 2027-02-09 --site "Alder Ridge" --sites sites.csv --fov 20` + "\n" +
			`arcfit night --elements elements.csv --name "Demo-1 (invented)" --date 2027-03-01 --site 44.52,-72.80,410 --min-alt 30 --step 1h` + "\n" +
			`arcfit night demo-fit.json --date 2027-02-09 --site "Alder Ridge" --sites sites.csv --chart tonight.png`,
		flags: func() *pflag.FlagSet { return nightFlags(&nightOptions{}, io.Discard) },
		run: func(args []string, io streams) error {
			var o nightOptions
			fs := nightFlags(&o, io.Err)
			if err := parseFlags(fs, args); err != nil {
				return err
			}
			o.distanceSet = fs.Changed("distance")
			o.changed = map[string]bool{}
			fs.Visit(func(f *pflag.Flag) { o.changed[f.Name] = true })
			switch fs.NArg() {
			case 0:
			case 1:
				if o.elementsFile != "" {
					return usagef("give an observation or fit file, or --elements, not both (got %s and --elements %s)", fs.Arg(0), o.elementsFile)
				}
				o.file = fs.Arg(0)
			default:
				return usagef("one target file at a time, got %d: %s", fs.NArg(), strings.Join(fs.Args(), " "))
			}
			return runNight(o, io)
		},
	}
}

// nightFlags binds the night flags to o.
func nightFlags(o *nightOptions, stderr io.Writer) *pflag.FlagSet {
	fs := newFlagSet("night", stderr)
	fs.StringVar(&o.date, "date", "", "civil `date` of the evening, YYYY-MM-DD, in local time")
	fs.StringVar(&o.site, "site", "", "observing `site`: a name in --sites (or the fit file), or lat_deg,lon_deg,height_m")
	fs.StringVar(&o.tz, "tz", "", "local time `zone`, an IANA name such as America/Denver (default: the site's local mean time)")
	fs.StringVar(&o.elementsFile, "elements", "", "orbital-elements CSV `file` of the target, instead of observations")
	fs.StringVar(&o.name, "name", "", "`name` of the element set in --elements (not needed when it holds one)")
	fs.Float64Var(&o.minAltDeg, "min-alt", plan.DefaultMinAlt.Degrees(), "lowest altitude in `degrees` at which the target counts as observable")
	fs.StringVar(&o.step, "step", "30m", "`interval` of the table's rows: 30m, 1h, 15m")
	fs.Float64Var(&o.fovArcmin, "fov", plan.DefaultFOVArcmin, "field of view in `arcmin`, to give the search region in fields")
	fs.Float64Var(&o.sigma, "sigma", plan.DefaultSigma, "`level` of the search ellipse, in standard deviations")
	fs.BoolVar(&o.allowNearSun, "allow-near-sun", false, "give the pointing table even for a target within 15° of the Sun (dangerous)")
	fs.IntVar(&o.nextNights, "next-nights", plan.DefaultNextNights, "when the target is not observable, list up to `N` later nights when it is (0: none), searching up to 60 nights ahead")
	fs.StringVar(&o.chart, "chart", "", "also write a chart to this `file`, .png or .svg: the search region and the altitudes through the night")
	modelFlags(fs, &o.modelOptions)
	fs.BoolVar(&o.json, "json", false, "print one JSON object: the target's plan (with a target) and the night's events")
	fs.BoolVar(&o.csv, "csv", false, "print CSV: the target's rows with a target, else the events (event, time_utc, time_local)")
	return fs
}

// parseNightDate reads --date.
func parseNightDate(s string) (plan.Date, error) {
	if s == "" {
		return plan.Date{}, usagef("no --date given: the date of the evening, such as 2027-02-20")
	}
	d, err := time.Parse("2006-01-02", strings.TrimSpace(s))
	if err != nil {
		return plan.Date{}, usagef("--date %q: want the evening's date as YYYY-MM-DD, such as 2027-02-20", s)
	}
	if y := d.Year(); y < 1800 || y > 2200 {
		return plan.Date{}, usagef("--date %q: outside the span of the ephemerides, 1800 to 2200", s)
	}
	return plan.Date{Year: d.Year(), Month: d.Month(), Day: d.Day()}, nil
}

// nightLocation returns the local time of --tz, or the site's mean solar
// time rounded to the minute.
func nightLocation(tzFlag string, site *astro.Site) (*time.Location, error) {
	tz := strings.TrimSpace(tzFlag)
	if tz == "" {
		return meanTimeToMinute(site.Lon), nil
	}
	if tz == "Local" {
		return nil, usagef("--tz Local: name the zone, such as Europe/Paris (Local depends on the machine)")
	}
	loc, err := time.LoadLocation(tz)
	if err != nil {
		return nil, usagef("--tz %q: not a time zone name; want an IANA name such as Europe/Paris, America/Denver or UTC", tzFlag)
	}
	return loc, nil
}

// nightError turns an error of the night's computation into an input error
// when the date or site is at fault.
func nightError(err error) error {
	if errors.Is(err, astro.ErrRange) || errors.Is(err, astro.ErrUnsupportedDate) {
		return inputError(err)
	}
	return err
}

// runNight computes the night's sky, and the target's plan when one is
// given, and prints them.
func runNight(o nightOptions, io streams) error {
	if o.json && o.csv {
		return usagef("--json and --csv exclude each other")
	}
	if err := checkChartFile("chart", o.chart); err != nil {
		return err
	}
	if o.file != "" || o.elementsFile != "" {
		return runNightTarget(o, io)
	}
	for _, f := range nightTargetFlags {
		if o.changed[f] {
			if f == "name" {
				return usagef("--name %q needs --elements FILE", o.name)
			}
			return usagef("--%s acts on a target: give an observation or fit file, or --elements FILE", f)
		}
	}
	d, err := parseNightDate(o.date)
	if err != nil {
		return err
	}
	if o.site == "" {
		return usagef("no --site given: the night's sky needs a site, a name in --sites or lat_deg,lon_deg,height_m")
	}
	site, err := siteFromFlags(o.site, o.sitesFile)
	if err != nil {
		return err
	}
	loc, err := nightLocation(o.tz, site)
	if err != nil {
		return err
	}
	n, err := ephem.NightAt(d.Year, int(d.Month), d.Day, *site, loc)
	var warn string
	if err != nil {
		if !errors.Is(err, astro.ErrStaleTable) {
			return nightError(err)
		}
		warn = oneLine(err.Error())
	}
	v := newNightView(n, o.tz == "", warn)

	var buf bytes.Buffer // whole output first: nothing half-written on error
	switch {
	case o.json:
		err = v.writeJSON(&buf)
	case o.csv:
		err = v.writeCSV(&buf)
	default:
		err = v.writeText(&buf)
	}
	if err != nil {
		return err
	}
	if o.chart != "" {
		curves, err := chart.SampleNight(nil, n, 0)
		if err != nil {
			return err
		}
		fg, err := chart.NightSkyFigure(n, curves)
		if err != nil {
			return err
		}
		if err := saveChart("night", o.chart, fg, io); err != nil {
			return err
		}
	}
	if warn != "" {
		fmt.Fprintf(io.Err, "arcfit night: warning: %s\n", warn)
	}
	_, err = io.Out.Write(buf.Bytes())
	return err
}

// checkChartFile checks the file name of a chart flag (--name) before any
// work is done: "" (no chart) or a name ending in .png or .svg.
func checkChartFile(name, path string) error {
	if path == "" {
		return nil
	}
	if _, err := chart.FormatOf(path); err != nil {
		return usagef("--%s %q: want a file name ending in .png or .svg", name, path)
	}
	return nil
}

// saveChart writes the chart to path (whole or not at all) and says on
// stderr that command wrote it; a file that cannot be written is an input
// error.
func saveChart(command, path string, fg *chart.Figure, io streams) error {
	if err := chart.Save(path, fg); err != nil {
		return inputError(err)
	}
	fmt.Fprintf(io.Err, "arcfit %s: wrote %s\n", command, path)
	return nil
}

// meanTimeToMinute returns the site's local mean solar time
// ([ephem.LocalMeanTime]) with its offset rounded to the whole minute, so
// that local times print as ISO 8601 with an exact ±hh:mm offset; it differs
// from the true mean time by less than 30 s.
func meanTimeToMinute(lon astro.Angle) *time.Location {
	lmt := ephem.LocalMeanTime(lon)
	name, off := time.Date(2000, 1, 1, 0, 0, 0, 0, lmt).Zone()
	return time.FixedZone(name, int(math.Round(float64(off)/60))*60)
}

// nightEvent is one event of the night as printed.
type nightEvent struct {
	key, label string // JSON key stem ("astro_dusk") and text label
	t          astro.JD
}

// nightView is a night's sky ready to print.
type nightView struct {
	n         ephem.NightSky
	meanTime  bool // local time is the site's mean solar time
	warning   string
	sunEvents []nightEvent // sunset … sunrise, in the night's order
	moon      []nightEvent // moonrises and moonsets, in time order
}

func newNightView(n ephem.NightSky, meanTime bool, warn string) nightView {
	v := nightView{n: n, meanTime: meanTime, warning: warn}
	v.sunEvents = []nightEvent{
		{"sunset", "sunset", n.Sunset},
		{"civil_dusk", "civil dusk (Sun −6°)", n.CivilDusk},
		{"nautical_dusk", "nautical dusk (Sun −12°)", n.NauticalDusk},
		{"astro_dusk", "astronomical dusk (Sun −18°)", n.AstroDusk},
		{"dark_start", "dark window starts", n.DarkStart},
		{"dark_end", "dark window ends", n.DarkEnd},
		{"astro_dawn", "astronomical dawn (Sun −18°)", n.AstroDawn},
		{"nautical_dawn", "nautical dawn (Sun −12°)", n.NauticalDawn},
		{"civil_dawn", "civil dawn (Sun −6°)", n.CivilDawn},
		{"sunrise", "sunrise", n.Sunrise},
	}
	for _, t := range n.Moonrise {
		v.moon = append(v.moon, nightEvent{"moonrise", "moonrise", t})
	}
	for _, t := range n.Moonset {
		v.moon = append(v.moon, nightEvent{"moonset", "moonset", t})
	}
	for i := 1; i < len(v.moon); i++ { // insertion sort: at most a few events
		for j := i; j > 0 && v.moon[j].t.Before(v.moon[j-1].t); j-- {
			v.moon[j], v.moon[j-1] = v.moon[j-1], v.moon[j]
		}
	}
	return v
}

// zoneName names the local time of the night.
func (v nightView) zoneName() string {
	if v.meanTime {
		return v.n.Location.String() + " (the site's local mean solar time)"
	}
	return v.n.Location.String()
}

// utcText and localText format an instant for the JSON: ISO 8601 to the
// second, UTC with Z, local time with its offset; nil for an event that does
// not happen.
func utcText(t astro.JD) *string {
	if !ephem.Happens(t) {
		return nil
	}
	s := astro.FormatISO8601(t, 0)
	return &s
}

func (v nightView) localText(t astro.JD) *string {
	if !ephem.Happens(t) {
		return nil
	}
	s := v.n.Local(t).Round(time.Second).Format("2006-01-02T15:04:05-07:00")
	return &s
}

// minuteUTC and minuteLocal format an instant for people, to the minute.
func minuteUTC(t astro.JD) string {
	j := t.AddSeconds(30)
	s := astro.FormatISO8601(j, 0)
	return s[:10] + " " + s[11:16]
}

func (v nightView) minuteLocal(t astro.JD) string {
	layout := "2006-01-02 15:04 MST"
	if v.meanTime {
		layout = "2006-01-02 15:04" // the zone is in the column header
	}
	return v.n.Local(t).Round(time.Minute).Format(layout)
}

// sunNote says why events are missing.
func (v nightView) sunNote() string {
	n := v.n
	switch {
	case n.PolarDay:
		return fmt.Sprintf("The Sun does not set this night (polar day): its lowest altitude is %.1f°; no twilight and no dark window.", n.SunMinAlt.Degrees())
	case n.PolarNight:
		s := fmt.Sprintf("The Sun does not rise this night (polar night): its highest altitude is %.1f°.", n.SunMaxAlt.Degrees())
		if n.DarkReason != "" {
			s += " " + capitalize(n.DarkReason) + "."
		}
		return s
	case n.DarkReason != "":
		return capitalize(n.DarkReason) + "."
	}
	return ""
}

func capitalize(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}

func (v nightView) writeText(w io.Writer) error {
	n := v.n
	p := func(format string, a ...any) { fmt.Fprintf(w, format, a...) }
	p("The night of %04d-%02d-%02d at %s\n", n.Year, n.Month, n.Day, siteLine(&n.Site))
	p("local time: %s; from local noon to local noon\n", v.zoneName())
	if note := v.sunNote(); note != "" {
		p("%s\n", note)
	}
	p("\n")
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	local := "local"
	if v.meanTime {
		local = "local (" + n.Location.String() + ")"
	}
	fmt.Fprintf(tw, "  event\tUTC\t%s\n", local)
	row := func(label string, t astro.JD) {
		if ephem.Happens(t) {
			fmt.Fprintf(tw, "  %s\t%s\t%s\n", label, minuteUTC(t), v.minuteLocal(t))
		} else {
			fmt.Fprintf(tw, "  %s\t-\t-\n", label)
		}
	}
	moon := v.moon
	for _, e := range v.sunEvents {
		if e.key == "dark_start" || e.key == "dark_end" {
			continue // on the dark-window line below
		}
		for ephem.Happens(e.t) && len(moon) > 0 && moon[0].t.Before(e.t) {
			row(moon[0].label, moon[0].t)
			moon = moon[1:]
		}
		row(e.label, e.t)
	}
	for _, e := range moon {
		row(e.label, e.t)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	p("\n")
	if h := n.DarkHours(); h > 0 {
		p("dark window: %.1f h, %s to %s UTC (%s to %s local)\n", h, minuteUTC(n.DarkStart), minuteUTC(n.DarkEnd),
			v.minuteLocal(n.DarkStart), v.minuteLocal(n.DarkEnd))
	} else {
		p("dark window: none\n")
	}
	if len(v.moon) == 0 {
		p("Moon: no rise or set this night (%s the horizon)\n", n.Moon.String())
	}
	p("Moon at local midnight: %.0f%% illuminated, %s\n", n.MoonIllumination*100, n.MoonPhaseName)
	return nil
}

// nightJSON is the object night --json prints.
type nightJSON struct {
	Date          string   `json:"date"`
	Site          string   `json:"site"`
	SiteLatDeg    float64  `json:"site_lat_deg"`
	SiteLonDeg    float64  `json:"site_lon_deg"`
	SiteHeightM   float64  `json:"site_height_m"`
	TimeZone      string   `json:"time_zone"`
	LocalMeanTime bool     `json:"local_mean_time"`
	StartUTC      *string  `json:"start_utc"`
	EndUTC        *string  `json:"end_utc"`
	PolarDay      bool     `json:"polar_day"`
	PolarNight    bool     `json:"polar_night"`
	SunMinAltDeg  float64  `json:"sun_min_alt_deg"`
	SunMaxAltDeg  float64  `json:"sun_max_alt_deg"`
	DarkHours     float64  `json:"dark_hours"`
	DarkReason    string   `json:"dark_reason"`
	MoonriseUTC   []string `json:"moonrise_utc"`
	MoonriseLocal []string `json:"moonrise_local"`
	MoonsetUTC    []string `json:"moonset_utc"`
	MoonsetLocal  []string `json:"moonset_local"`
	Moon          string   `json:"moon"`
	MoonTimeUTC   *string  `json:"moon_time_utc"`
	MoonIllum     float64  `json:"moon_illum"`
	MoonElongDeg  float64  `json:"moon_elong_deg"`
	MoonPhase     string   `json:"moon_phase"`
	Warnings      []string `json:"warnings"`
}

// writeJSON writes one object: the fixed fields of nightJSON and, for each
// Sun event, KEY_utc and KEY_local (null when it does not happen).
func (v nightView) writeJSON(w io.Writer) error {
	n := v.n
	obj := nightJSON{
		Date: fmt.Sprintf("%04d-%02d-%02d", n.Year, n.Month, n.Day), Site: n.Site.Name,
		SiteLatDeg: n.Site.Lat.Degrees(), SiteLonDeg: n.Site.Lon.Degrees(), SiteHeightM: n.Site.HeightM,
		TimeZone: n.Location.String(), LocalMeanTime: v.meanTime,
		StartUTC: utcText(n.Start), EndUTC: utcText(n.End),
		PolarDay: n.PolarDay, PolarNight: n.PolarNight,
		SunMinAltDeg: n.SunMinAlt.Degrees(), SunMaxAltDeg: n.SunMaxAlt.Degrees(),
		DarkHours: n.DarkHours(), DarkReason: n.DarkReason,
		MoonriseUTC: []string{}, MoonriseLocal: []string{}, MoonsetUTC: []string{}, MoonsetLocal: []string{},
		Moon: n.Moon.String(), MoonTimeUTC: utcText(n.MoonTime),
		MoonIllum: n.MoonIllumination, MoonElongDeg: n.MoonElongation.Degrees(), MoonPhase: n.MoonPhaseName,
		Warnings: []string{},
	}
	for _, t := range n.Moonrise {
		obj.MoonriseUTC = append(obj.MoonriseUTC, *utcText(t))
		obj.MoonriseLocal = append(obj.MoonriseLocal, *v.localText(t))
	}
	for _, t := range n.Moonset {
		obj.MoonsetUTC = append(obj.MoonsetUTC, *utcText(t))
		obj.MoonsetLocal = append(obj.MoonsetLocal, *v.localText(t))
	}
	if v.warning != "" {
		obj.Warnings = append(obj.Warnings, v.warning)
	}
	// The Sun's events go in as KEY_utc, KEY_local pairs, in the night's
	// order, after the fixed fields.
	fixed, err := json.Marshal(obj)
	if err != nil {
		return err
	}
	var b bytes.Buffer
	b.Write(fixed[:len(fixed)-1])
	for _, e := range v.sunEvents {
		for _, kv := range []struct {
			k string
			v *string
		}{{e.key + "_utc", utcText(e.t)}, {e.key + "_local", v.localText(e.t)}} {
			val, err := json.Marshal(kv.v)
			if err != nil {
				return err
			}
			fmt.Fprintf(&b, ",%q:%s", kv.k, val)
		}
	}
	b.WriteByte('}')
	var out bytes.Buffer
	if err := json.Indent(&out, b.Bytes(), "", "  "); err != nil {
		return err
	}
	out.WriteByte('\n')
	_, err = w.Write(out.Bytes())
	return err
}

// writeCSV writes the events that happen, in time order: event, time_utc,
// time_local.
func (v nightView) writeCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	if err := cw.Write([]string{"event", "time_utc", "time_local"}); err != nil {
		return err
	}
	var all []nightEvent
	for _, e := range append(append([]nightEvent{}, v.sunEvents...), v.moon...) {
		if ephem.Happens(e.t) {
			all = append(all, e)
		}
	}
	for i := 1; i < len(all); i++ {
		for j := i; j > 0 && all[j].t.Before(all[j-1].t); j-- {
			all[j], all[j-1] = all[j-1], all[j]
		}
	}
	for _, e := range all {
		if err := cw.Write([]string{e.key, *utcText(e.t), *v.localText(e.t)}); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// planOptions checks the target flags and returns the plan options
// (without the location and the name).
func (o nightOptions) planOptions() (plan.Options, error) {
	po := plan.DefaultOptions()
	if !(o.minAltDeg >= 0 && o.minAltDeg <= plan.MaxMinAlt.Degrees()) {
		return po, usagef("--min-alt %v: want an altitude from 0 to %g degrees", o.minAltDeg, plan.MaxMinAlt.Degrees())
	}
	step, err := parseStep(o.step)
	if err != nil {
		return po, err
	}
	if step < plan.MinStep || step > plan.MaxStep {
		return po, usagef("--step %q: want a step from 1m to 24h", o.step)
	}
	if !(o.fovArcmin > 0) || math.IsInf(o.fovArcmin, 0) {
		return po, usagef("--fov %v: want a positive field of view in arcmin", o.fovArcmin)
	}
	if err := checkSigma(o.sigma); err != nil {
		return po, err
	}
	po.MinAlt, po.Step, po.FOVArcmin, po.Sigma = astro.AngleFromDegrees(o.minAltDeg), step, o.fovArcmin, o.sigma
	if o.nextNights < 0 || o.nextNights > maxNextNights {
		return po, usagef("--next-nights %d: want 0 to %d", o.nextNights, maxNextNights)
	}
	po.AllowNearSun, po.NextNights = o.allowNearSun, o.nextNights
	return po, nil
}

// runNightTarget makes and prints the plan for the target.
func runNightTarget(o nightOptions, io streams) error {
	if _, err := o.check(); err != nil {
		return err
	}
	if _, err := o.settings(); err != nil {
		return err
	}
	po, err := o.planOptions()
	if err != nil {
		return err
	}
	d, err := parseNightDate(o.date)
	if err != nil {
		return err
	}
	if o.site == "" {
		return usagef("no --site given: where to point needs a site, a name in --sites or lat_deg,lon_deg,height_m")
	}
	sites, err := readSites(o.sitesFile)
	if err != nil {
		return err
	}
	// The night's middle, to the day (0h UTC after the date): the horizon
	// the orbit models' auto rule looks at.
	mid := astro.CalendarToJD(d.Year, int(d.Month), float64(d.Day)+1, astro.Gregorian)
	src, err := predictSource(predictOptions{modelOptions: o.modelOptions, elementsFile: o.elementsFile, name: o.name, changed: o.changed,
		times: []astro.JD{{Day: mid, Scale: astro.UTC}}}, sites)
	if err != nil {
		return err
	}
	site := siteForPrediction(o.site, src.sites)
	if site == nil {
		return usagef("--site %q: not a site of --sites or the fit file", o.site)
	}
	if po.Location, err = nightLocation(o.tz, site); err != nil {
		return err
	}
	var target plan.Target = src.saved
	po.Name = filepath.Base(src.file)
	if src.elements != nil {
		target, po.Name = plan.ElementsTarget{Elements: *src.elements}, src.elements.Name
	}
	p, err := plan.Night(target, d, *site, po)
	if err != nil {
		return nightError(err)
	}
	v := newNightView(p.Sky, o.tz == "", strings.Join(p.Warnings, "; "))
	tv := targetView{nightView: v, p: p, src: src}

	var buf bytes.Buffer // whole output first: nothing half-written on error
	switch {
	case o.json:
		err = tv.writeJSON(&buf)
	case o.csv:
		err = tv.writeCSV(&buf)
	default:
		err = tv.writeText(&buf)
	}
	if err != nil {
		return err
	}
	if o.chart != "" {
		curves, err := chart.SampleNight(target, p.Sky, 0)
		if err != nil {
			return err
		}
		fg, err := chart.NightFigure(p, curves)
		if err != nil {
			return err
		}
		if err := saveChart("night", o.chart, fg, io); err != nil {
			return err
		}
	}
	for _, w := range src.warnings {
		fmt.Fprintf(io.Err, "arcfit night: warning: %s\n", oneLine(w))
	}
	for _, w := range p.Warnings {
		fmt.Fprintf(io.Err, "arcfit night: warning: %s\n", oneLine(w))
	}
	for _, c := range p.Cautions {
		fmt.Fprintf(io.Err, "arcfit night: %s\n", c)
	}
	if p.RowsWithheld {
		fmt.Fprintf(io.Err, "arcfit night: no pointing table for a target within %.0f° of the Sun; --allow-near-sun gives it, at your own risk\n", ephem.NearSunLimit.Degrees())
	}
	_, err = io.Out.Write(buf.Bytes())
	return err
}

// targetView is a target's night plan ready to print.
type targetView struct {
	nightView
	p   *plan.NightPlan
	src *predictInput
}

// hm formats an instant as local hours and minutes.
func (v targetView) hm(t astro.JD) string { return v.n.Local(t).Round(time.Minute).Format("15:04") }

// hmUTC formats an instant as UTC hours and minutes.
func hmUTC(t astro.JD) string { return minuteUTC(t)[11:] }

// span formats a window in local time and UTC.
func (v targetView) span(w plan.Window) string {
	return fmt.Sprintf("%s to %s local time (%s to %s UTC)", v.hm(w.Start), v.hm(w.End), hmUTC(w.Start), hmUTC(w.End))
}

// trailWords says how long the target takes to move 1″ at rate (″/min).
func trailWords(rate float64) string {
	if !(rate > 0) {
		return "no measurable motion"
	}
	s := 60 / rate
	switch {
	case s < 1:
		return fmt.Sprintf("1″ in %.2f s", s)
	case s < 120:
		return fmt.Sprintf("1″ in %.0f s", s)
	}
	return fmt.Sprintf("1″ in %.1f min", s/60)
}

func (v targetView) writeText(w io.Writer) error {
	p := v.p
	pf := func(format string, a ...any) { fmt.Fprintf(w, format, a...) }
	pf("%s on the night of %v at %s\n", p.Name, p.Date, siteLine(&p.Sky.Site))
	pf("%s\n", v.src.header)
	pf("local time: %s; limit %g° altitude; rows every %s\n\n", v.zoneName(), p.Options.MinAlt.Degrees(), fmtDuration(p.Options.Step))
	if p.Observable {
		b := p.Best
		pf("Observe it from %s, %.1f h.\n", v.span(p.Window), p.Window.Hours())
		if len(p.Windows) > 1 {
			var parts []string
			for _, x := range p.Windows {
				parts = append(parts, v.hm(x.Start)+"–"+v.hm(x.End))
			}
			pf("It dips below %g° in the night: the window is in %d parts, %s local time.\n", p.Options.MinAlt.Degrees(), len(p.Windows), strings.Join(parts, ", "))
		}
		pf("Best at %s local time (%s UTC), %.1f° high at azimuth %.0f°, airmass %.2f.\n", v.hm(b.UTC), hmUTC(b.UTC), b.Pointing.Alt.Degrees(), b.Pointing.Az.Degrees(), b.Airmass)
		pf("Point at RA %s, Dec %s (ICRS astrometric; of date RA %s, Dec %s).\n",
			astro.FormatHMS(b.Prediction.RA, 2), astro.FormatDMS(b.Prediction.Dec, 1), astro.FormatHMS(b.RAApp, 2), astro.FormatDMS(b.DecApp, 1))
		if e := b.Ellipse; e.SemiMajorArcsec > 0 {
			pf("Search the %g-σ ellipse %.1f′ × %.1f′ (full axes), long axis at PA %.0f°: %.2f of a %g′ field.\n",
				e.Sigma, b.RegionArcmin, 2*e.SemiMinorArcsec/60, e.PA.Degrees(), b.RegionFields, p.Options.FOVArcmin)
		} else {
			pf("No search region: the prediction states no uncertainty, so its region is a point; search at least the field around it.\n")
		}
		pf("It moves %.3g″ a minute toward PA %.0f° (%s): choose exposures short enough for the trail you accept.\n",
			b.Prediction.RateArcsecPerMin, b.Prediction.RatePA.Degrees(), trailWords(b.Prediction.RateArcsecPerMin))
		if m := b.Prediction.Mag; !math.IsNaN(m) && !math.IsInf(m, 0) {
			pf("Predicted magnitude %.1f (V).\n", m)
		} else {
			pf("Predicted magnitude: unknown.\n")
		}
		moonUp := "below the horizon"
		if b.MoonAlt > 0 {
			moonUp = fmt.Sprintf("%.0f° high", b.MoonAlt.Degrees())
		}
		pf("Moon at the best time: %.0f%% illuminated, %.0f° from the target, %s.\n", 100*b.MoonIllumination, b.MoonSeparation.Degrees(), moonUp)
		if b.Prediction.BeyondHorizon {
			pf("This is BEYOND the fit's validity horizon (%.2f d beyond the arc): do not trust this position.\n", b.Prediction.HorizonDays)
		}
	} else {
		pf("Not observable from %s on this night: %s.\n", p.Sky.Site.Name, p.Why)
		if p.RowsWithheld {
			pf("No pointing table: it is within %.0f° of the Sun (see the caution; --allow-near-sun gives the table).\n", ephem.NearSunLimit.Degrees())
		}
		switch {
		case p.Options.NextNights == 0:
		case len(p.NextNights) == 0:
			pf("It is not observable on any of the next %d nights either.\n", p.SearchedNights)
		default:
			pf("Next nights it can be observed (the first %d found, searching up to %d nights ahead):\n", len(p.NextNights), p.Options.SearchNights)
			for _, nn := range p.NextNights {
				pf("  %v  %s, best %s at %.1f°\n", nn.Date, v.span(nn.Window), v.hm(nn.Best), nn.BestAlt.Degrees())
			}
		}
	}
	if len(p.Rows) > 0 {
		pf("\n")
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "  local\tUTC\tRA\tDec\talt°\taz°\tairmass\tregion′\tPA°\t″/min\tmoon°\t")
		for _, r := range p.Rows {
			note := ""
			if !r.InWindow {
				note = fmt.Sprintf("below %g°", p.Options.MinAlt.Degrees())
			}
			if r.Prediction.BeyondHorizon {
				note = strings.TrimPrefix(note+", beyond horizon", ", ")
			}
			fmt.Fprintf(tw, "  %s\t%s\t%s\t%s\t%.1f\t%.0f\t%s\t%.1f\t%.0f\t%.3g\t%.0f\t%s\n", v.hm(r.UTC), hmUTC(r.UTC),
				astro.FormatHMS(r.Prediction.RA, 1), astro.FormatDMS(r.Prediction.Dec, 0), r.Pointing.Alt.Degrees(), r.Pointing.Az.Degrees(),
				airmassText(r.Airmass), r.RegionArcmin, r.Ellipse.PA.Degrees(), r.Prediction.RateArcsecPerMin, r.MoonSeparation.Degrees(), note)
		}
		if err := tw.Flush(); err != nil {
			return err
		}
	}
	if es := v.encounters(); len(es) > 0 {
		pf("\n")
		writeEncounters(w, "", es)
	}
	pf("\n")
	return v.nightView.writeText(w)
}

// encounters returns the close approaches of a perturbed orbit from its
// epoch through the arc to the night's best time (or its middle): nil for
// any other model.
func (v targetView) encounters() []encounterJSON {
	of := v.src.orbit()
	if of == nil {
		return nil
	}
	t := v.p.Sky.MoonTime
	if v.p.Best != nil {
		t = v.p.Best.UTC
	}
	return encounterRecords(of, []astro.JD{t})
}

// airmassText formats an airmass for the table ("-" below the horizon).
func airmassText(x float64) string {
	if math.IsInf(x, 0) || math.IsNaN(x) {
		return "-"
	}
	return strconv.FormatFloat(x, 'f', 2, 64)
}

// fmtDuration formats a step for people: 30m, 1h, 1h30m, 90s.
func fmtDuration(d time.Duration) string {
	var b strings.Builder
	if h := d / time.Hour; h > 0 {
		fmt.Fprintf(&b, "%dh", h)
	}
	if m := d % time.Hour / time.Minute; m > 0 {
		fmt.Fprintf(&b, "%dm", m)
	}
	if s := d % time.Minute; s > 0 || b.Len() == 0 {
		fmt.Fprintf(&b, "%gs", s.Seconds())
	}
	return b.String()
}

// nightRowJSON is one row of the target's table in night --json and --csv.
type nightRowJSON struct {
	TimeUTC          string   `json:"time_utc"`
	TimeLocal        string   `json:"time_local"`
	RADeg            float64  `json:"ra_deg"`
	DecDeg           float64  `json:"dec_deg"`
	RAAppDeg         float64  `json:"ra_app_deg"`
	DecAppDeg        float64  `json:"dec_app_deg"`
	AltDeg           float64  `json:"alt_deg"`
	AzDeg            float64  `json:"az_deg"`
	Airmass          *float64 `json:"airmass"`
	SemiMajorArcsec  float64  `json:"semi_major_arcsec"`
	SemiMinorArcsec  float64  `json:"semi_minor_arcsec"`
	PADeg            float64  `json:"pa_deg"`
	RegionArcmin     float64  `json:"region_arcmin"`
	RegionFields     float64  `json:"region_fields"`
	RateArcsecPerMin float64  `json:"rate_arcsec_per_min"`
	RatePADeg        float64  `json:"rate_pa_deg"`
	MoonSepDeg       float64  `json:"moon_sep_deg"`
	MoonAltDeg       float64  `json:"moon_alt_deg"`
	InWindow         bool     `json:"in_window"`
	NearSun          bool     `json:"near_sun"`
	BeyondHorizon    bool     `json:"beyond_horizon"`
}

func (v targetView) row(r plan.Point) nightRowJSON {
	return nightRowJSON{TimeUTC: *utcText(r.UTC), TimeLocal: *v.localText(r.UTC),
		RADeg: r.Prediction.RA.Degrees(), DecDeg: r.Prediction.Dec.Degrees(), RAAppDeg: r.RAApp.Degrees(), DecAppDeg: r.DecApp.Degrees(),
		AltDeg: r.Pointing.Alt.Degrees(), AzDeg: r.Pointing.Az.Degrees(), Airmass: finite(r.Airmass),
		SemiMajorArcsec: r.Ellipse.SemiMajorArcsec, SemiMinorArcsec: r.Ellipse.SemiMinorArcsec, PADeg: r.Ellipse.PA.Degrees(),
		RegionArcmin: r.RegionArcmin, RegionFields: r.RegionFields,
		RateArcsecPerMin: r.Prediction.RateArcsecPerMin, RatePADeg: r.Prediction.RatePA.Degrees(),
		MoonSepDeg: r.MoonSeparation.Degrees(), MoonAltDeg: r.MoonAlt.Degrees(),
		InWindow: r.InWindow, NearSun: r.Pointing.NearSun, BeyondHorizon: r.Prediction.BeyondHorizon}
}

// nightBestJSON is the best time's prediction: predict's object, with the
// plan's additions.
type nightBestJSON struct {
	predictionJSON
	TimeLocal    string   `json:"time_local"`
	RAAppDeg     float64  `json:"ra_app_deg"`
	DecAppDeg    float64  `json:"dec_app_deg"`
	Airmass      *float64 `json:"airmass"`
	RegionArcmin float64  `json:"region_arcmin"`
	MoonSepDeg   float64  `json:"moon_sep_deg"`
	MoonAltDeg   float64  `json:"moon_alt_deg"`
	MoonIllum    float64  `json:"moon_illum"`
}

// windowJSON is one part of the window.
type windowJSON struct {
	StartUTC     string `json:"start_utc"`
	EndUTC       string `json:"end_utc"`
	StartLocal   string `json:"start_local"`
	EndLocal     string `json:"end_local"`
	StartsAtDark bool   `json:"starts_at_dark"`
	EndsAtDark   bool   `json:"ends_at_dark"`
}

// nextNightJSON is a later observable night.
type nextNightJSON struct {
	Date           string  `json:"date"`
	WindowStartUTC string  `json:"window_start_utc"`
	WindowEndUTC   string  `json:"window_end_utc"`
	BestTimeUTC    string  `json:"best_time_utc"`
	BestAltDeg     float64 `json:"best_alt_deg"`
}

// nightPlanJSON is night --json with a target.
type nightPlanJSON struct {
	Target             string          `json:"target"`
	File               string          `json:"file"`
	Model              string          `json:"model"`
	Date               string          `json:"date"`
	Site               string          `json:"site"`
	TimeZone           string          `json:"time_zone"`
	MinAltDeg          float64         `json:"min_alt_deg"`
	StepMinutes        float64         `json:"step_min"`
	Sigma              float64         `json:"sigma"`
	FovArcmin          float64         `json:"fov_arcmin"`
	Observable         bool            `json:"observable"`
	Reason             *string         `json:"reason"` // null when observable
	ReasonText         string          `json:"reason_text"`
	DarkStartUTC       *string         `json:"dark_start_utc"`
	DarkEndUTC         *string         `json:"dark_end_utc"`
	WindowStartUTC     *string         `json:"window_start_utc"`
	WindowEndUTC       *string         `json:"window_end_utc"`
	WindowStartLocal   *string         `json:"window_start_local"`
	WindowEndLocal     *string         `json:"window_end_local"`
	Windows            []windowJSON    `json:"windows"`
	BestTimeUTC        *string         `json:"best_time_utc"`
	BestTimeLocal      *string         `json:"best_time_local"`
	Best               *nightBestJSON  `json:"best"`
	HighestDarkAltDeg  *float64        `json:"highest_dark_alt_deg"`
	SunElongationDeg   float64         `json:"sun_elongation_deg"`
	NearSun            bool            `json:"near_sun"`
	RowsWithheld       bool            `json:"rows_withheld"`
	Rows               []nightRowJSON  `json:"rows"`
	NextNights         []nextNightJSON `json:"next_nights"`
	NextNightsSearched int             `json:"next_nights_searched"`
	Cautions           []string        `json:"cautions"`
	Warnings           []string        `json:"warnings"`
	Sky                json.RawMessage `json:"sky"`

	// Encounters are the perturbed orbit's close approaches from its epoch
	// through the arc to the night (model nbody only).
	Encounters *[]encounterJSON `json:"encounters,omitempty"`
}

func (v targetView) writeJSON(w io.Writer) error {
	p := v.p
	obj := nightPlanJSON{Target: p.Name, File: v.src.file, Model: v.src.model, Date: p.Date.String(), Site: p.Sky.Site.Name,
		TimeZone: p.Sky.Location.String(), MinAltDeg: p.Options.MinAlt.Degrees(), StepMinutes: p.Options.Step.Minutes(),
		Sigma: p.Options.Sigma, FovArcmin: p.Options.FOVArcmin, Observable: p.Observable, ReasonText: p.Why,
		DarkStartUTC: utcText(p.Sky.DarkStart), DarkEndUTC: utcText(p.Sky.DarkEnd),
		Windows: []windowJSON{}, SunElongationDeg: p.SunElongation.Degrees(), NearSun: p.NearSun, RowsWithheld: p.RowsWithheld,
		Rows: []nightRowJSON{}, NextNights: []nextNightJSON{}, NextNightsSearched: p.SearchedNights,
		Cautions: append([]string{}, p.Cautions...), Warnings: append([]string{}, p.Warnings...)}
	for _, x := range v.src.warnings {
		obj.Warnings = append(obj.Warnings, oneLine(x))
	}
	if es := v.encounters(); es != nil {
		obj.Encounters = &es
	}
	if !p.Observable {
		code := p.Reason.String()
		obj.Reason = &code
	}
	if ephem.Happens(p.HighestDark) {
		obj.HighestDarkAltDeg = finite(p.HighestDarkAlt.Degrees())
	}
	for _, x := range p.Windows {
		obj.Windows = append(obj.Windows, windowJSON{StartUTC: *utcText(x.Start), EndUTC: *utcText(x.End),
			StartLocal: *v.localText(x.Start), EndLocal: *v.localText(x.End), StartsAtDark: x.StartsAtDark, EndsAtDark: x.EndsAtDark})
	}
	if b := p.Best; b != nil {
		obj.WindowStartUTC, obj.WindowEndUTC = utcText(p.Window.Start), utcText(p.Window.End)
		obj.WindowStartLocal, obj.WindowEndLocal = v.localText(p.Window.Start), v.localText(p.Window.End)
		obj.BestTimeUTC, obj.BestTimeLocal = utcText(b.UTC), v.localText(b.UTC)
		rec, err := predictionRecord(b.Prediction, p.Options.Sigma, p.Options.FOVArcmin)
		if err != nil {
			return err
		}
		obj.Best = &nightBestJSON{predictionJSON: rec, TimeLocal: *v.localText(b.UTC), RAAppDeg: b.RAApp.Degrees(), DecAppDeg: b.DecApp.Degrees(),
			Airmass: finite(b.Airmass), RegionArcmin: b.RegionArcmin, MoonSepDeg: b.MoonSeparation.Degrees(),
			MoonAltDeg: b.MoonAlt.Degrees(), MoonIllum: b.MoonIllumination}
	}
	for _, r := range p.Rows {
		obj.Rows = append(obj.Rows, v.row(r))
	}
	for _, nn := range p.NextNights {
		obj.NextNights = append(obj.NextNights, nextNightJSON{Date: nn.Date.String(), WindowStartUTC: *utcText(nn.Window.Start),
			WindowEndUTC: *utcText(nn.Window.End), BestTimeUTC: *utcText(nn.Best), BestAltDeg: nn.BestAlt.Degrees()})
	}
	var sky bytes.Buffer
	if err := v.nightView.writeJSON(&sky); err != nil {
		return err
	}
	obj.Sky = json.RawMessage(bytes.TrimSpace(sky.Bytes()))
	return writeJSON(w, obj)
}

// nightRowCSVHeader is the header of night --csv with a target: the JSON
// row fields.
var nightRowCSVHeader = []string{"time_utc", "time_local", "ra_deg", "dec_deg", "ra_app_deg", "dec_app_deg", "alt_deg", "az_deg",
	"airmass", "semi_major_arcsec", "semi_minor_arcsec", "pa_deg", "region_arcmin", "region_fields", "rate_arcsec_per_min",
	"rate_pa_deg", "moon_sep_deg", "moon_alt_deg", "in_window", "near_sun", "beyond_horizon"}

func (v targetView) writeCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(nightRowCSVHeader); err != nil {
		return err
	}
	f := func(x float64, d int) string { return strconv.FormatFloat(x, 'f', d, 64) }
	for _, pt := range v.p.Rows {
		r := v.row(pt)
		am := ""
		if r.Airmass != nil {
			am = f(*r.Airmass, 3)
		}
		rec := []string{r.TimeUTC, r.TimeLocal, f(r.RADeg, 8), f(r.DecDeg, 8), f(r.RAAppDeg, 8), f(r.DecAppDeg, 8),
			f(r.AltDeg, 3), f(r.AzDeg, 3), am, f(r.SemiMajorArcsec, 3), f(r.SemiMinorArcsec, 3), f(r.PADeg, 2),
			f(r.RegionArcmin, 3), f(r.RegionFields, 3), f(r.RateArcsecPerMin, 4), f(r.RatePADeg, 2), f(r.MoonSepDeg, 2),
			f(r.MoonAltDeg, 2), strconv.FormatBool(r.InWindow), strconv.FormatBool(r.NearSun), strconv.FormatBool(r.BeyondHorizon)}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}
