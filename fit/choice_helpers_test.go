package fit

import (
	"math"
	"math/rand/v2"
	"testing"

	"arcfit/astro"
)

// mcSpec describes an invented synthetic track for the model-choice tests:
// nights one day apart (night k centred on day k − (nights−1)/2 from the
// epoch, stretched by stretch), perNight observations spread over spanDays
// within each night, the plane coordinates given by truth (radians, of the
// unstretched time), Gaussian noise of sigmaArcsec per coordinate from seed.
// With parallax set, every point gets an invented Earth-radius site vector
// turning once a sidereal day (see inventedSite) and truth is the geocentric
// track, observed minus u·site with u = invDist.
type mcSpec struct {
	nights, perNight int
	spanDays         float64
	stretch          float64
	truth            func(tDays float64) (xi, eta float64)
	sigmaArcsec      float64
	noiseScale       float64 // multiplies the noise draws (and σ), 1 by default
	seed             uint64
	parallax         bool
	invDist          float64
}

// mcTrack builds the track of spec directly from Points (no observation
// file): the times, the truth and the noise are the exact synthetic truth the
// tests check against.
func mcTrack(t testing.TB, sp mcSpec) *Track {
	t.Helper()
	if sp.stretch == 0 {
		sp.stretch = 1
	}
	if sp.noiseScale == 0 {
		sp.noiseScale = 1
	}
	if sp.spanDays == 0 {
		sp.spanDays = 0.15
	}
	rng := rand.New(rand.NewPCG(sp.seed, 0x5eed))
	epoch := astro.JD{Day: 2461500.5, Frac: 0, Scale: astro.TT}
	tr := &Track{
		Plane:   astro.TangentPlane{RA0: astro.AngleFromDegrees(150), Dec0: astro.AngleFromDegrees(12)},
		EpochTT: epoch,
		Sites:   map[string]astro.Site{},
	}
	sigma := sp.sigmaArcsec * sp.noiseScale * float64(astro.Arcsecond)
	lo, hi := math.Inf(1), math.Inf(-1)
	for k := 0; k < sp.nights; k++ {
		centre := float64(k) - float64(sp.nights-1)/2
		for j := 0; j < sp.perNight; j++ {
			t0 := centre - sp.spanDays/2
			if sp.perNight > 1 {
				t0 += sp.spanDays * float64(j) / float64(sp.perNight-1)
			}
			xi, eta := sp.truth(t0)
			T := t0 * sp.stretch
			p := Point{ObsIndex: len(tr.Points), Line: len(tr.Points) + 2, T: T,
				SigmaXi: sigma, SigmaEta: sigma, Night: k, Used: true}
			if sp.parallax {
				p.SiteXi, p.SiteEta = inventedSite(j, T)
				p.Site = "s"
				xi -= sp.invDist * p.SiteXi
				eta -= sp.invDist * p.SiteEta
			}
			p.Xi = xi + sigma*rng.NormFloat64()
			p.Eta = eta + sigma*rng.NormFloat64()
			utc, err := astro.TTToUTC(epoch.AddDays(T))
			if err != nil {
				t.Fatal(err)
			}
			p.UTC = utc
			lo, hi = math.Min(lo, T), math.Max(hi, T)
			tr.Points = append(tr.Points, p)
		}
	}
	tr.TimeScaleDays = (hi - lo) / 2
	tr.NumNights = sp.nights
	return tr
}

// mcAs is one arcsecond in radians.
const mcAs = float64(astro.Arcsecond)

// Invented truths (plane coordinates in radians against days).
var (
	// mcLinear: 30″/day east, 12″/day north.
	mcLinear = func(t float64) (float64, float64) { return 30 * mcAs * t, 12 * mcAs * t }
	// mcCurved: the same plus a curvature of 8″/day² in ξ and −5″/day² in η.
	mcCurved = func(t float64) (float64, float64) {
		return 30*mcAs*t + 8*mcAs*t*t, 12*mcAs*t - 5*mcAs*t*t
	}
	// mcKink: straight until the gap between the 2nd and 3rd of five nights
	// (t = −0.5 d), then 25″/day faster east and 15″/day slower north.
	mcKink = func(t float64) (float64, float64) {
		h := math.Max(0, t+0.5)
		return 30*mcAs*t + 25*mcAs*h, 12*mcAs*t - 15*mcAs*h
	}
)
