package ephem

import (
	"bufio"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"

	"arcfit/astro"
)

// placeRow is one line of ../testdata/erfa_places.txt, made by
// testdata/gen/erfa_places.py with python3-erfa 2.0.0.1 (definitions in its
// header and docstring).
type placeRow struct {
	line           int
	key            string // "utc" (site or geocentre) or "tt" (geocentre, 1900–1971)
	body, site     string
	utc, tt, tdb   astro.JD
	dut1           float64
	ra, dec        float64 // astrometric, degrees
	raApp, decApp  float64 // apparent of date, degrees
	delta, r, tau  float64
	elong, phase   float64 // degrees
	az, alt, altRf float64 // degrees; NaN at the geocentre (altRf also below 10°)
	moonSep        float64 // degrees
}

// placeTable holds the rows, the invented sites and the invented element sets
// listed in the file's header.
type placeTable struct {
	rows     []placeRow
	sites    map[string]*astro.Site
	elements map[string]Elements
}

func readPlaceTable(t testing.TB) placeTable {
	t.Helper()
	const path = "../testdata/erfa_places.txt"
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	tab := placeTable{sites: map[string]*astro.Site{}, elements: map[string]Elements{}}
	num := func(line int, s string) float64 {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatalf("%s:%d: %v", path, line, err)
		}
		return v
	}
	kv := func(line int, s, key string) float64 {
		k, v, ok := strings.Cut(s, "=")
		if !ok || k != key {
			t.Fatalf("%s:%d: field %q, want %s=…", path, line, s, key)
		}
		return num(line, v)
	}
	sc := bufio.NewScanner(f)
	line := 0
	for sc.Scan() {
		line++
		s := sc.Text()
		fs := strings.Fields(s)
		if len(fs) == 0 {
			continue
		}
		if fs[0] == "#" {
			switch {
			case len(fs) == 6 && fs[1] == "site":
				tab.sites[fs[2]] = &astro.Site{Name: fs[2], Lat: astro.AngleFromDegrees(num(line, fs[3])),
					Lon: astro.AngleFromDegrees(num(line, fs[4])), HeightM: num(line, fs[5])}
			case len(fs) >= 10 && fs[1] == "elements":
				el := Elements{Name: fs[2], H: math.NaN(), G: math.NaN()}
				deg := func(i int, key string) astro.Angle { return astro.AngleFromDegrees(kv(line, fs[i], key)) }
				if fs[3] == "M" {
					el.Epoch = astro.NewJD(kv(line, fs[4], "epoch_tt"), astro.TT)
					el.A, el.E = kv(line, fs[5], "a"), kv(line, fs[6], "e")
					el.I, el.Node, el.Peri, el.M = deg(7, "i"), deg(8, "node"), deg(9, "peri"), deg(10, "m")
				} else {
					el.Tp = astro.NewJD(kv(line, fs[4], "tp_tt"), astro.TT)
					el.Q, el.E = kv(line, fs[5], "q"), kv(line, fs[6], "e")
					el.I, el.Node, el.Peri = deg(7, "i"), deg(8, "node"), deg(9, "peri")
				}
				tab.elements[el.Name] = el
			}
			continue
		}
		if len(fs) != 23 {
			t.Fatalf("%s:%d: %d fields, want 23", path, line, len(fs))
		}
		var v [20]float64
		for i := range v {
			v[i] = num(line, fs[i+3])
		}
		tab.rows = append(tab.rows, placeRow{
			line: line, key: fs[0], body: fs[1], site: fs[2],
			utc:  astro.JD{Day: v[0], Frac: v[1], Scale: astro.UTC},
			dut1: v[2],
			tt:   astro.JD{Day: v[3], Frac: v[4], Scale: astro.TT},
			tdb:  astro.JD{Day: v[5], Frac: v[6], Scale: astro.TDB},
			ra:   v[7], dec: v[8], raApp: v[9], decApp: v[10],
			delta: v[11], r: v[12], tau: v[13], elong: v[14], phase: v[15],
			az: v[16], alt: v[17], altRf: v[18], moonSep: v[19],
		})
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	if len(tab.rows) < 10000 || len(tab.sites) != 4 || len(tab.elements) != 4 {
		t.Fatalf("%s: %d rows, %d sites, %d element sets; want ≥ 10000, 4, 4", path, len(tab.rows), len(tab.sites), len(tab.elements))
	}
	return tab
}

// sepDeg returns the angle between two directions given in degrees, in
// arcseconds.
func sepArcsec(ra1, dec1, ra2, dec2 astro.Angle) float64 {
	return astro.Separation(ra1, dec1, ra2, dec2).Arcseconds()
}

func deg(x float64) astro.Angle { return astro.AngleFromDegrees(x) }
