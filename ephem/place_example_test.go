package ephem_test

import (
	"fmt"
	"math"

	"arcfit/astro"
	"arcfit/ephem"
)

// ExamplePlaceOfElements prints where an invented asteroid is seen from an
// invented site on an evening in 2027.
func ExamplePlaceOfElements() {
	el := ephem.Elements{
		Name:  "Invented-Rho",
		Epoch: astro.NewJD(2461400.5, astro.TT),
		A:     2.31, E: 0.17,
		I:    astro.AngleFromDegrees(9.4),
		Node: astro.AngleFromDegrees(48.0),
		Peri: astro.AngleFromDegrees(122.5),
		M:    astro.AngleFromDegrees(340.0),
		H:    14.2, G: 0.15,
	}
	site := &astro.Site{Name: "Invented Ridge", Lat: astro.AngleFromDegrees(44.52),
		Lon: astro.AngleFromDegrees(-72.80), HeightM: 410}
	utc, _ := astro.ParseISO8601("2027-02-03T02:00:00Z")
	p, err := ephem.PlaceOfElements(el, utc, ephem.Observer{Site: site})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("astrometric:", astro.FormatHMS(p.RA, 1), astro.FormatDMS(p.Dec, 0))
	fmt.Printf("alt %.1f°, az %.1f°, airmass %.2f\n", p.Alt.Degrees(), p.Az.Degrees(), p.Airmass)
	fmt.Printf("Δ %.4f au, r %.4f au, phase %.1f°, elongation %.1f°, near the Sun: %v\n",
		p.DeltaAU, p.RAU, p.PhaseAngle.Degrees(), p.Elongation.Degrees(), p.NearSun())
	fmt.Printf("V %.1f, Moon %.0f° away\n", p.Mag, p.MoonSeparation.Degrees())
	// Output:
	// astrometric: 12:24:17.0 +14:05:07
	// alt 5.6°, az 75.8°, airmass 9.44
	// Δ 1.1211 au, r 1.9243 au, phase 22.4°, elongation 131.9°, near the Sun: false
	// V 16.9, Moon 96° away
}

// ExampleSunApparentEclipticOfDate computes the Sun of Meeus' example 25.a
// (1992 Oct 13.0 TD) by the high-accuracy method.
func ExampleSunApparentEclipticOfDate() {
	lon, lat, r, err := ephem.SunApparentEclipticOfDate(astro.NewJD(2448908.5, astro.TT))
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("λ = %s, β = %+.2f″, R = %.8f au\n", astro.FormatDMS(lon, 2), lat.Arcseconds(), r)
	// Output:
	// λ = +199:54:21.55, β = +0.72″, R = 0.99760853 au
}

// ExampleAsteroidMagnitudeHG prints the H, G magnitude of an invented asteroid.
func ExampleAsteroidMagnitudeHG() {
	v := ephem.AsteroidMagnitudeHG(7.0, 0.15, 2.5, 1.6, 15*astro.Degree)
	fmt.Printf("V = %.2f\n", v)
	fmt.Println(math.IsNaN(ephem.AsteroidMagnitudeHG(7.0, 0.15, 0, 1.6, 0)))
	// Output:
	// V = 10.84
	// true
}
