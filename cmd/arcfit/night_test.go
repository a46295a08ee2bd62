package main

import (
	"bufio"
	"encoding/json"
	"math"
	"os"
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
		{[]string{"night", "obs.csv", "--date", "2027-02-20", "--site", "44.5,-72.8,410"}, "not built yet"},
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
