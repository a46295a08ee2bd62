package astro

import (
	"math"
	"testing"
)

// Unit relations are definitions (common practice): 180° = π rad, 1 h of
// right ascension = 15°, 1° = 60′ = 3600″, 1″ = 1000 mas.
func TestAngleConversions(t *testing.T) {
	tests := []struct {
		name      string
		got, want float64
	}{
		{"180° in radians", AngleFromDegrees(180).Radians(), math.Pi},
		{"π in degrees", Angle(math.Pi).Degrees(), 180},
		{"6h in degrees", AngleFromHours(6).Degrees(), 90},
		{"90° in hours", (90 * Degree).Hours(), 6},
		{"1° in arcminutes", Degree.Arcminutes(), 60},
		{"1° in arcseconds", Degree.Arcseconds(), 3600},
		{"1″ in mas", Arcsecond.Milliarcseconds(), 1000},
		{"3600″ in degrees", AngleFromArcseconds(3600).Degrees(), 1},
		{"1 s of time in arcseconds", TimeSecond.Arcseconds(), 15},
	}
	for _, tc := range tests {
		if d := math.Abs(tc.got - tc.want); d > 4e-16*math.Abs(tc.want) {
			t.Errorf("%s = %.17g, want %.17g (Δ %.3g)", tc.name, tc.got, tc.want, d)
		}
	}
}

func TestAngleNormalizedWrapped(t *testing.T) {
	tests := []struct {
		name       string
		in         Angle
		norm, wrap Angle
		tol        float64
	}{
		{"zero", 0, 0, 0, 0},
		{"one turn", 2 * math.Pi, 0, 0, 0},
		{"minus a quarter", -math.Pi / 2, 3 * math.Pi / 2, -math.Pi / 2, 1e-15},
		{"π stays π", math.Pi, math.Pi, math.Pi, 0},
		{"−π wraps to π", -math.Pi, math.Pi, math.Pi, 0},
		{"tiny negative", -1e-18, 0, 0, 1e-17},
		{"many turns", 1000*2*math.Pi + 1, 1, 1, 1e-12},
		{"many negative turns", -1000*2*math.Pi - 1, 2*math.Pi - 1, -1, 1e-12},
	}
	for _, tc := range tests {
		n, w := tc.in.Normalized(), tc.in.Wrapped()
		if n < 0 || n >= 2*math.Pi || math.Abs(float64(n-tc.norm)) > tc.tol {
			t.Errorf("%s: (%.17g).Normalized() = %.17g, want %.17g", tc.name, tc.in, n, tc.norm)
		}
		if w <= -math.Pi || w > math.Pi || math.Abs(float64(w-tc.wrap)) > tc.tol {
			t.Errorf("%s: (%.17g).Wrapped() = %.17g, want %.17g", tc.name, tc.in, w, tc.wrap)
		}
	}
	for _, x := range []float64{math.NaN(), math.Inf(1), math.Inf(-1)} {
		if n := Angle(x).Normalized(); !math.IsNaN(float64(n)) {
			t.Errorf("(%v).Normalized() = %v, want NaN", x, n)
		}
		if w := Angle(x).Wrapped(); !math.IsNaN(float64(w)) {
			t.Errorf("(%v).Wrapped() = %v, want NaN", x, w)
		}
	}
}
