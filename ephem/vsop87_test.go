package ephem

import (
	"bufio"
	"errors"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"

	"arcfit/astro"

	"gonum.org/v1/gonum/spatial/r3"
)

// erfaRow is one line of ../testdata/erfa_planets.txt (made by
// testdata/gen/erfa_planets.py with python3-erfa 2.0.0.1): a body, a two-part
// TDB date and the heliocentric position (au) and velocity (au/day) from
// erfa.epv00 (Earth, ICRS axes) or erfa.plan94 (the others, mean equator and
// equinox J2000).
type erfaRow struct {
	body     Body
	tdb      astro.JD
	pos, vel r3.Vec
}

func readERFAPlanets(t testing.TB) []erfaRow {
	t.Helper()
	const path = "../testdata/erfa_planets.txt"
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var rows []erfaRow
	sc := bufio.NewScanner(f)
	line := 0
	for sc.Scan() {
		line++
		s := sc.Text()
		if s == "" || s[0] == '#' {
			continue
		}
		fs := strings.Fields(s)
		if len(fs) != 9 {
			t.Fatalf("%s:%d: %d fields, want 9", path, line, len(fs))
		}
		b, err := ParseBody(fs[0])
		if err != nil {
			t.Fatalf("%s:%d: %v", path, line, err)
		}
		var v [8]float64
		for i := range v {
			if v[i], err = strconv.ParseFloat(fs[i+1], 64); err != nil {
				t.Fatalf("%s:%d: %v", path, line, err)
			}
		}
		rows = append(rows, erfaRow{
			body: b,
			tdb:  astro.JD{Day: v[0], Frac: v[1], Scale: astro.TDB},
			pos:  r3.Vec{X: v[2], Y: v[3], Z: v[4]},
			vel:  r3.Vec{X: v[5], Y: v[6], Z: v[7]},
		})
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	if len(rows) < 4000 {
		t.Fatalf("%s: %d rows, want 4000", path, len(rows))
	}
	return rows
}

const kmPerAU = astro.AUKm

// TestEarthAgainstEpv00 checks the Earth's heliocentric ICRS position and
// velocity against ERFA's epv00 at 500 TDB dates 1900–2100
// (../testdata/erfa_planets.txt). epv00's own error against DE405 is 11.2 km
// (7.5e-8 au) and 5.0 mm/s at worst over 1900–2100 (eraEpv00 note 4). VSOP87,
// fit to DE200, differs from DE405 by more than that: the tolerances add
// 0.025″ at 1 au (1.2e-7 au) and 10 mm/s for VSOP87 (a figure from our own
// measurement of VSOP87 against epv00, not a published one; no published
// VSOP87-to-DE405 figure was available offline), giving 2e-7 au and 15 mm/s.
// The issue asked for 1e-7 au; see the doc comment of HeliocentricICRS.
func TestEarthAgainstEpv00(t *testing.T) {
	const tolPosAU = 2e-7
	const tolVelAUDay = 15e-6 / kmPerAU * 86400 // 15 mm/s
	frames := readERFAFrames(t)
	alternatives := []struct {
		name string
		m    astro.Mat3
	}{
		{"obliquity only, no VSOP87→FK5 correction", EclipticJ2000ToICRS},
		{"obliquity and IERS frame bias (erfa bp00), no FK5 correction", frames["bias"][0].m.T().Mul(EclipticJ2000ToICRS)},
		{"FK5 correction, obliquity and FK5→ICRS (erfa fk5hip)", frames["fk5hip"][0].m.Mul(vsop87ToICRS)},
	}
	altMax := make([]float64, len(alternatives))
	var maxP, maxV, sumP2 float64
	n := 0
	for _, r := range readERFAPlanets(t) {
		if r.body != Earth {
			continue
		}
		p, v, err := HeliocentricICRS(Earth, r.tdb)
		if err != nil {
			t.Fatalf("HeliocentricICRS(Earth, %v): %v", r.tdb, err)
		}
		dp := r3.Norm(r3.Sub(p, r.pos))
		dv := r3.Norm(r3.Sub(v, r.vel))
		if dp > tolPosAU {
			t.Errorf("HeliocentricICRS(Earth, %v): pos = %v, want %v (epv00) (Δ %.3g au = %.1f km)", r.tdb, p, r.pos, dp, dp*kmPerAU)
		}
		if dv > tolVelAUDay {
			t.Errorf("HeliocentricICRS(Earth, %v): vel = %v, want %v (epv00) (Δ %.3g au/day = %.2f mm/s)", r.tdb, v, r.vel, dv, dv*kmPerAU/86400*1e6)
		}
		maxP, maxV = math.Max(maxP, dp), math.Max(maxV, dv)
		sumP2 += dp * dp
		n++
		pe, _, _ := HeliocentricEclipticJ2000(Earth, r.tdb)
		for k, alt := range alternatives {
			altMax[k] = math.Max(altMax[k], r3.Norm(r3.Sub(alt.m.MulVec(pe), r.pos)))
		}
	}
	t.Logf("Earth vs epv00 1900–2100 (%d dates): max |Δpos| %.3g au (%.1f km), RMS %.3g au; max |Δvel| %.3g au/day (%.2f mm/s)",
		n, maxP, maxP*kmPerAU, math.Sqrt(sumP2/float64(n)), maxV, maxV*kmPerAU/86400*1e6)
	for k, alt := range alternatives {
		t.Logf("  with %s instead: max |Δpos| %.3g au", alt.name, altMax[k])
	}
}

// plan94MaxError is the maximum difference of ERFA's plan94 from JPL DE200 over
// 1800–2100 in heliocentric longitude and latitude (arcsec) and distance (km),
// quoted from the eraPlan94 notes (note 5, last table), as python3-erfa 2.0.0.1
// prints them.
var plan94MaxError = map[Body][3]float64{
	Mercury: {7, 1, 500},
	Venus:   {7, 1, 1100},
	Mars:    {26, 1, 9000},
	Jupiter: {78, 6, 82000},
	Saturn:  {87, 14, 263000},
	Uranus:  {86, 7, 661000},
	Neptune: {11, 2, 248000},
}

// TestPlanetsAgainstPlan94 checks the heliocentric ecliptic longitude,
// latitude and distance of Mercury … Neptune against ERFA's plan94 at 500 TDB
// dates 1900–2100. plan94 is the weaker of the two: the tolerance is its stated
// maximum error (plan94MaxError) plus 1″ (and 1″ × r in distance) for VSOP87,
// whose precision Bretagnon & Francou (1988) give as 1″ or better over this
// span (from memory). plan94's axes are the mean equator and equinox J2000, so
// they are turned to the ecliptic with the obliquity alone; the frame bias
// (0.02″) is far below the tolerance.
func TestPlanetsAgainstPlan94(t *testing.T) {
	toEcl := ICRSToEclipticJ2000
	var worst [Neptune + 1][3]float64
	for _, r := range readERFAPlanets(t) {
		if r.body == Earth {
			continue
		}
		lon, lat, rAU, err := HeliocentricSpherical(r.body, r.tdb)
		if err != nil {
			t.Fatalf("HeliocentricSpherical(%v, %v): %v", r.body, r.tdb, err)
		}
		wl, wb, wr := astro.Spherical(toEcl.MulVec(r.pos))
		tol := plan94MaxError[r.body]
		d := [3]float64{
			math.Abs((lon - wl).Wrapped().Arcseconds()),
			math.Abs((lat - wb).Arcseconds()),
			math.Abs(rAU-wr) * kmPerAU,
		}
		limits := [3]float64{tol[0] + 1, tol[1] + 1, tol[2] + (1*astro.Arcsecond).Radians()*wr*kmPerAU}
		for k, name := range []string{"lon", "lat", "r"} {
			if d[k] > limits[k] {
				t.Errorf("HeliocentricSpherical(%v, %v): %s differs from plan94 by %.3g (tolerance %.3g; arcsec or km)", r.body, r.tdb, name, d[k], limits[k])
			}
			worst[r.body][k] = math.Max(worst[r.body][k], d[k])
		}
	}
	for b := Mercury; b <= Neptune; b++ {
		if b != Earth {
			t.Logf("%-7v vs plan94 1900–2100: max |ΔL| %.2f″, |ΔB| %.2f″, |ΔR| %.0f km", b, worst[b][0], worst[b][1], worst[b][2])
		}
	}
}

// TestVSOP87Truncation compares the truncated series the package uses with the
// full series from the same embedded data, at 500 dates 1900–2100 and at 201
// dates over the whole span J2000 ± 1000 years. The bounds (au) are the
// figures the doc comment of HeliocentricEclipticJ2000 states, rounded up —
// the project's own specification, measured when the thresholds were chosen
// — and every difference must also lie below the rigorous bound, the sum of
// the dropped amplitudes.
func TestVSOP87Truncation(t *testing.T) {
	type bound struct{ century, span float64 }
	stated := map[Body]bound{
		Mercury: {1e-8, 1.5e-8}, Venus: {2.5e-9, 4e-9}, Earth: {3e-8, 3e-8},
		Mars: {5e-10, 7e-9}, Jupiter: {0, 0}, Saturn: {3.5e-7, 4e-7},
		Uranus: {0, 0}, Neptune: {6.5e-7, 8e-7},
	}
	// closest geocentric distances (au), rounded down, common-practice figures
	// (from memory), used only to express the errors as angles.
	closest := map[Body]float64{Mercury: 0.55, Venus: 0.26, Earth: 1, Mars: 0.37,
		Jupiter: 3.9, Saturn: 8.0, Uranus: 17.3, Neptune: 28.8}
	var dates []astro.JD
	for i := range 500 {
		dates = append(dates, astro.NewJD(2415020.5+float64(i)*146.3+0.37*float64(i%7), astro.TDB))
	}
	nCentury := len(dates)
	for i := range 201 {
		dates = append(dates, astro.NewJD(vsop87FirstJD+float64(i)*(vsop87LastJD-vsop87FirstJD)/200, astro.TDB))
	}
	for b := Mercury; b <= Neptune; b++ {
		full, err := loadVSOP87(b, 0)
		if err != nil {
			t.Fatal(err)
		}
		tr, err := vsop87Truncated[b]()
		if err != nil {
			t.Fatal(err)
		}
		rigorous := droppedAmplitudeAU(full, vsop87TruncationAU[b])
		var got bound
		for i, d := range dates {
			tau := d.DaysSinceJ2000() / astro.DaysPerJulianMillennium
			pf, vf := full.cartesian(tau)
			pt, vt := tr.cartesian(tau)
			if tr.terms == full.terms && (pt != pf || vt != vf) {
				t.Errorf("%v at %v: untruncated series differs from the full one", b, d)
			}
			dAU := r3.Norm(r3.Sub(pt, pf))
			if dAU > rigorous {
				t.Errorf("%v at %v: truncation error %.3g au above the sum of dropped amplitudes %.3g au", b, d, dAU, rigorous)
			}
			if i < nCentury {
				got.century = math.Max(got.century, dAU)
			} else {
				got.span = math.Max(got.span, dAU)
			}
		}
		if got.century > stated[b].century || got.span > stated[b].span {
			t.Errorf("%v: truncation error %.3g au (1900–2100), %.3g au (1000–3000), stated %.3g, %.3g",
				b, got.century, got.span, stated[b].century, stated[b].span)
		}
		t.Logf("%-7v %4d of %5d terms; truncation error 1900–2100 %.2g au, 1000–3000 %.2g au (%.2g″ at %.2f au); Σ dropped %.2g au",
			b, tr.terms, full.terms, got.century, got.span, (astro.Angle(got.span / closest[b])).Arcseconds(), closest[b], rigorous)
	}
}

// droppedAmplitudeAU returns Σ|A|·scale over the terms below minAU: with |τ| ≤ 1
// it bounds the error of each coordinate (L, B scaled by the mean distance), and
// √3 times the largest bounds the position error for small angles.
func droppedAmplitudeAU(full *vsop87Series, minAU float64) float64 {
	scale := full.coord[2][0][0].a
	var worst float64
	for k := range 3 {
		sc := scale
		if k == 2 {
			sc = 1
		}
		var s float64
		for _, ts := range full.coord[k] {
			for _, term := range ts {
				if a := math.Abs(term.a) * sc; a < minAU {
					s += a
				}
			}
		}
		worst = math.Max(worst, s)
	}
	return math.Sqrt(3) * worst
}

// TestVSOP87VelocityFiniteDifference checks the analytical velocity against
// the fourth-order central difference of the positions,
// [8(p(t+h) − p(t−h)) − (p(t+2h) − p(t−2h))]/12h with h = 0.05 day, for every
// planet across the span. Its remainder is h⁴/30·|p⁽⁵⁾| ≤ h⁴/30·r n⁵ (common
// practice; Mercury, the fastest, r n⁵ = 7.4e-7 au/day⁵) = 1.5e-13 au/day;
// the rounding of the positions, some 1e-11 au at the span's ends where the
// series' arguments reach 1e6 rad (estimated from float64's 2.2e-16 relative
// precision), is amplified by 1.5/h = 30. Tolerance 1e-9 au/day.
func TestVSOP87VelocityFiniteDifference(t *testing.T) {
	const h = 0.05
	const tol = 1e-9
	pos := func(b Body, d astro.JD) r3.Vec {
		p, _, err := HeliocentricEclipticJ2000(b, d)
		if err != nil {
			t.Fatal(err)
		}
		return p
	}
	for b := Mercury; b <= Neptune; b++ {
		for _, jd := range []float64{2086400.5, 2415020.5, 2451545.0, 2461406.5, 2488069.25, 2816700.5} {
			d := astro.NewJD(jd, astro.TDB)
			_, v, err := HeliocentricEclipticJ2000(b, d)
			if err != nil {
				t.Fatal(err)
			}
			d1 := r3.Sub(pos(b, d.AddDays(h)), pos(b, d.AddDays(-h)))
			d2 := r3.Sub(pos(b, d.AddDays(2*h)), pos(b, d.AddDays(-2*h)))
			fd := r3.Scale(1/(12*h), r3.Sub(r3.Scale(8, d1), d2))
			if dv := r3.Norm(r3.Sub(v, fd)); dv > tol {
				t.Errorf("HeliocentricEclipticJ2000(%v, %v): vel = %v, central difference %v (Δ %.3g au/day)", b, d, v, fd, dv)
			}
		}
	}
}

// TestMeeus32a checks Venus on 1992 December 20.0 TD (JDE 2448976.5) against
// Meeus, Astronomical Algorithms, 2nd ed., example 32.a (p. 219), which gives
// the ecliptic of date from his truncated VSOP87 (appendix III), and against
// the full-series values recorded for the same example in the project's
// checks file (/work/shared/checks/meeus.md). The J2000 series are carried to
// the ecliptic of date with EclipticPrecession1976; R needs no precession.
// Tolerances from the checks file: 2e-4° for the truncated-series values (the
// effect of Meeus' truncation), 2e-5° for the full-series ones; distances to
// the last printed digit plus the truncation (2e-6 au, 1e-6 au).
func TestMeeus32a(t *testing.T) {
	tdb := astro.NewJD(2448976.5, astro.TDB)
	if tau := tdb.DaysSinceJ2000() / astro.DaysPerJulianMillennium; math.Abs(tau-(-0.007032169747)) > 1e-12 {
		t.Errorf("τ = %.12f, want −0.007032169747 (Meeus ex. 32.a)", tau)
	}
	lon, lat, r, err := HeliocentricSpherical(Venus, tdb)
	if err != nil {
		t.Fatal(err)
	}
	ld, bd, _ := astro.Spherical(EclipticPrecession1976(tdb).MulVec(astro.UnitVector(lon, lat)))
	tests := []struct {
		name      string
		got, want float64
		tol       float64
		src       string
	}{
		{"L of date (deg)", ld.Degrees(), 26.11428, 2e-4, "Meeus ex. 32.a, truncated series"},
		{"B of date (deg)", bd.Degrees(), -2.62070, 2e-4, "Meeus ex. 32.a, truncated series"},
		{"R (au)", r, 0.724603, 2e-6, "Meeus ex. 32.a, truncated series"},
		{"L of date (deg)", ld.Degrees(), 26.11412, 2e-5, "checks/meeus.md, ex. 32.a full VSOP87"},
		{"B of date (deg)", bd.Degrees(), -2.62060, 2e-5, "checks/meeus.md, ex. 32.a full VSOP87"},
		{"R (au)", r, 0.724602, 1e-6, "checks/meeus.md, ex. 32.a full VSOP87"},
	}
	for _, tc := range tests {
		if d := math.Abs(tc.got - tc.want); d > tc.tol {
			t.Errorf("Venus %v: %s = %.7f, want %.7f (%s) (Δ %.3g)", tdb, tc.name, tc.got, tc.want, tc.src, d)
		}
	}
	t.Logf("Venus 1992 Dec 20.0 TD, ecliptic of date: L = %.6f°, B = %.6f°, R = %.7f au", ld.Degrees(), bd.Degrees(), r)
}

// TestVSOP87Errors checks the span, the time scale and the bodies: each error
// is one line, the vectors are zero, and the span's ends are inclusive.
func TestVSOP87Errors(t *testing.T) {
	tests := []struct {
		name    string
		b       Body
		tdb     astro.JD
		wantErr error // nil: any non-nil error
		ok      bool
	}{
		{"first day of the span", Mars, astro.NewJD(vsop87FirstJD, astro.TDB), nil, true},
		{"last day of the span", Mars, astro.NewJD(vsop87LastJD, astro.TDB), nil, true},
		{"TT accepted", Earth, astro.NewJD(2461406.5, astro.TT), nil, true},
		{"Sun is the origin", Sun, astro.NewJD(2461406.5, astro.TDB), nil, true},
		{"after the span", Mars, astro.NewJD(vsop87LastJD+0.5, astro.TDB), astro.ErrUnsupportedDate, false},
		{"before the span", Earth, astro.NewJD(vsop87FirstJD-1, astro.TDB), astro.ErrUnsupportedDate, false},
		{"year 4000", Jupiter, astro.NewJD(3182395.5, astro.TDB), astro.ErrUnsupportedDate, false},
		{"NaN date", Venus, astro.JD{Day: math.NaN(), Scale: astro.TDB}, astro.ErrUnsupportedDate, false},
		{"UTC date", Earth, astro.NewJD(2461406.5, astro.UTC), nil, false},
		{"Moon", Moon, astro.NewJD(2461406.5, astro.TDB), ErrNoSeries, false},
		{"no body", Body(0), astro.NewJD(2461406.5, astro.TDB), nil, false},
		{"unknown body", Body(42), astro.NewJD(2461406.5, astro.TDB), nil, false},
	}
	for _, tc := range tests {
		p, v, err := HeliocentricICRS(tc.b, tc.tdb)
		_, _, r, err2 := HeliocentricSpherical(tc.b, tc.tdb)
		if tc.ok {
			if err != nil || err2 != nil {
				t.Errorf("%s: HeliocentricICRS(%v, %v): %v, %v", tc.name, tc.b, tc.tdb, err, err2)
			}
			if tc.b != Sun && (r3.Norm(p) < 0.3 || r3.Norm(v) == 0 || r < 0.3) {
				t.Errorf("%s: HeliocentricICRS(%v, %v) = %v, %v, r %v: not a planet's position", tc.name, tc.b, tc.tdb, p, v, r)
			}
			continue
		}
		for _, e := range []error{err, err2} {
			if e == nil {
				t.Errorf("%s: HeliocentricICRS(%v, %v): no error", tc.name, tc.b, tc.tdb)
				continue
			}
			if tc.wantErr != nil && !errors.Is(e, tc.wantErr) {
				t.Errorf("%s: error %q does not wrap %q", tc.name, e, tc.wantErr)
			}
			if msg := e.Error(); strings.Contains(msg, "\n") || !strings.HasPrefix(msg, "ephem: ") {
				t.Errorf("%s: error %q: want one line starting \"ephem: \"", tc.name, msg)
			}
		}
		if p != (r3.Vec{}) || v != (r3.Vec{}) || r != 0 {
			t.Errorf("%s: values %v, %v, %v returned with the error, want zeros", tc.name, p, v, r)
		}
	}
	_, _, err := HeliocentricEclipticJ2000(Mars, astro.NewJD(vsop87LastJD+0.5, astro.TDB))
	t.Logf("out-of-span error: %v", err)
}

var sinkVec r3.Vec

// BenchmarkEarthPosition times the Earth's heliocentric ICRS position and
// velocity (the truncated series).
func BenchmarkEarthPosition(b *testing.B) {
	b.ReportAllocs()
	d := astro.NewJD(2461406.5, astro.TDB)
	HeliocentricICRS(Earth, d) // load the series outside the timing
	b.ResetTimer()
	for i := 0; b.Loop(); i++ {
		p, _, _ := HeliocentricICRS(Earth, d.AddDays(float64(i&1023)*0.1))
		sinkVec = p
	}
}

// BenchmarkEarthPositionFullSeries times the full, untruncated Earth series,
// for comparison with BenchmarkEarthPosition.
func BenchmarkEarthPositionFullSeries(b *testing.B) {
	b.ReportAllocs()
	s, err := loadVSOP87(Earth, 0)
	if err != nil {
		b.Fatal(err)
	}
	for i := 0; b.Loop(); i++ {
		p, _ := s.cartesian(0.027 + float64(i&1023)*1e-7)
		sinkVec = p
	}
}

// BenchmarkPlanetPosition times each planet's heliocentric ICRS position and
// velocity.
func BenchmarkPlanetPosition(b *testing.B) {
	for pl := Mercury; pl <= Neptune; pl++ {
		b.Run(pl.String(), func(b *testing.B) {
			b.ReportAllocs()
			d := astro.NewJD(2461406.5, astro.TDB)
			HeliocentricICRS(pl, d)
			b.ResetTimer()
			for i := 0; b.Loop(); i++ {
				p, _, _ := HeliocentricICRS(pl, d.AddDays(float64(i&1023)*0.1))
				sinkVec = p
			}
		})
	}
}
