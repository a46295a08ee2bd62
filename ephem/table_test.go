package ephem

import (
	"errors"
	"math"
	"path/filepath"
	"testing"

	"arcfit/astro"
)

// TestElementsFileAgainstERFA reads testdata/elements/erfa_places_elements.csv
// (the four invented element sets of testdata/erfa_places.txt, written in our
// CSV by hand), checks that they are the sets of that file's header, and
// then computes one-row tables with EphemerisTable at every UTC row of those
// bodies and compares them with the ERFA places (python3-erfa 2.0.0.1, made
// by testdata/gen/erfa_places.py). Tolerances are those of tolFor in
// place_test.go for element sets: 0.1″, or the Earth's VSOP87 error
// 1.9e-7 au seen from Δ where that is larger; distances 3e-7 au.
func TestElementsFileAgainstERFA(t *testing.T) {
	tab := readPlaceTable(t)
	sets, warns, err := ReadElementsFile(filepath.Join(elementsDir, "erfa_places_elements.csv"))
	if err != nil || len(warns) != 0 {
		t.Fatalf("ReadElementsFile: %v, warnings %v", err, warns)
	}
	if len(sets) != len(tab.elements) {
		t.Fatalf("%d sets, want the %d of erfa_places.txt", len(sets), len(tab.elements))
	}
	read := map[string]Elements{}
	for _, el := range sets {
		ref, ok := tab.elements[el.Name]
		if !ok {
			t.Fatalf("set %q is not in erfa_places.txt", el.Name)
		}
		const angTol = 1e-15 // rad; both are one multiplication of the same decimal
		if el.E != ref.E || el.A != ref.A || (el.A == 0 && (el.Q != ref.Q || el.Tp.Float() != ref.Tp.Float())) ||
			(el.A != 0 && el.Epoch.Float() != ref.Epoch.Float()) ||
			math.Abs(float64(el.I-ref.I)) > angTol || math.Abs(float64(el.Node-ref.Node)) > angTol ||
			math.Abs(float64(el.Peri-ref.Peri)) > angTol || math.Abs(float64(el.M-ref.M)) > angTol {
			t.Errorf("%s: read %+v, want %+v", el.Name, el, ref)
		}
		read[el.Name] = el
	}
	n := 0
	var worstArcsec float64
	for _, row := range tab.rows {
		el, ok := read[row.body]
		if !ok || row.key != "utc" {
			continue
		}
		o := Observer{DUT1Sec: row.dut1, NoRefraction: true}
		if row.site != "geocentre" {
			o.Site = tab.sites[row.site]
		}
		places, err := EphemerisTable(TableTarget{Elements: &el}, row.utc, row.utc, 1, o)
		if err != nil && !errors.Is(err, astro.ErrStaleTable) {
			t.Fatalf("line %d: %v", row.line, err)
		}
		if len(places) != 1 {
			t.Fatalf("line %d: %d places, want 1", row.line, len(places))
		}
		p := places[0]
		tol := tolFor(row.body, row)
		d := sepArcsec(p.RA, p.Dec, deg(row.ra), deg(row.dec))
		worstArcsec = max(worstArcsec, d)
		if d > tol.posArcsec {
			t.Errorf("line %d %s %s: RA, Dec = %.7f°, %.7f°, want %.7f°, %.7f° (Δ %.3g″, tol %.3g″)",
				row.line, row.body, row.site, p.RA.Degrees(), p.Dec.Degrees(), row.ra, row.dec, d, tol.posArcsec)
		}
		if dd := math.Abs(p.DeltaAU - row.delta); dd > tol.deltaAU {
			t.Errorf("line %d %s: delta = %.9f au, want %.9f (Δ %.3g au)", row.line, row.body, p.DeltaAU, row.delta, dd)
		}
		n++
	}
	if n < 400 {
		t.Errorf("compared %d rows, want the ≥ 400 UTC rows of the four element sets", n)
	}
	t.Logf("%d rows, worst astrometric difference %.4f″", n, worstArcsec)
}

// TestTableTimes checks the instants of a table: counts, the end included,
// no accumulated error, and the rejects.
func TestTableTimes(t *testing.T) {
	from := astro.NewJD(2461440.5, astro.UTC) // 2027-02-04T00:00:00Z (ISO 8601 of the JD, design.md's 2461406.5 + 34 d)
	cases := []struct {
		name     string
		to       astro.JD
		stepDays float64
		n        int
	}{
		{"ten days daily", from.AddDays(10), 1, 11},
		{"one instant", from, 1, 1},
		{"hourly, end not on a step", from.AddDays(1.01), 1.0 / 24, 25},
		{"seconds, end reached despite rounding", from.AddSeconds(3 * 60), 1.0 / 86400, 181},
	}
	for _, c := range cases {
		times, err := TableTimes(from, c.to, c.stepDays)
		if err != nil || len(times) != c.n {
			t.Errorf("%s: %d times, %v; want %d", c.name, len(times), err, c.n)
			continue
		}
		last := times[len(times)-1]
		wantLast := float64(c.n-1) * c.stepDays
		if d := last.Sub(from) - wantLast; math.Abs(d)*86400 > 1e-6 {
			t.Errorf("%s: last instant %.9f d after the start, want %.9f (Δ %.3g s)", c.name, last.Sub(from), wantLast, d*86400)
		}
	}
	bad := []struct {
		name     string
		from, to astro.JD
		step     float64
		sentinel error
	}{
		{"to before from", from, from.AddDays(-1), 1, astro.ErrRange},
		{"zero step", from, from.AddDays(1), 0, astro.ErrRange},
		{"negative step", from, from.AddDays(1), -1, astro.ErrRange},
		{"NaN step", from, from.AddDays(1), math.NaN(), astro.ErrRange},
		{"too many rows", from, from.AddDays(365), 1.0 / 86400, astro.ErrRange},
		{"before 1800", astro.NewJD(TableFirstJD-1, astro.UTC), from, 1, astro.ErrUnsupportedDate},
		{"after 2200", from, astro.NewJD(TableLastJD, astro.UTC), 1, astro.ErrUnsupportedDate},
		{"not UTC", astro.NewJD(2461440.5, astro.TT), astro.NewJD(2461441.5, astro.TT), 1, astro.ErrRange},
	}
	for _, c := range bad {
		if times, err := TableTimes(c.from, c.to, c.step); err == nil || !errors.Is(err, c.sentinel) {
			t.Errorf("%s: %d times, error %v; want one wrapping %v", c.name, len(times), err, c.sentinel)
		}
	}
}

// TestEphemerisTableRows checks that each row of a table is the target's
// place at its instant, and the rejected targets.
func TestEphemerisTableRows(t *testing.T) {
	from := astro.NewJD(2461440.5, astro.UTC)
	site := &astro.Site{Name: "Invented Hill", Lat: astro.AngleFromDegrees(42.3), Lon: astro.AngleFromDegrees(-101.5), HeightM: 930}
	o := Observer{Site: site}
	for _, b := range []Body{Sun, Moon, Mars} {
		places, err := EphemerisTable(TableTarget{Body: b}, from, from.AddDays(2), 0.5, o)
		if err != nil || len(places) != 5 {
			t.Fatalf("%v: %d places, %v", b, len(places), err)
		}
		for k, p := range places {
			want, _ := PlaceOfBody(b, from.AddDays(0.5*float64(k)), o)
			if math.IsNaN(p.Mag) && math.IsNaN(want.Mag) {
				p.Mag, want.Mag = 0, 0 // NaN ≠ NaN; both unknown
			}
			if p != want {
				t.Errorf("%v row %d: %+v, want %+v", b, k, p, want)
			}
		}
	}
	for _, tg := range []TableTarget{{}, {Body: Earth}, {Body: Body(42)}, {Elements: &Elements{Name: "bad", E: -1}}} {
		if _, err := EphemerisTable(tg, from, from, 1, o); err == nil {
			t.Errorf("target %+v: no error", tg)
		}
	}
}
