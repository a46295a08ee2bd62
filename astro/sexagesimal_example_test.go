package astro_test

import (
	"fmt"

	"arcfit/astro"
)

// A measured position of an invented object, as an observer would type it.
func ExampleParseRA() {
	ra, err := astro.ParseRA("10:21:33.512")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.6f°\n", ra.Degrees())
	_, err = astro.ParseRA("10:61:00")
	fmt.Println(err)
	// Output:
	// 155.389633°
	// want minutes below 60, got "61"
}

func ExampleParseDec() {
	dec, _ := astro.ParseDec("-00 12 30.0")
	fmt.Printf("%.6f°\n", dec.Degrees())
	// Output: -0.208333°
}

func ExampleFormatHMS() {
	ra := astro.AngleFromHours(10 + 21.0/60 + 59.9996/3600)
	fmt.Println(astro.FormatHMS(ra, 3))
	fmt.Println(astro.FormatHMS(ra, 4))
	// Output:
	// 10:22:00.000
	// 10:21:59.9996
}

func ExampleFormatDMS() {
	fmt.Println(astro.FormatDMS(astro.AngleFromDegrees(-0.208333333333), 2))
	fmt.Println(astro.FormatDMS(astro.AngleFromDegrees(123.5), 0))
	// Output:
	// -00:12:30.00
	// +123:30:00
}
