package main

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"github.com/spf13/pflag"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/ephem"
	"arcfit/fit"
	"arcfit/fit/plan"
	"arcfit/fit/simulate"
)

// simulateOptions are the options of the simulate command.
type simulateOptions struct {
	file         string   // the FILE argument: a fit file or an elements CSV
	elementsFile string   // --elements
	name         string   // --name
	sites        []string // --site, repeated
	sitesFile    string   // --sites
	nights       string   // --nights DATE[,DATE…]
	from         string   // --from DATE
	nightCount   int      // --night-count N
	perNight     int      // --per-night
	cadence      string   // --cadence
	noiseArcsec  float64  // --noise
	magNoise     float64  // --mag-noise
	seed         uint64   // --seed
	minAltDeg    float64  // --min-alt
	out          string   // --out
	sitesOut     string   // --sites-out
	changed      map[string]bool
}

// maxNightCount bounds --night-count (simulate.MaxNights).
const maxNightCount = simulate.MaxNights

func simulateCommand() *command {
	return &command{
		name:    "simulate",
		summary: "synthetic observations (seeded) for teaching and what-if planning",
		usage: "arcfit simulate FIT|ELEMENTS|--elements FILE [--name NAME] --site SITE [--site SITE…] [--sites FILE]\n" +
			"             --nights DATE[,DATE…] | --from DATE --night-count N [--per-night N] [--cadence DUR]\n" +
			"             [--noise ARCSEC] [--mag-noise MAG] [--seed N] [--min-alt DEG] [--out FILE] [--sites-out FILE]",
		about: "Makes synthetic observations of an object whose motion is known, in arcfit's observation CSV, for " +
			"teaching (how arc length, cadence and measurement error shape the search region) and for planning (how " +
			"much one more night would shrink a region before you spend it). The object is an element set (--elements " +
			"FILE with --name, or an orbital-elements CSV as the argument: two-body motion, the astrometric ICRS place " +
			"seen from the site, light time included) or a fit file saved by fit --save (its prediction: a fitted " +
			"orbit, or a sky-plane model extrapolated beyond its arc, the model's path rather than the object's; " +
			"observations beyond the fit's validity horizon are counted on standard error). Each --site (a name in " +
			"--sites or the fit file, or lat_deg,lon_deg,height_m; repeat the flag for several) observes on each " +
			"night (--nights, or --night-count nights from --from; the night that begins on the evening of DATE in the " +
			"site's local mean solar time): --per-night observations --cadence apart, centred on the object's best " +
			"time, only while the Sun's centre is below −18° and the object at least --min-alt high (refracted); a " +
			"night or site where it cannot be seen gives none, and says why on standard error. Each position gets " +
			"Gaussian noise of --noise arcseconds in RA·cos δ and in Dec, and each magnitude --mag-noise, drawn from " +
			"a generator seeded with --seed: the same seed gives the same file. The file (on standard output, or " +
			"--out, written whole or not at all) starts with comment lines saying the data are synthetic and giving " +
			"the object, sites, nights, cadence, noise and seed; its sigma column is the noise. --sites-out writes the " +
			"sites used as a sites CSV, for fit --sites.",
		example: "arcfit simulate --elements elements.csv --name \"Demo-1 (invented)\" --site 44.52,-72.80,410 --nights 2027-02-10,2027-02-12 --seed 7 --out sim.csv\n" +
			`arcfit simulate demo-fit.json --site "Alder Ridge" --site "Birch Hollow" --sites sites.csv --from 2027-02-10 --night-count 3 --per-night 6 --cadence 15m --noise 0.5 --out more.csv`,
		flags: func() *pflag.FlagSet { return simulateFlags(&simulateOptions{}, io.Discard) },
		run: func(args []string, io streams) error {
			var o simulateOptions
			fs := simulateFlags(&o, io.Err)
			if err := parseFlags(fs, args); err != nil {
				return err
			}
			o.changed = map[string]bool{}
			fs.Visit(func(f *pflag.Flag) { o.changed[f.Name] = true })
			switch fs.NArg() {
			case 0:
			case 1:
				if o.elementsFile != "" {
					return usagef("give a fit or elements file, or --elements, not both (got %s and --elements %s)", fs.Arg(0), o.elementsFile)
				}
				o.file = fs.Arg(0)
			default:
				return usagef("one file at a time, got %d: %s", fs.NArg(), strings.Join(fs.Args(), " "))
			}
			return runSimulate(o, io)
		},
	}
}

// simulateFlags binds the simulate flags to o.
func simulateFlags(o *simulateOptions, stderr io.Writer) *pflag.FlagSet {
	fs := newFlagSet("simulate", stderr)
	fs.StringVar(&o.elementsFile, "elements", "", "orbital-elements CSV `file` of the object")
	fs.StringVar(&o.name, "name", "", "`name` of the element set (not needed when the file holds one)")
	fs.StringArrayVar(&o.sites, "site", nil, "observing `site`: a name in --sites or the fit file, or lat_deg,lon_deg,height_m; repeat for several")
	fs.StringVar(&o.sitesFile, "sites", "", "`file` of sites, CSV name,lat_deg,lon_deg,height_m (WGS84, east positive)")
	fs.StringVar(&o.nights, "nights", "", "`dates` of the evenings, YYYY-MM-DD, comma-separated")
	fs.StringVar(&o.from, "from", "", "first evening's `date`, YYYY-MM-DD, with --night-count")
	fs.IntVar(&o.nightCount, "night-count", 0, "`number` of consecutive nights from --from")
	fs.IntVar(&o.perNight, "per-night", simulate.DefaultPerNight, "`number` of observations per site and night")
	fs.StringVar(&o.cadence, "cadence", "20m", "`interval` between a night's observations, whole seconds: 20m, 90s, 1h")
	fs.Float64Var(&o.noiseArcsec, "noise", simulate.DefaultSigmaArcsec, "1-sigma Gaussian noise in `arcsec` per coordinate (RA on the sky); also the sigma column")
	fs.Float64Var(&o.magNoise, "mag-noise", 0, "1-sigma Gaussian noise of the magnitudes, in `mag` (default none)")
	fs.Uint64Var(&o.seed, "seed", 1, "`seed` of the noise: the same seed gives the same observations")
	fs.Float64Var(&o.minAltDeg, "min-alt", plan.DefaultMinAlt.Degrees(), "lowest altitude in `degrees` of an observation")
	fs.StringVar(&o.out, "out", "", "write the observations to this `file` (default: standard output)")
	fs.StringVar(&o.sitesOut, "sites-out", "", "also write the sites used to this `file`, a sites CSV")
	return fs
}

// simulateSource is the object to simulate.
type simulateSource struct {
	target      plan.Target
	name        string // the object's name in messages
	description string // for the file's header
	sites       map[string]astro.Site
	skyPlane    bool // a sky-plane fit, extrapolated
	warnings    []string
}

// readSimulateSource reads the object: --elements, or the argument (a fit
// file or an elements CSV, recognised from the content).
func readSimulateSource(o simulateOptions, sites map[string]astro.Site) (*simulateSource, error) {
	path := o.elementsFile
	if path == "" {
		path = o.file
	}
	if path == "" {
		return nil, usagef("no object given: an element set (--elements FILE, or an elements CSV as the argument) or a fit file")
	}
	data, err := readInput(path)
	if err != nil {
		return nil, err
	}
	if o.elementsFile == "" && fit.IsFitFile(data) {
		if o.name != "" {
			return nil, usagef("--name %q: %s is a fit file, not an elements file", o.name, path)
		}
		saved, err := fit.ParseFitFile(data, path)
		if err != nil {
			return nil, inputError(err)
		}
		merged := map[string]astro.Site{}
		for k, v := range saved.Solution.Track.Sites {
			merged[k] = v
		}
		for k, v := range sites {
			merged[k] = v
		}
		src := &simulateSource{target: saved, sites: merged, name: filepath.Base(path)}
		first, last := saved.Solution.Track.ArcTT()
		if saved.Orbit != nil {
			kind := "two-body orbit"
			if saved.Orbit.Dynamics() == "nbody" {
				kind = "perturbed orbit (Sun and planets)"
			}
			src.description = fmt.Sprintf("fit file %s: its %s, fitted to observations over %.2f d", filepath.Base(path), kind, last-first)
		} else {
			src.skyPlane = true
			src.description = fmt.Sprintf("fit file %s: its sky-plane model %s, fitted to %d observations over %.2f d, extrapolated (the model's path, not the object's)",
				filepath.Base(path), saved.Solution.Model, saved.Solution.NumUsed, last-first)
		}
		return src, nil
	}
	sets, ws, err := ephem.ReadElements(bytes.NewReader(data), path)
	if err != nil {
		if o.elementsFile == "" {
			if _, oerr := obs.Read(bytes.NewReader(data), path, obs.ReadOptions{DefaultSigmaArcsec: 1}); oerr == nil {
				return nil, usagef("%s is an observation file: simulate needs an element set or a fit file (fit it first: arcfit fit %s --save fit.json)", path, path)
			}
		}
		return nil, inputError(err)
	}
	el, err := ephem.FindElements(sets, o.name)
	if err != nil {
		return nil, usagef("%s: %s", path, strings.TrimPrefix(err.Error(), "ephem: "))
	}
	src := &simulateSource{target: plan.ElementsTarget{Elements: el}, sites: sites, name: el.Name,
		description: fmt.Sprintf("element set %q of %s", el.Name, filepath.Base(path))}
	for _, w := range ws {
		src.warnings = append(src.warnings, w.String())
	}
	return src, nil
}

// simulateNights reads --nights, or --from and --night-count.
func simulateNights(o simulateOptions) ([]plan.Date, error) {
	switch {
	case o.nights != "" && (o.from != "" || o.changed["night-count"]):
		return nil, usagef("--nights and --from/--night-count exclude each other")
	case o.nights != "":
		var out []plan.Date
		seen := map[plan.Date]bool{}
		for _, f := range strings.Split(o.nights, ",") {
			d, err := parseNightDate(f)
			if err != nil {
				if outsideSpan(f) {
					return nil, usagef("--nights %q: %s is outside the span of the ephemerides, 1800 to 2200", o.nights, strings.TrimSpace(f))
				}
				return nil, usagef("--nights %q: %q is not a date; want YYYY-MM-DD,YYYY-MM-DD…", o.nights, strings.TrimSpace(f))
			}
			if seen[d] {
				return nil, usagef("--nights %q: %v given twice", o.nights, d)
			}
			seen[d] = true
			out = append(out, d)
		}
		if len(out) > simulate.MaxNights {
			return nil, usagef("--nights: %d nights; want at most %d", len(out), simulate.MaxNights)
		}
		return out, nil
	case o.from != "":
		d, err := parseNightDate(o.from)
		if err != nil {
			if outsideSpan(o.from) {
				return nil, usagef("--from %q: outside the span of the ephemerides, 1800 to 2200", o.from)
			}
			return nil, usagef("--from %q: want the first evening's date as YYYY-MM-DD", o.from)
		}
		if o.nightCount < 1 || o.nightCount > maxNightCount {
			return nil, usagef("--night-count %d: want 1 to %d nights from --from", o.nightCount, maxNightCount)
		}
		out := make([]plan.Date, o.nightCount)
		for k := range out {
			out[k] = d.AddDays(k)
		}
		if last := out[len(out)-1]; last.Year > 2200 {
			return nil, usagef("--from %s --night-count %d: runs past 2200, the end of the ephemerides", o.from, o.nightCount)
		}
		return out, nil
	case o.changed["night-count"]:
		return nil, usagef("--night-count needs --from DATE, the first evening")
	}
	return nil, usagef("no nights given: --nights DATE[,DATE…], or --from DATE --night-count N")
}

// outsideSpan reports, for a date that parseNightDate refused, whether it
// was refused for lying outside 1800–2200 (it reads as YYYY-MM-DD).
func outsideSpan(s string) bool {
	_, err := time.Parse("2006-01-02", strings.TrimSpace(s))
	return err == nil
}

// checkOutPath checks that the directory of an output file exists.
func checkOutPath(flag, path string) error {
	if path == "" {
		return nil
	}
	if st, err := os.Stat(path); err == nil && st.IsDir() {
		return usagef("--%s %s: a directory; want a file name", flag, path)
	}
	dir := filepath.Dir(path)
	if st, err := os.Stat(dir); err != nil || !st.IsDir() {
		return usagef("--%s %s: no directory %s to write it in", flag, path, dir)
	}
	return nil
}

// runSimulate makes the observations and writes them.
func runSimulate(o simulateOptions, io streams) error {
	if o.name != "" && o.elementsFile == "" && o.file == "" {
		return usagef("--name %q needs --elements FILE", o.name)
	}
	nights, err := simulateNights(o)
	if err != nil {
		return err
	}
	if len(o.sites) == 0 {
		return usagef("no --site given: a name in --sites, or lat_deg,lon_deg,height_m (repeat --site for several)")
	}
	if o.perNight < 1 || o.perNight > simulate.MaxPerNight {
		return usagef("--per-night %d: want 1 to %d", o.perNight, simulate.MaxPerNight)
	}
	cad, err := parseStep(o.cadence)
	if err != nil || cad < simulate.MinCadence || cad > simulate.MaxCadence || cad%time.Second != 0 {
		return usagef("--cadence %q: want a whole number of seconds from 1s to 24h, such as 20m or 90s", o.cadence)
	}
	if !(o.noiseArcsec > 0) || o.noiseArcsec > simulate.MaxSigmaArcsec {
		return usagef("--noise %v: want a positive number of arcseconds, at most %g", o.noiseArcsec, simulate.MaxSigmaArcsec)
	}
	if !(o.magNoise >= 0) || o.magNoise > simulate.MaxMagSigma {
		return usagef("--mag-noise %v: want 0 to %g magnitudes", o.magNoise, simulate.MaxMagSigma)
	}
	if !(o.minAltDeg >= 0 && o.minAltDeg <= plan.MaxMinAlt.Degrees()) {
		return usagef("--min-alt %v: want an altitude from 0 to %g degrees", o.minAltDeg, plan.MaxMinAlt.Degrees())
	}
	if err := checkOutPath("out", o.out); err != nil {
		return err
	}
	if err := checkOutPath("sites-out", o.sitesOut); err != nil {
		return err
	}
	if o.out != "" && o.sitesOut != "" && filepath.Clean(o.out) == filepath.Clean(o.sitesOut) {
		return usagef("--out and --sites-out name the same file %s", o.out)
	}
	sites, err := readSites(o.sitesFile)
	if err != nil {
		return err
	}
	src, err := readSimulateSource(o, sites)
	if err != nil {
		return err
	}
	cfg := simulate.Config{Target: src.target, Name: src.name, Source: src.description, Nights: nights, PerNight: o.perNight, Cadence: cad,
		SigmaArcsec: o.noiseArcsec, MagSigma: o.magNoise, Seed: o.seed, MinAlt: astro.AngleFromDegrees(o.minAltDeg)}
	seen := map[string]bool{}
	for _, flag := range o.sites {
		name, merged, err := resolveSiteFlag(flag, src.sites)
		if err != nil {
			return err
		}
		if seen[name] {
			return usagef("--site %q given twice", flag)
		}
		seen[name] = true
		st := merged[name]
		st.Name = name
		cfg.Sites = append(cfg.Sites, st)
	}
	if n := o.perNight * len(nights) * len(cfg.Sites); n > simulate.MaxSamples {
		return usagef("%d observations asked for (%d a night × %d nights × %d sites): want at most %d", n, o.perNight, len(nights), len(cfg.Sites), simulate.MaxSamples)
	}
	res, err := cfg.Run()
	if err != nil {
		return nightError(err)
	}
	if len(res.Samples) == 0 {
		r := res.Runs[0]
		return usagef("no observations: the object cannot be observed on any of the nights from any of the sites (the night of %v at %s: %s)", r.Night, r.Site, r.Why)
	}
	var buf bytes.Buffer // whole file first: nothing half-written on error
	if err := res.WriteCSV(&buf, fmt.Sprintf("made by arcfit %s", version)); err != nil {
		return err
	}
	for _, w := range src.warnings {
		fmt.Fprintf(io.Err, "arcfit simulate: warning: %s\n", oneLine(w))
	}
	for _, w := range res.Warnings {
		fmt.Fprintf(io.Err, "arcfit simulate: warning: %s\n", oneLine(w))
	}
	beyond := 0
	for _, r := range res.Runs {
		fmt.Fprintf(io.Err, "arcfit simulate: %s\n", runLine(r, o.perNight))
		beyond += r.BeyondHorizon
	}
	if src.skyPlane {
		fmt.Fprintf(io.Err, "arcfit simulate: warning: %s holds a sky-plane fit: the positions follow its model beyond the fitted arc, not the object itself\n", o.file)
	}
	if beyond > 0 {
		fmt.Fprintf(io.Err, "arcfit simulate: caution: %d of %d observations lie beyond the fit's validity horizon: the model is not to be trusted there\n", beyond, len(res.Samples))
	}
	if o.sitesOut != "" {
		if err := writeFileAtomic(o.sitesOut, sitesCSV(cfg.Sites)); err != nil {
			return err
		}
		fmt.Fprintf(io.Err, "arcfit simulate: wrote the %d site%s to %s\n", len(cfg.Sites), plural(len(cfg.Sites)), o.sitesOut)
	}
	if o.out == "" {
		_, err = io.Out.Write(buf.Bytes())
		return err
	}
	if err := writeFileAtomic(o.out, buf.Bytes()); err != nil {
		return err
	}
	fmt.Fprintf(io.Err, "arcfit simulate: wrote %d synthetic observation%s to %s\n", len(res.Samples), plural(len(res.Samples)), o.out)
	return nil
}

// runLine says in one line what a site made of a night.
func runLine(r simulate.NightRun, asked int) string {
	head := fmt.Sprintf("the night of %v at %s: ", r.Night, r.Site)
	if r.Reason != plan.Observable {
		return head + "no observations: " + r.Why
	}
	s := fmt.Sprintf("%d observation%s", r.Made, plural(r.Made))
	if r.Made > 0 {
		s += fmt.Sprintf(" (best %s UTC at %.1f°)", minuteUTC(r.Best)[11:], r.BestAlt.Degrees())
	}
	if r.Made < asked {
		s += fmt.Sprintf(", %d fewer than asked: the window %s to %s UTC is too short", asked-r.Made, minuteUTC(r.Window.Start)[11:], minuteUTC(r.Window.End)[11:])
	}
	return head + s
}

// sitesCSV returns the sites as a sites CSV (name,lat_deg,lon_deg,height_m).
func sitesCSV(sites []astro.Site) []byte {
	var b bytes.Buffer
	b.WriteString("# sites of a synthetic observation file made by arcfit simulate\n")
	cw := csv.NewWriter(&b)
	cw.Write([]string{"name", "lat_deg", "lon_deg", "height_m"})
	deg := func(a astro.Angle) string { return strconv.FormatFloat(a.Degrees(), 'f', 9, 64) }
	for _, s := range sites {
		cw.Write([]string{s.Name, deg(s.Lat), deg(s.Lon), strconv.FormatFloat(s.HeightM, 'f', -1, 64)})
	}
	cw.Flush()
	return b.Bytes()
}
