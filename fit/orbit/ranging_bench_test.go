package orbit

import (
	"math/rand/v2"
	"testing"

	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// rgSink keeps the benchmarks' results alive.
var rgSink any

// BenchmarkRangingStarts: starts for two-night arcs of 10 observations with
// 0.5″ noise (the invented main-belt asteroid and NEO). Budget: well inside
// the 50 ms of a whole fit.
func BenchmarkRangingStarts(b *testing.B) {
	ts, ss := rgTwoNights(5, 5)
	for _, el := range []ephem.Elements{rgMainBelt, rgNEO} {
		obs, _ := rgSynthetic(b, el, ts, ss, 0.5, rand.New(rand.NewPCG(1, 2)))
		b.Run(el.Name, func(b *testing.B) {
			b.ReportAllocs()
			for range b.N {
				starts, err := RangingStarts(obs)
				if err != nil {
					b.Fatal(err)
				}
				rgSink = starts
			}
		})
	}
}

// BenchmarkLambert: one short-arc Lambert solution (main belt, one day).
func BenchmarkLambert(b *testing.B) {
	r1 := r3.Vec{X: 2.5, Y: 0.1, Z: 0.2}
	r2 := r3.Vec{X: 2.495, Y: 0.111, Z: 0.205}
	b.ReportAllocs()
	for range b.N {
		v1, _, _ := rgLambert(r1, r2, 1, ephem.GMSun)
		rgSink = v1
	}
}
