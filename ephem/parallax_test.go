package ephem

import (
	"math"
	"testing"

	"arcfit/astro"
)

// meeus40aSite returns a WGS84 site at the geocentric position of Meeus'
// example 40.a (Palomar: ρ sin φ′ = 0.546861, ρ cos φ′ = 0.836339 in units of
// the IAU 1976 equatorial radius 6378.14 km, L = 7h47m27s west; the book's
// inputs), found by inverting the geodetic-to-Cartesian relation.
func meeus40aSite(t *testing.T) astro.Site {
	aKm := astro.IAU1976.EquatorialRadiusKm
	p, z := 0.836339*aKm, 0.546861*aKm // km
	a, f := astro.WGS84EquatorialRadiusKm, astro.WGS84Flattening
	e2 := f * (2 - f)
	lat := math.Atan2(z, p)
	var h float64
	for range 20 {
		n := a / math.Sqrt(1-e2*math.Sin(lat)*math.Sin(lat))
		h = p/math.Cos(lat) - n
		lat = math.Atan2(z, p*(1-e2*n/(n+h)))
	}
	s := astro.Site{Name: "Meeus 40.a", Lat: astro.Angle(lat), Lon: -astro.AngleFromHours(7 + 47.0/60 + 27.0/3600), HeightM: h * 1000}
	r := s.ITRS()
	if d := math.Hypot(math.Hypot(r.X, r.Y)*astro.AUKm-p, r.Z*astro.AUKm-z); d > 1e-6 {
		t.Fatalf("site inversion off by %g km", d)
	}
	return s
}

// TestTopocentricMeeus40a checks Meeus' example 40.a (p. 280): Mars on 2003
// Aug 28 3h17m00s UT, geocentric apparent α = 339.530208°, δ = −15.771083°,
// Δ = 0.37276 AU, seen from the example's site, gives α′ = 22h38m08.54s,
// δ′ = −15°46′30.0″ (values and tolerances 0.01 s / 0.1″ from
// /work/shared/checks/meeus.md). TT = UT + ΔT with ΔT from astro.DeltaT; the
// sidereal time's dependence on it is far below the tolerance.
func TestTopocentricMeeus40a(t *testing.T) {
	site := meeus40aSite(t)
	ut1, err := astro.DateTimeToJD(2003, 8, 28, 3, 17, 0, astro.UT1)
	if err != nil {
		t.Fatal(err)
	}
	dt, _ := astro.DeltaT(2003.66)
	tt := astro.UT1ToTTDeltaT(ut1, dt)
	ra, dec := astro.AngleFromDegrees(339.530208), astro.AngleFromDegrees(-15.771083)
	const dist = 0.37276
	wantRA := astro.AngleFromHours(22 + 38.0/60 + 8.54/3600)
	wantDec := -astro.AngleFromDegrees(15 + 46.0/60 + 30.0/3600)
	check := func(name string, gotRA, gotDec astro.Angle) {
		dRA := (gotRA - wantRA).Wrapped() / astro.TimeSecond
		dDec := (gotDec - wantDec).Arcseconds()
		if math.Abs(float64(dRA)) > 0.01 || math.Abs(dDec) > 0.1 {
			t.Errorf("%s(40.a) = %s, %s, want 22h38m08.54s, −15°46′30.0″ (Meeus 40.a) (Δ %.4f s, %.3f″)",
				name, astro.FormatHMS(gotRA, 3), astro.FormatDMS(gotDec, 2), float64(dRA), dDec)
		}
	}
	raT, decT := TopocentricCorrectionOfDate(ra, dec, dist, site, ut1, tt)
	check("TopocentricCorrectionOfDate", raT, decT)

	// The same through the ICRS: the apparent direction to GCRS axes with the
	// transpose of the bias-precession-nutation matrix, corrected there, and back.
	npb := astro.BiasPrecessionNutationMatrix(tt)
	gra, gdec, _ := astro.Spherical(npb.T().MulVec(astro.UnitVector(ra, dec)))
	ira, idec := TopocentricCorrection(gra, gdec, dist, site, ut1, tt)
	bra, bdec, _ := astro.Spherical(npb.MulVec(astro.UnitVector(ira, idec)))
	check("TopocentricCorrection", bra.Normalized(), bdec)
}

// TestTopocentricDegenerate checks that a distance inside the Earth, zero,
// negative or not finite gives NaN rather than a direction.
func TestTopocentricDegenerate(t *testing.T) {
	s := astro.Site{Lat: 0.7, Lon: 0.2, HeightM: 100}
	j := astro.NewJD(2461000.5, astro.TT)
	for _, d := range []float64{0, -1, 1e-5, math.NaN(), math.Inf(1)} {
		ra, dec := TopocentricCorrection(1, 0.2, d, s, j, j)
		if !math.IsNaN(float64(ra)) || !math.IsNaN(float64(dec)) {
			t.Errorf("TopocentricCorrection(dist %g) = %v, %v, want NaN", d, ra, dec)
		}
	}
	// Far away the correction vanishes: at 1e9 au the site moves the direction
	// by under 1e-13 rad (geometry, common practice).
	ra, dec := TopocentricCorrection(1, 0.2, 1e9, s, j, j)
	if math.Abs(float64(ra-1)) > 1e-13 || math.Abs(float64(dec-0.2)) > 1e-13 {
		t.Errorf("far body moved to %v, %v", ra, dec)
	}
}

func BenchmarkTopocentricCorrection(b *testing.B) {
	b.ReportAllocs()
	s := astro.Site{Lat: 0.7, Lon: 0.2, HeightM: 100}
	j := astro.NewJD(2461000.5, astro.TT)
	var sink astro.Angle
	for b.Loop() {
		sink, _ = TopocentricCorrection(1, 0.2, 0.0025, s, j, j)
	}
	_ = sink
}
