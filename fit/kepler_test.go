package fit

import (
	"encoding/csv"
	"math"
	"strconv"
	"strings"
	"testing"

	"arcfit/astro"
	"arcfit/fit/demo"
)

// demoTruthRow returns the demo truth's astrometric place (fit/demo truth:
// python3-erfa 2.0.0.1 via testdata/gen/demo_scenario.py) at a time and site.
func demoTruthRow(t *testing.T, tm, site string) (raDeg, decDeg float64) {
	t.Helper()
	var lines []string
	for _, l := range strings.Split(string(demo.Truth()), "\n") {
		if !strings.HasPrefix(l, "#") && l != "" {
			lines = append(lines, l)
		}
	}
	rows, err := csv.NewReader(strings.NewReader(strings.Join(lines, "\n"))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range rows {
		if r[0] == tm && r[1] == site {
			ra, _ := strconv.ParseFloat(r[3], 64)
			dec, _ := strconv.ParseFloat(r[4], 64)
			return ra, dec
		}
	}
	t.Fatalf("no truth row for %s %s", tm, site)
	return
}

// The orbit fitted to the demo's noisy observations (0.3″–0.6″, one outlier)
// against the scenario's truth: the invented elements of fit/demo
// elements.csv (a, e, i, Ω, ω are constants of two-body motion, so they
// compare across epochs) within 3 σ of the fitted ones, and the ERFA truth
// 1 and 11 days after the arc inside the predicted 3-σ ellipse.
func TestFitOrbitDemoAgainstTruth(t *testing.T) {
	tr, sites := demoTrack(t)
	of, err := FitOrbit(tr, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	// Truth: Demo-1 (invented), fit/demo/data elements.csv.
	truth := map[string]float64{"a": 2.614, "e": 0.148, "i": 7.86, "node": 103.27, "peri": 61.45}
	el, sg := of.Elements, of.Sigma
	got := map[string][2]float64{
		"a": {el.A, sg.A}, "e": {el.E, sg.E}, "i": {el.I.Degrees(), sg.I.Degrees()},
		"node": {astro.Angle(el.Node).Normalized().Degrees(), sg.Node.Degrees()},
		"peri": {astro.Angle(el.Peri).Normalized().Degrees(), sg.Peri.Degrees()},
	}
	for k, v := range got {
		d := v[0] - truth[k]
		if k == "node" || k == "peri" {
			d = math.Remainder(d, 360)
		}
		if !(math.Abs(d) <= 3*v[1]) {
			t.Errorf("%s = %.6g ± %.2g, truth %g: %.1f σ off", k, v[0], v[1], truth[k], d/v[1])
		}
	}
	if of.Class.Name == "" {
		t.Error("no orbit class")
	}
	for _, tm := range []string{"2027-02-09T04:00:00Z", "2027-02-19T04:00:00Z"} {
		utc, err := astro.ParseISO8601(tm)
		if err != nil {
			t.Fatal(err)
		}
		site := sites["Alder Ridge"]
		p, err := of.Predict(utc, &site)
		if err != nil {
			t.Fatal(err)
		}
		ra, dec := demoTruthRow(t, tm, "Alder Ridge")
		if m := mahalanobis(p, math.Remainder(ra-p.RA.Degrees(), 360)*math.Cos(p.Dec.Radians())*3600, (dec-p.Dec.Degrees())*3600); !(m < 3) {
			t.Errorf("%s: truth at Mahalanobis distance %.2f from the kepler prediction (3-σ ellipse %+v)", tm, m, p.Ellipse(3))
		}
		if math.IsNaN(p.Mag) || !(p.DeltaAU > 0) {
			t.Errorf("%s: mag %v Δ %v", tm, p.Mag, p.DeltaAU)
		}
	}
}

// A fit file holding the orbit predicts what the orbit predicts.
func TestFitFileOrbitRoundTrip(t *testing.T) {
	tr, sites := demoTrack(t)
	of, err := FitOrbit(tr, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	sol, err := Fit(tr, Poly(2), Settings{})
	if err != nil {
		t.Fatal(err)
	}
	sf := &SavedFit{Solution: sol, Orbit: of, Reason: "test", HorizonDays: math.NaN(), HorizonBeforeDays: math.NaN(), HorizonAfterDays: math.NaN()}
	data, err := MarshalFitFile(sf)
	if err != nil {
		t.Fatal(err)
	}
	back, err := ParseFitFile(data, "orbit-fit.json")
	if err != nil {
		t.Fatal(err)
	}
	if back.Orbit == nil {
		t.Fatal("orbit lost in the fit file")
	}
	utc, _ := astro.ParseISO8601("2027-03-01T04:00:00Z")
	site := sites["Birch Hollow"]
	p1, err1 := sf.Predict(utc, &site)
	p2, err2 := back.Predict(utc, &site)
	if err1 != nil || err2 != nil {
		t.Fatal(err1, err2)
	}
	if p1.RA != p2.RA || p1.Dec != p2.Dec || p1.CovArcsec2 != p2.CovArcsec2 || p2.Model != "kepler" {
		t.Errorf("saved %v %v %v, loaded %v %v %v (%s)", p1.RA, p1.Dec, p1.CovArcsec2, p2.RA, p2.Dec, p2.CovArcsec2, p2.Model)
	}
	if back.Orbit.Class.Name != of.Class.Name || back.Orbit.Elements.A != of.Elements.A {
		t.Errorf("elements or class differ after loading")
	}
}
