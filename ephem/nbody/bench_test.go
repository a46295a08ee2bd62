package nbody

import (
	"math/rand/v2"
	"runtime"
	"sync"
	"testing"

	"arcfit/astro"
)

var sinkResult *Result

// BenchmarkPropagateYear: one main-belt orbit one year with the planets
// (target: under 10 ms). warm: the interpolant cache already holds the
// year; cold: the cache is emptied before each integration, so the time
// includes evaluating VSOP87 and the Moon at every node of the year.
func BenchmarkPropagateYear(b *testing.B) {
	x := mainBelt(b)
	ts := days(365.25)
	b.Run("warm", func(b *testing.B) {
		b.ReportAllocs()
		if _, err := Propagate(testEpoch, x, ts, Options{}); err != nil {
			b.Fatal(err)
		}
		for b.Loop() {
			sinkResult, _ = Propagate(testEpoch, x, ts, Options{})
		}
	})
	b.Run("cold", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			resetCache()
			sinkResult, _ = Propagate(testEpoch, x, ts, Options{})
		}
	})
	b.Run("warm-STM", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			sinkResult, _ = Propagate(testEpoch, x, ts, Options{STM: true})
		}
	})
}

// BenchmarkPropagateArc200: the differential correction's call, the STM at
// 200 instants spread over a year on both sides of the epoch (warm cache).
func BenchmarkPropagateArc200(b *testing.B) {
	x := mainBelt(b)
	rng := rand.New(rand.NewPCG(3, 4))
	ts := make([]astro.JD, 200)
	for i := range ts {
		ts[i] = testEpoch.AddDays(-120 + 365*rng.Float64())
	}
	for _, stm := range []bool{false, true} {
		name := "states"
		if stm {
			name = "STM"
		}
		b.Run(name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				sinkResult, _ = Propagate(testEpoch, x, ts, Options{STM: stm})
			}
		})
	}
}

// BenchmarkMonteCarlo1000: 1,000 sampled main-belt states integrated 90
// days, spread over GOMAXPROCS goroutines (target: under 5 s on 2 cores).
func BenchmarkMonteCarlo1000(b *testing.B) {
	x := mainBelt(b)
	rng := rand.New(rand.NewPCG(5, 6))
	samples := make([][6]float64, 1000)
	for i := range samples {
		s := x
		for q := range 3 {
			s[q] += 1e-4 * rng.NormFloat64()
			s[q+3] += 1e-6 * rng.NormFloat64()
		}
		samples[i] = s
	}
	ts := days(90)
	workers := runtime.GOMAXPROCS(0)
	b.ReportAllocs()
	for b.Loop() {
		var wg sync.WaitGroup
		next := make(chan int, len(samples))
		for i := range samples {
			next <- i
		}
		close(next)
		for range workers {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for i := range next {
					if _, err := Propagate(testEpoch, samples[i], ts, Options{}); err != nil {
						b.Error(err)
						return
					}
				}
			}()
		}
		wg.Wait()
	}
}
