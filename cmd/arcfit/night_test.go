package main

import (
	"bufio"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"arcfit/astro"
	"arcfit/ephem"
)

// unixEpochJD is the Julian date of 1970-01-01T00:00:00 UTC (common
// practice; Meeus, Astronomical Algorithms, 2nd ed., ch. 7). The tests turn
// Julian dates into time.Time with it, independently of astro and ephem.
const unixEpochJD = 2440587.5

// timeOfJDTest converts a UTC Julian date (no leap second inside) to a
// time.Time, to the nanosecond.
func timeOfJDTest(day, frac float64) time.Time {
	sec := ((day - unixEpochJD) + frac) * 86400
	whole := math.Floor(sec)
	return time.Unix(int64(whole), int64(math.Round((sec-whole)*1e9))).UTC()
}

// erfaEvents reads the event lines of ../../testdata/erfa_events.txt (made
// by testdata/gen/erfa_events.py with python3-erfa 2.0.0.1) for one site
// and date: KIND → the UTC instants.
func erfaEvents(t *testing.T, site, date string) map[string][]time.Time {
	t.Helper()
	const path = "../../testdata/erfa_events.txt"
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	out := map[string][]time.Time{}
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		fs := strings.Fields(sc.Text())
		if len(fs) == 6 && fs[0] == "event" && fs[1] == site && fs[2] == date {
			day, err1 := strconv.ParseFloat(fs[4], 64)
			frac, err2 := strconv.ParseFloat(fs[5], 64)
			if err1 != nil || err2 != nil {
				t.Fatalf("%s: bad line %q", path, sc.Text())
			}
			out[fs[3]] = append(out[fs[3]], timeOfJDTest(day, frac))
		}
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return out
}

// nightEventTol is the tolerance of a night --json time against ERFA: the
// 2 s ephem's own tests allow against erfa_events.txt (eventTolSec in
// ephem/events_test.go) plus 0.5 s for printing to the second.
const nightEventTol = 2500 * time.Millisecond

// TestNightJSONAgainstERFA runs night --json for the invented site
// Brackenfold of testdata/erfa_events.txt (51.72° N, 2.35° W, 180 m) on the
// night of 2026-01-08 and checks every Sun event and the Moon's rise and set
// against the ERFA times of that file.
func TestNightJSONAgainstERFA(t *testing.T) {
	code, out, errs := runArgs(t, "night", "--date", "2026-01-08", "--site", "51.72,-2.35,180", "--json")
	if code != exitOK || errs != "" {
		t.Fatalf("code %d, stderr %q", code, errs)
	}
	var got map[string]any
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	want := erfaEvents(t, "Brackenfold", "2026-01-08")
	keys := map[string]string{ // JSON key → erfa_events.txt kind
		"sunset_utc": "sunset", "sunrise_utc": "sunrise", "civil_dusk_utc": "civil_dusk", "civil_dawn_utc": "civil_dawn",
		"nautical_dusk_utc": "nautical_dusk", "nautical_dawn_utc": "nautical_dawn",
		"astro_dusk_utc": "astro_dusk", "astro_dawn_utc": "astro_dawn",
		"dark_start_utc": "astro_dusk", "dark_end_utc": "astro_dawn",
	}
	for key, kind := range keys {
		s, ok := got[key].(string)
		if !ok || len(want[kind]) != 1 {
			t.Errorf("%s = %v, want a time (ERFA has %d %s)", key, got[key], len(want[kind]), kind)
			continue
		}
		tm, err := time.Parse(time.RFC3339, s)
		if err != nil {
			t.Errorf("%s = %q: %v", key, s, err)
			continue
		}
		if d := tm.Sub(want[kind][0]); d.Abs() > nightEventTol {
			t.Errorf("%s = %s, want %s (erfa_events.txt %s; Δ %v)", key, s, want[kind][0].Format(time.RFC3339Nano), kind, d)
		}
	}
	for _, m := range []string{"moonrise", "moonset"} {
		list, _ := got[m+"_utc"].([]any)
		if len(list) != len(want[m]) {
			t.Errorf("%s_utc = %v, want %d times (erfa_events.txt)", m, got[m+"_utc"], len(want[m]))
			continue
		}
		for i, v := range list {
			tm, err := time.Parse(time.RFC3339, v.(string))
			if err != nil || tm.Sub(want[m][i]).Abs() > nightEventTol {
				t.Errorf("%s_utc[%d] = %v, want %s (erfa_events.txt)", m, i, v, want[m][i].Format(time.RFC3339))
			}
		}
	}
	// The local times are the UTC ones in the site's mean solar time, offset
	// −2.35° × 4 min/° = −9.4 min, rounded to −9 min (night.go's choice).
	utc, _ := time.Parse(time.RFC3339, got["sunset_utc"].(string))
	local, err := time.Parse(time.RFC3339, got["sunset_local"].(string))
	if _, off := local.Zone(); err != nil || !local.Equal(utc) || off != -9*60 {
		t.Errorf("sunset_local = %v, want %v at offset −00:09", got["sunset_local"], utc)
	}
	if got["local_mean_time"] != true || got["polar_day"] != false {
		t.Errorf("local_mean_time = %v, polar_day = %v; want true, false", got["local_mean_time"], got["polar_day"])
	}
	// The Moon's illumination: the library's value at local midnight,
	// printed in full.
	site := astro.Site{Lat: astro.AngleFromDegrees(51.72), Lon: astro.AngleFromDegrees(-2.35), HeightM: 180}
	n, err := ephem.NightAt(2026, 1, 8, site, meanTimeToMinute(site.Lon))
	if err != nil {
		t.Fatal(err)
	}
	if got["moon_illum"] != n.MoonIllumination || got["moon_phase"] != n.MoonPhaseName {
		t.Errorf("moon_illum %v, moon_phase %v; want %v, %v (ephem.NightAt)", got["moon_illum"], got["moon_phase"], n.MoonIllumination, n.MoonPhaseName)
	}
}

// TestNightPolarSummer runs night at the invented site Vardhaug of
// erfa_events.txt (69.3° N) on 2026-06-21, where ERFA finds the Sun never
// below the horizon (state "sun never_below"): no sunset, no darkness, and
// the reason printed.
func TestNightPolarSummer(t *testing.T) {
	code, out, errs := runArgs(t, "night", "--date", "2026-06-21", "--site", "69.3,18.7,50")
	if code != exitOK || errs != "" {
		t.Fatalf("code %d, stderr %q", code, errs)
	}
	for _, want := range []string{"The Sun does not set this night (polar day)", "no twilight and no dark window", "dark window: none"} {
		if !strings.Contains(out, want) {
			t.Errorf("text lacks %q:\n%s", want, out)
		}
	}
	for _, line := range strings.Split(out, "\n") {
		if f := strings.Fields(line); len(f) > 0 && (f[0] == "sunset" || f[0] == "sunrise") && !strings.HasSuffix(strings.TrimSpace(line), "-") {
			t.Errorf("polar day: %q, want no time", line)
		}
	}
	code, out, _ = runArgs(t, "night", "--date", "2026-06-21", "--site", "69.3,18.7,50", "--json")
	var got map[string]any
	if err := json.Unmarshal([]byte(out), &got); code != exitOK || err != nil {
		t.Fatalf("code %d, %v", code, err)
	}
	if got["polar_day"] != true || got["sunset_utc"] != nil || got["astro_dusk_utc"] != nil || got["dark_hours"] != 0.0 ||
		!strings.Contains(got["dark_reason"].(string), "no astronomical darkness") {
		t.Errorf("polar day JSON: polar_day %v sunset_utc %v astro_dusk_utc %v dark_hours %v dark_reason %v",
			got["polar_day"], got["sunset_utc"], got["astro_dusk_utc"], got["dark_hours"], got["dark_reason"])
	}
	want := erfaEvents(t, "Vardhaug", "2026-06-21")["moonset"]
	list, _ := got["moonset_utc"].([]any)
	if len(want) != 1 || len(list) != 1 {
		t.Fatalf("moonset_utc %v, want one as erfa_events.txt", got["moonset_utc"])
	}
	if tm, err := time.Parse(time.RFC3339, list[0].(string)); err != nil || tm.Sub(want[0]).Abs() > nightEventTol {
		t.Errorf("moonset_utc %v, want %s (erfa_events.txt)", list[0], want[0].Format(time.RFC3339))
	}
}

// TestNightTextAndZone checks the text table of an invented site and date in
// the default local mean time and with --tz: the same UTC times (the
// library's, rounded to the minute independently here), the local column in
// each zone, and the Moon line.
func TestNightTextAndZone(t *testing.T) {
	site := astro.Site{Name: "Invented Mesa", Lat: astro.AngleFromDegrees(32.1), Lon: astro.AngleFromDegrees(-105.7), HeightM: 2200}
	n, err := ephem.NightAt(2027, 2, 20, site, nil)
	if err != nil {
		t.Fatal(err)
	}
	minute := func(j astro.JD) time.Time { return timeOfJDTest(j.Day, j.Frac).Round(time.Minute) }
	denver, err := time.LoadLocation("America/Denver")
	if err != nil {
		t.Fatal(err)
	}
	lmt := time.FixedZone("LMT-07:03", -(7*60+3)*60) // −105.7° × 4 min/° = −7 h 2.8 min, to the minute
	for _, c := range []struct {
		name   string
		args   []string
		loc    *time.Location
		layout string
		zone   string
	}{
		{"mean time", nil, lmt, "2006-01-02 15:04", "local (LMT-07:03)"},
		{"--tz", []string{"--tz", "America/Denver"}, denver, "2006-01-02 15:04 MST", "local time: America/Denver"},
	} {
		args := append([]string{"night", "--date", "2027-02-20", "--site", "32.1,-105.7,2200"}, c.args...)
		code, out, errs := runArgs(t, args...)
		if code != exitOK || errs != "" {
			t.Fatalf("%s: code %d, stderr %q", c.name, code, errs)
		}
		if !strings.Contains(out, c.zone) || !strings.HasPrefix(out, "The night of 2027-02-20 at 32.1,-105.7,2200 (lat +32.1000°, lon -105.7000°, 2200 m)") {
			t.Errorf("%s: header lacks %q:\n%s", c.name, c.zone, out)
		}
		for _, e := range []struct {
			label string
			t     astro.JD
		}{{"sunset", n.Sunset}, {"astronomical dusk (Sun −18°)", n.AstroDusk}, {"astronomical dawn (Sun −18°)", n.AstroDawn}, {"sunrise", n.Sunrise}} {
			u := minute(e.t)
			want := e.label + "  "
			line := ""
			for _, l := range strings.Split(out, "\n") {
				if strings.HasPrefix(strings.TrimSpace(l), want) {
					line = l
				}
			}
			if !strings.Contains(line, u.Format("2006-01-02 15:04")) || !strings.HasSuffix(line, u.In(c.loc).Format(c.layout)) {
				t.Errorf("%s: %s line %q, want UTC %s and local %s", c.name, e.label, line, u.Format("2006-01-02 15:04"), u.In(c.loc).Format(c.layout))
			}
		}
		wantMoon := "Moon at local midnight: " + strconv.Itoa(int(math.Round(n.MoonIllumination*100))) + "% illuminated, " + n.MoonPhaseName
		if !strings.Contains(out, wantMoon) {
			t.Errorf("%s: text lacks %q:\n%s", c.name, wantMoon, out)
		}
	}
}

// TestNightBadInput checks that bad calls exit 2 with one line on stderr and
// nothing on stdout.
func TestNightBadInput(t *testing.T) {
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"night", "--site", "44.5,-72.8,410"}, "no --date given"},
		{[]string{"night", "--date", "2027-02-30", "--site", "44.5,-72.8,410"}, `--date "2027-02-30"`},
		{[]string{"night", "--date", "20/02/2027", "--site", "44.5,-72.8,410"}, "YYYY-MM-DD"},
		{[]string{"night", "--date", "1700-01-01", "--site", "44.5,-72.8,410"}, "outside the span"},
		{[]string{"night", "--date", "2027-02-20"}, "no --site given"},
		{[]string{"night", "--date", "2027-02-20", "--site", "95,0,0"}, "--site"},
		{[]string{"night", "--date", "2027-02-20", "--site", "Nowhere"}, `--site "Nowhere"`},
		{[]string{"night", "--date", "2027-02-20", "--site", "44.5,-72.8,410", "--tz", "Mars/Olympus"}, `--tz "Mars/Olympus"`},
		{[]string{"night", "--date", "2027-02-20", "--site", "44.5,-72.8,410", "--tz", "Local"}, "--tz Local"},
		{[]string{"night", "--date", "2027-02-20", "--site", "44.5,-72.8,410", "--json", "--csv"}, "exclude each other"},
		{[]string{"night", "no-such-obs.csv", "--date", "2027-02-20", "--site", "44.5,-72.8,410"}, "no-such-obs.csv"},
	}
	for _, c := range cases {
		code, out, errs := runArgs(t, c.args...)
		if code != exitUsage || out != "" || lines(errs) != 1 || !strings.Contains(errs, c.want) {
			t.Errorf("arcfit %q: code %d, stdout %q, stderr %q; want 2, nothing, one line with %q", c.args, code, out, errs, c.want)
		}
	}
}

// TestNightCSV checks the CSV: a header, then the events that happen in time
// order, each with the same instant in UTC and local time.
func TestNightCSV(t *testing.T) {
	code, out, errs := runArgs(t, "night", "--date", "2027-02-20", "--site", "32.1,-105.7,2200", "--tz", "America/Denver", "--csv")
	if code != exitOK || errs != "" {
		t.Fatalf("code %d, stderr %q", code, errs)
	}
	hdr, rows := records(t, []byte(out))
	if strings.Join(hdr, ",") != "event,time_utc,time_local" || len(rows) < 10 {
		t.Fatalf("header %v, %d rows", hdr, len(rows))
	}
	var prev time.Time
	for _, r := range rows {
		u, err1 := time.Parse(time.RFC3339, r[1])
		l, err2 := time.Parse(time.RFC3339, r[2])
		if err1 != nil || err2 != nil || !u.Equal(l) || u.Before(prev) {
			t.Errorf("row %v: times not equal, or out of order", r)
		}
		prev = u
	}
}

// The invented element sets and the astropy reference of fit/plan (made by
// testdata/gen/night_windows.py with python3-astropy 5.2.1).
const (
	nightTargets = "../../fit/plan/testdata/night_targets.csv"
	nightRef     = "../../fit/plan/testdata/night_windows.txt"
)

// nightRefLine returns the fields of the line of night_windows.txt that
// starts with the given words.
func nightRefLine(t *testing.T, prefix ...string) []string {
	t.Helper()
	data, err := os.ReadFile(nightRef)
	if err != nil {
		t.Fatal(err)
	}
	want := strings.Join(prefix, " ") + " "
	for _, l := range strings.Split(string(data), "\n") {
		if strings.HasPrefix(l, want) {
			return strings.Fields(l)
		}
	}
	t.Fatalf("%s: no line %q", nightRef, want)
	return nil
}

// nightJSONOf runs night with args and --json and decodes the object.
func nightJSONOf(t *testing.T, args ...string) (map[string]any, string) {
	t.Helper()
	code, out, errs := runArgs(t, append(append([]string{"night"}, args...), "--json")...)
	if code != exitOK {
		t.Fatalf("arcfit night %q: code %d, stderr %q", args, code, errs)
	}
	var got map[string]any
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	return got, errs
}

// within checks a JSON time against a reference time to the 2
// minutes.
func within(t *testing.T, what string, got any, want string) {
	t.Helper()
	s, _ := got.(string)
	g, err1 := time.Parse(time.RFC3339, s)
	w, err2 := time.Parse(time.RFC3339Nano, want)
	if err1 != nil || err2 != nil || g.Sub(w).Abs() > 2*time.Minute {
		t.Errorf("%s = %v, want %s within 2 min (night_windows.txt)", what, got, want)
	}
}

// TestNightTargetJSON runs night --json for Invented-N1 at Alder Ridge on
// 2026-12-11 and checks the fields: the window and best time against
// the astropy reference, best as predict's object at that time (predict run
// here for the same instant), rows, observable and reason.
func TestNightTargetJSON(t *testing.T) {
	site := "44.52,-72.80,410"
	got, _ := nightJSONOf(t, "--elements", nightTargets, "--name", "Invented-N1", "--date", "2026-12-11", "--site", site)
	win := nightRefLine(t, "window", "Alder_Ridge", "2026-12-11", "Invented-N1", "25")
	best := nightRefLine(t, "best", "Alder_Ridge", "2026-12-11", "Invented-N1", "25")
	within(t, "window_start_utc", got["window_start_utc"], win[5])
	within(t, "window_end_utc", got["window_end_utc"], win[6])
	within(t, "best_time_utc", got["best_time_utc"], best[5])
	if got["observable"] != true || got["reason"] != nil || got["target"] != "Invented-N1" {
		t.Errorf("observable %v reason %v target %v; want true, null, Invented-N1", got["observable"], got["reason"], got["target"])
	}
	rows, _ := got["rows"].([]any)
	if len(rows) < 20 { // a 11.6-h dark window at 30 min
		t.Fatalf("%d rows, want at least 20", len(rows))
	}
	for _, k := range []string{"time_utc", "time_local", "ra_deg", "dec_deg", "alt_deg", "az_deg", "airmass", "semi_major_arcsec",
		"pa_deg", "region_arcmin", "region_fields", "rate_arcsec_per_min", "moon_sep_deg", "in_window"} {
		if _, ok := rows[0].(map[string]any)[k]; !ok {
			t.Errorf("rows[0] lacks %q", k)
		}
	}
	b, _ := got["best"].(map[string]any)
	code, out, errs := runArgs(t, "predict", "--elements", nightTargets, "--name", "Invented-N1", "--at", b["time_utc"].(string), "--site", site, "--json")
	if code != exitOK {
		t.Fatalf("predict: %s", errs)
	}
	var pr map[string]any
	if err := json.Unmarshal([]byte(out), &pr); err != nil {
		t.Fatal(err)
	}
	for k, v := range pr {
		if k == "ra" || k == "dec" || k == "time_utc" {
			if v != b[k] {
				t.Errorf("best.%s = %v, predict %v", k, b[k], v)
			}
			continue
		}
		if f, ok := v.(float64); ok {
			// predict is given the time to 0.01 s: the target moves 0.6″
			// a minute, the sky 15″ a second (alt/az).
			if g, _ := b[k].(float64); math.Abs(g-f) > 1e-3 {
				t.Errorf("best.%s = %v, predict %v", k, b[k], f)
			}
		} else if _, ok := b[k]; !ok {
			t.Errorf("best lacks predict's %q", k)
		}
	}
	if d := b["alt_deg"].(float64) - mustFloat(t, best[6]); math.Abs(d) > 10.0/3600 {
		t.Errorf("best alt %v, want %s within 10″ (night_windows.txt)", b["alt_deg"], best[6])
	}
	sky, _ := got["sky"].(map[string]any)
	if sky["date"] != "2026-12-11" || sky["dark_start_utc"] == nil {
		t.Errorf("sky = %v", sky)
	}
}

func mustFloat(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// TestNightTargetText checks the text for people: the headline in plain
// words first, the table, then the night's sky; and --csv with the same rows
// as --json.
func TestNightTargetText(t *testing.T) {
	args := []string{"night", "--elements", nightTargets, "--name", "Invented-H3", "--date", "2026-12-11", "--site", "44.52,-72.80,410",
		"--tz", "America/New_York", "--step", "1h"}
	code, out, errs := runArgs(t, args...)
	if code != exitOK {
		t.Fatalf("code %d: %s", code, errs)
	}
	// Two parts: night_windows.txt has Invented-H3 above 25° from dusk to
	// 01:02:42 UTC and from 08:25:09 UTC to dawn (20:03 and 03:25 EST).
	for _, want := range []string{"Invented-H3 on the night of 2026-12-11", "Observe it from 03:25 to 05:33 local time (08:25 to 10:33 UTC)",
		"the window is in 2 parts, 17:57–20:03, 03:25–05:33 local time", "Best at 05:33 local time (10:33 UTC)", "Point at RA 17:18:",
		"(ICRS astrometric; of date RA", "No search region", "It moves", "Predicted magnitude", "Moon at the best time",
		"local  UTC", "below 25°", "The night of 2026-12-11", "dark window: 11.6 h"} {
		if !strings.Contains(out, want) {
			t.Errorf("text lacks %q:\n%s", want, out)
		}
	}
	if i, j := strings.Index(out, "Observe it"), strings.Index(out, "local  UTC"); i < 0 || j < i {
		t.Errorf("the headline does not come first")
	}
	if !strings.Contains(errs, "states no uncertainty") {
		t.Errorf("stderr %q lacks the no-uncertainty warning", errs)
	}
	code, out, _ = runArgs(t, append(args, "--csv")...)
	hdr, rows := records(t, []byte(out))
	got, _ := nightJSONOf(t, args[1:]...)
	jrows, _ := got["rows"].([]any)
	if code != exitOK || len(hdr) != len(nightRowCSVHeader) || hdr[0] != "time_utc" || len(rows) != len(jrows) || len(rows) < 11 {
		t.Errorf("csv: code %d, header %v, %d rows; json %d rows", code, hdr, len(rows), len(jrows))
	}
	for i, r := range rows {
		if r[0] != jrows[i].(map[string]any)["time_utc"] || !strings.HasSuffix(r[1], ":00:00-05:00") {
			t.Errorf("csv row %d: %v", i, r[:2])
		}
	}
}

// TestNightTargetNearSun checks the near-Sun refusal: Invented-N1 is 9.26°
// from the Sun at Alder Ridge on 2026-04-28 (night_windows.txt). No table
// without --allow-near-sun, the reason and the caution; with it the table and
// the caution still.
func TestNightTargetNearSun(t *testing.T) {
	args := []string{"night", "--elements", nightTargets, "--name", "Invented-N1", "--date", "2026-04-28", "--site", "44.52,-72.80,410", "--next-nights", "0"}
	code, out, errs := runArgs(t, args...)
	if code != exitOK {
		t.Fatalf("code %d: %s", code, errs)
	}
	if !strings.Contains(out, "Not observable from 44.52,-72.80,410 on this night: Invented-N1 is 9.3° from the Sun") ||
		!strings.Contains(out, "No pointing table") || strings.Contains(out, "local  UTC") {
		t.Errorf("text:\n%s", out)
	}
	if !strings.Contains(errs, "CAUTION") || !strings.Contains(errs, "blind you and destroy equipment") || !strings.Contains(errs, "--allow-near-sun") {
		t.Errorf("stderr lacks the caution: %q", errs)
	}
	got, errs := nightJSONOf(t, args[1:]...)
	rows, _ := got["rows"].([]any)
	if got["reason"] != "near_sun" || got["observable"] != false || got["rows_withheld"] != true || len(rows) != 0 ||
		got["best"] != nil || got["window_start_utc"] != nil || !strings.Contains(errs, "CAUTION") {
		t.Errorf("json: reason %v observable %v withheld %v rows %d best %v", got["reason"], got["observable"], got["rows_withheld"], len(rows), got["best"])
	}
	code, out, errs = runArgs(t, append(args, "--allow-near-sun")...)
	if code != exitOK || !strings.Contains(out, "local  UTC") || !strings.Contains(errs, "CAUTION") {
		t.Errorf("--allow-near-sun: code %d, table %v, stderr %q", code, strings.Contains(out, "local  UTC"), errs)
	}
}

// TestNightTargetNextNights checks a night on which the target is below the
// limit (Invented-N1 at Wattle Rise, 34.60° S, on 2026-06-20) and the next
// observable nights against night_windows.txt; and the reason for a night
// without darkness (Norrvale, 62.40° N, 2026-06-24).
func TestNightTargetNextNights(t *testing.T) {
	got, _ := nightJSONOf(t, "--elements", nightTargets, "--name", "Invented-N1", "--date", "2026-06-20", "--site", "-34.60,138.90,350")
	if got["reason"] != "below_limit" || !strings.Contains(got["reason_text"].(string), "stays below 25°") {
		t.Errorf("reason %v: %v", got["reason"], got["reason_text"])
	}
	next, _ := got["next_nights"].([]any)
	if len(next) != 3 || got["next_nights_searched"] != 24.0 {
		t.Fatalf("next_nights %v (searched %v), want 3 after 24 (night_windows.txt)", next, got["next_nights_searched"])
	}
	for i, n := range next {
		m := n.(map[string]any)
		want := nightRefLine(t, "next", "Wattle_Rise", "2026-06-20", "Invented-N1", "25", fmt.Sprintf("2026-07-%d", 12+i))
		if m["date"] != want[5] {
			t.Errorf("next night %d: %v, want %s", i, m["date"], want[5])
		}
		within(t, "window_start_utc", m["window_start_utc"], want[6])
		within(t, "window_end_utc", m["window_end_utc"], want[7])
		within(t, "best_time_utc", m["best_time_utc"], want[8])
	}
	code, out, _ := runArgs(t, "night", "--elements", nightTargets, "--name", "Invented-P2", "--date", "2026-06-24", "--site", "62.40,17.30,90", "--next-nights", "0")
	if code != exitOK || !strings.Contains(out, "the sky does not get astronomically dark at this site on this night") || strings.Contains(out, "local  UTC") {
		t.Errorf("no darkness: code %d\n%s", code, out)
	}
}

// TestNightTargetFitFile checks night with a saved fit file and with the
// observations it was fitted from (the demo's invented object): the same
// plan, and 3.9 d after the arc the validity-horizon caution.
func TestNightTargetFitFile(t *testing.T) {
	obsPath, sitesPath := demoFiles(t)
	save := filepath.Join(t.TempDir(), "fit.json")
	if code, _, errs := runCmd(t, newFitCommand(), obsPath, "--sites", sitesPath, "--model", "poly2", "--save", save); code != exitOK {
		t.Fatalf("fit: %s", errs)
	}
	args := []string{"--date", "2027-02-12", "--site", "Alder Ridge", "--sites", sitesPath, "--next-nights", "0"}
	a, errA := nightJSONOf(t, append([]string{save}, args...)...)
	b, _ := nightJSONOf(t, append([]string{obsPath, "--model", "poly2"}, args...)...)
	if a["observable"] != true || a["best_time_utc"] != b["best_time_utc"] || a["window_start_utc"] != b["window_start_utc"] {
		t.Errorf("fit file: observable %v best %v window %v; observations: best %v window %v",
			a["observable"], a["best_time_utc"], a["window_start_utc"], b["best_time_utc"], b["window_start_utc"])
	}
	best, _ := a["best"].(map[string]any)
	if best["beyond_horizon"] != true || !strings.Contains(errA, "beyond the fit's validity horizon") {
		t.Errorf("best.beyond_horizon %v, stderr %q; want the horizon caution", best["beyond_horizon"], errA)
	}
}

// TestNightTargetBadInput checks that bad calls with a target exit 2 with one
// line on stderr naming what is wrong, and print nothing.
func TestNightTargetBadInput(t *testing.T) {
	base := []string{"night", "--elements", nightTargets, "--name", "Invented-N1", "--site", "44.52,-72.80,410"}
	cases := []struct {
		args []string
		want string
	}{
		{append(base, "--date", "2026-13-01"), `--date "2026-13-01"`},
		{append(base, "--date", "next friday"), "YYYY-MM-DD"},
		{append(base, "--date", "2026-12-11", "--tz", "Atlantis/Capital"), `--tz "Atlantis/Capital"`},
		{append(base, "--date", "2026-12-11", "--fov", "0"), "--fov 0"},
		{append(base, "--date", "2026-12-11", "--fov", "-5"), "--fov -5"},
		{append(base, "--date", "2026-12-11", "--min-alt", "95"), "--min-alt 95"},
		{append(base, "--date", "2026-12-11", "--min-alt", "-3"), "--min-alt -3"},
		{append(base, "--date", "2026-12-11", "--step", "0"), "--step"},
		{append(base, "--date", "2026-12-11", "--step", "20s"), "--step"},
		{append(base, "--date", "2026-12-11", "--step", "2d"), "--step"},
		{append(base, "--date", "2026-12-11", "--sigma", "0"), "--sigma 0"},
		{append(base, "--date", "2026-12-11", "--next-nights", "-1"), "--next-nights -1"},
		{append(base, "--date", "2026-12-11", "--model", "poly2"), "--model acts on fitting"},
		{[]string{"night", "--elements", nightTargets, "--date", "2026-12-11", "--site", "44.52,-72.80,410"}, "Invented-N1"},
		{[]string{"night", "--elements", nightTargets, "--name", "Invented-N1", "--date", "2026-12-11"}, "no --site given"},
		{[]string{"night", "--elements", "no-such.csv", "--date", "2026-12-11", "--site", "44.52,-72.80,410"}, "no-such.csv"},
		{[]string{"night", "obs.csv", "--elements", nightTargets, "--date", "2026-12-11", "--site", "44.52,-72.80,410"}, "not both"},
		{[]string{"night", "--date", "2026-12-11", "--site", "44.52,-72.80,410", "--min-alt", "30"}, "--min-alt acts on a target"},
		{[]string{"night", "--date", "2026-12-11", "--site", "44.52,-72.80,410", "--name", "X"}, `--name "X" needs --elements`},
	}
	for _, c := range cases {
		code, out, errs := runArgs(t, c.args...)
		if code != exitUsage || out != "" || lines(errs) != 1 || !strings.Contains(errs, c.want) {
			t.Errorf("arcfit %q: code %d, stdout %q, stderr %q; want 2, nothing, one line with %q", c.args, code, out, errs, c.want)
		}
	}
}
