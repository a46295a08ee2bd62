package astro_test

import (
	"fmt"

	"arcfit/astro"
)

// The nutation and obliquity of an invented observing night, 2031 March 4,
// 0h TT.
func ExampleNutation1980() {
	tt := astro.NewJD(2463294.5, astro.TT)
	dpsi, deps := astro.Nutation1980(tt)
	fmt.Printf("Δψ = %+.3f″, Δε = %+.3f″\n", dpsi.Arcseconds(), deps.Arcseconds())
	fmt.Printf("ε = %.6f°\n", astro.TrueObliquity(tt).Degrees())
	// (erfa.nut80 gives +12.5521″, −6.2899″; erfa.obl06 + Δε 23.433347°.)
	// Output:
	// Δψ = +12.552″, Δε = -6.290″
	// ε = 23.433347°
}

// Where to point for an invented star, astrometric (ICRS) α = 10h21m33.512s,
// δ = +12°45′10.21″, on 2031 March 4, 21h TT.
func ExampleApparentPlace() {
	ra := astro.AngleFromHours(10 + 21.0/60 + 33.512/3600)
	dec := astro.AngleFromDegrees(12 + 45.0/60 + 10.21/3600)
	tt := astro.NewJD(2463295.375, astro.TT)
	raDate, decDate := astro.ApparentPlace(ra, dec, tt)
	fmt.Printf("α = %.5f h, δ = %+.5f°\n", raDate.Hours(), decDate.Degrees())
	// (ERFA ab with the epv00 velocity, then pnm06a: 10.388456 h, +12.585742°.)
	// Output:
	// α = 10.38846 h, δ = +12.58574°
}

// Ecliptic coordinates of the same invented direction, ecliptic and equinox
// of J2000.0 (IAU 2006 obliquity).
func ExampleEquatorialToEcliptic() {
	ra := astro.AngleFromHours(10 + 21.0/60 + 33.512/3600)
	dec := astro.AngleFromDegrees(12 + 45.0/60 + 10.21/3600)
	eps := astro.MeanObliquity2006(astro.NewJD(astro.J2000, astro.TT))
	lon, lat := astro.EquatorialToEcliptic(ra, dec, eps)
	fmt.Printf("λ = %.5f°, β = %+.5f°\n", lon.Degrees(), lat.Degrees())
	// (erfa.eqec06 at J2000.0: 152.558025°, +2.347744°.)
	// Output:
	// λ = 152.55802°, β = +2.34774°
}
