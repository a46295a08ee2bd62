package simulate_test

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"math"
	"os"
	"reflect"
	"strconv"
	"strings"
	"testing"
	"time"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/ephem"
	"arcfit/fit"
	"arcfit/fit/demo"
	"arcfit/fit/plan"
	"arcfit/fit/simulate"
)

// The invented element sets and the astropy reference of fit/plan, made by
// testdata/gen/night_windows.py with python3-astropy 5.2.1 and numpy 1.24.2
// (the file's header gives the command, the versions and the definitions).
const (
	refTargetsFile = "../plan/testdata/night_targets.csv"
	refWindowsFile = "../plan/testdata/night_windows.txt"
)

// Invented sites of the reference (its header: Alder_Ridge 44.52 −72.80
// 410 m, Norrvale 62.40 17.30 90 m).
var (
	alderRidge = astro.Site{Name: "Alder Ridge", Lat: astro.AngleFromDegrees(44.52), Lon: astro.AngleFromDegrees(-72.80), HeightM: 410}
	norrvale   = astro.Site{Name: "Norrvale", Lat: astro.AngleFromDegrees(62.40), Lon: astro.AngleFromDegrees(17.30), HeightM: 90}
)

func refElements(t *testing.T, name string) ephem.Elements {
	t.Helper()
	sets, _, err := ephem.ReadElementsFile(refTargetsFile)
	if err != nil {
		t.Fatal(err)
	}
	el, err := ephem.FindElements(sets, name)
	if err != nil {
		t.Fatal(err)
	}
	return el
}

func date(t *testing.T, s string) plan.Date {
	t.Helper()
	tm, err := time.Parse("2006-01-02", s)
	if err != nil {
		t.Fatal(err)
	}
	d, err := plan.NewDate(tm.Year(), tm.Month(), tm.Day())
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// unixEpochJD is the Julian date of 1970-01-01T00:00:00 UTC (Meeus,
// Astronomical Algorithms, 2nd ed., ch. 7; common practice): the tests turn
// Julian dates into time.Time with it, independently of astro.
const unixEpochJD = 2440587.5

func timeOf(j astro.JD) time.Time {
	sec := ((j.Day - unixEpochJD) + j.Frac) * 86400
	whole := math.Floor(sec)
	return time.Unix(int64(whole), int64(math.Round((sec-whole)*1e9))).UTC()
}

// refWindows returns the reference windows of one case ("SITE DATE TARGET
// MINALT") and its state.
func refWindows(t *testing.T, key string) (state string, windows [][2]time.Time) {
	t.Helper()
	f, err := os.Open(refWindowsFile)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		fs := strings.Fields(sc.Text())
		if len(fs) < 7 || strings.Join(fs[1:5], " ") != key {
			continue
		}
		switch fs[0] {
		case "case":
			state = fs[5]
		case "window":
			a, err1 := time.Parse(time.RFC3339Nano, fs[5])
			b, err2 := time.Parse(time.RFC3339Nano, fs[6])
			if err1 != nil || err2 != nil {
				t.Fatalf("%s: bad line %q", refWindowsFile, sc.Text())
			}
			windows = append(windows, [2]time.Time{a, b})
		}
	}
	if state == "" {
		t.Fatalf("%s: no case %q", refWindowsFile, key)
	}
	return state, windows
}

// TestNoiseStatistics simulates 2,500 observations and checks the residuals
// of the noisy places against the noise-free ones, on the tangent plane at
// the noise-free place (RA·cos δ, Dec), against the normal distribution of
// the stated σ: the mean within 3 standard errors (σ/√N) of 0, the standard
// deviation within 3 standard errors (σ/√(2N), the large-N standard error of
// a normal sample's σ) of σ, the correlation of the two within 3/√N of 0,
// and the fraction beyond 2σ within 3 standard errors of 0.0455 (the normal
// tail P(|z| > 2) = 0.04550, Abramowitz & Stegun (1964), table 26.1). The
// residual equals the deviate drawn to within the written rounding (1e-9°,
// 3.6 µas).
func TestNoiseStatistics(t *testing.T) {
	cfg := simulate.DefaultConfig()
	cfg.Target = plan.ElementsTarget{Elements: refElements(t, "Invented-N1")}
	cfg.Sites = []astro.Site{alderRidge}
	for k := 0; k < 10; k++ {
		cfg.Nights = append(cfg.Nights, date(t, "2026-12-11").AddDays(k))
	}
	cfg.PerNight, cfg.Cadence, cfg.SigmaArcsec, cfg.Seed = 250, 2*time.Minute, 0.7, 20261211
	res, err := cfg.Run()
	if err != nil {
		t.Fatal(err)
	}
	n := len(res.Samples)
	if n < 2000 {
		t.Fatalf("%d samples, want at least 2000 (runs %+v)", n, res.Runs)
	}
	as := astro.Arcsecond.Radians()
	var se, sn, see, snn, sen float64
	beyond := 0
	for _, s := range res.Samples {
		xi, eta, err := astro.TangentPlane{RA0: s.TrueRA, Dec0: s.TrueDec}.Project(s.RA, s.Dec)
		if err != nil {
			t.Fatal(err)
		}
		e, nn := xi/as, eta/as
		if math.Abs(e-s.NoiseEastArcsec) > 1e-5 || math.Abs(nn-s.NoiseNorthArcsec) > 1e-5 {
			t.Fatalf("residual (%.7f″, %.7f″), deviate drawn (%.7f″, %.7f″): want equal within 1e-5″", e, nn, s.NoiseEastArcsec, s.NoiseNorthArcsec)
		}
		se, sn, see, snn, sen = se+e, sn+nn, see+e*e, snn+nn*nn, sen+e*nn
		for _, v := range []float64{e, nn} {
			if math.Abs(v) > 2*cfg.SigmaArcsec {
				beyond++
			}
		}
	}
	N := float64(n)
	sigma := cfg.SigmaArcsec
	for _, c := range []struct {
		name     string
		sum, sq  float64
		meanTol  float64
		sigmaTol float64
	}{
		{"east", se, see, 3 * sigma / math.Sqrt(N), 3 * sigma / math.Sqrt(2*N)},
		{"north", sn, snn, 3 * sigma / math.Sqrt(N), 3 * sigma / math.Sqrt(2*N)},
	} {
		mean := c.sum / N
		sd := math.Sqrt((c.sq - N*mean*mean) / (N - 1))
		if math.Abs(mean) > c.meanTol {
			t.Errorf("%s: mean residual %.4f″, want 0 within %.4f″ (3 σ/√N, N = %d)", c.name, mean, c.meanTol, n)
		}
		if math.Abs(sd-sigma) > c.sigmaTol {
			t.Errorf("%s: σ of the residuals %.4f″, want %.4f″ within %.4f″ (3 σ/√(2N))", c.name, sd, sigma, c.sigmaTol)
		}
		t.Logf("%s: N = %d, mean %+.4f″ (tol %.4f), σ %.4f″ (want %.2f ± %.4f)", c.name, n, mean, c.meanTol, sd, sigma, c.sigmaTol)
	}
	me, mn := se/N, sn/N
	r := (sen/N - me*mn) / math.Sqrt((see/N-me*me)*(snn/N-mn*mn))
	if math.Abs(r) > 3/math.Sqrt(N) {
		t.Errorf("correlation of east and north residuals %.4f, want 0 within %.4f (3/√N)", r, 3/math.Sqrt(N))
	}
	const tail = 0.0455 // P(|z| > 2), Abramowitz & Stegun (1964), table 26.1
	frac := float64(beyond) / (2 * N)
	if tol := 3 * math.Sqrt(tail*(1-tail)/(2*N)); math.Abs(frac-tail) > tol {
		t.Errorf("fraction beyond 2σ %.4f, want %.4f within %.4f", frac, tail, tol)
	}
	t.Logf("correlation %+.4f, beyond 2σ %.4f", r, frac)
}

// TestOnlyDarkAndAboveLimit checks every simulated time against the astropy
// reference windows (the Sun's centre below −18° and the object above the
// limit, testdata/night_windows.txt) and the library's own checks: on nights
// of one window, of two windows (Norrvale, 40°), with the best time at the
// window's start and at its end, and with runs longer than the window. The
// tolerance is the 10 s of fit/plan's comparison with the same reference
// (window_reference_test.go: the reference's 0.1 s, our 0.5 s crossings and
// the refraction models' 4 % difference near the limit).
func TestOnlyDarkAndAboveLimit(t *testing.T) {
	const tol = 10 * time.Second
	cases := []struct {
		site     astro.Site
		refSite  string
		date     string
		target   string
		minAlt   float64
		perNight int
		cadence  time.Duration
	}{
		{alderRidge, "Alder_Ridge", "2026-10-15", "Invented-N1", 25, 12, 20 * time.Minute},
		{alderRidge, "Alder_Ridge", "2026-10-15", "Invented-H3", 25, 60, 2 * time.Minute}, // 2 h asked for a 1.5 h window
		{alderRidge, "Alder_Ridge", "2026-12-11", "Invented-P2", 25, 10, 5 * time.Minute}, // best at dark start
		{norrvale, "Norrvale", "2026-12-11", "Invented-H3", 40, 300, 5 * time.Minute},     // two windows
		{alderRidge, "Alder_Ridge", "2026-12-11", "Invented-N1", 60, 50, 4 * time.Minute},
	}
	for _, c := range cases {
		key := c.refSite + " " + c.date + " " + c.target + " " + strconv.Itoa(int(c.minAlt))
		state, windows := refWindows(t, key)
		if state != "observable" {
			t.Fatalf("%s: reference state %s", key, state)
		}
		cfg := simulate.DefaultConfig()
		cfg.Target = plan.ElementsTarget{Elements: refElements(t, c.target)}
		cfg.Sites, cfg.Nights = []astro.Site{c.site}, []plan.Date{date(t, c.date)}
		cfg.PerNight, cfg.Cadence, cfg.MinAlt = c.perNight, c.cadence, astro.AngleFromDegrees(c.minAlt)
		res, err := cfg.Run()
		if err != nil {
			t.Fatal(err)
		}
		run := res.Runs[0]
		if len(res.Samples) == 0 || run.Made != len(res.Samples) || run.Made+run.Cut+run.Dropped != c.perNight {
			t.Errorf("%s: %d samples, run %+v", key, len(res.Samples), run)
			continue
		}
		for i, s := range res.Samples {
			tm := timeOf(s.UTC)
			in := false
			for _, w := range windows {
				in = in || (!tm.Before(w[0].Add(-tol)) && !tm.After(w[1].Add(tol)))
			}
			if !in {
				t.Errorf("%s: sample at %s outside the reference windows %v", key, tm.Format(time.RFC3339), windows)
			}
			if s.SunAlt > -18*astro.Degree || s.Alt < cfg.MinAlt {
				t.Errorf("%s: sample at %s: Sun at %.4f°, object at %.4f°; want ≤ −18° and ≥ %g°", key, tm.Format(time.RFC3339), s.SunAlt.Degrees(), s.Alt.Degrees(), c.minAlt)
			}
			if ns := tm.Round(time.Millisecond).Nanosecond(); ns != 0 { // timeOf is good to a microsecond
				t.Errorf("%s: sample at %s: not on a whole second", key, tm.Format(time.RFC3339Nano))
			}
			if i > 0 && run.Dropped == 0 {
				if d := tm.Sub(timeOf(res.Samples[i-1].UTC)); d.Round(time.Millisecond) != c.cadence {
					t.Errorf("%s: samples %d and %d %v apart, want the cadence %v", key, i-1, i, d, c.cadence)
				}
			}
		}
		// Centred on the best time unless the window cuts the run short.
		first, last := timeOf(res.Samples[0].UTC), timeOf(res.Samples[len(res.Samples)-1].UTC)
		best := timeOf(run.Best)
		wStart, wEnd := timeOf(run.Window.Start), timeOf(run.Window.End)
		span := time.Duration(c.perNight-1) * c.cadence
		if half := span / 2; best.Sub(wStart) > half && wEnd.Sub(best) > half {
			if mid := first.Add(last.Sub(first) / 2); mid.Sub(best).Abs() > time.Second {
				t.Errorf("%s: run centred on %s, best time %s: want within 1 s", key, mid.Format(time.RFC3339), best.Format(time.RFC3339))
			}
		}
		t.Logf("%s: %d made, %d cut, %d dropped, %s to %s, best %s", key, run.Made, run.Cut, run.Dropped,
			first.Format("15:04:05"), last.Format("15:04:05"), best.Format("15:04:05"))
	}
}

// TestUnobservableNights checks that nights the reference calls near_sun and
// no_darkness give no sample and that reason.
func TestUnobservableNights(t *testing.T) {
	cfg := simulate.DefaultConfig()
	cfg.Target = plan.ElementsTarget{Elements: refElements(t, "Invented-N1")}
	cfg.Sites = []astro.Site{alderRidge, norrvale}
	cfg.Nights = []plan.Date{date(t, "2026-04-28"), date(t, "2026-06-24")}
	res, err := cfg.Run()
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]string{
		"Alder_Ridge 2026-04-28": "", "Norrvale 2026-06-24": "",
	}
	for k := range want {
		st, _ := refWindows(t, k+" Invented-N1 25")
		want[k] = st
	}
	for _, r := range res.Runs {
		key := strings.ReplaceAll(r.Site, " ", "_") + " " + r.Night.String()
		if w, ok := want[key]; ok && (r.Reason.String() != w || r.Made != 0 || r.Why == "") {
			t.Errorf("%s: reason %v (%q), %d made; want %s and none", key, r.Reason, r.Why, r.Made, w)
		}
	}
	for _, s := range res.Samples {
		key := strings.ReplaceAll(s.Site, " ", "_") + " " + s.Night.String()
		if _, ok := want[key]; ok {
			t.Errorf("%s: a sample at %v on an unobservable night", key, timeOf(s.UTC))
		}
	}
}

// predictOnly hides the ElementsTarget type, so that the simulation takes
// the target's Predict, as for a fit.
type predictOnly struct{ plan.ElementsTarget }

func (p predictOnly) Predict(utc astro.JD, site *astro.Site) (fit.Prediction, error) {
	return p.ElementsTarget.Predict(utc, site)
}

// TestTruth checks the noise-free places: for an element set they are
// ephem.PlaceOfElements's (an exact property), through a target's Predict
// the same; and against the ERFA-made noise-free truth of the demo scenario
// (fit/demo truth.csv, testdata/gen/demo_scenario.py with python3-erfa
// 2.0.0.1), interpolated between its hourly rows by a four-point Lagrange
// polynomial, within 0.1″: ephem states 0.032″ against a two-body ERFA
// computation at Δ ≥ 1 au, the generator's ecliptic of IAU 2006 (84381.406″)
// differs from ephem's (84381.448″) by up to 0.042″ (ephem/frame_eclipticj2000.go),
// and the interpolation of the diurnal parallax adds under 0.001″.
func TestTruth(t *testing.T) {
	sets, _, err := ephem.ReadElements(bytes.NewReader(demo.Elements()), "elements.csv")
	if err != nil {
		t.Fatal(err)
	}
	sites, err := obs.ReadSites(bytes.NewReader(demo.Sites()), "sites.csv")
	if err != nil {
		t.Fatal(err)
	}
	site := sites["Alder Ridge"]
	site.Name = "Alder Ridge"
	cfg := simulate.DefaultConfig()
	cfg.Target = plan.ElementsTarget{Elements: sets[0]}
	cfg.Sites = []astro.Site{site}
	cfg.Nights = []plan.Date{date(t, "2027-02-10"), date(t, "2027-02-15")}
	cfg.PerNight, cfg.Cadence = 6, 37*time.Minute
	res, err := cfg.Run()
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Samples) != 12 {
		t.Fatalf("%d samples, want 12 (runs %+v)", len(res.Samples), res.Runs)
	}
	cfg2 := cfg
	cfg2.Target = predictOnly{plan.ElementsTarget{Elements: sets[0]}}
	res2, err := cfg2.Run()
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(res.Samples, res2.Samples) {
		t.Errorf("through Predict the samples differ from the element set's")
	}

	// The demo truth's hourly rows at Alder Ridge: time → (ra, dec) degrees.
	r := csv.NewReader(bytes.NewReader(demo.Truth()))
	r.Comment = '#'
	recs, err := r.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	hourly := map[int64][2]float64{}
	for _, rec := range recs[1:] {
		if rec[1] != "Alder Ridge" || rec[2] != "hourly" {
			continue
		}
		tm, err := time.Parse(time.RFC3339, rec[0])
		ra, err1 := strconv.ParseFloat(rec[3], 64)
		dec, err2 := strconv.ParseFloat(rec[4], 64)
		if err != nil || err1 != nil || err2 != nil {
			t.Fatalf("truth.csv: bad row %q", rec)
		}
		hourly[tm.Unix()] = [2]float64{ra, dec}
	}
	worst, checked := 0.0, 0
	for _, s := range res.Samples {
		pl, err := ephem.PlaceOfElements(sets[0], s.UTC, ephem.Observer{Site: &site, NoRefraction: true})
		if err != nil {
			t.Fatal(err)
		}
		if pl.RA != s.TrueRA || pl.Dec != s.TrueDec || pl.Mag != s.TrueMag {
			t.Errorf("%v: truth %v %v %v, PlaceOfElements %v %v %v", timeOf(s.UTC), s.TrueRA, s.TrueDec, s.TrueMag, pl.RA, pl.Dec, pl.Mag)
		}
		tm := timeOf(s.UTC)
		h0 := tm.Truncate(time.Hour).Add(-time.Hour).Unix()
		var xs [4]float64
		var ys [4][2]float64
		ok := true
		for k := 0; k < 4; k++ {
			v, found := hourly[h0+int64(k)*3600]
			ok = ok && found
			xs[k], ys[k] = float64(k*3600), v
		}
		if !ok {
			continue
		}
		x := float64(tm.Unix() - h0)
		var ra, dec float64
		for k := 0; k < 4; k++ {
			l := 1.0
			for m := 0; m < 4; m++ {
				if m != k {
					l *= (x - xs[m]) / (xs[k] - xs[m])
				}
			}
			ra, dec = ra+l*ys[k][0], dec+l*ys[k][1]
		}
		sep := astro.Separation(astro.AngleFromDegrees(ra), astro.AngleFromDegrees(dec), s.TrueRA, s.TrueDec).Arcseconds()
		worst = max(worst, sep)
		checked++
		if sep > 0.1 {
			t.Errorf("%s: truth %.3f″ from the ERFA truth (interpolated)", tm.Format(time.RFC3339), sep)
		}
	}
	if checked < 8 {
		t.Errorf("only %d samples within the truth's hourly rows, want at least 8", checked)
	}
	t.Logf("against the ERFA truth: %d samples, worst %.4f″", checked, worst)
}

// TestSeed checks that a seed gives the same observations whatever the
// number of workers, that another seed changes the noise and nothing else,
// and that magnitude noise leaves the positions alone.
func TestSeed(t *testing.T) {
	cfg := simulate.DefaultConfig()
	cfg.Target = plan.ElementsTarget{Elements: refElements(t, "Invented-N1")}
	cfg.Sites = []astro.Site{alderRidge, norrvale}
	cfg.Nights = []plan.Date{date(t, "2026-12-11"), date(t, "2026-12-13")}
	cfg.PerNight, cfg.Seed, cfg.Workers = 5, 7, 1
	a, err := cfg.Run()
	if err != nil {
		t.Fatal(err)
	}
	cfg.Workers = 3
	b, err := cfg.Run()
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(a.Samples, b.Samples) || len(a.Samples) != 20 {
		t.Fatalf("seed 7 with 1 and 3 workers: %d and %d samples, equal %v; want 20, equal", len(a.Samples), len(b.Samples), reflect.DeepEqual(a.Samples, b.Samples))
	}
	cfg.Seed = 8
	c, err := cfg.Run()
	if err != nil {
		t.Fatal(err)
	}
	cfg.Seed, cfg.MagSigma = 7, 0.2
	d, err := cfg.Run()
	if err != nil {
		t.Fatal(err)
	}
	for i := range a.Samples {
		x, y, z := a.Samples[i], c.Samples[i], d.Samples[i]
		if x.UTC != y.UTC || x.TrueRA != y.TrueRA || x.TrueDec != y.TrueDec || x.Site != y.Site {
			t.Errorf("sample %d: seed 8 changed the time, site or truth", i)
		}
		if x.RA == y.RA || x.Dec == y.Dec {
			t.Errorf("sample %d: seeds 7 and 8 give the same noise", i)
		}
		if x.RA != z.RA || x.Dec != z.Dec || x.Mag != x.TrueMag && math.Abs(x.Mag-x.TrueMag) > 0.005 {
			t.Errorf("sample %d: magnitude noise moved the position, or no magnitude noise left the magnitude off its truth", i)
		}
	}
}

// TestRoundTrip writes the samples as an observation CSV, reads it back with
// astro/obs and checks that every value reads back exactly, with no warning;
// and that the header says what the file is.
func TestRoundTrip(t *testing.T) {
	inline, err := obs.ParseSiteSpec("44.52,-72.80,410") // a name with commas, quoted in the file
	if err != nil {
		t.Fatal(err)
	}
	cfg := simulate.DefaultConfig()
	cfg.Target = plan.ElementsTarget{Elements: refElements(t, "Invented-N1")}
	cfg.Source = `element set "Invented-N1" of night_targets.csv`
	cfg.Sites = []astro.Site{inline, norrvale}
	cfg.Nights = []plan.Date{date(t, "2026-12-11"), date(t, "2026-12-12")}
	cfg.PerNight, cfg.SigmaArcsec, cfg.MagSigma, cfg.Seed = 7, 0.35, 0.1, 99
	res, err := cfg.Run()
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := res.WriteCSV(&buf, "made by a test"); err != nil {
		t.Fatal(err)
	}
	text := buf.String()
	for _, want := range []string{"# SYNTHETIC", "seed 99", "sigma 0.35", `"Invented-N1"`, "44.52,-72.80,410 (44.520000, -72.800000, 410 m); Norrvale", "2026-12-11, 2026-12-12", "# made by a test\n"} {
		if !strings.Contains(text, want) {
			t.Errorf("file lacks %q:\n%s", want, text[:min(len(text), 1500)])
		}
	}
	set, err := obs.Read(strings.NewReader(text), "sim.csv", obs.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(set.Warnings) != 0 {
		t.Errorf("warnings reading back: %v", set.Warnings)
	}
	if len(set.Obs) != len(res.Samples) || len(set.Obs) != 28 {
		t.Fatalf("read back %d observations, simulated %d; want 28", len(set.Obs), len(res.Samples))
	}
	for i, o := range set.Obs {
		s := res.Samples[i]
		if o.Time != s.UTC || o.RA != s.RA || o.Dec != s.Dec || o.Site != s.Site ||
			o.SigmaRA != astro.AngleFromArcseconds(s.SigmaArcsec) || o.SigmaDec != o.SigmaRA ||
			o.Mag != s.Mag || o.Band != "V" || !o.Used {
			t.Errorf("observation %d (line %d): read %+v, simulated %+v", i, o.Line, o, s)
		}
	}
}

// TestValidate checks that settings out of range are refused, naming the
// setting.
func TestValidate(t *testing.T) {
	good := simulate.DefaultConfig()
	good.Target = plan.ElementsTarget{Elements: refElements(t, "Invented-N1")}
	good.Sites, good.Nights = []astro.Site{alderRidge}, []plan.Date{date(t, "2026-12-11")}
	if err := good.Validate(); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name string
		edit func(c *simulate.Config)
		want string
	}{
		{"no target", func(c *simulate.Config) { c.Target = nil }, "no target"},
		{"no site", func(c *simulate.Config) { c.Sites = nil }, "no site"},
		{"unnamed site", func(c *simulate.Config) { c.Sites = []astro.Site{{Lat: 1}} }, "without a name"},
		{"site twice", func(c *simulate.Config) { c.Sites = []astro.Site{alderRidge, alderRidge} }, "twice"},
		{"no night", func(c *simulate.Config) { c.Nights = nil }, "no night"},
		{"night twice", func(c *simulate.Config) { c.Nights = append(c.Nights, c.Nights[0]) }, "twice"},
		{"bad date", func(c *simulate.Config) { c.Nights = []plan.Date{{Year: 2026, Month: 2, Day: 30}} }, "not a date"},
		{"per night 0", func(c *simulate.Config) { c.PerNight = 0 }, "observations a night"},
		{"cadence 1.5 s", func(c *simulate.Config) { c.Cadence = 1500 * time.Millisecond }, "whole number of seconds"},
		{"cadence 0", func(c *simulate.Config) { c.Cadence = 0 }, "cadence"},
		{"sigma 0", func(c *simulate.Config) { c.SigmaArcsec = 0 }, "noise"},
		{"sigma NaN", func(c *simulate.Config) { c.SigmaArcsec = math.NaN() }, "noise"},
		{"mag sigma", func(c *simulate.Config) { c.MagSigma = -1 }, "magnitude noise"},
		{"min alt", func(c *simulate.Config) { c.MinAlt = 95 * astro.Degree }, "altitude limit"},
		{"too many", func(c *simulate.Config) {
			c.PerNight, c.Nights = simulate.MaxPerNight, nil
			for k := 0; k < 101; k++ {
				c.Nights = append(c.Nights, date(t, "2026-12-11").AddDays(k))
			}
		}, "observations asked for"},
	}
	for _, c := range cases {
		cfg := good
		c.edit(&cfg)
		err := cfg.Validate()
		if err == nil || !strings.Contains(err.Error(), c.want) || !strings.HasPrefix(err.Error(), "simulate: ") {
			t.Errorf("%s: error %v, want one with %q", c.name, err, c.want)
		}
		if _, err := cfg.Run(); err == nil {
			t.Errorf("%s: Run gave no error", c.name)
		}
	}
}
