package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"arcfit/astro/obs"
)

// TestSimulateFileAndFit simulates an invented target from an inline site and
// a named one on two nights, writes the file and the sites, and checks that
// the file reads back with astro/obs (count, sites, the header's provenance),
// that inspect reads it with the sites written, and that fit recovers the
// noise: its RMS residual within 30 % of the 0.5″ asked for (20 observations:
// the RMS of 40 normal deviates has a relative standard error of about
// 1/√80 = 11 %, so 30 % is some 3 standard errors, less the fitted
// parameters' share).
func TestSimulateFileAndFit(t *testing.T) {
	_, sitesPath := demoFiles(t)
	dir := t.TempDir()
	out, sitesOut := filepath.Join(dir, "sim.csv"), filepath.Join(dir, "sim-sites.csv")
	code, stdout, errs := runArgs(t, "simulate", "--elements", nightTargets, "--name", "Invented-N1",
		"--site", "44.52,-72.80,410", "--site", "Alder Ridge", "--sites", sitesPath,
		"--nights", "2026-12-11,2026-12-13", "--per-night", "5", "--cadence", "15m", "--noise", "0.5", "--seed", "7",
		"--out", out, "--sites-out", sitesOut)
	if code != exitOK || stdout != "" {
		t.Fatalf("code %d, stdout %q, stderr %q", code, stdout, errs)
	}
	if !strings.Contains(errs, "wrote 20 synthetic observations to "+out) || strings.Count(errs, "5 observations (best") != 4 {
		t.Errorf("stderr %q", errs)
	}
	data, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"# SYNTHETIC", `element set "Invented-N1"`, "seed 7", "sigma 0.5", "2026-12-11, 2026-12-13", "Alder Ridge (42.315000, -101.528000, 930 m)"} {
		if !strings.Contains(string(data), want) {
			t.Errorf("file lacks %q", want)
		}
	}
	sites, err := obs.ReadSitesFile(sitesOut)
	if err != nil {
		t.Fatal(err)
	}
	set, err := obs.ReadFile(out, obs.ReadOptions{Sites: sites})
	if err != nil {
		t.Fatal(err)
	}
	if len(set.Obs) != 20 || len(set.Warnings) != 0 {
		t.Fatalf("read back %d observations, warnings %v; want 20, none", len(set.Obs), set.Warnings)
	}
	perSite := map[string]int{}
	for _, o := range set.Obs {
		perSite[o.Site]++
	}
	if perSite["44.52,-72.80,410"] != 10 || perSite["Alder Ridge"] != 10 {
		t.Errorf("observations by site %v", perSite)
	}
	code, js, errs := runArgs(t, "fit", out, "--sites", sitesOut, "--json")
	if code != exitOK {
		t.Fatalf("fit: code %d, %s", code, errs)
	}
	var f map[string]any
	if err := json.Unmarshal([]byte(js), &f); err != nil {
		t.Fatal(err)
	}
	rms, ok := f["rms_arcsec"].(float64)
	if !ok || rms < 0.35 || rms > 0.65 {
		t.Errorf("fit of the simulated file: rms %v″, want 0.5″ within 30 %%", f["rms_arcsec"])
	}
}

// TestSimulateSeed checks that the same seed gives the same file on standard
// output, and another seed another file with the same times.
func TestSimulateSeed(t *testing.T) {
	args := []string{"simulate", "--elements", nightTargets, "--name", "Invented-P2", "--site", "-34.6,138.9,350",
		"--from", "2026-08-10", "--night-count", "2", "--per-night", "3", "--cadence", "30m"}
	_, a, _ := runArgs(t, append(args, "--seed", "11")...)
	_, b, _ := runArgs(t, append(args, "--seed", "11")...)
	_, c, _ := runArgs(t, append(args, "--seed", "12")...)
	if a == "" || a != b {
		t.Fatalf("seed 11 twice: outputs differ or are empty")
	}
	if a == c {
		t.Fatalf("seeds 11 and 12: the same output")
	}
	rowsA, rowsC := strings.Split(strings.TrimSpace(a), "\n"), strings.Split(strings.TrimSpace(c), "\n")
	if len(rowsA) != len(rowsC) {
		t.Fatalf("%d and %d lines", len(rowsA), len(rowsC))
	}
	data := 0
	for i := range rowsA {
		if strings.HasPrefix(rowsA[i], "#") || strings.HasPrefix(rowsA[i], "time,") {
			continue
		}
		data++
		ta, tc := strings.SplitN(rowsA[i], ",", 2)[0], strings.SplitN(rowsC[i], ",", 2)[0]
		if ta != tc || rowsA[i] == rowsC[i] {
			t.Errorf("line %d: %q and %q: want the same time, other noise", i, rowsA[i], rowsC[i])
		}
	}
	if data != 6 {
		t.Errorf("%d observations, want 6", data)
	}
}

// TestSimulateFitFile simulates from a saved fit (the demo's): the header
// names the fit file, and the observations read back.
func TestSimulateFitFile(t *testing.T) {
	obsPath, sitesPath := demoFiles(t)
	fitPath := filepath.Join(filepath.Dir(obsPath), "demo-fit.json")
	if code, _, errs := runCmd(t, newFitCommand(), obsPath, "--sites", sitesPath, "--save", fitPath); code != exitOK {
		t.Fatalf("fit: %s", errs)
	}
	code, out, errs := runArgs(t, "simulate", fitPath, "--site", "Alder Ridge", "--nights", "2027-02-08", "--per-night", "4")
	if code != exitOK {
		t.Fatalf("code %d, %s", code, errs)
	}
	if !strings.Contains(out, "# object: fit file demo-fit.json") {
		t.Errorf("header does not name the fit file:\n%s", out)
	}
	set, err := obs.Read(strings.NewReader(out), "sim.csv", obs.ReadOptions{})
	if err != nil || len(set.Obs) != 4 || set.Obs[0].Site != "Alder Ridge" {
		t.Fatalf("read back: %v, %+v", err, set)
	}
}

// TestSimulateBadInput checks that bad calls exit 2 with one line on stderr
// naming what is wrong, print nothing and write no file.
func TestSimulateBadInput(t *testing.T) {
	obsPath, sitesPath := demoFiles(t)
	dir := t.TempDir()
	out := filepath.Join(dir, "sim.csv")
	base := func(extra ...string) []string {
		return append([]string{"simulate", "--elements", nightTargets, "--name", "Invented-N1", "--site", "44.52,-72.80,410",
			"--nights", "2026-12-11", "--out", out}, extra...)
	}
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"simulate", "--site", "44.52,-72.80,410", "--nights", "2026-12-11"}, "no object given"},
		{[]string{"simulate", "--elements", nightTargets, "--site", "44.52,-72.80,410", "--nights", "2026-12-11"}, "Invented-N1"},
		{[]string{"simulate", "--elements", "no-such.csv", "--site", "44.52,-72.80,410", "--nights", "2026-12-11"}, "no-such.csv"},
		{[]string{"simulate", obsPath, "--site", "Alder Ridge", "--sites", sitesPath, "--nights", "2027-02-10"}, "is an observation file"},
		{[]string{"simulate", nightTargets, "--elements", nightTargets, "--site", "44.52,-72.80,410", "--nights", "2026-12-11"}, "not both"},
		{[]string{"simulate", "--elements", nightTargets, "--name", "Invented-N1", "--nights", "2026-12-11"}, "no --site"},
		{[]string{"simulate", "--elements", nightTargets, "--name", "Invented-N1", "--site", "44.52,-72.80,410"}, "no nights given"},
		{base("--site", "Nowhere"), `--site "Nowhere"`},
		{base("--site", "44.52,-72.80,410"), "given twice"},
		{base("--from", "2026-12-11", "--night-count", "2"), "exclude each other"},
		{[]string{"simulate", "--elements", nightTargets, "--name", "Invented-N1", "--site", "1,2,3", "--from", "2026-12-11"}, "--night-count 0"},
		{[]string{"simulate", "--elements", nightTargets, "--name", "Invented-N1", "--site", "1,2,3", "--night-count", "3"}, "needs --from"},
		{base("--nights", "2026-12-11,2026-13-01"), `"2026-13-01" is not a date`},
		{base("--nights", "2026-12-11,2026-12-11"), "given twice"},
		{base("--per-night", "0"), "--per-night 0"},
		{base("--cadence", "1.5s"), `--cadence "1.5s"`},
		{base("--cadence", "0"), `--cadence "0"`},
		{base("--noise", "0"), "--noise 0"},
		{base("--noise", "5000"), "--noise 5000"},
		{base("--mag-noise", "-0.1"), "--mag-noise -0.1"},
		{base("--min-alt", "90"), "--min-alt 90"},
		{base("--seed", "-1"), `invalid argument "-1"`},
		{base("--out", filepath.Join(dir, "no-dir", "x.csv")), "no directory"},
		{base("--out", dir), "a directory"},
		{base("--sites-out", out), "same file"},
		{[]string{"simulate", "--elements", nightTargets, "--name", "Invented-N1", "--site", "1,2,3", "--site", "4,5,6",
			"--from", "2026-12-11", "--night-count", "366", "--per-night", "10000"}, "at most 1000000"},
		{[]string{"simulate", "--elements", nightTargets, "--name", "Invented-N1", "--site", "44.52,-72.80,410", "--nights", "2026-04-28", "--out", out}, "no observations"},
	}
	for _, c := range cases {
		code, stdout, errs := runArgs(t, c.args...)
		if code != exitUsage || stdout != "" || lines(errs) != 1 || !strings.Contains(errs, c.want) {
			t.Errorf("arcfit %q: code %d, stdout %q, stderr %q; want 2, nothing, one line with %q", c.args, code, stdout, errs, c.want)
		}
		if _, err := os.Stat(out); err == nil {
			t.Fatalf("arcfit %q: wrote %s", c.args, out)
		}
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 0 {
		t.Errorf("files left in the output directory: %v", entries)
	}
}
