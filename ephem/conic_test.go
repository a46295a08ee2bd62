package ephem

import (
	"errors"
	"math"
	"testing"

	"arcfit/astro"
	"gonum.org/v1/gonum/spatial/r3"
)

func TestParabolicMotionMeeus34a(t *testing.T) {
	// Meeus 2nd ed., Example 34.a p. 243: q = 1.487469 au, t − T = 112.5642 d;
	// ν = 66.78862°, r = 2.133911 au (printed to 1e-5°, 1e-6 au).
	nu, r, err := ParabolicMotion(1.487469, 112.5642)
	if err != nil {
		t.Fatal(err)
	}
	if d := math.Abs(nu.Degrees() - 66.78862); d > 1e-5 {
		t.Errorf("ParabolicMotion(34.a): ν = %.9f°, want 66.78862° (Δ %.3g°)", nu.Degrees(), d)
	}
	if d := math.Abs(r - 2.133911); d > 1e-6 {
		t.Errorf("ParabolicMotion(34.a): r = %.9f au, want 2.133911 (Δ %.3g au)", r, d)
	}
}

func TestNearParabolicMotionMeeus35(t *testing.T) {
	// Meeus 2nd ed., ch. 35, the test cases of p. 247 (printed to 1e-5°, 1e-6 au).
	tests := []struct {
		q, e, dt float64
		nuDeg, r float64
	}{
		{0.921326, 1, 138.4783, 102.74426, 2.364192},
		{0.1, 0.987, 254.9, 164.50029, 4.063777},
		{0.123456, 0.99997, -30.47, 221.91190, 0.965053},
		{3.363943, 1.05731, 1237.1, 109.40598, 10.668551},
		{0.5871018, 0.9672746, 20, 52.85331, 0.729116},
		{0.5871018, 0.9672746, 0, 0, 0.5871018},
	}
	for _, tc := range tests {
		nu, r, err := NearParabolicMotion(tc.q, tc.e, tc.dt)
		if err != nil {
			t.Errorf("NearParabolicMotion(%g, %g, %g): %v", tc.q, tc.e, tc.dt, err)
			continue
		}
		nd := nu.Normalized().Degrees()
		if d := math.Abs(nd - tc.nuDeg); d > 1e-5 {
			t.Errorf("NearParabolicMotion(%g, %g, %g): ν = %.8f°, want %.5f° (Δ %.3g°; Meeus ch. 35 p. 247)", tc.q, tc.e, tc.dt, nd, tc.nuDeg, d)
		}
		if d := math.Abs(r - tc.r); d > 1e-6 {
			t.Errorf("NearParabolicMotion(%g, %g, %g): r = %.9f au, want %.6f (Δ %.3g au; Meeus ch. 35 p. 247)", tc.q, tc.e, tc.dt, r, tc.r, d)
		}
	}
}

type planeFunc func(q, e, dt, gm float64) (x, y, vx, vy float64, err error)

func ellipticFromPeri(q, e, dt, gm float64) (x, y, vx, vy float64, err error) {
	a := q / (1 - e)
	return ellipticPlane(a, e, math.Sqrt(gm/a)/a*dt, gm)
}

func parabolicFromPeri(q, _, dt, gm float64) (x, y, vx, vy float64, err error) {
	return parabolicPlane(q, dt, gm)
}

func universalFromPeri(q, e, dt, gm float64) (x, y, vx, vy float64, err error) {
	p, v, err := PropagateUniversal(r3.Vec{X: q}, r3.Vec{Y: math.Sqrt(gm * (1 + e) / q)}, dt, gm)
	return p.X, p.Y, v.X, v.Y, err
}

// The special solutions (elliptic Kepler, Barker, near-parabolic universal
// from perihelion, hyperbolic Kepler) and the general universal propagator
// agree with one another on both sides of every band boundary. The bound,
// 1e-12 au and 1e-14 au/day, is some hundred times the float64 rounding of
// positions of a few au (an internal consistency check between independent
// formulations; the external checks are the Meeus cases and the generator).
func TestConicSolutionsAgree(t *testing.T) {
	const q, gm = 0.8, GMSun
	dts := []float64{-3000, -400, -31.5, -2, 0, 0.75, 12, 150, 1000, 5000}
	type pair struct {
		name string
		es   []float64
		a, b planeFunc
	}
	pairs := []pair{
		{"elliptic/near-parabolic", []float64{0, 0.2, 0.6, 0.9, 0.97, 0.99, 0.995, 0.9999}, ellipticFromPeri, nearParabolicPlane},
		{"hyperbolic/near-parabolic", []float64{1.0001, 1.005, 1.01, 1.05, 1.3, 3}, hyperbolicPlane, nearParabolicPlane},
		{"parabolic/near-parabolic", []float64{1}, parabolicFromPeri, nearParabolicPlane},
		{"near-parabolic/universal", []float64{0, 0.3, 0.97, 0.999, 1, 1.001, 1.3, 5}, nearParabolicPlane, universalFromPeri},
		{"elliptic/universal", []float64{0.2, 0.6, 0.97}, ellipticFromPeri, universalFromPeri},
	}
	var worstP, worstV float64
	for _, p := range pairs {
		for _, e := range p.es {
			for _, dt := range dts {
				x1, y1, vx1, vy1, err1 := p.a(q, e, dt, gm)
				x2, y2, vx2, vy2, err2 := p.b(q, e, dt, gm)
				if err1 != nil || err2 != nil {
					t.Fatalf("%s e = %g dt = %g: %v, %v", p.name, e, dt, err1, err2)
				}
				r := math.Hypot(x1, y1)
				dp := math.Hypot(x1-x2, y1-y2)
				dv := math.Hypot(vx1-vx2, vy1-vy2)
				worstP, worstV = math.Max(worstP, dp/math.Max(1, r)), math.Max(worstV, dv)
				if dp > 1e-12*math.Max(1, r) || dv > 1e-14 {
					t.Errorf("%s: e = %g, t − T = %g d: positions differ by %.3g au (r = %.4g), velocities by %.3g au/d",
						p.name, e, dt, dp, r, dv)
				}
			}
		}
	}
	t.Logf("largest difference: %.3g au (relative to max(1, r)), %.3g au/day", worstP, worstV)
}

func TestConicBadInput(t *testing.T) {
	nan := math.NaN()
	cases := []struct {
		name string
		f    func() (astro.Angle, float64, error)
	}{
		{"parabolic q = 0", func() (astro.Angle, float64, error) { return ParabolicMotion(0, 1) }},
		{"parabolic dt NaN", func() (astro.Angle, float64, error) { return ParabolicMotion(1, nan) }},
		{"near q < 0", func() (astro.Angle, float64, error) { return NearParabolicMotion(-1, 1, 1) }},
		{"near e < 0", func() (astro.Angle, float64, error) { return NearParabolicMotion(1, -0.5, 1) }},
		{"near e NaN", func() (astro.Angle, float64, error) { return NearParabolicMotion(1, nan, 1) }},
		{"hyperbolic e = 0.5", func() (astro.Angle, float64, error) { return HyperbolicMotion(1, 0.5, 1) }},
		{"hyperbolic dt Inf", func() (astro.Angle, float64, error) { return HyperbolicMotion(1, 2, math.Inf(1)) }},
	}
	for _, c := range cases {
		nu, r, err := c.f()
		if err == nil || !errors.Is(err, astro.ErrRange) {
			t.Errorf("%s: got %v, %v, %v; want an error wrapping ErrRange", c.name, nu, r, err)
		}
	}
}

func TestHyperbolicMotionMeeus35Case(t *testing.T) {
	// Meeus ch. 35 p. 247, case 4 (e = 1.05731) through the hyperbolic Kepler
	// equation instead of the near-parabolic route: ν = 109.40598°, r = 10.668551 au.
	nu, r, err := HyperbolicMotion(3.363943, 1.05731, 1237.1)
	if err != nil {
		t.Fatal(err)
	}
	if d := math.Abs(nu.Degrees() - 109.40598); d > 1e-5 {
		t.Errorf("HyperbolicMotion: ν = %.8f°, want 109.40598° (Δ %.3g°)", nu.Degrees(), d)
	}
	if d := math.Abs(r - 10.668551); d > 1e-6 {
		t.Errorf("HyperbolicMotion: r = %.9f au, want 10.668551 (Δ %.3g au)", r, d)
	}
}
