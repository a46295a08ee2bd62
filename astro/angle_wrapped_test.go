package astro

import (
	"math"
	"testing"
)

// TestWrappedKeepsTinyAngles checks that reduction to (−π, π] does not round a
// tiny negative angle to zero (it used to pass through [0, 2π)), and the edges.
// Expected values follow from the definition of the interval.
func TestWrappedKeepsTinyAngles(t *testing.T) {
	cases := []struct{ in, want Angle }{
		{-1.3e-23, -1.3e-23},
		{1e-300, 1e-300},
		{math.Pi, math.Pi},
		{-math.Pi, math.Pi},
		{3 * math.Pi, math.Pi},
		{-0.5, -0.5},
		{2*math.Pi + 0.25, 0.25},
	}
	for _, c := range cases {
		got := c.in.Wrapped()
		if math.Abs(float64(got-c.want)) > 4e-16 {
			t.Errorf("Angle(%g).Wrapped() = %.17g, want %.17g", float64(c.in), float64(got), float64(c.want))
		}
	}
}
