package orbit

import (
	"math/rand/v2"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"
)

// nbBench200 returns 200 observations (σ 0.5″, seeded noise) of the invented
// main-belt orbit moved by the planets, over a year: 50 nights, four a
// night, alternating sites; and the truth.
func nbBench200(b *testing.B) ([]Observation, State) {
	c := dcCases()[0]
	truth := nbTruth(b, c)
	ts, ss := nbYearSchedule(c, 50, 4, 365)
	obs := nbSynthObservations(b, truth, ts, ss, 0.5, rand.New(rand.NewPCG(81, 82)))
	if n := len(obs); n != 200 || ts[n-1].Sub(ts[0]) < 364 {
		b.Fatalf("%d observations over %.1f days", n, ts[n-1].Sub(ts[0]))
	}
	return obs, truth
}

// BenchmarkCorrectNBody200: the differential correction with the planets of
// 200 observations over a year from a start 0.1 % off in position and
// velocity. Target: under 1 s.
func BenchmarkCorrectNBody200(b *testing.B) {
	obs, truth := nbBench200(b)
	start := dcPerturbed(truth, 1e-3, rand.New(rand.NewPCG(83, 84)))
	b.ReportAllocs()
	for b.Loop() {
		sol, err := Correct(obs, start, Options{})
		if err != nil {
			b.Fatal(err)
		}
		benchSink = sol
	}
}

// BenchmarkDetermineNBody200: the whole fit with the planets of the same
// observations: Gauss's method, the two-body correction of the middle month
// and the perturbed correction on doubling arcs. Target: under 1 s.
func BenchmarkDetermineNBody200(b *testing.B) {
	obs, _ := nbBench200(b)
	b.ReportAllocs()
	for b.Loop() {
		sol, err := Determine(obs, Options{Motion: NBody})
		if err != nil {
			b.Fatal(err)
		}
		benchSink = sol
	}
}

// BenchmarkMonteCarloNBody1000: 1000 orbits drawn from a solution's
// covariance (the invented main-belt asteroid on a 10-day arc) and each
// integrated with the planets 90 days to a prediction, in parallel on
// GOMAXPROCS workers. Target: under 5 s on 2 cores.
func BenchmarkMonteCarloNBody1000(b *testing.B) {
	st, cov := mcTestSolution(b)
	st.Motion = NBody
	at := st.Epoch.AddDays(90)
	at.Scale = astro.UTC // TDB − UTC ≈ 69 s: 90 days to the second
	g, err := ephem.ObserverGeometryAt(at, rgAlderRidge, 0)
	if err != nil {
		b.Fatal(err)
	}
	s := MonteCarloSettings{N: 1000, Seed: 1}
	b.ReportAllocs()
	for b.Loop() {
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
