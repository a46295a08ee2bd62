package ephem

import (
	"errors"
	"math"
	"testing"

	"arcfit/astro"
)

var benchPlaceSink Place

// benchElements is an invented main-belt element set.
var benchElements = Elements{
	Name:  "Invented-Bench",
	Epoch: astro.NewJD(2461400.5, astro.TT),
	A:     2.31, E: 0.17,
	I: 9.4 * astro.Degree, Node: 48 * astro.Degree, Peri: 122.5 * astro.Degree, M: 340 * astro.Degree,
	H: 14.2, G: 0.15,
}

var benchSite = &astro.Site{Name: "Invented Ridge", Lat: 44.52 * astro.Degree, Lon: -72.80 * astro.Degree, HeightM: 410}

// BenchmarkPlaceOfElements measures one topocentric place of an element-set
// body (light time, apparent place, alt/az, Moon separation, magnitude).
func BenchmarkPlaceOfElements(b *testing.B) {
	b.ReportAllocs()
	utc := astro.NewJD(2461440.5, astro.UTC)
	o := Observer{Site: benchSite}
	for i := 0; b.Loop(); i++ {
		p, err := PlaceOfElements(benchElements, utc.AddDays(float64(i%1000)*1e-3), o)
		if err != nil {
			b.Fatal(err)
		}
		benchPlaceSink = p
	}
}

// BenchmarkEphemTable100k makes an ephemeris table of 100,000 rows (10-minute
// steps, about 694 days) for an element-set body seen from a site, and
// reports rows per second.
func BenchmarkEphemTable100k(b *testing.B) {
	b.ReportAllocs()
	const rows = 100000
	start := astro.NewJD(2461440.5, astro.UTC)
	o := Observer{Site: benchSite}
	for b.Loop() {
		for i := range rows {
			p, err := PlaceOfElements(benchElements, start.AddDays(float64(i)/144), o)
			if err != nil && !errors.Is(err, astro.ErrStaleTable) { // the table ends inside the leap-second table's horizon
				b.Fatal(err)
			}
			benchPlaceSink = p
		}
	}
	b.ReportMetric(float64(rows*b.N)/b.Elapsed().Seconds(), "rows/s")
}

// BenchmarkSunBarycentricICRS measures the Sun's barycentric state.
func BenchmarkSunBarycentricICRS(b *testing.B) {
	b.ReportAllocs()
	tdb := astro.NewJD(2461440.5, astro.TDB)
	var s float64
	for i := 0; b.Loop(); i++ {
		p, _ := SunBarycentricICRS(tdb.AddDays(float64(i%1000) * 0.1))
		s += p.X
	}
	benchPlaceSink.Mag = math.Abs(s)
}
