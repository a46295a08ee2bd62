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

// erfaFrame is one matrix of ../testdata/erfa_ecliptic_frames.txt (made by
// testdata/gen/erfa_planets.py with python3-erfa 2.0.0.1).
type erfaFrame struct {
	kind string   // ecl2icrs, bias, fk5hip, prec
	tdb  astro.JD // prec only
	m    astro.Mat3
}

func readERFAFrames(t testing.TB) map[string][]erfaFrame {
	t.Helper()
	const path = "../testdata/erfa_ecliptic_frames.txt"
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	out := map[string][]erfaFrame{}
	sc := bufio.NewScanner(f)
	line := 0
	for sc.Scan() {
		line++
		s := sc.Text()
		if s == "" || s[0] == '#' {
			continue
		}
		fs := strings.Fields(s)
		fr := erfaFrame{kind: fs[0]}
		nums := fs[1:]
		if fr.kind == "prec" {
			if len(nums) != 11 {
				t.Fatalf("%s:%d: %d fields", path, line, len(fs))
			}
			day, err1 := strconv.ParseFloat(nums[0], 64)
			frac, err2 := strconv.ParseFloat(nums[1], 64)
			if err1 != nil || err2 != nil {
				t.Fatalf("%s:%d: bad date", path, line)
			}
			fr.tdb = astro.JD{Day: day, Frac: frac, Scale: astro.TDB}
			nums = nums[2:]
		}
		if len(nums) != 9 {
			t.Fatalf("%s:%d: %d matrix elements, want 9", path, line, len(nums))
		}
		for k, n := range nums {
			v, err := strconv.ParseFloat(n, 64)
			if err != nil {
				t.Fatalf("%s:%d: %v", path, line, err)
			}
			fr.m[k/3][k%3] = v
		}
		out[fr.kind] = append(out[fr.kind], fr)
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"ecl2icrs", "bias", "fk5hip", "prec"} {
		if len(out[k]) == 0 {
			t.Fatalf("%s: no %q row", path, k)
		}
	}
	return out
}

// maxDiff returns the largest element difference of two matrices, which for
// rotations near each other is the angle between them in radians.
func maxDiff(a, b astro.Mat3) float64 {
	var d float64
	for i := range 3 {
		for j := range 3 {
			d = math.Max(d, math.Abs(a[i][j]-b[i][j]))
		}
	}
	return d
}

// TestEclipticJ2000ToICRS checks the matrix against ERFA's rx(−obl80(J2000))
// (../testdata/erfa_ecliptic_frames.txt), which fixes both the obliquity
// (84381.448″) and the sign convention of the rotation. Tolerance 1e-15:
// rounding.
func TestEclipticJ2000ToICRS(t *testing.T) {
	want := readERFAFrames(t)["ecl2icrs"][0].m
	if d := maxDiff(EclipticJ2000ToICRS, want); d > 1e-15 {
		t.Errorf("EclipticJ2000ToICRS = %v, want %v (erfa rx(-obl80)) (Δ %.3g)", EclipticJ2000ToICRS, want, d)
	}
	if d := maxDiff(ICRSToEclipticJ2000.Mul(EclipticJ2000ToICRS), astro.Identity3()); d > 1e-15 {
		t.Errorf("ICRSToEclipticJ2000 · EclipticJ2000ToICRS differs from the identity by %.3g", d)
	}
}

// TestVSOP87ToFK5 checks the VSOP87 → FK5 rotation on the FK5 step printed in
// Meeus, Astronomical Algorithms, 2nd ed., example 33.a (as recorded in the
// project's checks file, meeus.md): λ = 313.07689°, β = −2.08489° become
// 313.07686°, −2.08487°. The example's coordinates are of the date 1992 Dec 20,
// where L′ differs from L by 0.1°, which changes the correction by under
// 0.0001″. Tolerance 0.6e-5°: half the last printed digit, plus rounding of
// the input.
func TestVSOP87ToFK5(t *testing.T) {
	lon, lat, _ := astro.Spherical(vsop87ToFK5.MulVec(astro.UnitVector(astro.AngleFromDegrees(313.07689), astro.AngleFromDegrees(-2.08489))))
	if d := math.Abs(lon.Degrees() - 313.07686); d > 0.6e-5 {
		t.Errorf("FK5 correction: λ = %.6f°, want 313.07686° (Meeus ex. 33.a) (Δ %.2g°)", lon.Degrees(), d)
	}
	if d := math.Abs(lat.Degrees() - (-2.08487)); d > 0.6e-5 {
		t.Errorf("FK5 correction: β = %.6f°, want −2.08487° (Meeus ex. 33.a) (Δ %.2g°)", lat.Degrees(), d)
	}
	// The rotation itself against the formula's exact first-order form at a
	// point off the ecliptic: ΔL = −0.09033″ + 0.03916″(cos L + sin L) tan B,
	// ΔB = 0.03916″(cos L − sin L) (Meeus eq. 32.3, T = 0); second-order terms
	// are below 1e-7″.
	l0, b0 := astro.AngleFromDegrees(40), astro.AngleFromDegrees(30)
	l1, b1, _ := astro.Spherical(vsop87ToFK5.MulVec(astro.UnitVector(l0, b0)))
	sl, cl := math.Sincos(float64(l0))
	wantDL := -0.09033 + 0.03916*(cl+sl)*math.Tan(float64(b0))
	wantDB := 0.03916 * (cl - sl)
	if d := math.Abs((l1 - l0).Arcseconds() - wantDL); d > 1e-6 {
		t.Errorf("FK5 correction at (40°, 30°): ΔL = %.7f″, want %.7f″ (Meeus eq. 32.3)", (l1 - l0).Arcseconds(), wantDL)
	}
	if d := math.Abs((b1 - b0).Arcseconds() - wantDB); d > 1e-6 {
		t.Errorf("FK5 correction at (40°, 30°): ΔB = %.7f″, want %.7f″ (Meeus eq. 32.3)", (b1 - b0).Arcseconds(), wantDB)
	}
}

// TestEclipticPrecession1976 checks the ecliptic precession against ERFA's IAU
// 1976 precession carried to the ecliptic, rx(obl80(date))·pmat76(date)·
// rx(−obl80(J2000)) (../testdata/erfa_ecliptic_frames.txt). The two are the
// same IAU 1976 theory (Lieske et al. 1977) in two truncated polynomial forms,
// with coefficients printed to 0.0001″ (η, p, Π's t term) and 0.00001″ (t²):
// within 1900–2100 (|t| ≤ 1) the rounding alone allows about 0.1 mas, and we
// use 0.2 mas. Farther out the polynomials' omitted powers grow as t³…t⁴ and
// there is no published bound; we allow 0.2″ at ±10 centuries, which is our
// own measurement (0.05″ at AD 1000, 0.16″ at AD 3000) rounded up, not a
// published figure.
func TestEclipticPrecession1976(t *testing.T) {
	for _, fr := range readERFAFrames(t)["prec"] {
		got := EclipticPrecession1976(fr.tdb)
		tol := (0.2 * astro.Milliarcsecond).Radians()
		if c := math.Abs(fr.tdb.CenturiesSinceJ2000()); c > 1.01 {
			tol = (0.2 * astro.Arcsecond).Radians()
		}
		d := maxDiff(got, fr.m)
		if d > tol {
			t.Errorf("EclipticPrecession1976(%v): differs from erfa pmat76/obl80 by %.3g rad (%.3g mas), tolerance %.3g rad", fr.tdb, d, d/float64(astro.Milliarcsecond), tol)
		}
		t.Logf("EclipticPrecession1976(%v): Δ %.3g mas from erfa", fr.tdb, d/float64(astro.Milliarcsecond))
	}
}
