package obs_test

import (
	"fmt"
	"strings"

	"arcfit/astro/obs"
)

// An invented track pasted with its rows out of order, one row twice and a
// column the reader does not use.
func ExampleRead() {
	const file = `time,ra,dec,sigma,site,comment
2027-02-03T22:14:05.20Z,10:21:32.010,+12:45:41.62,0.5,Hill Top,
2027-02-03T21:14:05.20Z,10:21:33.512,+12:45:10.21,0.5,Hill Top,first
2027-02-03T21:14:05.20Z,10:21:33.512,+12:45:10.21,0.5,Hill Top,again
`
	s, err := obs.Read(strings.NewReader(file), "track.csv", obs.ReadOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, o := range s.Obs {
		fmt.Printf("line %d: ra %.5f° dec %+.5f° σ %.1f″ %s used=%v\n",
			o.Line, o.RA.Degrees(), o.Dec.Degrees(), o.SigmaRA.Arcseconds(), o.Site, o.Used)
	}
	for _, w := range s.Warnings {
		fmt.Println(w)
	}
	_, err = obs.Read(strings.NewReader("time,ra,dec\n2027-02-03T21:14:05.20Z,10:21:33.512,+91:00\n"), "bad.csv", obs.ReadOptions{})
	fmt.Println(err)
	// Output:
	// line 3: ra 155.38963° dec +12.75284° σ 0.5″ Hill Top used=true
	// line 4: ra 155.38963° dec +12.75284° σ 0.5″ Hill Top used=false
	// line 2: ra 155.38338° dec +12.76156° σ 0.5″ Hill Top used=true
	// track.csv:1:24: warning: column "comment" is not used
	// track.csv:4: warning: repeats line 3 exactly; counted once
	// bad.csv:2:39: dec: want a declination in degrees between −90 and +90, got "+91:00"
}
