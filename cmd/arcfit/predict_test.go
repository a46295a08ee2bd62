package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/ephem"
	"arcfit/fit"
	"arcfit/fit/demo"
)

// predictRec is the part of predict --json the tests read.
type predictRec struct {
	TimeUTC string  `json:"time_utc"`
	Site    *string `json:"site"`
	Model   string  `json:"model"`
	RADeg   float64 `json:"ra_deg"`
	DecDeg  float64 `json:"dec_deg"`
	Ellipse struct {
		Sigma, SemiMajorArcsec, SemiMinorArcsec, PADeg float64
	} `json:"-"`
	E             map[string]float64 `json:"ellipse"`
	AltDeg        *float64           `json:"alt_deg"`
	AzDeg         *float64           `json:"az_deg"`
	BeyondHorizon bool               `json:"beyond_horizon"`
	NearSun       bool               `json:"near_sun"`
}

// truthAt returns the demo truth row (fit/demo truth.csv: python3-erfa
// 2.0.0.1 via testdata/gen/demo_scenario.py, astrometric ICRS, topocentric,
// alt/az from atco13 refracted at 1010 hPa, 10 °C) for a time and site.
func truthAt(t *testing.T, tm, site string) (ra, dec, alt, az float64) {
	_, rows := records(t, demo.Truth())
	for _, r := range rows {
		if r[0] == tm && r[1] == site {
			f := func(s string) float64 { v, _ := strconv.ParseFloat(s, 64); return v }
			return f(r[3]), f(r[4]), f(r[8]), f(r[9])
		}
	}
	t.Fatalf("no truth row for %s at %s", tm, site)
	return
}

const predictTime = "2027-02-09T04:00:00Z" // 22.5 h after the demo arc's last observation

// TestPredictDemoJSON compares predict's printed position with the library's
// own Solution.Predict (called here, not hard-coded) and checks the ERFA
// truth lies inside the printed 3-σ ellipse (Mahalanobis distance ≤ 3 in the
// ellipse's axes).
func TestPredictDemoJSON(t *testing.T) {
	obsPath, sitesPath := demoFiles(t)
	code, out, errs := runCmd(t, newPredictCommand(), obsPath, "--sites", sitesPath, "--at", predictTime, "--site", "Alder Ridge", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var r predictRec
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	// The library, directly.
	sites, err := obs.ReadSitesFile(sitesPath)
	if err != nil {
		t.Fatal(err)
	}
	set, err := obs.ReadFile(obsPath, obs.ReadOptions{Sites: sites})
	if err != nil {
		t.Fatal(err)
	}
	tr, err := fit.NewTrack(set, sites)
	if err != nil {
		t.Fatal(err)
	}
	c, err := fit.Compare(tr, fit.CandidateModels(tr), fit.Settings{}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	utc, _ := astro.ParseISO8601(predictTime)
	st := sites["Alder Ridge"]
	p, err := fit.NewSavedFit(c).Predict(utc, &st)
	if err != nil {
		t.Fatal(err)
	}
	if r.Model != c.Chosen {
		t.Errorf("model %s, library chose %s", r.Model, c.Chosen)
	}
	if d := astro.Separation(p.RA, p.Dec, astro.AngleFromDegrees(r.RADeg), astro.AngleFromDegrees(r.DecDeg)).Arcseconds(); d > 1e-6 {
		t.Errorf("printed position %.3g″ from the chosen model's prediction", d)
	}
	// Truth inside the printed ellipse.
	tra, tdec, talt, taz := truthAt(t, predictTime, "Alder Ridge")
	dE := (tra - r.RADeg) * math.Cos(tdec*math.Pi/180) * 3600
	dN := (tdec - r.DecDeg) * 3600
	pa := r.E["pa_deg"] * math.Pi / 180
	along := dE*math.Sin(pa) + dN*math.Cos(pa)
	across := dE*math.Cos(pa) - dN*math.Sin(pa)
	a, b := r.E["semi_major_arcsec"]/3, r.E["semi_minor_arcsec"]/3
	m := math.Sqrt(along*along/(a*a) + across*across/(b*b))
	t.Logf("truth − predicted (%.3f, %.3f)″, Mahalanobis %.2f, ellipse %.2f″ × %.2f″", dE, dN, m, a*3, b*3)
	if m > 3 {
		t.Errorf("ERFA truth at Mahalanobis distance %.2f, outside the 3-σ ellipse", m)
	}
	// Alt/az against atco13: the refraction model is within 5 % of ERFA's
	// (ephem docs), ~0.8′ at 50°; plus the position error.
	if r.AltDeg == nil || math.Abs(*r.AltDeg-talt) > 0.01 || math.Abs(*r.AzDeg-taz) > 0.01 {
		t.Errorf("alt/az %v/%v, ERFA truth %.3f/%.3f (tolerance 0.01°)", r.AltDeg, r.AzDeg, talt, taz)
	}
	if r.NearSun || r.BeyondHorizon {
		t.Errorf("near_sun %v beyond_horizon %v: want false (elongation 170° in the truth; 0.94 d after the arc)", r.NearSun, r.BeyondHorizon)
	}
}

// TestPredictFitFileSame checks that predicting from a saved fit file gives
// the same JSON as predicting from the observations.
func TestPredictFitFileSame(t *testing.T) {
	obsPath, sitesPath := demoFiles(t)
	save := filepath.Join(t.TempDir(), "fit.json")
	if code, _, errs := runCmd(t, newFitCommand(), obsPath, "--sites", sitesPath, "--model", "poly2", "--save", save); code != exitOK {
		t.Fatalf("fit: %s", errs)
	}
	args := []string{"--at", predictTime + ",2027-02-20T04:00:00Z", "--site", "Alder Ridge", "--json"}
	c1, o1, e1 := runCmd(t, newPredictCommand(), append([]string{obsPath, "--sites", sitesPath, "--model", "poly2"}, args...)...)
	c2, o2, e2 := runCmd(t, newPredictCommand(), append([]string{save}, args...)...)
	if c1 != exitOK || c2 != exitOK {
		t.Fatalf("exit %d %d: %s %s", c1, c2, e1, e2)
	}
	strip := func(s string) string { // the file name differs
		var lines []string
		for _, l := range strings.Split(s, "\n") {
			if !strings.Contains(l, `"file":`) {
				lines = append(lines, l)
			}
		}
		return strings.Join(lines, "\n")
	}
	if strip(o1) != strip(o2) {
		t.Errorf("predict FIT differs from predict OBS:\n%s\n---\n%s", o1, o2)
	}
	if !strings.Contains(e1, "beyond the fit's validity horizon") {
		t.Errorf("no horizon caution for 12 d after the arc: %q", e1)
	}
}

// TestPredictBadInput checks each bad input gives exit 2, one line on stderr,
// nothing on stdout, and no --save file.
func TestPredictBadInput(t *testing.T) {
	obsPath, sitesPath := demoFiles(t)
	dir := t.TempDir()
	one := filepath.Join(dir, "one.csv")
	os.WriteFile(one, []byte("time,ra,dec,sigma\n2027-02-04T03:56:12.40Z,09:20:42.047,+23:14:49.82,0.5\n2027-02-04T03:56:12.40Z,09:20:42.147,+23:14:49.82,0.5\n"), 0o644)
	two := filepath.Join(dir, "two.csv")
	os.WriteFile(two, []byte("time,ra,dec,sigma\n2027-02-04T03:56:12.40Z,09:20:42.047,+23:14:49.82,0.5\n2027-02-04T04:56:12.40Z,09:20:40.047,+23:15:49.82,0.5\n"), 0o644)
	bad := filepath.Join(dir, "bad.json")
	os.WriteFile(bad, []byte(`{"schema": "arcfit-fit/1", "model": {`), 0o644)
	save := filepath.Join(dir, "never.json")
	for _, tc := range []struct {
		name string
		c    *command
		args []string
		want string
	}{
		{"unparseable --at", newPredictCommand(), []string{obsPath, "--sites", sitesPath, "--at", "tomorrow"}, "--at"},
		{"--to before --at", newPredictCommand(), []string{obsPath, "--sites", sitesPath, "--at", predictTime, "--to", "2027-02-08T00:00:00Z", "--step", "1h"}, "before"},
		{"step zero", newPredictCommand(), []string{obsPath, "--sites", sitesPath, "--at", predictTime, "--to", "2027-02-10T00:00:00Z", "--step", "0h"}, "--step"},
		{"one instant", newFitCommand(), []string{one, "--save", save}, "one instant"},
		{"too few for poly3", newFitCommand(), []string{two, "--model", "poly3", "--save", save}, "allow"},
		{"truncated fit file", newPredictCommand(), []string{bad, "--at", predictTime}, "bad.json:1:"},
	} {
		code, out, errs := runCmd(t, tc.c, tc.args...)
		if code != exitUsage || out != "" || strings.Count(errs, "\n") != 1 || !strings.Contains(errs, tc.want) {
			t.Errorf("%s: exit %d, stdout %q, stderr %q; want exit 2, no output, one line with %q", tc.name, code, out, errs, tc.want)
		}
	}
	if _, err := os.Stat(save); err == nil {
		t.Errorf("a failed fit left %s", save)
	}
}

// predict --elements prints the library's element-set prediction (called
// here, not hard-coded), with the magnitude and a region from the σ columns.
func TestPredictElements(t *testing.T) {
	const file = "../../testdata/elements/good_sigma.csv"
	code, out, errs := runCmd(t, newPredictCommand(), "--elements", file, "--at", "2027-03-01T03:00:00Z", "--site", "44.52,-72.80,410", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var got struct {
		predictRec
		Mag     *float64 `json:"mag"`
		DeltaAU *float64 `json:"delta_au"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	sets, _, err := ephem.ReadElementsFile(file)
	if err != nil {
		t.Fatal(err)
	}
	site := astro.Site{Name: "44.52,-72.80,410", Lat: 44.52 * astro.Degree, Lon: -72.80 * astro.Degree, HeightM: 410}
	utc, _ := astro.ParseISO8601("2027-03-01T03:00:00Z")
	want, err := fit.PredictElements(sets[0], utc, &site)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(got.RADeg-want.RA.Degrees()) > 1e-9 || math.Abs(got.DecDeg-want.Dec.Degrees()) > 1e-9 {
		t.Errorf("printed %.9f %.9f, library %.9f %.9f", got.RADeg, got.DecDeg, want.RA.Degrees(), want.Dec.Degrees())
	}
	if got.Model != "elements" || got.Mag == nil || got.DeltaAU == nil || !(got.E["semi_major_arcsec"] > 0) {
		t.Errorf("model %q mag %v Δ %v ellipse %v", got.Model, got.Mag, got.DeltaAU, got.E)
	}
	// Refusals: both an observation file and --elements; a fitting flag; an
	// unknown name.
	for _, args := range [][]string{
		{"x.csv", "--elements", file, "--at", "2027-03-01T03:00:00Z"},
		{"--elements", file, "--model", "poly2", "--at", "2027-03-01T03:00:00Z"},
		{"--elements", file, "--name", "Nobody", "--at", "2027-03-01T03:00:00Z"},
		{"--name", "Invented-Sigma-1", "--at", "2027-03-01T03:00:00Z"},
	} {
		if code, _, errs := runCmd(t, newPredictCommand(), args...); code != exitUsage || strings.Count(strings.TrimSpace(errs), "\n") > 0 {
			t.Errorf("%v: exit %d, stderr %q; want exit %d and one line", args, code, errs, exitUsage)
		}
	}
}
