package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"sort"

	"github.com/spf13/pflag"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/fit"
	"arcfit/fit/demo"
)

// demoOptions are the options of the demo command.
type demoOptions struct {
	dir  string // --out: where the demo files go
	json bool   // --json: print the results as JSON
}

// demoMarker starts every file of the demo scenario; a file without it is
// not the demo's and is never overwritten.
const demoMarker = "# arcfit demo scenario"

// demoWrites are the scenario's files the demo writes today.
var demoWrites = []string{demo.ObservationsFile, demo.SitesFile}

func demoCommand() *command {
	return &command{
		name:    "demo",
		summary: "run the job on built-in invented data",
		usage:   "arcfit demo [--out DIR] [--json]",
		about: "Writes the built-in demo data into DIR: invented observations of an invented asteroid, \"" +
			demo.ObjectName + "\", from two invented sites on three nights of February 2027, and the sites file. " +
			"Then runs on them every step arcfit has built so far: inspect, fit (saving the fit to demo-fit.json), " +
			"predict for the next night and three weeks later from Alder Ridge, and where to point on the night of " +
			demoNightDate + ", writing the charts (the residuals, the models beyond the arc, the night) into DIR as PNG. It overwrites only files " +
			"that are the demo's own.",
		example: "arcfit demo --out ./arcfit-demo",
		flags:   func() *pflag.FlagSet { return demoFlags(&demoOptions{}, io.Discard) },
		run: func(args []string, io streams) error {
			var o demoOptions
			fs := demoFlags(&o, io.Err)
			if err := parseFlags(fs, args); err != nil {
				return err
			}
			if fs.NArg() > 0 {
				return usagef("takes no file arguments, got %q (use --out)", fs.Arg(0))
			}
			return runDemo(o, io)
		},
	}
}

// demoFlags binds the demo flags to o.
func demoFlags(o *demoOptions, stderr io.Writer) *pflag.FlagSet {
	fs := newFlagSet("demo", stderr)
	fs.StringVar(&o.dir, "out", "arcfit-demo", "`dir`ectory to write the demo files and charts into (made if missing)")
	fs.BoolVar(&o.json, "json", false, "print the results as JSON")
	return fs
}

// runDemo writes the demo files and runs the built steps on them.
func runDemo(o demoOptions, io streams) error {
	if o.dir == "" {
		return usagef("--out: want a directory")
	}
	if err := os.MkdirAll(o.dir, 0o755); err != nil {
		return inputError(fmt.Errorf("--out %s: cannot make the directory: %v", o.dir, err))
	}
	content := demo.Files()
	for _, name := range demoWrites { // check all before writing any
		if err := checkOverwrite(filepath.Join(o.dir, name)); err != nil {
			return err
		}
	}
	for _, name := range demoWrites {
		path := filepath.Join(o.dir, name)
		if err := writeFileAtomic(path, content[name]); err != nil {
			return err
		}
		fmt.Fprintf(io.Err, "arcfit demo: wrote %s\n", path)
	}
	fmt.Fprintf(io.Err, "arcfit demo: invented data: %s seen from two invented sites, February 2027\n", demo.ObjectName)

	obsPath := filepath.Join(o.dir, demo.ObservationsFile)
	sitesPath := filepath.Join(o.dir, demo.SitesFile)
	fitPath := filepath.Join(o.dir, demoFitFile)
	if err := checkFitOverwrite(fitPath); err != nil {
		return err
	}
	charts := map[string]string{}
	for _, name := range demoCharts {
		path := filepath.Join(o.dir, name)
		if err := checkChartOverwrite(path); err != nil {
			return err
		}
		charts[name] = path
	}
	simPath := filepath.Join(o.dir, demoSimFile)
	if err := checkSimOverwrite(simPath); err != nil {
		return err
	}
	steps := []demoStep{
		{"inspect", "what was read", []string{"inspect", obsPath, "--sites", sitesPath}, false},
		{"fit", "the motion models fitted, compared and saved", []string{"fit", obsPath, "--sites", sitesPath, "--save", fitPath,
			"--chart", charts[demoCharts[0]], "--compare-chart", charts[demoCharts[1]]}, false},
		{"predict", "where it will be from Alder Ridge, the next night and three weeks later",
			[]string{"predict", fitPath, "--at", demoPredictTimes, "--site", "Alder Ridge", "--sites", sitesPath}, false},
		{"night", "where to point three weeks after the arc, from Alder Ridge", []string{"night", fitPath, "--date", demoNightDate, "--site", "Alder Ridge", "--sites", sitesPath, "--chart", charts[demoCharts[2]]}, false},
		{"simulate", "what one more night would buy: a synthetic night from the fitted orbit", []string{"simulate", fitPath,
			"--site", "Alder Ridge", "--sites", sitesPath, "--nights", demoSimNight, "--per-night", "4", "--cadence", "30m",
			"--noise", "0.5", "--seed", "3", "--out", simPath}, true},
	}
	cmds := commands()
	parts := make(map[string]json.RawMessage, len(steps))
	for k, st := range steps {
		c := find(cmds, st.args[0])
		args := st.args[1:]
		var out bytes.Buffer
		w := io.Out
		switch {
		case o.json && !st.noJSON:
			args = append(args, "--json")
			w = &out
		case o.json:
			w = &out
		default:
			if k > 0 {
				fmt.Fprintln(io.Out)
			}
			fmt.Fprintf(io.Out, "== arcfit %s: %s\n\n", st.name, st.what)
		}
		if err := c.run(args, streams{In: io.In, Out: w, Err: io.Err}); err != nil {
			return fmt.Errorf("%s step: %w", st.name, err)
		}
		if o.json && !st.noJSON {
			parts[st.name] = json.RawMessage(bytes.TrimSpace(out.Bytes()))
		}
	}
	wi, err := demoWhatIf(obsPath, simPath, sitesPath)
	if err != nil {
		return fmt.Errorf("what-if step: %w", err)
	}
	if o.json {
		b, err := json.Marshal(wi)
		if err != nil {
			return err
		}
		parts["what_if"] = b
	} else {
		fmt.Fprintf(io.Out, "\n== what one more night buys: the 3-σ region at %s from Alder Ridge\n\n", wi.TimeUTC)
		fmt.Fprintf(io.Out, "  with the three nights observed:            %7.1f″ × %6.1f″ (%s)\n", wi.Without.SemiMajorArcsec, wi.Without.SemiMinorArcsec, wi.Without.Method)
		fmt.Fprintf(io.Out, "  with one more night (%s, synthetic): %7.1f″ × %6.1f″ (%s)\n", demoSimNight, wi.With.SemiMajorArcsec, wi.With.SemiMinorArcsec, wi.With.Method)
		fmt.Fprintf(io.Out, "  (semi-axes; the synthetic night, %s, comes from the fitted orbit with 0.5″ noise)\n", simPath)
	}
	if o.json {
		b, err := json.MarshalIndent(parts, "", "  ")
		if err != nil {
			return err
		}
		fmt.Fprintf(io.Out, "%s\n", b)
	}
	return nil
}

// demoStep is one command the demo runs; noJSON marks a command without
// --json (simulate writes a file).
type demoStep struct {
	name, what string
	args       []string
	noJSON     bool
}

// The what-if: one synthetic night, two days after the arc, from the fitted
// orbit; the demo refits with it and compares the regions three weeks on.
const (
	demoSimFile  = "demo-one-more-night.csv"
	demoSimNight = "2027-02-10"
	demoWhatIfAt = "2027-03-01T04:00:00Z"
)

// whatIfRegion is one region of the what-if.
type whatIfRegion struct {
	SemiMajorArcsec float64 `json:"semi_major_arcsec"`
	SemiMinorArcsec float64 `json:"semi_minor_arcsec"`
	Method          string  `json:"region_method"`
}

// whatIf is the demo's last step: the region at demoWhatIfAt from the
// observed nights alone and with the synthetic night added.
type whatIf struct {
	TimeUTC string       `json:"time_utc"`
	Without whatIfRegion `json:"without"`
	With    whatIfRegion `json:"with"`
}

// demoWhatIf fits the orbit to the observations, and to them with the
// synthetic night appended, and returns both 3-σ regions at demoWhatIfAt
// seen from Alder Ridge.
func demoWhatIf(obsPath, simPath, sitesPath string) (*whatIf, error) {
	sites, err := obs.ReadSitesFile(sitesPath)
	if err != nil {
		return nil, err
	}
	real, err := obs.ReadFile(obsPath, obs.ReadOptions{Sites: sites})
	if err != nil {
		return nil, err
	}
	sim, err := obs.ReadFile(simPath, obs.ReadOptions{Sites: sites})
	if err != nil {
		return nil, err
	}
	both := *real
	both.Obs = append(append([]obs.Observation{}, real.Obs...), sim.Obs...)
	sort.SliceStable(both.Obs, func(i, j int) bool { return both.Obs[i].Time.Sub(both.Obs[j].Time) < 0 })
	at, err := astro.ParseISO8601(demoWhatIfAt)
	if err != nil {
		return nil, err
	}
	site := sites["Alder Ridge"]
	region := func(set *obs.Set) (whatIfRegion, error) {
		tr, err := fit.NewTrack(set, sites)
		if err != nil {
			return whatIfRegion{}, err
		}
		of, err := fit.FitOrbit(tr, fit.Settings{})
		if err != nil {
			return whatIfRegion{}, err
		}
		p, err := of.Predict(at, &site)
		if err != nil {
			return whatIfRegion{}, err
		}
		e := p.Ellipse(3)
		return whatIfRegion{SemiMajorArcsec: e.SemiMajorArcsec, SemiMinorArcsec: e.SemiMinorArcsec, Method: p.Method}, nil
	}
	w := &whatIf{TimeUTC: demoWhatIfAt}
	if w.Without, err = region(real); err != nil {
		return nil, err
	}
	if w.With, err = region(&both); err != nil {
		return nil, err
	}
	return w, nil
}

// simMarker starts every file arcfit simulate writes.
const simMarker = "# SYNTHETIC observations made by arcfit simulate"

// checkSimOverwrite refuses to replace an existing file at the demo's
// simulation path that simulate did not write.
func checkSimOverwrite(path string) error {
	data, err := os.ReadFile(path)
	if errors.Is(err, fs.ErrNotExist) {
		return nil
	}
	if err != nil {
		return err
	}
	if !bytes.HasPrefix(data, []byte(simMarker)) {
		return usagef("%s exists and is not a simulated file; not overwriting it (choose another --out)", path)
	}
	return nil
}

// The demo's fit file, prediction times and night: the object was last seen
// on the night of 2027-02-07 at Alder Ridge; the demo asks for the next
// night and three weeks later, and plans the night of 2027-02-28.
const (
	demoFitFile      = "demo-fit.json"
	demoPredictTimes = "2027-02-09T04:00:00Z,2027-03-01T04:00:00Z"
	demoNightDate    = "2027-02-28"
)

// demoCharts are the charts the demo writes: the residuals of the chosen
// model and the models' growth beyond the arc (fit), and the night plan's
// search region and altitudes (night).
var demoCharts = []string{"demo-residuals.png", "demo-models.png", "demo-night.png"}

// checkChartOverwrite refuses to replace an existing file at a demo chart's
// path that is not a PNG image.
func checkChartOverwrite(path string) error {
	data, err := os.ReadFile(path)
	if errors.Is(err, fs.ErrNotExist) {
		return nil
	}
	if err != nil {
		return err
	}
	if !bytes.HasPrefix(data, []byte("\x89PNG\r\n\x1a\n")) {
		return usagef("%s exists and is not a chart; not overwriting it (choose another --out)", path)
	}
	return nil
}

// checkFitOverwrite refuses to replace an existing file at the demo's fit
// path that is not a fit file.
func checkFitOverwrite(path string) error {
	data, err := os.ReadFile(path)
	if errors.Is(err, fs.ErrNotExist) {
		return nil
	}
	if err != nil {
		return err
	}
	if !fit.IsFitFile(data) {
		return usagef("%s exists and is not a fit file; not overwriting it (choose another --out)", path)
	}
	return nil
}

// checkOverwrite refuses to replace an existing file that is not one of the
// demo's own (its first line is not the demo marker).
func checkOverwrite(path string) error {
	f, err := os.Open(path)
	if errors.Is(err, fs.ErrNotExist) {
		return nil
	}
	if err != nil {
		return err
	}
	defer f.Close()
	head := make([]byte, len(demoMarker))
	n, _ := io.ReadFull(f, head)
	if !bytes.Equal(head[:n], []byte(demoMarker)) {
		return usagef("%s exists and is not a demo file; not overwriting it (choose another --out)", path)
	}
	return nil
}

// writeFileAtomic writes data to path through a temporary file in the same
// directory and a rename, so that path is never left half-written.
func writeFileAtomic(path string, data []byte) (err error) {
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		return err
	}
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	if _, err = tmp.Write(data); err != nil {
		return err
	}
	if err = tmp.Sync(); err != nil {
		return err
	}
	if err = tmp.Close(); err != nil {
		return err
	}
	if err = os.Chmod(tmp.Name(), 0o644); err != nil {
		return err
	}
	return os.Rename(tmp.Name(), path)
}
