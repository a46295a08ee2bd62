package astro_test

import (
	"fmt"

	"arcfit/astro"
)

// Standard coordinates of an invented object about a field centre, and back.
func ExampleTangentPlane() {
	p := astro.TangentPlane{RA0: astro.AngleFromHours(10.36), Dec0: astro.AngleFromDegrees(12.75)}
	ra, _ := astro.ParseRA("10:21:33.512")
	dec, _ := astro.ParseDec("+12:45:10.21")
	xi, eta, err := p.Project(ra, dec)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("ξ = %+.2f″, η = %+.2f″\n", astro.Angle(xi).Arcseconds(), astro.Angle(eta).Arcseconds())
	ra2, dec2 := p.Deproject(xi, eta)
	fmt.Println(astro.FormatHMS(ra2, 3), astro.FormatDMS(dec2, 2))
	// Output:
	// ξ = -36.40″, η = +10.21″
	// 10:21:33.512 +12:45:10.21
}
