package main

import (
	"bufio"
	"encoding/json"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"
)

// testSite is an invented site, given inline.
const testSite = "42.315,-101.528,930"

func testSiteValue() *astro.Site {
	return &astro.Site{Name: testSite, Lat: astro.AngleFromDegrees(42.315), Lon: astro.AngleFromDegrees(-101.528), HeightM: 930}
}

// ephemJSONOut runs ephem with args and --json and decodes the object.
func ephemJSONOut(t *testing.T, args ...string) (map[string]any, []map[string]any, string) {
	t.Helper()
	code, out, errs := runArgs(t, append([]string{"ephem", "--json"}, args...)...)
	if code != exitOK {
		t.Fatalf("arcfit ephem %v: code %d, stderr %q", args, code, errs)
	}
	var obj map[string]any
	if err := json.Unmarshal([]byte(out), &obj); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	var rows []map[string]any
	for _, r := range obj["rows"].([]any) {
		rows = append(rows, r.(map[string]any))
	}
	return obj, rows, errs
}

// deg returns an angle in degrees, or nil for NaN (JSON null).
func jsonNum(v float64) any {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return v
}

// TestEphemJSONBodies runs ephem --json for the Sun, the Moon and Mars over
// three rows and checks every field against the library's place at the
// row's time (JSON carries float64 exactly), and the near-Sun marks.
func TestEphemJSONBodies(t *testing.T) {
	site := testSiteValue()
	o := ephem.Observer{Site: site}
	for _, b := range []ephem.Body{ephem.Sun, ephem.Moon, ephem.Mars} {
		obj, rows, errs := ephemJSONOut(t, strings.ToLower(b.String()), "--site", testSite,
			"--from", "2027-02-20T00:00:00Z", "--to", "2027-02-21T00:00:00Z", "--step", "12h")
		if obj["body"] != b.String() || obj["site"] != testSite || obj["geocentric"] != false || obj["step_s"] != 43200.0 || len(rows) != 3 {
			t.Fatalf("%v: body %v site %v geocentric %v step_s %v, %d rows", b, obj["body"], obj["site"], obj["geocentric"], obj["step_s"], len(rows))
		}
		near := 0
		for k, r := range rows {
			utc := astro.NewJD(2461456.5+0.5*float64(k), astro.UTC) // 2027-02-20T00:00:00Z = JD 2461456.5 (design.md's 2461406.5 is 2027-01-01, + 50 d)
			if r["time_utc"] != astro.FormatISO8601(utc, 0) {
				t.Errorf("%v row %d: time_utc %v, want %s", b, k, r["time_utc"], astro.FormatISO8601(utc, 0))
			}
			p, err := ephem.PlaceOfBody(b, utc, o)
			if err != nil {
				t.Fatal(err)
			}
			want := map[string]any{
				"ra_deg": p.RA.Degrees(), "dec_deg": p.Dec.Degrees(), "ra_app_deg": p.RAApp.Degrees(), "dec_app_deg": p.DecApp.Degrees(),
				"alt_deg": p.Alt.Degrees(), "az_deg": p.Az.Degrees(), "airmass": jsonNum(p.Airmass),
				"delta_au": p.DeltaAU, "r_au": p.RAU, "elong_deg": p.Elongation.Degrees(), "mag": nil, "near_sun": p.NearSun(),
			}
			for key, w := range want {
				if r[key] != w {
					t.Errorf("%v row %d: %s = %v, want %v (ephem.PlaceOfBody)", b, k, key, r[key], w)
				}
			}
			if p.NearSun() {
				near++
			}
		}
		if obj["near_sun_rows"] != float64(near) {
			t.Errorf("%v: near_sun_rows %v, want %d", b, obj["near_sun_rows"], near)
		}
		// The Sun is near itself (elongation 0): every row, and the warning.
		if b == ephem.Sun && (near != 3 || lines(errs) != 1 || !strings.Contains(errs, "positions of the Sun itself") || !strings.Contains(errs, "blind")) {
			t.Errorf("sun: %d near rows, stderr %q; want 3 and one warning line about the Sun", near, errs)
		}
		if b == ephem.Mars && (near != 0 || errs != "") {
			t.Errorf("mars in February 2027: %d near rows, stderr %q; want none", near, errs)
		}
	}
}

// TestEphemGeocentricText checks the text table without a site: the header
// says geocentric, the alt/az cells are empty, and RA, Dec, distances and
// elongation are the library's at their printed precision.
func TestEphemGeocentricText(t *testing.T) {
	code, out, errs := runArgs(t, "ephem", "jupiter", "--from", "2027-02-20T00:00:00Z", "--to", "2027-02-22T00:00:00Z", "--step", "1d")
	if code != exitOK || errs != "" {
		t.Fatalf("code %d, stderr %q", code, errs)
	}
	if !strings.HasPrefix(out, "Jupiter seen from the Earth's centre (geocentric: no alt, az or airmass") {
		t.Errorf("header:\n%s", out)
	}
	var table [][]string
	for _, l := range strings.Split(out, "\n") {
		if f := strings.Fields(l); len(f) > 1 && strings.HasPrefix(f[0], "2027-") && f[1] != "to" {
			table = append(table, f)
		}
	}
	if len(table) != 3 {
		t.Fatalf("%d table rows, want 3:\n%s", len(table), out)
	}
	for k, f := range table {
		utc := astro.NewJD(2461456.5+float64(k), astro.UTC)
		p, err := ephem.PlaceOfBody(ephem.Jupiter, utc, ephem.Observer{})
		if err != nil {
			t.Fatal(err)
		}
		// alt, az, airmass, moon... empty: time, 4 sexagesimal, delta, r, elong, moon.
		want := []string{astro.FormatISO8601(utc, 0), astro.FormatHMS(p.RA, 2), astro.FormatDMS(p.Dec, 1),
			astro.FormatHMS(p.RAApp, 2), astro.FormatDMS(p.DecApp, 1),
			strconv.FormatFloat(p.DeltaAU, 'f', 6, 64), strconv.FormatFloat(p.RAU, 'f', 6, 64),
			strconv.FormatFloat(p.Elongation.Degrees(), 'f', 1, 64), strconv.FormatFloat(p.MoonSeparation.Degrees(), 'f', 1, 64)}
		if strings.Join(f, " ") != strings.Join(want, " ") {
			t.Errorf("row %d:\n got %q\nwant %q", k, f, want)
		}
	}
}

// TestEphemCSV checks the CSV header (the JSON row fields) and that its
// values are the JSON's at the printed precision.
func TestEphemCSV(t *testing.T) {
	args := []string{"mars", "--site", testSite, "--from", "2027-02-20T00:00:00Z", "--to", "2027-02-20T06:00:00Z", "--step", "90m"}
	code, out, errs := runArgs(t, append([]string{"ephem", "--csv"}, args...)...)
	if code != exitOK || errs != "" {
		t.Fatalf("code %d, stderr %q", code, errs)
	}
	hdr, rows := records(t, []byte(out))
	want := "time_utc,ra_deg,dec_deg,ra_app_deg,dec_app_deg,alt_deg,az_deg,airmass,delta_au,r_au,elong_deg,phase_deg,moon_sep_deg,mag,near_sun"
	if strings.Join(hdr, ",") != want || len(rows) != 5 {
		t.Fatalf("header %q, %d rows; want %q, 5", strings.Join(hdr, ","), len(rows), want)
	}
	_, jrows, _ := ephemJSONOut(t, args...)
	tol := map[string]float64{"ra_deg": 5e-9, "dec_deg": 5e-9, "ra_app_deg": 5e-9, "dec_app_deg": 5e-9, "alt_deg": 5e-6,
		"az_deg": 5e-6, "airmass": 5e-5, "delta_au": 5e-11, "r_au": 5e-11, "elong_deg": 5e-6, "phase_deg": 5e-6, "moon_sep_deg": 5e-6}
	for k, r := range rows {
		for i, h := range hdr {
			jv := jrows[k][h]
			switch h {
			case "time_utc":
				if r[i] != jv {
					t.Errorf("row %d %s: %q vs JSON %v", k, h, r[i], jv)
				}
			case "near_sun":
				if r[i] != strconv.FormatBool(jv.(bool)) {
					t.Errorf("row %d %s: %q vs JSON %v", k, h, r[i], jv)
				}
			case "mag":
				if r[i] != "" || jv != nil {
					t.Errorf("row %d mag: %q vs JSON %v, want empty and null for a planet", k, r[i], jv)
				}
			default:
				if jv == nil {
					if r[i] != "" {
						t.Errorf("row %d %s: %q, want empty for JSON null", k, h, r[i])
					}
					continue
				}
				v, err := strconv.ParseFloat(r[i], 64)
				if err != nil || math.Abs(v-jv.(float64)) > tol[h] {
					t.Errorf("row %d %s: %q vs JSON %v (tol %g)", k, h, r[i], jv, tol[h])
				}
			}
		}
	}
}

// erfaPlaceRows returns up to n UTC rows of ../../testdata/erfa_places.txt
// (python3-erfa 2.0.0.1, testdata/gen/erfa_places.py) for body seen from
// site: utc day, utc frac, dut1 s, ra_deg, dec_deg, delta_au.
func erfaPlaceRows(t *testing.T, body, site string, n int) [][6]float64 {
	t.Helper()
	f, err := os.Open("../../testdata/erfa_places.txt")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var out [][6]float64
	sc := bufio.NewScanner(f)
	for sc.Scan() && len(out) < n {
		fs := strings.Fields(sc.Text())
		if len(fs) != 23 || fs[0] != "utc" || fs[1] != body || fs[2] != site {
			continue
		}
		var r [6]float64
		for i, j := range []int{3, 4, 5, 10, 11, 14} {
			if r[i], err = strconv.ParseFloat(fs[j], 64); err != nil {
				t.Fatal(err)
			}
		}
		out = append(out, r)
	}
	return out
}

// TestEphemElementsAgainstERFA runs ephem --elements on
// testdata/elements/erfa_places_elements.csv (the invented element sets of
// testdata/erfa_places.txt) from that file's invented site Mesa_Alta
// (32.1° N, 105.7° W, 2200 m) at the instants of its rows, and compares the
// astrometric place with ERFA's. Tolerance 0.1″ for element sets, as
// ephem/place_test.go (tolFor) and PlaceOfElements' documentation; the
// instant is given to 0.1 ms, which moves the body by far less.
func TestEphemElementsAgainstERFA(t *testing.T) {
	const elements = "../../testdata/elements/erfa_places_elements.csv"
	for _, body := range []string{"Invented-E20", "Invented-E97"} {
		for _, r := range erfaPlaceRows(t, body, "Mesa_Alta", 3) {
			utc := astro.JD{Day: r[0], Frac: r[1], Scale: astro.UTC}
			at := astro.FormatISO8601(utc, 4)
			_, rows, _ := ephemJSONOut(t, "--elements", elements, "--name", body, "--site", "32.1,-105.7,2200",
				"--dut1", strconv.FormatFloat(r[2], 'g', -1, 64), "--no-refraction", "--from", at, "--to", at, "--step", "1d")
			if len(rows) != 1 {
				t.Fatalf("%s at %s: %d rows", body, at, len(rows))
			}
			ra, dec := rows[0]["ra_deg"].(float64), rows[0]["dec_deg"].(float64)
			d := astro.Separation(astro.AngleFromDegrees(ra), astro.AngleFromDegrees(dec), astro.AngleFromDegrees(r[3]), astro.AngleFromDegrees(r[4])).Arcseconds()
			if d > 0.1 {
				t.Errorf("%s at %s: ra, dec = %.7f°, %.7f°, want %.7f°, %.7f° (erfa_places.txt; Δ %.3g″)", body, at, ra, dec, r[3], r[4], d)
			}
			if dd := math.Abs(rows[0]["delta_au"].(float64) - r[5]); dd > 3e-7 {
				t.Errorf("%s at %s: delta_au %v, want %v (Δ %.3g au)", body, at, rows[0]["delta_au"], r[5], dd)
			}
		}
	}
}

// TestEphemElementsDemo runs ephem on the demo's elements file (one set, so
// --name is not needed) and checks the magnitude against the library's H, G
// magnitude for the same place, at the text's 0.1 mag and the JSON's full
// precision.
func TestEphemElementsDemo(t *testing.T) {
	path := "../../fit/demo/data/elements.csv"
	obj, rows, _ := ephemJSONOut(t, "--elements", path, "--site", testSite, "--from", "2027-02-20T03:00:00Z", "--to", "2027-02-20T05:00:00Z", "--step", "1h")
	sets, _, err := ephem.ReadElementsFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if obj["body"] != sets[0].Name || obj["kind"] != "elements" || len(rows) != 3 {
		t.Fatalf("body %v kind %v, %d rows", obj["body"], obj["kind"], len(rows))
	}
	for k, r := range rows {
		utc := astro.NewJD(2461456.5+(3+float64(k))/24, astro.UTC)
		p, err := ephem.PlaceOfElements(sets[0], utc, ephem.Observer{Site: testSiteValue()})
		if err != nil {
			t.Fatal(err)
		}
		// The test's instant is one float, the table's from + k·step: they
		// differ by well under 1 µs, so the tolerances are 1e-9 mag and 1e-8°.
		if math.Abs(r["mag"].(float64)-p.Mag) > 1e-9 || math.Abs(r["ra_deg"].(float64)-p.RA.Degrees()) > 1e-8 || r["near_sun"] != p.NearSun() {
			t.Errorf("row %d: mag %v ra %v near_sun %v; want %v %v %v (ephem.PlaceOfElements)", k, r["mag"], r["ra_deg"], r["near_sun"], p.Mag, p.RA.Degrees(), p.NearSun())
		}
	}
	code, out, _ := runArgs(t, "ephem", "--elements", path, "--site", testSite, "--from", "2027-02-20T03:00:00Z", "--to", "2027-02-20T03:00:00Z", "--step", "1h")
	p, _ := ephem.PlaceOfElements(sets[0], astro.NewJD(2461456.5+3.0/24, astro.UTC), ephem.Observer{Site: testSiteValue()})
	if code != exitOK || !strings.Contains(out, " "+strconv.FormatFloat(p.Mag, 'f', 1, 64)+" ") {
		t.Errorf("text: magnitude %.1f not in\n%s", p.Mag, out)
	}
}

// TestEphemNearSunWarning runs ephem for Mercury over four months, in which
// it comes within 15° of the Sun (a fact of Mercury's motion: its greatest
// elongation is 28° at most, common practice), and checks the one warning
// line: it names the count and the first and last affected rows as the
// library marks them.
func TestEphemNearSunWarning(t *testing.T) {
	_, rows, errs := ephemJSONOut(t, "mercury", "--from", "2027-01-01T00:00:00Z", "--to", "2027-04-30T00:00:00Z", "--step", "1d")
	first, last, n := -1, -1, 0
	for k, r := range rows {
		utc := astro.NewJD(2461406.5+float64(k), astro.UTC) // 2027-01-01T00:00:00Z (design.md)
		p, err := ephem.PlaceOfBody(ephem.Mercury, utc, ephem.Observer{})
		if err != nil {
			t.Fatal(err)
		}
		if r["near_sun"] != p.NearSun() {
			t.Errorf("row %d: near_sun %v, want %v", k, r["near_sun"], p.NearSun())
		}
		if p.NearSun() {
			if first < 0 {
				first = k
			}
			last, n = k, n+1
		}
	}
	if n == 0 || n == len(rows) {
		t.Fatalf("%d of %d rows near the Sun: the test needs some, not all", n, len(rows))
	}
	want := "in " + strconv.Itoa(n) + " of " + strconv.Itoa(len(rows)) + " rows, rows " + strconv.Itoa(first+1) + " to " + strconv.Itoa(last+1) +
		" (" + rows[first]["time_utc"].(string) + " to " + rows[last]["time_utc"].(string) + ")"
	if lines(errs) != 1 || !strings.Contains(errs, "Mercury is within 15° of the Sun") || !strings.Contains(errs, want) || !strings.Contains(errs, "can blind") {
		t.Errorf("stderr %q, want one warning line containing %q", errs, want)
	}
}

// TestEphemBadInput checks that bad calls exit 2 with one line on stderr and
// nothing on stdout.
func TestEphemBadInput(t *testing.T) {
	span := []string{"--from", "2027-02-01T00:00:00Z", "--to", "2027-02-02T00:00:00Z", "--step", "1d"}
	el := func(file string) []string {
		return append([]string{"ephem", "--elements", "../../testdata/elements/" + file}, span...)
	}
	cases := []struct {
		args []string
		want string
	}{
		{append([]string{"ephem", "pluto"}, span...), `unknown body "pluto"`},
		{append([]string{"ephem", "earth"}, span...), `unknown body "earth"`},
		{append([]string{"ephem"}, span...), "no body given"},
		{append([]string{"ephem", "mars", "venus"}, span...), "one body at a time"},
		{[]string{"ephem", "mars", "--from", "2027-02-02T00:00:00Z", "--to", "2027-02-01T00:00:00Z", "--step", "1d"}, "--to 2027-02-01T00:00:00Z is before --from"},
		{[]string{"ephem", "mars", "--from", "2027-02-01T00:00:00Z", "--to", "2027-02-02T00:00:00Z", "--step", "0s"}, "zero or negative step"},
		{[]string{"ephem", "mars", "--from", "2027-02-01T00:00:00Z", "--to", "2027-02-02T00:00:00Z", "--step", "-1h"}, "zero or negative step"},
		{[]string{"ephem", "mars", "--from", "2027-02-01T00:00:00Z", "--to", "2027-02-02T00:00:00Z", "--step", "0d"}, "zero or negative step"},
		{[]string{"ephem", "mars", "--from", "2027-02-01T00:00:00Z", "--to", "2027-02-02T00:00:00Z", "--step", "often"}, `--step "often"`},
		{[]string{"ephem", "mars", "--from", "2027-02-01T00:00:00Z", "--to", "2027-03-31T00:00:00Z", "--step", "1s"}, "more than the 1000000"},
		{[]string{"ephem", "mars", "--from", "1750-01-01T00:00:00Z", "--to", "1750-01-02T00:00:00Z", "--step", "1d"}, "outside the span of the ephemerides"},
		{[]string{"ephem", "mars", "--from", "2027-02-01T00:00:00Z", "--to", "2300-01-01T00:00:00Z", "--step", "1d"}, "outside the span of the ephemerides"},
		{[]string{"ephem", "mars", "--from", "2027-02-01T00:00:00", "--to", "2027-02-02T00:00:00Z", "--step", "1d"}, "--from"},
		{[]string{"ephem", "mars", "--to", "2027-02-02T00:00:00Z", "--step", "1d"}, "no --from given"},
		{[]string{"ephem", "mars", "--from", "2027-02-02T00:00:00Z", "--step", "1d"}, "no --to given"},
		{[]string{"ephem", "mars", "--from", "2027-02-01T00:00:00Z", "--to", "2027-02-02T00:00:00Z"}, "no --step given"},
		{append([]string{"ephem", "mars", "--json", "--csv"}, span...), "exclude each other"},
		{append([]string{"ephem", "mars", "--dut1", "1.5"}, span...), "--dut1"},
		{append([]string{"ephem", "mars", "--site", "44.5,-200,10"}, span...), "--site"},
		{append([]string{"ephem", "mars", "--name", "X"}, span...), "--name \"X\" needs --elements"},
		{append(el("good_asteroid.csv"), "mars"), "give BODY or --elements, not both"},
		{append(el("good_comet.csv"), "--name", "Invented-X"), `no element set named "Invented-X"`},
		{el("good_comet.csv"), "2 element sets, name one of"},
		{el("bad_e_negative.csv"), "bad_e_negative.csv:2:27: e: want an eccentricity e ≥ 0"},
		{el("bad_a_zero.csv"), "bad_a_zero.csv:2:22: a_au: want a > 0 au"},
		{el("no_such_file.csv"), "no_such_file.csv"},
	}
	for _, c := range cases {
		code, out, errs := runArgs(t, c.args...)
		if code != exitUsage || out != "" || lines(errs) != 1 || !strings.Contains(errs, c.want) {
			t.Errorf("arcfit %q: code %d, stdout %q, stderr %q; want 2, nothing, one line with %q", c.args, code, out, errs, c.want)
		}
	}
}

// TestParseStep checks the step forms against time.Duration arithmetic.
func TestParseStep(t *testing.T) {
	cases := []struct {
		in   string
		want float64 // seconds
	}{
		{"1d", 86400}, {"0.5d", 43200}, {"2d12h", 216000}, {"6h", 21600}, {"30m", 1800}, {"90s", 90}, {"1h30m", 5400}, {"500ms", 0.5},
	}
	for _, c := range cases {
		d, err := parseStep(c.in)
		if err != nil || d.Seconds() != c.want {
			t.Errorf("parseStep(%q) = %v, %v; want %g s", c.in, d, err, c.want)
		}
	}
	for _, in := range []string{"", "d", "1x", "0", "-2d", "NaNd", "Infd", "0x1p3d", "1e9d"} {
		if d, err := parseStep(in); err == nil {
			t.Errorf("parseStep(%q) = %v, want an error", in, d)
		}
	}
}
