package astro_test

import (
	"fmt"

	"arcfit/astro"
)

// The launch date of Meeus' example 7.a, 1957 October 4.81.
func ExampleCalendarToJD() {
	fmt.Printf("%.2f\n", astro.CalendarToJD(1957, 10, 4.81, astro.Gregorian))
	y, m, d := astro.JDToCalendar(1507900.13, astro.CalendarAuto)
	fmt.Printf("%d-%02d-%.2f\n", y, m, d)
	fmt.Println(astro.DayOfWeek(2434923.5))
	// Output:
	// 2436116.31
	// -584-05-28.63
	// Wednesday
}

// An observation time as fields, on a day that ends with a leap second.
func ExampleDateTimeToJD() {
	j, err := astro.DateTimeToJD(2016, 12, 31, 23, 59, 60.25, astro.UTC)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(astro.FormatISO8601(j, 2))
	_, err = astro.DateTimeToJD(2027, 2, 30, 21, 14, 5, astro.UTC)
	fmt.Println(err)
	// Output:
	// 2016-12-31T23:59:60.25Z
	// astro: day 30 not in 1–28 for 2027-02: value out of range
}
