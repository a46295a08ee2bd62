package orbit

import (
	"math"
	"math/rand/v2"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/ephem/nbody"

	"gonum.org/v1/gonum/spatial/r3"
)

// Self-consistency tests of the perturbed orbit fit: observations made by
// this package's own n-body path (nbSynthObservations: ephem/nbody's
// integration, the light time by a two-body step) fitted back. They check
// the plumbing — batch propagation, the STM Jacobian, the covariance through
// the integration, the sampling — not the force model, which ephem/nbody's
// tests check against a reference integration.

// nbChi2Six997 is the 99.73 % quantile of the χ² distribution with six
// degrees of freedom, 20.06: a fitted six-parameter state lies within it of
// the truth, in the metric of its covariance, with the probability of a
// 3-σ interval (Press et al., Numerical Recipes, 3rd ed. (2007), §15.6,
// Table 15.6.1 gives 20.1 for Δχ² at 99.73 % and ν = 6).
const nbChi2Six997 = 20.06

// TestJacobianSTMAgainstFDNBody: the Jacobian from the n-body state
// transition matrix against the fit's central differences of n-body
// residuals, on the invented cases' arcs and on a year of them.
//
// Tolerance, 1e-6 of each column's norm, from the integrator's stated
// tolerance (nbody.DefaultTolerance = 1e-12 of the distance per step). The
// two integrations of a central difference, started 1e-6·|r| apart, take
// step sizes that differ by ~1e-6 of themselves (the step control is smooth
// in the state), so their truncation errors cancel but for ~1e-6 of
// 1e-12·|r| per step; only where the step control switches its order
// between the two (a discrete choice) does a whole local error, 1e-12·|r|,
// enter the difference: 1e-12/(2·1e-6) = 5e-7 of the column. The
// variational equations, integrated on the same steps, err by about the
// state's 1e-12 relative per step (2e-10 over 200 steps); the rounding of
// the differences adds ~1e-9 (fdRelStep), the light-time partials'
// neglected terms ~1e-9 (observePartials). Measured: below 1e-8.
func TestJacobianSTMAgainstFDNBody(t *testing.T) {
	for _, c := range dcCases() {
		truth := nbTruth(t, c)
		x := stateVector(truth)
		ts, ss := c.schedule()
		obs := nbSynthObservations(t, truth, ts, ss, 0.5, nil)
		obs[3].Corr = 0.4
		w := mtCompareJacobians(t, c.name, obs, truth.Epoch, NBody, x, 1e-6)
		ts, ss = nbYearSchedule(c, 40, 2, 365)
		obs = nbSynthObservations(t, truth, ts, ss, 0.5, rand.New(rand.NewPCG(1, 2)))
		wy := mtCompareJacobians(t, c.name+", a year", obs, truth.Epoch, NBody, x, 1e-6)
		t.Logf("%s: worst column disagreement %.2g (arc), %.2g (a year)", c.name, w, wy)
	}
}

// TestCorrectNBodyRoundTrip: noise-free observations over a year, made by
// the n-body path, are fitted back from a start 0.1 % off to the truth.
// The correction stops when the step left is below 1e-5 σ (Correct's
// convergence test); the integration's own noise, 1e-11 au over a year
// (nbody.DefaultTolerance's stated figure), moves the computed places by
// ~1e-11 rad, 4e-6 σ of a 0.5″ observation. The solution must lie within
// 1e-3 σ of the truth in the metric of its covariance, with χ² below 1e-6
// (a residual of 1e-11 rad is 4e-6 σ; 2·100 such squares are 3e-9).
func TestCorrectNBodyRoundTrip(t *testing.T) {
	c := dcCases()[0]
	truth := nbTruth(t, c)
	ts, ss := nbYearSchedule(c, 50, 2, 365)
	obs := nbSynthObservations(t, truth, ts, ss, 0.5, nil)
	start := dcPerturbed(truth, 1e-3, rand.New(rand.NewPCG(3, 4)))
	sol, err := Correct(obs, start, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if MotionName(sol.State.Motion) != DynamicsNBody {
		t.Errorf("dynamics %s", MotionName(sol.State.Motion))
	}
	if d := mtSigmaDistance(t, truth, sol.State, sol.Cov); d > 1e-3 {
		t.Errorf("solution %.3g σ from the truth", d)
	}
	if sol.Chi2 > 1e-6 {
		t.Errorf("χ² %.3g on noise-free data", sol.Chi2)
	}
	// The two-body fit of the same year cannot follow the planets' pull:
	// its residuals are far above the observations' σ.
	two := start
	two.Motion = nil
	if s2, err := Correct(obs, two, Options{KeepAll: true}); err == nil {
		t.Logf("two-body fit of the n-body year: rms %.2f″, χ²/dof %.3g (n-body: rms %.2g″)", s2.RMSArcsec, s2.Chi2DoF, sol.RMSArcsec)
		if s2.RMSArcsec < 0.5 {
			t.Errorf("the two-body fit of a year of perturbed motion has rms %.3f″, below the observations' σ", s2.RMSArcsec)
		}
	}
}

// TestDetermineNBody: Determine with the perturbed motion, from nothing, on
// noisy (0.5″) observations of each invented case over a year (the
// near-Earth object and the comet are the cases where Gauss's method on the
// whole year fails and the arc must be extended): the truth, moved to the
// solution's epoch, lies within the 99.73 % region of the six-parameter
// covariance (nbChi2Six997), χ²/dof below 1.5 (its 1σ spread on 194 degrees
// of freedom is √(2/194) = 0.1).
func TestDetermineNBody(t *testing.T) {
	for _, c := range dcCases() {
		truth := nbTruth(t, c)
		ts, ss := nbYearSchedule(c, 50, 2, 365)
		obs := nbSynthObservations(t, truth, ts, ss, 0.5, rand.New(rand.NewPCG(5, 6)))
		sol, err := Determine(obs, Options{Motion: NBody})
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		d := mtSigmaDistance(t, nbTruthAt(t, truth, sol.State.Epoch), sol.State, sol.Cov)
		if d*d > nbChi2Six997 {
			t.Errorf("%s: truth %.2f σ from the solution (χ² %.1f > %.2f)", c.name, d, d*d, nbChi2Six997)
		}
		// The outlier rule flags a Gaussian observation with probability
		// 0.27 %: 0.27 of 100 expected, four or more with probability 2e-4.
		if sol.Chi2DoF > 1.5 || sol.NumUsed < len(obs)-3 {
			t.Errorf("%s: χ²/dof %.3g, %d of %d used", c.name, sol.Chi2DoF, sol.NumUsed, len(obs))
		}
		t.Logf("%s: %.2f σ; %s", c.name, d, sol.Notes[0])
	}
}

// TestPredictNBody: the perturbed orbit fitted to a 60-day arc predicts the
// truth 90 days on within its 3-σ ellipse (Mahalanobis distance ≤ 3,
// squared ≤ 9 < 11.83, the 99.73 % level of two degrees of freedom: a
// miss has probability 1.1 % per instant); the sampled region from its
// covariance, integrated, agrees with the linear one (orbit.CompareLinear's
// rule); the samples moved to the instant by Propagated give the same
// places as those integrated to it directly (the anchor is the instant
// itself, so the two routes are the same computation: 1e-12 rad).
func TestPredictNBody(t *testing.T) {
	c := dcCases()[0]
	truth := nbTruth(t, c)
	ts, ss := nbYearSchedule(c, 12, 3, 60)
	obs := nbSynthObservations(t, truth, ts, ss, 0.5, rand.New(rand.NewPCG(7, 8)))
	sol, err := Determine(obs, Options{Motion: NBody})
	if err != nil {
		t.Fatal(err)
	}
	last := ts[len(ts)-1]
	at := []astro.JD{last.AddDays(30), last.AddDays(90)}
	preds, err := sol.PredictAll(at, dcAlderRidge)
	if err != nil {
		t.Fatal(err)
	}
	var gs []ephem.ObserverGeometry
	for k, u := range at {
		g, err := ephem.ObserverGeometryAt(u, dcAlderRidge, 0)
		if err != nil {
			t.Fatal(err)
		}
		gs = append(gs, g)
		tp := nbSynthObservations(t, truth, []astro.JD{u}, []*astro.Site{dcAlderRidge}, 0.5, nil)[0]
		m := skyMahalanobis(preds[k].RA, preds[k].Dec, preds[k].CovArcsec2, tp.RA, tp.Dec)
		t.Logf("+%.0f d: truth %.2f σ from the place; 3-σ semi-major %.1f″", u.Sub(last), m, 3*math.Sqrt(math.Max(preds[k].CovArcsec2[0][0], preds[k].CovArcsec2[1][1])))
		if m > 3 {
			t.Errorf("+%.0f d: the truth is %.2f σ from the prediction", u.Sub(last), m)
		}
	}
	mc := MonteCarloSettings{N: 500, Seed: 3}
	set, err := CovarianceOrbits(sol.State, sol.Cov, mc)
	if err != nil {
		t.Fatal(err)
	}
	regions, err := set.PredictAll(gs, mc)
	if err != nil {
		t.Fatal(err)
	}
	moved, err := set.Propagated([]astro.JD{gs[0].TDB, gs[1].TDB}, mc)
	if err != nil {
		t.Fatal(err)
	}
	for k := range gs {
		if differ, why := CompareLinear(preds[k].RA, preds[k].Dec, preds[k].CovArcsec2, regions[k]); differ {
			t.Errorf("at %d: %s", k, why)
		}
		r2, err := moved[k].Predict(gs[k], mc)
		if err != nil {
			t.Fatal(err)
		}
		for i := range r2.Samples {
			if d := astro.Separation(r2.Samples[i].RA, r2.Samples[i].Dec, regions[k].Samples[i].RA, regions[k].Samples[i].Dec); d > 1e-12 {
				t.Fatalf("at %d: sample %d: moved and integrated places %.3g rad apart", k, i, float64(d))
			}
		}
	}
}

// skyMahalanobis returns the Mahalanobis distance of (ra, dec) from the
// place (ra0, dec0) under the sky covariance cov (arcsec², RA·cos δ and
// Dec).
func skyMahalanobis(ra0, dec0 astro.Angle, cov [2][2]float64, ra, dec astro.Angle) float64 {
	x, y := Residual(ra, dec, astro.UnitVector(ra0, dec0))
	as := float64(astro.Arcsecond)
	x, y = x/as, y/as
	a, b, c := cov[0][0], cov[0][1], cov[1][1]
	return math.Sqrt((c*x*x - 2*b*x*y + a*y*y) / (a*c - b*b))
}

// TestEncountersReported: an invented near-Earth object placed 0.02 au from
// the Earth, moving 8.7 km/s relative to it, is observed for 10 days each
// side of the approach; the fitted solution reports the approach the
// integration found (the Earth, at most 0.02 au, within the arc), and a
// prediction through it reports it too.
func TestEncountersReported(t *testing.T) {
	tEnc := astro.JD{Day: 2461460.5, Scale: astro.TDB}
	ep, ev, err := ephem.HeliocentricICRS(ephem.Earth, tEnc)
	if err != nil {
		t.Fatal(err)
	}
	// Sunward of the Earth and off the ecliptic, moving across the line of
	// sight.
	off := r3.Add(r3.Scale(-0.015/r3.Norm(ep), ep), r3.Vec{Z: 0.0132})
	dir := r3.Unit(r3.Cross(off, r3.Vec{X: 1, Y: 1}))
	truth := State{Epoch: tEnc, Pos: r3.Add(ep, off), Vel: r3.Add(ev, r3.Scale(0.005, dir)), Motion: NBody}
	var ts []astro.JD
	var ss []*astro.Site
	for d := -10; d <= 10; d += 2 {
		for j := range 3 {
			ts = append(ts, astro.JD{Day: tEnc.Day + float64(d), Frac: 0.16 + float64(j)*0.02, Scale: astro.UTC})
			ss = append(ss, dcAlderRidge)
		}
	}
	obs := nbSynthObservations(t, truth, ts, ss, 0.5, rand.New(rand.NewPCG(9, 10)))
	sol, err := Correct(obs, dcPerturbed(truth, 1e-5, rand.New(rand.NewPCG(11, 12))), Options{})
	if err != nil {
		t.Fatal(err)
	}
	var earth *nbody.Encounter
	for i := range sol.Encounters {
		if sol.Encounters[i].Body == "Earth" {
			earth = &sol.Encounters[i]
		}
	}
	if earth == nil {
		t.Fatalf("no encounter with the Earth reported: %+v", sol.Encounters)
	}
	if earth.DistanceAU > 0.0201 || math.Abs(earth.TDB.Sub(tEnc)) > 10 {
		t.Errorf("Earth encounter at %v, %.4f au; want within the arc, ≤ 0.02 au", earth.TDB, earth.DistanceAU)
	}
	p, err := sol.Predict(ts[len(ts)-1].AddDays(5), dcAlderRidge)
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, e := range p.Encounters {
		found = found || e.Body == "Earth"
	}
	if !found {
		t.Errorf("the prediction through the approach reports no Earth encounter: %+v", p.Encounters)
	}
	t.Logf("Earth encounter: %v TDB, %.5f au", earth.TDB, earth.DistanceAU)
}
