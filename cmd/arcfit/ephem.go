package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"github.com/spf13/pflag"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/ephem"
)

// ephemOptions are the options of the ephem command.
type ephemOptions struct {
	body         string  // the BODY argument: sun, moon or a planet
	elementsFile string  // --elements
	name         string  // --name: the element set in --elements
	sitesFile    string  // --sites
	site         string  // --site
	from, to     string  // --from, --to: ISO 8601 with a zone
	step         string  // --step: 1d, 6h, 30m, 90s, 1h30m
	dut1Sec      float64 // --dut1
	noRefraction bool    // --no-refraction
	json, csv    bool
}

func ephemCommand() *command {
	return &command{
		name:    "ephem",
		summary: "positions of the Sun, Moon, planets or an element set",
		usage: "arcfit ephem BODY --from TIME --to TIME --step DURATION [--site SITE] [--json | --csv]\n" +
			"  arcfit ephem --elements FILE [--name NAME] --from TIME --to TIME --step DURATION [--site SITE] [--json | --csv]",
		about: "Tabulates where a body is seen from a site, or from the Earth's centre when no site is given: BODY is sun, " +
			"moon or a planet (mercury, venus, mars, jupiter, saturn, uranus, neptune), or --elements names an orbital-" +
			"elements CSV (name,epoch_tt,a_au,e,i_deg,node_deg,peri_deg,m_deg,h,g, or q_au,tp_tt for comets) and --name " +
			"the set in it. Each row gives the UTC time, the astrometric ICRS place (topocentric, as measured against a " +
			"star catalogue) and the apparent place of date, the refracted altitude (10 °C, 1010 hPa, unless " +
			"--no-refraction) and the azimuth from north through east, the airmass, the distances from the observer and " +
			"the Sun in au, the elongation from the Sun, the separation from the Moon and, for an element set with H, " +
			"the predicted magnitude. Rows within 15 degrees of the Sun are marked, and a warning on standard error " +
			"says that pointing near the Sun can blind and destroy equipment; the Sun itself is always marked. " +
			"Times from 1800 to 2200; at most 1,000,000 rows.",
		example: "arcfit ephem mars --from 2027-02-01T00:00:00Z --to 2027-03-01T00:00:00Z --step 1d --site 44.52,-72.80,410\n" +
			"arcfit ephem --elements elements.csv --name \"Demo-1 (invented)\" --from 2027-02-20T02:00:00Z --to 2027-02-20T06:00:00Z --step 30m --json",
		flags: func() *pflag.FlagSet { return ephemFlags(&ephemOptions{}, io.Discard) },
		run: func(args []string, io streams) error {
			var o ephemOptions
			fs := ephemFlags(&o, io.Err)
			if err := parseFlags(fs, args); err != nil {
				return err
			}
			switch fs.NArg() {
			case 0:
			case 1:
				o.body = fs.Arg(0)
			default:
				return usagef("one body at a time, got %d: %s", fs.NArg(), strings.Join(fs.Args(), " "))
			}
			return runEphem(o, io)
		},
	}
}

// ephemFlags binds the ephem flags to o.
func ephemFlags(o *ephemOptions, stderr io.Writer) *pflag.FlagSet {
	fs := newFlagSet("ephem", stderr)
	fs.StringVar(&o.from, "from", "", "first `time` of the table, ISO 8601 with a zone (2027-02-01T00:00:00Z)")
	fs.StringVar(&o.to, "to", "", "last `time` of the table, ISO 8601 with a zone")
	fs.StringVar(&o.step, "step", "", "`step` between rows: 1d, 6h, 30m, 90s or 1h30m")
	fs.StringVar(&o.elementsFile, "elements", "", "orbital-elements CSV `file` (instead of BODY)")
	fs.StringVar(&o.name, "name", "", "`name` of the element set in --elements (not needed when it holds one)")
	fs.StringVar(&o.site, "site", "", "observing `site`: a name in --sites, or lat_deg,lon_deg,height_m (default: the Earth's centre)")
	fs.StringVar(&o.sitesFile, "sites", "", "`file` of sites, CSV name,lat_deg,lon_deg,height_m (WGS84, east positive)")
	fs.Float64Var(&o.dut1Sec, "dut1", 0, "UT1 − UTC in `seconds`, from IERS Bulletin A (|dut1| ≤ 1; 0 is good to 13\" in hour angle)")
	fs.BoolVar(&o.noRefraction, "no-refraction", false, "give the geometric altitude, without refraction")
	fs.BoolVar(&o.json, "json", false, "print one JSON object: the table's metadata and a rows array")
	fs.BoolVar(&o.csv, "csv", false, "print the rows as CSV with a header")
	return fs
}

// ephemTable is what ephem computed, ready to print.
type ephemTable struct {
	target   ephem.TableTarget
	site     *astro.Site
	o        ephemOptions
	from, to astro.JD
	stepSec  float64
	decimals int // of the second in printed times
	places   []ephem.Place
	warnings []string
}

// runEphem computes the table and prints it.
func runEphem(o ephemOptions, io streams) error {
	if o.json && o.csv {
		return usagef("--json and --csv exclude each other")
	}
	t := ephemTable{o: o}
	var err error
	if t.target, err = ephemTarget(o, &t.warnings); err != nil {
		return err
	}
	switch {
	case o.from == "":
		return usagef("no --from given: the first time of the table, such as 2027-02-01T00:00:00Z")
	case o.to == "":
		return usagef("no --to given: the last time of the table, such as 2027-03-01T00:00:00Z")
	case o.step == "":
		return usagef("no --step given: the step between rows, such as 1d, 6h or 30m")
	}
	if t.from, err = parseTimeFlag("--from", o.from); err != nil {
		return err
	}
	if t.to, err = parseTimeFlag("--to", o.to); err != nil {
		return err
	}
	step, err := parseStep(o.step)
	if err != nil {
		return err
	}
	t.stepSec = step.Seconds()
	if t.to.Before(t.from) {
		return usagef("--to %s is before --from %s", o.to, o.from)
	}
	if !(math.Abs(o.dut1Sec) <= 1) {
		return usagef("--dut1 %v: want UT1 − UTC in seconds, within ±1", o.dut1Sec)
	}
	t.decimals = 0
	if step%time.Second != 0 || !wholeSecond(t.from) {
		t.decimals = 3
	}
	if _, err := ephem.TableTimes(t.from, t.to, t.stepSec/astro.SecondsPerDay); err != nil {
		return inputError(errors.New(strings.TrimPrefix(err.Error(), "ephem: ")))
	}
	if o.site != "" {
		if t.site, err = siteFromFlags(o.site, o.sitesFile); err != nil {
			return err
		}
	}
	obsr := ephem.Observer{Site: t.site, DUT1Sec: o.dut1Sec, NoRefraction: o.noRefraction}
	places, err := ephem.EphemerisTable(t.target, t.from, t.to, t.stepSec/astro.SecondsPerDay, obsr)
	if err != nil {
		if places == nil {
			if errors.Is(err, astro.ErrRange) || errors.Is(err, astro.ErrUnsupportedDate) {
				return inputError(err)
			}
			return err
		}
		t.warnings = append(t.warnings, err.Error())
	}
	t.places = places

	var buf bytes.Buffer // whole output first: nothing half-written on error
	switch {
	case o.json:
		err = t.writeJSON(&buf)
	case o.csv:
		err = t.writeCSV(&buf)
	default:
		err = t.writeText(&buf)
	}
	if err != nil {
		return err
	}
	for _, w := range t.warnings {
		fmt.Fprintf(io.Err, "arcfit ephem: warning: %s\n", oneLine(w))
	}
	if msg := t.nearSunWarning(); msg != "" {
		fmt.Fprintf(io.Err, "arcfit ephem: warning: %s\n", msg)
	}
	_, err = io.Out.Write(buf.Bytes())
	return err
}

// ephemTarget works out the body of the table from BODY or --elements.
// Warnings of the elements reader are appended to warns.
func ephemTarget(o ephemOptions, warns *[]string) (ephem.TableTarget, error) {
	switch {
	case o.elementsFile != "" && o.body != "":
		return ephem.TableTarget{}, usagef("give BODY or --elements, not both (got %q and --elements %s)", o.body, o.elementsFile)
	case o.elementsFile == "" && o.name != "":
		return ephem.TableTarget{}, usagef("--name %q needs --elements FILE", o.name)
	case o.elementsFile != "":
		sets, ws, err := ephem.ReadElementsFile(o.elementsFile)
		if err != nil {
			return ephem.TableTarget{}, inputError(err)
		}
		for _, w := range ws {
			*warns = append(*warns, w.String())
		}
		el, err := ephem.FindElements(sets, o.name)
		if err != nil {
			return ephem.TableTarget{}, usagef("%s: %s", o.elementsFile, strings.TrimPrefix(err.Error(), "ephem: "))
		}
		return ephem.TableTarget{Elements: &el}, nil
	case o.body == "":
		return ephem.TableTarget{}, usagef("no body given: sun, moon, a planet, or --elements FILE (run \"arcfit ephem --help\")")
	}
	b, err := ephem.ParseBody(o.body)
	if err != nil || b == ephem.Earth {
		return ephem.TableTarget{}, usagef("unknown body %q: want sun, moon, mercury, venus, mars, jupiter, saturn, uranus, neptune, or --elements FILE", o.body)
	}
	return ephem.TableTarget{Body: b}, nil
}

// parseTimeFlag reads a --from or --to time: ISO 8601 with Z or an offset.
func parseTimeFlag(flag, s string) (astro.JD, error) {
	j, err := astro.ParseISO8601(strings.TrimSpace(s))
	if err != nil {
		return astro.JD{}, usagef("%s %q: want an ISO 8601 time with a zone, such as 2027-02-01T00:00:00Z: %v", flag, s, err)
	}
	return j, nil
}

// wholeSecond reports whether the UTC instant j falls on a whole second
// (to 1 µs).
func wholeSecond(j astro.JD) bool {
	s := j.Normalized().Frac * astro.SecondsPerDay
	return math.Abs(s-math.Round(s)) < 1e-6
}

// parseStep reads a --step: a Go duration (6h, 30m, 90s, 1h30m, 500ms), or a
// number of days with the suffix d, optionally followed by a Go duration
// (1d, 0.5d, 2d12h).
func parseStep(s string) (time.Duration, error) {
	bad := func(why string) error {
		return usagef("--step %q: want a step > 0 such as 1d, 6h, 30m or 90s%s", s, why)
	}
	t := strings.TrimSpace(s)
	var d time.Duration
	if i := strings.IndexByte(t, 'd'); i >= 0 {
		days, err := strconv.ParseFloat(t[:i], 64)
		if err != nil || math.IsNaN(days) || math.IsInf(days, 0) || days > 1e5 || strings.ContainsAny(t[:i], "xXpP_") {
			return 0, bad("")
		}
		d = time.Duration(math.Round(days * 24 * float64(time.Hour)))
		t = t[i+1:]
	}
	if t != "" {
		e, err := time.ParseDuration(t)
		if err != nil {
			return 0, bad("")
		}
		d += e
	}
	if d <= 0 {
		return 0, bad(" (a zero or negative step does not advance)")
	}
	return d, nil
}

// siteFromFlags returns the site named by --site: a name of the --sites file,
// or an inline lat,lon,height.
func siteFromFlags(site, sitesFile string) (*astro.Site, error) {
	var sites map[string]astro.Site
	if sitesFile != "" {
		s, err := readSites(sitesFile)
		if err != nil {
			return nil, err
		}
		sites = s
	}
	name, sites, err := resolveSiteFlag(site, sites)
	if err != nil {
		return nil, err
	}
	st := sites[name]
	return &st, nil
}

// readSites reads a --sites file; its errors are input errors.
func readSites(path string) (map[string]astro.Site, error) {
	if path == "" {
		return nil, nil
	}
	s, err := obs.ReadSitesFile(path)
	if err != nil {
		return nil, inputError(err)
	}
	return s, nil
}

// ephemRow is one row of ephem --json and --csv. Null (an empty CSV field)
// stands for a value that does not apply: alt, az and airmass at the
// geocentre, the airmass below the horizon, the magnitude when unknown, the
// phase angle of the Sun, the Moon's separation from itself.
type ephemRow struct {
	TimeUTC    string   `json:"time_utc"`
	RADeg      float64  `json:"ra_deg"`
	DecDeg     float64  `json:"dec_deg"`
	RAAppDeg   float64  `json:"ra_app_deg"`
	DecAppDeg  float64  `json:"dec_app_deg"`
	AltDeg     *float64 `json:"alt_deg"`
	AzDeg      *float64 `json:"az_deg"`
	Airmass    *float64 `json:"airmass"`
	DeltaAU    float64  `json:"delta_au"`
	RAU        float64  `json:"r_au"`
	ElongDeg   float64  `json:"elong_deg"`
	PhaseDeg   *float64 `json:"phase_deg"`
	MoonSepDeg *float64 `json:"moon_sep_deg"`
	Mag        *float64 `json:"mag"`
	NearSun    bool     `json:"near_sun"`
}

// finite returns a pointer to v, or nil when v is NaN or infinite (JSON
// null).
func finite(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

// rows converts the places for printing.
func (t *ephemTable) rows() []ephemRow {
	rows := make([]ephemRow, 0, len(t.places))
	isSun := t.target.Elements == nil && t.target.Body == ephem.Sun
	isMoon := t.target.Elements == nil && t.target.Body == ephem.Moon
	for _, p := range t.places {
		r := ephemRow{
			TimeUTC:   astro.FormatISO8601(p.UTC, t.decimals),
			RADeg:     p.RA.Degrees(),
			DecDeg:    p.Dec.Degrees(),
			RAAppDeg:  p.RAApp.Degrees(),
			DecAppDeg: p.DecApp.Degrees(),
			DeltaAU:   p.DeltaAU,
			RAU:       p.RAU,
			ElongDeg:  p.Elongation.Degrees(),
			Mag:       finite(p.Mag),
			NearSun:   p.NearSun(),
		}
		if p.Topocentric {
			r.AltDeg, r.AzDeg, r.Airmass = finite(p.Alt.Degrees()), finite(p.Az.Degrees()), finite(p.Airmass)
		}
		if !isSun {
			r.PhaseDeg = finite(p.PhaseAngle.Degrees())
		}
		if !isMoon {
			r.MoonSepDeg = finite(p.MoonSeparation.Degrees())
		}
		rows = append(rows, r)
	}
	return rows
}

// refraction says how the altitude was computed.
func (t *ephemTable) refraction() string {
	switch {
	case t.site == nil:
		return "none (geocentric: no horizon)"
	case t.o.noRefraction:
		return "none (geometric altitude)"
	}
	return fmt.Sprintf("refracted for standard air, %g °C and %g hPa", astro.StandardTemperatureC, astro.StandardPressureHPa)
}

// ephemJSON is the object ephem --json prints.
type ephemJSON struct {
	Body         string     `json:"body"`
	Kind         string     `json:"kind"` // "sun", "moon", "planet" or "elements"
	ElementsFile string     `json:"elements_file,omitempty"`
	Site         *string    `json:"site"`
	SiteLatDeg   *float64   `json:"site_lat_deg"`
	SiteLonDeg   *float64   `json:"site_lon_deg"`
	SiteHeightM  *float64   `json:"site_height_m"`
	Geocentric   bool       `json:"geocentric"`
	FromUTC      string     `json:"from_utc"`
	ToUTC        string     `json:"to_utc"`
	StepSec      float64    `json:"step_s"`
	DUT1Sec      float64    `json:"dut1_s"`
	Refraction   string     `json:"refraction"`
	Frames       string     `json:"frames"`
	NearSunRows  int        `json:"near_sun_rows"`
	Warnings     []string   `json:"warnings"`
	Rows         []ephemRow `json:"rows"`
}

// framesNote says what the RA/Dec columns are.
const framesNote = "ra_deg, dec_deg: astrometric ICRS (light time, no aberration), topocentric for a site; " +
	"ra_app_deg, dec_app_deg: apparent, true equator and equinox of date"

func (t *ephemTable) kind() string {
	switch {
	case t.target.Elements != nil:
		return "elements"
	case t.target.Body == ephem.Sun:
		return "sun"
	case t.target.Body == ephem.Moon:
		return "moon"
	}
	return "planet"
}

func (t *ephemTable) writeJSON(w io.Writer) error {
	rows := t.rows()
	v := ephemJSON{
		Body: t.target.Name(), Kind: t.kind(), ElementsFile: t.o.elementsFile,
		Geocentric: t.site == nil,
		FromUTC:    astro.FormatISO8601(t.from, t.decimals), ToUTC: astro.FormatISO8601(t.to, t.decimals),
		StepSec: t.stepSec, DUT1Sec: t.o.dut1Sec, Refraction: t.refraction(), Frames: framesNote,
		Warnings: []string{}, Rows: rows,
	}
	if t.site != nil {
		name := t.site.Name
		v.Site = &name
		v.SiteLatDeg, v.SiteLonDeg, v.SiteHeightM = finite(t.site.Lat.Degrees()), finite(t.site.Lon.Degrees()), finite(t.site.HeightM)
	}
	for _, r := range rows {
		if r.NearSun {
			v.NearSunRows++
		}
	}
	for _, s := range t.warnings {
		v.Warnings = append(v.Warnings, oneLine(s))
	}
	if msg := t.nearSunWarning(); msg != "" {
		v.Warnings = append(v.Warnings, msg)
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// ephemCSVHeader is the header of ephem --csv: the JSON row fields.
var ephemCSVHeader = []string{"time_utc", "ra_deg", "dec_deg", "ra_app_deg", "dec_app_deg", "alt_deg", "az_deg",
	"airmass", "delta_au", "r_au", "elong_deg", "phase_deg", "moon_sep_deg", "mag", "near_sun"}

func (t *ephemTable) writeCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(ephemCSVHeader); err != nil {
		return err
	}
	f := func(v float64, d int) string { return strconv.FormatFloat(v, 'f', d, 64) }
	p := func(v *float64, d int) string {
		if v == nil {
			return ""
		}
		return f(*v, d)
	}
	for _, r := range t.rows() {
		rec := []string{r.TimeUTC, f(r.RADeg, 8), f(r.DecDeg, 8), f(r.RAAppDeg, 8), f(r.DecAppDeg, 8),
			p(r.AltDeg, 5), p(r.AzDeg, 5), p(r.Airmass, 4), f(r.DeltaAU, 10), f(r.RAU, 10), f(r.ElongDeg, 5),
			p(r.PhaseDeg, 5), p(r.MoonSepDeg, 5), p(r.Mag, 2), strconv.FormatBool(r.NearSun)}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// siteLine describes a site for a text header.
func siteLine(s *astro.Site) string {
	return fmt.Sprintf("%s (lat %+.4f°, lon %+.4f°, %.0f m)", s.Name, s.Lat.Degrees(), s.Lon.Degrees(), s.HeightM)
}

// writeText writes the table for people: a few header lines, then columns
// with their units in the names.
func (t *ephemTable) writeText(w io.Writer) error {
	p := func(format string, a ...any) { fmt.Fprintf(w, format, a...) }
	where := "the Earth's centre (geocentric: no alt, az or airmass; give --site for them)"
	if t.site != nil {
		where = siteLine(t.site)
	}
	p("%s seen from %s\n", t.target.Name(), where)
	p("%s to %s, step %s: %d row%s\n", astro.FormatISO8601(t.from, t.decimals), astro.FormatISO8601(t.to, t.decimals),
		strings.TrimSpace(t.o.step), len(t.places), plural(len(t.places)))
	p("RA, Dec: astrometric ICRS (catalogue frame, topocentric for a site) and apparent of date\n")
	if t.site != nil {
		p("alt: %s; az from north through east\n", t.refraction())
	}
	p("\n")
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "time_utc\tra_icrs_hms\tdec_icrs_dms\tra_app_hms\tdec_app_dms\talt_deg\taz_deg\tairmass\tdelta_au\tr_au\telong_deg\tmoon_deg\tmag\tnote\t")
	opt := func(v *float64, format string) string {
		if v == nil {
			return ""
		}
		return fmt.Sprintf(format, *v)
	}
	for i, r := range t.rows() {
		pl := t.places[i]
		note := ""
		if r.NearSun {
			note = "NEAR SUN"
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%.6f\t%.6f\t%.1f\t%s\t%s\t%s\t\n", r.TimeUTC,
			astro.FormatHMS(pl.RA, 2), astro.FormatDMS(pl.Dec, 1), astro.FormatHMS(pl.RAApp, 2), astro.FormatDMS(pl.DecApp, 1),
			opt(r.AltDeg, "%.2f"), opt(r.AzDeg, "%.2f"), opt(r.Airmass, "%.3f"), r.DeltaAU, r.RAU, r.ElongDeg,
			opt(r.MoonSepDeg, "%.1f"), opt(r.Mag, "%.1f"), note)
	}
	return tw.Flush()
}

// nearSunWarning returns the warning for rows within 15° of the Sun, naming
// the first and last of them, or "" when there are none. For the Sun itself
// the warning says so.
func (t *ephemTable) nearSunWarning() string {
	first, last, n := -1, -1, 0
	for i, p := range t.places {
		if p.NearSun() {
			if first < 0 {
				first = i
			}
			last = i
			n++
		}
	}
	if n == 0 {
		return ""
	}
	const danger = "pointing a telescope, binoculars or a camera near the Sun can blind you and destroy the equipment"
	if t.target.Elements == nil && t.target.Body == ephem.Sun {
		return "these are positions of the Sun itself (elongation 0, every row near_sun): never point at it without a proper solar filter; " + danger
	}
	at := func(i int) string { return astro.FormatISO8601(t.places[i].UTC, t.decimals) }
	span := fmt.Sprintf("row %d (%s)", first+1, at(first))
	if last != first {
		span = fmt.Sprintf("rows %d to %d (%s to %s)", first+1, last+1, at(first), at(last))
	}
	return fmt.Sprintf("%s is within %.0f° of the Sun in %d of %d rows, %s: %s", t.target.Name(),
		ephem.NearSunLimit.Degrees(), n, len(t.places), span, danger)
}
