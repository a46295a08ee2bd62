package orbit

import (
	"math"
	"math/rand/v2"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// Invented sites and objects for the ranging and Monte Carlo tests. The
// element sets belong to no catalogued object.
var (
	rgAlderRidge  = &astro.Site{Name: "Alder Ridge", Lat: 44.52 * astro.Degree, Lon: -72.80 * astro.Degree, HeightM: 410}
	rgBirchHollow = &astro.Site{Name: "Birch Hollow", Lat: -30.85 * astro.Degree, Lon: 148.40 * astro.Degree, HeightM: 620}

	// rgMainBelt: an invented main-belt asteroid near opposition in
	// February 2027 (about 1.7 au from the Earth).
	rgMainBelt = ephem.Elements{Name: "Invented MB", Epoch: astro.JD{Day: 2461440, Frac: 0.5, Scale: astro.TT},
		A: 2.61, E: 0.17, I: 9.3 * astro.Degree, Node: 121 * astro.Degree, Peri: 33 * astro.Degree, M: 348 * astro.Degree,
		H: math.NaN(), G: math.NaN()}
	// rgNEO: an invented near-Earth asteroid passing about 0.1 au from the
	// Earth in February 2027.
	rgNEO = ephem.Elements{Name: "Invented NEO", Epoch: astro.JD{Day: 2461446, Frac: 0.5, Scale: astro.TT},
		A: 1.3, E: 0.35, I: 8 * astro.Degree, Node: 130 * astro.Degree, Peri: 287 * astro.Degree, M: 46 * astro.Degree,
		H: math.NaN(), G: math.NaN()}
)

// rgTwoNights returns observation times (UTC) and sites for a two-night arc:
// n1 observations over 1.5 h from Alder Ridge on the night of 2027 Feb 10
// (UTC 03:00–04:30 Feb 11) and n2 from Birch Hollow about 1.4 days later
// (UTC 13:00–14:30 Feb 12).
func rgTwoNights(n1, n2 int) ([]astro.JD, []*astro.Site) {
	var ts []astro.JD
	var ss []*astro.Site
	for k := range n1 {
		ts = append(ts, astro.JD{Day: 2461447.5, Frac: 0.125 + 0.0625*float64(k)/float64(max(n1-1, 1)), Scale: astro.UTC})
		ss = append(ss, rgAlderRidge)
	}
	for k := range n2 {
		ts = append(ts, astro.JD{Day: 2461448.5, Frac: 0.5417 + 0.0625*float64(k)/float64(max(n2-1, 1)), Scale: astro.UTC})
		ss = append(ss, rgBirchHollow)
	}
	return ts, ss
}

// rgSynthetic observes the element set el at the times and sites given by
// two-body motion ([StateFromElements], [ephem.ObserverGeometryAt],
// [State.Observe]) and returns the observations, with Gaussian errors of
// sigmaArcsec per coordinate when rng is not nil (exactly the computed
// places otherwise; σ is sigmaArcsec either way), and the true state at the
// element set's epoch.
func rgSynthetic(tb testing.TB, el ephem.Elements, ts []astro.JD, sites []*astro.Site, sigmaArcsec float64, rng *rand.Rand) ([]Observation, State) {
	tb.Helper()
	truth, err := StateFromElements(el, astro.JD{Day: el.Epoch.Day, Frac: el.Epoch.Frac, Scale: astro.TDB})
	if err != nil {
		tb.Fatal(err)
	}
	sig := sigmaArcsec * float64(astro.Arcsecond)
	obs := make([]Observation, len(ts))
	for i, t := range ts {
		g, err := ephem.ObserverGeometryAt(t, sites[i], 0)
		if err != nil {
			tb.Fatal(err)
		}
		seen, err := truth.Observe(g)
		if err != nil {
			tb.Fatal(err)
		}
		u := seen.Dir
		if rng != nil {
			e, n := EastNorth(u)
			u = r3.Unit(r3.Add(u, r3.Add(r3.Scale(sig*rng.NormFloat64(), e), r3.Scale(sig*rng.NormFloat64(), n))))
		}
		ra, dec, _ := astro.Spherical(u)
		obs[i] = Observation{Index: i, Line: i + 2, Geo: g, RA: ra, Dec: dec, SigmaRA: sig, SigmaDec: sig,
			Site: sites[i].Name, Mag: math.NaN(), Used: true}
	}
	return obs, truth
}

// rgTruthAt returns the true state's place for the observer geometry g.
func rgTruthAt(tb testing.TB, truth State, g ephem.ObserverGeometry) Seen {
	tb.Helper()
	s, err := truth.Observe(g)
	if err != nil {
		tb.Fatal(err)
	}
	return s
}
