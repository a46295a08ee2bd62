package fit

import (
	"fmt"
	"math"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"arcfit/astro"
	"arcfit/astro/obs"

	"gonum.org/v1/gonum/spatial/r3"
)

// The hard cases of the sky-plane fit: arcs across RA 0h/24h and within 1°
// of either pole, an arc through a leap second, arcs at the ends of the span
// 1800–2200. The truth is uniform motion along a great circle, exact by
// construction; the observations go through the CSV reader, the track, the
// fit, and the prediction, as arcfit fit and predict take them.

// greatCircle is uniform motion along a great circle: at elapsed time t (SI
// seconds from the start) the direction cos(ωt)·p0 + sin(ωt)·d0, with p0 the
// start and d0 the unit tangent there at position angle pa (north through
// east).
type greatCircle struct {
	p0, d0 r3.Vec
	omega  float64 // rad/s
}

func newGreatCircle(raDeg, decDeg, paDeg, degPerDay float64) greatCircle {
	ra, dec := astro.AngleFromDegrees(raDeg), astro.AngleFromDegrees(decDeg)
	p0 := astro.UnitVector(ra, dec)
	sa, ca := math.Sincos(float64(ra))
	sd, cd := math.Sincos(float64(dec))
	east := r3.Vec{X: -sa, Y: ca}
	north := r3.Vec{X: -sd * ca, Y: -sd * sa, Z: cd}
	sp, cp := math.Sincos(float64(astro.AngleFromDegrees(paDeg)))
	d0 := r3.Add(r3.Scale(cp, north), r3.Scale(sp, east))
	return greatCircle{p0: p0, d0: d0, omega: degPerDay * math.Pi / 180 / 86400}
}

func (g greatCircle) at(tSec float64) (ra, dec astro.Angle) {
	s, c := math.Sincos(g.omega * tSec)
	ra, dec, _ = astro.Spherical(r3.Add(r3.Scale(c, g.p0), r3.Scale(s, g.d0)))
	return ra.Normalized(), dec
}

// obsCSV writes observations of g at the UTC texts times, elapsed seconds
// elapsed, in full precision, σ = 0.05″.
func obsCSV(g greatCircle, times []string, elapsed []float64) string {
	var b strings.Builder
	b.WriteString("time,ra_deg,dec_deg,sigma\n")
	for i, tm := range times {
		ra, dec := g.at(elapsed[i])
		fmt.Fprintf(&b, "%s,%s,%s,0.05\n", tm, strconv.FormatFloat(ra.Degrees(), 'f', -1, 64), strconv.FormatFloat(dec.Degrees(), 'f', -1, 64))
	}
	return b.String()
}

// fitCSV reads the CSV text and fits model m geocentrically (no parallax,
// no outlier rejection).
func fitCSV(t *testing.T, name, text string, m Model) *Solution {
	t.Helper()
	set, err := obs.Read(strings.NewReader(text), name, obs.ReadOptions{Format: obs.FormatCSV})
	if err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	tr, err := NewTrack(set, nil)
	if err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	sol, err := Fit(tr, m, Settings{Parallax: ParallaxOff, KeepAll: true})
	if err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	return sol
}

// checkPredictions compares the solution's predictions at the UTC instants
// (with elapsed seconds) against the truth: the separation within tolArcsec,
// the place in range and the covariance finite.
func checkPredictions(t *testing.T, name string, sol *Solution, g greatCircle, utcs []astro.JD, elapsed []float64, tolArcsec float64) {
	t.Helper()
	for i, utc := range utcs {
		p, err := sol.Predict(utc, nil)
		if err != nil {
			t.Errorf("%s: Predict(%s): %v", name, astro.FormatISO8601(utc, 3), err)
			continue
		}
		if !finitePrediction(p) {
			t.Errorf("%s: Predict(%s) not finite: %+v", name, astro.FormatISO8601(utc, 3), p)
			continue
		}
		ra, dec := g.at(elapsed[i])
		if d := astro.Separation(p.RA, p.Dec, ra, dec).Arcseconds(); !(d <= tolArcsec) {
			t.Errorf("%s: at %s predicted RA %.9f° Dec %.9f°, truth %.9f° %.9f°: %.4g″ apart, want ≤ %g″",
				name, astro.FormatISO8601(utc, 3), p.RA.Degrees(), p.Dec.Degrees(), ra.Degrees(), dec.Degrees(), d, tolArcsec)
		}
	}
}

// threeNights returns 4 observations a night on three nights from
// 2027-02-10 (UTC texts and seconds from the first), and instants for the
// predictions: inside the arc and up to one day after it.
func threeNights(t *testing.T) (texts []string, elapsed []float64, at []astro.JD, atElapsed []float64) {
	start, _ := astro.ParseISO8601("2027-02-10T01:00:00Z")
	for n := 0; n < 3; n++ {
		for k := 0; k < 4; k++ {
			s := float64(n)*86400 + float64(k)*3600
			texts = append(texts, astro.FormatISO8601(start.AddSeconds(s), 0))
			elapsed = append(elapsed, s)
		}
	}
	for _, s := range []float64{1800, 86400 + 5400, 2*86400 + 3*3600, 3 * 86400} {
		at = append(at, start.AddSeconds(s))
		atElapsed = append(atElapsed, s)
	}
	return texts, elapsed, at, atElapsed
}

// TestSeamAndPoleArcs fits poly3 to noise-free arcs of three nights that
// cross RA 0h/24h, pass within 1° of the north or the south pole, or go over
// a pole, and checks the predictions inside the arc and one day after it
// against the great circle. Tolerance 0.01″: the fit is exact for a cubic,
// and what a cubic in time on the tangent plane misses of uniform
// great-circle motion is of the fourth order in the arc's angle θ (gnomonic
// projection: tan θ = θ + θ³/3 + …, and the off-centre terms), θ⁴ ≈ 1.2e-8
// rad = 2.5 mas for the 0.6° reached a day after the arc.
func TestSeamAndPoleArcs(t *testing.T) {
	texts, elapsed, at, atElapsed := threeNights(t)
	cases := []struct {
		name                      string
		raDeg, decDeg, pa, perDay float64
	}{
		{"across 0h eastward", 359.85, 5, 90, 0.15},
		{"across 0h westward", 0.1, -20, 260, 0.15},
		{"across 0h at Dec 80°", 359.5, 80, 95, 0.2},
		{"0.7° from the north pole", 10, 89.3, 90, 0.3},
		{"0.05° from the north pole", 200, 89.95, 90, 0.1},
		{"over the north pole", 45, 89.8, 0, 0.1},
		{"0.5° from the south pole", 300, -89.5, 270, 0.2},
		{"over the south pole", 120, -89.9, 180, 0.05},
	}
	for _, c := range cases {
		g := newGreatCircle(c.raDeg, c.decDeg, c.pa, c.perDay)
		sol := fitCSV(t, c.name, obsCSV(g, texts, elapsed), Poly(3))
		if sol.RMSArcsec > 0.01 {
			t.Errorf("%s: rms %.4g″ of a noise-free arc", c.name, sol.RMSArcsec)
		}
		checkPredictions(t, c.name, sol, g, at, atElapsed, 0.01)
	}
}

// TestLeapSecondArc fits an arc of a fast mover (1″ per second of time,
// 0.25° a minute: a close approach) observed every 2 s across the leap
// second at the end of 2016, 23:59:50 to 00:00:10 UTC with 23:59:60 among
// them. The truth counts elapsed SI seconds, the leap second included (IERS
// Bulletin C 52). If a reader or the UTC → TT conversion dropped or doubled
// the leap second, the points after it would miss by 1″ (20 σ); the fit
// must leave no residual above 1 mas and predict 00:00:30 within 1 mas.
func TestLeapSecondArc(t *testing.T) {
	var texts []string
	var elapsed []float64
	for s := 50; s <= 60; s += 2 {
		texts = append(texts, fmt.Sprintf("2016-12-31T23:59:%02dZ", s))
		elapsed = append(elapsed, float64(s-50))
	}
	for s := 1; s <= 10; s += 2 {
		texts = append(texts, fmt.Sprintf("2017-01-01T00:00:%02dZ", s))
		elapsed = append(elapsed, float64(11+s))
	}
	g := newGreatCircle(150, 12, 70, 86400.0/3600) // 1″/s = 24°/day
	sol := fitCSV(t, "leap.csv", obsCSV(g, texts, elapsed), Poly(1))
	for _, r := range sol.Residuals {
		if math.Hypot(r.DRAArcsec, r.DDecArcsec) > 0.001 {
			t.Errorf("line %d (%s): residual %.4f″ %.4f″", r.Line, astro.FormatISO8601(r.UTC, 0), r.DRAArcsec, r.DDecArcsec)
		}
	}
	at, _ := astro.ParseISO8601("2017-01-01T00:00:30Z")
	checkPredictions(t, "leap second", sol, g, []astro.JD{at}, []float64{41}, 0.001)
}

// TestSpanEndArcs fits three-night arcs at the ends of the supported span,
// 1800 (where UTC is read as UT with ΔT, and the track says so) and late
// 2200, predicts them as TestSeamAndPoleArcs does, and saves and reloads
// each fit file: the reloaded fit predicts the same place.
func TestSpanEndArcs(t *testing.T) {
	for _, c := range []struct {
		start string
		warn  string
	}{
		{"1800-01-05T01:00:00Z", "before 1972"},
		{"2200-12-20T01:00:00Z", "leap-second table"},
	} {
		start, err := astro.ParseISO8601(c.start)
		if err != nil {
			t.Fatal(err)
		}
		var texts []string
		var elapsed []float64
		for n := 0; n < 3; n++ {
			for k := 0; k < 4; k++ {
				s := float64(n)*86400 + float64(k)*3600
				texts = append(texts, astro.FormatISO8601(start.AddSeconds(s), 0))
				elapsed = append(elapsed, s)
			}
		}
		g := newGreatCircle(80, 23, 100, 0.25)
		sol := fitCSV(t, c.start, obsCSV(g, texts, elapsed), Poly(3))
		if w := strings.Join(sol.Track.Warnings, "; "); !strings.Contains(w, c.warn) {
			t.Errorf("%s: track warnings %q, want one mentioning %q", c.start, w, c.warn)
		}
		at := []astro.JD{start.AddSeconds(5400), start.AddSeconds(2*86400 + 3*3600)}
		checkPredictions(t, c.start, sol, g, at, []float64{5400, 2*86400 + 3*3600}, 0.01)

		path := filepath.Join(t.TempDir(), "fit.json")
		saved := &SavedFit{Solution: sol, Reason: "span end", HorizonDays: math.NaN(), HorizonBeforeDays: math.NaN(), HorizonAfterDays: math.NaN()}
		if err := SaveFitFile(path, saved); err != nil {
			t.Errorf("%s: save: %v", c.start, err)
			continue
		}
		back, err := ReadFitFile(path)
		if err != nil {
			t.Errorf("%s: the saved fit does not load: %v", c.start, err)
			continue
		}
		p1, err1 := saved.Predict(at[1], nil)
		p2, err2 := back.Predict(at[1], nil)
		if err1 != nil || err2 != nil || p1.RA != p2.RA || p1.Dec != p2.Dec {
			t.Errorf("%s: saved fit predicts %v %v (%v), reloaded %v %v (%v)", c.start, p1.RA, p1.Dec, err1, p2.RA, p2.Dec, err2)
		}
	}
}

// TestDamagedParameters: a fit whose parameters are finite but absurd (one
// of 3.9e23, as FuzzParseFitFile made) is refused by the fit-file reader
// (its model does not pass near its own points), and Predict, given such a
// solution directly, returns an error instead of a NaN position.
func TestDamagedParameters(t *testing.T) {
	tr, _ := demoTrack(t)
	sol, err := Fit(tr, Poly(2), Settings{})
	if err != nil {
		t.Fatal(err)
	}
	bad := *sol
	bad.Params = append([]float64{}, sol.Params...)
	bad.Params[4] = 3.8717700474101864e+23
	data, err := MarshalFitFile(&SavedFit{Solution: &bad, HorizonDays: math.NaN(), HorizonBeforeDays: math.NaN(), HorizonAfterDays: math.NaN()})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := ParseFitFile(data, "damaged.json"); err == nil || !strings.Contains(err.Error(), "params") || !strings.HasPrefix(err.Error(), "damaged.json:") {
		t.Errorf("damaged fit file read: %v", err)
	}
	utc := tr.EpochTT
	utc.Scale = astro.UTC
	site := astro.Site{Lat: astro.AngleFromDegrees(89), Lon: astro.AngleFromDegrees(180)}
	for _, st := range []*astro.Site{nil, &site} {
		p, err := bad.Predict(utc, st)
		if err == nil && !finitePrediction(p) {
			t.Errorf("site %v: Predict gave %+v and no error", st, p)
		}
	}
}
