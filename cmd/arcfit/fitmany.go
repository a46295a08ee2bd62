package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strings"

	"github.com/spf13/pflag"

	"arcfit/astro"
	"arcfit/fit"
)

// manyOptions are the fit options that apply to several observation files.
type manyOptions struct {
	jobs int // --jobs: files fitted at once; 0 means a worker per core
}

// manyFlags binds the options of a fit over several files to o.
func manyFlags(fs *pflag.FlagSet, o *manyOptions) {
	fs.IntVar(&o.jobs, "jobs", 0, "`number` of files fitted at once when given several files or a directory (default: one per core)")
}

// isFitMany reports whether the arguments of fit ask for the fit of several
// files: more than one argument, or one that is a directory.
func isFitMany(args []string) bool {
	if len(args) > 1 {
		return true
	}
	if len(args) == 1 {
		st, err := os.Stat(args[0])
		return err == nil && st.IsDir()
	}
	return false
}

// observationExts are the file name extensions fit takes from a directory
// (matched without regard to case): the observation CSV and ADES PSV.
var observationExts = []string{".csv", ".psv"}

// expandInputs turns the arguments into the list of observation files, in
// order: a file as given; a directory as its *.csv and *.psv files (not its
// subdirectories), sorted by name. A directory without such a file, or one
// that cannot be read, is an input error.
func expandInputs(args []string) ([]string, error) {
	var files []string
	for _, a := range args {
		st, err := os.Stat(a)
		if err != nil || !st.IsDir() {
			files = append(files, a) // read (and reported) with the others
			continue
		}
		ents, err := os.ReadDir(a)
		if err != nil {
			return nil, inputError(err)
		}
		var names []string
		for _, e := range ents {
			ext := strings.ToLower(filepath.Ext(e.Name()))
			if e.Type().IsRegular() && (ext == observationExts[0] || ext == observationExts[1]) {
				names = append(names, e.Name())
			}
		}
		if len(names) == 0 {
			return nil, usagef("%s: no observation files (*.csv, *.psv) in the directory", a)
		}
		sort.Strings(names)
		for _, n := range names {
			files = append(files, filepath.Join(a, n))
		}
	}
	return files, nil
}

// fileResult is the outcome of one file of a fit over several: the output
// block, the warnings for stderr, or the error.
type fileResult struct {
	file     string
	out      []byte
	warnings []string
	err      error
}

// runFitMany fits every observation file the arguments name, a worker per
// core (o.many.jobs overrides), and prints the results in the order of the
// files:
//
//   - text: one block per file, starting with the line "== FILE ==", the
//     blocks separated by a blank line; a file that failed has the line
//     "error: …" as its block;
//   - --json: one array, an element per file in order: the object fit --json
//     prints for one file, or {"file": FILE, "error": MESSAGE} for a file
//     that failed.
//
// Warnings go to stderr as "arcfit fit: FILE: warning: …". Each file is
// fitted as if it were given alone, with the same options, sites and --at;
// --save, --chart, --compare-chart and --csv, which name or fill one output
// for one file, are refused.
//
// Exit status: 0 when every file was fitted; otherwise the error returned
// says how many failed, and it is an input error (exit code 2) when any file
// failed for its input (unreadable, malformed, too few observations — the
// error a single file would give with code 2), else a failure (code 1).
func runFitMany(o fitOptions, args []string, io streams) error {
	switch {
	case o.save != "":
		return usagef("--save writes the fit of one file; give one observation file")
	case o.chart != "" || o.compareChart != "":
		return usagef("--chart and --compare-chart draw the fit of one file; give one observation file")
	case o.csv:
		return usagef("--csv prints the residuals of one file; with several files use --json or the text")
	case o.many.jobs < 0:
		return usagef("--jobs %d: want 0 (one per core) or more", o.many.jobs)
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
	at, sites, defaultSite, err := fitInputs(o)
	if err != nil {
		return err
	}
	site := siteForPrediction(o.site, sites)
	files, err := expandInputs(args)
	if err != nil {
		return err
	}

	workers := o.many.jobs
	if workers == 0 {
		workers = runtime.NumCPU()
	}
	workers = max(1, min(workers, len(files)))
	done := make([]chan fileResult, len(files))
	for i := range done {
		done[i] = make(chan fileResult, 1)
	}
	next := make(chan int)
	for range workers {
		go func() {
			for i := range next {
				done[i] <- fitOneOfMany(o, files[i], at, site, sites, defaultSite)
			}
		}()
	}
	go func() {
		for i := range files {
			next <- i
		}
		close(next)
	}()

	// Print in input order as the results come in.
	failed, inputFailed := 0, false
	if o.json {
		fmt.Fprintln(io.Out, "[")
	}
	for i := range files {
		r := <-done[i]
		for _, w := range r.warnings {
			fmt.Fprintf(io.Err, "arcfit fit: %s: warning: %s\n", r.file, oneLine(w))
		}
		if r.err != nil {
			failed++
			var ue *usageError
			inputFailed = inputFailed || errors.As(r.err, &ue)
		}
		var err error
		if o.json {
			err = writeManyJSONElement(io.Out, r, i == len(files)-1)
		} else {
			err = writeManyTextBlock(io.Out, r, i == 0)
		}
		if err != nil {
			return err
		}
	}
	if o.json {
		fmt.Fprintln(io.Out, "]")
	}
	if failed == 0 {
		return nil
	}
	msg := fmt.Sprintf("%d of %d file%s failed (each error is printed in its place)", failed, len(files), plural(len(files)))
	if inputFailed {
		return usagef("%s", msg)
	}
	return errors.New(msg)
}

// fitOneOfMany fits one file of a fit over several: what runFit does for one
// file, with the output kept for printing in order.
func fitOneOfMany(o fitOptions, file string, at []astro.JD, site *astro.Site, sites map[string]astro.Site, defaultSite string) fileResult {
	r := fileResult{file: file}
	o.file = file
	data, err := readInput(file)
	if err != nil {
		r.err = err
		return r
	}
	if fit.IsFitFile(data) {
		r.err = usagef("%s is a fit file; fit takes observations (predict and night read fit files)", file)
		return r
	}
	a, err := analyse(o.modelOptions, data, at, site, sites, defaultSite)
	if err != nil {
		r.err = err
		return r
	}
	r.warnings = a.warnings
	var buf bytes.Buffer
	if o.json {
		err = writeFitJSON(&buf, a, o)
	} else {
		err = writeFitText(&buf, a, o)
	}
	if err != nil {
		r.err = err
		return r
	}
	r.out = buf.Bytes()
	return r
}

// writeManyTextBlock prints one file's block of the text output.
func writeManyTextBlock(w io.Writer, r fileResult, first bool) error {
	var b bytes.Buffer
	if !first {
		b.WriteByte('\n')
	}
	fmt.Fprintf(&b, "== %s ==\n", r.file)
	if r.err != nil {
		fmt.Fprintf(&b, "error: %s\n", oneLine(r.err.Error()))
	} else {
		b.Write(r.out)
	}
	_, err := w.Write(b.Bytes())
	return err
}

// manyErrorJSON is the element of fit --json over several files for a file
// that failed.
type manyErrorJSON struct {
	File  string `json:"file"`
	Error string `json:"error"`
}

// writeManyJSONElement prints one file's element of the JSON array.
func writeManyJSONElement(w io.Writer, r fileResult, last bool) error {
	var elem []byte
	if r.err != nil {
		b, err := json.Marshal(manyErrorJSON{File: r.file, Error: oneLine(r.err.Error())})
		if err != nil {
			return err
		}
		elem = b
	} else {
		elem = bytes.TrimRight(r.out, "\n")
	}
	var b bytes.Buffer
	if err := json.Indent(&b, elem, "  ", "  "); err != nil {
		return err
	}
	sep := ","
	if last {
		sep = ""
	}
	_, err := fmt.Fprintf(w, "  %s%s\n", b.Bytes(), sep)
	return err
}
