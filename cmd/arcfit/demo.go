package main

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"

	"github.com/spf13/pflag"

	"arcfit/fit/demo"
)

// demoOptions are the options of the demo command.
type demoOptions struct {
	dir  string // --dir: where the demo files go
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
		usage:   "arcfit demo [--dir DIR] [--json]",
		about: "Writes the built-in demo data into DIR: invented observations of an invented asteroid, \"" +
			demo.ObjectName + "\", from two invented sites on three nights of February 2027, and the sites file. " +
			"Then runs on them every step arcfit has built so far, today inspect. As fit, predict and night are " +
			"built, the demo will run them too. It overwrites only files that are the demo's own.",
		example: "arcfit demo --dir ./arcfit-demo",
		flags:   func() *pflag.FlagSet { return demoFlags(&demoOptions{}, io.Discard) },
		run: func(args []string, io streams) error {
			var o demoOptions
			fs := demoFlags(&o, io.Err)
			if err := parseFlags(fs, args); err != nil {
				return err
			}
			if fs.NArg() > 0 {
				return usagef("takes no file arguments, got %q (use --dir)", fs.Arg(0))
			}
			return runDemo(o, io)
		},
	}
}

// demoFlags binds the demo flags to o.
func demoFlags(o *demoOptions, stderr io.Writer) *pflag.FlagSet {
	fs := newFlagSet("demo", stderr)
	fs.StringVar(&o.dir, "dir", "arcfit-demo", "`dir`ectory to write the demo files into (made if missing)")
	fs.BoolVar(&o.json, "json", false, "print the results as JSON")
	return fs
}

// runDemo writes the demo files and runs the built steps on them.
func runDemo(o demoOptions, io streams) error {
	if o.dir == "" {
		return usagef("--dir: want a directory")
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

	err := runInspect(inspectOptions{
		file:      filepath.Join(o.dir, demo.ObservationsFile),
		sitesFile: filepath.Join(o.dir, demo.SitesFile),
		json:      o.json,
	}, io)
	if err != nil {
		return err
	}
	fmt.Fprintln(io.Err, "arcfit demo: next, once built: fit will fit motion models to these observations and show the residuals;")
	fmt.Fprintln(io.Err, "arcfit demo: predict will give the position and search region at a chosen time; night will say where")
	fmt.Fprintln(io.Err, "arcfit demo: to point on a chosen night. Those steps are not built yet, so the demo stops here.")
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
		return usagef("%s exists and is not a demo file; not overwriting it (choose another --dir)", path)
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
