package main

import (
	"path/filepath"
	"testing"

	"arcfit/ephem"
	"arcfit/fit"
)

// BenchmarkFitPoly2 times the fit of bench/compare.sh (fit.Fit, poly2,
// parallax off, no outlier rejection) at 1,000 and 1,000,000 observations,
// for profiling with -cpuprofile.
func BenchmarkFitPoly2(b *testing.B) {
	for _, c := range []struct {
		name string
		n    int
	}{{"n=1000", 1000}, {"n=1000000", 1000000}} {
		b.Run(c.name, func(b *testing.B) {
			path := filepath.Join(b.TempDir(), "fit.bin")
			if err := writeFitInput(path, c.n); err != nil {
				b.Fatal(err)
			}
			tr, err := readFitInput(path)
			if err != nil {
				b.Fatal(err)
			}
			s := fit.Settings{Parallax: fit.ParallaxOff, KeepAll: true}
			b.ReportAllocs()
			for b.Loop() {
				if _, err := fit.Fit(tr, fit.Poly(2), s); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkElementsTable times the element-set table of bench/compare.sh
// (100,000 rows at 10-minute steps, geocentric).
func BenchmarkElementsTable(b *testing.B) {
	el := peerElements
	b.ReportAllocs()
	for b.Loop() {
		if _, err := table(ephem.TableTarget{Elements: &el}, 100000, elementsStepDays); err != nil {
			b.Fatal(err)
		}
	}
}
