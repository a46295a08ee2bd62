package fit

import (
	"math/rand/v2"
	"path/filepath"
	"testing"
	"time"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/fit/orbit"
)

func TestPCProbe(t *testing.T) {
	dir := "orbit/testdata/nbody_synthetic"
	sites, err := obs.ReadSitesFile(filepath.Join(dir, "sites.csv"))
	if err != nil {
		t.Fatal(err)
	}
	for _, stem := range []string{"mb2", "jf2", "neo2"} {
		for _, arc := range []string{"30d", "60d", "90d"} {
			set, err := obs.ReadFile(filepath.Join(dir, stem+"_"+arc+".csv"), obs.ReadOptions{Sites: sites})
			if err != nil {
				t.Fatal(err)
			}
			last := set.Obs[len(set.Obs)-1].Time
			at := []astro.JD{last.AddDays(30), last.AddDays(90)}
			rng := rand.New(rand.NewPCG(1, 2))
			noisy := ocNoisy(set, rng)
			for _, dyn := range []string{"twobody", "nbody"} {
				for _, ns := range []bool{true, false} {
					t0 := time.Now()
					ps, of, err := OrbitRegion(noisy, sites, at, nil, RegionOptions{Dynamics: dyn, NoSampling: ns, MonteCarlo: orbit.MonteCarloSettings{N: 500, Seed: 3}})
					if err != nil {
						t.Logf("%s %s %s: %v", stem, arc, dyn, err)
						continue
					}
					t.Logf("%s %s %s nosamp=%v: %.3fs %s %s ell90 %.3g chi2 %.3g", stem, arc, dyn, ns, time.Since(t0).Seconds(), ps[0].Method, ps[1].Method, ps[1].Ellipse(3).SemiMajorArcsec, of.Solution.Chi2DoF)
				}
			}
		}
	}
}
