package orbit

import (
	"math"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"
)

func TestZZMeasureN(t *testing.T) {
	base := dcCases()[0]
	arcs := []float64{3, 7, 14, 30, 60, 90}
	hors := []float64{0, 7, 15, 30, 60, 90, 180}
	type key struct{ l, h float64 }
	bias := map[key][]float64{}
	ratio := map[key][]float64{}
	for ph := 0; ph < 8; ph++ {
		c := base
		c.el.M = astro.Angle(float64(ph)*45) * astro.Degree
		c.el.Node = astro.Angle(55+float64(ph)*37) * astro.Degree
		truth := nbTruth(t, c)
		for _, L := range arcs {
			nights := int(L/2) + 2
			if L <= 3 { nights = 3 }
			// arc ending at epoch
			c2 := c
			c2.nights = nil
			for k := 0; k < nights; k++ {
				c2.nights = append(c2.nights, math.Floor(c.epoch.Day-L+L*float64(k)/float64(nights-1))+0.5)
			}
			c2.perNight = 3
			ts, ss := c2.schedule()
			obs := nbSynthObservations(t, truth, ts, ss, 1.0, nil)
			st := truth
			st.Motion = nil
			sol, err := Correct(obs, st, Options{KeepAll: true})
			if err != nil { t.Logf("fail %v", err); continue }
			last := ts[len(ts)-1]
			for _, H := range hors {
				u := last.AddDays(H)
				p, err := sol.Predict(u, dcAlderRidge)
				if err != nil { continue }
				tp := nbSynthObservations(t, truth, []astro.JD{u}, []*astro.Site{dcAlderRidge}, 1, nil)[0]
				b := astro.Separation(p.RA, p.Dec, tp.RA, tp.Dec).Arcseconds()
				a := math.Sqrt(math.Max(p.CovArcsec2[0][0], p.CovArcsec2[1][1]))
				m := skyMahalanobis(p.RA, p.Dec, p.CovArcsec2, tp.RA, tp.Dec)
				_ = a
				bias[key{L, H}] = append(bias[key{L, H}], b)
				ratio[key{L, H}] = append(ratio[key{L, H}], m)
			}
		}
	}
	_ = ephem.GMSun
	for _, L := range arcs {
		line := ""
		for _, H := range hors {
			bs := bias[key{L, H}]
			rs := ratio[key{L, H}]
			mb, mr := 0.0, 0.0
			for i := range bs { mb = math.Max(mb, bs[i]); mr = math.Max(mr, rs[i]) }
			med := func(x []float64) float64 { y := append([]float64(nil), x...); for i := range y { for j := i; j > 0 && y[j] < y[j-1]; j-- { y[j], y[j-1] = y[j-1], y[j] } }; if len(y)==0 {return math.NaN()}; return y[len(y)/2] }
			line += "  " + ftoa(L+H) + ":" + ftoa(med(bs)) + "\"/" + ftoa(mb) + "\" m" + ftoa(med(rs)) + "/" + ftoa(mr)
		}
		t.Logf("L=%v: %s", L, line)
	}
}

func ftoa(x float64) string { return fmtG(x) }
