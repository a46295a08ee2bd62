package orbit

import (
	"math"
	"math/rand/v2"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// The batch path of a Motion (one propagation to every instant, the light
// time by a two-body step from the state there, the Jacobian from the state
// transition matrix) run with two-body dynamics (tbMotion) must give what
// the two-body path (Motion nil) gives.
//
// The two routes to a place differ only by rounding: the two-body path
// propagates from the epoch to t − τ in one step, the batch path to t and
// then by −τ; each universal-variable propagation returns to its start to
// 1e-13 au over thousands of days (ephem.PropagateUniversal's stated round
// trip), so the places differ by at most ~2e-13 au/Δ. The tolerance per
// place is ten times that, 2e-12 au/Δ radians (4e-6″ at Δ = 0.1 au).
func mtPlaceTol(deltaAU float64) float64 { return 2e-12 / deltaAU }

// TestMotionResidualsMatchTwoBody: residuals of the batch path against the
// two-body path on the invented cases, within mtPlaceTol.
func TestMotionResidualsMatchTwoBody(t *testing.T) {
	for _, c := range dcCases() {
		ts, ss := c.schedule()
		obs := dcSynthObservations(t, c.el, ts, ss, 0.5, rand.New(rand.NewPCG(3, 4)))
		st := dcPerturbed(c.truth(t), 1e-4, rand.New(rand.NewPCG(5, 6)))
		r0, chi0, err := st.Residuals(obs, nil)
		if err != nil {
			t.Fatal(err)
		}
		sm := st
		sm.Motion = tbMotion{}
		r1, chi1, err := sm.Residuals(obs, nil)
		if err != nil {
			t.Fatal(err)
		}
		if len(r0) != len(r1) {
			t.Fatalf("%s: %d residuals, want %d", c.name, len(r1), len(r0))
		}
		worst := 0.0
		for i := range r0 {
			seen, err := st.Observe(obs[i/2].Geo)
			if err != nil {
				t.Fatal(err)
			}
			// r is whitened: radians over σ.
			d := math.Abs(r1[i]-r0[i]) * obs[i/2].SigmaRA
			if d > mtPlaceTol(seen.DeltaAU) {
				t.Errorf("%s: residual %d: batch %.15g, two-body %.15g (Δ %.3g rad, tolerance %.3g)", c.name, i, r1[i], r0[i], d, mtPlaceTol(seen.DeltaAU))
			}
			worst = math.Max(worst, d)
		}
		if math.Abs(chi1-chi0) > 1e-9*chi0 {
			t.Errorf("%s: χ² batch %.12g, two-body %.12g", c.name, chi1, chi0)
		}
		t.Logf("%s: largest difference %.2g rad", c.name, worst)
	}
}

// TestJacobianSTMAgainstFD: the Jacobian of the batch path from the state
// transition matrix (tbMotion's, by differences of the two-body
// propagation) against the fit's central differences of the residuals. Both
// err by ~1e-9 relative (rounding over a step of 1e-6, see fdRelStep and
// tbMotion); the light-time partials of observePartials neglect terms of
// relative order 1e-9 (its doc comment). Each column must agree to 1e-7 of
// its norm, as the two-body Jacobian agrees with the variational equations
// (TestJacobianAgainstVariational).
func TestJacobianSTMAgainstFD(t *testing.T) {
	for _, c := range dcCases() {
		ts, ss := c.schedule()
		obs := dcSynthObservations(t, c.el, ts, ss, 0.5, nil)
		obs[3].Corr = 0.4
		truth := c.truth(t)
		x := stateVector(truth)
		worst := mtCompareJacobians(t, c.name, obs, truth.Epoch, tbMotion{}, x, 1e-7)
		t.Logf("%s: worst column disagreement %.2g relative", c.name, worst)
	}
}

// mtCompareJacobians forms the Jacobian at x with motion m both ways and
// reports each column whose relative difference exceeds tol; it returns
// the worst.
func mtCompareJacobians(t *testing.T, name string, obs []Observation, epoch astro.JD, m Motion, x [6]float64, tol float64) float64 {
	t.Helper()
	cr := newCorrector(obs, epoch)
	cr.motion = m
	var err error
	cr.r, _, err = cr.residuals(x, cr.r)
	if err != nil {
		t.Fatal(err)
	}
	dFD, err := cr.jacobianFD(x)
	if err != nil {
		t.Fatal(err)
	}
	fd := mat.DenseCopyOf(cr.jac)
	dSTM, err := cr.jacobianSTM(x)
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	rows, _ := fd.Dims()
	for k := range 6 {
		diff, norm := 0.0, 0.0
		for i := range rows {
			a := fd.At(i, k) * dFD[k]
			b := cr.jac.At(i, k) * dSTM[k]
			diff += (a - b) * (a - b)
			norm += a * a
		}
		rel := math.Sqrt(diff / norm)
		worst = math.Max(worst, rel)
		if rel > tol {
			t.Errorf("%s: column %d: STM and finite differences differ by %.3g relative (tolerance %.1g)", name, k, rel, tol)
		}
	}
	return worst
}

// mtSigmaDistance returns the distance of b from a in the metric of the
// covariance cov: √(δᵀ·cov⁻¹·δ), in σ.
func mtSigmaDistance(t *testing.T, a, b State, cov *mat.SymDense) float64 {
	t.Helper()
	xa, xb := stateVector(a), stateVector(b)
	d := mat.NewVecDense(6, nil)
	for i := range 6 {
		d.SetVec(i, xb[i]-xa[i])
	}
	var ch mat.Cholesky
	if !ch.Factorize(cov) {
		t.Fatal("covariance not positive definite")
	}
	var y mat.VecDense
	if err := ch.SolveVecTo(&y, d); err != nil {
		t.Fatal(err)
	}
	return math.Sqrt(mat.Dot(d, &y))
}

// TestCorrectWithMotionMatchesTwoBody: the differential correction through
// the batch path (tbMotion) against the two-body correction from the same
// start. Both stop when the step left is below 1e-5 σ (Correct's
// convergence test: |Uᵀr|² ≤ 1e-10·χ² + 1e-10); the solutions must agree to
// 1e-3 σ in the metric of the covariance, χ² to 1e-8 relative and the
// covariances (both (JᵀJ)⁻¹, their Jacobians good to ~1e-9) to 1e-6 of
// each variance.
func TestCorrectWithMotionMatchesTwoBody(t *testing.T) {
	for _, c := range dcCases() {
		ts, ss := c.schedule()
		obs := dcSynthObservations(t, c.el, ts, ss, 0.5, rand.New(rand.NewPCG(11, 12)))
		start := dcPerturbed(c.truth(t), 1e-3, rand.New(rand.NewPCG(13, 14)))
		s0, err := Correct(obs, start, Options{})
		if err != nil {
			t.Fatalf("%s: two-body: %v", c.name, err)
		}
		start.Motion = tbMotion{}
		s1, err := Correct(obs, start, Options{})
		if err != nil {
			t.Fatalf("%s: batch: %v", c.name, err)
		}
		if s1.State.Motion == nil {
			t.Errorf("%s: the solution lost its Motion", c.name)
		}
		if d := mtSigmaDistance(t, s0.State, s1.State, s0.Cov); d > 1e-3 {
			t.Errorf("%s: solutions %.3g σ apart", c.name, d)
		}
		if math.Abs(s1.Chi2-s0.Chi2) > 1e-8*s0.Chi2 {
			t.Errorf("%s: χ² %.12g, two-body %.12g", c.name, s1.Chi2, s0.Chi2)
		}
		for i := range 6 {
			if a, b := s1.Cov.At(i, i), s0.Cov.At(i, i); math.Abs(a-b) > 1e-6*b {
				t.Errorf("%s: variance %d: %.9g, two-body %.9g", c.name, i, a, b)
			}
		}
		if s1.NumUsed != s0.NumUsed || len(s1.Residuals) != len(s0.Residuals) {
			t.Errorf("%s: %d used, two-body %d", c.name, s1.NumUsed, s0.NumUsed)
		}
		for i := range s0.Residuals {
			a, b := s1.Residuals[i], s0.Residuals[i]
			if a.Flagged != b.Flagged || math.Abs(a.DEArcsec-b.DEArcsec) > 1e-3*0.5 || math.Abs(a.DNArcsec-b.DNArcsec) > 1e-3*0.5 {
				t.Errorf("%s: residual %d: %+v, two-body %+v", c.name, i, a, b)
			}
		}
	}
}

// TestPredictWithMotionMatchesTwoBody: the linear prediction through the
// batch path (the STM and the light-time partials) against the two-body
// prediction (central differences): the place within mtPlaceTol, the
// covariance's elements to 1e-6 of its largest (both Jacobians good to
// ~1e-9), the rate (a difference over ±1 min of places good to mtPlaceTol)
// to 1e-6″/min. PredictAll must give the same as Predict at each instant.
func TestPredictWithMotionMatchesTwoBody(t *testing.T) {
	c := dcCases()[1]
	ts, ss := c.schedule()
	obs := dcSynthObservations(t, c.el, ts, ss, 0.5, rand.New(rand.NewPCG(21, 22)))
	sol, err := Correct(obs, c.truth(t), Options{})
	if err != nil {
		t.Fatal(err)
	}
	solM := *sol
	solM.State.Motion = tbMotion{}
	last := ts[len(ts)-1]
	at := []astro.JD{last.AddDays(-3.3), last.AddDays(5), last.AddDays(30), last.AddDays(90)}
	all, err := solM.PredictAll(at, dcAlderRidge)
	if err != nil {
		t.Fatal(err)
	}
	for k, u := range at {
		p0, err := sol.Predict(u, dcAlderRidge)
		if err != nil {
			t.Fatal(err)
		}
		p1, err := solM.Predict(u, dcAlderRidge)
		if err != nil {
			t.Fatal(err)
		}
		if d := astro.Separation(p0.RA, p0.Dec, p1.RA, p1.Dec); float64(d) > mtPlaceTol(p0.DeltaAU) {
			t.Errorf("+%d: places %.3g rad apart", k, float64(d))
		}
		big := math.Max(p0.CovArcsec2[0][0], p0.CovArcsec2[1][1])
		for a := range 2 {
			for b := range 2 {
				if d := math.Abs(p1.CovArcsec2[a][b] - p0.CovArcsec2[a][b]); d > 1e-6*big {
					t.Errorf("at %d: covariance [%d][%d] %.9g, two-body %.9g", k, a, b, p1.CovArcsec2[a][b], p0.CovArcsec2[a][b])
				}
			}
		}
		if d := math.Abs(p1.RateArcsecPerMin - p0.RateArcsecPerMin); d > 1e-6 {
			t.Errorf("at %d: rate %.9g″/min, two-body %.9g", k, p1.RateArcsecPerMin, p0.RateArcsecPerMin)
		}
		if p1.Mag != p0.Mag && !(math.IsNaN(p1.Mag) && math.IsNaN(p0.Mag)) || math.Abs(p1.DeltaAU-p0.DeltaAU) > 1e-12 {
			t.Errorf("at %d: Δ %.15g (two-body %.15g), mag %v (%v)", k, p1.DeltaAU, p0.DeltaAU, p1.Mag, p0.Mag)
		}
		if a := all[k]; a.RA != p1.RA || a.Dec != p1.Dec || a.CovArcsec2 != p1.CovArcsec2 || a.RateArcsecPerMin != p1.RateArcsecPerMin {
			t.Errorf("at %d: PredictAll differs from Predict", k)
		}
	}
}

// TestSamplesWithMotionMatchTwoBody: orbits drawn from a covariance with a
// Motion carry it; their sampled region through the batch path
// (PredictAll, and Propagated then Predict) agrees with the two-body one:
// each sampled place within mtPlaceTol, so the centre within it and the
// covariance to 1e-9 of its largest element (a relative change of 2e-12/Δ
// rad in places spread over ≥ 0.01″).
func TestSamplesWithMotionMatchTwoBody(t *testing.T) {
	st, cov := mcTestSolution(t)
	mc := MonteCarloSettings{N: 300, Seed: 9}
	s0, err := CovarianceOrbits(st, cov, mc)
	if err != nil {
		t.Fatal(err)
	}
	stM := st
	stM.Motion = tbMotion{}
	s1, err := CovarianceOrbits(stM, cov, mc)
	if err != nil {
		t.Fatal(err)
	}
	for i := range s1.States {
		if s1.States[i].Motion == nil || s1.States[i].Pos != s0.States[i].Pos || s1.States[i].Vel != s0.States[i].Vel {
			t.Fatalf("orbit %d: drawn differently with a Motion", i)
		}
	}
	var gs []ephem.ObserverGeometry
	for _, d := range []float64{1, 40} {
		g, err := ephem.ObserverGeometryAt(astro.JD{Day: 2461480.5 + d, Frac: 0.2, Scale: astro.UTC}, dcAlderRidge, 0)
		if err != nil {
			t.Fatal(err)
		}
		gs = append(gs, g)
	}
	r1, err := s1.PredictAll(gs, mc)
	if err != nil {
		t.Fatal(err)
	}
	moved, err := s1.Propagated([]astro.JD{gs[0].TDB, gs[1].TDB}, mc)
	if err != nil {
		t.Fatal(err)
	}
	for j, g := range gs {
		r0, err := s0.Predict(g, mc)
		if err != nil {
			t.Fatal(err)
		}
		r2, err := moved[j].Predict(g, mc)
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range []*SampledRegion{r1[j], r2} {
			if len(r.Samples) != len(r0.Samples) || r.Failed != 0 {
				t.Fatalf("at %d: %d samples (%d failed), want %d", j, len(r.Samples), r.Failed, len(r0.Samples))
			}
			tol := mtPlaceTol(r0.DeltaAU * 0.5)
			for i := range r.Samples {
				if d := astro.Separation(r.Samples[i].RA, r.Samples[i].Dec, r0.Samples[i].RA, r0.Samples[i].Dec); float64(d) > tol {
					t.Errorf("at %d: sample %d %.3g rad from the two-body one", j, i, float64(d))
				}
			}
			if d := astro.Separation(r.RA, r.Dec, r0.RA, r0.Dec); float64(d) > tol {
				t.Errorf("at %d: centre %.3g rad from the two-body one", j, float64(d))
			}
			big := math.Max(r0.CovArcsec2[0][0], r0.CovArcsec2[1][1])
			for a := range 2 {
				for b := range 2 {
					if d := math.Abs(r.CovArcsec2[a][b] - r0.CovArcsec2[a][b]); d > 1e-9*big {
						t.Errorf("at %d: covariance [%d][%d] %.12g, two-body %.12g", j, a, b, r.CovArcsec2[a][b], r0.CovArcsec2[a][b])
					}
				}
			}
		}
	}
}

// TestDetermineWithMotion: Determine with a Motion (tbMotion) corrects the
// two-body orbit with it and ends where the two-body Determine ends (to
// 1e-3 σ, as TestCorrectWithMotionMatchesTwoBody), saying so in its notes.
func TestDetermineWithMotion(t *testing.T) {
	c := dcCases()[0]
	ts, ss := c.schedule()
	obs := dcSynthObservations(t, c.el, ts, ss, 0.5, rand.New(rand.NewPCG(31, 32)))
	s0, err := Determine(obs, Options{})
	if err != nil {
		t.Fatal(err)
	}
	s1, err := Determine(obs, Options{Motion: tbMotion{}})
	if err != nil {
		t.Fatal(err)
	}
	if s1.State.Motion == nil || s1.Start != s0.Start {
		t.Errorf("motion %v, start %q (two-body %q)", s1.State.Motion, s1.Start, s0.Start)
	}
	if s1.State.Epoch != s0.State.Epoch {
		t.Fatalf("epoch %v, two-body %v", s1.State.Epoch, s0.State.Epoch)
	}
	if d := mtSigmaDistance(t, s0.State, s1.State, s0.Cov); d > 1e-3 {
		t.Errorf("solutions %.3g σ apart", d)
	}
	if !hasNote(s1, "corrected with the twobody-test dynamics") {
		t.Errorf("notes %q", s1.Notes)
	}
}

// TestPathAnchors: a Path answers for each instant asked, duplicates
// included, in the order asked; a two-body Path integrates nothing and
// refuses a state transition matrix.
func TestPathAnchors(t *testing.T) {
	st := dcCases()[0].truth(t)
	ts := []astro.JD{st.Epoch.AddDays(10), st.Epoch.AddDays(-5), st.Epoch.AddDays(10)}
	if _, err := st.Propagate(ts, true); err == nil {
		t.Error("a two-body path gave a state transition matrix")
	}
	sm := st
	sm.Motion = tbMotion{}
	p, err := sm.Propagate(ts, true)
	if err != nil {
		t.Fatal(err)
	}
	for k, u := range ts {
		a, err := p.Anchor(k)
		if err != nil {
			t.Fatal(err)
		}
		pos, _, err := st.At(u)
		if err != nil {
			t.Fatal(err)
		}
		if a.Motion != nil || a.Epoch != u || r3.Norm(r3.Sub(a.Pos, pos)) > 1e-12 {
			t.Errorf("anchor %d: %+v, want the two-body state at %v", k, a, u)
		}
		phi, ok := p.STM(k)
		if !ok || math.Abs(phi[0]-1) > 0.5 {
			t.Errorf("anchor %d: STM %v", k, ok)
		}
	}
}
