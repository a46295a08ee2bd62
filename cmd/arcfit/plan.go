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
	"sort"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"github.com/spf13/pflag"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/ephem"
	"arcfit/fit"
	"arcfit/fit/plan"
)

// planCmdOptions are the options of the plan command.
type planCmdOptions struct {
	modelOptions         // sites, site and the fit flags (for the obs targets)
	targets      string  // the TARGETS file
	date, tz     string  // --date, --tz
	minAltDeg    float64 // --min-alt
	fovArcmin    float64 // --fov
	sigma        float64 // --sigma
	limitMag     float64 // --limit-mag (0: none)
	slot         string  // --slot
	nextNights   int     // --next-nights
	json, csv    bool
	changed      map[string]bool
}

func planCommand() *command {
	return &command{
		name:    "plan",
		summary: "a night's schedule for many targets: windows, best times, conflicts",
		usage: "arcfit plan TARGETS --date DATE --site SITE [--sites FILE] [--tz ZONE] [--min-alt DEG] [--fov ARCMIN]\n" +
			"            [--sigma N] [--limit-mag MAG] [--slot DUR] [--next-nights N] [--json | --csv]",
		about: "Makes one night's observing schedule for an observing club: for every target listed in TARGETS, the " +
			"window in which it stands above --min-alt during astronomical darkness on the night that begins on the " +
			"evening of DATE at the site, its best time (highest altitude) with altitude and azimuth, where to point " +
			"(ICRS astrometric RA/Dec), its predicted magnitude against --limit-mag, the size of the --sigma search " +
			"region (arcminutes, and fields of --fov) and its rate of motion, as the night command gives them for one " +
			"target. The observable targets are listed in the order of their best times. Each gets a slot of --slot " +
			"telescope time (one hour by default) centred on its best time and moved to lie within its window; two " +
			"targets conflict when their slots overlap, for one telescope cannot take both at their best: the " +
			"conflicts are listed, and each target names those it conflicts with. Targets that cannot be observed that " +
			"night follow, each with the reason (near the Sun, no darkness, below the limit, the prediction failing) " +
			"and, with --next-nights, the next nights when they can; a target within 15° of the Sun is below the " +
			"horizon whenever the sky is dark, so it gets no pointing, and standard error carries the caution that " +
			"pointing near the Sun can blind and destroy equipment. A target whose file is missing or cannot be read " +
			"is reported with its line of TARGETS, on standard error and in the output; the others are scheduled all " +
			"the same, and the exit status is then 2. TARGETS lists one target a line: \"obs FILE\" (an observation " +
			"file, fitted as fit does, with the fit flags given here), \"fit FILE\" (a fit file saved by fit --save) " +
			"or \"elements FILE [NAME]\" (an element set of an orbital-elements CSV; NAME, the rest of the line, is " +
			"not needed when the file holds one). Paths are relative to the directory of TARGETS; a file or name " +
			"holding blanks is written in double quotes; a line starting with # is a comment. Times are local (--tz, " +
			"or the site's local mean solar time) and UTC; targets are planned on a worker per core.",
		example: "arcfit plan club-targets.txt --date 2027-02-20 --site 44.52,-72.80,410 --tz America/New_York --limit-mag 19.5\n" +
			`arcfit plan club-targets.txt --date 2027-02-20 --site "Alder Ridge" --sites sites.csv --slot 45m --json`,
		flags: func() *pflag.FlagSet { return planFlags(&planCmdOptions{}, io.Discard) },
		run: func(args []string, io streams) error {
			var o planCmdOptions
			fs := planFlags(&o, io.Err)
			if err := parseFlags(fs, args); err != nil {
				return err
			}
			o.distanceSet = fs.Changed("distance")
			o.changed = map[string]bool{}
			fs.Visit(func(f *pflag.Flag) { o.changed[f.Name] = true })
			switch fs.NArg() {
			case 1:
				o.targets = fs.Arg(0)
			case 0:
				return usagef("no TARGETS file given: a file listing the targets, one a line (run \"arcfit plan --help\")")
			default:
				return usagef("one TARGETS file at a time, got %d: %s", fs.NArg(), strings.Join(fs.Args(), " "))
			}
			return runPlan(o, io)
		},
	}
}

// planFlags binds the plan flags to o.
func planFlags(o *planCmdOptions, stderr io.Writer) *pflag.FlagSet {
	fs := newFlagSet("plan", stderr)
	fs.StringVar(&o.date, "date", "", "civil `date` of the evening, YYYY-MM-DD, in local time")
	fs.StringVar(&o.site, "site", "", "observing `site`: a name in --sites, or lat_deg,lon_deg,height_m; also the site of observation rows that name none")
	fs.StringVar(&o.tz, "tz", "", "local time `zone`, an IANA name such as America/Denver (default: the site's local mean time)")
	fs.Float64Var(&o.minAltDeg, "min-alt", plan.DefaultMinAlt.Degrees(), "lowest altitude in `degrees` at which a target counts as observable")
	fs.Float64Var(&o.fovArcmin, "fov", plan.DefaultFOVArcmin, "field of view in `arcmin`, to give the search regions in fields")
	fs.Float64Var(&o.sigma, "sigma", plan.DefaultSigma, "`level` of the search ellipses, in standard deviations")
	fs.Float64Var(&o.limitMag, "limit-mag", 0, "faintest `magnitude` the telescope reaches: fainter targets are flagged (default: no limit)")
	fs.StringVar(&o.slot, "slot", "1h", "telescope `time` given to each target, centred on its best time: 1h, 45m, 1h30m")
	fs.IntVar(&o.nextNights, "next-nights", 0, "for each target not observable, list up to `N` later nights when it is, searching up to 60 nights ahead")
	modelFlags(fs, &o.modelOptions)
	fs.BoolVar(&o.json, "json", false, "print one JSON object: the night, the rows in schedule order and the conflicts")
	fs.BoolVar(&o.csv, "csv", false, "print the rows as CSV with a header (the JSON rows' fields)")
	return fs
}

// scheduleOptions checks the flags and returns the schedule's options
// (without the location).
func (o planCmdOptions) scheduleOptions() (plan.ScheduleOptions, error) {
	so := plan.DefaultScheduleOptions()
	if !(o.minAltDeg >= 0 && o.minAltDeg <= plan.MaxMinAlt.Degrees()) {
		return so, usagef("--min-alt %v: want an altitude from 0 to %g degrees", o.minAltDeg, plan.MaxMinAlt.Degrees())
	}
	if !(o.fovArcmin > 0) || math.IsInf(o.fovArcmin, 0) {
		return so, usagef("--fov %v: want a positive field of view in arcmin", o.fovArcmin)
	}
	if err := checkSigma(o.sigma); err != nil {
		return so, err
	}
	if o.changed["limit-mag"] && !(o.limitMag > 0 && o.limitMag <= plan.MaxLimitMag) {
		return so, usagef("--limit-mag %v: want a magnitude above 0 and at most %g", o.limitMag, plan.MaxLimitMag)
	}
	slot, err := parseStep(o.slot)
	if err != nil || slot < plan.MinSlot || slot > plan.MaxSlot {
		return so, usagef("--slot %q: want a duration from 1m to 24h, such as 1h or 45m", o.slot)
	}
	if o.nextNights < 0 || o.nextNights > maxNextNights {
		return so, usagef("--next-nights %d: want 0 to %d", o.nextNights, maxNextNights)
	}
	so.Night.MinAlt, so.Night.FOVArcmin, so.Night.Sigma = astro.AngleFromDegrees(o.minAltDeg), o.fovArcmin, o.sigma
	so.Night.NextNights = o.nextNights
	so.Slot, so.LimitMag = slot, o.limitMag
	return so, nil
}

// runPlan reads the targets, makes the schedule and prints it.
func runPlan(o planCmdOptions, io streams) error {
	if o.json && o.csv {
		return usagef("--json and --csv exclude each other")
	}
	if _, err := o.check(); err != nil {
		return err
	}
	if _, err := o.settings(); err != nil {
		return err
	}
	so, err := o.scheduleOptions()
	if err != nil {
		return err
	}
	d, err := parseNightDate(o.date)
	if err != nil {
		return err
	}
	if o.site == "" {
		return usagef("no --site given: the schedule needs a site, a name in --sites or lat_deg,lon_deg,height_m")
	}
	sites, err := readSites(o.sitesFile)
	if err != nil {
		return err
	}
	name, merged, err := resolveSiteFlag(o.site, sites)
	if err != nil {
		return err
	}
	site := merged[name]
	site.Name = name
	if so.Night.Location, err = nightLocation(o.tz, &site); err != nil {
		return err
	}
	lines, warns, err := plan.ReadTargetsFile(o.targets)
	if err != nil {
		var pe *obs.ParseError
		if errors.As(err, &pe) {
			return inputError(err)
		}
		return inputError(errors.New(strings.TrimPrefix(err.Error(), "plan: ")))
	}
	items := make([]plan.ScheduleItem, len(lines))
	for i, tl := range lines {
		items[i] = o.scheduleItem(tl, sites)
	}
	s, err := plan.ScheduleNight(items, d, site, so)
	if err != nil {
		return nightError(err)
	}
	v := planView{s: s, lines: lines, night: newNightView(s.Sky, o.tz == "", strings.Join(s.Warnings, "; "))}
	v.number()

	var buf bytes.Buffer // the whole output first: nothing half-written on error
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
	for _, w := range warns {
		fmt.Fprintf(io.Err, "arcfit plan: %s\n", oneLine(w.String()))
	}
	for _, w := range s.Warnings {
		fmt.Fprintf(io.Err, "arcfit plan: warning: %s\n", oneLine(w))
	}
	for _, e := range s.Entries {
		for _, w := range e.Warnings {
			fmt.Fprintf(io.Err, "arcfit plan: warning: %s: %s\n", e.Source, oneLine(w))
		}
		if e.Plan != nil {
			for _, c := range e.Plan.Cautions {
				fmt.Fprintf(io.Err, "arcfit plan: %s: %s\n", e.Source, oneLine(c))
			}
		}
	}
	failed := 0
	for _, e := range s.Entries {
		if e.Status == plan.Failed {
			failed++
			fmt.Fprintf(io.Err, "arcfit plan: %s\n", v.failure(e))
		}
	}
	if _, err := io.Out.Write(buf.Bytes()); err != nil {
		return err
	}
	if failed > 0 {
		return usagef("%d of %d targets could not be read (see above); the others are scheduled", failed, len(s.Entries))
	}
	return nil
}

// scheduleItem returns the schedule item of one line of TARGETS: loading
// reads its file as predict does (an observation file is fitted).
func (o planCmdOptions) scheduleItem(tl plan.TargetLine, sites map[string]astro.Site) plan.ScheduleItem {
	name := filepath.Base(tl.File)
	if tl.Kind == plan.TargetElements && tl.Name != "" {
		name = tl.Name
	}
	mo := o.modelOptions
	return plan.ScheduleItem{Name: name, Source: tl.Where(), Load: func() (plan.LoadedTarget, error) {
		po := predictOptions{modelOptions: mo}
		switch tl.Kind {
		case plan.TargetElements:
			po.elementsFile, po.name = tl.Path, tl.Name
		default:
			data, err := readInput(tl.Path)
			if err != nil {
				return plan.LoadedTarget{}, err
			}
			switch isFit := fit.IsFitFile(data); {
			case tl.Kind == plan.TargetObs && isFit:
				return plan.LoadedTarget{}, fmt.Errorf("%s is a fit file: list it as \"fit %s\"", tl.File, tl.File)
			case tl.Kind == plan.TargetFit && !isFit:
				return plan.LoadedTarget{}, fmt.Errorf("%s is not a fit file saved by fit --save: list observations as \"obs %s\"", tl.File, tl.File)
			}
			po.file = tl.Path
		}
		src, err := predictSource(po, sites)
		if err != nil {
			return plan.LoadedTarget{}, err
		}
		lt := plan.LoadedTarget{Model: src.model, Warnings: src.warnings}
		if src.elements != nil {
			lt.Target, lt.Name = plan.ElementsTarget{Elements: *src.elements}, src.elements.Name
		} else {
			lt.Target = src.saved
		}
		return lt, nil
	}}
}

// planView is a schedule ready to print.
type planView struct {
	s     *plan.Schedule
	lines []plan.TargetLine
	night nightView
	order map[int]int // entry Index → its number in the listing (1-based)
}

// number numbers the entries in schedule order.
func (v *planView) number() {
	v.order = map[int]int{}
	for k, e := range v.s.Entries {
		v.order[e.Index] = k + 1
	}
}

// failure is the one-line report of a failed target: where it is listed,
// what it is, and why it failed.
func (v planView) failure(e plan.ScheduleEntry) string {
	tl := v.lines[e.Index]
	return fmt.Sprintf("%s:%d:%d: %s %s: %s", tl.Source, tl.Line, tl.FileColumn, tl.Kind, tl.File, oneLine(strings.TrimPrefix(e.Err.Error(), "plan: ")))
}

// hm formats an instant as local hours and minutes.
func (v planView) hm(t astro.JD) string { return v.night.n.Local(t).Round(time.Minute).Format("15:04") }

// conflictOrders returns the numbers of the entries e conflicts with, in
// increasing order.
func (v planView) conflictOrders(e plan.ScheduleEntry) []int {
	ks := []int{}
	for _, i := range e.Conflicts {
		ks = append(ks, v.order[i])
	}
	sort.Ints(ks)
	return ks
}

// conflictText lists the numbers of the entries e conflicts with.
func (v planView) conflictText(e plan.ScheduleEntry) string {
	var ns []string
	for _, k := range v.conflictOrders(e) {
		ns = append(ns, strconv.Itoa(k))
	}
	return strings.Join(ns, ", ")
}

func (v planView) writeText(w io.Writer) error {
	s := v.s
	pf := func(format string, a ...any) { fmt.Fprintf(w, format, a...) }
	n := s.Sky
	pf("Schedule for the night of %v at %s\n", s.Date, siteLine(&s.Site))
	pf("local time: %s\n", v.night.zoneName())
	if h := n.DarkHours(); h > 0 {
		pf("dark window: %.1f h, %s to %s local (%s to %s UTC)\n", h, v.hm(n.DarkStart), v.hm(n.DarkEnd), hmUTC(n.DarkStart), hmUTC(n.DarkEnd))
	} else {
		pf("dark window: none (%s)\n", n.DarkReason)
	}
	pf("Moon at local midnight: %.0f%% illuminated, %s\n", 100*n.MoonIllumination, n.MoonPhaseName)
	o := s.Options
	limit := "no magnitude limit"
	if o.LimitMag > 0 {
		limit = fmt.Sprintf("limiting magnitude %g", o.LimitMag)
	}
	pf("limit %g° altitude; a %s slot for each target; %g-σ search regions against a %g′ field; %s\n",
		o.Night.MinAlt.Degrees(), fmtDuration(o.Slot), o.Night.Sigma, o.Night.FOVArcmin, limit)
	sc, no, failed := s.Counts()
	pf("%d target%s: %d observable, %d not observable, %d could not be read\n\n", len(s.Entries), plural(len(s.Entries)), sc, no, failed)

	if sc > 0 {
		pf("Schedule, by best time (local time):\n")
		var table bytes.Buffer
		tw := tabwriter.NewWriter(&table, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "  #\ttarget\tbest\tUTC\talt°\taz°\twindow\tslot\tRA\tDec\tmag\tregion′\tfields\t″/min\tnotes")
		for _, e := range s.Entries {
			if e.Status != plan.Scheduled {
				continue
			}
			b := e.Plan.Best
			mag := "?"
			if e.MagKnown {
				mag = fmt.Sprintf("%.1f", b.Prediction.Mag)
			}
			region, fields := "point", "-"
			if b.Ellipse.SemiMajorArcsec > 0 {
				region, fields = fmt.Sprintf("%.1f", b.RegionArcmin), fmt.Sprintf("%.2f", b.RegionFields)
			}
			var notes []string
			if e.Fainter {
				notes = append(notes, fmt.Sprintf("fainter than %g", o.LimitMag))
			}
			if c := v.conflictText(e); c != "" {
				notes = append(notes, "conflicts with "+c)
			}
			if b.Prediction.BeyondHorizon {
				notes = append(notes, "beyond the fit's horizon")
			}
			if b.RegionFields > 1 {
				notes = append(notes, "region wider than the field")
			}
			fmt.Fprintf(tw, "  %d\t%s\t%s\t%s\t%.1f\t%.0f\t%s–%s\t%s–%s\t%s\t%s\t%s\t%s\t%s\t%.3g\t%s\n", v.order[e.Index], e.Name,
				v.hm(b.UTC), hmUTC(b.UTC), b.Pointing.Alt.Degrees(), b.Pointing.Az.Degrees(),
				v.hm(e.Plan.Window.Start), v.hm(e.Plan.Window.End), v.hm(e.Slot.Start), v.hm(e.Slot.End),
				astro.FormatHMS(b.Prediction.RA, 1), astro.FormatDMS(b.Prediction.Dec, 0), mag, region, fields,
				b.Prediction.RateArcsecPerMin, strings.Join(notes, "; "))
		}
		if err := tw.Flush(); err != nil {
			return err
		}
		for _, l := range strings.SplitAfter(table.String(), "\n") {
			pf("%s", strings.TrimRight(l, " \n")+strings.Repeat("\n", strings.Count(l, "\n")))
		}
		pf("\n")
	}
	if len(s.Conflicts) > 0 {
		pf("Conflicts (their slots overlap: one telescope cannot take both at their best):\n")
		for _, c := range s.Conflicts {
			a, b := s.Entry(c.A), s.Entry(c.B)
			pf("  %d %s and %d %s: %s to %s local\n", v.order[c.A], a.Name, v.order[c.B], b.Name, v.hm(c.Start), v.hm(c.End))
		}
		pf("\n")
	} else if sc > 1 {
		pf("No conflicts: no two slots overlap.\n\n")
	}
	if no > 0 {
		pf("Not observable on this night:\n")
		for _, e := range s.Entries {
			if e.Status != plan.NotObservable {
				continue
			}
			pf("  %d %s (%s): %s.\n", v.order[e.Index], e.Name, e.Source, e.Plan.Why)
			if e.Plan.NearSun {
				pf("    No pointing: within %.0f° of the Sun (see the caution).\n", ephem.NearSunLimit.Degrees())
			}
			if o.Night.NextNights > 0 {
				if len(e.Plan.NextNights) == 0 {
					pf("    Not observable on the next %d nights either.\n", e.Plan.SearchedNights)
				}
				for _, nn := range e.Plan.NextNights {
					pf("    next: %v, best %s UTC at %.1f°\n", nn.Date, minuteUTC(nn.Best), nn.BestAlt.Degrees())
				}
			}
		}
		pf("\n")
	}
	if failed > 0 {
		pf("Could not be read:\n")
		for _, e := range s.Entries {
			if e.Status == plan.Failed {
				pf("  %d %s\n", v.order[e.Index], v.failure(e))
			}
		}
		pf("\n")
	}
	return nil
}

// planRowJSON is one row of plan --json and --csv: a target, in schedule
// order. Null stands for what does not apply (no window for a target that is
// not observable, no magnitude when unknown).
type planRowJSON struct {
	Order            int      `json:"order"`
	Line             int      `json:"line"`
	Source           string   `json:"source"`
	Kind             string   `json:"kind"`
	File             string   `json:"file"`
	Target           string   `json:"target"`
	Model            string   `json:"model"`
	Status           string   `json:"status"`
	Reason           *string  `json:"reason"`
	ReasonText       string   `json:"reason_text"`
	Error            *string  `json:"error"`
	BestTimeUTC      *string  `json:"best_time_utc"`
	BestTimeLocal    *string  `json:"best_time_local"`
	BestAltDeg       *float64 `json:"best_alt_deg"`
	BestAzDeg        *float64 `json:"best_az_deg"`
	Airmass          *float64 `json:"airmass"`
	WindowStartUTC   *string  `json:"window_start_utc"`
	WindowEndUTC     *string  `json:"window_end_utc"`
	SlotStartUTC     *string  `json:"slot_start_utc"`
	SlotEndUTC       *string  `json:"slot_end_utc"`
	RADeg            *float64 `json:"ra_deg"`
	DecDeg           *float64 `json:"dec_deg"`
	RAAppDeg         *float64 `json:"ra_app_deg"`
	DecAppDeg        *float64 `json:"dec_app_deg"`
	Mag              *float64 `json:"mag"`
	FainterThanLimit bool     `json:"fainter_than_limit"`
	SemiMajorArcsec  *float64 `json:"semi_major_arcsec"`
	SemiMinorArcsec  *float64 `json:"semi_minor_arcsec"`
	PADeg            *float64 `json:"pa_deg"`
	RegionArcmin     *float64 `json:"region_arcmin"`
	RegionFields     *float64 `json:"region_fields"`
	RateArcsecPerMin *float64 `json:"rate_arcsec_per_min"`
	RatePADeg        *float64 `json:"rate_pa_deg"`
	MoonSepDeg       *float64 `json:"moon_sep_deg"`
	HighestDarkAlt   *float64 `json:"highest_dark_alt_deg"`
	SunElongationDeg *float64 `json:"sun_elongation_deg"`
	NearSun          bool     `json:"near_sun"`
	BeyondHorizon    bool     `json:"beyond_horizon"`
	ConflictsWith    []int    `json:"conflicts_with"`
	NextNights       []string `json:"next_nights"`
	Cautions         []string `json:"cautions"`
	Warnings         []string `json:"warnings"`
}

// planConflictJSON is one conflict of plan --json.
type planConflictJSON struct {
	A        int    `json:"a"`
	B        int    `json:"b"`
	TargetA  string `json:"target_a"`
	TargetB  string `json:"target_b"`
	StartUTC string `json:"start_utc"`
	EndUTC   string `json:"end_utc"`
}

// planJSON is plan --json.
type planJSON struct {
	Date          string             `json:"date"`
	Site          string             `json:"site"`
	SiteLatDeg    float64            `json:"site_lat_deg"`
	SiteLonDeg    float64            `json:"site_lon_deg"`
	SiteHeightM   float64            `json:"site_height_m"`
	TimeZone      string             `json:"time_zone"`
	LocalMeanTime bool               `json:"local_mean_time"`
	DarkStartUTC  *string            `json:"dark_start_utc"`
	DarkEndUTC    *string            `json:"dark_end_utc"`
	DarkHours     float64            `json:"dark_hours"`
	MoonIllum     float64            `json:"moon_illum"`
	MoonPhase     string             `json:"moon_phase"`
	MinAltDeg     float64            `json:"min_alt_deg"`
	Sigma         float64            `json:"sigma"`
	FovArcmin     float64            `json:"fov_arcmin"`
	LimitMag      *float64           `json:"limit_mag"`
	SlotMinutes   float64            `json:"slot_min"`
	Targets       int                `json:"targets"`
	Scheduled     int                `json:"scheduled"`
	NotObservable int                `json:"not_observable"`
	Failed        int                `json:"failed"`
	Rows          []planRowJSON      `json:"rows"`
	Conflicts     []planConflictJSON `json:"conflicts"`
	Warnings      []string           `json:"warnings"`
}

// row returns the printed row of entry e.
func (v planView) row(e plan.ScheduleEntry) planRowJSON {
	tl := v.lines[e.Index]
	r := planRowJSON{Order: v.order[e.Index], Line: tl.Line, Source: tl.Where(), Kind: tl.Kind.String(), File: tl.File,
		Target: e.Name, Model: e.Model, Status: e.Status.String(), FainterThanLimit: e.Fainter,
		NextNights: []string{}, Cautions: []string{}, Warnings: []string{}}
	for _, w := range e.Warnings {
		r.Warnings = append(r.Warnings, oneLine(w))
	}
	r.ConflictsWith = v.conflictOrders(e)
	if e.Status == plan.Failed {
		msg := v.failure(e)
		r.Error, r.ReasonText = &msg, msg
		return r
	}
	p := e.Plan
	r.Cautions = append(r.Cautions, p.Cautions...)
	r.SunElongationDeg = finite(p.SunElongation.Degrees())
	r.NearSun = p.NearSun
	if ephem.Happens(p.HighestDark) {
		r.HighestDarkAlt = finite(p.HighestDarkAlt.Degrees())
	}
	for _, nn := range p.NextNights {
		r.NextNights = append(r.NextNights, nn.Date.String())
	}
	if e.Status == plan.NotObservable {
		code := p.Reason.String()
		r.Reason, r.ReasonText = &code, p.Why
		return r
	}
	b := p.Best
	r.BestTimeUTC, r.BestTimeLocal = utcText(b.UTC), v.night.localText(b.UTC)
	r.BestAltDeg, r.BestAzDeg, r.Airmass = finite(b.Pointing.Alt.Degrees()), finite(b.Pointing.Az.Degrees()), finite(b.Airmass)
	r.WindowStartUTC, r.WindowEndUTC = utcText(p.Window.Start), utcText(p.Window.End)
	r.SlotStartUTC, r.SlotEndUTC = utcText(e.Slot.Start), utcText(e.Slot.End)
	r.RADeg, r.DecDeg = finite(b.Prediction.RA.Degrees()), finite(b.Prediction.Dec.Degrees())
	r.RAAppDeg, r.DecAppDeg = finite(b.RAApp.Degrees()), finite(b.DecApp.Degrees())
	r.Mag = finite(b.Prediction.Mag)
	r.SemiMajorArcsec, r.SemiMinorArcsec, r.PADeg = finite(b.Ellipse.SemiMajorArcsec), finite(b.Ellipse.SemiMinorArcsec), finite(b.Ellipse.PA.Degrees())
	r.RegionArcmin, r.RegionFields = finite(b.RegionArcmin), finite(b.RegionFields)
	r.RateArcsecPerMin, r.RatePADeg = finite(b.Prediction.RateArcsecPerMin), finite(b.Prediction.RatePA.Degrees())
	r.MoonSepDeg = finite(b.MoonSeparation.Degrees())
	r.BeyondHorizon = b.Prediction.BeyondHorizon
	return r
}

func (v planView) writeJSON(w io.Writer) error {
	s := v.s
	n := s.Sky
	o := s.Options
	sc, no, failed := s.Counts()
	obj := planJSON{Date: s.Date.String(), Site: s.Site.Name, SiteLatDeg: s.Site.Lat.Degrees(), SiteLonDeg: s.Site.Lon.Degrees(),
		SiteHeightM: s.Site.HeightM, TimeZone: n.Location.String(), LocalMeanTime: v.night.meanTime,
		DarkStartUTC: utcText(n.DarkStart), DarkEndUTC: utcText(n.DarkEnd), DarkHours: n.DarkHours(),
		MoonIllum: n.MoonIllumination, MoonPhase: n.MoonPhaseName,
		MinAltDeg: o.Night.MinAlt.Degrees(), Sigma: o.Night.Sigma, FovArcmin: o.Night.FOVArcmin, SlotMinutes: o.Slot.Minutes(),
		Targets: len(s.Entries), Scheduled: sc, NotObservable: no, Failed: failed,
		Rows: []planRowJSON{}, Conflicts: []planConflictJSON{}, Warnings: append([]string{}, s.Warnings...)}
	if o.LimitMag > 0 {
		obj.LimitMag = &o.LimitMag
	}
	for _, e := range s.Entries {
		obj.Rows = append(obj.Rows, v.row(e))
	}
	for _, c := range s.Conflicts {
		obj.Conflicts = append(obj.Conflicts, planConflictJSON{A: v.order[c.A], B: v.order[c.B], TargetA: s.Entry(c.A).Name,
			TargetB: s.Entry(c.B).Name, StartUTC: *utcText(c.Start), EndUTC: *utcText(c.End)})
	}
	return writeJSON(w, obj)
}

// writeCSV writes the JSON rows as CSV: the same fields in the same order,
// null as an empty field, a list joined by ";".
func (v planView) writeCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	for k, e := range v.s.Entries {
		keys, vals, err := flatJSON(v.row(e))
		if err != nil {
			return err
		}
		if k == 0 {
			if err := cw.Write(keys); err != nil {
				return err
			}
		}
		if err := cw.Write(vals); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// flatJSON returns the keys of the JSON object of v in order and its values
// as CSV fields: numbers and booleans as JSON writes them, strings as they
// are, null as "", an array's elements joined by ";".
func flatJSON(v any) (keys, vals []string, err error) {
	data, err := json.Marshal(v)
	if err != nil {
		return nil, nil, err
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	var obj []struct {
		k string
		v json.RawMessage
	}
	if _, err := dec.Token(); err != nil { // {
		return nil, nil, err
	}
	for dec.More() {
		t, err := dec.Token()
		if err != nil {
			return nil, nil, err
		}
		var raw json.RawMessage
		if err := dec.Decode(&raw); err != nil {
			return nil, nil, err
		}
		obj = append(obj, struct {
			k string
			v json.RawMessage
		}{t.(string), raw})
	}
	for _, kv := range obj {
		keys = append(keys, kv.k)
		field, err := csvField(kv.v)
		if err != nil {
			return nil, nil, err
		}
		vals = append(vals, field)
	}
	return keys, vals, nil
}

// csvField turns one JSON value into a CSV field.
func csvField(raw json.RawMessage) (string, error) {
	var x any
	d := json.NewDecoder(bytes.NewReader(raw))
	d.UseNumber()
	if err := d.Decode(&x); err != nil {
		return "", err
	}
	switch t := x.(type) {
	case nil:
		return "", nil
	case string:
		return t, nil
	case []any:
		parts := make([]string, len(t))
		for i, e := range t {
			b, err := json.Marshal(e)
			if err != nil {
				return "", err
			}
			if s, ok := e.(string); ok {
				parts[i] = s
			} else {
				parts[i] = string(b)
			}
		}
		return strings.Join(parts, ";"), nil
	}
	return strings.TrimSpace(string(raw)), nil
}
