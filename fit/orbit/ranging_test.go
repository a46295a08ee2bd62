package orbit

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// On a noise-free two-night arc the true orbit has χ² = 0, so the best
// start must fit every observation to well below its σ (χ² < 0.01 over 20
// residuals: an RMS below 0.02 σ), and the true distance from the first
// anchor's observer must lie within the spread of the ranging cloud (its
// weighted mean ± 3 weighted standard deviations) for the σ = 0.5″ the
// observations state. The objects and sites are invented (rgsynth_test.go).
func TestRangingStartsNoiseFree(t *testing.T) {
	ts, ss := rgTwoNights(5, 5)
	for _, el := range []ephem.Elements{rgMainBelt, rgNEO} {
		obs, truth := rgSynthetic(t, el, ts, ss, 0.5, nil)
		starts, err := RangingStarts(obs)
		if err != nil {
			t.Fatalf("%s: %v", el.Name, err)
		}
		best := starts[0]
		if best.Method != MethodRanging || !(best.Chi2 < 0.01) || len(best.Notes) == 0 {
			t.Errorf("%s: best start: method %q, χ² %g, notes %q", el.Name, best.Method, best.Chi2, best.Notes)
		}
		for k := 1; k < len(starts); k++ {
			if starts[k].Chi2 < starts[k-1].Chi2 {
				t.Errorf("%s: starts not best first: χ² %g after %g", el.Name, starts[k].Chi2, starts[k-1].Chi2)
			}
		}
		if best.State.Epoch.Scale != astro.TDB {
			t.Errorf("%s: start epoch scale %v, want TDB", el.Name, best.State.Epoch.Scale)
		}
		_, chi2, err := best.State.Residuals(obs, nil)
		if err != nil || math.Abs(chi2-best.Chi2) > 1e-9*(1+chi2) {
			t.Errorf("%s: Chi2 %g, State.Residuals gives %g (%v)", el.Name, best.Chi2, chi2, err)
		}
		set, err := RangingOrbits(obs, MonteCarloSettings{N: 2000, Seed: 3})
		if err != nil {
			t.Fatalf("%s: %v", el.Name, err)
		}
		g := obs[0].Geo
		var m, m2, sw float64
		for i, st := range set.States {
			s, err := st.Observe(g)
			if err != nil {
				t.Fatal(err)
			}
			w := set.Weights[i]
			m += w * s.DeltaAU
			m2 += w * s.DeltaAU * s.DeltaAU
			sw += w
		}
		m /= sw
		sd := math.Sqrt(math.Max(m2/sw-m*m, 0))
		want := rgTruthAt(t, truth, g).DeltaAU
		got := rgTruthAt(t, best.State, g).DeltaAU
		if math.Abs(want-m) > 3*sd {
			t.Errorf("%s: true distance %.5f au outside the cloud's %.5f ± 3×%.5f au", el.Name, want, m, sd)
		}
		if math.Abs(got-m) > 3*sd {
			t.Errorf("%s: start's distance %.5f au outside the cloud's %.5f ± 3×%.5f au", el.Name, got, m, sd)
		}
		if math.Abs(sw-1) > 1e-12 || !(set.EffectiveN > 50) {
			t.Errorf("%s: weights sum to %g, effective N %g", el.Name, sw, set.EffectiveN)
		}
	}
}

// The two-night noisy arc's cloud, propagated 30 days past the arc and seen
// from Alder Ridge, must contain the truth within its 3σ ellipse (d ≤ 3 in
// the cloud's covariance, [SampledRegion.Mahalanobis]). For a cloud whose
// places are normal, the 3σ ellipse holds 1 − exp(−9/2) = 98.9 % (2-dof χ²
// survival function; Press et al. 2007, §15.6); the test asks for 45 or more
// of 50 realisations (25 of the invented main-belt asteroid, 25 of the
// invented NEO). With a true coverage of 98.9 % six or more misses happen
// with probability 2e-5 (binomial); at 95 % coverage, 4 %.
func TestRangingOrbitsCoverage(t *testing.T) {
	if testing.Short() {
		t.Skip("50 realisations of a ranging cloud (about 3 s)")
	}
	ts, ss := rgTwoNights(5, 5)
	g, err := ephem.ObserverGeometryAt(astro.JD{Day: 2461478.5, Frac: 0.1, Scale: astro.UTC}, rgAlderRidge, 0)
	if err != nil {
		t.Fatal(err)
	}
	in, n := 0, 0
	for _, el := range []ephem.Elements{rgMainBelt, rgNEO} {
		for k := range 25 {
			rng := rand.New(rand.NewPCG(uint64(k), 2027))
			obs, truth := rgSynthetic(t, el, ts, ss, 0.5, rng)
			set, err := RangingOrbits(obs, MonteCarloSettings{N: 1000, Seed: uint64(k)})
			if err != nil {
				t.Fatalf("%s %d: %v", el.Name, k, err)
			}
			reg, err := set.Predict(g, MonteCarloSettings{})
			if err != nil {
				t.Fatalf("%s %d: %v", el.Name, k, err)
			}
			tr := rgTruthAt(t, truth, g)
			ra, dec, _ := astro.Spherical(tr.Dir)
			d := reg.Mahalanobis(ra, dec)
			if math.IsNaN(d) {
				t.Fatalf("%s %d: NaN distance", el.Name, k)
			}
			n++
			if d <= 3 {
				in++
			} else {
				t.Logf("%s %d: truth at %.2fσ", el.Name, k, d)
			}
		}
	}
	if in < 45 {
		t.Errorf("truth inside the 3σ ellipse in %d of %d realisations, want ≥ 45", in, n)
	}
}

// Ranging draws are deterministic in the number of workers.
func TestRangingOrbitsWorkersDeterministic(t *testing.T) {
	ts, ss := rgTwoNights(4, 4)
	obs, _ := rgSynthetic(t, rgNEO, ts, ss, 0.5, rand.New(rand.NewPCG(5, 5)))
	var sets [2]*OrbitSamples
	for k, w := range []int{1, 2} {
		var err error
		sets[k], err = RangingOrbits(obs, MonteCarloSettings{N: 500, Seed: 11, Workers: w})
		if err != nil {
			t.Fatal(err)
		}
	}
	if len(sets[0].States) != len(sets[1].States) {
		t.Fatalf("%d vs %d orbits", len(sets[0].States), len(sets[1].States))
	}
	for i := range sets[0].States {
		if sets[0].States[i] != sets[1].States[i] || sets[0].Weights[i] != sets[1].Weights[i] {
			t.Fatalf("orbit %d differs between 1 and 2 workers", i)
		}
	}
}

// Degenerate arcs give a *RangingError with a one-line message, never a
// panic or a NaN.
func TestRangingDegenerate(t *testing.T) {
	// One night, 5 observations within 40 minutes.
	var short []astro.JD
	var sites []*astro.Site
	for k := range 5 {
		short = append(short, astro.JD{Day: 2461447.5, Frac: 0.125 + float64(k)*0.0069, Scale: astro.UTC})
		sites = append(sites, rgAlderRidge)
	}
	shortObs, _ := rgSynthetic(t, rgMainBelt, short, sites, 0.5, nil)

	// A stationary object: the same place on two nights.
	ts, ss := rgTwoNights(4, 4)
	still, _ := rgSynthetic(t, rgMainBelt, ts, ss, 0.5, nil)
	for i := range still {
		still[i].RA, still[i].Dec = still[0].RA, still[0].Dec
	}
	two := append([]Observation(nil), still[:2]...)
	none := append([]Observation(nil), still...)
	for i := range none {
		none[i].Used = false
	}
	for _, c := range []struct {
		name string
		obs  []Observation
		want Degeneracy
	}{
		{"one night within an hour", shortObs, DegenerateShortArc},
		{"stationary", still, DegenerateStationary},
		{"two observations", two, DegenerateTooFew},
		{"none used", none, DegenerateTooFew},
	} {
		starts, err := RangingStarts(c.obs)
		var re *RangingError
		if !errors.As(err, &re) {
			t.Errorf("%s: RangingStarts: %v, %d starts; want a *RangingError", c.name, err, len(starts))
		} else if re.Case != c.want || strings.Contains(err.Error(), "\n") || !strings.HasPrefix(err.Error(), "orbit: ranging: ") {
			t.Errorf("%s: case %v, message %q; want case %v", c.name, re.Case, err, c.want)
		}
		if _, err := RangingOrbits(c.obs, MonteCarloSettings{N: 300}); !errors.As(err, &re) {
			t.Errorf("%s: RangingOrbits: %v; want a *RangingError", c.name, err)
		}
	}
}

// An observation with a non-finite place or σ is left out, not propagated
// into NaN results.
func TestRangingSkipsBadObservation(t *testing.T) {
	ts, ss := rgTwoNights(5, 5)
	obs, _ := rgSynthetic(t, rgMainBelt, ts, ss, 0.5, nil)
	obs[3].RA = astro.Angle(math.NaN())
	obs[6].SigmaDec = math.Inf(1)
	starts, err := RangingStarts(obs)
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range starts {
		if !s.State.Valid() || math.IsNaN(s.Chi2) {
			t.Errorf("start %v, χ² %g", s.State, s.Chi2)
		}
	}
}

// The anchor fitted with the diurnal parallax must give the observed
// topocentric place at its own instant for the true distance, to well
// below the noise: noise-free data, so the residual is the model's (a
// uniform geocentric motion over the night's 1.5 h); 0.1″ is σ/5. Without
// the parallax term the NEO's anchor (0.12 au away, parallax up to 70″,
// whose curvature over the night a straight line through the middle
// observation misses) is off by more than 0.2″ (0.32″ as computed).
func TestRangingAnchorParallax(t *testing.T) {
	ts, ss := rgTwoNights(5, 5)
	for _, el := range []ephem.Elements{rgMainBelt, rgNEO} {
		obs, truth := rgSynthetic(t, el, ts, ss, 0.5, nil)
		p, err := rgNewProblem(obs)
		if err != nil {
			t.Fatal(err)
		}
		for _, a := range []rgAnchor{p.a, p.b} {
			g := obs[a.obs].Geo
			seen := rgTruthAt(t, truth, g)
			off := func(a rgAnchor) float64 {
				u := a.dir(seen.DeltaAU, 0, 0, 0)
				return math.Acos(math.Min(1, r3.Dot(u, seen.Dir))) / float64(astro.Arcsecond)
			}
			if d := off(a); d > 0.1 || a.nFit != 5 {
				t.Errorf("%s: anchor at line %d is %.3g″ from the true place (Δ = %.3f au, %d observations fitted)", el.Name, obs[a.obs].Line, d, seen.DeltaAU, a.nFit)
			}
			flat := a
			flat.kx, flat.ky = 0, 0
			if d := off(flat); el.Name == rgNEO.Name && d < 0.2 {
				t.Errorf("%s: without parallax the anchor is only %.3g″ off: the test does not test the parallax", el.Name, d)
			}
		}
	}
}
