package orbit

import (
	"math"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"
)

// Invented element sets, one inside each class, chosen well away from the
// boundaries that Classify states (common practice, see its doc comment);
// the expected classes follow from those boundaries by hand.
func TestClassify(t *testing.T) {
	ell := func(a, e, iDeg float64) ephem.Elements {
		return ephem.Elements{A: a, E: e, Q: a * (1 - e), I: astro.Angle(iDeg) * astro.Degree}
	}
	peri := func(q, e, iDeg float64) ephem.Elements {
		return ephem.Elements{E: e, Q: q, I: astro.Angle(iDeg) * astro.Degree}
	}
	tests := []struct {
		name      string
		el        ephem.Elements
		want, sub string
		comet     bool
	}{
		{"Apollo", ell(1.8, 0.5, 5), "near-Earth", "Apollo", false},       // q = 0.9 < 1.017, a ≥ 1
		{"Aten", ell(0.9, 0.2, 5), "near-Earth", "Aten", false},           // a < 1, Q = 1.08 ≥ 0.983
		{"Atira", ell(0.7, 0.2, 5), "near-Earth", "Atira", false},         // Q = 0.84 < 0.983
		{"Amor", ell(2.0, 0.4, 5), "near-Earth", "Amor", false},           // q = 1.2
		{"Mars-crosser", ell(2.2, 0.35, 5), "Mars-crosser", "", false},    // q = 1.43
		{"Hungaria", ell(1.9, 0.08, 22), "Hungaria", "", false},           // q = 1.75
		{"inner belt", ell(2.3, 0.1, 5), "main belt", "inner", false},     // q = 2.07
		{"middle belt", ell(2.7, 0.1, 5), "main belt", "middle", false},   // a in 2.5–2.82
		{"outer belt", ell(3.0, 0.1, 5), "main belt", "outer", false},     // T_J = 3.25
		{"Cybele", ell(3.45, 0.08, 4), "outer main belt", "", false},      // T_J = 3.18
		{"Hilda", ell(3.95, 0.15, 8), "Hilda", "", false},                 // T_J = 3.02
		{"trojan", ell(5.2, 0.08, 15), "Jupiter trojan", "", false},       // a in 5.05–5.35
		{"Centaur", ell(12, 0.3, 10), "Centaur", "", false},               // q = 8.4 > 5.2
		{"TNO", ell(43, 0.05, 3), "trans-Neptunian", "", false},           // a > 30.07
		{"JFC", ell(3.5, 0.6, 10), "Jupiter family", "", true},            // T_J = 2.78, P = 6.5 yr
		{"HTC", peri(1.5, 1-1.5/17.0, 60), "Halley type", "", true},       // T_J = 1.05, P = 70 yr
		{"LPC", peri(2, 0.97, 80), "long period", "", true},               // T_J = 0.38, P = 544 yr
		{"near-parabolic", peri(2, 0.99, 40), "near-parabolic", "", true}, // e ≥ 0.98
		{"hyperbolic", peri(1.5, 1.2, 40), "hyperbolic", "", true},        // e > 1
	}
	for _, tc := range tests {
		c := Classify(tc.el)
		if c.Name != tc.want || c.Subclass != tc.sub || c.CometLike != tc.comet {
			t.Errorf("%s: Classify = %q/%q comet-like %v (%s), want %q/%q %v", tc.name, c.Name, c.Subclass, c.CometLike, c.Reason, tc.want, tc.sub, tc.comet)
		}
		if c.Reason == "" || math.IsNaN(c.TisserandJ) || math.IsNaN(c.PeriodYears) {
			t.Errorf("%s: %+v", tc.name, c)
		}
	}
	if s := Classify(ell(1.8, 0.5, 5)).String(); s != "near-Earth (Apollo)" {
		t.Errorf("String() = %q", s)
	}
}

// Tisserand's parameter of Jupiter's own (circular, ecliptic) orbit is 3
// (exact algebra: 1 + 2·1), and the perihelion form used for every conic
// equals the textbook form a_J/a + 2 cos i √((a/a_J)(1 − e²)) (Murray &
// Dermott 1999, eq. 3.43) for an ellipse.
func TestTisserand(t *testing.T) {
	if tj := Tisserand(ephem.Elements{A: jupiterAAU, Q: jupiterAAU}); math.Abs(tj-3) > 1e-15 {
		t.Errorf("T_J(Jupiter) = %.17g, want 3", tj)
	}
	a, e, i := 3.5, 0.6, 10*astro.Degree
	want := jupiterAAU/a + 2*math.Cos(float64(i))*math.Sqrt(a/jupiterAAU*(1-e*e))
	if tj := Tisserand(ephem.Elements{A: a, E: e, I: i}); math.Abs(tj-want) > 1e-14 {
		t.Errorf("T_J = %.15f, want %.15f", tj, want)
	}
}
