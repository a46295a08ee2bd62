package orbit_test

import (
	"fmt"
	"math"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit/orbit"
)

// An invented main-belt asteroid observed from an invented site on five
// nights: Determine finds the orbit from the observations alone (Gauss's
// method, then the differential correction) and names its class. The
// observations are the exact places ephem computes for the element set, so
// the fit returns the elements it was made from.
func ExampleDetermine() {
	el := ephem.Elements{Name: "Invented-2027A", Epoch: astro.JD{Day: 2461450.5, Scale: astro.TT},
		A: 2.61, E: 0.17, I: 9.3 * astro.Degree, Node: 55 * astro.Degree, Peri: 33 * astro.Degree, M: 40 * astro.Degree,
		H: math.NaN(), G: math.NaN()}
	site := &astro.Site{Name: "Alder Ridge", Lat: 44.52 * astro.Degree, Lon: -72.80 * astro.Degree, HeightM: 410}
	var obs []orbit.Observation
	for _, night := range []float64{2461440.5, 2461443.5, 2461449.5, 2461455.5, 2461462.5} {
		for j := 0; j < 3; j++ {
			utc := astro.JD{Day: night, Frac: 0.16 + 0.02*float64(j), Scale: astro.UTC}
			g, err := ephem.ObserverGeometryAt(utc, site, 0)
			if err != nil {
				fmt.Println(err)
				return
			}
			pl, err := ephem.PlaceOfElements(el, utc, ephem.Observer{Site: site})
			if err != nil {
				fmt.Println(err)
				return
			}
			sigma := float64(0.5 * astro.Arcsecond)
			obs = append(obs, orbit.Observation{Index: len(obs), Line: len(obs) + 2, Geo: g, RA: pl.RA, Dec: pl.Dec,
				SigmaRA: sigma, SigmaDec: sigma, Site: site.Name, Mag: math.NaN(), Used: true})
		}
	}
	sol, err := orbit.Determine(obs, orbit.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fit, sig, err := sol.Elements()
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("start %s, %d observations, rms %.3f″\n", sol.Start, sol.NumUsed, sol.RMSArcsec)
	fmt.Printf("a = %.5f au, e = %.5f, i = %.4f°, Ω = %.4f°, ω = %.4f°\n",
		fit.A, fit.E, fit.I.Degrees(), fit.Node.Degrees(), fit.Peri.Degrees())
	fmt.Printf("σa below 0.001 au: %v\n", sig.A < 0.001)
	fmt.Println(orbit.Classify(fit))
	// Output:
	// start gauss, 15 observations, rms 0.000″
	// a = 2.61000 au, e = 0.17000, i = 9.3000°, Ω = 55.0000°, ω = 33.0000°
	// σa below 0.001 au: true
	// main belt (middle)
}
