package fit

import (
	"testing"

	"arcfit/ephem"
)

func TestCalibProbe(t *testing.T) {
	sc := newMainBeltScenario(t, 0.5)
	tr, err := NewTrack(sc.set, sc.sites)
	if err != nil {
		t.Fatal(err)
	}
	geo, _ := ephem.PlaceOfElements(calibMainBelt, sc.truthUTC, ephem.Observer{})
	for _, m := range []Model{Poly(2), Poly(3)} {
		for _, s := range []Settings{{Parallax: ParallaxFit, KeepAll: true}, {Parallax: ParallaxFixed, InvDistance: 1 / 1.4155, KeepAll: true}} {
			sol, err := Fit(tr, m, s)
			if err != nil {
				t.Fatal(err)
			}
			pr, _ := sol.Predict(sc.truthUTC, &sc.truthSite)
			pg, _ := sol.Predict(sc.truthUTC, nil)
			e, n := calibSkyOffsetArcsec(t, pr.RA, pr.Dec, sc.truth.RA, sc.truth.Dec)
			eg, ng := calibSkyOffsetArcsec(t, pg.RA, pg.Dec, geo.RA, geo.Dec)
			t.Logf("%s %v: rms %.4f topo miss %.4f %.4f geo miss %.4f %.4f u %.5f chi2 %.3g", m, s.Parallax, sol.RMSArcsec, e, n, eg, ng, sol.InvDistance, sol.Chi2)
		}
	}
	for _, p := range tr.Points {
		t.Logf("T %.4f site %s sxi %.3g seta %.3g", p.T, p.Site, p.SiteXi, p.SiteEta)
	}
}
