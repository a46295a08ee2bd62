package fit

import (
	"testing"

	"arcfit/astro"
)

// TestSavedFitPosition checks that a fit file's cheap place (the night
// plan's Positioner) is the linear prediction's place, for the two-body and
// the perturbed orbit, and lies within the region Predict reports when that
// region is sampled.
func TestSavedFitPosition(t *testing.T) {
	truth := nbTruthState(t)
	ts, ss := nbSchedule(10, 40)
	tr, err := NewTrack(nbSet(t, truth, ts, ss, 9), nbSites)
	if err != nil {
		t.Fatal(err)
	}
	c, err := Compare(tr, append(CandidateModels(tr), NBody()), Settings{}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	site := nbSites["Alder Ridge"]
	for _, model := range []string{"kepler", "nbody", "poly2"} {
		if err := c.Choose(model); err != nil {
			t.Fatal(err)
		}
		saved := NewSavedFit(c)
		for _, days := range []float64{1, 60} {
			u := ts[len(ts)-1].AddDays(days)
			ra, dec, err := saved.Position(u, &site)
			if err != nil {
				t.Fatalf("%s +%g d: %v", model, days, err)
			}
			p, err := saved.Predict(u, &site)
			if err != nil {
				t.Fatal(err)
			}
			d := astro.Separation(ra, dec, p.RA, p.Dec).Arcseconds()
			major := p.Ellipse(3).SemiMajorArcsec
			t.Logf("%s +%g d: Position %.3g″ from Predict's place (%s region, 3σ semi-major %.3g″)", model, days, d, p.Method, major)
			if p.Method != "montecarlo" && d > 1e-9 {
				t.Errorf("%s +%g d: Position is %.3g″ from the linear prediction's place", model, days, d)
			}
			if d > major {
				t.Errorf("%s +%g d: Position is %.3g″ from Predict's centre, outside its 3-σ region (%.3g″)", model, days, d, major)
			}
		}
	}
}
