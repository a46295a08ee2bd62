package orbit

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"arcfit/ephem"
)

// dcWithMagnitudes sets each observation's magnitude to the H, G magnitude of
// the place ephem computes for el (ephem.PlaceOfElements, Bowell et al. 1989
// via ephem.AsteroidMagnitudeHG) plus Gaussian noise of sigmaMag.
func dcWithMagnitudes(t *testing.T, obs []Observation, el ephem.Elements, sigmaMag float64, rng *rand.Rand) {
	t.Helper()
	for i := range obs {
		o := &obs[i]
		site := dcAlderRidge
		if o.Site == dcBirchHollow.Name {
			site = dcBirchHollow
		}
		pl, err := ephem.PlaceOfElements(el, o.Geo.UTC, ephem.Observer{Site: site})
		if err != nil {
			t.Fatal(err)
		}
		o.Mag, o.Band = pl.Mag, "V"
		if rng != nil {
			o.Mag += sigmaMag * rng.NormFloat64()
		}
	}
}

// Noise-free magnitudes made with H = 15.2, G = 0.15 (invented) give H back
// to 1e-6 mag (the places agree to ~1e-12 au, see TestObserveMatchesEphem),
// and the predicted magnitude 20 days on matches ephem's for the same H, G.
// With 0.1-mag Gaussian noise (seeded) H lies within 3σ of the truth, and
// σ_H is near 0.1/√20 = 0.022 mag (the sample σ of 20 values has a relative
// standard error 1/√38 = 16 %; 50 % is allowed).
func TestFitH(t *testing.T) {
	c := dcCases()[0]
	el := c.el
	el.H, el.G = 15.2, 0.15
	ts, ss := c.schedule()
	obs := dcSynthObservations(t, c.el, ts, ss, 0.5, nil)
	dcWithMagnitudes(t, obs, el, 0, nil)
	sol, err := Correct(obs, c.truth(t), Options{})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(sol.H-15.2) > 1e-6 || sol.NumMag != len(obs) || sol.G != 0.15 {
		t.Errorf("noise-free H = %.9f (%d magnitudes, G = %g), want 15.2", sol.H, sol.NumMag, sol.G)
	}
	at := ts[len(ts)-1].AddDays(20)
	pr, err := sol.Predict(at, dcBirchHollow)
	if err != nil {
		t.Fatal(err)
	}
	pl, err := ephem.PlaceOfElements(el, at, ephem.Observer{Site: dcBirchHollow})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(pr.Mag-pl.Mag) > 1e-6 {
		t.Errorf("predicted V = %.6f, ephem %.6f", pr.Mag, pl.Mag)
	}
	fel, _, err := sol.Elements()
	if err != nil || math.Abs(fel.H-15.2) > 1e-6 || fel.G != 0.15 {
		t.Errorf("elements H = %g, G = %g (%v)", fel.H, fel.G, err)
	}

	rng := rand.New(rand.NewPCG(41, 42))
	dcWithMagnitudes(t, obs, el, 0.1, rng)
	sol, err = Correct(obs, c.truth(t), Options{})
	if err != nil {
		t.Fatal(err)
	}
	want := 0.1 / math.Sqrt(float64(len(obs)))
	if math.Abs(sol.H-15.2) > 3*sol.HSigma || math.Abs(sol.HSigma/want-1) > 0.5 {
		t.Errorf("noisy H = %.3f ± %.3f, want 15.2 ± %.3f", sol.H, sol.HSigma, want)
	}
}

// Without magnitudes there is no H: NaN, and the predicted magnitude is NaN
// (documented); with one magnitude σ_H is unknown and a note says so; mixed
// bands are averaged with a note.
func TestFitHEdgeCases(t *testing.T) {
	c := dcCases()[0]
	ts, ss := c.schedule()
	obs := dcSynthObservations(t, c.el, ts, ss, 0.5, nil)
	sol, err := Correct(obs, c.truth(t), Options{})
	if err != nil {
		t.Fatal(err)
	}
	if !math.IsNaN(sol.H) || sol.NumMag != 0 || sol.HSigma != 0 {
		t.Errorf("no magnitudes: H = %g ± %g (%d)", sol.H, sol.HSigma, sol.NumMag)
	}
	pr, err := sol.Predict(ts[0], nil)
	if err != nil || !math.IsNaN(pr.Mag) {
		t.Errorf("no H: Mag = %g (%v)", pr.Mag, err)
	}

	el := c.el
	el.H, el.G = 15.2, 0.15
	dcWithMagnitudes(t, obs, el, 0, nil)
	one := make([]Observation, len(obs))
	copy(one, obs)
	for i := 1; i < len(one); i++ {
		one[i].Mag = math.NaN()
	}
	sol, err = Correct(one, c.truth(t), Options{})
	if err != nil {
		t.Fatal(err)
	}
	if sol.NumMag != 1 || sol.HSigma != 0 || !hasNote(sol, "one magnitude") {
		t.Errorf("one magnitude: %d, σ %g, notes %q", sol.NumMag, sol.HSigma, sol.Notes)
	}
	obs[2].Band = "R"
	sol, err = Correct(obs, c.truth(t), Options{})
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, n := range sol.Notes {
		if strings.Contains(n, "several bands") {
			found = true
		}
	}
	if !found {
		t.Errorf("mixed bands: notes %q", sol.Notes)
	}
}
