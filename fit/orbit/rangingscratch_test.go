package orbit

import (
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"arcfit/astro"
	"arcfit/ephem"
)

func TestScratchCoverage(t *testing.T) {
	jfc := ephem.Elements{Name: "JFC", A: 0, Q: 1.4, E: 0.55, I: 12 * astro.Degree, Node: 140 * astro.Degree, Peri: 10 * astro.Degree,
		Tp: astro.JD{Day: 2461430, Frac: 0.5, Scale: astro.TT}, H: math.NaN(), G: math.NaN()}
	npc := ephem.Elements{Name: "NPC", A: 0, Q: 1.9, E: 0.9995, I: 71 * astro.Degree, Node: 150 * astro.Degree, Peri: 350 * astro.Degree,
		Tp: astro.JD{Day: 2461480, Frac: 0.5, Scale: astro.TT}, H: math.NaN(), G: math.NaN()}
	ts, ss := rgTwoNights(5, 5)
	for _, e := range []ephem.Elements{rgMainBelt, rgNEO, jfc, npc} {
		in := 0
		n := 30
		var tot time.Duration
		var worst float64
		for k := range n {
			rng := rand.New(rand.NewPCG(uint64(k), 11))
			obs, truth := rgSynthetic(t, e, ts, ss, 0.5, rng)
			t0 := time.Now()
			os, err := RangingOrbits(obs, MonteCarloSettings{N: 2000, Seed: uint64(k)})
			tot += time.Since(t0)
			if err != nil {
				t.Logf("%s %d: %v", e.Name, k, err)
				continue
			}
			g, _ := ephem.ObserverGeometryAt(astro.JD{Day: 2461478.5, Frac: 0.1, Scale: astro.UTC}, rgAlderRidge, 0)
			reg, err := os.Predict(g, MonteCarloSettings{})
			if err != nil {
				t.Fatal(err)
			}
			tr := rgTruthAt(t, truth, g)
			ra, dec, _ := astro.Spherical(tr.Dir)
			m := reg.Mahalanobis(ra, dec)
			worst = math.Max(worst, m)
			if m <= 3 {
				in++
			}
			if k == 0 {
				el := reg.Ellipse(3)
				t.Logf("%s: Δ=%.3f ell %.0f x %.0f inside %.3f ess %.0f", e.Name, tr.DeltaAU, el.SemiMajorArcsec, el.SemiMinorArcsec, el.Inside, os.EffectiveN)
			}
		}
		t.Logf("%s: %d/%d inside 3σ, worst %.2f, mean time %v", e.Name, in, n, worst, tot/time.Duration(n))
	}
}
