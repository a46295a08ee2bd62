package ephem

import (
	"math"
	"testing"

	"arcfit/astro"

	"gonum.org/v1/gonum/spatial/r3"
)

// TestMoonIlluminationMeeus48a checks Meeus' example 48.a (p. 347): the
// geocentric Sun α0 = 20.6579°, δ0 = +8.6964°, R = 149971520 km and Moon
// α = 134.6885°, δ = +13.7684°, Δ = 368410 km give ψ = 110.7929°,
// i = 69.0756°, k = 0.6786 (values from /work/shared/checks/meeus.md).
func TestMoonIlluminationMeeus48a(t *testing.T) {
	sunRA, sunDec := astro.AngleFromDegrees(20.6579), astro.AngleFromDegrees(8.6964)
	moonRA, moonDec := astro.AngleFromDegrees(134.6885), astro.AngleFromDegrees(13.7684)
	sun := r3.Scale(149971520, astro.UnitVector(sunRA, sunDec))
	moon := r3.Scale(368410, astro.UnitVector(moonRA, moonDec))
	i, k := MoonIllumination(moon, sun)
	psi := astro.Separation(moonRA, moonDec, sunRA, sunDec)
	tests := []struct {
		name      string
		got, want float64
		tol       float64
		src       string
	}{
		{"elongation ψ (deg)", psi.Degrees(), 110.7929, 1e-4, "Meeus 48.a"},
		{"phase angle i (deg)", i.Degrees(), 69.0756, 1e-4, "Meeus 48.a"},
		{"fraction k", k, 0.6786, 1e-4, "Meeus 48.a"},
	}
	for _, tt := range tests {
		if math.Abs(tt.got-tt.want) > tt.tol {
			t.Errorf("MoonIllumination (48.a) %s = %.6f, want %.4f ± %g (%s)", tt.name, tt.got, tt.want, tt.tol, tt.src)
		}
	}
}

// TestMoonIlluminationERFA checks the phase angle, the fraction and the
// bright-limb angle against ERFA's eraSepp and eraPas for the moon98 Moon and
// the epv00 Sun of testdata/erfa_moon.txt. The formulas are exact, so the
// tolerance is rounding: 1e-9 rad (0.2 mas) in the angles, 1e-9 in k (the table
// prints 12 decimals of a degree, 15 of k). A second check runs our own
// Moon against the table's Sun: the phase angle may then move by the Moon's
// direction error against moon98, 0.05″ (TestMoonERFA), times Δ/|s − m| ≈ 1, plus
// rounding.
func TestMoonIlluminationERFA(t *testing.T) {
	var worstOwn float64
	for _, r := range readErfaMoon(t) {
		i, k := MoonIllumination(r.moon, r.sun)
		wantI := astro.AngleFromDegrees(r.phaseDeg)
		if math.Abs(float64(i-wantI)) > 1e-9 || math.Abs(k-r.fraction) > 1e-9 {
			t.Errorf("MoonIllumination(%v) = %.12f°, %.12f, want %.12f°, %.12f (ERFA sepp)", r.tt, i.Degrees(), k, r.phaseDeg, r.fraction)
		}
		mra, mdec, _ := astro.Spherical(r.moon)
		sra, sdec, _ := astro.Spherical(r.sun)
		chi := MoonBrightLimbAngle(mra, mdec, sra, sdec)
		wantChi := astro.AngleFromDegrees(r.limbPADeg)
		if math.Abs(float64((chi - wantChi).Wrapped())) > 1e-9 {
			t.Errorf("MoonBrightLimbAngle(%v) = %.12f°, want %.12f° (ERFA pas)", r.tt, chi.Degrees(), r.limbPADeg)
		}
		own, _ := MoonIllumination(MoonGeocentricICRS(r.tt), r.sun)
		d := math.Abs((own - wantI).Arcseconds())
		worstOwn = math.Max(worstOwn, d)
		if d > 0.06 {
			t.Errorf("MoonIllumination(MoonGeocentricICRS(%v), sun) = %.9f°, want %.9f° (ERFA moon98 + sepp) (Δ %.4f″)", r.tt, own.Degrees(), r.phaseDeg, d)
		}
	}
	t.Logf("phase angle with our Moon against ERFA: worst %.4f″", worstOwn)
}

// TestMoonIlluminationLimits checks the defining limits (common practice):
// the Moon opposite the Sun is full (i = 0, k = 1), between Sun and Earth new
// (i = π, k = 0).
func TestMoonIlluminationLimits(t *testing.T) {
	sun := r3.Vec{X: 1}
	if i, k := MoonIllumination(r3.Vec{X: -0.0026}, sun); math.Abs(float64(i)) > 1e-15 || math.Abs(k-1) > 1e-15 {
		t.Errorf("full: i = %g, k = %g, want 0, 1", i, k)
	}
	if i, k := MoonIllumination(r3.Vec{X: 0.0026}, sun); math.Abs(float64(i)-math.Pi) > 1e-15 || k > 1e-15 {
		t.Errorf("new: i = %g, k = %g, want π, 0", i, k)
	}
}
