package orbit

import (
	"math"
	"math/rand/v2"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// The invented sites of the orbit-fit tests.
var (
	dcAlderRidge  = &astro.Site{Name: "Alder Ridge", Lat: 44.52 * astro.Degree, Lon: -72.80 * astro.Degree, HeightM: 410}
	dcBirchHollow = &astro.Site{Name: "Birch Hollow", Lat: -30.85 * astro.Degree, Lon: 148.40 * astro.Degree, HeightM: 620}
)

// dcCase is an invented orbit with an observing schedule.
type dcCase struct {
	name string
	el   ephem.Elements
	// nights are the UTC Julian dates (midnight .5) of the observing nights;
	// each night has perNight observations 25 min apart, from Alder Ridge at
	// about 04:00 UTC (its local night) and from Birch Hollow at about
	// 13:00 UTC on alternate nights.
	nights   []float64
	perNight int
	epoch    astro.JD // TDB epoch of the fitted state
}

// dcCases are invented orbits: a main-belt asteroid, a near-Earth asteroid
// and a comet with e = 0.9 near perihelion. None is a catalogued object.
func dcCases() []dcCase {
	tt := func(d float64) astro.JD { return astro.JD{Day: d, Frac: 0, Scale: astro.TT} }
	nan := math.NaN()
	return []dcCase{
		{
			name: "main belt",
			el: ephem.Elements{Name: "Invented-MB", Epoch: tt(2461450.5), A: 2.61, E: 0.17,
				I: 9.3 * astro.Degree, Node: 55 * astro.Degree, Peri: 33 * astro.Degree, M: 40 * astro.Degree, H: nan, G: nan},
			nights: []float64{2461440.5, 2461443.5, 2461449.5, 2461455.5, 2461462.5}, perNight: 4,
			epoch: astro.JD{Day: 2461450.5, Scale: astro.TDB},
		},
		{
			name: "near-Earth",
			el: ephem.Elements{Name: "Invented-NEO", Epoch: tt(2461450.5), A: 1.45, E: 0.42,
				I: 12 * astro.Degree, Node: 255 * astro.Degree, Peri: 250 * astro.Degree, M: 350 * astro.Degree, H: nan, G: nan},
			nights: []float64{2461444.5, 2461446.5, 2461449.5, 2461452.5, 2461455.5}, perNight: 4,
			epoch: astro.JD{Day: 2461450.5, Scale: astro.TDB},
		},
		{
			name: "comet e=0.9",
			el: ephem.Elements{Name: "Invented-C", E: 0.9, Q: 1.2, Tp: tt(2461455.25),
				I: 35 * astro.Degree, Node: 45 * astro.Degree, Peri: 100 * astro.Degree, H: nan, G: nan},
			nights: []float64{2461440.5, 2461444.5, 2461448.5, 2461453.5, 2461459.5}, perNight: 4,
			epoch: astro.JD{Day: 2461450.5, Scale: astro.TDB},
		},
	}
}

// schedule returns the UTC instants and sites of the case's observations.
func (c dcCase) schedule() ([]astro.JD, []*astro.Site) {
	var ts []astro.JD
	var ss []*astro.Site
	for k, n := range c.nights {
		site, start := dcAlderRidge, 0.16 // 03:50 UTC
		if k%2 == 1 {
			site, start = dcBirchHollow, 0.54 // 13:00 UTC
		}
		for j := 0; j < c.perNight; j++ {
			ts = append(ts, astro.JD{Day: n, Frac: start + float64(j)*25.0/1440, Scale: astro.UTC})
			ss = append(ss, site)
		}
	}
	return ts, ss
}

// truth returns the true state of the case at its epoch.
func (c dcCase) truth(t testing.TB) State {
	t.Helper()
	st, err := StateFromElements(c.el, c.epoch)
	if err != nil {
		t.Fatal(err)
	}
	return st
}

// dcSynthObservations returns observations of el at the instants ts from the
// sites ss: the place of ephem.PlaceOfElements (Kepler's equation, an
// independent path from the universal-variable propagation of the fit) with,
// when rng is not nil, Gaussian errors of sigmaArcsec per coordinate on the
// tangent plane.
func dcSynthObservations(t testing.TB, el ephem.Elements, ts []astro.JD, ss []*astro.Site, sigmaArcsec float64, rng *rand.Rand) []Observation {
	t.Helper()
	out := make([]Observation, len(ts))
	sig := float64(astro.Angle(sigmaArcsec) * astro.Arcsecond)
	for i := range ts {
		g, err := ephem.ObserverGeometryAt(ts[i], ss[i], 0)
		if err != nil {
			t.Fatal(err)
		}
		pl, err := ephem.PlaceOfElements(el, ts[i], ephem.Observer{Site: ss[i]})
		if err != nil {
			t.Fatal(err)
		}
		name := ""
		if ss[i] != nil {
			name = ss[i].Name
		}
		out[i] = Observation{Index: i, Line: i + 2, Geo: g, RA: pl.RA, Dec: pl.Dec,
			SigmaRA: sig, SigmaDec: sig, Site: name, Mag: math.NaN(), Used: true}
	}
	if rng != nil {
		dcAddNoise(out, rng)
	}
	return out
}

// dcAddNoise displaces each observation by Gaussian errors of its σ along the
// local east and north.
func dcAddNoise(o []Observation, rng *rand.Rand) {
	for i := range o {
		c := astro.UnitVector(o[i].RA, o[i].Dec)
		e, n := EastNorth(c)
		d := r3.Add(c, r3.Add(r3.Scale(rng.NormFloat64()*o[i].SigmaRA, e), r3.Scale(rng.NormFloat64()*o[i].SigmaDec, n)))
		ra, dec, _ := astro.Spherical(d)
		o[i].RA, o[i].Dec = ra.Normalized(), dec
	}
}

// dcPerturbed returns st with its position moved by frac·|r| and its velocity
// by frac·|v|, each in a random direction.
func dcPerturbed(st State, frac float64, rng *rand.Rand) State {
	dir := func() r3.Vec {
		v := r3.Vec{X: rng.NormFloat64(), Y: rng.NormFloat64(), Z: rng.NormFloat64()}
		return r3.Unit(v)
	}
	st.Pos = r3.Add(st.Pos, r3.Scale(frac*r3.Norm(st.Pos), dir()))
	st.Vel = r3.Add(st.Vel, r3.Scale(frac*r3.Norm(st.Vel), dir()))
	return st
}

// TestCasesGeometry keeps the invented cases sensible: the body well away
// from the Earth and the Sun, and moving.
func TestCasesGeometry(t *testing.T) {
	for _, c := range dcCases() {
		ts, ss := c.schedule()
		for i := range ts {
			pl, err := ephem.PlaceOfElements(c.el, ts[i], ephem.Observer{Site: ss[i]})
			if err != nil {
				t.Fatal(err)
			}
			if pl.DeltaAU < 0.05 || pl.Elongation < 40*astro.Degree {
				t.Errorf("%s: obs %d: Δ = %.3f au, elongation %.1f°", c.name, i, pl.DeltaAU, pl.Elongation.Degrees())
			}
		}
	}
}
