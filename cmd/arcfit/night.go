package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"
	"text/tabwriter"
	"time"
	_ "time/tzdata" // the IANA zone database for --tz, whatever the machine has

	"github.com/spf13/pflag"

	"arcfit/astro"
	"arcfit/ephem"
)

// nightOptions are the options of the night command.
type nightOptions struct {
	target    string // OBS|FIT argument: the target part, not built yet
	date      string // --date YYYY-MM-DD: the evening's civil date
	site      string // --site
	sitesFile string // --sites
	tz        string // --tz: IANA zone name; "" = the site's local mean time
	json, csv bool
}

func nightCommand() *command {
	return &command{
		name:    "night",
		summary: "the sky of a night at a site: Sun, twilights, dark window, Moon",
		usage:   "arcfit night --date DATE --site SITE [--sites FILE] [--tz ZONE] [--json | --csv]",
		about: "Tells what the sky does on the night that begins on the evening of DATE at the site, from local noon " +
			"to the next local noon: sunset and sunrise (the Sun's upper limb on the horizon, standard refraction), " +
			"the civil, nautical and astronomical dusk and dawn (the Sun's centre at −6°, −12° and −18°), the dark " +
			"window (the Sun below −18°), the Moon's rises and sets, and its phase and illuminated fraction at local " +
			"midnight. Times are given in UTC and in local time: the IANA zone of --tz (such as Europe/Paris), or by " +
			"default the site's local mean solar time. Where the Sun does not set or the sky does not get dark, it " +
			"says so and why. Times are good to about a minute; the real refraction moves rise and set by more at " +
			"high latitude. Where to point at a target on that night comes in a later version.",
		example: "arcfit night --date 2027-02-20 --site 44.52,-72.80,410 --tz America/New_York\n" +
			`arcfit night --date 2027-06-21 --site "Alder Ridge" --sites sites.csv --json`,
		flags: func() *pflag.FlagSet { return nightFlags(&nightOptions{}, io.Discard) },
		run: func(args []string, io streams) error {
			var o nightOptions
			fs := nightFlags(&o, io.Err)
			if err := parseFlags(fs, args); err != nil {
				return err
			}
			switch fs.NArg() {
			case 0:
			case 1:
				o.target = fs.Arg(0)
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
	fs.StringVar(&o.site, "site", "", "observing `site`: a name in --sites, or lat_deg,lon_deg,height_m")
	fs.StringVar(&o.sitesFile, "sites", "", "`file` of sites, CSV name,lat_deg,lon_deg,height_m (WGS84, east positive)")
	fs.StringVar(&o.tz, "tz", "", "local time `zone`, an IANA name such as America/Denver (default: the site's local mean time)")
	fs.BoolVar(&o.json, "json", false, "print one JSON object with every event in UTC and local time")
	fs.BoolVar(&o.csv, "csv", false, "print the events as CSV: event, time_utc, time_local")
	return fs
}

// runNight computes the night's sky and prints it.
func runNight(o nightOptions, io streams) error {
	if o.target != "" {
		return usagef("the target part of night (where to point at %s) is not built yet in this version; run without a file for the night's sky", o.target)
	}
	if o.json && o.csv {
		return usagef("--json and --csv exclude each other")
	}
	if o.date == "" {
		return usagef("no --date given: the date of the evening, such as 2027-02-20")
	}
	d, err := time.Parse("2006-01-02", strings.TrimSpace(o.date))
	if err != nil {
		return usagef("--date %q: want the evening's date as YYYY-MM-DD, such as 2027-02-20", o.date)
	}
	if y := d.Year(); y < 1800 || y > 2200 {
		return usagef("--date %q: outside the span of the ephemerides, 1800 to 2200", o.date)
	}
	if o.site == "" {
		return usagef("no --site given: the night's sky needs a site, a name in --sites or lat_deg,lon_deg,height_m")
	}
	site, err := siteFromFlags(o.site, o.sitesFile)
	if err != nil {
		return err
	}
	loc := meanTimeToMinute(site.Lon)
	if tz := strings.TrimSpace(o.tz); tz != "" {
		if tz == "Local" {
			return usagef("--tz Local: name the zone, such as Europe/Paris (Local depends on the machine)")
		}
		if loc, err = time.LoadLocation(tz); err != nil {
			return usagef("--tz %q: not a time zone name; want an IANA name such as Europe/Paris, America/Denver or UTC", o.tz)
		}
	}
	n, err := ephem.NightAt(d.Year(), int(d.Month()), d.Day(), *site, loc)
	var warn string
	if err != nil {
		if !errors.Is(err, astro.ErrStaleTable) {
			if errors.Is(err, astro.ErrRange) || errors.Is(err, astro.ErrUnsupportedDate) {
				return inputError(err)
			}
			return err
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
	if warn != "" {
		fmt.Fprintf(io.Err, "arcfit night: warning: %s\n", warn)
	}
	_, err = io.Out.Write(buf.Bytes())
	return err
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
