package astro_test

import (
	"errors"
	"fmt"

	"arcfit/astro"
)

// From an observation time in UTC to TT and TDB.
func ExampleUTCToTT() {
	utc, _ := astro.ParseISO8601("2027-02-03T21:14:05.20Z")
	tt, err := astro.UTCToTT(utc)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(astro.FormatISO8601(tt, 3), tt.Scale)
	tdb := astro.TTToTDB(tt)
	// erfa.dtdb gives 0.846 ms here; the seven-term series is good to 10 µs.
	fmt.Printf("TDB−TT = %.3f ms\n", astro.TDBMinusTT(tt)*1e3)
	fmt.Println(tdb.Scale)

	// Beyond the leap-second table the value comes with a warning.
	later, _ := astro.ParseISO8601("2031-02-03T21:14:05Z")
	_, err = astro.UTCToTT(later)
	fmt.Println(errors.Is(err, astro.ErrStaleTable))
	// Output:
	// 2027-02-03T21:15:14.384 TT
	// TDB−TT = 0.849 ms
	// TDB
	// true
}

func ExampleDeltaT() {
	dt, err := astro.DeltaT(1977.13)
	fmt.Printf("%.1f s %v\n", dt, err)
	_, err = astro.DeltaT(2040)
	fmt.Println(errors.Is(err, astro.ErrStaleTable))
	// Output:
	// 47.7 s <nil>
	// true
}
