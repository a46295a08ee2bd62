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

// TestDemoWritesAndInspects runs the demo into a temporary directory: the
// files written must be the embedded ones byte for byte, stderr must say
// where they went and what is not built yet, stdout must be inspect's output.
func TestDemoWritesAndInspects(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "new", "demo") // made by the command
	code, out, errs := runArgs(t, "demo", "--dir", dir)
	if code != exitOK {
		t.Fatalf("demo: code %d, stderr %q", code, errs)
	}
	for name, want := range map[string][]byte{demo.ObservationsFile: demo.Observations(), demo.SitesFile: demo.Sites()} {
		path := filepath.Join(dir, name)
		got, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("demo: %v", err)
		}
		if !bytes.Equal(got, want) {
			t.Errorf("demo: %s differs from the embedded file", path)
		}
		if !strings.Contains(errs, "wrote "+path) {
			t.Errorf("demo: stderr does not say it wrote %s:\n%s", path, errs)
		}
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 2 {
		t.Errorf("demo: %d entries in %s, want the 2 files (no temporary left)", len(entries), dir)
	}
	if !strings.Contains(errs, "not built yet") {
		t.Errorf("demo: stderr does not say which steps are not built yet:\n%s", errs)
	}
	if !strings.Contains(out, "14 observations, 14 in use") || !strings.Contains(out, "3 nights, 2 sites") {
		t.Errorf("demo: stdout is not the inspect summary of the demo data:\n%s", out)
	}

	// A second run over its own files is fine; --json gives one JSON object.
	code, out, errs = runArgs(t, "demo", "--json", "--dir="+dir)
	if code != exitOK {
		t.Fatalf("demo again: code %d, stderr %q", code, errs)
	}
	var v map[string]any
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Errorf("demo --json: stdout is not one JSON object: %v", err)
	}
	if v["observation_count"] != 14.0 {
		t.Errorf("demo --json: observation_count %v, want 14 (rows of the demo file)", v["observation_count"])
	}
}

// TestDemoKeepsForeignFiles checks that the demo never replaces a file that
// is not one of its own.
func TestDemoKeepsForeignFiles(t *testing.T) {
	dir := t.TempDir()
	mine := filepath.Join(dir, demo.SitesFile)
	if err := os.WriteFile(mine, []byte("name,lat_deg,lon_deg,height_m\nHome,40,-75,100\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runArgs(t, "demo", "--dir", dir)
	if code != exitUsage || out != "" || lines(errs) != 1 || !strings.Contains(errs, "not overwriting") {
		t.Errorf("demo over a foreign file: code %d stdout %q stderr %q; want 2, nothing, one line", code, out, errs)
	}
	got, _ := os.ReadFile(mine)
	if !strings.HasPrefix(string(got), "name,lat_deg") {
		t.Errorf("demo replaced a foreign file")
	}
	if _, err := os.Stat(filepath.Join(dir, demo.ObservationsFile)); err == nil {
		t.Errorf("demo wrote some files before refusing")
	}
}
