package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/spf13/pflag"

	"arcfit/astro"
	"arcfit/astro/obs"
)

// inspectOptions are the options of the inspect command.
type inspectOptions struct {
	file        string  // the observation file
	sitesFile   string  // --sites
	site        string  // --site: a name from the sites file or lat,lon,height
	format      string  // --format: "", "csv" or "ades-psv"
	sigmaArcsec float64 // --sigma: default 1-σ for rows without one
	json, csv   bool
}

func inspectCommand() *command {
	return &command{
		name:    "inspect",
		summary: "what was read: counts, nights, arc, rates, warnings",
		usage:   "arcfit inspect OBS [--sites FILE] [--site SITE] [--json | --csv]",
		about: "Reads an observation file (CSV or ADES PSV) and tells what it holds: the number of observations and sites, " +
			"the nights (noon to noon in each site's local mean time), the arc from first to last, the mean stated " +
			"uncertainty, and for each night the rate of motion in arcseconds per minute with its position angle " +
			"(north through east) and the arc travelled. It warns of a single night, fewer than three observations, " +
			"duplicate rows and nights without motion above the noise. --json also lists the observations as read; " +
			"--csv prints only the observation rows.",
		example: "arcfit inspect observations.csv --sites sites.csv\n" +
			"arcfit inspect observations.csv --site 44.52,-72.80,410 --json",
		flags: func() *pflag.FlagSet { return inspectFlags(&inspectOptions{}, io.Discard) },
		run: func(args []string, io streams) error {
			var o inspectOptions
			fs := inspectFlags(&o, io.Err)
			if err := parseFlags(fs, args); err != nil {
				return err
			}
			switch fs.NArg() {
			case 1:
				o.file = fs.Arg(0)
			case 0:
				return usagef("no observation file given (run \"arcfit inspect --help\")")
			default:
				return usagef("one observation file at a time, got %d: %s", fs.NArg(), strings.Join(fs.Args(), " "))
			}
			return runInspect(o, io)
		},
	}
}

// inspectFlags binds the inspect flags to o.
func inspectFlags(o *inspectOptions, stderr io.Writer) *pflag.FlagSet {
	fs := newFlagSet("inspect", stderr)
	fs.StringVar(&o.sitesFile, "sites", "", "`file` of sites, CSV name,lat_deg,lon_deg,height_m (WGS84, east positive)")
	fs.StringVar(&o.site, "site", "", "`site` of rows that name none: a name in --sites, or lat_deg,lon_deg,height_m")
	fs.StringVar(&o.format, "format", "", "observation `format`, csv or ades-psv (default: recognised from the content)")
	fs.Float64Var(&o.sigmaArcsec, "sigma", 0, "1-sigma uncertainty in `arcsec` for rows without one (default 1)")
	fs.BoolVar(&o.json, "json", false, "print one JSON object: the summary and the observations as read")
	fs.BoolVar(&o.csv, "csv", false, "print the observations as read, as CSV with a header")
	return fs
}

// runInspect reads the observations, summarises them and prints the summary.
func runInspect(o inspectOptions, io streams) error {
	if o.json && o.csv {
		return usagef("--json and --csv exclude each other")
	}
	if o.format != "" && o.format != "csv" && o.format != "ades-psv" {
		return usagef("--format %q: want csv or ades-psv", o.format)
	}
	if o.sigmaArcsec < 0 || math.IsNaN(o.sigmaArcsec) || math.IsInf(o.sigmaArcsec, 0) {
		return usagef("--sigma %v: want a positive number of arcseconds", o.sigmaArcsec)
	}
	var sites map[string]astro.Site
	if o.sitesFile != "" {
		s, err := obs.ReadSitesFile(o.sitesFile)
		if err != nil {
			return inputError(err)
		}
		sites = s
	}
	defaultSite, sites, err := resolveSiteFlag(o.site, sites)
	if err != nil {
		return err
	}
	set, err := obs.ReadFile(o.file, obs.ReadOptions{
		Format:             o.format,
		DefaultSigmaArcsec: o.sigmaArcsec,
		Sites:              sites,
		DefaultSite:        defaultSite,
	})
	if err != nil {
		return inputError(err)
	}
	s := obs.Summarize(set, sites)

	var buf bytes.Buffer // whole output first: nothing half-written on error
	switch {
	case o.json:
		err = writeInspectJSON(&buf, s, set)
	case o.csv:
		err = writeObservationsCSV(&buf, set)
	default:
		err = writeInspectText(&buf, s, set)
	}
	if err != nil {
		return err
	}
	_, err = io.Out.Write(buf.Bytes())
	return err
}

// resolveSiteFlag turns the --site value into the default site name for rows
// without one: a name of the sites file, or an inline lat,lon,height added to
// the sites under its own text as name.
func resolveSiteFlag(flag string, sites map[string]astro.Site) (string, map[string]astro.Site, error) {
	if flag == "" {
		return "", sites, nil
	}
	if _, ok := sites[flag]; ok {
		return flag, sites, nil
	}
	st, err := obs.ParseSiteSpec(flag)
	if err != nil {
		if sites != nil && !strings.Contains(flag, ",") {
			return "", nil, usagef("--site %q: not a name in the sites file", flag)
		}
		return "", nil, usagef("--site %q: want a name from --sites or lat_deg,lon_deg,height_m: %v", flag, err)
	}
	st.Name = flag
	out := make(map[string]astro.Site, len(sites)+1)
	for k, v := range sites {
		out[k] = v
	}
	out[flag] = st
	return flag, out, nil
}

// observationRow is one observation as inspect --json and --csv print it.
type observationRow struct {
	Line           int      `json:"line"`
	TimeUTC        string   `json:"time_utc"`
	RADeg          float64  `json:"ra_deg"`
	DecDeg         float64  `json:"dec_deg"`
	SigmaArcsec    float64  `json:"sigma_arcsec"`
	SigmaRAArcsec  float64  `json:"sigma_ra_arcsec"`
	SigmaDecArcsec float64  `json:"sigma_dec_arcsec"`
	Site           string   `json:"site"`
	Mag            *float64 `json:"mag"`
	Band           string   `json:"band"`
	Used           bool     `json:"used"`
}

// observationRows converts the set's observations for printing.
// sigma_arcsec is the mean of the two per-coordinate σ (equal to both when
// the file gives one σ).
func observationRows(set *obs.Set) []observationRow {
	rows := make([]observationRow, 0, len(set.Obs))
	for _, o := range set.Obs {
		r := observationRow{
			Line:           o.Line,
			TimeUTC:        astro.FormatISO8601(o.Time, 2),
			RADeg:          o.RA.Degrees(),
			DecDeg:         o.Dec.Degrees(),
			SigmaRAArcsec:  o.SigmaRA.Arcseconds(),
			SigmaDecArcsec: o.SigmaDec.Arcseconds(),
			SigmaArcsec:    (o.SigmaRA + o.SigmaDec).Arcseconds() / 2,
			Site:           o.Site,
			Band:           o.Band,
			Used:           o.Used,
		}
		if !math.IsNaN(o.Mag) {
			m := o.Mag
			r.Mag = &m
		}
		rows = append(rows, r)
	}
	return rows
}

// inspectJSON is the object inspect --json prints: the summary's fields and
// the observations as read.
type inspectJSON struct {
	obs.Summary
	Observations []observationRow `json:"observations"`
}

func writeInspectJSON(w io.Writer, s obs.Summary, set *obs.Set) error {
	if s.Nights == nil {
		s.Nights = []obs.Night{}
	}
	if s.Warnings == nil {
		s.Warnings = []obs.Note{}
	}
	if s.ReaderWarnings == nil {
		s.ReaderWarnings = []string{}
	}
	if s.Sites == nil {
		s.Sites = []obs.SiteUse{}
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(inspectJSON{Summary: s, Observations: observationRows(set)})
}

// observationCSVHeader is the header of inspect --csv; the same fields as the
// JSON observations.
var observationCSVHeader = []string{"line", "time_utc", "ra_deg", "dec_deg", "sigma_arcsec",
	"sigma_ra_arcsec", "sigma_dec_arcsec", "site", "mag", "band", "used"}

func writeObservationsCSV(w io.Writer, set *obs.Set) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(observationCSVHeader); err != nil {
		return err
	}
	f := func(v float64, d int) string { return strconv.FormatFloat(v, 'f', d, 64) }
	for _, r := range observationRows(set) {
		mag := ""
		if r.Mag != nil {
			mag = f(*r.Mag, 2)
		}
		rec := []string{strconv.Itoa(r.Line), r.TimeUTC, f(r.RADeg, 8), f(r.DecDeg, 8),
			f(r.SigmaArcsec, 3), f(r.SigmaRAArcsec, 3), f(r.SigmaDecArcsec, 3),
			r.Site, mag, r.Band, strconv.FormatBool(r.Used)}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// writeInspectText writes the summary for people. The reader's warnings about
// a duplicate row or a set without motion are left out where the summary has
// its own note for the same thing.
func writeInspectText(w io.Writer, s obs.Summary, set *obs.Set) error {
	p := func(format string, a ...any) { fmt.Fprintf(w, format, a...) }
	format := s.Format
	if format == "" {
		format = "?"
	}
	p("%s (%s): %d observation%s, %d in use\n", s.File, format, s.Count, plural(s.Count), s.Used)
	if s.Used > 0 {
		arc := fmt.Sprintf("%.2f d", s.ArcDays)
		if s.ArcDays < 2 {
			arc = fmt.Sprintf("%.2f h", s.ArcHours)
		}
		p("arc %s, from %s to %s\n", arc, astro.FormatISO8601(s.First, 1), astro.FormatISO8601(s.Last, 1))
		p("mean stated sigma %.2f\" per coordinate\n", s.MeanSigmaArcsec)
	}
	p("%d night%s, %d site%s\n", s.NightCount, plural(s.NightCount), len(s.Sites), plural(len(s.Sites)))

	if len(s.Sites) > 0 {
		p("\nsites\n")
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "  name\tobs\tlat_deg\tlon_deg\theight_m")
		for _, u := range s.Sites {
			if u.Known {
				fmt.Fprintf(tw, "  %s\t%d\t%+.4f\t%+.4f\t%.0f\n", siteName(u.Name), u.Count, u.LatDeg, u.LonDeg, u.HeightM)
			} else {
				fmt.Fprintf(tw, "  %s\t%d\t?\t?\t?\n", siteName(u.Name), u.Count)
			}
		}
		if err := tw.Flush(); err != nil {
			return err
		}
	}

	if len(s.Nights) > 0 {
		p("\nnights (date of the evening, local mean time at the site; * = noon to noon UTC)\n")
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "  date\tsite\tobs\tfirst_utc\tspan_min\trate_\"/min\t±\"/min\tpa_deg\ttravelled_\"\tmoving")
		for _, n := range s.Nights {
			date := n.Date
			if !n.LocalTime {
				date += "*"
			}
			rate, sig, pa, trav, moving := "-", "-", "-", "-", "-"
			if n.HasRate {
				rate = fmt.Sprintf("%.3f", n.RateArcsecPerMin)
				sig = fmt.Sprintf("%.3f", n.RateSigmaArcsecPerMin)
				pa = fmt.Sprintf("%.1f", n.PADeg)
				trav = fmt.Sprintf("%.1f", n.TravelledArcsec)
				moving = "no"
				if n.Moving {
					moving = "yes"
				}
			}
			fmt.Fprintf(tw, "  %s\t%s\t%d\t%s\t%.1f\t%s\t%s\t%s\t%s\t%s\n", date, siteName(n.Site), n.Count,
				astro.FormatISO8601(n.First, 0), n.SpanMin, rate, sig, pa, trav, moving)
		}
		if err := tw.Flush(); err != nil {
			return err
		}
	}

	p("\nwarnings\n")
	noted := map[int]bool{}
	noMotion := false
	for _, n := range s.Warnings {
		switch n.Code {
		case "duplicate":
			noted[n.Line] = true
		case "no-motion-arc", "few-observations":
			noMotion = true
		}
	}
	var reader []string
	for _, r := range set.Warnings {
		if r.Line > 0 && noted[r.Line] || r.Line == 0 && noMotion && strings.Contains(r.Msg, obs.ErrNoMotion.Error()) {
			continue
		}
		reader = append(reader, r.String())
	}
	if len(s.Warnings) == 0 && len(reader) == 0 {
		p("  none\n")
	}
	for _, n := range s.Warnings {
		p("  %s\n", n.Msg)
	}
	for _, r := range reader {
		p("  %s\n", r)
	}
	return nil
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

func siteName(s string) string {
	if s == "" {
		return "(none)"
	}
	return s
}
