package astro

import (
	"bufio"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"
)

// rotTable reads one of the whitespace-separated reference tables written by
// testdata/gen/erfa_rotation.py: '#' lines are the provenance header, every
// other line has ncols floats.
func rotTable(t *testing.T, name string, ncols int) [][]float64 {
	t.Helper()
	path := "../testdata/" + name
	f, err := os.Open(path)
	if err != nil {
		t.Fatalf("reference table: %v", err)
	}
	defer f.Close()
	var rows [][]float64
	sc := bufio.NewScanner(f)
	line := 0
	for sc.Scan() {
		line++
		s := strings.TrimSpace(sc.Text())
		if s == "" || s[0] == '#' {
			continue
		}
		fs := strings.Fields(s)
		if len(fs) != ncols {
			t.Fatalf("%s:%d: %d fields, want %d", path, line, len(fs), ncols)
		}
		row := make([]float64, ncols)
		for i, x := range fs {
			if row[i], err = strconv.ParseFloat(x, 64); err != nil {
				t.Fatalf("%s:%d: %v", path, line, err)
			}
		}
		rows = append(rows, row)
	}
	if err := sc.Err(); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	if len(rows) == 0 {
		t.Fatalf("%s: no rows", path)
	}
	return rows
}

// rotUlp returns the spacing of float64 values at x.
func rotUlp(x float64) float64 {
	x = math.Abs(x)
	return math.Nextafter(x, math.Inf(1)) - x
}

// rotAngleDiff returns a − b reduced to (−π, π], in radians.
func rotAngleDiff(a, b Angle) float64 { return float64((a - b).Wrapped()) }

// sidereal table columns (testdata/erfa_sidereal.txt).
const (
	sidUT1Day = iota
	sidUT1Frac
	sidTTDay
	sidTTFrac
	sidERA
	sidGMST06
	sidGMST82
	sidEqEq94
	sidGST06A
	sidGST94
	sidEE06A
	sidNCols
)

func sidDates(r []float64) (ut1, tt JD) {
	return JD{Day: r[sidUT1Day], Frac: r[sidUT1Frac], Scale: UT1},
		JD{Day: r[sidTTDay], Frac: r[sidTTFrac], Scale: TT}
}

// TestEarthRotationAngleERFA checks EarthRotationAngle against erfa.era00
// (python3-erfa 2.0.0.1, testdata/erfa_sidereal.txt, 1900–2100). Both evaluate
// IERS Conventions (2010) eq. 5.15 in double precision, so they must agree to
// rounding: the tolerance, 1 µas (4.8e-12 rad), is some 10⁴ times the
// resolution of a two-part date (6e-16 rev ≈ 4e-15 rad) times the growth of
// rounding over 73000 days of θ.
func TestEarthRotationAngleERFA(t *testing.T) {
	const tol = 1 * float64(Milliarcsecond) / 1000
	worst := 0.0
	for _, r := range rotTable(t, "erfa_sidereal.txt", sidNCols) {
		ut1, _ := sidDates(r)
		got := EarthRotationAngle(ut1)
		want := Angle(r[sidERA])
		d := math.Abs(rotAngleDiff(got, want))
		worst = math.Max(worst, d)
		if d > tol || got < 0 || got >= 2*math.Pi {
			t.Errorf("EarthRotationAngle(%v) = %.15g rad, want %.15g (Δ %.3g µas) [erfa.era00]",
				ut1, float64(got), float64(want), d/float64(Milliarcsecond)*1000)
		}
	}
	t.Logf("EarthRotationAngle vs erfa.era00, 1900–2100: worst %.3g µas", worst/float64(Milliarcsecond)*1000)
}

// TestEarthRotationAngleSplit moves the same instant between the two parts
// of the date (whole date in Day; Day at J2000.0; half a day shifted) and
// checks each against erfa.era00 from testdata/erfa_sidereal.txt, so that a
// loss of the date's resolution in one split shows. A single float64 date
// resolves 40 µs of time (0.6 mas), a Frac of 27000 days 0.4 µs: each split
// is allowed 1 µas plus the rounding of its own input, one ulp of the part
// that carries the date.
func TestEarthRotationAngleSplit(t *testing.T) {
	const tol = 1 * float64(Milliarcsecond) / 1000
	for i, r := range rotTable(t, "erfa_sidereal.txt", sidNCols) {
		if i%20 != 0 {
			continue
		}
		d, f := r[sidUT1Day], r[sidUT1Frac]
		want := Angle(r[sidERA])
		splits := []struct {
			name string
			jd   JD
			tol  float64
		}{
			{"Day+0.5,Frac-0.5", JD{Day: d + 0.5, Frac: f - 0.5, Scale: UT1}, tol},
			{"J2000,rest", JD{Day: J2000, Frac: (d - J2000) + f, Scale: UT1}, tol + rotUlp((d-J2000)+f)*EarthRotationRadPerDay},
			{"one float", JD{Day: d + f, Frac: 0, Scale: UT1}, tol + rotUlp(d+f)*EarthRotationRadPerDay},
		}
		for _, s := range splits {
			got := EarthRotationAngle(s.jd)
			if diff := math.Abs(rotAngleDiff(got, want)); diff > s.tol {
				t.Errorf("EarthRotationAngle(%v, split %s) = %.15g rad, want %.15g (Δ %.3g µas) [erfa.era00]",
					s.jd, s.name, float64(got), float64(want), diff/float64(Milliarcsecond)*1000)
			}
		}
	}
}

// TestEarthRotationRate checks the rate constant against the nominal
// angular velocity of the Earth, ω = 7292115 × 10⁻¹¹ rad/s, of WGS84 (NIMA
// TR8350.2, 2000) and the IERS Conventions (2010) table 1.1 (value from
// memory). It is given to 7 digits: tolerance half a unit of the last,
// 5e-12 rad/s.
func TestEarthRotationRate(t *testing.T) {
	got := EarthRotationRadPerDay / SecondsPerDay
	const want, tol = 7292115e-11, 5e-12 // rad/s, WGS84 / IERS 2010 (from memory)
	if math.Abs(got-want) > tol {
		t.Errorf("EarthRotationRadPerDay/86400 = %.12g rad/s, want %.12g", got, want)
	}
}

func BenchmarkEarthRotationAngle(b *testing.B) {
	b.ReportAllocs()
	jd := JD{Day: 2461440.5, Frac: 0.38478, Scale: UT1}
	var sink Angle
	for i := 0; i < b.N; i++ {
		sink += EarthRotationAngle(jd)
	}
	_ = sink
}
