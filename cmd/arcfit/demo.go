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

	"github.com/spf13/pflag"

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
		return err
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
	steps := []demoStep{
		{"inspect", "what was read", []string{"inspect", obsPath, "--sites", sitesPath}},
		{"fit", "the motion models fitted, compared and saved", []string{"fit", obsPath, "--sites", sitesPath, "--save", fitPath,
			"--chart", charts[demoCharts[0]], "--compare-chart", charts[demoCharts[1]]}},
		{"predict", "where it will be from Alder Ridge, the next night and three weeks later",
			[]string{"predict", fitPath, "--at", demoPredictTimes, "--site", "Alder Ridge", "--sites", sitesPath}},
		{"night", "where to point three weeks after the arc, from Alder Ridge", []string{"night", fitPath, "--date", demoNightDate, "--site", "Alder Ridge", "--sites", sitesPath, "--chart", charts[demoCharts[2]]}},
	}
	cmds := commands()
	parts := make(map[string]json.RawMessage, len(steps))
	for k, st := range steps {
		c := find(cmds, st.args[0])
		args := st.args[1:]
		var out bytes.Buffer
		w := io.Out
		if o.json {
			args = append(args, "--json")
			w = &out
		} else {
			if k > 0 {
				fmt.Fprintln(io.Out)
			}
			fmt.Fprintf(io.Out, "== arcfit %s: %s\n\n", st.name, st.what)
		}
		if err := c.run(args, streams{In: io.In, Out: w, Err: io.Err}); err != nil {
			return fmt.Errorf("%s step: %w", st.name, err)
		}
		if o.json {
			parts[st.name] = json.RawMessage(bytes.TrimSpace(out.Bytes()))
		}
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

// demoStep is one command the demo runs.
type demoStep struct {
	name, what string
	args       []string
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
