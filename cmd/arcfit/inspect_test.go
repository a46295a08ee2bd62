package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"testing"
	"time"

	"arcfit/fit/demo"
)

// demoFiles writes the demo observations and sites into a temporary
// directory and returns their paths.
func demoFiles(t *testing.T) (obsPath, sitesPath string) {
	t.Helper()
	dir := t.TempDir()
	obsPath = filepath.Join(dir, demo.ObservationsFile)
	sitesPath = filepath.Join(dir, demo.SitesFile)
	if err := os.WriteFile(obsPath, demo.Observations(), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(sitesPath, demo.Sites(), 0o644); err != nil {
		t.Fatal(err)
	}
	return obsPath, sitesPath
}

// records reads a CSV with '#' comments into header and rows, independently
// of arcfit's readers.
func records(t *testing.T, b []byte) ([]string, [][]string) {
	t.Helper()
	r := csv.NewReader(bytes.NewReader(b))
	r.Comment = '#'
	recs, err := r.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return recs[0], recs[1:]
}

// expected holds what the test works out from the demo files itself, with
// the standard library only.
type expected struct {
	count, sites, nights int
	arcDays              float64
	firstNightDate       string
	firstNightSite       string
	firstNightN          int
}

// expectDemo works out counts, sites, arc and nights from the demo files:
// times by time.Parse, nights as the calendar date of (UTC + longitude/15°
// hours − 12 h), i.e. noon to noon in local mean time (design.md: "the night
// of DATE … begins on the evening of DATE in local time (the site's mean solar
// time)").
func expectDemo(t *testing.T) expected {
	_, srows := records(t, demo.Sites())
	lon := map[string]float64{}
	for _, r := range srows {
		v, err := strconv.ParseFloat(r[2], 64)
		if err != nil {
			t.Fatal(err)
		}
		lon[r[0]] = v
	}
	_, rows := records(t, demo.Observations())
	var times []time.Time
	sites := map[string]bool{}
	dates := map[string]bool{}
	type key struct{ date, site string }
	perNight := map[key]int{}
	first := time.Time{}
	var e expected
	for _, r := range rows {
		tm, err := time.Parse(time.RFC3339Nano, r[0])
		if err != nil {
			t.Fatal(err)
		}
		times = append(times, tm)
		sites[r[4]] = true
		local := tm.Add(time.Duration(lon[r[4]] / 15 * float64(time.Hour))).Add(-12 * time.Hour)
		d := local.Format("2006-01-02")
		dates[d] = true
		perNight[key{d, r[4]}]++
		if first.IsZero() || tm.Before(first) {
			first = tm
			e.firstNightDate, e.firstNightSite = d, r[4]
		}
	}
	sort.Slice(times, func(i, j int) bool { return times[i].Before(times[j]) })
	e.count, e.sites, e.nights = len(rows), len(sites), len(dates)
	e.arcDays = times[len(times)-1].Sub(times[0]).Hours() / 24
	e.firstNightN = perNight[key{e.firstNightDate, e.firstNightSite}]
	return e
}

// truthRate returns the mean rate ("/min) and position angle (deg) between the
// first and last noise-free positions of the demo's first night (truth.csv,
// from python3-erfa 2.0.0.1 via testdata/gen/demo_scenario.py), by the
// haversine separation and the four-parts position angle (Meeus, Astronomical
// Algorithms, 2nd ed., ch. 17, eq. 17.5 note; ch. 48 for the angle's form).
func truthRate(t *testing.T, site string, n int) (rate, pa, spanMin float64) {
	_, rows := records(t, demo.Truth())
	var sel [][]string
	for _, r := range rows {
		if r[2] == "obs" && r[1] == site {
			sel = append(sel, r)
		}
	}
	a, b := sel[0], sel[n-1]
	f := func(s string) float64 { v, _ := strconv.ParseFloat(s, 64); return v * math.Pi / 180 }
	ra1, de1, ra2, de2 := f(a[3]), f(a[4]), f(b[3]), f(b[4])
	h := math.Pow(math.Sin((de2-de1)/2), 2) + math.Cos(de1)*math.Cos(de2)*math.Pow(math.Sin((ra2-ra1)/2), 2)
	sep := 2 * math.Asin(math.Sqrt(h)) * 180 / math.Pi * 3600
	t1, _ := time.Parse(time.RFC3339Nano, a[0])
	t2, _ := time.Parse(time.RFC3339Nano, b[0])
	spanMin = t2.Sub(t1).Minutes()
	pa = math.Atan2(math.Cos(de2)*math.Sin(ra2-ra1),
		math.Sin(de2)*math.Cos(de1)-math.Cos(de2)*math.Sin(de1)*math.Cos(ra2-ra1)) * 180 / math.Pi
	if pa < 0 {
		pa += 360
	}
	return sep / spanMin, pa, spanMin
}

func TestInspectDemoJSON(t *testing.T) {
	obsPath, sitesPath := demoFiles(t)
	// flags after the file: pflag's interspersed parsing (design.md)
	code, out, errs := runArgs(t, "inspect", obsPath, "--json", "--sites", sitesPath)
	if code != exitOK || errs != "" {
		t.Fatalf("inspect --json: code %d, stderr %q", code, errs)
	}
	var got struct {
		File            string  `json:"file"`
		Count           int     `json:"observation_count"`
		Used            int     `json:"used_count"`
		NightCount      int     `json:"night_count"`
		ArcDays         float64 `json:"arc_days"`
		ArcHours        float64 `json:"arc_hours"`
		MeanSigmaArcsec float64 `json:"mean_sigma_arcsec"`
		Sites           []struct {
			Name  string `json:"name"`
			Count int    `json:"count"`
		} `json:"sites"`
		Nights []struct {
			Date      string   `json:"date"`
			Site      string   `json:"site"`
			Count     int      `json:"count"`
			SpanMin   float64  `json:"span_min"`
			Rate      *float64 `json:"rate_arcsec_per_min"`
			RateSigma *float64 `json:"rate_sigma_arcsec_per_min"`
			PADeg     *float64 `json:"pa_deg"`
			Moving    bool     `json:"moving"`
		} `json:"nights"`
		Warnings []struct {
			Code string `json:"code"`
		} `json:"warnings"`
		Observations []struct {
			Line        int     `json:"line"`
			TimeUTC     string  `json:"time_utc"`
			RADeg       float64 `json:"ra_deg"`
			DecDeg      float64 `json:"dec_deg"`
			SigmaArcsec float64 `json:"sigma_arcsec"`
			Site        string  `json:"site"`
			Used        bool    `json:"used"`
		} `json:"observations"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("inspect --json: %v\n%s", err, out)
	}
	e := expectDemo(t)
	if got.Count != e.count || got.Used != e.count || len(got.Sites) != e.sites || got.NightCount != e.nights {
		t.Errorf("inspect --json: count %d used %d sites %d nights %d; want %d %d %d %d (from the file)",
			got.Count, got.Used, len(got.Sites), got.NightCount, e.count, e.count, e.sites, e.nights)
	}
	if math.Abs(got.ArcDays-e.arcDays) > 1e-7 || math.Abs(got.ArcHours-24*e.arcDays) > 1e-6 {
		t.Errorf("inspect --json: arc %.9g d (%.9g h), want %.9g d (time.Parse of first and last)", got.ArcDays, got.ArcHours, e.arcDays)
	}
	if got.MeanSigmaArcsec != 0.5 { // every row of the demo file says 0.5
		t.Errorf("inspect --json: mean_sigma_arcsec %v, want 0.5 (the file's sigma column)", got.MeanSigmaArcsec)
	}
	if len(got.Warnings) != 0 {
		t.Errorf("inspect --json: warnings %+v, want none for the demo data", got.Warnings)
	}
	if len(got.Observations) != e.count {
		t.Fatalf("inspect --json: %d observations, want %d", len(got.Observations), e.count)
	}
	_, rows := records(t, demo.Observations())
	o0 := got.Observations[0]
	// The first data row of the file: its line number counts the comment lines.
	firstLine := 1 + bytes.Count(demo.Observations()[:bytes.Index(demo.Observations(), []byte(rows[0][0]))], []byte("\n"))
	if o0.Line != firstLine || o0.TimeUTC != rows[0][0] || o0.Site != rows[0][4] || !o0.Used || o0.SigmaArcsec != 0.5 {
		t.Errorf("inspect --json: first observation %+v, want line %d, %s at %s", o0, firstLine, rows[0][0], rows[0][4])
	}
	// hand: (9 + 20/60 + 42.047/3600) × 15 = 140.1751958°, 23 + 14/60 + 49.82/3600 = 23.2471722°
	if math.Abs(o0.RADeg-140.175195833) > 1e-8 || math.Abs(o0.DecDeg-23.247172222) > 1e-8 {
		t.Errorf("inspect --json: first position %.9f %.9f, want 140.175195833 23.247172222 (hand, from the file)", o0.RADeg, o0.DecDeg)
	}

	n := got.Nights[0]
	if n.Date != e.firstNightDate || n.Site != e.firstNightSite || n.Count != e.firstNightN {
		t.Errorf("inspect --json: first night %s %s n=%d, want %s %s n=%d", n.Date, n.Site, n.Count, e.firstNightDate, e.firstNightSite, e.firstNightN)
	}
	if n.Rate == nil || n.PADeg == nil || n.RateSigma == nil || !n.Moving {
		t.Fatalf("inspect --json: first night has no rate: %+v", n)
	}
	rate, pa, span := truthRate(t, n.Site, n.Count)
	// Tolerance: the noise (σ 0.5″ per coordinate) moves the fitted rate by its
	// formal σ; allow 4σ. PA: 4σ/rate radians.
	if math.Abs(*n.Rate-rate) > 4**n.RateSigma {
		t.Errorf("inspect: night 1 rate %.4f\"/min ± %.4f, want %.4f (truth.csv, first→last)", *n.Rate, *n.RateSigma, rate)
	}
	if d := math.Abs(math.Remainder(*n.PADeg-pa, 360)); d > 4**n.RateSigma/rate*180/math.Pi {
		t.Errorf("inspect: night 1 PA %.3f°, want %.3f° (truth.csv), Δ %.3f°", *n.PADeg, pa, d)
	}
	if math.Abs(n.SpanMin-span) > 1e-4 {
		t.Errorf("inspect: night 1 span %.6f min, want %.6f", n.SpanMin, span)
	}
}

func TestInspectDemoText(t *testing.T) {
	obsPath, sitesPath := demoFiles(t)
	code, out, errs := runArgs(t, "inspect", "--sites", sitesPath, obsPath)
	if code != exitOK || errs != "" {
		t.Fatalf("inspect: code %d, stderr %q", code, errs)
	}
	e := expectDemo(t)
	for _, want := range []string{
		fmt.Sprintf("%d observations, %d in use", e.count, e.count),
		fmt.Sprintf("arc %.2f d", e.arcDays),
		fmt.Sprintf("%d nights, %d sites", e.nights, e.sites),
		"\n  " + e.firstNightDate + "  " + e.firstNightSite,
		"warnings\n  none\n",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("inspect: output lacks %q:\n%s", want, out)
		}
	}
}

func TestInspectDemoCSV(t *testing.T) {
	obsPath, sitesPath := demoFiles(t)
	code, out, errs := runArgs(t, "inspect", obsPath, "--sites="+sitesPath, "--csv")
	if code != exitOK || errs != "" {
		t.Fatalf("inspect --csv: code %d, stderr %q", code, errs)
	}
	recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatalf("inspect --csv: %v", err)
	}
	_, rows := records(t, demo.Observations())
	if strings.Join(recs[0], ",") != "line,time_utc,ra_deg,dec_deg,sigma_arcsec,sigma_ra_arcsec,sigma_dec_arcsec,site,mag,band,used" {
		t.Errorf("inspect --csv: header %v", recs[0])
	}
	if len(recs)-1 != len(rows) {
		t.Fatalf("inspect --csv: %d rows, want %d", len(recs)-1, len(rows))
	}
	for i, r := range recs[1:] {
		if r[1] != rows[i][0] || r[7] != rows[i][4] || r[8] != rows[i][5] || r[9] != "V" || r[10] != "true" {
			t.Errorf("inspect --csv: row %d = %v, file row %v", i+1, r, rows[i])
		}
	}
}

// TestInspectBadInput checks that input errors exit 2 with one line on stderr
// naming the file (and line and column when there is one), nothing on stdout.
func TestInspectBadInput(t *testing.T) {
	dir := t.TempDir()
	missing := filepath.Join(dir, "nope.csv")
	code, out, errs := runArgs(t, "inspect", missing)
	if code != exitUsage || out != "" || lines(errs) != 1 || !strings.Contains(errs, missing) {
		t.Errorf("inspect missing file: code %d stdout %q stderr %q; want 2, nothing, one line naming %s", code, out, errs, missing)
	}

	bad := filepath.Join(dir, "bad.csv")
	row := "2027-02-04T04:27:48.90Z,09:20:40.838,+91:15:00.72,0.5"
	text := "time,ra,dec,sigma\n2027-02-04T03:56:12.40Z,09:20:42.047,+23:14:49.82,0.5\n" + row + "\n"
	if err := os.WriteFile(bad, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs = runArgs(t, "inspect", bad, "--json")
	// The column must fall within the dec field (1-based characters 38–49 of
	// the row; the reader may point at the field or at the offending part).
	start := strings.Index(row, "+91") + 1
	m := regexp.MustCompile(regexp.QuoteMeta(bad) + `:3:(\d+): dec: `).FindStringSubmatch(errs)
	col := 0
	if m != nil {
		col, _ = strconv.Atoi(m[1])
	}
	if code != exitUsage || out != "" || lines(errs) != 1 || m == nil || col < start || col >= start+len("+91:15:00.72") {
		t.Errorf("inspect bad dec: code %d stdout %q stderr %q; want 2, nothing, one line with %s:3:%d…%d: dec: …",
			code, out, errs, bad, start, start+11)
	}

	code, out, errs = runArgs(t, "inspect", bad, "--sites", missing)
	if code != exitUsage || out != "" || lines(errs) != 1 || !strings.Contains(errs, missing) {
		t.Errorf("inspect missing sites file: code %d stdout %q stderr %q", code, out, errs)
	}
}

// TestInspectWarnings checks the warnings of a small invented file: one night,
// two observations, one exact duplicate row.
func TestInspectWarnings(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "two.csv")
	body := "time,ra,dec,sigma\n" +
		"2027-02-04T03:00:00Z,09:00:00.000,+20:00:00.00,0.5\n" +
		"2027-02-04T03:30:00Z,09:00:02.000,+20:00:10.00,0.5\n" +
		"2027-02-04T03:30:00Z,09:00:02.000,+20:00:10.00,0.5\n"
	if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runArgs(t, "inspect", p, "--site", "44.52,-72.80,410", "--json")
	if code != exitOK {
		t.Fatalf("inspect: code %d stderr %q", code, errs)
	}
	var got struct {
		Used     int `json:"used_count"`
		Warnings []struct {
			Code string `json:"code"`
			Line int    `json:"line"`
		} `json:"warnings"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	var codes []string
	for _, w := range got.Warnings {
		codes = append(codes, w.Code)
	}
	if got.Used != 2 || strings.Join(codes, " ") != "few-observations single-night duplicate" {
		t.Errorf("inspect: used %d, warnings %v; want 2 and few-observations single-night duplicate", got.Used, codes)
	}
}

// TestInspectSiteFlag checks --site as a name from the sites file (rows
// without a site take it, and their nights become local: 03:00 UTC at
// 101.528° W is 20:14 local mean time on the 3rd) and as an unknown name.
func TestInspectSiteFlag(t *testing.T) {
	_, sitesPath := demoFiles(t)
	p := filepath.Join(t.TempDir(), "nosite.csv")
	body := "time,ra,dec,sigma\n" +
		"2027-02-04T03:00:00Z,09:00:00.000,+20:00:00.00,0.5\n" +
		"2027-02-04T03:30:00Z,09:00:02.000,+20:00:10.00,0.5\n"
	if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runArgs(t, "inspect", p, "--sites", sitesPath, "--site", "Alder Ridge", "--json")
	if code != exitOK {
		t.Fatalf("inspect --site name: code %d stderr %q", code, errs)
	}
	var got struct {
		Nights []struct {
			Date  string `json:"date"`
			Site  string `json:"site"`
			Local bool   `json:"local_mean_time"`
		} `json:"nights"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	if len(got.Nights) != 1 || got.Nights[0].Site != "Alder Ridge" || !got.Nights[0].Local || got.Nights[0].Date != "2027-02-03" {
		t.Errorf("inspect --site name: nights %+v, want one local night of 2027-02-03 at Alder Ridge", got.Nights)
	}
	code, out, errs = runArgs(t, "inspect", p, "--sites", sitesPath, "--site", "Nowhere")
	if code != exitUsage || out != "" || lines(errs) != 1 || !strings.Contains(errs, `--site "Nowhere"`) {
		t.Errorf("inspect --site unknown: code %d stdout %q stderr %q", code, out, errs)
	}
}
