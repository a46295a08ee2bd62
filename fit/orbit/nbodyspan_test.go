package orbit

import (
	"fmt"
	"math"
	"sort"
	"strings"
	"testing"

	"arcfit/astro"
)

// TestNBodySpanMeasurement reruns the measurement behind the auto rule's
// span (fit.NBodySpanDays, whose doc comment and docs/models.md quote its
// figures): an invented main-belt orbit (a = 2.61 au, e = 0.17, i = 9.3°) at
// eight phases of its orbit and node (M = 0°, 45°, …, 315°, Ω = 55° + 37°·k,
// so Jupiter's direction varies too), observed three times a night every
// other night with 1″ stated σ, noise-free places from the n-body path,
// fitted with two-body motion (from the truth, no outlier rule) and
// predicted h days after the arc of length l. The two-body prediction's
// bias against the perturbed truth, and its Mahalanobis distance in the
// two-body region's own covariance, are logged by span l + h, and the
// figures the rule quotes are checked:
//
//   - spans up to 37 d: median bias (over the eight) at most 0.05″;
//   - a horizon of 60 d or more: median bias at least 0.25″, a quarter of
//     the amateur σ;
//   - span 60 d for arcs of 30 and 60 d: the worst bias between 0.3 and 1
//     of the region's σ ("half a σ").
func TestNBodySpanMeasurement(t *testing.T) {
	base := dcCases()[0]
	arcs := []float64{3, 7, 14, 30, 60, 90}
	hors := []float64{0, 15, 30, 60, 90, 180}
	type key struct{ l, h float64 }
	bias := map[key][]float64{}
	maha := map[key][]float64{}
	for ph := range 8 {
		c := base
		c.el.M = astro.Angle(float64(ph)*45) * astro.Degree
		c.el.Node = astro.Angle(55+float64(ph)*37) * astro.Degree
		truth := nbTruth(t, c)
		for _, l := range arcs {
			nights := max(3, int(l/2)+2)
			c2 := c
			c2.nights = nil
			for k := range nights {
				c2.nights = append(c2.nights, math.Floor(c.epoch.Day-l+l*float64(k)/float64(nights-1))+0.5)
			}
			c2.perNight = 3
			ts, ss := c2.schedule()
			obs := nbSynthObservations(t, truth, ts, ss, 1.0, nil)
			start := truth
			start.Motion = nil
			sol, err := Correct(obs, start, Options{KeepAll: true})
			if err != nil {
				t.Fatalf("phase %d, arc %g d: %v", ph, l, err)
			}
			last := ts[len(ts)-1]
			for _, h := range hors {
				u := last.AddDays(h)
				p, err := sol.Predict(u, dcAlderRidge)
				if err != nil {
					t.Fatal(err)
				}
				tp := nbSynthObservations(t, truth, []astro.JD{u}, []*astro.Site{dcAlderRidge}, 1, nil)[0]
				k := key{l, h}
				bias[k] = append(bias[k], astro.Separation(p.RA, p.Dec, tp.RA, tp.Dec).Arcseconds())
				maha[k] = append(maha[k], skyMahalanobis(p.RA, p.Dec, p.CovArcsec2, tp.RA, tp.Dec))
			}
		}
	}
	median := func(x []float64) float64 {
		y := append([]float64(nil), x...)
		sort.Float64s(y)
		return (y[len(y)/2-1] + y[len(y)/2]) / 2
	}
	worst := func(x []float64) float64 {
		m := 0.0
		for _, v := range x {
			m = math.Max(m, v)
		}
		return m
	}
	for _, l := range arcs {
		var cells []string
		for _, h := range hors {
			k := key{l, h}
			cells = append(cells, fmt.Sprintf("%3.0f d: %.3g″ (%.3g″, %.2gσ)", l+h, median(bias[k]), worst(bias[k]), worst(maha[k])))
		}
		t.Logf("arc %2.0f d, span: median bias (worst, worst in σ): %s", l, strings.Join(cells, "; "))
	}
	for k, b := range bias {
		if k.l+k.h <= 37 && median(b) > 0.05 {
			t.Errorf("arc %g d + %g d: median bias %.3g″, quoted at most 0.05″", k.l, k.h, median(b))
		}
		if k.h >= 60 && median(b) < 0.25 {
			t.Errorf("arc %g d + %g d: median bias %.3g″, quoted at least 0.25″", k.l, k.h, median(b))
		}
	}
	for _, k := range []key{{30, 30}, {60, 0}} {
		if w := worst(maha[k]); w < 0.3 || w > 1 {
			t.Errorf("arc %g d + %g d: worst bias %.2g σ, quoted about half a σ", k.l, k.h, w)
		}
	}
}
