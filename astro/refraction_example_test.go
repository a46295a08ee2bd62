package astro_test

import (
	"fmt"

	"arcfit/astro"
)

// Refraction and air mass towards an invented target low in the sky.
func ExampleRefractionSaemundsson() {
	trueAlt := astro.AngleFromDegrees(10)
	r := astro.RefractionSaemundsson(trueAlt, astro.StandardPressureHPa, astro.StandardTemperatureC)
	fmt.Printf("refraction %.2f′, apparent altitude %.3f°\n", r.Arcminutes(), (trueAlt + r).Degrees())
	// Output: refraction 5.41′, apparent altitude 10.090°
}

func ExampleRefractionBennett() {
	r := astro.RefractionBennett(astro.AngleFromDegrees(10), 850, -5)
	fmt.Printf("refraction at a cold mountain site: %.2f′\n", r.Arcminutes())
	// Output: refraction at a cold mountain site: 4.79′
}
