package orbit

import (
	"math/rand/v2"
	"testing"
)

// dcBench50 returns 50 observations (σ 0.5″, seeded noise) of the invented
// main-belt orbit over 20 days: ten nights, five each, alternating sites.
func dcBench50(b *testing.B) ([]Observation, State) {
	c := dcCases()[0]
	c.nights = nil
	for k := 0; k < 10; k++ {
		c.nights = append(c.nights, 2461440.5+float64(2*k)+float64(k/5))
	}
	c.perNight = 5
	ts, ss := c.schedule()
	obs := dcSynthObservations(b, c.el, ts, ss, 0.5, rand.New(rand.NewPCG(71, 72)))
	if n := len(obs); n != 50 || ts[n-1].Sub(ts[0]) > 20.5 {
		b.Fatalf("%d observations over %.1f days", n, ts[n-1].Sub(ts[0]))
	}
	return obs, c.truth(b)
}

// benchSink keeps the benchmarks' results alive.
var benchSink *Solution

// BenchmarkCorrect50: the differential correction of 50 observations over
// 20 days from a start 1 % off in position and velocity.
func BenchmarkCorrect50(b *testing.B) {
	obs, truth := dcBench50(b)
	start := dcPerturbed(truth, 0.01, rand.New(rand.NewPCG(73, 74)))
	b.ReportAllocs()
	for b.Loop() {
		sol, err := Correct(obs, start, Options{})
		if err != nil {
			b.Fatal(err)
		}
		benchSink = sol
	}
}

// BenchmarkDetermine50: the full fit of the same observations, initial
// orbit (Gauss's method) and differential correction. The target is under
// 50 ms.
func BenchmarkDetermine50(b *testing.B) {
	obs, _ := dcBench50(b)
	b.ReportAllocs()
	for b.Loop() {
		sol, err := Determine(obs, Options{})
		if err != nil {
			b.Fatal(err)
		}
		benchSink = sol
	}
}
