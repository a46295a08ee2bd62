package ephem

import (
	"bufio"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"

	"arcfit/astro"

	"gonum.org/v1/gonum/spatial/r3"
)

// TestSunBarycentricAgainstEpv00 checks SunBarycentricICRS against ERFA's
// epv00 (the Earth's barycentric minus heliocentric vectors, a fit to JPL
// DE405) at 400 TDB dates 1900–2100, ../testdata/erfa_sunbary.txt (made by
// testdata/gen/erfa_places.py). Tolerances: 8e-7 au in position — Pluto,
// left out of our sum, moves the Sun by up to 3e-7 au (its mass ratio
// 1.36e8 and 40 au, from memory), the asteroids by some 1e-7 au, and VSOP87's
// outer planets are good to about 1e-6 au of their own position divided by
// the mass ratio; 1e-8 au/day in velocity (17 mm/s; the Sun moves at up to
// 15 m/s).
func TestSunBarycentricAgainstEpv00(t *testing.T) {
	const path = "../testdata/erfa_sunbary.txt"
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	var n int
	var maxP, maxV, maxSun float64
	line := 0
	for sc.Scan() {
		line++
		fs := strings.Fields(sc.Text())
		if len(fs) == 0 || fs[0] == "#" {
			continue
		}
		if len(fs) != 8 {
			t.Fatalf("%s:%d: %d fields, want 8", path, line, len(fs))
		}
		var v [8]float64
		for i := range v {
			if v[i], err = strconv.ParseFloat(fs[i], 64); err != nil {
				t.Fatalf("%s:%d: %v", path, line, err)
			}
		}
		tdb := astro.JD{Day: v[0], Frac: v[1], Scale: astro.TDB}
		wantP := r3.Vec{X: v[2], Y: v[3], Z: v[4]}
		wantV := r3.Vec{X: v[5], Y: v[6], Z: v[7]}
		p, vel := SunBarycentricICRS(tdb)
		dp := r3.Norm(r3.Sub(p, wantP))
		dv := r3.Norm(r3.Sub(vel, wantV))
		if dp > 8e-7 || dv > 1e-8 {
			t.Errorf("SunBarycentricICRS(%v): |Δpos| = %.3g au, |Δvel| = %.3g au/day; want ≤ 8e-7, 1e-8", tdb, dp, dv)
		}
		maxP, maxV = max(maxP, dp), max(maxV, dv)
		maxSun = max(maxSun, r3.Norm(wantP))
		// The Earth's barycentric state: the heliocentric one plus the Sun's.
		ep, ev, err := EarthBarycentricICRS(tdb)
		if err != nil {
			t.Fatalf("EarthBarycentricICRS(%v): %v", tdb, err)
		}
		eh, evh, _ := HeliocentricICRS(Earth, tdb)
		if d := r3.Norm(r3.Sub(r3.Sub(ep, eh), p)) + r3.Norm(r3.Sub(r3.Sub(ev, evh), vel)); d > 1e-15 {
			t.Errorf("EarthBarycentricICRS(%v) is not HeliocentricICRS + SunBarycentricICRS (Δ %.3g)", tdb, d)
		}
		n++
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	if n < 400 {
		t.Fatalf("%s: %d rows, want 400", path, n)
	}
	t.Logf("Sun barycentric vs epv00, %d dates 1900–2100: max |Δpos| %.3g au (%.0f km), max |Δvel| %.3g au/day (%.1f mm/s); the Sun's offset itself reaches %.4f au",
		n, maxP, maxP*astro.AUKm, maxV, maxV*astro.AUKm/86400*1e6, maxSun)
}

// TestSunBarycentricOutsideSpan checks the documented zero result outside the
// VSOP87 span and for a UTC date.
func TestSunBarycentricOutsideSpan(t *testing.T) {
	for _, tdb := range []astro.JD{
		astro.NewJD(1e6, astro.TDB),
		astro.NewJD(astro.J2000, astro.UTC),
		{Day: math.NaN(), Scale: astro.TDB},
	} {
		if p, v := SunBarycentricICRS(tdb); p != (r3.Vec{}) || v != (r3.Vec{}) {
			t.Errorf("SunBarycentricICRS(%v) = %v, %v; want zero vectors", tdb, p, v)
		}
	}
	if _, _, err := EarthBarycentricICRS(astro.NewJD(1e6, astro.TDB)); err == nil {
		t.Errorf("EarthBarycentricICRS(JD 1e6): no error")
	}
}

// TestSunMeeus25a checks the Sun by Meeus' high-accuracy method at 1992 Oct
// 13.0 TD (JDE 2448908.5), Meeus, Astronomical Algorithms, 2nd ed., example
// 25.a's "correct" full-VSOP87 values (p. 165, as collected in
// /work/shared/checks/meeus.md) and ERFA's recomputation there (epv00 + light
// time + ab + pnm80). Tolerances: 0.1″ and 0.01 s (meeus.md's bracketed
// tolerance for a full VSOP87); for R, the half unit of the 8th printed digit
// plus our truncated Earth series' 3e-8 au (vsop87.go).
func TestSunMeeus25a(t *testing.T) {
	tt := astro.NewJD(2448908.5, astro.TT)
	dms := func(d, m int, s float64) float64 { return float64(d) + float64(m)/60 + s/3600 }
	lon, lat, r, err := SunGeometricEclipticOfDate(tt)
	if err != nil {
		t.Fatal(err)
	}
	lonA, latA, rA, err := SunApparentEclipticOfDate(tt)
	if err != nil {
		t.Fatal(err)
	}
	ra, dec, _, err := SunApparentEquatorialOfDate(tt)
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name      string
		got, want float64 // degrees
		tolArcsec float64
		src       string
	}{
		{"geometric λ", lon.Degrees(), dms(199, 54, 26.18), 0.1, "Meeus 25.a, full VSOP87"},
		{"geometric β", lat.Degrees(), dms(0, 0, 0.72), 0.1, "Meeus 25.a, full VSOP87"},
		{"apparent λ", lonA.Degrees(), dms(199, 54, 21.56), 0.1, "Meeus 25.a (full VSOP87; meeus.md: place of print unconfirmed)"},
		{"apparent λ", lonA.Degrees(), dms(199, 54, 21.57), 0.1, "ERFA recomputation, meeus.md"},
		{"apparent β", latA.Degrees(), dms(0, 0, 0.72), 0.1, "Meeus 25.a (β unchanged by the method)"},
		{"apparent α", ra.Degrees(), 15 * dms(13, 13, 30.749), 0.15, "Meeus 25.a (0.01 s)"},
		{"apparent α", ra.Degrees(), 15 * dms(13, 13, 30.750), 0.1, "ERFA recomputation, meeus.md"},
		{"apparent δ", dec.Degrees(), -dms(7, 47, 1.74), 0.1, "Meeus 25.a"},
		{"apparent δ", dec.Degrees(), -dms(7, 47, 1.73), 0.1, "ERFA recomputation, meeus.md"},
	}
	for _, tc := range tests {
		d := (tc.got - tc.want) * 3600
		if math.Abs(d) > tc.tolArcsec {
			t.Errorf("Sun %s(%v) = %.7f°, want %.7f° (Δ %.3f″, tol %g″; %s)", tc.name, tt, tc.got, tc.want, d, tc.tolArcsec, tc.src)
		} else {
			t.Logf("Sun %s: Δ %+.3f″ (%s)", tc.name, d, tc.src)
		}
	}
	const wantR = 0.99760853 // Meeus 25.a, full VSOP87; ERFA 0.99760854
	for _, got := range []float64{r, rA} {
		if math.Abs(got-wantR) > 3.5e-8 {
			t.Errorf("Sun R(%v) = %.9f au, want %.8f (Meeus 25.a)", tt, got, wantR)
		}
	}
}

// TestSunPlaceMeeus25a checks the rigorous geocentric apparent place of the
// Sun (PlaceOfBody: light time, relativistic aberration, IAU 2006
// precession with IAU 1980 nutation) at 1992 Oct 13.0 TD against ERFA's
// recomputation of Meeus 25.a in meeus.md: α = 13h13m30.750s,
// δ = −7°47′01.73″, within 0.1″ (the figure).
func TestSunPlaceMeeus25a(t *testing.T) {
	utc, err := astro.TTToUTC(astro.NewJD(2448908.5, astro.TT))
	if err != nil {
		t.Fatal(err)
	}
	pl, err := PlaceOfBody(Sun, utc, Observer{})
	if err != nil {
		t.Fatal(err)
	}
	wantRA := astro.AngleFromHours(13 + 13/60.0 + 30.750/3600)
	wantDec := -astro.AngleFromDegrees(7 + 47/60.0 + 1.73/3600)
	if d := sepArcsec(pl.RAApp, pl.DecApp, wantRA, wantDec); d > 0.1 {
		t.Errorf("PlaceOfBody(Sun, %v): apparent %s %s, want 13h13m30.750s −7°47′01.73″ (Δ %.3f″; ERFA via meeus.md)",
			utc, astro.FormatHMS(pl.RAApp, 3), astro.FormatDMS(pl.DecApp, 2), d)
	} else {
		t.Logf("Sun apparent place vs ERFA (Meeus 25.a instant): Δ %.3f″", d)
	}
	if math.Abs(pl.DeltaAU-0.99760853) > 3.5e-8+1e-8 { // light time moves R by ~1e-8 au
		t.Errorf("PlaceOfBody(Sun): DeltaAU = %.9f, want 0.99760853 (Meeus 25.a)", pl.DeltaAU)
	}
}
