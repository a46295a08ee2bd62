package orbit

import (
	"math"
	"math/rand/v2"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"
)

// The prediction of a noise-free fit against ephem's place of the invented
// element set it came from (ephem.PlaceOfElements: Kepler's equation, light
// time, the same site model), 20 days after the arc, geocentric and from
// both sites. The fit recovers the state to ~1e-10 relative, so the places
// agree far inside 1e-4″; Δ and r to 1e-9 au; the phase angle to 1e-9 rad;
// the elongation to 1e-7 rad (Predict takes the Sun along −HelioPos, ephem
// corrects it for light time: τ·Ṡ ≈ 0.006 d × 1e-5 au/d, ≲ 0.01″). The rate
// against ephem's places ±1 min, to 1e-6 relative and 1e-6 rad in PA.
func TestPredictAgainstEphem(t *testing.T) {
	for _, c := range dcCases() {
		ts, ss := c.schedule()
		obs := dcSynthObservations(t, c.el, ts, ss, 0.5, nil)
		sol, err := Correct(obs, dcPerturbed(c.truth(t), 0.01, rand.New(rand.NewPCG(51, 52))), Options{})
		if err != nil {
			t.Fatal(err)
		}
		at := ts[len(ts)-1].AddDays(20)
		for _, site := range []*astro.Site{nil, dcAlderRidge, dcBirchHollow} {
			pr, err := sol.Predict(at, site)
			if err != nil {
				t.Fatal(err)
			}
			pl, err := ephem.PlaceOfElements(c.el, at, ephem.Observer{Site: site})
			if err != nil {
				t.Fatal(err)
			}
			sep := astro.Separation(pr.RA, pr.Dec, pl.RA, pl.Dec).Arcseconds()
			if sep > 1e-4 {
				t.Errorf("%s, %v: place differs from ephem by %.3g″", c.name, site, sep)
			}
			if math.Abs(pr.DeltaAU-pl.DeltaAU) > 1e-9 || math.Abs(pr.RAU-pl.RAU) > 1e-9 ||
				math.Abs(float64(pr.PhaseAngle-pl.PhaseAngle)) > 1e-9 || math.Abs(float64(pr.Elongation-pl.Elongation)) > 1e-7 {
				t.Errorf("%s: Δ %.12f/%.12f r %.12f/%.12f phase %.9f/%.9f elong %.9f/%.9f", c.name,
					pr.DeltaAU, pl.DeltaAU, pr.RAU, pl.RAU, pr.PhaseAngle, pl.PhaseAngle, pr.Elongation, pl.Elongation)
			}
			p1, err1 := ephem.PlaceOfElements(c.el, at.AddDays(1.0/1440), ephem.Observer{Site: site})
			p0, err0 := ephem.PlaceOfElements(c.el, at.AddDays(-1.0/1440), ephem.Observer{Site: site})
			if err1 != nil || err0 != nil {
				t.Fatal(err1, err0)
			}
			cdir := astro.UnitVector(pl.RA, pl.Dec)
			e1, n1 := Residual(p1.RA, p1.Dec, cdir)
			e0, n0 := Residual(p0.RA, p0.Dec, cdir)
			rate := astro.Angle(math.Hypot(e1-e0, n1-n0) / 2).Arcseconds()
			pa := astro.Angle(math.Atan2(e1-e0, n1-n0)).Normalized()
			if math.Abs(pr.RateArcsecPerMin/rate-1) > 1e-6 || math.Abs(float64((pr.RatePA-pa).Wrapped())) > 1e-6 {
				t.Errorf("%s: rate %.9f″/min PA %.6f°, ephem %.9f PA %.6f°", c.name, pr.RateArcsecPerMin, pr.RatePA.Degrees(), rate, pa.Degrees())
			}
			cv := pr.CovArcsec2
			if pr.Method != "linear" || pr.Samples != nil || !(cv[0][0] > 0) || !(cv[1][1] > 0) ||
				cv[0][1] != cv[1][0] || cv[0][0]*cv[1][1] < cv[0][1]*cv[0][1] {
				t.Errorf("%s: method %q, covariance %v", c.name, pr.Method, cv)
			}
		}
	}
}

// The search region grows away from the arc: the predicted σ 60 days after
// the last observation exceeds that at the middle of the arc.
func TestPredictUncertaintyGrows(t *testing.T) {
	c := dcCases()[0]
	ts, ss := c.schedule()
	rng := rand.New(rand.NewPCG(53, 54))
	obs := dcSynthObservations(t, c.el, ts, ss, 0.5, rng)
	sol, err := Correct(obs, dcPerturbed(c.truth(t), 0.01, rng), Options{})
	if err != nil {
		t.Fatal(err)
	}
	mid, err := sol.Predict(ts[len(ts)/2], dcAlderRidge)
	if err != nil {
		t.Fatal(err)
	}
	far, err := sol.Predict(ts[len(ts)-1].AddDays(60), dcAlderRidge)
	if err != nil {
		t.Fatal(err)
	}
	tr := func(p SkyPrediction) float64 { return p.CovArcsec2[0][0] + p.CovArcsec2[1][1] }
	if !(tr(far) > 4*tr(mid)) {
		t.Errorf("σ² at +60 d %.3g arcsec², mid-arc %.3g", tr(far), tr(mid))
	}
	t.Logf("σ (trace) mid-arc %.3f″, +60 d %.3f″", math.Sqrt(tr(mid)), math.Sqrt(tr(far)))
}

func TestPredictErrors(t *testing.T) {
	c := dcCases()[0]
	ts, ss := c.schedule()
	obs := dcSynthObservations(t, c.el, ts, ss, 0.5, nil)
	sol, err := Correct(obs, c.truth(t), Options{})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := sol.Predict(astro.JD{Day: ts[0].Day, Scale: astro.TT}, nil); err == nil {
		t.Error("TT time accepted")
	}
	if _, err := sol.Predict(astro.JD{Day: math.NaN(), Scale: astro.UTC}, nil); err == nil {
		t.Error("NaN time accepted")
	}
}
