package orbit

import (
	"math/rand/v2"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"
)

// mcSink keeps the benchmarks' results alive.
var mcSink any

// BenchmarkMonteCarlo10k: 10 000 orbits drawn from a solution's covariance
// (an invented main-belt asteroid on a 10-day arc) and propagated to one
// instant 30 days later. Target: under 1 s on 2 cores.
func BenchmarkMonteCarlo10k(b *testing.B) {
	st, cov := mcTestSolution(b)
	g, err := ephem.ObserverGeometryAt(astro.JD{Day: 2461487.5, Frac: 0.1, Scale: astro.UTC}, rgAlderRidge, 0)
	if err != nil {
		b.Fatal(err)
	}
	s := MonteCarloSettings{N: 10000, Seed: 1}
	b.ReportAllocs()
	b.ResetTimer()
	for range b.N {
		set, err := CovarianceOrbits(st, cov, s)
		if err != nil {
			b.Fatal(err)
		}
		reg, err := set.Predict(g, s)
		if err != nil {
			b.Fatal(err)
		}
		mcSink = reg
	}
}

// BenchmarkRangingOrbits2000: the default 2000 orbits by statistical
// ranging for a two-night arc of 10 observations (the invented NEO),
// pilots included.
func BenchmarkRangingOrbits2000(b *testing.B) {
	ts, ss := rgTwoNights(5, 5)
	obs, _ := rgSynthetic(b, rgNEO, ts, ss, 0.5, rand.New(rand.NewPCG(1, 2)))
	b.ReportAllocs()
	b.ResetTimer()
	for range b.N {
		set, err := RangingOrbits(obs, MonteCarloSettings{N: 2000, Seed: 1})
		if err != nil {
			b.Fatal(err)
		}
		mcSink = set
	}
}
