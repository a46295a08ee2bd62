package main

import (
	"bytes"
	"encoding/json"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"arcfit/fit/demo"
)

// TestDemoWritesAndInspects runs the demo into a temporary directory: the
// files written must be the embedded ones byte for byte, stderr must say
// where they went and what is still to come, stdout must hold every step's
// output: inspect, fit, predict and the night's sky.
func TestDemoWritesAndInspects(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "new", "demo") // made by the command
	code, out, errs := runArgs(t, "demo", "--out", dir)
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
	if len(entries) != 4+len(demoCharts) {
		t.Errorf("demo: %d entries in %s, want the 2 files, the fit file, the simulated night and %d charts (no temporary left)", len(entries), dir, len(demoCharts))
	}
	for _, name := range demoCharts {
		f, err := os.Open(filepath.Join(dir, name))
		if err != nil {
			t.Errorf("demo: chart %s: %v", name, err)
			continue
		}
		img, err := png.Decode(f)
		f.Close()
		if err != nil || img.Bounds().Dx() < 400 || img.Bounds().Dy() < 300 {
			t.Errorf("demo: chart %s is not a readable PNG of a useful size: %v", name, err)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, demoFitFile)); err != nil {
		t.Errorf("demo: no fit file: %v", err)
	}
	for _, want := range []string{
		"14 observations, 14 in use", "3 nights, 2 sites", // inspect
		"chosen model:", "residuals, observed − computed", // fit
		"2027-02-09T04:00:00.00Z", "2027-03-01T04:00:00.00Z", // predict
		"dark window:", // night
	} {
		if !strings.Contains(out, want) {
			t.Errorf("demo: stdout lacks %q:\n%s", want, out)
		}
	}

	// A second run over its own files is fine; --json gives one JSON object.
	code, out, errs = runArgs(t, "demo", "--json", "--out="+dir)
	if code != exitOK {
		t.Fatalf("demo again: code %d, stderr %q", code, errs)
	}
	var v map[string]any
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Errorf("demo --json: stdout is not one JSON object: %v", err)
	}
	ins, _ := v["inspect"].(map[string]any)
	if ins["observation_count"] != 14.0 {
		t.Errorf("demo --json: inspect.observation_count %v, want 14 (rows of the demo file)", ins["observation_count"])
	}
	fitv, _ := v["fit"].(map[string]any)
	if _, ok := fitv["model"].(string); !ok {
		t.Errorf("demo --json: fit.model missing: %v", v["fit"])
	}
	pred, _ := v["predict"].(map[string]any)
	rows, _ := pred["rows"].([]any)
	if len(rows) != 2 {
		t.Fatalf("demo --json: predict.rows has %d rows, want the 2 times of demoPredictTimes", len(rows))
	}
	// The chosen model is the two-body orbit (the auto rule takes it when it
	// fits; fit's tests check the rule), and the invented object's ERFA truth
	// (fit/demo truth.csv, python3-erfa 2.0.0.1 via
	// testdata/gen/demo_scenario.py) lies inside both printed 3-σ ellipses,
	// the next night and three weeks later.
	if fitv["model"] != "kepler" {
		t.Errorf("demo --json: fit.model %v, want kepler", fitv["model"])
	}
	for _, r := range rows {
		row, _ := r.(map[string]any)
		tm, _ := row["time_utc"].(string)
		ra, dec, _, _ := truthAt(t, strings.Replace(tm, ".00Z", "Z", 1), "Alder Ridge")
		e, _ := row["ellipse"].(map[string]any)
		a, b, pa := e["semi_major_arcsec"].(float64)/3, e["semi_minor_arcsec"].(float64)/3, e["pa_deg"].(float64)*math.Pi/180
		dE := math.Remainder(ra-row["ra_deg"].(float64), 360) * math.Cos(dec*math.Pi/180) * 3600
		dN := (dec - row["dec_deg"].(float64)) * 3600
		// Offsets along the major (PA from north through east) and minor axes.
		u := dE*math.Sin(pa) + dN*math.Cos(pa)
		w := dE*math.Cos(pa) - dN*math.Sin(pa)
		if m := math.Hypot(u/a, w/b); !(m < 3) || row["beyond_horizon"] != false {
			t.Errorf("demo --json: at %s the truth is %.2f σ from the prediction (beyond_horizon %v)", tm, m, row["beyond_horizon"])
		}
	}
	night, _ := v["night"].(map[string]any)
	sky, _ := night["sky"].(map[string]any)
	if _, ok := sky["sunset_utc"].(string); !ok || night["observable"] != true {
		t.Errorf("demo --json: night.sunset_utc missing: %v", v["night"])
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
	code, out, errs := runArgs(t, "demo", "--out", dir)
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
