package astro_test

import (
	"fmt"
	"math"

	"arcfit/astro"
	"gonum.org/v1/gonum/spatial/r3"
)

// rotExampleSite is an invented observing site.
var rotExampleSite = astro.Site{Name: "Ridge Hollow", Lat: 44.52 * astro.Degree, Lon: -72.80 * astro.Degree, HeightM: 410}

func ExampleEarthRotationAngle() {
	// J2000.0 as a UT1 date: θ = 2π × 0.7790572732640.
	era := astro.EarthRotationAngle(astro.NewJD(2451545.0, astro.UT1))
	fmt.Printf("%.10f°\n", era.Degrees())
	// Output:
	// 280.4606183750°
}

func ExampleGreenwichMeanSiderealTime1982() {
	// Meeus, Astronomical Algorithms, example 12.b: 1987 April 10, 19h21m UT.
	gmst := astro.GreenwichMeanSiderealTime1982(astro.JD{Day: 2446895.5, Frac: 0.80625, Scale: astro.UT1})
	fmt.Printf("%.6f°\n", gmst.Degrees())
	// Output:
	// 128.737873°
}

func ExampleGreenwichApparentSiderealTime() {
	// An evening in 2027: UT1 and TT of the same instant (TT − UT1 = 69.2 s here).
	ut1 := astro.JD{Day: 2461440.5, Frac: 0.38478, Scale: astro.UT1}
	tt := ut1.AddSeconds(69.2)
	tt.Scale = astro.TT
	gmst := astro.GreenwichMeanSiderealTime(ut1, tt)
	gast := astro.GreenwichApparentSiderealTime(ut1, tt)
	fmt.Printf("GMST %.6f h\nGAST %.6f h\n", gmst.Hours(), gast.Hours())
	fmt.Printf("equation of the equinoxes %.4f s\n", astro.EquationOfEquinoxes(tt).Hours()*3600)
	// Output:
	// GMST 18.188947 h
	// GAST 18.189154 h
	// equation of the equinoxes 0.7469 s
}

func ExampleEquatorialToHorizontal() {
	// An invented star at RA 5h10m, Dec +31°, seen from Ridge Hollow when the
	// local sidereal time is 4h00m: an hour and ten minutes before it transits.
	lst := astro.LocalSiderealTime(astro.AngleFromHours(4)-rotExampleSite.Lon, rotExampleSite.Lon)
	ha := astro.LocalHourAngle(lst, astro.AngleFromHours(5+10.0/60))
	az, alt := astro.EquatorialToHorizontal(ha, 31*astro.Degree, rotExampleSite.Lat)
	fmt.Printf("H %.4f h, azimuth %.3f°, altitude %.3f°\n", ha.Hours(), az.Degrees(), alt.Degrees())
	ha2, dec2 := astro.HorizontalToEquatorial(az, alt, rotExampleSite.Lat)
	fmt.Printf("back: H %.4f h, Dec %.3f°\n", ha2.Hours(), dec2.Degrees())
	// Output:
	// H -1.1667 h, azimuth 128.628°, altitude 70.735°
	// back: H -1.1667 h, Dec 31.000°
}

func ExampleGeocentricParallax() {
	// Meeus, Astronomical Algorithms, example 11.a, on the IAU 1976 ellipsoid.
	lat := astro.AngleFromDegrees(33 + 21.0/60 + 22.0/3600)
	rs, rc := astro.GeocentricParallax(astro.IAU1976, lat, 1706)
	fmt.Printf("ρ sin φ′ = %.6f, ρ cos φ′ = %.6f\n", rs, rc)
	// Output:
	// ρ sin φ′ = 0.546861, ρ cos φ′ = 0.836339
}

func ExampleSite_ITRS() {
	p := rotExampleSite.ITRS()
	km := r3.Scale(astro.AUKm, p)
	fmt.Printf("x %.3f km, y %.3f km, z %.3f km\n", km.X, km.Y, km.Z)
	// Output:
	// x 1347.081 km, y -4351.716 km, z 4449.761 km
}

func ExampleSitePositionGCRS() {
	ut1 := astro.JD{Day: 2461440.5, Frac: 0.38478, Scale: astro.UT1}
	tt := ut1.AddSeconds(69.2)
	tt.Scale = astro.TT
	pos, vel := astro.SitePositionGCRS(rotExampleSite, ut1, tt)
	km := r3.Scale(astro.AUKm, pos)
	speed := r3.Norm(vel) * astro.AUKm * 1000 / astro.SecondsPerDay
	fmt.Printf("GCRS %.1f %.1f %.1f km, |r| %.1f km\n", km.X, km.Y, km.Z, r3.Norm(km))
	fmt.Printf("speed %.1f m/s, declination of the site %.2f°\n", speed,
		math.Asin(km.Z/r3.Norm(km))*180/math.Pi)
	// Output:
	// GCRS -4277.3 -1534.5 4461.2 km, |r| 6368.1 km
	// speed 332.2 m/s, declination of the site 44.47°
}
