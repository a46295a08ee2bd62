package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"arcfit/fit/demo"
)

// manyDir writes a directory for the multi-file fit: a.csv and c.csv, the
// demo observations (fit/demo, invented data) and the same with its last
// rows left out; b.csv, a file with a malformed time; notes.txt and a
// subdirectory, which fit must skip. It returns the directory and the sites
// file (outside it).
func manyDir(t *testing.T) (dir, sites string) {
	t.Helper()
	root := t.TempDir()
	dir = filepath.Join(root, "obs")
	if err := os.MkdirAll(filepath.Join(dir, "sub"), 0o755); err != nil {
		t.Fatal(err)
	}
	sites = filepath.Join(root, "sites.csv")
	full := demo.Observations()
	lines := strings.SplitAfter(string(full), "\n")
	short := strings.Join(lines[:len(lines)-3], "") // two observations fewer
	files := map[string]string{
		"a.csv":        string(full),
		"b.csv":        "time,ra,dec\n2027-02-10T03:00:00,10:21:33.5,+12:45:10\n",
		"c.csv":        short,
		"notes.txt":    "not observations\n",
		"sub/d.csv":    string(full),
		"../sites.csv": string(demo.Sites()),
	}
	for name, body := range files {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir, sites
}

// singleJSON fits one file alone and returns its --json object, compacted.
func singleJSON(t *testing.T, file, sites string) string {
	t.Helper()
	code, out, errs := runCmd(t, newFitCommand(), file, "--sites", sites, "--json")
	if code != exitOK {
		t.Fatalf("fit %s: exit %d, %s", file, code, errs)
	}
	var b bytes.Buffer
	if err := json.Compact(&b, []byte(out)); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

// TestFitManyJSONOrderAndErrors fits a directory: the array holds one
// element per *.csv file in name order (notes.txt and the subdirectory
// skipped), each good file's element is exactly the object a fit of that
// file alone prints, the bad file's element carries its error in its place,
// and the exit code is 2 (an input error). The result does not depend on the
// number of workers.
func TestFitManyJSONOrderAndErrors(t *testing.T) {
	dir, sites := manyDir(t)
	var first string
	for _, jobs := range []string{"1", "3"} {
		code, out, errs := runCmd(t, newFitCommand(), dir, "--sites", sites, "--json", "--jobs", jobs)
		if code != exitUsage {
			t.Fatalf("--jobs %s: exit %d, want %d (a file failed); stderr %s", jobs, code, exitUsage, errs)
		}
		if !strings.Contains(errs, "1 of 3 files failed") {
			t.Errorf("--jobs %s: stderr %q does not say how many failed", jobs, errs)
		}
		var elems []json.RawMessage
		if err := json.Unmarshal([]byte(out), &elems); err != nil {
			t.Fatalf("--jobs %s: not a JSON array: %v\n%s", jobs, err, out)
		}
		if len(elems) != 3 {
			t.Fatalf("--jobs %s: %d elements, want 3 (a.csv, b.csv, c.csv)", jobs, len(elems))
		}
		for i, name := range []string{"a.csv", "b.csv", "c.csv"} {
			var head struct {
				File  string  `json:"file"`
				Error *string `json:"error"`
			}
			if err := json.Unmarshal(elems[i], &head); err != nil {
				t.Fatal(err)
			}
			want := filepath.Join(dir, name)
			if head.File != want {
				t.Errorf("--jobs %s: element %d is %q, want %q", jobs, i, head.File, want)
			}
			if name == "b.csv" {
				if head.Error == nil || !strings.Contains(*head.Error, "b.csv:2") {
					t.Errorf("--jobs %s: b.csv error %v, want one naming b.csv line 2", jobs, head.Error)
				}
				continue
			}
			if head.Error != nil {
				t.Errorf("--jobs %s: %s failed: %s", jobs, name, *head.Error)
				continue
			}
			var got bytes.Buffer
			if err := json.Compact(&got, elems[i]); err != nil {
				t.Fatal(err)
			}
			if alone := singleJSON(t, want, sites); got.String() != alone {
				t.Errorf("--jobs %s: %s: element differs from the fit of the file alone", jobs, name)
			}
		}
		if first == "" {
			first = out
		} else if out != first {
			t.Errorf("--jobs %s output differs from --jobs 1", jobs)
		}
	}
}

// TestFitManyTextOrder fits files named on the command line: the blocks come
// in the order given, each under a header naming its file, the failed file's
// block holds its error, and the exit code is 2; without the bad file the
// exit code is 0.
func TestFitManyTextOrder(t *testing.T) {
	dir, sites := manyDir(t)
	a, b, c := filepath.Join(dir, "a.csv"), filepath.Join(dir, "b.csv"), filepath.Join(dir, "c.csv")
	code, out, errs := runCmd(t, newFitCommand(), c, b, a, "--sites", sites)
	if code != exitUsage {
		t.Fatalf("exit %d, want %d; stderr %s", code, exitUsage, errs)
	}
	ic, ib, ia := strings.Index(out, "== "+c+" =="), strings.Index(out, "== "+b+" =="), strings.Index(out, "== "+a+" ==")
	if !(ic == 0 && ib > ic && ia > ib) {
		t.Fatalf("headers at %d, %d, %d: want c, b, a in that order\n%s", ic, ib, ia, out)
	}
	if blk := out[ib:ia]; !strings.Contains(blk, "\nerror: ") || !strings.Contains(blk, "b.csv:2") {
		t.Errorf("b.csv block %q: want its error", blk)
	}
	if blk := out[ia:]; !strings.Contains(blk, "a.csv: 14 observations") {
		t.Errorf("a.csv block does not start with its summary:\n%s", blk)
	}
	code, out, errs = runCmd(t, newFitCommand(), a, c, "--sites", sites)
	if code != exitOK {
		t.Fatalf("two good files: exit %d; stderr %s", code, errs)
	}
	if strings.Count(out, "\n== ") != 1 || !strings.HasPrefix(out, "== "+a+" ==\n") {
		t.Errorf("two good files: want two blocks, a first:\n%s", out)
	}
}

// TestFitManyUsage checks the refusals: options for one output file, a bad
// --jobs, a directory without observation files.
func TestFitManyUsage(t *testing.T) {
	dir, sites := manyDir(t)
	empty := t.TempDir()
	a, c := filepath.Join(dir, "a.csv"), filepath.Join(dir, "c.csv")
	for _, args := range [][]string{
		{a, c, "--sites", sites, "--save", filepath.Join(t.TempDir(), "f.json")},
		{a, c, "--sites", sites, "--chart", filepath.Join(t.TempDir(), "r.png")},
		{a, c, "--sites", sites, "--csv"},
		{a, c, "--sites", sites, "--jobs", "-1"},
		{empty},
	} {
		code, out, errs := runCmd(t, newFitCommand(), args...)
		if code != exitUsage || out != "" || !strings.Contains(errs, "arcfit fit: ") {
			t.Errorf("%v: exit %d, stdout %q, stderr %q; want exit 2, no output, a message", args, code, out, errs)
		}
	}
}
