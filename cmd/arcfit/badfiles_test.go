package main

import (
	"os"
	"path/filepath"
	"regexp"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"testing"

	"arcfit/fit/demo"
)

// badFileKinds are the ways an input file can be bad: missing, empty,
// unreadable, and cut short in the middle of a line (or of the JSON).
var badFileKinds = []string{"missing", "empty", "unreadable", "truncated"}

// badInputs holds the good input files (the invented demo scenario and a
// fit of it) and makes bad ones.
type badInputs struct {
	dir  string
	good map[string]string // kind of file → path of a good one
	// unreadable is how an unreadable file is made: "chmod" (mode 000), or,
	// where that does not stop this process from reading (it runs as root),
	// "proc" (a symbolic link to /proc/self/mem, which opens but whose first
	// read fails with an I/O error on Linux), or else "dir" (a directory at
	// the path: opens, and reading fails).
	unreadable string
}

// newBadInputs writes the good files into a temporary directory.
func newBadInputs(t *testing.T) *badInputs {
	t.Helper()
	b := &badInputs{dir: t.TempDir(), good: map[string]string{}}
	write := func(kind, name string, data []byte) {
		p := filepath.Join(b.dir, name)
		if err := os.WriteFile(p, data, 0o644); err != nil {
			t.Fatal(err)
		}
		b.good[kind] = p
	}
	write("obs", "observations.csv", demo.Observations())
	write("sites", "sites.csv", demo.Sites())
	write("elements", "elements.csv", demo.Elements())
	fitPath := filepath.Join(b.dir, "fit.json")
	// A sky-plane fit (poly2): a fitted orbit's Monte Carlo regions would
	// make the runs with good files seconds long; the fit-file reader is
	// the same for both (FuzzParseFitFile covers the orbit).
	if code, _, errs := runArgs(t, "fit", b.good["obs"], "--sites", b.good["sites"], "--model", "poly2", "--save", fitPath); code != exitOK {
		t.Fatalf("fit --save: code %d: %s", code, errs)
	}
	b.good["fit"] = fitPath
	write("targets", "targets.txt", []byte("# invented targets\nfit fit.json\nelements elements.csv\n"))

	probe := filepath.Join(b.dir, "probe")
	if err := os.WriteFile(probe, []byte("x"), 0o000); err != nil {
		t.Fatal(err)
	}
	b.unreadable = "chmod"
	if _, err := os.ReadFile(probe); err == nil {
		b.unreadable = "dir"
		if _, err := os.ReadFile("/proc/self/mem"); err != nil && runtime.GOOS == "linux" {
			b.unreadable = "proc"
		}
		t.Logf("chmod 000 does not stop reading here (running as root): an unreadable file is made as %q", b.unreadable)
	}
	return b
}

// truncated returns the good file of kind cut short: the JSON at half its
// length; a line-based file in the middle of the first word of its last
// line (inside the time of an observation row, the name of a site or an
// element set, the kind word of a target line).
func truncated(kind string, data []byte) []byte {
	if kind == "fit" {
		return data[:len(data)/2]
	}
	text := strings.TrimRight(string(data), "\n")
	last := strings.LastIndexByte(text, '\n') + 1
	word := strings.IndexAny(text[last:], ", \t")
	if word < 0 {
		word = len(text) - last
	}
	return []byte(text[:last+max(1, word/2)])
}

// bad returns the path of a bad file standing for the good file of kind.
func (b *badInputs) bad(t *testing.T, kind, how string) string {
	t.Helper()
	good := b.good[kind]
	p := filepath.Join(b.dir, how+"-"+filepath.Base(good))
	if err := os.RemoveAll(p); err != nil { // made afresh for each case
		t.Fatal(err)
	}
	switch how {
	case "missing":
		return filepath.Join(b.dir, "no-such-"+filepath.Base(good))
	case "empty":
		if err := os.WriteFile(p, nil, 0o644); err != nil {
			t.Fatal(err)
		}
	case "unreadable":
		switch b.unreadable {
		case "proc":
			if err := os.Symlink("/proc/self/mem", p); err != nil {
				t.Fatal(err)
			}
			return p
		case "dir":
			if err := os.MkdirAll(p, 0o755); err != nil {
				t.Fatal(err)
			}
			return p
		}
		data, _ := os.ReadFile(good)
		if err := os.WriteFile(p, data, 0o000); err != nil {
			t.Fatal(err)
		}
	case "truncated":
		data, err := os.ReadFile(good)
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, truncated(kind, data), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return p
}

// badFileCase is one command reading one file: the kind of file and the
// arguments, with the placeholders IN (the file under test), OBS, SITES,
// ELEMENTS, FIT, TARGETS (the good files) and OUT (a fresh output
// directory).
type badFileCase struct {
	name string
	kind string
	args []string
}

var badFileCases = []badFileCase{
	{"inspect OBS", "obs", []string{"inspect", "IN", "--sites", "SITES"}},
	{"inspect --sites", "sites", []string{"inspect", "OBS", "--sites", "IN"}},
	{"fit OBS", "obs", []string{"fit", "IN", "--sites", "SITES", "--model", "poly2", "--save", "OUT/fit.json", "--chart", "OUT/region.png", "--compare-chart", "OUT/models.svg"}},
	{"fit --sites", "sites", []string{"fit", "OBS", "--sites", "IN", "--model", "poly2", "--save", "OUT/fit.json", "--chart", "OUT/region.png"}},
	{"predict OBS", "obs", []string{"predict", "IN", "--sites", "SITES", "--model", "poly2", "--site", "Alder Ridge", "--at", "2027-02-20T04:00:00Z"}},
	{"predict FIT", "fit", []string{"predict", "IN", "--at", "2027-02-20T04:00:00Z"}},
	{"predict --elements", "elements", []string{"predict", "--elements", "IN", "--at", "2027-02-20T04:00:00Z"}},
	{"predict --sites", "sites", []string{"predict", "OBS", "--sites", "IN", "--model", "poly2", "--site", "Alder Ridge", "--at", "2027-02-20T04:00:00Z"}},
	{"night OBS", "obs", []string{"night", "IN", "--sites", "SITES", "--model", "poly2", "--site", "Alder Ridge", "--date", "2027-02-20", "--chart", "OUT/night.png"}},
	{"night FIT", "fit", []string{"night", "IN", "--site", "44.52,-72.80,410", "--date", "2027-02-20", "--chart", "OUT/night.svg"}},
	{"night --elements", "elements", []string{"night", "--elements", "IN", "--site", "44.52,-72.80,410", "--date", "2027-02-20", "--chart", "OUT/night.png"}},
	{"night --sites", "sites", []string{"night", "--sites", "IN", "--site", "Alder Ridge", "--date", "2027-02-20", "--chart", "OUT/night.png"}},
	{"plan TARGETS", "targets", []string{"plan", "IN", "--site", "44.52,-72.80,410", "--date", "2027-02-20"}},
	{"plan --sites", "sites", []string{"plan", "TARGETS", "--sites", "IN", "--site", "Alder Ridge", "--date", "2027-02-20"}},
	{"ephem --elements", "elements", []string{"ephem", "--elements", "IN", "--from", "2027-02-20T00:00:00Z", "--to", "2027-02-21T00:00:00Z", "--step", "6h"}},
	{"ephem --sites", "sites", []string{"ephem", "sun", "--sites", "IN", "--site", "Alder Ridge", "--from", "2027-02-20T00:00:00Z", "--to", "2027-02-21T00:00:00Z", "--step", "6h"}},
	{"simulate ELEMENTS", "elements", []string{"simulate", "IN", "--site", "44.52,-72.80,410", "--nights", "2027-02-20", "--out", "OUT/sim.csv", "--sites-out", "OUT/sites.csv"}},
	{"simulate FIT", "fit", []string{"simulate", "IN", "--site", "44.52,-72.80,410", "--nights", "2027-02-20", "--out", "OUT/sim.csv", "--sites-out", "OUT/sites.csv"}},
	{"simulate --elements", "elements", []string{"simulate", "--elements", "IN", "--site", "44.52,-72.80,410", "--nights", "2027-02-20", "--out", "OUT/sim.csv"}},
	{"simulate --sites", "sites", []string{"simulate", "--elements", "ELEMENTS", "--sites", "IN", "--site", "Alder Ridge", "--nights", "2027-02-20", "--out", "OUT/sim.csv", "--sites-out", "OUT/sites.csv"}},
}

// placeOf matches "FILE:LINE:" or "FILE:LINE:COL:" of path in a message.
func placeOf(path string) *regexp.Regexp {
	return regexp.MustCompile(regexp.QuoteMeta(path) + `:[0-9]+(:[0-9]+)?: `)
}

// dirEntries lists the names in dir.
func dirEntries(t *testing.T, dir string) []string {
	t.Helper()
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range es {
		names = append(names, e.Name())
	}
	sort.Strings(names)
	return names
}

// TestBadInputFiles runs every command that reads a file with that file
// missing, empty, unreadable or cut short: each fails with exit code 2,
// prints nothing on standard output and one line on standard error that
// names the command and the file (and, for a file cut short, its line), and
// leaves nothing in the output directory (no output file, no temporary
// file). The same calls with the good file succeed, so it is the bad file
// that each failure is about.
func TestBadInputFiles(t *testing.T) {
	in := newBadInputs(t)
	for _, c := range badFileCases {
		for _, how := range append([]string{"good"}, badFileKinds...) {
			out := t.TempDir()
			path := in.good[c.kind]
			if how != "good" {
				path = in.bad(t, c.kind, how)
			}
			args := make([]string, len(c.args))
			for i, a := range c.args {
				switch {
				case a == "IN":
					a = path
				case a == "OBS" || a == "SITES" || a == "ELEMENTS" || a == "FIT" || a == "TARGETS":
					a = in.good[strings.ToLower(a)]
				case strings.HasPrefix(a, "OUT/"):
					a = filepath.Join(out, strings.TrimPrefix(a, "OUT/"))
				}
				args[i] = a
			}
			code, stdout, stderr := runArgs(t, args...)
			left := dirEntries(t, out)
			if how == "good" {
				if code != exitOK {
					t.Errorf("%s with the good file: code %d: %s", c.name, code, stderr)
				}
				continue
			}
			name := c.name + ", " + how + " file"
			msg := strings.TrimSuffix(stderr, "\n")
			if code != exitUsage || stdout != "" || msg == "" || strings.Contains(msg, "\n") {
				t.Errorf("%s: code %d, stdout %d bytes, stderr %q; want 2, nothing, one line", name, code, len(stdout), stderr)
			}
			if !strings.HasPrefix(msg, "arcfit "+c.args[0]+": ") || !strings.Contains(msg, path) {
				t.Errorf("%s: message %q does not name the command and the file %s", name, msg, path)
			}
			if how == "truncated" && !placeOf(path).MatchString(msg) {
				t.Errorf("%s: message %q does not give the line of the file", name, msg)
			}
			if len(left) != 0 {
				t.Errorf("%s: left %v in the output directory", name, left)
			}
		}
	}
}

// TestBadOutputPlaces gives the output options a place they cannot write
// (an existing directory where a file is wanted, a file where demo wants a
// directory, a directory that does not exist): exit code 2, one line naming
// the place, the existing file untouched, nothing new left beside it.
func TestBadOutputPlaces(t *testing.T) {
	checkBadOutputPlaces(t, func(obs, sites, el, dir, aFile, aDir, nowhere string) []badPlaceCase {
		return []badPlaceCase{
			{"fit --chart in no directory", []string{"fit", obs, "--sites", sites, "--model", "poly2", "--chart", filepath.Join(dir, "no-such-dir", "c.png")}, "no-such-dir"},
			{"night --chart DIR.png", []string{"night", "--elements", el, "--site", "44.52,-72.80,410", "--date", "2027-02-20", "--chart", aDir + ".png/x.png"}, aDir + ".png"},
			{"simulate --out DIR", []string{"simulate", el, "--site", "44.52,-72.80,410", "--nights", "2027-02-20", "--out", aDir}, aDir},
			{"simulate --out in no directory", []string{"simulate", el, "--site", "44.52,-72.80,410", "--nights", "2027-02-20", "--out", nowhere}, nowhere},
			{"simulate --sites-out in no directory", []string{"simulate", el, "--site", "44.52,-72.80,410", "--nights", "2027-02-20", "--out", filepath.Join(dir, "sim.csv"), "--sites-out", nowhere}, nowhere},
			{"demo --out FILE", []string{"demo", "--out", aFile}, aFile},
			{"demo --out under a file", []string{"demo", "--out", filepath.Join(aFile, "demo")}, aFile},
		}
	})
}

// TestFitSaveBadPlace is TestBadOutputPlaces for fit --save: a directory,
// a directory that does not exist, and a chart asked for with a --save that
// cannot be written (the chart must not be left behind: the place of --save
// is checked before anything is written).
func TestFitSaveBadPlace(t *testing.T) {
	checkBadOutputPlaces(t, func(obs, sites, el, dir, aFile, aDir, nowhere string) []badPlaceCase {
		return []badPlaceCase{
			{"fit --save DIR", []string{"fit", obs, "--sites", sites, "--model", "poly2", "--save", aDir}, aDir},
			{"fit --save in no directory", []string{"fit", obs, "--sites", sites, "--model", "poly2", "--save", nowhere}, nowhere},
			{"fit --chart FILE --save in no directory", []string{"fit", obs, "--sites", sites, "--model", "poly2", "--chart", filepath.Join(dir, "c.png"), "--save", nowhere}, nowhere},
		}
	})
}

// badPlaceCase is a call whose output place is bad, and the place its
// message must name.
type badPlaceCase struct {
	name  string
	args  []string
	place string
}

// checkBadOutputPlaces runs the cases made for a fresh directory holding a
// file a-file and an empty directory a-dir (nowhere is a path in a missing
// directory).
func checkBadOutputPlaces(t *testing.T, makeCases func(obs, sites, el, dir, aFile, aDir, nowhere string) []badPlaceCase) {
	in := newBadInputs(t)
	dir := t.TempDir()
	aFile := filepath.Join(dir, "a-file")
	if err := os.WriteFile(aFile, []byte("keep me\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	aDir := filepath.Join(dir, "a-dir")
	if err := os.Mkdir(aDir, 0o755); err != nil {
		t.Fatal(err)
	}
	nowhere := filepath.Join(dir, "no-such-dir", "x.csv")
	cases := makeCases(in.good["obs"], in.good["sites"], in.good["elements"], dir, aFile, aDir, nowhere)
	for _, c := range cases {
		code, stdout, stderr := runArgs(t, c.args...)
		msg := strings.TrimSuffix(stderr, "\n")
		if code != exitUsage || stdout != "" || strings.Contains(msg, "\n") || !strings.Contains(msg, c.place) {
			t.Errorf("%s: code %d, stdout %d bytes, stderr %q; want 2, nothing, one line naming %s", c.name, code, len(stdout), stderr, c.place)
		}
		if got := dirEntries(t, dir); strings.Join(got, " ") != "a-dir a-file" {
			t.Errorf("%s: left %v in %s", c.name, got, dir)
			for _, n := range got { // so that the next case starts clean
				if n != "a-dir" && n != "a-file" {
					os.RemoveAll(filepath.Join(dir, n))
				}
			}
		}
		if got := dirEntries(t, aDir); len(got) != 0 {
			t.Errorf("%s: left %v in %s", c.name, got, aDir)
		}
		if b, _ := os.ReadFile(aFile); string(b) != "keep me\n" {
			t.Errorf("%s: %s changed to %q", c.name, aFile, b)
		}
	}
}

// TestPlanBadTargetFiles lists, in a targets file, one good target and one
// of each bad kind for each kind of target (observations, fit file, element
// set): plan schedules the good one and exits with code 2, with one line on
// standard error for each bad target that names the targets file's line and
// column and the file (and, for a file cut short, that file's line), and a
// closing line counting them.
func TestPlanBadTargetFiles(t *testing.T) {
	in := newBadInputs(t)
	var lines []string
	type want struct{ path, how string }
	var wants []want
	for _, kind := range []string{"obs", "fit", "elements"} {
		for _, how := range badFileKinds {
			p := in.bad(t, kind, how)
			lines = append(lines, kind+" "+filepath.Base(p))
			wants = append(wants, want{filepath.Base(p), how})
		}
	}
	lines = append(lines, "elements elements.csv")
	targets := filepath.Join(in.dir, "bad-targets.txt")
	if err := os.WriteFile(targets, []byte(strings.Join(lines, "\n")+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, stdout, stderr := runArgs(t, "plan", targets, "--site", "44.52,-72.80,410", "--date", "2027-02-20")
	if code != exitUsage || !strings.Contains(stdout, "Demo-1") {
		t.Errorf("plan with bad targets: code %d, stdout:\n%s\nwant code 2 and the good target scheduled", code, stdout)
	}
	var got []string // the warnings (the good set states no σ) aside
	for _, l := range strings.Split(strings.TrimSuffix(stderr, "\n"), "\n") {
		if !strings.HasPrefix(l, "arcfit plan: warning: ") {
			got = append(got, l)
		}
	}
	if len(got) != len(wants)+1 {
		t.Fatalf("plan with bad targets: %d lines on stderr, want %d:\n%s", len(got), len(wants)+1, stderr)
	}
	for i, w := range wants {
		prefix := "arcfit plan: " + targets + ":" + strconv.Itoa(i+1) + ":"
		if !strings.HasPrefix(got[i], prefix) || !strings.Contains(got[i], w.path) {
			t.Errorf("line %d: %q, want it to start %q and name %s", i+1, got[i], prefix, w.path)
		}
		if w.how == "truncated" && !regexp.MustCompile(regexp.QuoteMeta(w.path)+`:[0-9]+:`).MatchString(got[i]) {
			t.Errorf("line %d: %q does not give the line of the file cut short", i+1, got[i])
		}
	}
	if last := got[len(got)-1]; !strings.Contains(last, strconv.Itoa(len(wants))+" of "+strconv.Itoa(len(wants)+1)) {
		t.Errorf("closing line %q", last)
	}
}
