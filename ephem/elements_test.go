package ephem

import (
	"errors"
	"math"
	"strings"
	"testing"

	"arcfit/astro"
	"gonum.org/v1/gonum/spatial/r3"
)

// elementsFromRow returns the invented element set of a twobody_states.csv row
// in the perihelion form.
func elementsFromRow(t *testing.T, row map[string]string) Elements {
	return Elements{
		Name: row["name"], E: num(t, row, "e"), Q: num(t, row, "q_au"),
		I:    astro.AngleFromDegrees(num(t, row, "i_deg")),
		Node: astro.AngleFromDegrees(num(t, row, "node_deg")),
		Peri: astro.AngleFromDegrees(num(t, row, "peri_deg")),
		Tp:   astro.NewJD(num(t, row, "tp_tt"), astro.TT),
		H:    math.NaN(), G: math.NaN(),
	}
}

// StateAt against the committed generator (testdata/twobody_states.csv, an
// independent bisection solution cross-checked by RK4 integration to 5e-11 au),
// in the perihelion form and, for ellipses, also in the mean-anomaly form with
// an epoch 100 days after perihelion. Tolerance 1e-10 au, 1e-12 au/day.
func TestStateAtReference(t *testing.T) {
	for _, row := range readTwoBodyTable(t, "twobody_states.csv") {
		el := elementsFromRow(t, row)
		at := astro.NewJD(num(t, row, "t_tt"), astro.TT)
		forms := []Elements{el}
		if el.E < 1 {
			m := el
			a := el.Q / (1 - el.E)
			m.A, m.Q, m.Tp = a, 0, astro.JD{}
			m.Epoch = el.Tp.AddDays(100)
			m.M = astro.Angle(math.Sqrt(GMSun/a) / a * 100)
			forms = append(forms, m)
		}
		wp, wv := rowState(t, row)
		for k, f := range forms {
			p, v, err := f.StateAt(at)
			if err != nil {
				t.Errorf("%s form %d at %v: %v", el.Name, k, at, err)
				continue
			}
			if dp, dv := r3.Norm(r3.Sub(p, wp)), r3.Norm(r3.Sub(v, wv)); dp > 1e-10 || dv > 1e-12 {
				t.Errorf("%s (form %d).StateAt(%.4f): Δpos %.3g au, Δvel %.3g au/d (twobody_states.csv line %s)",
					el.Name, k, at.Float(), dp, dv, row["line"])
			}
		}
	}
}

func TestValidate(t *testing.T) {
	tp := astro.NewJD(2461000.5, astro.TT)
	good := Elements{Name: "Invented-V", A: 2.5, E: 0.2, M: 1, Epoch: tp, I: 0.1}
	tests := []struct {
		name string
		mod  func(*Elements)
		want string // substring of the one-line message; "" for no error
	}{
		{"good ellipse", func(*Elements) {}, ""},
		{"good comet form", func(el *Elements) { el.A, el.Q, el.Tp = 0, 1.1, tp }, ""},
		{"good hyperbola", func(el *Elements) { el.A, el.E, el.Q, el.Tp = 0, 1.2, 1.1, tp }, ""},
		{"e < 0", func(el *Elements) { el.E = -0.1 }, `element set "Invented-V": e = -0.1, want e ≥ 0`},
		{"e NaN", func(el *Elements) { el.E = math.NaN() }, "e = NaN"},
		{"a < 0 ellipse", func(el *Elements) { el.A = -2 }, "a = -2 au, want a > 0 au for an ellipse"},
		{"a = 0, no q", func(el *Elements) { el.A = 0 }, "a = 0 au, want a > 0 au for an ellipse (e = 0.2), or q > 0"},
		{"a NaN", func(el *Elements) { el.A = math.NaN() }, "a = NaN au"},
		{"M NaN", func(el *Elements) { el.M = astro.Angle(math.NaN()) }, "m = NaN"},
		{"epoch UTC", func(el *Elements) { el.Epoch.Scale = astro.UTC }, "want a TT or TDB date"},
		{"q = 0 parabola", func(el *Elements) { el.E, el.Q, el.Tp = 1, 0, tp }, "q = 0 au, want a perihelion distance q > 0 au"},
		{"q < 0 hyperbola", func(el *Elements) { el.E, el.Q, el.Tp = 1.5, -1, tp }, "q = -1 au"},
		{"tp missing", func(el *Elements) { el.E, el.Q = 1.5, 1 }, "tp = "},
		{"i > 180", func(el *Elements) { el.I = 3.5 }, "i = 200.5"},
		{"node Inf", func(el *Elements) { el.Node = astro.Angle(math.Inf(1)) }, "node = +Inf"},
		{"gm < 0", func(el *Elements) { el.GM = -1 }, "gm = -1"},
	}
	for _, tc := range tests {
		el := good
		tc.mod(&el)
		err := el.Validate()
		if tc.want == "" {
			if err != nil {
				t.Errorf("%s: Validate() = %v, want nil", tc.name, err)
			}
			continue
		}
		var ee *ElementError
		if err == nil || !errors.As(err, &ee) || !errors.Is(err, astro.ErrRange) {
			t.Errorf("%s: Validate() = %v, want an *ElementError wrapping ErrRange", tc.name, err)
			continue
		}
		msg := err.Error()
		if !strings.Contains(msg, tc.want) || strings.Contains(msg, "\n") || !strings.HasPrefix(msg, "ephem: ") {
			t.Errorf("%s: Validate() = %q, want one line starting \"ephem: \" containing %q", tc.name, msg, tc.want)
		}
		if p, v, err := el.StateAt(tp); err == nil {
			t.Errorf("%s: StateAt = %v %v with no error", tc.name, p, v)
		}
	}
	if _, _, err := good.StateAt(astro.NewJD(2461000.5, astro.UTC)); err == nil {
		t.Error("StateAt(UTC date): no error, want one (TT or TDB only)")
	}
}

// Elements → state → elements → state: the elements come back (e, q, i, Ω, ω
// and the perihelion time) and the recovered set gives the same state at
// another time, for every conic and for the degenerate orientations.
func TestElementsRoundTrip(t *testing.T) {
	tp := astro.NewJD(2461100.5, astro.TDB)
	for _, e := range []float64{0.2, 0.6, 0.97, 0.999, 1.0, 1.3, 3} {
		for _, inc := range []float64{0.3, 2.2} {
			el := Elements{E: e, Q: 0.9, Tp: tp, I: astro.Angle(inc), Node: 4.1, Peri: 0.7}
			epoch := tp.AddDays(-37.5)
			p, v, err := el.StateAt(epoch)
			if err != nil {
				t.Fatal(err)
			}
			back, err := ElementsFromState(p, v, epoch, GMSun)
			if err != nil {
				t.Fatal(err)
			}
			checks := []struct {
				name      string
				got, want float64
				tol       float64
			}{
				{"e", back.E, e, 1e-13},
				{"q", back.Q, el.Q, 1e-13},
				{"i", float64(back.I), inc, 1e-13},
				{"node", float64((back.Node - el.Node).Wrapped()), 0, 1e-13},
				{"peri", float64((back.Peri - el.Peri).Wrapped()), 0, 1e-11},
				{"tp", tbDays(back.Tp, tp), 0, 1e-8},
			}
			for _, c := range checks {
				if d := math.Abs(c.got - c.want); d > c.tol {
					t.Errorf("e = %g, i = %g: %s = %.15g, want %.15g (Δ %.3g)", e, inc, c.name, c.got, c.want, d)
				}
			}
			later := epoch.AddDays(123.4)
			p1, _, _ := el.StateAt(later)
			p2, _, err := back.StateAt(later)
			if err != nil {
				t.Fatal(err)
			}
			if d := r3.Norm(r3.Sub(p1, p2)); d > 1e-11 {
				t.Errorf("e = %g, i = %g: recovered elements give Δpos %.3g au 123.4 d later", e, inc, d)
			}
		}
	}
	// Circular and equatorial: the state comes back even though ω and Ω are conventions.
	for _, el := range []Elements{
		{E: 0, A: 1.7, M: 2, Epoch: tp, I: 0.2, Node: 1, Peri: 1},
		{E: 0.3, A: 1.7, M: 2, Epoch: tp, I: 0, Node: 1, Peri: 1},
		{E: 0, A: 1.7, M: 2, Epoch: tp, I: 0, Node: 1, Peri: 1},
	} {
		p, v, _ := el.StateAt(tp)
		back, err := ElementsFromState(p, v, tp, GMSun)
		if err != nil {
			t.Fatal(err)
		}
		for _, dt := range []float64{0, 55, -300} {
			p1, _, _ := el.StateAt(tp.AddDays(dt))
			p2, _, err := back.StateAt(tp.AddDays(dt))
			if err != nil || r3.Norm(r3.Sub(p1, p2)) > 1e-12 {
				t.Errorf("e = %g, i = %g: Δpos %.3g au at dt = %g (%v)", el.E, float64(el.I), r3.Norm(r3.Sub(p1, p2)), dt, err)
			}
		}
	}
	if _, err := ElementsFromState(r3.Vec{X: 1}, r3.Vec{X: 0.01}, tp, GMSun); err == nil {
		t.Error("ElementsFromState(radial motion): no error")
	}
	if _, err := ElementsFromState(r3.Vec{X: 1}, r3.Vec{Y: 0.01}, tp, 0); err == nil {
		t.Error("ElementsFromState(gm = 0): no error")
	}
}

// Meeus 2nd ed., Example 33.b (p. 232): the astrometric J2000 place of the
// comet of that example on 1990 Oct 6.0 TD from its printed elements,
// α = 10h34m14.2s, δ = +19°09′31″ (printed to 0.1 s and 1″), elongation 40.51°
// (as printed by the soniakeys/meeus test of that example; meeus.md). The
// Earth's heliocentric position is ERFA epv00 (testdata/twobody_earth.csv);
// Meeus uses VSOP87, the two agree far below the printed precision.
func TestMeeus33b(t *testing.T) {
	earthRow := readTwoBodyTable(t, "twobody_earth.csv")[0]
	earth, _ := rowState(t, earthRow)
	const a, e = 2.2091404, 0.8502196
	el := Elements{
		Name: "Meeus 33.b", E: e, Q: a * (1 - e),
		Tp: astro.NewJD(2448193.04502, astro.TT), // 1990 Oct 28.54502 TD
		I:  astro.AngleFromDegrees(11.94524), Node: astro.AngleFromDegrees(334.75006),
		Peri: astro.AngleFromDegrees(186.23352),
	}
	at := astro.NewJD(2448170.5, astro.TT) // 1990 Oct 6.0 TD
	var rho r3.Vec
	tau := 0.0
	for range 5 { // light time, iterated
		p, _, err := el.StateAt(at.AddDays(-tau))
		if err != nil {
			t.Fatal(err)
		}
		rho = r3.Sub(EclipticJ2000ToICRS.MulVec(p), earth)
		tau = r3.Norm(rho) / astro.SpeedOfLightAUDay
	}
	ra, dec, _ := astro.Spherical(rho)
	t.Logf("33.b: α = %.4f s past 10h34m, δ = %.3f″ past 19°09′, Δ = %.6f au, τ = %.7f d", (ra-astro.AngleFromHours(10+34/60.0)).Hours()*3600, (dec - astro.AngleFromDegrees(19+9/60.0)).Arcseconds(), r3.Norm(rho), tau)
	wantRA := astro.AngleFromHours(10 + 34/60.0 + 14.2/3600)
	wantDec := astro.AngleFromDegrees(19 + 9/60.0 + 31/3600.0)
	if d := (ra - wantRA).Wrapped(); math.Abs(d.Hours()*3600) > 0.1 {
		t.Errorf("33.b: α = %.3f s past 10h34m, want 14.2 s (Δ %.3f s)", (ra-astro.AngleFromHours(10+34/60.0)).Hours()*3600, d.Hours()*3600)
	}
	if d := dec - wantDec; math.Abs(d.Arcseconds()) > 1 {
		t.Errorf("33.b: δ = %.2f″ past 19°09′, want 31″ (Δ %.2f″)", (dec - astro.AngleFromDegrees(19+9/60.0)).Arcseconds(), d.Arcseconds())
	}
	sun := r3.Scale(-1, earth)
	elong := math.Acos(r3.Dot(sun, rho)/(r3.Norm(sun)*r3.Norm(rho))) * 180 / math.Pi
	if d := math.Abs(elong - 40.51); d > 0.01 {
		t.Errorf("33.b: elongation %.4f°, want 40.51° (Δ %.3g°)", elong, d)
	}
}

// Meeus 2nd ed., Example 33.c (p. 238), the vis-viva speeds of the orbit of
// that example (a = 17.9400782 au, e = 0.96727426): 41.53 km/s at r = 1 au,
// 54.52 km/s at perihelion, 0.91 km/s at aphelion (printed to 0.01 km/s),
// here from the velocity of StateAt.
func TestMeeus33cSpeeds(t *testing.T) {
	const a, e = 17.9400782, 0.96727426
	epoch := astro.NewJD(2446470.5, astro.TT)
	eAt1 := math.Acos((1 - 1/a) / e) // r = a(1 − e cos E) = 1 au
	tests := []struct {
		name string
		m    float64
		want float64
	}{
		{"perihelion", 0, 54.52},
		{"aphelion", math.Pi, 0.91},
		{"r = 1 au", eAt1 - e*math.Sin(eAt1), 41.53},
	}
	for _, tc := range tests {
		el := Elements{A: a, E: e, M: astro.Angle(tc.m), Epoch: epoch, I: 2.8, Node: 1, Peri: 2}
		_, v, err := el.StateAt(epoch)
		if err != nil {
			t.Fatal(err)
		}
		kms := r3.Norm(v) * astro.AUKm / astro.SecondsPerDay
		if d := math.Abs(kms - tc.want); d > 0.005 {
			t.Errorf("33.c %s: speed %.4f km/s, want %.2f (Δ %.3g)", tc.name, kms, tc.want, d)
		}
	}
}

func BenchmarkStateAt(b *testing.B) {
	b.ReportAllocs()
	el := Elements{A: 2.6, E: 0.15, I: 0.2, Node: 1, Peri: 2, M: 0.5, Epoch: astro.NewJD(2461000.5, astro.TT)}
	for i := 0; b.Loop(); i++ {
		p, _, _ := el.StateAt(el.Epoch.AddDays(float64(i % 1000)))
		sinkTwoBodyVec = p
	}
}
