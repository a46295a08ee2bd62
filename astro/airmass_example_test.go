package astro_test

import (
	"fmt"

	"arcfit/astro"
)

func ExampleAirmassKastenYoung() {
	for _, alt := range []float64{90, 30, 10, 0, -2} {
		fmt.Printf("altitude %3.0f°: %.3f\n", alt, astro.AirmassKastenYoung(astro.AngleFromDegrees(alt)))
	}
	// Output:
	// altitude  90°: 1.000
	// altitude  30°: 1.994
	// altitude  10°: 5.586
	// altitude   0°: 37.920
	// altitude  -2°: +Inf
}
