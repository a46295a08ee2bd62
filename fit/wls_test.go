package fit

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/ephem"
)

const mas = 1e-3 * float64(astro.Arcsecond)

// TestFitRecoversExactMotion: noise-free synthetic motion of each model's own
// form is recovered to 1e-9 of the parameters (the requirement; exact
// synthetic truth, so only rounding separates fit and truth).
func TestFitRecoversExactMotion(t *testing.T) {
	ts := arcTimes(3, 5) // 3 nights, 5 points each
	tests := []struct {
		name  string
		model Model
		xi    []float64 // coefficients in τ
		eta   []float64
		u     float64 // 0: no parallax column
		src   string
	}{
		{"poly1", Poly(1), []float64{1.2e-3, -4.1e-4}, []float64{-3.3e-4, 2.2e-4}, 0, "exact synthetic truth"},
		{"poly2", Poly(2), []float64{1.2e-3, -4.1e-4, 3.0e-6}, []float64{-3.3e-4, 2.2e-4, -1.5e-6}, 0, "exact synthetic truth"},
		{"poly3", Poly(3), []float64{1.2e-3, -4.1e-4, 3.0e-6, 2.5e-7}, []float64{-3.3e-4, 2.2e-4, -1.5e-6, -4.0e-7}, 0, "exact synthetic truth"},
		{"poly1+u", Poly(1), []float64{1.2e-3, -4.1e-4}, []float64{-3.3e-4, 2.2e-4}, 0.78, "exact synthetic truth, invented site vectors"},
		{"poly2+u", Poly(2), []float64{1.2e-3, -4.1e-4, 3.0e-6}, []float64{-3.3e-4, 2.2e-4, -1.5e-6}, 0.78, "exact synthetic truth, invented site vectors"},
		{"poly3+u", Poly(3), []float64{1.2e-3, -4.1e-4, 3.0e-6, 2.5e-7}, []float64{-3.3e-4, 2.2e-4, -1.5e-6, -4.0e-7}, 3.5, "exact synthetic truth, invented site vectors"},
		{"piecewise1", Piecewise([]float64{-0.5}), []float64{1.2e-3, -4.1e-4, 2.0e-5}, []float64{-3.3e-4, 2.2e-4, -1.0e-5}, 0, "exact synthetic truth"},
		{"piecewise2", Piecewise([]float64{-0.5, 0.5}), []float64{1.2e-3, -4.1e-4, 2.0e-5, -3.0e-5}, []float64{-3.3e-4, 2.2e-4, -1.0e-5, 6.0e-6}, 0, "exact synthetic truth"},
		{"piecewise2+u", Piecewise([]float64{-0.5, 0.5}), []float64{1.2e-3, -4.1e-4, 2.0e-5, -3.0e-5}, []float64{-3.3e-4, 2.2e-4, -1.0e-5, 6.0e-6}, 0.78, "exact synthetic truth, invented site vectors"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			lo, hi := ts[0], ts[len(ts)-1]
			tsd := (hi - lo) / 2
			f := make([]float64, tc.model.NumPerCoord())
			truth := func(x float64) (float64, float64) {
				tc.model.basis(f, x/tsd, tsd)
				var a, b float64
				for j := range f {
					a += tc.xi[j] * f[j]
					b += tc.eta[j] * f[j]
				}
				return a, b
			}
			var site func(int, float64) (float64, float64)
			if tc.u != 0 {
				site = inventedSite
			}
			tr := synthTrack(ts, func(x float64) (float64, float64) { return truth(x) }, site, 0.5*float64(astro.Arcsecond), 0.3)
			for i := range tr.Points {
				p := &tr.Points[i]
				p.Xi -= tc.u * p.SiteXi
				p.Eta -= tc.u * p.SiteEta
			}
			mode := ParallaxOff
			if tc.u != 0 {
				mode = ParallaxFit
			}
			sol, err := Fit(tr, tc.model, Settings{Parallax: mode})
			if err != nil {
				t.Fatalf("Fit(%s): %v", tc.name, err)
			}
			want := append(append([]float64(nil), tc.xi...), tc.eta...)
			if tc.u != 0 {
				want = append(want, tc.u)
			}
			if len(sol.Params) != len(want) {
				t.Fatalf("Fit(%s): %d params, want %d", tc.name, len(sol.Params), len(want))
			}
			for i, w := range want {
				if d := math.Abs(sol.Params[i] - w); d > 1e-9*math.Abs(w) {
					t.Errorf("Fit(%s): param[%d] = %.15g, want %.15g (rel Δ %.3g; %s)", tc.name, i, sol.Params[i], w, d/math.Abs(w), tc.src)
				}
			}
			if sol.Chi2 > 1e-12 {
				t.Errorf("Fit(%s): χ² = %g on noise-free data, want ≈ 0 (%s)", tc.name, sol.Chi2, tc.src)
			}
			for _, r := range sol.Residuals {
				if r.Flagged {
					t.Errorf("Fit(%s): line %d flagged on noise-free data", tc.name, r.Line)
				}
			}
		})
	}
}

// TestPiecewiseSegments: a piecewise fit with k knots is continuous and has
// exactly k + 1 straight segments (a property of the hinge basis, common
// practice for hinge models): the second differences of the fitted
// geocentric path vanish except in the steps that straddle a knot, where the
// slope changes.
func TestPiecewiseSegments(t *testing.T) {
	ts := arcTimes(4, 4)
	rng := rand.New(rand.NewPCG(7, 11))
	sig := 0.5 * float64(astro.Arcsecond)
	for k := 1; k <= 3; k++ {
		var knots []float64
		for j := 1; j <= k; j++ {
			knots = append(knots, -1.5+float64(j)*3/float64(k+1))
		}
		// A curved truth, so every hinge gets a non-zero slope change.
		tr := synthTrack(ts, func(x float64) (float64, float64) {
			return 1e-3*x + 4e-5*x*x, -5e-4*x + 3e-5*x*x*x
		}, nil, sig, 0)
		for i := range tr.Points {
			tr.Points[i].Xi += sig * rng.NormFloat64()
			tr.Points[i].Eta += sig * rng.NormFloat64()
		}
		sol, err := Fit(tr, Piecewise(knots), Settings{Parallax: ParallaxOff, KeepAll: true})
		if err != nil {
			t.Fatalf("Fit(piecewise %d knots): %v", k, err)
		}
		const h = 1e-3 // days
		lo, hi := ts[0], ts[len(ts)-1]
		changes := 0
		for x := lo; x+2*h <= hi; x += h {
			x0, e0 := sol.geocentric(x)
			x1, e1 := sol.geocentric(x + h)
			x2, e2 := sol.geocentric(x + 2*h)
			d2 := math.Hypot(x2-2*x1+x0, e2-2*e1+e0)
			straddles := false
			for _, kn := range knots {
				if kn > x && kn < x+2*h {
					straddles = true
				}
			}
			if straddles {
				// counted once per knot below
				continue
			}
			if d2 > 1e-15 {
				t.Errorf("piecewise %d knots: path bends at T = %+.4f d (second difference %.3g rad), not at a knot (hinge basis)", k, x, d2)
			}
		}
		for _, kn := range knots {
			// continuity: the left and right limits agree
			// (a jump J would show as |Δ| ≈ J at every ε; a continuous path
			// gives |Δ| ∝ ε).
			jump := func(eps float64) float64 {
				xl, el := sol.geocentric(kn - eps)
				xr, er := sol.geocentric(kn + eps)
				return math.Hypot(xr-xl, er-el)
			}
			if d6, d8 := jump(1e-6), jump(1e-8); d8 > 0.02*d6+1e-17 {
				t.Errorf("piecewise %d knots: |Δ| = %.3g rad over ±1e-8 d and %.3g over ±1e-6 d at knot %+.3f d, want ∝ ε (continuous; hinge basis)", k, d8, d6, kn)
			}
			// slope change at the knot
			a0, b0 := sol.geocentric(kn - 2*h)
			a1, b1 := sol.geocentric(kn)
			a2, b2 := sol.geocentric(kn + 2*h)
			if math.Hypot(a2-2*a1+a0, b2-2*b1+b0) > 1e-15 {
				changes++
			}
		}
		if changes+1 != k+1 {
			t.Errorf("piecewise %d knots: %d straight segments, want %d (hinge basis)", k, changes+1, k+1)
		}
	}
}

// inventedBelt is an invented main-belt element set (not a real body):
// a = 2.71 au, e = 0.11, i = 5.3°, placed near opposition in March 2027.
func inventedBelt() ephem.Elements {
	return ephem.Elements{
		Name:  "Test-7 (invented)",
		Epoch: astro.JD{Day: 2461480.5, Scale: astro.TT},
		A:     2.71, E: 0.11,
		I:    astro.AngleFromDegrees(5.3),
		Node: astro.AngleFromDegrees(41.0),
		Peri: astro.AngleFromDegrees(118.0),
		M:    astro.AngleFromDegrees(12.0),
		H:    math.NaN(), G: math.NaN(),
	}
}

// inventedSites are two invented sites (not observatories) 100° of
// longitude apart.
func inventedSites() map[string]astro.Site {
	return map[string]astro.Site{
		"Quarry Knoll": {Name: "Quarry Knoll", Lat: astro.AngleFromDegrees(34.2), Lon: astro.AngleFromDegrees(-111.4), HeightM: 1800},
		"Fen Lookout":  {Name: "Fen Lookout", Lat: astro.AngleFromDegrees(47.9), Lon: astro.AngleFromDegrees(-11.0), HeightM: 250},
	}
}

// syntheticSet makes an observation set of el from the sites: on each of
// three nights, 5 observations over 3 h from each site in darkness, with
// seeded Gaussian noise of sigmaArcsec (RA on the sky). It returns the set
// and the true geocentric distance at the arc's middle.
func syntheticSet(t testing.TB, el ephem.Elements, sites map[string]astro.Site, start astro.JD, sigmaArcsec float64, rng *rand.Rand) (*obs.Set, float64) {
	t.Helper()
	set := &obs.Set{File: "synthetic", Format: "csv"}
	line := 2
	// UTC hours of the evening at each site (invented schedules, both dark
	// near opposition in March at those longitudes).
	schedule := map[string]float64{"Quarry Knoll": 4.0 / 24, "Fen Lookout": 21.0 / 24}
	for night := 0; night < 3; night++ {
		for _, name := range []string{"Fen Lookout", "Quarry Knoll"} {
			st := sites[name]
			for j := 0; j < 5; j++ {
				utc := start.AddDays(float64(night) + schedule[name] + float64(j)*0.75/24)
				pl, err := ephem.PlaceOfElements(el, utc, ephem.Observer{Site: &st})
				if err != nil {
					t.Fatal(err)
				}
				s := astro.AngleFromArcseconds(sigmaArcsec)
				dec := pl.Dec + s*astro.Angle(rng.NormFloat64())
				ra := pl.RA + s*astro.Angle(rng.NormFloat64())/astro.Angle(math.Cos(float64(pl.Dec)))
				set.Obs = append(set.Obs, obs.Observation{Line: line, Time: utc, RA: ra.Normalized(), Dec: dec,
					SigmaRA: s, SigmaDec: s, Site: name, Mag: math.NaN(), Used: true})
				line++
			}
		}
	}
	mid := start.AddDays(1 + 12.5/24)
	pl, err := ephem.PlaceOfElements(el, mid, ephem.Observer{})
	if err != nil {
		t.Fatal(err)
	}
	return set, pl.DeltaAU
}

// TestFitRecoversInverseDistance: from synthetic topocentric observations of
// an invented main-belt orbit (made with ephem.PlaceOfElements from two
// invented sites, 0.3″ noise), the parallax-aware fit recovers u = 1/Δ within
// 4σ of its own fitted uncertainty (truth: Place.DeltaAU at the geocentre,
// mid-arc).
func TestFitRecoversInverseDistance(t *testing.T) {
	el, sites := inventedBelt(), inventedSites()
	start := astro.JD{Day: 2461480.5, Scale: astro.UTC} // 2027-03-03 0h UTC
	rng := rand.New(rand.NewPCG(2027, 3))
	set, delta := syntheticSet(t, el, sites, start, 0.3, rng)
	tr, err := NewTrack(set, sites)
	if err != nil {
		t.Fatal(err)
	}
	for _, m := range []Model{Poly(2), Poly(3)} {
		sol, err := Fit(tr, m, Settings{})
		if err != nil {
			t.Fatalf("Fit(%s): %v", m.Name(), err)
		}
		u, su := sol.InvDistance, sol.InvDistanceSigma
		t.Logf("%s: u = %.4f ± %.4f au⁻¹, truth 1/Δ = %.4f (Δ = %.4f au); χ²/dof %.2f", m.Name(), u, su, 1/delta, delta, sol.Chi2DoF)
		if !(math.Abs(u-1/delta) <= 4*su) {
			t.Errorf("Fit(%s): u = %.4f ± %.4f au⁻¹, want %.4f within 4σ (ephem.PlaceOfElements DeltaAU)", m.Name(), u, su, 1/delta)
		}
		if !(su < 0.5/delta) {
			t.Errorf("Fit(%s): σ(u) = %.3g au⁻¹, want well determined (< half of 1/Δ = %.3g) from two sites 100° apart", m.Name(), su, 0.5/delta)
		}
	}
}

// TestFitErrors: bad input gets a clear error, never a panic.
func TestFitErrors(t *testing.T) {
	sig := 0.5 * float64(astro.Arcsecond)
	lin := func(x float64) (float64, float64) { return 1e-4 * x, -2e-4 * x }
	t.Run("too few", func(t *testing.T) {
		tr := synthTrack([]float64{-1, 0, 1}, lin, nil, sig, 0)
		_, err := Fit(tr, Poly(3), Settings{Parallax: ParallaxOff})
		var tf *TooFewError
		if !errors.As(err, &tf) || !errors.Is(err, ErrTooFewObservations) {
			t.Fatalf("Fit(poly3, 3 points) error = %v, want *TooFewError", err)
		}
		// poly3 needs 4 per-coordinate parameters; 3 times allow poly1, poly2.
		if tf.Need != 4 || tf.Have != 3 || strings.Join(tf.Allowed, ",") != "poly1,poly2" {
			t.Errorf("TooFewError = %+v, want need 4, have 3, allowed poly1,poly2 (parameter count of poly3)", *tf)
		}
		if msg := err.Error(); !strings.Contains(msg, "poly1, poly2") || strings.Contains(msg, "\n") {
			t.Errorf("message %q: want one line naming the allowed models", msg)
		}
	})
	t.Run("knot without data", func(t *testing.T) {
		tr := synthTrack([]float64{-1, -0.9, 0, 0.1, 1}, lin, nil, sig, 0)
		_, err := Fit(tr, Piecewise([]float64{1.5}), Settings{Parallax: ParallaxOff})
		if !errors.Is(err, ErrSingular) {
			t.Errorf("Fit(knot beyond the data) error = %v, want ErrSingular", err)
		}
	})
	t.Run("singular design", func(t *testing.T) {
		// Two instants only, many points at each: poly2 has 3 parameters per
		// coordinate, two distinct times cannot fix them.
		tr := synthTrack([]float64{-1, -1, -1, 1, 1, 1}, lin, nil, sig, 0)
		_, err := Fit(tr, Poly(2), Settings{Parallax: ParallaxOff})
		if !errors.Is(err, ErrTooFewObservations) {
			t.Errorf("Fit(poly2, 2 instants) error = %v, want ErrTooFewObservations", err)
		}
	})
	t.Run("parallax not estimable", func(t *testing.T) {
		// A constant site vector is indistinguishable from the constant terms.
		tr := synthTrack(arcTimes(2, 4), lin, func(int, float64) (float64, float64) { return 3e-5, 2e-5 }, sig, 0)
		_, err := Fit(tr, Poly(1), Settings{})
		if !errors.Is(err, ErrParallaxNotEstimable) {
			t.Errorf("Fit(constant site vector) error = %v, want ErrParallaxNotEstimable", err)
		}
		if _, err := Fit(tr, Poly(1), Settings{Parallax: ParallaxFixed, InvDistance: 0.8}); err != nil {
			t.Errorf("Fit(fixed distance): %v, want success", err)
		}
	})
	t.Run("geocentric only", func(t *testing.T) {
		tr := synthTrack(arcTimes(2, 4), lin, nil, sig, 0)
		sol, err := Fit(tr, Poly(1), Settings{})
		if err != nil {
			t.Fatal(err)
		}
		if sol.FitsInvDistance() || !math.IsNaN(sol.InvDistance) || len(sol.Notes) == 0 {
			t.Errorf("geocentric track: u fitted = %v, u = %v, notes %q; want no u column and a note", sol.FitsInvDistance(), sol.InvDistance, sol.Notes)
		}
	})
	t.Run("bad model and settings", func(t *testing.T) {
		tr := synthTrack(arcTimes(2, 4), lin, nil, sig, 0)
		for _, c := range []struct {
			m Model
			s Settings
		}{
			{Poly(4), Settings{}},
			{Piecewise([]float64{math.NaN()}), Settings{}},
			{Poly(1), Settings{Parallax: ParallaxFixed, InvDistance: -1}},
			{Poly(1), Settings{RejectChi2: -2}},
		} {
			if _, err := Fit(tr, c.m, c.s); err == nil {
				t.Errorf("Fit(%v, %+v): no error", c.m, c.s)
			}
		}
	})
}

// TestOutlierRejection: one observation displaced by 15σ among Gaussian
// noise is flagged (15σ ≫ the 11.83 χ² threshold, −2 ln 0.0027, exact for
// 2 dof), listed with its residual, and nothing else is dropped; KeepAll
// flags nothing.
func TestOutlierRejection(t *testing.T) {
	sig := 0.5 * float64(astro.Arcsecond)
	rng := rand.New(rand.NewPCG(5, 9))
	tr := synthTrack(arcTimes(3, 6), func(x float64) (float64, float64) { return 2e-4 * x, -1e-4 * x }, nil, sig, 0)
	for i := range tr.Points {
		tr.Points[i].Xi += sig * rng.NormFloat64()
		tr.Points[i].Eta += sig * rng.NormFloat64()
	}
	const bad = 7
	tr.Points[bad].Eta += 15 * sig
	sol, err := Fit(tr, Poly(2), Settings{Parallax: ParallaxOff})
	if err != nil {
		t.Fatal(err)
	}
	var flagged []int
	for i, r := range sol.Residuals {
		if r.Flagged {
			flagged = append(flagged, i)
		}
	}
	if len(flagged) != 1 || flagged[0] != bad {
		t.Fatalf("flagged %v, want [%d]", flagged, bad)
	}
	r := sol.Residuals[bad]
	if math.Abs(r.DDecArcsec-7.5) > 2 || r.Used {
		t.Errorf("flagged residual: dDec = %.2f″ (want ≈ 7.5″ = 15 × 0.5″, within 2″ of noise), used = %v", r.DDecArcsec, r.Used)
	}
	if sol.NumUsed != len(tr.Points)-1 {
		t.Errorf("NumUsed = %d, want %d", sol.NumUsed, len(tr.Points)-1)
	}
	keep, err := Fit(tr, Poly(2), Settings{Parallax: ParallaxOff, KeepAll: true})
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range keep.Residuals {
		if r.Flagged {
			t.Errorf("KeepAll: line %d flagged", r.Line)
		}
	}
	// Uniformly understated σ (true scatter 2 × stated) must not flag good
	// points: the statistic divides by the others' χ²/dof.
	tr2 := synthTrack(arcTimes(3, 6), func(x float64) (float64, float64) { return 2e-4 * x, -1e-4 * x }, nil, sig, 0)
	for i := range tr2.Points {
		tr2.Points[i].Xi += 2 * sig * rng.NormFloat64()
		tr2.Points[i].Eta += 2 * sig * rng.NormFloat64()
	}
	sol2, err := Fit(tr2, Poly(2), Settings{Parallax: ParallaxOff})
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, r := range sol2.Residuals {
		if r.Flagged {
			n++
		}
	}
	if n > 1 {
		t.Errorf("σ understated ×2: %d points flagged, want at most 1 (chance 0.27 %% each after rescaling)", n)
	}
	if !sol2.Scaled || sol2.Chi2DoF < 2 || sol2.Chi2DoF > 8 {
		t.Errorf("σ understated ×2: χ²/dof = %.2f, scaled = %v; want ≈ 4 (2²) and scaled", sol2.Chi2DoF, sol2.Scaled)
	}
}

// TestFitCorrelationWhitening: with correlated errors, the fit equals the
// generalised least-squares estimate computed a second way — transforming the
// data by the exact decorrelating rotation of the common covariance (for
// equal σ the eigenvectors are (1, ±1)/√2 with variances σ²(1 ± ρ)), fitting
// the two rotated coordinates as independent, and rotating back (exact
// algebra, Björck 1996 ch. 1).
func TestFitCorrelationWhitening(t *testing.T) {
	sig := 0.4 * float64(astro.Arcsecond)
	const rho = 0.6
	rng := rand.New(rand.NewPCG(1, 2))
	ts := arcTimes(3, 4)
	tr := synthTrack(ts, func(x float64) (float64, float64) { return 3e-4*x + 1e-6*x*x, 1e-4 * x }, nil, sig, rho)
	for i := range tr.Points {
		tr.Points[i].Xi += sig * rng.NormFloat64()
		tr.Points[i].Eta += sig * rng.NormFloat64()
	}
	sol, err := Fit(tr, Poly(2), Settings{Parallax: ParallaxOff, KeepAll: true})
	if err != nil {
		t.Fatal(err)
	}
	// Rotated coordinates p = (ξ+η)/√2 (variance σ²(1+ρ)), m = (ξ−η)/√2
	// (variance σ²(1−ρ)), independent: fit each with poly2 and ρ = 0.
	rot := *tr
	rot.Points = append([]Point(nil), tr.Points...)
	for i := range rot.Points {
		p := &rot.Points[i]
		p.Xi, p.Eta = (p.Xi+p.Eta)/math.Sqrt2, (p.Xi-p.Eta)/math.Sqrt2
		p.SigmaXi, p.SigmaEta, p.Corr = sig*math.Sqrt(1+rho), sig*math.Sqrt(1-rho), 0
	}
	sr, err := Fit(&rot, Poly(2), Settings{Parallax: ParallaxOff, KeepAll: true})
	if err != nil {
		t.Fatal(err)
	}
	for j := 0; j < 3; j++ {
		a := (sr.Params[j] + sr.Params[3+j]) / math.Sqrt2
		b := (sr.Params[j] - sr.Params[3+j]) / math.Sqrt2
		for _, c := range []struct {
			got, want float64
			what      string
		}{{sol.Params[j], a, "ξ"}, {sol.Params[3+j], b, "η"}} {
			if math.Abs(c.got-c.want) > 1e-9*math.Abs(c.want)+1e-18 {
				t.Errorf("correlated fit: %s coefficient %d = %.15g, want %.15g (decorrelated refit)", c.what, j, c.got, c.want)
			}
		}
	}
	if math.Abs(sol.Chi2-sr.Chi2) > 1e-9*sr.Chi2 {
		t.Errorf("correlated fit: χ² = %.12g, want %.12g (decorrelated refit)", sol.Chi2, sr.Chi2)
	}
}

// TestModelNames: the agreed names (fit API, issue item 10).
func TestModelNames(t *testing.T) {
	for in, want := range map[string]string{" Poly2 ": "poly2", "AUTO": "auto", "piecewise": "piecewise", "poly1": "poly1", "poly3": "poly3"} {
		if got, err := ParseModelName(in); err != nil || got != want {
			t.Errorf("ParseModelName(%q) = %q, %v; want %q", in, got, err, want)
		}
	}
	for _, bad := range []string{"poly4", "", "spline"} {
		if _, err := ParseModelName(bad); err == nil {
			t.Errorf("ParseModelName(%q): no error", bad)
		}
	}
	if Poly(3).Name() != "poly3" || Piecewise([]float64{1, -1}).Name() != "piecewise" || Piecewise([]float64{1, -1}).Knots[0] != -1 ||
		Poly(2).NumMotionParams() != 6 || Piecewise([]float64{0.5}).NumMotionParams() != 6 {
		t.Error("model names, knot order or parameter counts wrong (poly d: 2(d+1); piecewise k: 2(k+2))")
	}
}
