package astro

import (
	"math"
	"testing"
)

// Meeus, Astronomical Algorithms, 2nd ed., Example 13.a (p. 95): Pollux,
// α2000 = 116.328942°, δ2000 = +28.026183°, ε = 23.4392911° →
// λ = 113.215630°, β = +6.684170°; printed to 1e-6°.
func TestEquatorialToEclipticMeeus13a(t *testing.T) {
	ra, dec := AngleFromDegrees(116.328942), AngleFromDegrees(28.026183)
	eps := AngleFromDegrees(23.4392911)
	lon, lat := EquatorialToEcliptic(ra, dec, eps)
	tol := AngleFromDegrees(1e-6)
	tests := []struct {
		name      string
		got, want Angle
		src       string
	}{
		{"lon", lon, AngleFromDegrees(113.215630), "Meeus 13.a: λ = 113.215630°"},
		{"lat", lat, AngleFromDegrees(6.684170), "Meeus 13.a: β = 6.684170°"},
	}
	for _, c := range tests {
		if d := c.got - c.want; math.Abs(float64(d)) > float64(tol) {
			t.Errorf("EquatorialToEcliptic(%v, %v, %v): %s = %.9f°, want %.9f° (Δ %.3g mas) [%s]", ra, dec, eps, c.name, c.got.Degrees(), c.want.Degrees(), d.Milliarcseconds(), c.src)
		}
	}
	// The inverse (Meeus 13.3–13.4) must give back the book's α, δ to the
	// same 1e-6°.
	ra2, dec2 := EclipticToEquatorial(AngleFromDegrees(113.215630), AngleFromDegrees(6.684170), eps)
	if math.Abs(float64(ra2-ra)) > float64(tol) || math.Abs(float64(dec2-dec)) > float64(tol) {
		t.Errorf("EclipticToEquatorial(113.215630°, 6.684170°) = (%.7f°, %.7f°), want (116.328942°, 28.026183°) [Meeus 13.a]", ra2.Degrees(), dec2.Degrees())
	}
}

func TestEclipticRoundTrip(t *testing.T) {
	eps := MeanObliquity2006(NewJD(J2000, TT))
	for _, c := range []struct{ ra, dec float64 }{{0, 0}, {359.9999, -89.9999}, {180, 89.99999}, {12.3, -45.6}, {271.5, 66.56}} {
		ra, dec := AngleFromDegrees(c.ra), AngleFromDegrees(c.dec)
		lon, lat := EquatorialToEcliptic(ra, dec, eps)
		ra2, dec2 := EclipticToEquatorial(lon, lat, eps)
		// Rotation and its inverse: equal to rounding (1e-9″ is far above 1e-16 rad).
		if d := separation(UnitVector(ra, dec), UnitVector(ra2, dec2)); d > 1e-9*Arcsecond {
			t.Errorf("round trip of (%g°, %g°): off by %.3g µas", c.ra, c.dec, 1e3*d.Milliarcseconds())
		}
	}
	// The north ecliptic pole is at α = 18h, δ = 90° − ε (definition).
	ra, dec := EclipticToEquatorial(0, math.Pi/2, eps)
	if math.Abs(float64(ra-AngleFromHours(18))) > 1e-9 || math.Abs(float64(dec-(math.Pi/2-eps))) > 1e-12 {
		t.Errorf("ecliptic pole at (%v h, %v°), want (18 h, %v°)", ra.Hours(), dec.Degrees(), (math.Pi/2 - eps).Degrees())
	}
}
