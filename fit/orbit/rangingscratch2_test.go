package orbit

import (
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"arcfit/astro"
	"arcfit/ephem"
)

func TestScratchLong(t *testing.T) {
	for _, span := range []float64{10, 40} {
		var ts []astro.JD
		var ss []*astro.Site
		for _, d := range []float64{0, span / 2, span} {
			for k := range 4 {
				ts = append(ts, astro.JD{Day: 2461447.5 + d, Frac: 0.125 + 0.02*float64(k), Scale: astro.UTC})
				ss = append(ss, rgAlderRidge)
			}
		}
		for _, e := range []ephem.Elements{rgMainBelt, rgNEO} {
			in, n := 0, 10
			var tot time.Duration
			for k := range n {
				rng := rand.New(rand.NewPCG(uint64(k), 11))
				obs, truth := rgSynthetic(t, e, ts, ss, 0.5, rng)
				t0 := time.Now()
				starts, err := RangingStarts(obs)
				ts1 := time.Since(t0)
				if err != nil {
					t.Logf("%s: %v", e.Name, err)
					continue
				}
				t0 = time.Now()
				os, err := RangingOrbits(obs, MonteCarloSettings{N: 2000, Seed: uint64(k)})
				tot += time.Since(t0)
				if err != nil {
					t.Logf("%s %d: %v", e.Name, k, err)
					continue
				}
				g, _ := ephem.ObserverGeometryAt(astro.JD{Day: 2461447.5 + span + 30, Frac: 0.1, Scale: astro.UTC}, rgAlderRidge, 0)
				reg, _ := os.Predict(g, MonteCarloSettings{})
				tr := rgTruthAt(t, truth, g)
				ra, dec, _ := astro.Spherical(tr.Dir)
				m := reg.Mahalanobis(ra, dec)
				if m <= 3 {
					in++
				}
				if k == 0 {
					el := reg.Ellipse(3)
					t.Logf("span %g %s: start chi2 %.1f (%v) ell %.1f x %.1f inside %.3f ess %.0f m %.2f notes %v", span, e.Name, starts[0].Chi2, ts1, el.SemiMajorArcsec, el.SemiMinorArcsec, el.Inside, os.EffectiveN, m, os.Notes[1])
				}
			}
			t.Logf("span %g %s: %d/%d, time %v", span, e.Name, in, n, tot/time.Duration(n))
		}
	}
	_ = math.Pi
}
