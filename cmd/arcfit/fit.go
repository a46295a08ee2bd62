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
	"arcfit/astro/obs"
	"arcfit/cmd/arcfit/chart"
	"arcfit/fit"
)

// modelOptions are the options fit and predict share: where the
// observations and sites come from and how the models are fitted.
type modelOptions struct {
	file           string  // the observation file (or, for predict, a fit file)
	sitesFile      string  // --sites
	site           string  // --site: a name from the sites file or lat,lon,height
	format         string  // --format: "", "csv" or "ades-psv"
	obsSigmaArcsec float64 // --obs-sigma: 1-σ for rows without one
	model          string  // --model: auto, poly1, poly2, poly3, piecewise
	keepAll        bool    // --keep-all: no outlier rejection
	noParallax     bool    // --no-parallax
	distanceAU     float64 // --distance: fixed observer distance, au
	distanceSet    bool    // --distance given
}

// fitOptions are the options of the fit command.
type fitOptions struct {
	modelOptions
	save      string  // --save: the fit file to write
	at        string  // --at: a time for the comparison's predictions
	sigma     float64 // --sigma: the ellipse level
	json, csv bool
	// chart and compareChart are the --chart (residuals) and
	// --compare-chart (the models beyond the arc) files, .png or .svg.
	chart, compareChart string
	many                manyOptions // --jobs, for several files (fitmany.go)
}

// newFitCommand returns the fit command.
func newFitCommand() *command {
	return &command{
		name:    "fit",
		summary: "fit motion models to the observations",
		usage:   "arcfit fit OBS [OBS…|DIR] [--jobs N] [--sites FILE] [--site SITE] [--model auto|poly1|poly2|poly3|piecewise] [--save FIT.json] [--json | --csv]",
		about: "Fits sky-plane motion models to the observations by weighted least squares on the tangent plane at the " +
			"arc's mean direction: straight, quadratic and cubic motion in time (poly1, poly2, poly3) and straight " +
			"segments joined at knots between nights (piecewise), each with the diurnal parallax of the observing " +
			"sites and the object's inverse distance as one more parameter (or a distance given with --distance, or " +
			"none with --no-parallax). Observations far off the fit (2-dof chi-square above 11.83, the 3-sigma " +
			"equivalent) are flagged and listed, never dropped silently; --keep-all keeps them. The models are " +
			"compared by RMS residual, chi-square per degree of freedom, BIC and the error in predicting each night " +
			"from the others; --model auto (the default) picks one and says why. Prints the comparison, the residual " +
			"of every observation, the motion on each night, the condition number and the fitted distance; --save " +
			"writes the chosen fit to a file that predict and night read in place of the observations. --csv prints " +
			"the residual rows.",
		example: "arcfit fit observations.csv --sites sites.csv\n" +
			"arcfit fit observations.csv --sites sites.csv --save demo-fit.json --json",
		flags: func() *pflag.FlagSet { return fitFlags(&fitOptions{}, io.Discard) },
		run: func(args []string, io streams) error {
			var o fitOptions
			fs := fitFlags(&o, io.Err)
			if err := parseFlags(fs, args); err != nil {
				return err
			}
			o.distanceSet = fs.Changed("distance")
			if isFitMany(fs.Args()) {
				return runFitMany(o, fs.Args(), io)
			}
			switch fs.NArg() {
			case 1:
				o.file = fs.Arg(0)
			case 0:
				return usagef("no observation file given (run \"arcfit fit --help\")")
			default:
				return usagef("one observation file at a time, got %d: %s", fs.NArg(), strings.Join(fs.Args(), " "))
			}
			return runFit(o, io)
		},
	}
}

// modelFlags binds the shared options to o.
func modelFlags(fs *pflag.FlagSet, o *modelOptions) {
	fs.StringVar(&o.sitesFile, "sites", "", "`file` of sites, CSV name,lat_deg,lon_deg,height_m (WGS84, east positive)")
	fs.StringVar(&o.format, "format", "", "observation `format`, csv or ades-psv (default: recognised from the content)")
	fs.Float64Var(&o.obsSigmaArcsec, "obs-sigma", 0, "1-sigma uncertainty in `arcsec` for observations without one (default 1)")
	fs.StringVar(&o.model, "model", "auto", "`model`: auto, poly1, poly2, poly3, piecewise, kepler or nbody")
	fs.BoolVar(&o.keepAll, "keep-all", false, "flag no outliers: every observation is used")
	fs.Float64Var(&o.distanceAU, "distance", 0, "fixed distance of the object in `au` for the parallax, instead of fitting it")
	fs.BoolVar(&o.noParallax, "no-parallax", false, "leave the diurnal parallax out (fit the positions as if geocentric)")
}

// fitFlags binds the fit flags to o.
func fitFlags(o *fitOptions, stderr io.Writer) *pflag.FlagSet {
	fs := newFlagSet("fit", stderr)
	modelFlags(fs, &o.modelOptions)
	fs.StringVar(&o.site, "site", "", "`site` of rows that name none, and of the --at prediction: a name in --sites, or lat_deg,lon_deg,height_m")
	fs.StringVar(&o.save, "save", "", "write the chosen fit to this `file` (JSON, written whole or not at all)")
	fs.StringVar(&o.at, "at", "", "UTC `time` (ISO 8601 with Z, or JD and a Julian date) at which to compare the models' predictions")
	fs.Float64Var(&o.sigma, "sigma", 3, "`level` of the search ellipses, in standard deviations")
	fs.StringVar(&o.chart, "chart", "", "also write the chosen model's residuals as a chart to this `file`, .png or .svg")
	fs.StringVar(&o.compareChart, "compare-chart", "", "also write each model's 3-σ region and offset beyond the arc as a chart to this `file`, .png or .svg")
	fs.BoolVar(&o.json, "json", false, "print one JSON object: the fit, the comparison, the residuals and the observations")
	fs.BoolVar(&o.csv, "csv", false, "print the residual of every observation as CSV with a header")
	manyFlags(fs, &o.many)
	return fs
}

// settings turns the parallax options into fit settings.
func (o modelOptions) settings() (fit.Settings, error) {
	s := fit.Settings{KeepAll: o.keepAll}
	switch {
	case o.noParallax && o.distanceSet:
		return s, usagef("--no-parallax and --distance exclude each other")
	case o.noParallax:
		s.Parallax = fit.ParallaxOff
	case o.distanceSet:
		if !(o.distanceAU > 0) || math.IsInf(o.distanceAU, 0) {
			return s, usagef("--distance %v: want a positive distance in au", o.distanceAU)
		}
		s.Parallax, s.InvDistance = fit.ParallaxFixed, 1/o.distanceAU
	}
	return s, nil
}

// checkModelOptions checks the shared options that need no file.
func (o modelOptions) check() (model string, err error) {
	if o.format != "" && o.format != "csv" && o.format != "ades-psv" {
		return "", usagef("--format %q: want csv or ades-psv", o.format)
	}
	if o.obsSigmaArcsec < 0 || math.IsNaN(o.obsSigmaArcsec) || math.IsInf(o.obsSigmaArcsec, 0) {
		return "", usagef("--obs-sigma %v: want a positive number of arcseconds", o.obsSigmaArcsec)
	}
	name, err := fit.ParseModelName(o.model)
	if err != nil {
		return "", usagef("--model %q: want auto, poly1, poly2, poly3, piecewise, kepler or nbody", o.model)
	}
	return name, nil
}

// checkSigma checks an ellipse level.
func checkSigma(v float64) error {
	if !(v > 0) || math.IsInf(v, 0) {
		return usagef("--sigma %v: want a positive number of standard deviations", v)
	}
	return nil
}

// analysis is what fit and predict work out from an observation file.
type analysis struct {
	data     []byte
	set      *obs.Set
	sites    map[string]astro.Site
	track    *fit.Track
	cmp      *fit.Comparison
	saved    *fit.SavedFit
	warnings []string // for stderr, in order
}

// analyse reads the observation file of o (already read into data), builds
// the track, compares the models with predictions at the times at for site,
// and applies --model.
func analyse(o modelOptions, data []byte, at []astro.JD, site *astro.Site, sites map[string]astro.Site, defaultSite string) (*analysis, error) {
	model, err := o.check()
	if err != nil {
		return nil, err
	}
	s, err := o.settings()
	if err != nil {
		return nil, err
	}
	set, err := obs.Read(bytes.NewReader(data), o.file, obs.ReadOptions{
		Format:             o.format,
		DefaultSigmaArcsec: o.obsSigmaArcsec,
		Sites:              sites,
		DefaultSite:        defaultSite,
	})
	if err != nil {
		return nil, inputError(err)
	}
	a := &analysis{data: data, set: set, sites: sites}
	for _, w := range set.Warnings {
		a.warnings = append(a.warnings, w.String())
	}
	tr, err := fit.NewTrack(set, sites)
	if err != nil {
		return nil, inputError(fmt.Errorf("%s: %w", o.file, err))
	}
	if tr.SourceSHA256 == "" {
		sum := sha256.Sum256(data)
		tr.SourceSHA256 = hex.EncodeToString(sum[:])
	}
	a.track = tr
	a.warnings = append(a.warnings, tr.Warnings...)
	models := fit.CandidateModelsWith(tr, s)
	if model == "nbody" {
		models = append(models, fit.NBody()) // fitted by Compare, from the kepler row's orbit
	} else if model != "auto" && !hasModel(models, model) {
		// Not a candidate: fit it alone for the reason (too few
		// observations, no gap for a knot).
		m := fit.Poly(1)
		switch model {
		case "poly2":
			m = fit.Poly(2)
		case "poly3":
			m = fit.Poly(3)
		case "piecewise":
			knots := fit.GapKnots(tr)
			if len(knots) == 0 {
				return nil, usagef("%s: --model piecewise needs a gap between nights to place a knot in; these observations are from %d night%s", o.file, tr.NumNights, plural(tr.NumNights))
			}
			m = fit.Piecewise(knots)
		}
		if _, err := fit.Fit(tr, m, s); err != nil {
			return nil, inputError(fmt.Errorf("%s: %w", o.file, err))
		}
		models = append(models, m)
	}
	c, err := fit.Compare(tr, models, s, at, site)
	if err != nil {
		return nil, inputError(fmt.Errorf("%s: %w", o.file, err))
	}
	if model != "auto" {
		if err := c.Choose(model); err != nil {
			return nil, inputError(fmt.Errorf("%s: %w", o.file, err))
		}
	}
	a.cmp = c
	a.saved = fit.NewSavedFit(c)
	if c.Orbit != nil {
		a.warnings = append(a.warnings, c.Orbit.Warnings...)
	} else {
		a.warnings = append(a.warnings, c.Solution.Notes...)
	}
	return a, nil
}

func hasModel(ms []fit.Model, name string) bool {
	for _, m := range ms {
		if m.Name() == name {
			return true
		}
	}
	return false
}

// siteForPrediction returns the site --site names for predictions (nil for
// the geocentre when none is given).
func siteForPrediction(flag string, sites map[string]astro.Site) *astro.Site {
	if flag == "" {
		return nil
	}
	st, ok := sites[flag]
	if !ok {
		return nil
	}
	if st.Name == "" {
		st.Name = flag
	}
	return &st
}

// readInput reads the file named on the command line, whole.
func readInput(path string) ([]byte, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, inputError(err)
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, fit.MaxFitFileBytes+1))
	if err != nil {
		return nil, inputError(fmt.Errorf("%s: %v", path, err))
	}
	if len(data) > fit.MaxFitFileBytes {
		return nil, usagef("%s: larger than %d MiB", path, fit.MaxFitFileBytes>>20)
	}
	return data, nil
}

// runFit fits and compares the models and prints the result.
func runFit(o fitOptions, io streams) error {
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
	if err := checkChartFile("chart", o.chart); err != nil {
		return err
	}
	if err := checkChartFile("compare-chart", o.compareChart); err != nil {
		return err
	}
	if err := checkOutPath("save", o.save); err != nil { // before any work or chart is written
		return err
	}
	at, sites, defaultSite, err := fitInputs(o)
	if err != nil {
		return err
	}
	data, err := readInput(o.file)
	if err != nil {
		return err
	}
	if fit.IsFitFile(data) {
		return usagef("%s is a fit file; fit takes observations (predict and night read fit files)", o.file)
	}
	site := siteForPrediction(o.site, sites)
	a, err := analyse(o.modelOptions, data, at, site, sites, defaultSite)
	if err != nil {
		return err
	}
	var buf bytes.Buffer // whole output first: nothing half-written on error
	switch {
	case o.json:
		err = writeFitJSON(&buf, a, o)
	case o.csv:
		err = writeResidualsCSV(&buf, a)
	default:
		err = writeFitText(&buf, a, o)
	}
	if err != nil {
		return err
	}
	if o.chart != "" {
		fg, err := chart.ResidualsFigure(chart.ComparisonResiduals(a.cmp))
		if err == nil {
			err = saveChart("fit", o.chart, fg, io)
		}
		if err != nil {
			return err
		}
	}
	if o.compareChart != "" {
		fg, err := chart.ComparisonGrowth(a.cmp, site, 0)
		if err == nil {
			err = saveChart("fit", o.compareChart, fg, io)
		}
		if err != nil {
			return err
		}
	}
	if o.save != "" {
		if err := fit.SaveFitFile(o.save, a.saved); err != nil {
			return inputError(err)
		}
	}
	for _, w := range a.warnings {
		fmt.Fprintf(io.Err, "arcfit fit: warning: %s\n", oneLine(w))
	}
	if o.save != "" {
		fmt.Fprintf(io.Err, "arcfit fit: wrote %s\n", o.save)
	}
	_, err = io.Out.Write(buf.Bytes())
	return err
}

// residualRow is one observation's residual as fit prints it.
type residualRow struct {
	Line       int     `json:"line"`
	TimeUTC    string  `json:"time_utc"`
	Site       string  `json:"site"`
	DRAArcsec  float64 `json:"dra_arcsec"`
	DDecArcsec float64 `json:"ddec_arcsec"`
	Chi2       float64 `json:"chi2"`
	Flagged    bool    `json:"flagged"`
	Used       bool    `json:"used"`
}

func residualRows(a *analysis) []residualRow {
	if a.cmp.Orbit != nil {
		return orbitResidualRows(a)
	}
	sol := a.cmp.Solution
	rows := make([]residualRow, 0, len(sol.Residuals))
	for i, r := range sol.Residuals {
		site := ""
		if i < len(a.track.Points) {
			site = a.track.Points[i].Site
		}
		rows = append(rows, residualRow{Line: r.Line, TimeUTC: astro.FormatISO8601(r.UTC, 2), Site: site,
			DRAArcsec: round(r.DRAArcsec, 3), DDecArcsec: round(r.DDecArcsec, 3), Chi2: round(r.Chi2, 3),
			Flagged: r.Flagged, Used: r.Used})
	}
	return rows
}

// round rounds v to d decimals (for JSON values printed to a stated
// precision).
func round(v float64, d int) float64 {
	f, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'f', d, 64), 64)
	return f
}

// nightRow is one night's motion: observed (a straight line through the
// night's observations) and that of the fitted model at the night's middle.
type nightRow struct {
	Date                  string   `json:"date"`
	Site                  string   `json:"site"`
	Count                 int      `json:"count"`
	ObsRateArcsecPerMin   *float64 `json:"observed_rate_arcsec_per_min"`
	ObsRatePADeg          *float64 `json:"observed_rate_pa_deg"`
	ModelRateArcsecPerMin *float64 `json:"model_rate_arcsec_per_min"`
	ModelRatePADeg        *float64 `json:"model_rate_pa_deg"`
}

func nightRows(a *analysis) []nightRow {
	sum := obs.Summarize(a.set, a.sites)
	var out []nightRow
	for _, n := range sum.Nights {
		r := nightRow{Date: n.Date, Site: n.Site, Count: n.Count}
		if n.HasRate {
			r.ObsRateArcsecPerMin, r.ObsRatePADeg = finite(round(n.RateArcsecPerMin, 4)), finite(round(n.PADeg, 2))
		}
		mid := n.First.AddDays(n.Last.Sub(n.First) / 2)
		var st *astro.Site
		if s, ok := a.track.Sites[n.Site]; ok && n.Site != "" {
			st = &s
		}
		if p, err := a.saved.Predict(mid, st); err == nil {
			r.ModelRateArcsecPerMin, r.ModelRatePADeg = finite(round(p.RateArcsecPerMin, 4)), finite(round(p.RatePA.Degrees(), 2))
		}
		out = append(out, r)
	}
	return out
}

// modelRowJSON is one row of the comparison.
type modelRowJSON struct {
	Model         string          `json:"model"`
	Knots         []float64       `json:"knots_days"`
	NumParams     int             `json:"n_params"`
	RMSArcsec     *float64        `json:"rms_arcsec"`
	Chi2DoF       *float64        `json:"chi2_dof"`
	BIC           *float64        `json:"bic"`
	CVErrorArcsec *float64        `json:"cv_error_arcsec"`
	CVSEArcsec    *float64        `json:"cv_se_arcsec"`
	Chosen        bool            `json:"chosen"`
	Error         string          `json:"error"`
	Prediction    *predictionJSON `json:"prediction"`
}

// inverseDistanceJSON is the parallax term of a fit.
type inverseDistanceJSON struct {
	Mode       string   `json:"mode"` // fit, fixed or off
	ValuePerAU *float64 `json:"value_per_au"`
	SigmaPerAU *float64 `json:"sigma_per_au"`
	DistanceAU *float64 `json:"distance_au"`
}

// fitJSON is the object fit --json prints.
type fitJSON struct {
	File              string              `json:"file"`
	SHA256            string              `json:"sha256"`
	Model             string              `json:"model"`
	Knots             []float64           `json:"knots_days"`
	Reason            string              `json:"reason"`
	NumObs            int                 `json:"n_obs"`
	NumUsed           int                 `json:"n_used"`
	NumFlagged        int                 `json:"n_flagged"`
	NumNights         int                 `json:"n_nights"`
	RMSArcsec         *float64            `json:"rms_arcsec"`
	Chi2DoF           *float64            `json:"chi2_dof"`
	DoF               int                 `json:"dof"`
	Scaled            bool                `json:"scaled"`
	Cond              *float64            `json:"cond"`
	InverseDistance   inverseDistanceJSON `json:"inverse_distance"`
	HorizonDays       *float64            `json:"horizon_days"`
	HorizonBeforeDays *float64            `json:"horizon_before_days"`
	HorizonAfterDays  *float64            `json:"horizon_after_days"`
	HorizonRule       string              `json:"horizon_rule"`
	EpochTT           string              `json:"epoch_tt"`
	PlaneRADeg        float64             `json:"plane_ra_deg"`
	PlaneDecDeg       float64             `json:"plane_dec_deg"`
	Notes             []string            `json:"notes"`
	Warnings          []string            `json:"warnings"`
	Models            []modelRowJSON      `json:"models"`
	Residuals         []residualRow       `json:"residuals"`
	Nights            []nightRow          `json:"nights"`
	Observations      []observationRow    `json:"observations"`
	Saved             *string             `json:"saved"`
	Orbit             *orbitJSONOf        `json:"orbit,omitempty"`
	Elements          *fit.ElementsJSON   `json:"elements,omitempty"`
	ElementsSigma     *fit.ElementsJSON   `json:"elements_sigma,omitempty"`
}

func inverseDistance(sol *fit.Solution) inverseDistanceJSON {
	d := inverseDistanceJSON{Mode: sol.Settings.Parallax.String()}
	if math.IsNaN(sol.InvDistance) {
		d.Mode = "off"
		return d
	}
	d.ValuePerAU = finite(sol.InvDistance)
	d.SigmaPerAU = finite(sol.InvDistanceSigma)
	if sol.InvDistance > 0 {
		d.DistanceAU = finite(1 / sol.InvDistance)
	}
	return d
}

func writeFitJSON(w io.Writer, a *analysis, o fitOptions) error {
	sol := a.cmp.Solution
	ch := chosen(a)
	j := fitJSON{
		File:              a.set.File,
		SHA256:            a.track.SourceSHA256,
		Model:             a.cmp.Chosen,
		Knots:             append([]float64{}, sol.Model.Knots...),
		Reason:            a.cmp.Reason,
		NumObs:            len(a.set.Obs),
		NumUsed:           ch.nUsed,
		NumNights:         a.track.NumNights,
		RMSArcsec:         finite(ch.rms),
		Chi2DoF:           finite(ch.chi2DoF),
		DoF:               ch.dof,
		Scaled:            ch.scaled,
		Cond:              finite(ch.cond),
		InverseDistance:   inverseDistance(sol),
		HorizonDays:       finite(a.cmp.HorizonDays),
		HorizonBeforeDays: finite(a.cmp.HorizonBeforeDays),
		HorizonAfterDays:  finite(a.cmp.HorizonAfterDays),
		HorizonRule:       a.cmp.HorizonRule,
		EpochTT:           astro.FormatISO8601(a.track.EpochTT, 0),
		PlaneRADeg:        a.track.Plane.RA0.Degrees(),
		PlaneDecDeg:       a.track.Plane.Dec0.Degrees(),
		Notes:             ch.notes,
		Warnings:          append([]string{}, a.warnings...),
		Residuals:         residualRows(a),
		Nights:            nightRows(a),
		Observations:      observationRows(a.set),
	}
	if j.Nights == nil {
		j.Nights = []nightRow{}
	}
	flagged := map[int]bool{}
	for _, r := range sol.Residuals {
		if r.Flagged && a.cmp.Orbit == nil {
			j.NumFlagged++
			flagged[r.ObsIndex] = true
		}
	}
	if of := a.cmp.Orbit; of != nil {
		for _, r := range of.Solution.Residuals {
			if r.Flagged {
				j.NumFlagged++
				flagged[r.Index] = true
			}
		}
		or := orbitRecord(of, predictionTimes(a.cmp))
		j.Orbit, j.Elements, j.ElementsSigma = &or, &or.Elements, &or.ElementsSigma
		j.Knots = []float64{}
	}
	for i := range j.Observations {
		if flagged[i] {
			j.Observations[i].Used = false
		}
	}
	for _, r := range a.cmp.Rows {
		m := modelRowJSON{Model: r.Model, Knots: append([]float64{}, r.Spec.Knots...), NumParams: r.NumParams,
			RMSArcsec: finite(r.RMSArcsec), Chi2DoF: finite(r.Chi2DoF), BIC: finite(r.BIC), CVErrorArcsec: finite(r.CVErrorArcsec),
			CVSEArcsec: finite(r.CVSEArcsec), Chosen: r.Chosen, Error: oneLine(r.Err)}
		if r.Pred != nil {
			pj, err := predictionRecord(*r.Pred, o.sigma, 0)
			if err != nil {
				return err
			}
			m.Prediction = &pj
		}
		j.Models = append(j.Models, m)
	}
	if o.save != "" {
		j.Saved = &o.save
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(j)
}

// residualCSVHeader is the header of fit --csv: the fields of the JSON
// residuals.
var residualCSVHeader = []string{"line", "time_utc", "site", "dra_arcsec", "ddec_arcsec", "chi2", "flagged", "used"}

func writeResidualsCSV(w io.Writer, a *analysis) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(residualCSVHeader); err != nil {
		return err
	}
	f := func(v float64) string { return strconv.FormatFloat(v, 'f', 3, 64) }
	for _, r := range residualRows(a) {
		rec := []string{strconv.Itoa(r.Line), r.TimeUTC, r.Site, f(r.DRAArcsec), f(r.DDecArcsec), f(r.Chi2),
			strconv.FormatBool(r.Flagged), strconv.FormatBool(r.Used)}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// fmtNum formats v with d decimals, "-" for NaN.
func fmtNum(v float64, d int) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "-"
	}
	return strconv.FormatFloat(v, 'f', d, 64)
}

func writeFitText(w io.Writer, a *analysis, o fitOptions) error {
	p := func(format string, args ...any) { fmt.Fprintf(w, format, args...) }
	sol := a.cmp.Solution
	ch := chosen(a)
	tr := a.track
	first, last := tr.ArcTT()
	nFlagged := 0
	for _, r := range residualRows(a) {
		if r.Flagged {
			nFlagged++
		}
	}
	p("%s: %d observation%s, %d used in the fit, %d flagged; %d night%s over %.2f d\n",
		a.set.File, len(a.set.Obs), plural(len(a.set.Obs)), ch.nUsed, nFlagged, tr.NumNights, plural(tr.NumNights), last-first)
	chosenName := sol.Model.String()
	if a.cmp.Orbit != nil {
		chosenName = orbitChosenName(a.cmp.Orbit)
	}
	p("chosen model: %s\n  %s\n", chosenName, wrapIndent(a.cmp.Reason, 76, "  "))
	p("fit: rms %.3f\" per coordinate (RA·cos δ and Dec pooled), χ²/dof %s on %d degrees of freedom, condition number %.3g\n",
		ch.rms, fmtNum(ch.chi2DoF, 2), ch.dof, ch.cond)
	if ch.scaled {
		p("  the residuals are larger than the stated σ allow: covariance scaled by χ²/dof = %.2f (σ × %.2f)\n", ch.chi2DoF, math.Sqrt(ch.chi2DoF))
	}
	if of := a.cmp.Orbit; of != nil {
		writeOrbitText(w, of, predictionTimes(a.cmp))
		p("\n")
	} else {
		switch d := inverseDistance(sol); {
		case d.Mode == "off":
			p("parallax: not modelled — the positions are fitted as if geocentric\n")
		case d.Mode == "fixed":
			p("parallax: distance fixed at %.4g au (inverse distance %.4g au⁻¹)\n", 1/sol.InvDistance, sol.InvDistance)
		default:
			u, su := sol.InvDistance, sol.InvDistanceSigma
			dist := "-"
			if u > 0 {
				dist = fmt.Sprintf("%.3g au", 1/u)
				if su < u {
					dist += fmt.Sprintf(" (1σ range %.3g–%.3g au)", 1/(u+su), 1/(u-su))
				} else {
					dist += " (poorly determined: the 1σ range reaches to infinity)"
				}
			}
			p("parallax: inverse distance fitted, u = %.4g ± %.2g au⁻¹, distance %s\n", u, su, dist)
		}
	}
	if a.cmp.Orbit != nil {
		p("validity: %s\n", orbitValidity(a.cmp.Orbit))
	} else if !math.IsNaN(a.cmp.HorizonDays) {
		p("validity horizon: %.3g d before the first and %.3g d after the last observation\n  %s\n",
			a.cmp.HorizonBeforeDays, a.cmp.HorizonAfterDays, wrapIndent(a.cmp.HorizonRule, 76, "  "))
	} else {
		p("validity horizon: unknown (%s)\n", a.cmp.HorizonRule)
	}

	p("\nmodels compared (CV: the miss predicting each night from the others)\n")
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	head := "   model\tparams\trms_\"\tχ²/dof\tBIC\tCV_\"\t±CV_\""
	var atLabel string
	if o.at != "" && len(a.cmp.Rows) > 0 {
		for _, r := range a.cmp.Rows {
			if r.Pred != nil {
				atLabel = astro.FormatISO8601(r.Pred.UTC, 0)
				break
			}
		}
		head += "\tra\tdec\tmajor_\"\tminor_\"\tpa_deg"
	}
	fmt.Fprintln(tw, head)
	for _, r := range a.cmp.Rows {
		mark := " "
		if r.Chosen {
			mark = "*"
		}
		name := r.Model
		if len(r.Spec.Knots) > 0 {
			name = r.Spec.String()
		}
		line := fmt.Sprintf(" %s %s\t%d\t%s\t%s\t%s\t%s\t%s", mark, name, r.NumParams, fmtNum(r.RMSArcsec, 3),
			fmtNum(r.Chi2DoF, 2), fmtNum(r.BIC, 1), fmtNum(r.CVErrorArcsec, 3), fmtNum(r.CVSEArcsec, 3))
		if atLabel != "" {
			if r.Pred != nil {
				e := r.Pred.Ellipse(o.sigma)
				line += fmt.Sprintf("\t%s\t%s\t%.1f\t%.1f\t%.1f", astro.FormatHMS(r.Pred.RA, 2), astro.FormatDMS(r.Pred.Dec, 1),
					e.SemiMajorArcsec, e.SemiMinorArcsec, e.PA.Degrees())
			} else {
				line += "\t-\t-\t-\t-\t-"
			}
		}
		fmt.Fprintln(tw, line)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	for _, r := range a.cmp.Rows {
		if r.Err != "" {
			p("  %s: %s\n", r.Model, oneLine(r.Err))
		}
	}
	if atLabel != "" {
		where := "the geocentre"
		if st := siteForPrediction(o.site, a.sites); st != nil {
			where = st.Name
		}
		p("  predictions at %s for %s; ellipses at %g σ; * = chosen\n", atLabel, where, o.sigma)
	} else {
		p("  * = chosen\n")
	}

	against := sol.Model.String()
	if a.cmp.Orbit != nil {
		against = "the orbit"
	}
	p("\nresiduals, observed − computed against %s (arcsec)\n", against)
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "  line\ttime_utc\tsite\tRA·cosδ\tDec\tχ²\t")
	for _, r := range residualRows(a) {
		flag := ""
		switch {
		case r.Flagged:
			flag = "outlier"
		case !r.Used:
			flag = "duplicate, not used"
		}
		fmt.Fprintf(tw, "  %d\t%s\t%s\t%+.3f\t%+.3f\t%.2f\t%s\n", r.Line, r.TimeUTC, siteName(r.Site), r.DRAArcsec, r.DDecArcsec, r.Chi2, flag)
	}
	if err := tw.Flush(); err != nil {
		return err
	}

	p("\nflagged observations (normalised χ² over %.2f, the 3-σ equivalent for two coordinates)\n", rejectThreshold(sol.Settings))
	if nFlagged == 0 {
		if sol.Settings.KeepAll {
			p("  none: --keep-all\n")
		} else {
			p("  none\n")
		}
	}
	for _, r := range residualRows(a) {
		if r.Flagged {
			p("  line %d, %s: %+.3f\" in RA·cos δ, %+.3f\" in Dec, χ² %.1f — not used in the fit\n", r.Line, r.TimeUTC, r.DRAArcsec, r.DDecArcsec, r.Chi2)
		}
	}

	p("\nmotion on each night (observed: a straight line through the night; model: at the night's middle)\n")
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "  date\tsite\tobs\tobserved_\"/min\tpa_deg\tmodel_\"/min\tpa_deg")
	for _, n := range nightRows(a) {
		fmt.Fprintf(tw, "  %s\t%s\t%d\t%s\t%s\t%s\t%s\n", n.Date, siteName(n.Site), n.Count,
			ptrNum(n.ObsRateArcsecPerMin, 3), ptrNum(n.ObsRatePADeg, 1), ptrNum(n.ModelRateArcsecPerMin, 3), ptrNum(n.ModelRatePADeg, 1))
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	notes := ch.notes
	if len(notes) > 0 {
		p("\nnotes\n")
		for _, n := range notes {
			p("  %s\n", oneLine(n))
		}
	}
	return nil
}

// rejectThreshold is the outlier threshold the settings use.
func rejectThreshold(s fit.Settings) float64 {
	if s.RejectChi2 > 0 {
		return s.RejectChi2
	}
	return fit.DefaultRejectChi2
}

func ptrNum(v *float64, d int) string {
	if v == nil {
		return "-"
	}
	return fmtNum(*v, d)
}

// wrapIndent wraps s at width and indents the continuation lines.
func wrapIndent(s string, width int, indent string) string {
	return strings.ReplaceAll(wrap(s, width), "\n", "\n"+indent)
}

// fitInputs parses --at and reads the sites of o (--sites, then --site
// resolved against them), as every fit run, of one file or many, needs them.
func fitInputs(o fitOptions) (at []astro.JD, sites map[string]astro.Site, defaultSite string, err error) {
	if o.at != "" {
		t, err := parseInstant("--at", o.at)
		if err != nil {
			return nil, nil, "", err
		}
		at = []astro.JD{t}
	}
	sites, err = readSites(o.sitesFile)
	if err != nil {
		return nil, nil, "", err
	}
	defaultSite, sites, err = resolveSiteFlag(o.site, sites)
	if err != nil {
		return nil, nil, "", err
	}
	return at, sites, defaultSite, nil
}
