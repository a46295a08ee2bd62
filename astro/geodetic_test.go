package astro

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// TestGeocentricParallaxMeeus checks Meeus, Astronomical Algorithms, 2nd ed.,
// example 11.a (shared/checks/meeus.md): φ = +33°21′22″, H = 1706 m on the
// IAU 1976 ellipsoid (a = 6378.14 km, f = 1/298.257) give
// ρ sin φ′ = 0.546861 and ρ cos φ′ = 0.836339; tolerance 1e-6, the printed
// precision.
func TestGeocentricParallaxMeeus(t *testing.T) {
	lat := rotDMS(1, 33, 21, 22)
	rs, rc := GeocentricParallax(IAU1976, lat, 1706)
	tests := []struct {
		name      string
		got, want float64
		tol       float64
		src       string
	}{
		{"ρ sin φ′", rs, 0.546861, 1e-6, "Meeus 11.a"},
		{"ρ cos φ′", rc, 0.836339, 1e-6, "Meeus 11.a"},
	}
	for _, tc := range tests {
		if d := math.Abs(tc.got - tc.want); d > tc.tol {
			t.Errorf("GeocentricParallax(IAU1976, 33°21′22″, 1706 m): %s = %.7f, want %.6f (Δ %.3g) [%s]",
				tc.name, tc.got, tc.want, d, tc.src)
		}
	}
}

// TestGeodeticERFA checks Site.ITRS (WGS84) against erfa.gd2gc and
// GeodeticToCartesian(IAU1976, …) against erfa.gd2gce(6378140, 1/298.257, …)
// (python3-erfa 2.0.0.1, testdata/erfa_geodetic.txt; invented sites incl. the
// poles, ±89°, the date line, 420 m below and 8800 m above the ellipsoid).
// Both are closed formulas in double precision; the tolerance, 1 µm, covers
// their rounding (a few ulp of 6.4e6 m, 1e-9 m) with room, and is far below
// anything that matters to a site position.
func TestGeodeticERFA(t *testing.T) {
	const tolM = 1e-6
	const mPerAU = AUKm * 1000
	worst := 0.0
	for _, r := range rotTable(t, "erfa_geodetic.txt", 9) {
		lon, lat, h := Angle(r[0]), Angle(r[1]), r[2]
		s := Site{Name: "table site", Lat: lat, Lon: lon, HeightM: h}
		cases := []struct {
			name string
			got  r3.Vec
			want r3.Vec
			src  string
		}{
			{"Site.ITRS", s.ITRS(), r3.Vec{X: r[3], Y: r[4], Z: r[5]}, "erfa.gd2gc(1, …)"},
			{"GeodeticToCartesian(IAU1976)", GeodeticToCartesian(IAU1976, lat, lon, h), r3.Vec{X: r[6], Y: r[7], Z: r[8]}, "erfa.gd2gce(6378140, 1/298.257, …)"},
		}
		for _, c := range cases {
			d := r3.Norm(r3.Sub(r3.Scale(mPerAU, c.got), c.want))
			worst = math.Max(worst, d)
			if d > tolM {
				t.Errorf("%s(lat %.12g, lon %.12g, %g m) = %v m, want %v (Δ %.3g m) [%s]",
					c.name, float64(lat), float64(lon), h, r3.Scale(mPerAU, c.got), c.want, d, c.src)
			}
		}
	}
	t.Logf("geodetic → Cartesian vs erfa.gd2gc/gd2gce: worst %.3g m", worst)
}

// TestGeocentricParallaxPoles checks the closed forms at the pole and the
// equator that follow from the ellipsoid's definition (common practice):
// at φ = 90°, height 0, ρ sin φ′ = b/a = 1 − f and ρ cos φ′ = 0; at φ = 0,
// ρ cos φ′ = 1 + H/a and ρ sin φ′ = 0. Tolerance 1e-15 (rounding).
func TestGeocentricParallaxPoles(t *testing.T) {
	rs, rc := GeocentricParallax(WGS84, 90*Degree, 0)
	if math.Abs(rs-(1-WGS84Flattening)) > 1e-15 || math.Abs(rc) > 1e-15 {
		t.Errorf("GeocentricParallax(WGS84, 90°, 0) = (%.17g, %.3g), want (%.17g, 0)", rs, rc, 1-WGS84Flattening)
	}
	rs, rc = GeocentricParallax(WGS84, 0, 1000)
	if want := 1 + 1/WGS84EquatorialRadiusKm; math.Abs(rc-want) > 1e-15 || math.Abs(rs) > 1e-15 {
		t.Errorf("GeocentricParallax(WGS84, 0°, 1000 m) = (%.3g, %.17g), want (0, %.17g)", rs, rc, want)
	}
}
