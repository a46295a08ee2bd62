package astro_test

import (
	"errors"
	"fmt"

	"arcfit/astro"
)

// A time from an invented observing log, written in local time (UTC+1).
func ExampleParseISO8601() {
	j, err := astro.ParseISO8601("2027-02-03T22:14:05.2+01:00")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(astro.FormatISO8601(j, 2))
	fmt.Printf("%.6f\n", j.Float())

	_, err = astro.ParseISO8601("2027-02-03T21:14:05")
	var fe *astro.FieldError
	if errors.As(err, &fe) {
		fmt.Printf("offset %d: %v\n", fe.Offset, fe)
	}
	// Output:
	// 2027-02-03T21:14:05.20Z
	// 2461440.384782
	// offset 19: want a zone: add Z for UTC or an offset such as +01:00
}

func ExampleFormatISO8601() {
	j, _ := astro.ParseISO8601("2027-02-03T21:14:59.996Z")
	fmt.Println(astro.FormatISO8601(j, 2))
	fmt.Println(astro.FormatISO8601(j, 3))
	// Output:
	// 2027-02-03T21:15:00.00Z
	// 2027-02-03T21:14:59.996Z
}
