package astro_test

import (
	"fmt"

	"arcfit/astro"
)

// The motion of an invented asteroid between two measurements.
func ExampleSeparation() {
	ra1, _ := astro.ParseRA("10:21:33.512")
	dec1, _ := astro.ParseDec("+12:45:10.21")
	ra2, _ := astro.ParseRA("10:21:30.100")
	dec2, _ := astro.ParseDec("+12:46:02.90")
	fmt.Printf("moved %.2f″ towards PA %.1f°\n",
		astro.Separation(ra1, dec1, ra2, dec2).Arcseconds(),
		astro.PositionAngle(ra1, dec1, ra2, dec2).Degrees())
	// Output: moved 72.58″ towards PA 316.6°
}
