package orbit

import (
	"math/rand/v2"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"
)

func TestScratchDebug(t *testing.T) {
	mcDebug = t.Logf
	defer func() { mcDebug = nil }()
	ts, ss := rgTwoNights(5, 5)
	for k := range 30 {
		rng := rand.New(rand.NewPCG(uint64(k), 11))
		obs, truth := rgSynthetic(t, rgNEO, ts, ss, 0.5, rng)
		os, err := RangingOrbits(obs, MonteCarloSettings{N: 2000, Seed: uint64(k)})
		if err != nil {
			t.Fatal(err)
		}
		g, _ := ephem.ObserverGeometryAt(astro.JD{Day: 2461478.5, Frac: 0.1, Scale: astro.UTC}, rgAlderRidge, 0)
		reg, _ := os.Predict(g, MonteCarloSettings{})
		tr := rgTruthAt(t, truth, g)
		ra, dec, _ := astro.Spherical(tr.Dir)
		t.Logf("k=%d m = %.2f", k, reg.Mahalanobis(ra, dec))
	}
}
