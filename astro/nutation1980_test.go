package astro

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func dms(d, m, s float64) Angle { return AngleFromDegrees(d + m/60 + s/3600) }

// Meeus, Astronomical Algorithms, 2nd ed., Example 22.a (p. 148):
// 1987 April 10, 0h TD = JDE 2446895.5.
func TestNutation1980Meeus22a(t *testing.T) {
	tt := NewJD(2446895.5, TT)
	dpsi, deps := Nutation1980(tt)
	eps0 := MeanObliquity1980(tt)
	tests := []struct {
		name string
		got  Angle
		want Angle
		tol  Angle
		src  string
	}{
		// The book prints 0.001″; tolerance one unit of the last place.
		{"dpsi", dpsi, -3.788 * Arcsecond, 0.001 * Arcsecond, "Meeus 22.a: Δψ = −3.788″"},
		{"deps", deps, 9.443 * Arcsecond, 0.001 * Arcsecond, "Meeus 22.a: Δε = +9.443″"},
		{"eps0", eps0, dms(23, 26, 27.407), 0.001 * Arcsecond, "Meeus 22.a: ε0 = 23°26′27.407″"},
		{"eps", eps0 + deps, dms(23, 26, 36.850), 0.001 * Arcsecond, "Meeus 22.a: ε = 23°26′36.850″"},
		// TrueObliquity uses the IAU 2006 mean obliquity, smaller than IAU 1980's
		// by 0.042″ + 0.0218″·T (difference of eq. 22.2 and IERS 2010 eq. 5.40;
		// T = −0.127 here): 0.039″ below Meeus' ε, to his 0.001″.
		{"TrueObliquity", TrueObliquity(tt), dms(23, 26, 36.850) - 0.0392*Arcsecond, 0.0011 * Arcsecond, "Meeus 22.a ε minus the IAU 1980/2006 obliquity difference"},
	}
	for _, c := range tests {
		if d := c.got - c.want; math.Abs(float64(d)) > float64(c.tol) {
			t.Errorf("Nutation1980(%v): %s = %.12g rad, want %.12g (Δ %.3g mas) [%s]", tt, c.name, c.got, c.want, d.Milliarcseconds(), c.src)
		}
	}
}

func TestParseNutation1980(t *testing.T) {
	terms, err := parseNutation1980(nutation1980Data)
	if err != nil {
		t.Fatalf("embedded series: %v", err)
	}
	// The leading term is 18.6-year Ω term, −17.1996″ and +9.2025″
	// (Meeus Table 22.A, first row).
	if k := terms[0]; k.om != 1 || k.psi0 != -171996 || k.eps0 != 92025 {
		t.Errorf("first term = %+v, want the Ω term −171996, 92025", k)
	}
	for _, c := range []struct{ name, text string }{
		{"short line", "# c\n0 0 0 0 1 -171996 -174.2 92025\n"},
		{"bad number", "0 0 0 0 1 -171996 -174.2 92025 x\n"},
		{"too few terms", strings.Repeat("0 0 0 0 1 1 0 1 0\n", 105)},
	} {
		if _, err := parseNutation1980(c.text); err == nil {
			t.Errorf("%s: parseNutation1980 gave no error", c.name)
		} else if !strings.HasPrefix(err.Error(), "astro: ") {
			t.Errorf("%s: error %q lacks the package prefix", c.name, err)
		}
	}
	var ne interface{ Unwrap() error }
	_, err = parseNutation1980("0 0 0 0 1 -171996 -174.2 92025 x\n")
	if !errors.As(err, &ne) {
		t.Errorf("bad number: error %v does not wrap the strconv error", err)
	}
}

func BenchmarkNutation1980(b *testing.B) {
	b.ReportAllocs()
	tt := NewJD(2461440.5, TT)
	var s Angle
	for b.Loop() {
		dpsi, _ := Nutation1980(tt)
		s += dpsi
	}
	benchSink = float64(s)
}

func BenchmarkBiasPrecessionNutationMatrix(b *testing.B) {
	b.ReportAllocs()
	tt := NewJD(2461440.5, TT)
	var s float64
	for b.Loop() {
		s += BiasPrecessionNutationMatrix(tt)[0][1]
	}
	benchSink = s
}

func BenchmarkApparentPlace(b *testing.B) {
	b.ReportAllocs()
	tt := NewJD(2461440.5, TT)
	var s Angle
	for b.Loop() {
		ra, _ := ApparentPlace(1, 0.5, tt)
		s += ra
	}
	benchSink = float64(s)
}

var benchSink float64
