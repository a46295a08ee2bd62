package main

import (
	"bytes"
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/spf13/pflag"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit"
)

// predictOptions are the options of the predict command.
type predictOptions struct {
	modelOptions
	at, to, step string  // --at (one time or a comma-separated list, or the start), --to, --step
	sigma        float64 // --sigma: the ellipse level
	fovArcmin    float64 // --fov: the field of view, arcmin
	json, csv    bool
	samples      bool            // --samples: the Monte Carlo samples in the JSON
	elementsFile string          // --elements: a published element set instead of observations
	name         string          // --name: the element set in --elements
	changed      map[string]bool // flags given on the command line
	// times are the instants to predict for, when known before the fit:
	// the auto rule of the orbit models looks at their horizon.
	times []astro.JD
}

// maxPredictRows is the most instants one predict run computes: more is far
// more often a step typed in the wrong unit than a table anyone reads.
const maxPredictRows = 100000

// newPredictCommand returns the predict command.
func newPredictCommand() *command {
	return &command{
		name:    "predict",
		summary: "position and search region at a time",
		usage:   "arcfit predict OBS|FIT|--elements FILE [--name NAME] --at TIME[,TIME…] | --at START --to END --step STEP [--site SITE] [--sigma N] [--json | --csv]",
		about: "Gives where the object will be at the times asked for, seen from a site (from the geocentre when no " +
			"--site is given): the astrometric ICRS right ascension and declination, the search region as an ellipse " +
			"at --sigma standard deviations (semi-axes in arcseconds, position angle of the major axis north through " +
			"east), the rate and direction of motion, and at a site the refracted altitude and azimuth. The input is " +
			"an observation file, which is fitted as fit does (the model chosen by --model), or a fit file saved by " +
			"fit --save; which one is recognised from the content. Instead of either, --elements names a published " +
			"element set (the orbital-elements CSV, with --name choosing the set when the file holds several): its " +
			"search region is a point unless the file states 1-σ columns (sigma_a_au, sigma_e, sigma_i_deg, " +
			"sigma_node_deg, sigma_peri_deg, sigma_m_deg, or sigma_q_au and sigma_tp_days for comets). It says plainly when a time lies beyond the fit's " +
			"validity horizon and when the search region is wider than the field of view (--fov). A target within 15 " +
			"degrees of the Sun is answered with a warning on standard error: pointing a telescope near the Sun can " +
			"blind and destroy equipment. TIME is UTC in ISO 8601 with a zone (2027-02-09T04:00:00Z) or JD and a " +
			"Julian date; STEP is days (d) and a Go duration (h, m, s): 1d, 2h, 30m, 90s, 1d12h.",
		example: "arcfit predict observations.csv --sites sites.csv --at 2027-02-09T04:00:00Z --site \"Alder Ridge\"\n" +
			"arcfit predict demo-fit.json --at 2027-02-09T02:00:00Z --to 2027-02-09T08:00:00Z --step 1h --site 44.52,-72.80,410 --json\n" +
			"arcfit predict --elements elements.csv --name \"Demo-1 (invented)\" --at 2027-03-01T03:00:00Z --site 44.52,-72.80,410",
		flags: func() *pflag.FlagSet { return predictFlags(&predictOptions{}, io.Discard) },
		run: func(args []string, io streams) error {
			var o predictOptions
			fs := predictFlags(&o, io.Err)
			if err := parseFlags(fs, args); err != nil {
				return err
			}
			o.distanceSet = fs.Changed("distance")
			o.changed = map[string]bool{}
			fs.Visit(func(f *pflag.Flag) { o.changed[f.Name] = true })
			switch fs.NArg() {
			case 1:
				if o.elementsFile != "" {
					return usagef("give an observation or fit file, or --elements, not both (got %s and --elements %s)", fs.Arg(0), o.elementsFile)
				}
				o.file = fs.Arg(0)
			case 0:
				if o.elementsFile != "" {
					break
				}
				if o.name != "" {
					return usagef("--name %q needs --elements FILE", o.name)
				}
				return usagef("no observation or fit file given (run \"arcfit predict --help\")")
			default:
				return usagef("one file at a time, got %d: %s", fs.NArg(), strings.Join(fs.Args(), " "))
			}
			return runPredict(o, io)
		},
	}
}

// predictFlags binds the predict flags to o.
func predictFlags(o *predictOptions, stderr io.Writer) *pflag.FlagSet {
	fs := newFlagSet("predict", stderr)
	fs.StringVar(&o.at, "at", "", "UTC `time`, or times separated by commas, or the first time of a range with --to and --step")
	fs.StringVar(&o.to, "to", "", "last UTC `time` of a range")
	fs.StringVar(&o.step, "step", "", "`step` of a range: 1d, 2h, 30m, 90s")
	fs.StringVar(&o.site, "site", "", "`site` to predict for, and of rows that name none: a name in --sites or the fit file, or lat_deg,lon_deg,height_m")
	fs.Float64Var(&o.sigma, "sigma", 3, "`level` of the search ellipse, in standard deviations")
	fs.Float64Var(&o.fovArcmin, "fov", 30, "field of view in `arcmin`, to say when the search region is wider")
	modelFlags(fs, &o.modelOptions)
	fs.BoolVar(&o.json, "json", false, "print JSON: one object for one time, an object with a rows array for several")
	fs.BoolVar(&o.csv, "csv", false, "print the predictions as CSV with a header")
	fs.BoolVar(&o.samples, "samples", false, "with --json, list the sampled orbits' places when the region comes from Monte Carlo sampling")
	fs.StringVar(&o.elementsFile, "elements", "", "orbital-elements CSV `file` to predict from, instead of observations")
	fs.StringVar(&o.name, "name", "", "`name` of the element set in --elements (not needed when it holds one)")
	return fs
}

// JD limits of --at: 1800–2200, the span the time scales support
// (design.md).
const (
	minInstantJD = 2378496.5 // 1800-01-01 0h
	maxInstantJD = 2524958.5 // 2201-01-01 0h: the whole of 2200, as ephem.TableLastJD
)

// instantWant says what a time option takes.
const instantWant = "want a UTC time in ISO 8601 with a zone (2027-02-09T04:00:00Z) or JD and a Julian date (JD 2461445.66667)"

// parseInstant reads a UTC instant given to the option flag.
func parseInstant(flag, s string) (astro.JD, error) {
	t := strings.TrimSpace(s)
	if len(t) >= 2 && strings.EqualFold(t[:2], "JD") {
		v, err := strconv.ParseFloat(strings.TrimSpace(t[2:]), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return astro.JD{}, usagef("%s %q: %s", flag, s, instantWant)
		}
		if v < minInstantJD || v >= maxInstantJD {
			return astro.JD{}, usagef("%s %q: want a date between 1800 and 2200", flag, s)
		}
		day := math.Floor(v-0.5) + 0.5
		return astro.JD{Day: day, Frac: v - day, Scale: astro.UTC}, nil
	}
	j, err := astro.ParseISO8601(t)
	if err != nil {
		if _, ferr := strconv.ParseFloat(t, 64); ferr == nil {
			return astro.JD{}, usagef("%s %q: %s (a Julian date needs its prefix: JD %s)", flag, s, instantWant, t)
		}
		return astro.JD{}, usagef("%s %q: %s: %v", flag, s, instantWant, err)
	}
	if f := j.Float(); f < minInstantJD || f >= maxInstantJD {
		return astro.JD{}, usagef("%s %q: want a date between 1800 and 2200", flag, s)
	}
	return j, nil
}

// predictTimes returns the instants the options ask for.
func predictTimes(o predictOptions) ([]astro.JD, error) {
	if strings.TrimSpace(o.at) == "" {
		return nil, usagef("--at: want the time to predict for (run \"arcfit predict --help\")")
	}
	if o.to != "" || o.step != "" {
		if o.to == "" || o.step == "" {
			return nil, usagef("a range needs --at START, --to END and --step STEP")
		}
		if strings.Contains(o.at, ",") {
			return nil, usagef("--at %q: a range starts at one time, not a list", o.at)
		}
		from, err := parseInstant("--at", o.at)
		if err != nil {
			return nil, err
		}
		to, err := parseInstant("--to", o.to)
		if err != nil {
			return nil, err
		}
		stepDur, err := parseStep(o.step)
		step := stepDur.Hours() / 24
		if err != nil {
			return nil, err
		}
		span := to.Sub(from)
		if span < 0 {
			return nil, usagef("--to %s is before --at %s", o.to, o.at)
		}
		if span/step+1 > maxPredictRows {
			return nil, usagef("--step %s from %s to %s gives %.0f rows, more than %d (is the step in the unit meant?)", o.step, o.at, o.to, math.Floor(span/step)+1, maxPredictRows)
		}
		ts, err := ephem.TableTimes(from, to, step)
		if err != nil {
			return nil, usagef("%v", err)
		}
		return ts, nil
	}
	var out []astro.JD
	for _, part := range strings.Split(o.at, ",") {
		t, err := parseInstant("--at", part)
		if err != nil {
			return nil, err
		}
		out = append(out, t)
	}
	if len(out) > maxPredictRows {
		return nil, usagef("--at: more than %d times", maxPredictRows)
	}
	return out, nil
}

// ellipseJSON is a search ellipse.
type ellipseJSON struct {
	Sigma           float64 `json:"sigma"`
	SemiMajorArcsec float64 `json:"semi_major_arcsec"`
	SemiMinorArcsec float64 `json:"semi_minor_arcsec"`
	PADeg           float64 `json:"pa_deg"`
}

// predictionJSON is one prediction as predict prints it.
type predictionJSON struct {
	TimeUTC          string      `json:"time_utc"`
	Site             *string     `json:"site"` // null: the geocentre
	Model            string      `json:"model"`
	RADeg            float64     `json:"ra_deg"`
	DecDeg           float64     `json:"dec_deg"`
	RA               string      `json:"ra"`
	Dec              string      `json:"dec"`
	Ellipse          ellipseJSON `json:"ellipse"`
	AltDeg           *float64    `json:"alt_deg"`
	AzDeg            *float64    `json:"az_deg"`
	RateArcsecPerMin float64     `json:"rate_arcsec_per_min"`
	RatePADeg        float64     `json:"rate_pa_deg"`
	BeyondHorizon    bool        `json:"beyond_horizon"`
	HorizonDays      *float64    `json:"horizon_days"`
	NearSun          bool        `json:"near_sun"`
	SunElongationDeg float64     `json:"sun_elongation_deg"`
	SunAltDeg        *float64    `json:"sun_alt_deg"`
	RegionFields     *float64    `json:"region_fields"` // major axis / field of view
	Mag              *float64    `json:"mag"`           // null: unknown
	DeltaAU          *float64    `json:"delta_au"`      // null: unknown
	// Method is how the region was found: "linear" or "montecarlo".
	Method string `json:"region_method"`
	// Samples are the sampled orbits' places as offsets from ra, dec
	// (arcsec, RA·cos δ east and Dec north), with --samples only.
	Samples       [][2]float64 `json:"samples_offset_arcsec,omitempty"`
	SampleWeights []float64    `json:"samples_weight,omitempty"`
	// Encounters are the perturbed orbit's close approaches from its epoch
	// through the arc to the time (model nbody only; one time).
	Encounters *[]encounterJSON `json:"encounters,omitempty"`
}

// predictionRecord turns a prediction into its printed record, with the
// ellipse at sigma and, when fovArcmin > 0, the region's width in fields.
func predictionRecord(p fit.Prediction, sigma, fovArcmin float64) (predictionJSON, error) {
	pt, err := fit.PointingOf(p)
	if err != nil {
		return predictionJSON{}, err
	}
	e := p.Ellipse(sigma)
	r := predictionJSON{
		TimeUTC:          astro.FormatISO8601(p.UTC, 2),
		Model:            p.Model,
		RADeg:            p.RA.Degrees(),
		DecDeg:           p.Dec.Degrees(),
		RA:               astro.FormatHMS(p.RA, 3),
		Dec:              astro.FormatDMS(p.Dec, 2),
		Ellipse:          ellipseJSON{Sigma: sigma, SemiMajorArcsec: e.SemiMajorArcsec, SemiMinorArcsec: e.SemiMinorArcsec, PADeg: e.PA.Degrees()},
		RateArcsecPerMin: p.RateArcsecPerMin,
		RatePADeg:        p.RatePA.Degrees(),
		BeyondHorizon:    p.BeyondHorizon,
		HorizonDays:      finite(p.HorizonDays),
		NearSun:          pt.NearSun,
		SunElongationDeg: pt.SunElongation.Degrees(),
		Mag:              finite(p.Mag),
		DeltaAU:          finite(p.DeltaAU),
		Method:           p.Method,
	}
	if p.Site != nil {
		name := p.Site.Name
		r.Site = &name
		r.AltDeg, r.AzDeg = finite(pt.Alt.Degrees()), finite(pt.Az.Degrees())
		r.SunAltDeg = finite(pt.SunAlt.Degrees())
	}
	if fovArcmin > 0 {
		r.RegionFields = finite(2 * e.SemiMajorArcsec / (fovArcmin * 60))
	}
	return r, nil
}

// predictTableJSON is predict --json for several times.
type predictTableJSON struct {
	File      string           `json:"file"`
	Site      *string          `json:"site"`
	Model     string           `json:"model"`
	Sigma     float64          `json:"sigma"`
	FovArcmin float64          `json:"fov_arcmin"`
	Rows      []predictionJSON `json:"rows"`
	// Encounters: as predictionJSON's, through the last time (model nbody).
	Encounters *[]encounterJSON `json:"encounters,omitempty"`
}

// fitOnlyFlags are the options that act on fitting and so mean nothing for
// a fit file.
var fitOnlyFlags = []string{"model", "keep-all", "distance", "no-parallax", "format", "obs-sigma"}

// runPredict predicts at the times asked for and prints the predictions.
func runPredict(o predictOptions, io streams) error {
	if o.json && o.csv {
		return usagef("--json and --csv exclude each other")
	}
	if _, err := o.check(); err != nil {
		return err
	}
	if _, err := o.settings(); err != nil {
		return err
	}
	if err := checkSigma(o.sigma); err != nil {
		return err
	}
	if o.samples && !o.json {
		return usagef("--samples lists the samples in the JSON: give --json too")
	}
	if !(o.fovArcmin > 0) || math.IsInf(o.fovArcmin, 0) {
		return usagef("--fov %v: want a positive field of view in arcmin", o.fovArcmin)
	}
	times, err := predictTimes(o)
	if err != nil {
		return err
	}
	sites, err := readSites(o.sitesFile)
	if err != nil {
		return err
	}
	o.times = times
	src, err := predictSource(o, sites)
	if err != nil {
		return err
	}
	var encounters *[]encounterJSON
	if of := src.orbit(); of != nil {
		if isTerminal(io.Err) {
			of.MonteCarlo.Progress = progressBar(io.Err, "sampling orbits")
		}
		// A perturbed orbit integrates itself and its samples once to all
		// the times.
		if err := of.Prepare(times); err != nil {
			return inputError(fmt.Errorf("%s: %v", src.file, err))
		}
		if es := encounterRecords(of, times); es != nil {
			encounters = &es
		}
	}
	site := siteForPrediction(o.site, src.sites)

	recs := make([]predictionJSON, 0, len(times))
	for _, t := range times {
		p, err := src.predict(t, site)
		if err != nil {
			return inputError(fmt.Errorf("%s: %v", src.file, err))
		}
		r, err := predictionRecord(p, o.sigma, o.fovArcmin)
		if err != nil {
			return inputError(fmt.Errorf("%s: %v", src.file, err))
		}
		if o.samples {
			r.Samples, r.SampleWeights = p.Samples, p.SampleWeights
		}
		recs = append(recs, r)
	}
	saved, warnings := src.saved, src.warnings

	var buf bytes.Buffer // whole output first: nothing half-written on error
	switch {
	case o.json && len(recs) == 1:
		r := recs[0]
		r.Encounters = encounters
		err = writeJSON(&buf, r)
	case o.json:
		t := predictTableJSON{File: src.file, Model: src.model, Sigma: o.sigma, FovArcmin: o.fovArcmin, Rows: recs, Encounters: encounters}
		if site != nil {
			name := site.Name
			t.Site = &name
		}
		err = writeJSON(&buf, t)
	case o.csv:
		err = writePredictCSV(&buf, recs)
	default:
		err = writePredictText(&buf, o, src, site, recs)
		if err == nil && encounters != nil {
			writeEncounters(&buf, "", *encounters)
		}
	}
	if err != nil {
		return err
	}
	for _, w := range warnings {
		fmt.Fprintf(io.Err, "arcfit predict: warning: %s\n", oneLine(w))
	}
	for _, c := range predictCautions(recs, saved, o) {
		fmt.Fprintf(io.Err, "arcfit predict: %s\n", c)
	}
	_, err = io.Out.Write(buf.Bytes())
	return err
}

func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// sourceCheck warns when the observation file a fit file names has changed
// since the fit (its SHA-256 differs); a missing file says nothing.
func sourceCheck(tr *fit.Track) []string {
	if tr.Source == "" || tr.SourceSHA256 == "" {
		return nil
	}
	data, err := os.ReadFile(tr.Source)
	if err != nil {
		return nil
	}
	sum := sha256.Sum256(data)
	if !strings.EqualFold(hex.EncodeToString(sum[:]), tr.SourceSHA256) {
		return []string{fmt.Sprintf("%s has changed since this fit was saved; fit it again to use the new observations", tr.Source)}
	}
	return nil
}

// predictCautions returns the cautions of design.md for the predictions,
// each once with the first time it concerns and how many times do.
func predictCautions(recs []predictionJSON, saved *fit.SavedFit, o predictOptions) []string {
	var out []string
	count := func(f func(r predictionJSON) bool) (int, int) {
		n, first := 0, -1
		for i, r := range recs {
			if f(r) {
				if first < 0 {
					first = i
				}
				n++
			}
		}
		return n, first
	}
	more := func(n int) string {
		if n <= 1 {
			return ""
		}
		return fmt.Sprintf(" (and %d more of the %d times)", n-1, len(recs))
	}
	if n, i := count(func(r predictionJSON) bool { return r.NearSun }); n > 0 {
		out = append(out, fmt.Sprintf("CAUTION: at %s the object is %.1f° from the Sun%s. Pointing a telescope, finder or binoculars near the Sun can blind you and destroy equipment; do not point there while the Sun is up.",
			recs[i].TimeUTC, recs[i].SunElongationDeg, more(n)))
	}
	if n, i := count(func(r predictionJSON) bool { return r.BeyondHorizon }); n > 0 && saved != nil {
		tr := saved.Solution.Track
		first, last := tr.ArcTT()
		t, _ := parseInstant("", recs[i].TimeUTC)
		tt, _ := astro.UTCToTT(t)
		d := tt.Sub(tr.EpochTT)
		side := fmt.Sprintf("%.2f d after the last observation", d-last)
		if d < first {
			side = fmt.Sprintf("%.2f d before the first observation", first-d)
		}
		out = append(out, fmt.Sprintf("caution: %s is %s, beyond the fit's validity horizon of %.2f d%s: the model is not to be trusted there and the object may lie outside the search region.",
			recs[i].TimeUTC, side, ptrVal(recs[i].HorizonDays), more(n)))
	}
	if n, i := count(func(r predictionJSON) bool { return r.RegionFields != nil && *r.RegionFields > 1 }); n > 0 {
		r := recs[i]
		out = append(out, fmt.Sprintf("note: at %s the %g-σ search region is %.1f fields wide (major axis %.1f′ against a %g′ field)%s: plan a mosaic or a wider field.",
			r.TimeUTC, o.sigma, *r.RegionFields, 2*r.Ellipse.SemiMajorArcsec/60, o.fovArcmin, more(n)))
	}
	return out
}

func ptrVal(p *float64) float64 {
	if p == nil {
		return math.NaN()
	}
	return *p
}

// predictCSVHeader is the header of predict --csv: the JSON fields, the
// ellipse flattened.
var predictCSVHeader = []string{"time_utc", "site", "model", "ra_deg", "dec_deg", "sigma", "semi_major_arcsec",
	"semi_minor_arcsec", "pa_deg", "alt_deg", "az_deg", "rate_arcsec_per_min", "rate_pa_deg", "beyond_horizon",
	"horizon_days", "near_sun", "sun_elongation_deg", "sun_alt_deg", "region_fields"}

func writePredictCSV(w io.Writer, recs []predictionJSON) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(predictCSVHeader); err != nil {
		return err
	}
	f := func(v float64, d int) string { return strconv.FormatFloat(v, 'f', d, 64) }
	p := func(v *float64, d int) string {
		if v == nil {
			return ""
		}
		return f(*v, d)
	}
	for _, r := range recs {
		site := ""
		if r.Site != nil {
			site = *r.Site
		}
		rec := []string{r.TimeUTC, site, r.Model, f(r.RADeg, 8), f(r.DecDeg, 8), f(r.Ellipse.Sigma, 2),
			f(r.Ellipse.SemiMajorArcsec, 3), f(r.Ellipse.SemiMinorArcsec, 3), f(r.Ellipse.PADeg, 2),
			p(r.AltDeg, 3), p(r.AzDeg, 3), f(r.RateArcsecPerMin, 4), f(r.RatePADeg, 2),
			strconv.FormatBool(r.BeyondHorizon), p(r.HorizonDays, 3), strconv.FormatBool(r.NearSun),
			f(r.SunElongationDeg, 2), p(r.SunAltDeg, 2), p(r.RegionFields, 3)}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// writePredictText writes the predictions for people: one time as a block,
// several as a table.
func writePredictText(w io.Writer, o predictOptions, src *predictInput, site *astro.Site, recs []predictionJSON) error {
	p := func(format string, a ...any) { fmt.Fprintf(w, format, a...) }
	p("%s\n", src.header)
	where := "the geocentre (no --site given: no altitude)"
	if site != nil {
		where = fmt.Sprintf("%s (%.4f°, %.4f°, %.0f m)", site.Name, site.Lat.Degrees(), site.Lon.Degrees(), site.HeightM)
	}
	if len(recs) == 1 {
		r := recs[0]
		p("time            %s\n", r.TimeUTC)
		p("seen from       %s\n", where)
		p("RA, Dec         %s  %s  (ICRS astrometric; %.6f°, %+.6f°)\n", r.RA, r.Dec, r.RADeg, r.DecDeg)
		p("search region   %g-σ ellipse %.1f\" × %.1f\" (semi-axes), major axis at PA %.1f°; %.2f of a %g′ field\n",
			r.Ellipse.Sigma, r.Ellipse.SemiMajorArcsec, r.Ellipse.SemiMinorArcsec, r.Ellipse.PADeg, ptrVal(r.RegionFields), o.fovArcmin)
		if r.Method == "montecarlo" {
			p("                from sampled orbits propagated to the time (Monte Carlo): the linear propagation is not trusted here\n")
		}
		p("motion          %.3f\"/min toward PA %.1f°\n", r.RateArcsecPerMin, r.RatePADeg)
		if r.DeltaAU != nil {
			p("distance        %.4f au from the observer\n", *r.DeltaAU)
		}
		if r.Mag != nil {
			p("magnitude       %.1f (predicted, V)\n", *r.Mag)
		}
		if r.AltDeg != nil {
			below := ""
			if *r.AltDeg < 0 {
				below = " — below the horizon"
			}
			p("altitude        %.1f° at azimuth %.1f° (refracted, 10 °C, 1010 hPa)%s\n", *r.AltDeg, *r.AzDeg, below)
			p("Sun             %.1f° away, at altitude %.1f°\n", r.SunElongationDeg, ptrVal(r.SunAltDeg))
		} else {
			p("Sun             %.1f° away\n", r.SunElongationDeg)
		}
		if src.saved != nil {
			p("validity        %s\n", horizonWords(r))
		}
		return nil
	}
	p("seen from %s; ellipses at %g σ; field %g′\n", where, o.sigma, o.fovArcmin)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "  time_utc\tra\tdec\tmajor_\"\tminor_\"\tpa_deg\talt_deg\taz_deg\t\"/min\tmotion_pa\tsun_deg\t")
	for _, r := range recs {
		var flags []string
		if r.NearSun {
			flags = append(flags, "NEAR THE SUN")
		}
		if r.BeyondHorizon {
			flags = append(flags, "beyond horizon")
		}
		if r.RegionFields != nil && *r.RegionFields > 1 {
			flags = append(flags, fmt.Sprintf("%.1f fields", *r.RegionFields))
		}
		if r.AltDeg != nil && *r.AltDeg < 0 {
			flags = append(flags, "below horizon")
		}
		if r.Method == "montecarlo" {
			flags = append(flags, "sampled")
		}
		fmt.Fprintf(tw, "  %s\t%s\t%s\t%.1f\t%.1f\t%.1f\t%s\t%s\t%.3f\t%.1f\t%.1f\t%s\n", r.TimeUTC, r.RA, r.Dec,
			r.Ellipse.SemiMajorArcsec, r.Ellipse.SemiMinorArcsec, r.Ellipse.PADeg, ptrNum(r.AltDeg, 1), ptrNum(r.AzDeg, 1),
			r.RateArcsecPerMin, r.RatePADeg, r.SunElongationDeg, strings.Join(flags, ", "))
	}
	return tw.Flush()
}

// horizonWords says whether a prediction lies within the validity horizon.
func horizonWords(r predictionJSON) string {
	switch {
	case r.HorizonDays == nil:
		return "horizon unknown"
	case r.BeyondHorizon:
		return fmt.Sprintf("BEYOND the validity horizon (%.2f d from the arc): do not trust this position", *r.HorizonDays)
	}
	return fmt.Sprintf("within the validity horizon (%.2f d from the arc)", *r.HorizonDays)
}
