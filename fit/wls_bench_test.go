package fit

import (
	"math/rand/v2"
	"testing"

	"arcfit/astro"
)

var sinkSolution *Solution

// BenchmarkFitPoly2_1000: a degree-2 fit, with the parallax column, of 1,000
// synthetic observations over 5 nights (target from the issue: under 1 ms).
func BenchmarkFitPoly2_1000(b *testing.B) {
	sig := 0.5 * float64(astro.Arcsecond)
	rng := rand.New(rand.NewPCG(3, 4))
	tr := synthTrack(arcTimes(5, 200), func(x float64) (float64, float64) { return 2e-4*x + 3e-6*x*x, -1e-4 * x }, inventedSite, sig, 0.2)
	for i := range tr.Points {
		p := &tr.Points[i]
		p.Xi += sig*rng.NormFloat64() - 0.8*p.SiteXi
		p.Eta += sig*rng.NormFloat64() - 0.8*p.SiteEta
	}
	// "reject": the default settings (Gaussian noise leaves ~3 points beyond
	// the 0.27 % threshold, each a refit); "keepall": one solve.
	for _, c := range []struct {
		name string
		s    Settings
	}{{"reject", Settings{}}, {"keepall", Settings{KeepAll: true}}} {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				s, err := Fit(tr, Poly(2), c.s)
				if err != nil {
					b.Fatal(err)
				}
				sinkSolution = s
			}
		})
	}
}

// BenchmarkPredict: one prediction for a site (site position, covariance
// propagation, rate).
func BenchmarkPredict(b *testing.B) {
	tr, sites := demoTrack(b)
	sol, err := Fit(tr, Poly(2), Settings{})
	if err != nil {
		b.Fatal(err)
	}
	st := sites["Alder Ridge"]
	at := tr.Points[len(tr.Points)-1].UTC.AddDays(1)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := sol.Predict(at, &st); err != nil {
			b.Fatal(err)
		}
	}
}
