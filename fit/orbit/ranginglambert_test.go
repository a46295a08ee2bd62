package orbit

import (
	"math"
	"testing"

	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// Curtis, Orbital Mechanics for Engineering Students (2005), Example 5.2
// (from memory): r1 = (5000, 10 000, 2100) km, r2 = (−14 600, 2500, 7000) km,
// Δt = 1 h about the Earth (μ = 398 600 km³/s²) give
// v1 = (−5.9925, 1.9254, 3.2456) km/s and v2 = (−3.3125, −4.1966, −0.38529)
// km/s, printed to five significant digits: tolerance 1e-4 km/s.
func TestLambertCurtisExample(t *testing.T) {
	r1 := r3.Vec{X: 5000, Y: 10000, Z: 2100}
	r2 := r3.Vec{X: -14600, Y: 2500, Z: 7000}
	v1, v2, ok := rgLambert(r1, r2, 3600, 398600)
	if !ok {
		t.Fatal("rgLambert failed")
	}
	want1 := r3.Vec{X: -5.9925, Y: 1.9254, Z: 3.2456}
	want2 := r3.Vec{X: -3.3125, Y: -4.1966, Z: -0.38529}
	if d := r3.Norm(r3.Sub(v1, want1)); d > 1e-4 {
		t.Errorf("v1 = %v, want %v (Δ %.2g km/s)", v1, want1, d)
	}
	if d := r3.Norm(r3.Sub(v2, want2)); d > 1e-4 {
		t.Errorf("v2 = %v, want %v (Δ %.2g km/s)", v2, want2, d)
	}
}

// The velocity found must carry the body from r1 to r2 in dt: checked by
// ephem.PropagateUniversal (itself checked against Meeus' and Danby's worked
// examples in package ephem), for heliocentric arcs like those of ranging —
// short (a fraction of a degree), long (150°), prograde, retrograde, and a
// hyperbolic transfer. Tolerance: 1e-11 au, about a hundred times the
// propagator's stated 1e-13 au.
func TestLambertRoundTrip(t *testing.T) {
	cases := []struct {
		name   string
		r1, r2 r3.Vec
		dt     float64
	}{
		{"main belt, 1 day", r3.Vec{X: 2.5, Y: 0.1, Z: 0.2}, r3.Vec{X: 2.495, Y: 0.111, Z: 0.205}, 1},
		{"main belt, 40 days", r3.Vec{X: 2.5, Y: 0.1, Z: 0.2}, r3.Vec{X: 2.3, Y: 0.9, Z: 0.3}, 40},
		{"NEO, 2 days", r3.Vec{X: 1.02, Y: 0.05, Z: 0.01}, r3.Vec{X: 1.0, Y: 0.09, Z: 0.015}, 2},
		{"retrograde", r3.Vec{X: 1.5, Y: 0, Z: 0}, r3.Vec{X: 1.49, Y: -0.1, Z: 0.02}, 5},
		{"150 degrees", r3.Vec{X: 1, Y: 0, Z: 0}, r3.Vec{X: -1.3, Y: 0.75, Z: 0.1}, 200},
		{"hyperbolic", r3.Vec{X: 1, Y: 0, Z: 0}, r3.Vec{X: 0.9, Y: 0.5, Z: 0}, 5},
	}
	for _, c := range cases {
		v1, v2, ok := rgLambert(c.r1, c.r2, c.dt, ephem.GMSun)
		if !ok {
			t.Errorf("%s: rgLambert failed", c.name)
			continue
		}
		p, v, err := ephem.PropagateUniversal(c.r1, v1, c.dt, ephem.GMSun)
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if d := r3.Norm(r3.Sub(p, c.r2)); d > 1e-11 {
			t.Errorf("%s: propagated end misses r2 by %.3g au", c.name, d)
		}
		if d := r3.Norm(r3.Sub(v, v2)); d > 1e-11 {
			t.Errorf("%s: end velocity differs by %.3g au/day", c.name, d)
		}
	}
}

func TestLambertDegenerate(t *testing.T) {
	r := r3.Vec{X: 1}
	for _, c := range []struct {
		name   string
		r1, r2 r3.Vec
		dt     float64
	}{
		{"opposite", r, r3.Vec{X: -2}, 10},
		{"zero dt", r, r3.Vec{Y: 1}, 0},
		{"negative dt", r, r3.Vec{Y: 1}, -3},
		{"NaN", r, r3.Vec{Y: math.NaN()}, 3},
		{"zero vector", r3.Vec{}, r, 3},
	} {
		v1, v2, ok := rgLambert(c.r1, c.r2, c.dt, ephem.GMSun)
		if ok {
			t.Errorf("%s: ok with v1 = %v, v2 = %v", c.name, v1, v2)
		}
	}
}

// The derivative of the time equation against a central difference of the
// function itself (step 1e-6 in z: truncation ~1e-12 relative, rounding
// ~1e-10 relative for these magnitudes; tolerance 1e-7 relative), on both
// sides of the series/closed-form switch at |z| = 0.01, for an ellipse
// (z > 0) and a hyperbola (z < 0).
func TestLambertDerivative(t *testing.T) {
	const n1, n2, A, target = 2.5, 2.49, 3.5, 0.02
	for _, z := range []float64{-30, -1, -0.0101, -0.0099, 0, 0.0099, 0.0101, 1, 20, 39} {
		_, fp := rgLambertF(z, n1, n2, A, target)
		h := 1e-6
		fa, _ := rgLambertF(z+h, n1, n2, A, target)
		fb, _ := rgLambertF(z-h, n1, n2, A, target)
		num := (fa - fb) / (2 * h)
		if math.Abs(fp-num) > 1e-7*math.Abs(num) {
			t.Errorf("z = %g: F′ = %.12g, central difference %.12g", z, fp, num)
		}
	}
}
