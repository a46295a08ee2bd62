package orbit

import (
	"math"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// The stored-geometry place must be the ephem package's place: the orbit fit
// and the ephemeris then agree on what "computed" means. The element set is
// invented.
func TestObserveMatchesEphem(t *testing.T) {
	el := ephem.Elements{Name: "Invented-OD", Epoch: astro.JD{Day: 2461440, Frac: 0.5, Scale: astro.TT},
		A: 2.61, E: 0.17, I: 9.3 * astro.Degree, Node: 121 * astro.Degree, Peri: 33 * astro.Degree, M: 40 * astro.Degree,
		H: math.NaN(), G: math.NaN()}
	site := &astro.Site{Name: "Alder Ridge", Lat: 44.52 * astro.Degree, Lon: -72.80 * astro.Degree, HeightM: 410}
	utc := astro.JD{Day: 2461446, Frac: 0.31, Scale: astro.UTC}
	g, err := ephem.ObserverGeometryAt(utc, site, 0)
	if err != nil {
		t.Fatal(err)
	}
	st, err := StateFromElements(el, g.TDB)
	if err != nil {
		t.Fatal(err)
	}
	seen, err := st.Observe(g)
	if err != nil {
		t.Fatal(err)
	}
	pl, err := ephem.PlaceOfElements(el, utc, ephem.Observer{Site: site})
	if err != nil {
		t.Fatal(err)
	}
	dE, dN := Residual(pl.RA, pl.Dec, seen.Dir)
	// Both sides are the same computation: agreement to rounding (1e-12 rad
	// is 0.2 µas; the light-time tolerance 1e-12 d moves the body < 1e-13 au).
	if math.Hypot(dE, dN) > 1e-12 {
		t.Errorf("place differs from ephem.PlaceOfElements by %g rad", math.Hypot(dE, dN))
	}
	if math.Abs(seen.DeltaAU-pl.DeltaAU) > 1e-12 {
		t.Errorf("Δ = %.15f, ephem %.15f", seen.DeltaAU, pl.DeltaAU)
	}
}

func TestResidualAtPoleAndAcrossZero(t *testing.T) {
	for _, c := range []struct{ ra, dec float64 }{{0.0001, 0}, {359.9999, 10}, {45, 89.99999}, {200, -90}} {
		cv := astro.UnitVector(astro.Angle(c.ra)*astro.Degree, astro.Angle(c.dec)*astro.Degree)
		dE, dN := Residual(astro.Angle(c.ra)*astro.Degree, astro.Angle(c.dec)*astro.Degree, cv)
		if math.Hypot(dE, dN) > 1e-15 {
			t.Errorf("self residual at %v = %g, %g", c, dE, dN)
		}
		e, n := EastNorth(cv)
		if math.Abs(r3.Dot(e, n)) > 1e-15 || math.Abs(r3.Dot(e, cv)) > 1e-15 || math.Abs(r3.Norm(n)-1) > 1e-15 {
			t.Errorf("east/north not orthonormal at %v", c)
		}
	}
	// 1″ east of a point on the equator at 0h: dE = +1″ (common practice:
	// east is increasing RA).
	c := astro.UnitVector(0, 0)
	dE, dN := Residual(astro.Arcsecond, 0, c)
	if math.Abs(dE-float64(astro.Arcsecond)) > 1e-15 || math.Abs(dN) > 1e-15 {
		t.Errorf("1″ east: dE=%g dN=%g", dE, dN)
	}
}
