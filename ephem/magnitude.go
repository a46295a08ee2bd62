package ephem

import (
	"math"

	"arcfit/astro"
)

// AsteroidMagnitudeHG returns the predicted visual magnitude of an asteroid of
// absolute magnitude h and slope parameter g (the IAU two-parameter H, G
// system) at distance rAU from the Sun and deltaAU from the observer, seen at
// phase angle phase (Sun–asteroid–observer):
//
//	V = H + 5 log10(r Δ) − 2.5 log10[(1 − G) Φ1 + G Φ2]
//	Φ1 = exp(−3.33 tan^0.63(α/2)),   Φ2 = exp(−1.87 tan^1.22(α/2))
//
// Inputs: r, Δ in au (> 0), α in radians in [0, π]. Output: V in magnitudes.
// The approximation is meant for 0° ≤ α ≤ 120° (Bowell et al.); beyond it
// the value is given but grows uncertain, and α = π gives +Inf. Non-positive
// or NaN distances, NaN h or g, or α outside [0, π] give NaN.
//
// Reference: Bowell, E., Hapke, B., Domingue, D., Lumme, K., Peltoniemi, J.,
// Harris, A. W., "Application of photometric models to asteroids", in
// Asteroids II (R. P. Binzel, T. Gehrels, M. S. Matthews, eds.), University
// of Arizona Press, 1989, pp. 524–556 (the approximate Φ1, Φ2 forms);
// Meeus, Astronomical Algorithms, 2nd ed., ch. 33.
func AsteroidMagnitudeHG(h, g, rAU, deltaAU float64, phase astro.Angle) float64 {
	a := float64(phase)
	if !(rAU > 0) || !(deltaAU > 0) || math.IsInf(rAU, 0) || math.IsInf(deltaAU, 0) ||
		math.IsNaN(h) || math.IsNaN(g) || !(a >= 0 && a <= math.Pi) {
		return math.NaN()
	}
	t := math.Tan(a / 2)
	if a == math.Pi {
		t = math.Inf(1)
	}
	phi1 := math.Exp(-3.33 * math.Pow(t, 0.63))
	phi2 := math.Exp(-1.87 * math.Pow(t, 1.22))
	return h + 5*math.Log10(rAU*deltaAU) - 2.5*math.Log10((1-g)*phi1+g*phi2)
}

// CometMagnitude returns the predicted total visual magnitude of a comet of
// absolute total magnitude m1 and activity coefficient k1 at distance rAU
// from the Sun and deltaAU from the observer (the total-magnitude law):
//
//	m = M1 + 5 log10 Δ + K1 log10 r
//
// (Meeus' form g + 5 log Δ + κ log r, with K1 = 2.5 n in the notation
// m = M1 + 5 log Δ + 2.5 n log r). Inputs: r, Δ in au (> 0). Output: m in
// magnitudes. Non-positive or NaN distances or NaN parameters give NaN.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 33 (the comet
// magnitude law) and example 4.a (the law fitted by least squares).
func CometMagnitude(m1, k1, rAU, deltaAU float64) float64 {
	if !(rAU > 0) || !(deltaAU > 0) || math.IsInf(rAU, 0) || math.IsInf(deltaAU, 0) ||
		math.IsNaN(m1) || math.IsNaN(k1) {
		return math.NaN()
	}
	return m1 + 5*math.Log10(deltaAU) + k1*math.Log10(rAU)
}
