package simulate

import (
	"math"
	"math/rand/v2"
)

// gaussian draws standard normal deviates by the Box–Muller transform from
// the uniform deviates of a PCG generator.
type gaussian struct {
	src      *rand.PCG
	spare    float64
	hasSpare bool
}

// newGaussian returns the generator of seed and stream.
func newGaussian(seed, stream uint64) *gaussian {
	return &gaussian{src: rand.NewPCG(seed, stream)}
}

// next returns the next standard normal deviate. The deviates come in pairs
// from two uniform deviates u₁ in (0, 1] and u₂ in [0, 1) (the top 53 bits
// of the generator's 64):
//
//	z₁ = √(−2 ln u₁) cos 2πu₂,  z₂ = √(−2 ln u₁) sin 2πu₂
//
// independent and standard normal.
//
// Reference: Box, G. E. P., Muller, M. E., "A note on the generation of
// random normal deviates", Ann. Math. Statist. 29 (1958), 610–611.
func (g *gaussian) next() float64 {
	if g.hasSpare {
		g.hasSpare = false
		return g.spare
	}
	const unit = 1.0 / (1 << 53)
	u1 := float64(g.src.Uint64()>>11+1) * unit // (0, 1]
	u2 := float64(g.src.Uint64()>>11) * unit   // [0, 1)
	r := math.Sqrt(-2 * math.Log(u1))
	s, c := math.Sincos(2 * math.Pi * u2)
	g.spare, g.hasSpare = r*s, true
	return r * c
}
