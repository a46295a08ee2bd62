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

// meeus47a is the instant of Meeus' example 47.a, 1992 April 12.0 TD
// (Astronomical Algorithms, 2nd ed., p. 342; /work/shared/checks/meeus.md).
var meeus47a = astro.NewJD(2448724.5, astro.TT)

// TestMoon47TableCounts checks the generated tables against the book's term
// counts: 60 rows each in Tables 47.A and 47.B (from memory), 3 additive terms
// in Σl and 6 in Σb (Meeus p. 338, from memory).
func TestMoon47TableCounts(t *testing.T) {
	if len(moon47LonDist) != 60 || len(moon47Lat) != 60 {
		t.Errorf("tables hold %d and %d rows, want 60 and 60", len(moon47LonDist), len(moon47Lat))
	}
	if len(moon47AddLon) != 3 || len(moon47AddLat) != 6 {
		t.Errorf("additive terms %d and %d, want 3 and 6", len(moon47AddLon), len(moon47AddLat))
	}
}

// TestMoonMeeus47a checks the intermediate quantities and the result of
// Meeus' example 47.a (p. 342), values as printed in the book.
func TestMoonMeeus47a(t *testing.T) {
	tc := meeus47a.CenturiesSinceJ2000()
	if math.Abs(tc-(-0.077221081451)) > 1e-12 { // Meeus 47.a: T = −0.077221081451
		t.Fatalf("T = %.12f, want -0.077221081451", tc)
	}
	p := moon47Evaluate(tc)
	deg := func(r float64) float64 { return astro.Angle(r).Normalized().Degrees() }
	tests := []struct {
		name      string
		got, want float64
		tol       float64
		src       string
	}{
		{"L′ (deg)", deg(p.lp), 134.290182, 1e-6, "Meeus 47.a"},
		{"D (deg)", deg(p.d), 113.842304, 1e-6, "Meeus 47.a"},
		{"M (deg)", deg(p.m), 97.643514, 1e-6, "Meeus 47.a"},
		{"M′ (deg)", deg(p.mp), 5.150833, 1e-6, "Meeus 47.a"},
		{"F (deg)", deg(p.f), 219.889721, 1e-6, "Meeus 47.a"},
		{"A1 (deg)", deg(p.a[0]), 109.57, 0.005, "Meeus 47.a (printed to 0.01°)"},
		{"A2 (deg)", deg(p.a[1]), 123.78, 0.005, "Meeus 47.a (printed to 0.01°)"},
		{"A3 (deg)", deg(p.a[2]), 229.53, 0.005, "Meeus 47.a (printed to 0.01°)"},
		{"E", p.e, 1.000194, 5e-7, "Meeus 47.a"},
		{"Σl (1e-6 deg)", p.sl, -1127527, 0.5, "Meeus 47.a (integer)"},
		{"Σb (1e-6 deg)", p.sb, -3229126, 0.5, "Meeus 47.a (integer)"},
		{"Σr (1e-3 km)", p.sr, -16590875, 0.5, "Meeus 47.a (integer)"},
	}
	for _, tt := range tests {
		if math.Abs(tt.got-tt.want) > tt.tol {
			t.Errorf("Meeus 47.a %s = %.9g, want %.9g ± %g (%s)", tt.name, tt.got, tt.want, tt.tol, tt.src)
		}
	}

	lon, lat, dist := moonMeeus47(tc)
	appLon, appLat, appDist := MoonApparentEclipticOfDate(meeus47a)
	dpsi, deps := astro.Nutation1980(meeus47a)
	eps := astro.MeanObliquity1980(meeus47a) + deps
	ra, dec := astro.EclipticToEquatorial(appLon, appLat, eps)
	res := []struct {
		name      string
		got, want float64
		tol       float64
		src       string
	}{
		{"λ (deg)", lon.Degrees(), 133.162655, 1e-6, "Meeus 47.a"},
		{"β (deg)", lat.Degrees(), -3.229126, 1e-6, "Meeus 47.a"},
		{"Δ (km)", dist, 368409.7, 0.05, "Meeus 47.a (printed to 0.1 km)"},
		{"π (deg)", MoonHorizontalParallax(dist).Degrees(), 0.991990, 1e-6, "Meeus 47.a"},
		{"Δψ (arcsec)", dpsi.Arcseconds(), 16.595, 0.0005, "Meeus 47.a"},
		{"apparent λ (deg)", appLon.Degrees(), 133.167265, 1e-6, "Meeus 47.a"},
		{"apparent β (deg)", appLat.Degrees(), -3.229126, 1e-6, "Meeus 47.a"},
		{"apparent Δ (km)", appDist, 368409.7, 0.05, "Meeus 47.a"},
		{"ε (deg)", eps.Degrees(), 23.440636, 1e-6, "Meeus 47.a"},
		{"α (deg)", ra.Degrees(), 134.688470, 2e-6, "Meeus 47.a"},
		{"δ (deg)", dec.Degrees(), 13.768368, 2e-6, "Meeus 47.a"},
	}
	for _, tt := range res {
		if math.Abs(tt.got-tt.want) > tt.tol {
			t.Errorf("Moon(%v) %s = %.9g, want %.9g ± %g (%s)", meeus47a, tt.name, tt.got, tt.want, tt.tol, tt.src)
		}
	}

	// The geometric longitude exceeds Meeus' by the light-time term, 0.705″
	// (derived in moon.go); Meeus p. 338 quotes −0.70″ for it (from memory).
	geo, _, _ := MoonEclipticOfDate(meeus47a)
	if d := (geo - lon).Wrapped().Arcseconds(); math.Abs(d-0.70) > 0.01 {
		t.Errorf("MoonEclipticOfDate − Meeus λ = %.4f″, want 0.70″ ± 0.01″ (Meeus p. 338, from memory)", d)
	}
}

// erfaMoonRow is one row of testdata/erfa_moon.txt (see its header).
type erfaMoonRow struct {
	tt                   astro.JD
	moon, sun            r3.Vec
	lonDeg, latDeg, dist float64
	phaseDeg, fraction   float64
	limbPADeg            float64
}

func readErfaMoon(t testing.TB) []erfaMoonRow {
	const path = "../testdata/erfa_moon.txt"
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var rows []erfaMoonRow
	sc := bufio.NewScanner(f)
	line := 0
	for sc.Scan() {
		line++
		s := strings.TrimSpace(sc.Text())
		if s == "" || strings.HasPrefix(s, "#") {
			continue
		}
		fs := strings.Fields(s)
		if len(fs) != 14 {
			t.Fatalf("%s:%d: %d fields, want 14", path, line, len(fs))
		}
		v := make([]float64, len(fs))
		for i, x := range fs {
			if v[i], err = strconv.ParseFloat(x, 64); err != nil {
				t.Fatalf("%s:%d: %v", path, line, err)
			}
		}
		rows = append(rows, erfaMoonRow{
			tt:   astro.JD{Day: v[0], Frac: v[1], Scale: astro.TT},
			moon: r3.Vec{X: v[2], Y: v[3], Z: v[4]}, lonDeg: v[5], latDeg: v[6], dist: v[7],
			sun: r3.Vec{X: v[8], Y: v[9], Z: v[10]}, phaseDeg: v[11], fraction: v[12], limbPADeg: v[13],
		})
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	if len(rows) < 100 {
		t.Fatalf("%s: %d rows, want 300", path, len(rows))
	}
	return rows
}

// TestMoonERFA compares the geometric Moon with ERFA's moon98, which is the
// same Meeus ch. 47 series without the light-time term of L′ (eraMoon98 notes
// 2 and 7), rotated to the GCRS with the IAU 2006 precession; the reference
// λ, β are its vectors turned to the ecliptic of date with eraEcm06
// (testdata/erfa_moon.txt, by testdata/gen/erfa_moon.py).
//
// Tolerances: the series are the same, so only the two ways of removing the
// light time from L′ may differ (ours: mean motion × mean light time, 0.705″;
// moon98's constant, which lies 0.74″ from Meeus' in example 47.a per
// /work/shared/checks/meeus.md) — 0.05″ allowed in λ and in the direction;
// 1 mas in β, which has no light-time term; 1 m in distance.
func TestMoonERFA(t *testing.T) {
	var worstLon, worstLat, worstDist, worstDir, worstVec float64
	for _, r := range readErfaMoon(t) {
		lon, lat, dist := MoonEclipticOfDate(r.tt)
		dLon := (lon - astro.AngleFromDegrees(r.lonDeg)).Wrapped().Arcseconds()
		dLat := (lat - astro.AngleFromDegrees(r.latDeg)).Arcseconds()
		dDist := (dist - r.dist) * 1000
		v := MoonGeocentricICRS(r.tt)
		dDir := astro.Angle(math.Atan2(r3.Norm(r3.Cross(v, r.moon)), r3.Dot(v, r.moon))).Arcseconds()
		dVec := (r3.Norm(v) - r3.Norm(r.moon)) * astro.AUKm * 1000
		worstLon = math.Max(worstLon, math.Abs(dLon))
		worstLat = math.Max(worstLat, math.Abs(dLat))
		worstDist = math.Max(worstDist, math.Abs(dDist))
		worstDir = math.Max(worstDir, dDir)
		worstVec = math.Max(worstVec, math.Abs(dVec))
		if math.Abs(dLon) > 0.05 || math.Abs(dLat) > 0.001 || math.Abs(dDist) > 1 {
			t.Errorf("MoonEclipticOfDate(%v) = (%.9f°, %.9f°, %.4f km), want (%.9f°, %.9f°, %.4f km) (ERFA moon98) (Δ %.4f″, %.4f″, %.3f m)",
				r.tt, lon.Degrees(), lat.Degrees(), dist, r.lonDeg, r.latDeg, r.dist, dLon, dLat, dDist)
		}
		if dDir > 0.05 || math.Abs(dVec) > 1 {
			t.Errorf("MoonGeocentricICRS(%v) = %v, want %v (ERFA moon98) (Δ %.4f″, %.3f m)", r.tt, v, r.moon, dDir, dVec)
		}
	}
	t.Logf("worst against ERFA moon98: Δλ %.4f″, Δβ %.5f″, Δr %.4f m; ICRS direction %.4f″, |r| %.4f m",
		worstLon, worstLat, worstDist, worstDir, worstVec)
}

func BenchmarkMoonGeocentricICRS(b *testing.B) {
	b.ReportAllocs()
	tt := meeus47a
	var sink r3.Vec
	for i := 0; b.Loop(); i++ {
		sink = MoonGeocentricICRS(tt.AddDays(float64(i%1000) * 0.37))
	}
	_ = sink
}

func BenchmarkMoonEclipticOfDate(b *testing.B) {
	b.ReportAllocs()
	var sink astro.Angle
	for i := 0; b.Loop(); i++ {
		sink, _, _ = MoonEclipticOfDate(meeus47a.AddDays(float64(i%1000) * 0.37))
	}
	_ = sink
}
