package ephem_test

import (
	"fmt"

	"arcfit/astro"
	"arcfit/ephem"
)

// The Moon at an instant: its apparent ecliptic place of date and its
// illuminated fraction.
func ExampleMoonApparentEclipticOfDate() {
	tt := astro.NewJD(2461100.5, astro.TT) // 2026 Feb 28 0h TT
	lon, lat, distKm := ephem.MoonApparentEclipticOfDate(tt)
	fmt.Printf("λ = %.4f°, β = %+.4f°, Δ = %.0f km\n", lon.Degrees(), lat.Degrees(), distKm)
	// Output:
	// λ = 129.1043°, β = +2.6367°, Δ = 374634 km
}

// The principal phases of the Moon in one month. (The same instants, to the
// second, come from ERFA's moon98 and epv00 by the method of
// testdata/gen/erfa_moon.py.)
func ExampleMoonPhasesBetween() {
	from := astro.NewJD(2461070.5, astro.TT) // 2026 Jan 28 0h TT
	events, err := ephem.MoonPhasesBetween(from, from.AddDays(30))
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, e := range events {
		fmt.Printf("%-13s %s TT\n", e.Phase, astro.FormatISO8601(e.Time, 0))
	}
	// Output:
	// full moon     2026-02-01T22:10:32 TT
	// last quarter  2026-02-09T12:44:17 TT
	// new moon      2026-02-17T12:02:22 TT
	// first quarter 2026-02-24T12:28:42 TT
}
