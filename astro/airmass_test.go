package astro

import (
	"math"
	"testing"
)

// Values of Kasten & Young (1989), Applied Optics 28, 4735, recalled from
// memory: the formula gives 0.9997 at the zenith and 37.92 at the horizon;
// the paper's table, computed for the ISO standard atmosphere, gives 38.0868
// at the horizon, which the formula approximates within 0.5 %.
func TestAirmassKastenYoungDefining(t *testing.T) {
	tests := []struct {
		name string
		alt  Angle
		want float64
		tol  float64
		src  string
	}{
		{"zenith", 90 * Degree, 0.9997, 0.00005, "Kasten & Young 1989, formula at z = 0 (from memory, 4 decimals)"},
		{"horizon", 0, 37.92, 0.005, "Kasten & Young 1989, formula at z = 90° (from memory, 2 decimals)"},
		{"horizon, table", 0, 38.0868, 0.005 * 38.0868, "Kasten & Young 1989, table value at z = 90° (from memory); formula within 0.5 %"},
	}
	for _, tc := range tests {
		got := AirmassKastenYoung(tc.alt)
		if d := math.Abs(got - tc.want); d > tc.tol {
			t.Errorf("AirmassKastenYoung(%s) = %.5f, want %.5f (Δ %.3g; %s)", tc.name, got, tc.want, d, tc.src)
		}
	}
}

// A physical cross-check: the air mass of a homogeneous spherical atmosphere,
// X = √((r cos z)² + 2r + 1) − r cos z with r = R⊕/H (Schoenberg 1929, the
// closed form recalled from memory), for R⊕ = 6371 km and the height of the
// homogeneous atmosphere H = 8.43 km (common practice). It neglects refraction
// and the real density profile; both effects grow as tan² z and stay below
// 0.1 % up to z = 60°, which sets the tolerance there.
func TestAirmassKastenYoungHomogeneous(t *testing.T) {
	r := 6371 / 8.43
	var worst float64
	for z := 0.0; z <= 60; z += 1 {
		c := math.Cos(z * math.Pi / 180)
		want := math.Sqrt(r*c*r*c+2*r+1) - r*c
		got := AirmassKastenYoung(AngleFromDegrees(90 - z))
		d := math.Abs(got/want - 1)
		worst = math.Max(worst, d)
		if d > 1e-3 {
			t.Errorf("AirmassKastenYoung(z = %g°) = %.5f, homogeneous atmosphere %.5f (Δ %.3g)", z, got, want, d)
		}
	}
	t.Logf("worst relative Δ from the homogeneous atmosphere, z ≤ 60°: %.3g", worst)
}

// Documented behaviour: decreasing with altitude up to 89° (within a degree of
// the zenith the formula is flat to 1e-8 and has a shallow minimum, a property
// of its form: d(sin h)/dh vanishes there), +Inf below the horizon,
// symmetric about the zenith, NaN only for NaN.
func TestAirmassKastenYoungDomain(t *testing.T) {
	prev := math.Inf(1)
	for h := 0.0; h <= 89; h += 0.01 {
		x := AirmassKastenYoung(AngleFromDegrees(h))
		if !(x < prev) || x < 0.99 {
			t.Fatalf("AirmassKastenYoung(%.2f°) = %v, not decreasing from %v", h, x, prev)
		}
		prev = x
	}
	for _, h := range []float64{-0.001, -5, -90, -1e300} {
		if x := AirmassKastenYoung(AngleFromDegrees(h)); !math.IsInf(x, 1) {
			t.Errorf("AirmassKastenYoung(%g°) = %v, want +Inf", h, x)
		}
	}
	if a, b := AirmassKastenYoung(100*Degree), AirmassKastenYoung(80*Degree); math.Abs(a-b) > 1e-12 {
		t.Errorf("AirmassKastenYoung(100°) = %v, want the 80° value %v", a, b)
	}
	if x := AirmassKastenYoung(Angle(math.Inf(1))); math.IsNaN(x) {
		t.Errorf("AirmassKastenYoung(+Inf) = NaN")
	}
	if x := AirmassKastenYoung(Angle(math.NaN())); !math.IsNaN(x) {
		t.Errorf("AirmassKastenYoung(NaN) = %v, want NaN", x)
	}
}

func BenchmarkAirmassKastenYoung(b *testing.B) {
	b.ReportAllocs()
	var sink float64
	for b.Loop() {
		sink += AirmassKastenYoung(0.5)
	}
	_ = sink
}
