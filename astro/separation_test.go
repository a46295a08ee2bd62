package astro

import (
	"math"
	"testing"
)

// hms and dms build angles from the printed fields of a worked example.
func angHMS(h, m, s float64) Angle { return AngleFromHours(h + m/60 + s/3600) }

func angDMS(sign, d, m, s float64) Angle { return AngleFromDegrees(sign * (d + m/60 + s/3600)) }

func TestSeparationMeeus(t *testing.T) {
	tests := []struct {
		name                 string
		ra1, dec1, ra2, dec2 Angle
		want, tol            Angle
		src                  string
	}{
		{"Arcturus–Spica", angHMS(14, 15, 39.7), angDMS(+1, 19, 10, 57), angHMS(13, 25, 11.6), angDMS(-1, 11, 9, 41),
			angDMS(+1, 32, 47, 35), 0.5 * Arcsecond, "Meeus, Astronomical Algorithms 2nd ed., Example 17.a (printed to 1″)"},
		{"p.110 exercise", angHMS(4, 35, 55.2), angDMS(+1, 16, 30, 33), angHMS(16, 29, 24), angDMS(-1, 26, 25, 55),
			angDMS(+1, 169, 58, 0), 0.5 * Arcminute, "Meeus, Astronomical Algorithms 2nd ed., exercise p. 110 (printed to 1′)"},
	}
	for _, tc := range tests {
		got := Separation(tc.ra1, tc.dec1, tc.ra2, tc.dec2)
		if d := math.Abs(float64(got - tc.want)); d > float64(tc.tol) {
			t.Errorf("%s: Separation = %s, want %s (Δ %.3g″; %s)", tc.name, FormatDMS(got, 2), FormatDMS(tc.want, 0), Angle(d).Arcseconds(), tc.src)
		}
		if back := Separation(tc.ra2, tc.dec2, tc.ra1, tc.dec1); math.Abs(float64(back-got)) > 1e-15 {
			t.Errorf("%s: Separation not symmetric: %.17g and %.17g", tc.name, got, back)
		}
	}
}

// Reference values: testdata/erfa_separation.txt, from erfa.seps and erfa.pas
// (python3-erfa 2.0.0.1), generator testdata/gen/erfa_angles.py.
// Tolerances: the separation to 2e-15 rad, a few ulps of π (both are double
// precision evaluations of stable formulas); the position angle to
// 2e-15 rad + 4e-16 rad / sin(separation), since the two components it is
// the direction of are of size sin(separation) and carry rounding errors of
// about 1e-16 whatever their size (the direction to a point near the antipode
// is as ill-determined as the direction to a point near the origin).
func TestSeparationPositionAngleERFA(t *testing.T) {
	rows := angTable(t, "erfa_separation.txt")
	worst := map[string]float64{}
	var worstPA float64
	for _, r := range rows {
		if len(r) != 7 {
			t.Fatalf("erfa_separation.txt: row %v: want 7 fields", r)
		}
		kind := r[0]
		ra1, dec1 := Angle(angFloat(t, r[1])), Angle(angFloat(t, r[2]))
		ra2, dec2 := Angle(angFloat(t, r[3])), Angle(angFloat(t, r[4]))
		wantSep, wantPA := Angle(angFloat(t, r[5])), Angle(angFloat(t, r[6]))
		sep := Separation(ra1, dec1, ra2, dec2)
		d := math.Abs(float64(sep - wantSep))
		worst[kind] = math.Max(worst[kind], d)
		if d > 2e-15 {
			t.Errorf("%s: Separation(%.17g, %.17g, %.17g, %.17g) = %.17g rad, want %.17g (erfa.seps; Δ %.3g rad)",
				kind, ra1, dec1, ra2, dec2, sep, wantSep, d)
		}
		pa := PositionAngle(ra1, dec1, ra2, dec2)
		if pa < 0 || pa >= 2*math.Pi {
			t.Errorf("%s: PositionAngle = %v outside [0, 2π)", kind, pa)
		}
		dp := math.Abs(float64((pa - wantPA).Wrapped()))
		sinSep := math.Sin(float64(wantSep))
		worstPA = math.Max(worstPA, dp*sinSep)
		if tol := 2e-15 + 4e-16/sinSep; dp > tol {
			t.Errorf("%s: PositionAngle(%.17g, %.17g, %.17g, %.17g) = %.17g rad, want %.17g (erfa.pas; Δ %.3g rad, tol %.3g)",
				kind, ra1, dec1, ra2, dec2, pa, wantPA.Normalized(), dp, tol)
		}
	}
	t.Logf("worst separation Δ by kind (rad): %v; worst PA Δ × sin(separation) %.3g rad", worst, worstPA)
}

// Cardinal directions follow from the definition of the position angle (from
// north through east; common practice).
func TestPositionAngleCardinal(t *testing.T) {
	ra, dec := AngleFromHours(6), AngleFromDegrees(20)
	step := Arcsecond
	tests := []struct {
		name      string
		ra2, dec2 Angle
		want      Angle
	}{
		{"north", ra, dec + step, 0},
		{"east", ra + step, dec, 90 * Degree},
		{"south", ra, dec - step, 180 * Degree},
		{"west", ra - step, dec, 270 * Degree},
	}
	for _, tc := range tests {
		got := PositionAngle(ra, dec, tc.ra2, tc.dec2)
		// East and west at the same declination are not quite at 90° and 270°:
		// the great circle leaves towards the pole by Δα sin δ / 2.
		tol := 1e-12 + float64(step)*math.Sin(float64(dec))
		if d := math.Abs(float64((got - tc.want).Wrapped())); d > tol {
			t.Errorf("%s: PositionAngle = %.12g°, want %.12g° (Δ %.3g rad)", tc.name, got.Degrees(), tc.want.Degrees(), d)
		}
	}
	if got := PositionAngle(ra, dec, ra, dec); got != 0 {
		t.Errorf("PositionAngle of coincident points = %v, want 0", got)
	}
	if got := Separation(ra, dec, ra, dec); got != 0 {
		t.Errorf("Separation of coincident points = %v, want 0", got)
	}
	if got := Separation(ra, dec, ra+math.Pi, -dec); math.Abs(float64(got)-math.Pi) > 1e-15 {
		t.Errorf("Separation of antipodes = %.17g, want π", got)
	}
}

var angSink Angle

func BenchmarkSeparation(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		angSink += Separation(1.2, 0.3, 1.25, 0.31)
	}
}

func BenchmarkPositionAngle(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		angSink += PositionAngle(1.2, 0.3, 1.25, 0.31)
	}
}
