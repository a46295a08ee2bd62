package main

import (
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit/orbit"

	"gonum.org/v1/gonum/spatial/r3"
)

// The nbody model through the command line, on observations of invented
// objects whose places come from this project's own n-body path (the
// integration of ephem/nbody, the light time of package orbit), with seeded
// 0.5″ noise: a self-consistency check of the plumbing and the output (the
// perturbed motion itself is checked by ephem/nbody's tests against a
// reference integration).

// nbCLISites is the invented sites file of these tests.
const nbCLISites = "name,lat_deg,lon_deg,height_m\nAlder Ridge,44.52,-72.80,410\nBirch Hollow,-30.85,148.40,620\n"

// nbCLIFiles writes the observations of truth on nights nights spread over
// spanDays from start (three 25 min apart a night, alternating the sites)
// and the sites file; it returns their paths and the last observation.
func nbCLIFiles(t *testing.T, truth orbit.State, start astro.JD, nights int, spanDays float64) (obsPath, sitesPath string, last astro.JD) {
	t.Helper()
	sites := map[string]*astro.Site{
		"Alder Ridge":  {Name: "Alder Ridge", Lat: 44.52 * astro.Degree, Lon: -72.80 * astro.Degree, HeightM: 410},
		"Birch Hollow": {Name: "Birch Hollow", Lat: -30.85 * astro.Degree, Lon: 148.40 * astro.Degree, HeightM: 620},
	}
	rng := rand.New(rand.NewPCG(17, 18))
	sig := 0.5 * astro.Arcsecond.Radians()
	var b strings.Builder
	b.WriteString("time,ra_deg,dec_deg,sigma,site\n")
	for k := range nights {
		day := start.Day + math.Floor(spanDays*float64(k)/float64(max(1, nights-1)))
		name, frac := "Alder Ridge", 0.16
		if k%2 == 1 {
			name, frac = "Birch Hollow", 0.54
		}
		for j := range 3 {
			u := astro.JD{Day: day, Frac: frac + float64(j)*25.0/1440, Scale: astro.UTC}
			g, err := ephem.ObserverGeometryAt(u, sites[name], 0)
			if err != nil {
				t.Fatal(err)
			}
			seen, err := truth.Observe(g)
			if err != nil {
				t.Fatal(err)
			}
			c := seen.Dir
			e, n := orbit.EastNorth(c)
			d := r3.Add(c, r3.Add(r3.Scale(rng.NormFloat64()*sig, e), r3.Scale(rng.NormFloat64()*sig, n)))
			ra, dec, _ := astro.Spherical(d)
			fmt.Fprintf(&b, "%s,%.10f,%.10f,0.5,%s\n", astro.FormatISO8601(u, 2), ra.Normalized().Degrees(), dec.Degrees(), name)
			last = u
		}
	}
	dir := t.TempDir()
	obsPath, sitesPath = filepath.Join(dir, "nbody-obs.csv"), filepath.Join(dir, "sites.csv")
	if err := os.WriteFile(obsPath, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(sitesPath, []byte(nbCLISites), 0o644); err != nil {
		t.Fatal(err)
	}
	return obsPath, sitesPath, last
}

// nbCLIMainBelt is the invented main-belt orbit (a = 2.61 au, e = 0.17)
// moved by the planets.
func nbCLIMainBelt(t *testing.T) orbit.State {
	t.Helper()
	nan := math.NaN()
	el := ephem.Elements{Name: "Invented-MB", Epoch: astro.JD{Day: 2461444.5, Scale: astro.TT}, A: 2.61, E: 0.17,
		I: 9.3 * astro.Degree, Node: 55 * astro.Degree, Peri: 33 * astro.Degree, M: 40 * astro.Degree, H: nan, G: nan}
	st, err := orbit.StateFromElements(el, astro.JD{Day: 2461444.5, Scale: astro.TDB})
	if err != nil {
		t.Fatal(err)
	}
	st.Motion = orbit.NBody
	return st
}

// nbCLIFlyby is an invented near-Earth object 0.02 au from the Earth at
// JD 2461460.5 TDB, moving 8.7 km/s across the line of sight.
func nbCLIFlyby(t *testing.T) orbit.State {
	t.Helper()
	tEnc := astro.JD{Day: 2461460.5, Scale: astro.TDB}
	ep, ev, err := ephem.HeliocentricICRS(ephem.Earth, tEnc)
	if err != nil {
		t.Fatal(err)
	}
	off := r3.Add(r3.Scale(-0.015/r3.Norm(ep), ep), r3.Vec{Z: 0.0132})
	dir := r3.Unit(r3.Cross(off, r3.Vec{X: 1, Y: 1}))
	return orbit.State{Epoch: tEnc, Pos: r3.Add(ep, off), Vel: r3.Add(ev, r3.Scale(0.005, dir)), Motion: orbit.NBody}
}

// TestFitNBodyCLI: fit --model nbody prints the perturbed orbit's
// osculating elements and dynamics, in text and JSON; the saved fit
// predicts with the same model; predict on the observations with a time
// 60 days after a 40-day arc picks nbody by the auto rule and says why.
func TestFitNBodyCLI(t *testing.T) {
	obsPath, sitesPath, last := nbCLIFiles(t, nbCLIMainBelt(t), astro.JD{Day: 2461430.5, Scale: astro.UTC}, 10, 40)
	save := filepath.Join(t.TempDir(), "nb-fit.json")
	code, out, errs := runCmd(t, newFitCommand(), obsPath, "--sites", sitesPath, "--model", "nbody", "--save", save)
	if code != exitOK {
		t.Fatalf("fit: exit %d: %s", code, errs)
	}
	for _, want := range []string{"chosen model: nbody", "osculating elements at epoch", "dynamics: the Sun, the eight planets and the Moon"} {
		if !strings.Contains(out, want) {
			t.Errorf("fit text lacks %q:\n%s", want, out)
		}
	}
	code, out, errs = runCmd(t, newFitCommand(), obsPath, "--sites", sitesPath, "--model", "nbody", "--json")
	if code != exitOK {
		t.Fatalf("fit --json: exit %d: %s", code, errs)
	}
	var fj struct {
		Model    string             `json:"model"`
		Elements map[string]any     `json:"elements"`
		Sigma    map[string]any     `json:"elements_sigma"`
		Orbit    map[string]any     `json:"orbit"`
		Models   []map[string]any   `json:"models"`
		Extra    map[string]float64 `json:"-"`
	}
	if err := json.Unmarshal([]byte(out), &fj); err != nil {
		t.Fatal(err)
	}
	if fj.Model != "nbody" || fj.Orbit["dynamics"] != "nbody" || fj.Orbit["elements_kind"] != "osculating at the epoch" || fj.Elements["a_au"] == nil || fj.Sigma["a_au"] == nil {
		t.Errorf("fit --json: model %v, orbit %v, elements %v", fj.Model, fj.Orbit, fj.Elements)
	}
	if enc, ok := fj.Orbit["encounters"]; ok && enc != nil {
		t.Errorf("a main-belt orbit reports encounters %v", enc)
	}
	at := astro.FormatISO8601(last.AddDays(60), 0)
	code, out, errs = runCmd(t, newPredictCommand(), save, "--at", at, "--site", "Alder Ridge", "--json")
	if code != exitOK {
		t.Fatalf("predict FIT: exit %d: %s", code, errs)
	}
	var pj map[string]any
	if err := json.Unmarshal([]byte(out), &pj); err != nil {
		t.Fatal(err)
	}
	if pj["model"] != "nbody" || pj["region_method"] == nil {
		t.Errorf("predict FIT: model %v, region_method %v", pj["model"], pj["region_method"])
	}
	if enc, ok := pj["encounters"].([]any); !ok || len(enc) != 0 {
		t.Errorf("predict FIT: encounters %v, want an empty list", pj["encounters"])
	}
	code, out, errs = runCmd(t, newPredictCommand(), obsPath, "--sites", sitesPath, "--at", at, "--site", "Alder Ridge")
	if code != exitOK {
		t.Fatalf("predict OBS: exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "model nbody, an orbit perturbed by the planets") || !strings.Contains(out, "osculating elements at epoch") {
		t.Errorf("predict OBS with a 100-day span did not use nbody:\n%s", out)
	}
}

// TestEncountersCLI: an invented object passing 0.02 au from the Earth in
// the middle of its 20-day arc: fit, predict and night say so in plain
// words (the Earth, the date, the distance in au and lunar distances) and
// in their JSON (encounters: body, time_utc, distance_au).
func TestEncountersCLI(t *testing.T) {
	obsPath, sitesPath, last := nbCLIFiles(t, nbCLIFlyby(t), astro.JD{Day: 2461450.5, Scale: astro.UTC}, 11, 20)
	code, out, errs := runCmd(t, newFitCommand(), obsPath, "--sites", sitesPath, "--model", "nbody")
	if code != exitOK {
		t.Fatalf("fit: exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "close approach: the Earth on 2027-02-2") || !strings.Contains(out, "lunar distances") {
		t.Errorf("fit text does not report the approach:\n%s", out)
	}
	code, out, errs = runCmd(t, newPredictCommand(), obsPath, "--sites", sitesPath, "--model", "nbody", "--at", astro.FormatISO8601(last.AddDays(3), 0), "--json")
	if code != exitOK {
		t.Fatalf("predict: exit %d: %s", code, errs)
	}
	var pj struct {
		Model      string `json:"model"`
		Encounters []struct {
			Body       string  `json:"body"`
			TimeUTC    string  `json:"time_utc"`
			DistanceAU float64 `json:"distance_au"`
		} `json:"encounters"`
	}
	if err := json.Unmarshal([]byte(out), &pj); err != nil {
		t.Fatal(err)
	}
	if pj.Model != "nbody" || len(pj.Encounters) == 0 || pj.Encounters[0].Body != "Earth" || pj.Encounters[0].DistanceAU > 0.0201 ||
		!strings.HasPrefix(pj.Encounters[0].TimeUTC, "2027-02-2") {
		t.Errorf("predict --json: %+v", pj)
	}
	date := astro.FormatISO8601(last.AddDays(2), 0)[:10]
	code, out, errs = runCmd(t, nightCommand(), obsPath, "--sites", sitesPath, "--model", "nbody", "--date", date, "--site", "Alder Ridge", "--allow-near-sun")
	if code != exitOK {
		t.Fatalf("night: exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "close approach: the Earth on") {
		t.Errorf("night text does not report the approach:\n%s", out)
	}
	code, out, errs = runCmd(t, nightCommand(), obsPath, "--sites", sitesPath, "--model", "nbody", "--date", date, "--site", "Alder Ridge", "--allow-near-sun", "--json")
	if code != exitOK {
		t.Fatalf("night --json: exit %d: %s", code, errs)
	}
	var nj struct {
		Encounters []map[string]any `json:"encounters"`
	}
	if err := json.Unmarshal([]byte(out), &nj); err != nil {
		t.Fatal(err)
	}
	if len(nj.Encounters) == 0 || nj.Encounters[0]["body"] != "Earth" {
		t.Errorf("night --json encounters %v", nj.Encounters)
	}
}
