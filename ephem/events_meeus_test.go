package ephem

import (
	"math"
	"testing"

	"arcfit/astro"
)

// dms and hms build angles for the check values below.
func dms(d, m, s float64) astro.Angle { return astro.AngleFromDegrees(d + m/60 + s/3600) }
func hms(h, m, s float64) astro.Angle { return astro.AngleFromHours(h + m/60 + s/3600) }

// TestRiseTransitSetMeeus15a checks Meeus' example 15.a (Astronomical
// Algorithms, 2nd ed., p. 103; values from /work/shared/checks/meeus.md):
// Venus at Boston, φ = +42°20′, L = 71°05′ W, 1988 March 20, θ0 =
// 11h50m58.10s, α and δ at 0h TD on March 19, 20, 21, h0 = −0.5667°,
// ΔT = 56 s. The book gives m = 0.81980 (transit), 0.51766 (rise) and
// 0.12130 (set); the checks file states 2e-5 d (about 2 s) as their
// precision.
func TestRiseTransitSetMeeus15a(t *testing.T) {
	lat := dms(42, 20, 0)
	lon := -dms(71, 5, 0)
	theta0 := hms(11, 50, 58.10)
	ra := [3]astro.Angle{hms(2, 42, 43.25), hms(2, 46, 55.51), hms(2, 51, 7.69)}
	dec := [3]astro.Angle{dms(18, 2, 51.4), dms(18, 26, 27.3), dms(18, 49, 38.7)}
	got, err := RiseTransitSetMeeus(lat, lon, theta0, ra, dec, StarRiseAltitude, 56)
	if err != nil {
		t.Fatal(err)
	}
	if got.Visibility != RisesAndSets {
		t.Fatalf("RiseTransitSetMeeus(15.a): visibility %v, want rises and sets", got.Visibility)
	}
	tests := []struct {
		name      string
		got, want float64
		tol       float64
		src       string
	}{
		{"transit", got.Transit, 0.81980, 2e-5, "Meeus 15.a"},
		{"rise", got.Rise, 0.51766, 2e-5, "Meeus 15.a"},
		{"set", got.Set, 0.12130, 2e-5, "Meeus 15.a"},
	}
	for _, tt := range tests {
		d := tt.got - tt.want
		t.Logf("15.a %s: m = %.6f (Δ %.2f s from %s; %d iterations)", tt.name, tt.got, d*86400, tt.src, got.Iterations)
		if math.Abs(d) > tt.tol {
			t.Errorf("RiseTransitSetMeeus(15.a): m %s = %.6f, want %.5f (Δ %.3g d, %s)", tt.name, tt.got, tt.want, d, tt.src)
		}
	}
}

// TestRiseTransitSetMeeusVisibility checks the polar cases by geometry (common
// practice): seen from latitude φ a star of declination δ > 90° − φ never sets
// and one with δ < −(90° − φ) never rises (here with margins of 10° over
// h0). Also the wrap of right ascension across 0h (Meeus, p. 30): a body at
// 23h58m, 0h02m, 0h06m must transit as the same motion 1h later in RA does,
// shifted by the time the sky takes to turn by that hour.
func TestRiseTransitSetMeeusVisibility(t *testing.T) {
	lat := dms(42, 20, 0)
	theta0 := hms(11, 50, 58.10)
	for _, tt := range []struct {
		decDeg float64
		want   Visibility
	}{{57.7 + 2, AlwaysAbove}, {-57.7 - 2, AlwaysBelow}, {80, AlwaysAbove}, {-80, AlwaysBelow}, {0, RisesAndSets}} {
		d := astro.AngleFromDegrees(tt.decDeg)
		r := [3]astro.Angle{hms(6, 0, 0), hms(6, 0, 0), hms(6, 0, 0)}
		got, err := RiseTransitSetMeeus(lat, 0, theta0, r, [3]astro.Angle{d, d, d}, StarRiseAltitude, 69)
		if err != nil {
			t.Fatal(err)
		}
		if got.Visibility != tt.want {
			t.Errorf("RiseTransitSetMeeus(δ = %g°, φ = 42.33°): %v, want %v", tt.decDeg, got.Visibility, tt.want)
		}
		if tt.want != RisesAndSets && !math.IsNaN(got.Rise) {
			t.Errorf("RiseTransitSetMeeus(δ = %g°): rise %g, want NaN", tt.decDeg, got.Rise)
		}
	}
	dec := [3]astro.Angle{dms(1, 0, 0), dms(1, 20, 0), dms(1, 40, 0)}
	wrapped, err := RiseTransitSetMeeus(lat, 0, theta0, [3]astro.Angle{hms(23, 58, 0), hms(0, 2, 0), hms(0, 6, 0)}, dec, StarRiseAltitude, 69)
	if err != nil {
		t.Fatal(err)
	}
	// The same motion shifted by +1h of RA. The body moves 4 min of RA
	// (1°) per day, the sky 360.985647° per day (Meeus, p. 103), so the
	// converged transit comes later by 15°/(360.985647° − 1°) of a day.
	shifted, err := RiseTransitSetMeeus(lat, 0, theta0, [3]astro.Angle{hms(0, 58, 0), hms(1, 2, 0), hms(1, 6, 0)}, dec, StarRiseAltitude, 69)
	if err != nil {
		t.Fatal(err)
	}
	want := 15 / (360.985647 - 1)
	if d := shifted.Transit - wrapped.Transit; math.Abs(d-want) > 2e-5 {
		t.Errorf("RiseTransitSetMeeus across 0h: transit difference %.6f d, want %.6f (Δ %.2f s)", d, want, (d-want)*86400)
	}
	if _, err := RiseTransitSetMeeus(math.Pi/2, 0, theta0, dec, dec, StarRiseAltitude, 69); err == nil {
		t.Error("RiseTransitSetMeeus at the pole: no error")
	}
	if _, err := RiseTransitSetMeeus(lat, astro.Angle(math.NaN()), theta0, dec, dec, StarRiseAltitude, 69); err == nil {
		t.Error("RiseTransitSetMeeus with a NaN longitude: no error")
	}
}

func BenchmarkRiseTransitSetMeeus(b *testing.B) {
	b.ReportAllocs()
	lat, lon, theta0 := dms(42, 20, 0), -dms(71, 5, 0), hms(11, 50, 58.10)
	ra := [3]astro.Angle{hms(2, 42, 43.25), hms(2, 46, 55.51), hms(2, 51, 7.69)}
	dec := [3]astro.Angle{dms(18, 2, 51.4), dms(18, 26, 27.3), dms(18, 49, 38.7)}
	var sink float64
	for b.Loop() {
		r, _ := RiseTransitSetMeeus(lat, lon, theta0, ra, dec, StarRiseAltitude, 56)
		sink += r.Rise
	}
	_ = sink
}
