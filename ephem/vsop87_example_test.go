package ephem_test

import (
	"fmt"
	"math"

	"arcfit/astro"
	"arcfit/ephem"
)

// The Earth's distance from the Sun and its heliocentric direction in ICRS
// axes on an invented observing night. (ERFA's epv00 gives the same figures to
// the digits printed.)
func ExampleHeliocentricICRS() {
	tdb := astro.NewJD(2461440.5, astro.TDB) // 2027 February 3, 0h TDB
	pos, vel, err := ephem.HeliocentricICRS(ephem.Earth, tdb)
	if err != nil {
		fmt.Println(err)
		return
	}
	ra, dec, r := astro.Spherical(pos)
	speedKmS := math.Sqrt(vel.X*vel.X+vel.Y*vel.Y+vel.Z*vel.Z) * astro.AUKm / astro.SecondsPerDay
	fmt.Printf("r = %.6f au, RA %.4f h, Dec %+.4f°, speed %.3f km/s\n", r, ra.Hours(), dec.Degrees(), speedKmS)
	// Output:
	// r = 0.985718 au, RA 9.1342 h, Dec +16.4659°, speed 30.225 km/s
}

// Mars' heliocentric ecliptic longitude, latitude and distance, J2000.
func ExampleHeliocentricSpherical() {
	b, err := ephem.ParseBody("mars")
	if err != nil {
		fmt.Println(err)
		return
	}
	lon, lat, r, err := ephem.HeliocentricSpherical(b, astro.NewJD(2461440.5, astro.TDB))
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%v: L = %.4f°, B = %+.4f°, R = %.6f au\n", b, lon.Degrees(), lat.Degrees(), r)
	// Output:
	// Mars: L = 143.5319°, B = +1.8428°, R = 1.661942 au
}

// A date outside the span of the series gives a one-line error.
func ExampleHeliocentricEclipticJ2000_outOfSpan() {
	_, _, err := ephem.HeliocentricEclipticJ2000(ephem.Jupiter, astro.NewJD(2900000.5, astro.TDB))
	fmt.Println(err)
	// Output:
	// ephem: Jupiter: JD 2900000.50000 TDB is outside the VSOP87 span, JD 2086295.0 to 2816795.0 TDB (J2000 ± 1000 years): date outside the supported span
}
