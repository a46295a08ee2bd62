package orbit

import (
	"math"
	"math/rand/v2"
	"testing"

	"arcfit/astro"

	"gonum.org/v1/gonum/mat"
)

// Noise-free fits return the invented element sets they were made from. The
// tolerances are the state recovery (≤ 1e-9 relative, see
// TestCorrectFromPerturbedStates) carried to the elements with generous
// room: 1e-7 in a, e, q; 1e-6 rad in the angles; 1e-4 d in Tp.
func TestElementsRecovered(t *testing.T) {
	for _, c := range dcCases() {
		ts, ss := c.schedule()
		obs := dcSynthObservations(t, c.el, ts, ss, 0.5, nil)
		sol, err := Correct(obs, dcPerturbed(c.truth(t), 0.01, rand.New(rand.NewPCG(21, 22))), Options{})
		if err != nil {
			t.Fatal(err)
		}
		el, sig, err := sol.Elements()
		if err != nil {
			t.Fatal(err)
		}
		want := c.el
		if want.A == 0 {
			want.A = want.Q / (1 - want.E)
		}
		ang := func(a, b astro.Angle) float64 { return math.Abs(float64((a - b).Wrapped())) }
		if math.Abs(el.A-want.A)/want.A > 1e-7 || math.Abs(el.E-want.E) > 1e-7 || ang(el.I, want.I) > 1e-6 ||
			ang(el.Node, want.Node) > 1e-6 || ang(el.Peri, want.Peri) > 1e-6 {
			t.Errorf("%s: elements %+v, want %+v", c.name, el, want)
		}
		if c.el.A == 0 { // perihelion form: q and Tp
			if math.Abs(el.Q-c.el.Q) > 1e-7 || math.Abs(el.Tp.Sub(astro.JD{Day: c.el.Tp.Day, Frac: c.el.Tp.Frac, Scale: el.Tp.Scale})) > 1e-4 {
				t.Errorf("%s: q = %.9f Tp = %v, want %.9f %v", c.name, el.Q, el.Tp, c.el.Q, c.el.Tp)
			}
		} else if ang(el.M, want.M) > 1e-6 {
			t.Errorf("%s: M = %.9f°, want %.9f°", c.name, el.M.Degrees(), want.M.Degrees())
		}
		if sig.PerihelionForm || !(sig.A > 0) || !(sig.E > 0) || !(sig.I > 0) || !(sig.TpDays > 0) {
			t.Errorf("%s: σ %+v", c.name, sig)
		}
		if !math.IsNaN(el.H) {
			t.Errorf("%s: H = %g without magnitudes, want NaN", c.name, el.H)
		}
	}
}

// The linear σ of the elements against the spread of the elements of 4000
// states drawn from the state covariance (x = x̂ + L z, L the Cholesky
// factor of Cov from gonum, z standard normal from a seeded source): the
// sample standard deviation of N normal draws has a relative standard error
// 1/√(2N) = 1.1 %, so agreement within 6 % (about 5 standard errors) is
// asked; the curvature of the element map over 1σ is far smaller for these
// arcs.
func TestElementSigmaAgainstSampling(t *testing.T) {
	for _, c := range dcCases() {
		ts, ss := c.schedule()
		rng := rand.New(rand.NewPCG(31, 32))
		obs := dcSynthObservations(t, c.el, ts, ss, 0.5, rng)
		sol, err := Correct(obs, dcPerturbed(c.truth(t), 0.01, rng), Options{})
		if err != nil {
			t.Fatal(err)
		}
		el0, sig, err := sol.Elements()
		if err != nil {
			t.Fatal(err)
		}
		mean := stateVector(sol.State)
		var ch mat.Cholesky
		if !ch.Factorize(sol.Cov) {
			t.Fatal("covariance not positive definite")
		}
		var l mat.TriDense
		ch.LTo(&l)
		draw := rand.New(rand.NewPCG(33, 34))
		const n = 4000
		v0 := elementVector(el0)
		var sum, sum2 [8]float64
		for k := 0; k < n; k++ {
			var z [6]float64
			for i := range z {
				z[i] = draw.NormFloat64()
			}
			xv := mean
			for i := 0; i < 6; i++ {
				for j := 0; j <= i; j++ {
					xv[i] += l.At(i, j) * z[j]
				}
			}
			el, err := stateOfVector(sol.State.Epoch, xv).Elements()
			if err != nil {
				t.Fatal(err)
			}
			v := elementVector(el)
			for i := range v {
				d := v[i] - v0[i]
				if i >= 2 && i <= 5 {
					d = float64(astro.Angle(d).Wrapped())
				}
				sum[i] += d
				sum2[i] += d * d
			}
		}
		lin := [8]float64{sig.A, sig.E, float64(sig.I), float64(sig.Node), float64(sig.Peri), float64(sig.M), sig.Q, sig.TpDays}
		names := [8]string{"a", "e", "i", "Ω", "ω", "M", "q", "Tp"}
		worst := 0.0
		for i := range lin {
			if sig.PerihelionForm && (i == 0 || i == 5) {
				continue
			}
			m := sum[i] / n
			sd := math.Sqrt(sum2[i]/n - m*m)
			worst = math.Max(worst, math.Abs(lin[i]/sd-1))
			if math.Abs(lin[i]/sd-1) > 0.06 {
				t.Errorf("%s: σ(%s) = %.4g linear, %.4g sampled", c.name, names[i], lin[i], sd)
			}
		}
		t.Logf("%s: linear and sampled σ agree within %.1f %% (σa = %.2g au, σM = %.2g°)", c.name, 100*worst, sig.A, sig.M.Degrees())
	}
}

// An orbit with e ≥ 0.99 is reported in the perihelion form: a and M are not
// meaningful there (ephem's near-parabolic band). The state is that of an
// invented comet with q = 0.8 au, e = 0.995, with an invented covariance.
func TestElementsPerihelionForm(t *testing.T) {
	c := dcCases()[2]
	el := c.el
	el.E, el.Q = 0.995, 0.8
	st, err := StateFromElements(el, c.epoch)
	if err != nil {
		t.Fatal(err)
	}
	cov := mat.NewSymDense(6, nil)
	for i := 0; i < 3; i++ {
		cov.SetSym(i, i, 1e-12)     // 1e-6 au
		cov.SetSym(i+3, i+3, 1e-16) // 1e-8 au/day
	}
	sol := &Solution{State: st, Cov: cov, H: math.NaN()}
	got, sig, err := sol.Elements()
	if err != nil {
		t.Fatal(err)
	}
	if !sig.PerihelionForm || got.A != 0 || sig.A != 0 || sig.M != 0 || sig.Note == "" {
		t.Errorf("e = %.4f: A = %g, σ %+v; want the perihelion form", got.E, got.A, sig)
	}
	if math.Abs(got.Q-0.8) > 1e-12 || !(sig.Q > 0) || !(sig.TpDays > 0) {
		t.Errorf("q = %.12f ± %g, σTp = %g", got.Q, sig.Q, sig.TpDays)
	}
	if err := got.Validate(); err != nil {
		t.Errorf("perihelion-form set does not validate: %v", err)
	}
}
