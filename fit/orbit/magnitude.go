package orbit

import (
	"fmt"
	"math"
	"sort"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// defaultSlopeG is the slope parameter of the H fit when none is given.
const defaultSlopeG = ephem.DefaultSlopeG

// FitH fits the absolute magnitude H of the H, G system, for the slope g, to
// the magnitudes of the used observations, given where the orbit puts the
// body at each (seen[i], valid where ok[i]). Each magnitude gives a reduced
// magnitude
//
//	Hᵢ = mᵢ − [V(H = 0, G = g; rᵢ, Δᵢ, αᵢ)]
//	   = mᵢ − 5 log10(rᵢ Δᵢ) + 2.5 log10[(1 − g) Φ1(αᵢ) + g Φ2(αᵢ)]
//
// ([ephem.AsteroidMagnitudeHG]; Bowell et al. 1989), and H is their mean
// with equal weights: the observations carry no magnitude uncertainty, so
// each counts the same. HSigma is the standard error of the mean, s/√n with
// s the sample standard deviation of the Hᵢ (n ≥ 2); with one magnitude it
// is 0 and a note says that the σ is unknown.
//
// Observations without a magnitude (NaN) or not used are ignored. Magnitudes
// in different bands are averaged as given: a band correction (to V) is not
// applied, and a note says so when the bands differ. For a comet the H, G
// law describes the nucleus at best; a coma makes the fitted H a rough guide.
//
// It returns H (NaN when no magnitude is usable), HSigma, the number of
// magnitudes used and notes.
func FitH(obs []Observation, seen []Seen, ok []bool, g float64) (h, hSigma float64, n int, notes []string) {
	var hs []float64
	bands := map[string]bool{}
	for i := range obs {
		o := &obs[i]
		if !o.Used || i >= len(seen) || !ok[i] || math.IsNaN(o.Mag) || math.IsInf(o.Mag, 0) {
			continue
		}
		v0 := ephem.AsteroidMagnitudeHG(0, g, seen[i].RAU, seen[i].DeltaAU, phaseAngle(seen[i]))
		if math.IsNaN(v0) || math.IsInf(v0, 0) {
			continue
		}
		hs = append(hs, o.Mag-v0)
		bands[o.Band] = true
	}
	n = len(hs)
	if n == 0 {
		return math.NaN(), 0, 0, nil
	}
	mean := 0.0
	for _, x := range hs {
		mean += x
	}
	mean /= float64(n)
	if n == 1 {
		return mean, 0, 1, []string{fmt.Sprintf("H = %.2f (G = %.2f) from one magnitude: its uncertainty is unknown", mean, g)}
	}
	ss := 0.0
	for _, x := range hs {
		ss += (x - mean) * (x - mean)
	}
	hSigma = math.Sqrt(ss/float64(n-1)) / math.Sqrt(float64(n))
	if len(bands) > 1 {
		names := make([]string, 0, len(bands))
		for b := range bands {
			if b == "" {
				b = "(none)"
			}
			names = append(names, b)
		}
		sort.Strings(names)
		notes = append(notes, fmt.Sprintf("H averages magnitudes in several bands %v without a band correction", names))
	}
	return mean, hSigma, n, notes
}

// phaseAngle returns the Sun–body–observer angle of a computed place: the
// angle at the body between the directions to the Sun (−Helio) and to the
// observer (−Dir).
func phaseAngle(s Seen) astro.Angle {
	return angleBetweenVec(r3.Scale(-1, s.Helio), r3.Scale(-1, s.Dir))
}

// angleBetweenVec returns the angle between two non-zero vectors, accurate
// at every angle: atan2(|a × b|, a·b) (common practice).
func angleBetweenVec(a, b r3.Vec) astro.Angle {
	return astro.Angle(math.Atan2(r3.Norm(r3.Cross(a, b)), r3.Dot(a, b)))
}

// Magnitude returns the predicted visual magnitude of the fitted H, G for the
// computed place s ([ephem.AsteroidMagnitudeHG]); NaN when the solution has
// no H.
func (sol *Solution) Magnitude(s Seen) float64 {
	if math.IsNaN(sol.H) {
		return math.NaN()
	}
	return ephem.AsteroidMagnitudeHG(sol.H, sol.G, s.RAU, s.DeltaAU, phaseAngle(s))
}
