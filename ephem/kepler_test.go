package ephem

import (
	"errors"
	"fmt"
	"math"
	"testing"

	"arcfit/astro"
)

func TestSolveKeplerMeeus(t *testing.T) {
	tests := []struct {
		name string
		e    float64
		m    astro.Angle
		want astro.Angle
		tol  astro.Angle
		src  string
	}{
		{"30.a", 0.1, 5 * astro.Degree, 5.554589 * astro.Degree, 1e-6 * astro.Degree,
			"Meeus 2nd ed., Example 30.a p. 196 (printed to 1e-6°)"},
		{"30.b", 0.1, 5 * astro.Degree, 5.554589254 * astro.Degree, 1e-9 * astro.Degree,
			"Meeus 2nd ed., Example 30.b p. 199 (printed to 1e-9°)"},
		{"p.205 e=0.99", 0.99, 0.2, 1.066997365282, 1e-12,
			"Meeus 2nd ed., ch. 30 p. 205, e = 0.99, M = 0.2 rad (printed to 1e-12 rad)"},
	}
	for _, tc := range tests {
		got, err := SolveKepler(tc.e, tc.m)
		if err != nil {
			t.Errorf("%s: SolveKepler(%g, %v): %v", tc.name, tc.e, tc.m, err)
			continue
		}
		if d := math.Abs(float64(got - tc.want)); d > float64(tc.tol) {
			t.Errorf("%s: SolveKepler(%g, %.9g rad) = %.15g rad, want %.15g (Δ %.3g rad; %s)",
				tc.name, tc.e, float64(tc.m), float64(got), float64(tc.want), d, tc.src)
		}
	}
}

// The true anomaly of the p. 205 case: 166.311977°, as printed by the pymeeus
// documentation of that case (meeus.md, row p.205; printed to 1e-6°).
func TestKeplerTrueAnomalyP205(t *testing.T) {
	E, err := SolveKepler(0.99, 0.2)
	if err != nil {
		t.Fatal(err)
	}
	x, y, _, _, err := ellipticPlane(1, 0.99, 0.2, GMSun)
	if err != nil {
		t.Fatal(err)
	}
	nu := astro.Angle(math.Atan2(y, x)).Degrees()
	if d := math.Abs(nu - 166.311977); d > 1e-6 {
		t.Errorf("e = 0.99, M = 0.2: ν = %.9f°, want 166.311977° (Δ %.3g°), E = %.15g", nu, d, float64(E))
	}
}

// Against bisection in the committed generator (testdata/twobody_kepler.csv).
// Tolerance 1e-12 rad: the generator's plain bisection on E − e sin E is
// limited by the rounding of that difference divided by 1 − e cos E, about
// 1e-13 rad in the worst row (e = 0.999999, M = 1e-8).
func TestSolveKeplerReferenceTable(t *testing.T) {
	for _, row := range readTwoBodyTable(t, "twobody_kepler.csv") {
		e, m, want := num(t, row, "e"), num(t, row, "m_rad"), num(t, row, "anomaly_rad")
		var got float64
		var err error
		switch row["kind"] {
		case "elliptic":
			var E astro.Angle
			E, err = SolveKepler(e, astro.Angle(m))
			got = float64(E)
		case "hyperbolic":
			got, err = SolveKeplerHyperbolic(e, m)
		default:
			t.Fatalf("line %s: unknown kind %q", row["line"], row["kind"])
		}
		if err != nil {
			t.Errorf("line %s: %s e = %g, M = %g: %v", row["line"], row["kind"], e, m, err)
			continue
		}
		if d := math.Abs(got - want); d > 1e-12*math.Max(1, math.Abs(want)) {
			t.Errorf("line %s: %s Kepler(e = %.9g, M = %.9g) = %.17g, want %.17g (Δ %.3g rad; twobody_kepler.csv)",
				row["line"], row["kind"], e, m, got, want, d)
		}
	}
}

// Dense grid of e from 0 to 0.999999 and M over a full turn: every solution is
// finite and satisfies Kepler's equation to 1e-14 rad (the round trip
// solve → M; the bound is a few units in the last place of |M| ≤ π, and
// 1e-14 relative to the smallest |E| for small M).
func TestSolveKeplerDenseGrid(t *testing.T) {
	es := []float64{0, 1e-12, 0.001, 0.05}
	for e := 0.1; e < 0.95; e += 0.05 {
		es = append(es, e)
	}
	es = append(es, 0.97, 0.99, 0.995, 0.999, 0.9999, 0.99999, 0.999999, 1-1e-9, 1-1e-15)
	nM := 20000
	if testing.Short() {
		nM = 2000
	}
	var worst float64
	for _, e := range es {
		for k := 0; k <= nM; k++ {
			m := -math.Pi + 2*math.Pi*float64(k)/float64(nM)
			for _, mm := range []float64{m, m * 1e-6, m * 1e-12} {
				E, err := SolveKepler(e, astro.Angle(mm))
				if err != nil || math.IsNaN(float64(E)) {
					t.Fatalf("SolveKepler(%g, %g) = %v, %v", e, mm, E, err)
				}
				back := keplerResidual(e, float64(E), 0)
				d := math.Abs(back - mm)
				tol := 1e-14 * math.Max(math.Abs(float64(E)), 1e-300)
				if math.Abs(mm) > 1e-3 {
					tol = 1e-14
				}
				if d > tol {
					t.Fatalf("SolveKepler(%g, %.17g) = %.17g: E − e sin E = %.17g (Δ %.3g rad)", e, mm, float64(E), back, d)
				}
				worst = math.Max(worst, d)
			}
		}
	}
	t.Logf("largest |E − e sin E − M| on the grid: %.3g rad", worst)
}

// Several revolutions: E keeps the revolution of M (E − e sin E = M to the
// rounding of M, 1e-14 relative).
func TestSolveKeplerRevolutions(t *testing.T) {
	for _, m := range []float64{7, -7, 100.25, -1234.5, 2 * math.Pi, -math.Pi} {
		E, err := SolveKepler(0.6, astro.Angle(m))
		if err != nil {
			t.Fatal(err)
		}
		back := float64(E) - 0.6*math.Sin(float64(E))
		if d := math.Abs(back - m); d > 1e-14*math.Max(1, math.Abs(m)) {
			t.Errorf("SolveKepler(0.6, %g) = %.17g: E − e sin E = %.17g (Δ %.3g)", m, float64(E), back, d)
		}
	}
}

func TestSolveKeplerHyperbolicRoundTrip(t *testing.T) {
	for _, e := range []float64{1 + 1e-12, 1 + 1e-6, 1.001, 1.05, 1.5, 3, 10, 1000} {
		for _, m := range []float64{1e-9, 1e-4, 0.3, 1, 5, 50, 1e4, 1e8, -2.5} {
			H, err := SolveKeplerHyperbolic(e, m)
			if err != nil || math.IsNaN(H) {
				t.Fatalf("SolveKeplerHyperbolic(%g, %g) = %v, %v", e, m, H, err)
			}
			back := (e-1)*H + e*sinhMinusX(H)
			if d := math.Abs(back - m); d > 1e-14*math.Abs(m) {
				t.Errorf("SolveKeplerHyperbolic(%g, %g) = %.17g: e sinh H − H = %.17g (Δ %.3g)", e, m, H, back, d)
			}
		}
	}
}

func TestSolveKeplerBadInput(t *testing.T) {
	for _, c := range []struct{ e, m float64 }{{-0.1, 1}, {1, 1}, {1.5, 1}, {math.NaN(), 1}, {0.5, math.NaN()}, {0.5, math.Inf(1)}} {
		E, err := SolveKepler(c.e, astro.Angle(c.m))
		if err == nil || !errors.Is(err, astro.ErrRange) {
			t.Errorf("SolveKepler(%g, %g) = %v, %v; want an error wrapping ErrRange", c.e, c.m, E, err)
		}
	}
	for _, c := range []struct{ e, m float64 }{{1, 1}, {0.5, 1}, {math.NaN(), 1}, {math.Inf(1), 1}, {2, math.NaN()}, {2, math.Inf(-1)}} {
		H, err := SolveKeplerHyperbolic(c.e, c.m)
		if err == nil || !errors.Is(err, astro.ErrRange) {
			t.Errorf("SolveKeplerHyperbolic(%g, %g) = %v, %v; want an error wrapping ErrRange", c.e, c.m, H, err)
		}
	}
}

func TestXMinusSinSeries(t *testing.T) {
	// Against the direct differences where they have no cancellation (|x| near 1),
	// and the leading Taylor term x³/6 for tiny x (both common practice).
	for _, x := range []float64{0.999, -0.7, 0.5} {
		if d := math.Abs(xMinusSin(x) - (x - math.Sin(x))); d > 1e-15 {
			t.Errorf("xMinusSin(%g) Δ %.3g from x − sin x", x, d)
		}
		if d := math.Abs(sinhMinusX(x) - (math.Sinh(x) - x)); d > 1e-15 {
			t.Errorf("sinhMinusX(%g) Δ %.3g from sinh x − x", x, d)
		}
	}
	for _, x := range []float64{1e-5, -3e-7} {
		want := x * x * x / 6
		if d := math.Abs(xMinusSin(x)/want - 1); d > 1e-9 {
			t.Errorf("xMinusSin(%g) = %g, want ≈ x³/6 = %g", x, xMinusSin(x), want)
		}
	}
}

var sinkTwoBodyAngle astro.Angle

func BenchmarkSolveKepler(b *testing.B) {
	for _, e := range []float64{0.1, 0.99} {
		b.Run(fmt.Sprintf("e=%g", e), func(b *testing.B) {
			b.ReportAllocs()
			m := 0.0
			for i := 0; b.Loop(); i++ {
				m = -3 + 6*float64(i%1000)/1000
				E, _ := SolveKepler(e, astro.Angle(m))
				sinkTwoBodyAngle = E
			}
		})
	}
}
