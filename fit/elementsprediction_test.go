package fit

import (
	"math"
	"math/rand/v2"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// invented element set with stated σ (an invented main-belt asteroid).
func sigmaElements() ephem.Elements {
	return ephem.Elements{Name: "Invented-Sigma", Epoch: astro.JD{Day: 2461440, Frac: 0.5, Scale: astro.TT},
		A: 2.61, E: 0.17, I: 9.3 * astro.Degree, Node: 121 * astro.Degree, Peri: 33 * astro.Degree, M: 40 * astro.Degree,
		Q: 2.61 * 0.83, H: 15.2, G: math.NaN(),
		Sigma: &ephem.ElementSigma{A: 2e-5, E: 1e-5, I: 0.0005 * astro.Degree, Node: 0.002 * astro.Degree,
			Peri: 0.01 * astro.Degree, M: 0.008 * astro.Degree}}
}

// The linear covariance of PredictElements against the scatter of places of
// element sets drawn from the stated σ (independent Gaussians), 4,000 draws.
// The sample variance of N normal draws has a relative standard error
// √(2/N) = 2.2 %; the tolerance, 8 %, is 3.6 of those standard errors, and
// leaves room for the small non-linearity of a 2-month extrapolation.
func TestPredictElementsCovarianceMatchesSampling(t *testing.T) {
	el := sigmaElements()
	site := &astro.Site{Name: "Alder Ridge", Lat: 44.52 * astro.Degree, Lon: -72.80 * astro.Degree, HeightM: 410}
	utc := astro.JD{Day: 2461500, Frac: 0.25, Scale: astro.UTC}
	p, err := PredictElements(el, utc, site)
	if err != nil {
		t.Fatal(err)
	}
	if math.IsNaN(p.Mag) || !(p.DeltaAU > 0) || p.Model != ElementsModelName {
		t.Fatalf("prediction %+v: want a magnitude, a distance and model %q", p, ElementsModelName)
	}
	c := astro.UnitVector(p.RA, p.Dec)
	east, north := localEastNorth(c)
	rng := rand.New(rand.NewPCG(7, 11))
	const n = 4000
	var sE, sN, sEE, sNN, sEN float64
	for range n {
		e := el
		sg := *el.Sigma
		e.Sigma = nil
		e.A += rng.NormFloat64() * sg.A
		e.E += rng.NormFloat64() * sg.E
		e.Q = e.A * (1 - e.E)
		e.I += astro.Angle(rng.NormFloat64()) * sg.I
		e.Node += astro.Angle(rng.NormFloat64()) * sg.Node
		e.Peri += astro.Angle(rng.NormFloat64()) * sg.Peri
		e.M += astro.Angle(rng.NormFloat64()) * sg.M
		pl, err := ephem.PlaceOfElements(e, utc, ephem.Observer{Site: site})
		if err != nil {
			t.Fatal(err)
		}
		v := astro.UnitVector(pl.RA, pl.Dec)
		w := r3.Dot(v, c)
		dE, dN := astro.Angle(r3.Dot(v, east)/w).Arcseconds(), astro.Angle(r3.Dot(v, north)/w).Arcseconds()
		sE += dE
		sN += dN
		sEE += dE * dE
		sNN += dN * dN
		sEN += dE * dN
	}
	mE, mN := sE/n, sN/n
	vEE, vNN, vEN := sEE/n-mE*mE, sNN/n-mN*mN, sEN/n-mE*mN
	if r := vEE / p.CovArcsec2[0][0]; math.Abs(r-1) > 0.08 {
		t.Errorf("var(Δα cos δ): sampled %.4g, linear %.4g (ratio %.3f)", vEE, p.CovArcsec2[0][0], r)
	}
	if r := vNN / p.CovArcsec2[1][1]; math.Abs(r-1) > 0.08 {
		t.Errorf("var(Δδ): sampled %.4g, linear %.4g (ratio %.3f)", vNN, p.CovArcsec2[1][1], r)
	}
	rhoS := vEN / math.Sqrt(vEE*vNN)
	rhoL := p.CovArcsec2[0][1] / math.Sqrt(p.CovArcsec2[0][0]*p.CovArcsec2[1][1])
	if math.Abs(rhoS-rhoL) > 0.05 {
		t.Errorf("correlation: sampled %.3f, linear %.3f", rhoS, rhoL)
	}
	t.Logf("3-σ ellipse %.1f″ × %.1f″; sampled σ %.2f″, %.2f″", p.Ellipse(3).SemiMajorArcsec, p.Ellipse(3).SemiMinorArcsec, math.Sqrt(vEE), math.Sqrt(vNN))
}

// Without stated σ the region is a point; the place is ephem's.
func TestPredictElementsNoSigma(t *testing.T) {
	el := sigmaElements()
	el.Sigma = nil
	utc := astro.JD{Day: 2461500, Frac: 0.25, Scale: astro.UTC}
	p, err := PredictElements(el, utc, nil)
	if err != nil {
		t.Fatal(err)
	}
	if p.CovArcsec2 != [2][2]float64{} {
		t.Errorf("covariance %v without σ, want zero", p.CovArcsec2)
	}
	pl, _ := ephem.PlaceOfElements(el, utc, ephem.Observer{})
	if p.RA != pl.RA || p.Dec != pl.Dec {
		t.Errorf("place %v %v, ephem %v %v", p.RA, p.Dec, pl.RA, pl.Dec)
	}
	if !(p.RateArcsecPerMin > 0) {
		t.Errorf("rate %g", p.RateArcsecPerMin)
	}
}
