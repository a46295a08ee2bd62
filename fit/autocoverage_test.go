package fit

import (
	"math/rand/v2"
	"testing"
)

// TestAutoChoiceCoverage checks the search region Compare reports, end to
// end, on the invented three-night, two-site main-belt arc of the parallax
// study (newMainBeltScenario, truth from ephem): 300 noisy realisations are
// compared with Compare, under each model-error rule, and the +1-day place
// is predicted by the auto choice and by poly3 named as the command line's
// --model does.
//
// The truth must fall inside a right covariance's 3-σ ellipse about 98.9 %
// of the time (1 − e^−4.5 for a 2-D Gaussian); with 300 trials the
// fraction's standard error is √(0.989·0.011/300) ≈ 0.6 %, so 97 % is a
// bound about three standard errors below the nominal value. Two checks use
// it:
//
//   - the auto choice under the default rule (ModelErrorExcess), as the
//     command line reports it. The auto rule mostly picks poly2, which is
//     biased by about 1.5″ one day out on this arc (its formal ellipse holds
//     the truth in 88.7 % with this seed); the excess rule's widening covers
//     the bias (measured: 98.0 %).
//   - poly3 under the calibrated rule (ModelErrorCalibrated). poly3 is, to
//     this precision, the right form for this arc (noise-free it misses the
//     +1-day place by 0.015″, see TestDiurnalParallaxCoverage).
//
// The auto choice under the calibrated rule is logged, not bounded: the
// folds, fitted to two nights, predict the third with an uncertainty larger
// than poly2's bias, their misses are within it (normalised mean square
// about 1), so no model error is added and the coverage is the formal one.
func TestAutoChoiceCoverage(t *testing.T) {
	sc := newMainBeltScenario(t, 0.5)
	const n = 300
	type tally struct{ inside, formal, widened int }
	pct := func(k int) float64 { return 100 * float64(k) / n }
	for _, rule := range []ModelErrorRule{ModelErrorExcess, ModelErrorCalibrated} {
		rng := rand.New(rand.NewPCG(20271201, 3))
		var auto, p3 tally
		chosen := map[string]int{}
		s := Settings{ModelError: rule}
		for i := 0; i < n; i++ {
			tr, err := NewTrack(sc.noisySet(rng), sc.sites)
			if err != nil {
				t.Fatalf("trial %d: NewTrack: %v", i, err)
			}
			c, err := Compare(tr, CandidateModelsWith(tr, s), s, nil, nil)
			if err != nil {
				t.Fatalf("trial %d: Compare: %v", i, err)
			}
			chosen[c.Chosen]++
			for _, k := range []struct {
				name string
				t    *tally
			}{{c.Chosen, &auto}, {"poly3", &p3}} {
				if err := c.Choose(k.name); err != nil {
					t.Fatalf("trial %d: %v", i, err)
				}
				sol := c.Solution
				if sol.ModelErrorArcsec > 0 {
					k.t.widened++
				}
				pr, err := sol.Predict(sc.truthUTC, &sc.truthSite)
				if err != nil {
					t.Fatalf("trial %d: Predict: %v", i, err)
				}
				e, no := calibSkyOffsetArcsec(t, pr.RA, pr.Dec, sc.truth.RA, sc.truth.Dec)
				if calibInsideEllipse(pr.Ellipse(3), e, no) {
					k.t.inside++
				}
				formal := *sol
				formal.ModelErrorArcsec = 0
				pf, err := formal.Predict(sc.truthUTC, &sc.truthSite)
				if err != nil {
					t.Fatalf("trial %d: Predict (formal): %v", i, err)
				}
				if calibInsideEllipse(pf.Ellipse(3), e, no) {
					k.t.formal++
				}
			}
		}
		for _, k := range []struct {
			name string
			t    tally
		}{{"auto choice", auto}, {"poly3", p3}} {
			t.Logf("%s rule, %s, +1 d: %.1f %% inside the reported 3-σ ellipse, %.1f %% inside the formal one; model error added in %d of %d; models chosen %v",
				rule, k.name, pct(k.t.inside), pct(k.t.formal), k.t.widened, n, chosen)
		}
		switch rule {
		case ModelErrorExcess:
			if f := float64(auto.inside) / n; f < 0.97 {
				t.Errorf("excess rule, auto choice: %.1f %% of truths inside the reported 3-σ ellipse, want ≥ 97 %% (98.9 %% nominal)", 100*f)
			}
		case ModelErrorCalibrated:
			if f := float64(p3.inside) / n; f < 0.97 {
				t.Errorf("calibrated rule, poly3: %.1f %% of truths inside the reported 3-σ ellipse, want ≥ 97 %% (98.9 %% nominal)", 100*f)
			}
		}
	}
}
