package fit

import (
	"math/rand/v2"
	"testing"
)

// TestAutoChoiceCoverage checks the search region the auto choice reports,
// end to end: on the invented three-night, two-site main-belt arc of the
// parallax study (newMainBeltScenario, truth from ephem), 300 noisy
// realisations are compared with Compare and the chosen model predicts the
// +1-day place. The truth must fall inside the 3-σ ellipse about 98.9 % of
// the time (1 − e^−4.5 for a 2-D Gaussian); with 300 trials the fraction's
// standard error is √(0.989·0.011/300) ≈ 0.6 %, so 97 % is a bound about three
// standard errors below the nominal value. The same predictions without the
// cross-validated model error (Solution.ModelErrorArcsec) are logged: the
// chosen quadratic is biased by about 1.5″ one day out on this arc, so they
// cover less (measured with this seed: 98.0 % reported, 88.7 % formal).
func TestAutoChoiceCoverage(t *testing.T) {
	sc := newMainBeltScenario(t, 0.5)
	rng := rand.New(rand.NewPCG(20271201, 3))
	const n = 300
	inside, insideFormal := 0, 0
	chosen := map[string]int{}
	for i := 0; i < n; i++ {
		tr, err := NewTrack(sc.noisySet(rng), sc.sites)
		if err != nil {
			t.Fatalf("trial %d: NewTrack: %v", i, err)
		}
		c, err := Compare(tr, CandidateModels(tr), Settings{}, nil, nil)
		if err != nil {
			t.Fatalf("trial %d: Compare: %v", i, err)
		}
		chosen[c.Chosen]++
		pr, err := c.Solution.Predict(sc.truthUTC, &sc.truthSite)
		if err != nil {
			t.Fatalf("trial %d: Predict: %v", i, err)
		}
		e, no := calibSkyOffsetArcsec(t, pr.RA, pr.Dec, sc.truth.RA, sc.truth.Dec)
		if calibInsideEllipse(pr.Ellipse(3), e, no) {
			inside++
		}
		formal := *c.Solution
		formal.ModelErrorArcsec = 0
		pf, err := formal.Predict(sc.truthUTC, &sc.truthSite)
		if err != nil {
			t.Fatalf("trial %d: Predict (formal): %v", i, err)
		}
		if calibInsideEllipse(pf.Ellipse(3), e, no) {
			insideFormal++
		}
	}
	f, ff := float64(inside)/n, float64(insideFormal)/n
	t.Logf("auto choice, +1 d: %.1f %% inside the reported 3-σ ellipse, %.1f %% inside the formal one; models chosen %v",
		100*f, 100*ff, chosen)
	if f < 0.97 {
		t.Errorf("auto choice: %.1f %% of truths inside the reported 3-σ ellipse, want ≥ 97 %% (98.9 %% nominal)", 100*f)
	}
}
