package orbit

import (
	"math"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// The ellipse convention of the sky-plane fit (package fit, Prediction.
// Ellipse): semi-axes from the eigenvalues, the position angle of the major
// axis from north through east in [0°, 180°). Exact cases by geometry: a
// covariance elongated east–west has PA 90°, north–south 0°, along the
// north-east diagonal 45°, along north-west 135° (common practice: PA from
// north through east).
func TestSampledRegionEllipseConvention(t *testing.T) {
	for _, c := range []struct {
		cov          [2][2]float64
		major, minor float64
		paDeg        float64
	}{
		{[2][2]float64{{4, 0}, {0, 1}}, 6, 3, 90},
		{[2][2]float64{{1, 0}, {0, 4}}, 6, 3, 0},
		{[2][2]float64{{2.5, 1.5}, {1.5, 2.5}}, 6, 3, 45},
		{[2][2]float64{{2.5, -1.5}, {-1.5, 2.5}}, 6, 3, 135},
		{[2][2]float64{{1, 0}, {0, 1}}, 3, 3, 0},
	} {
		e := (&SampledRegion{CovArcsec2: c.cov}).Ellipse(3)
		if math.Abs(e.SemiMajorArcsec-c.major) > 1e-12 || math.Abs(e.SemiMinorArcsec-c.minor) > 1e-12 ||
			math.Abs(e.PA.Degrees()-c.paDeg) > 1e-9 || e.Sigma != 3 {
			t.Errorf("cov %v: %.6g × %.6g″ PA %.6g°, want %g × %g″ PA %g°", c.cov, e.SemiMajorArcsec, e.SemiMinorArcsec, e.PA.Degrees(), c.major, c.minor, c.paDeg)
		}
	}
}

// For a normal cloud the nσ ellipse holds 1 − exp(−n²/2) of the samples
// (2-dof χ² survival function; Press et al., Numerical Recipes, 3rd ed.
// (2007), §15.6): 39.35 % at 1σ, 98.89 % at 3σ. With N = 10 000 equal
// weights the binomial standard error is √(p(1 − p)/N) (0.49 % and 0.10 %);
// band 4.5 standard errors. The cloud: the 10-day arc's covariance scaled
// by 1e-4 (linear over its spread, see TestCovarianceOrbitsMatchLinear).
func TestSampledRegionInsideFraction(t *testing.T) {
	st, cov := mcTestSolution(t)
	cov.ScaleSym(1e-4, cov)
	g, err := ephem.ObserverGeometryAt(astro.JD{Day: 2461487.5, Frac: 0.1, Scale: astro.UTC}, rgAlderRidge, 0)
	if err != nil {
		t.Fatal(err)
	}
	set, err := CovarianceOrbits(st, cov, MonteCarloSettings{N: 10000, Seed: 17})
	if err != nil {
		t.Fatal(err)
	}
	reg, err := set.Predict(g, MonteCarloSettings{})
	if err != nil {
		t.Fatal(err)
	}
	for _, k := range []float64{1, 2, 3} {
		p := 1 - math.Exp(-k*k/2)
		se := math.Sqrt(p * (1 - p) / 10000)
		if got := reg.Ellipse(k).Inside; math.Abs(got-p) > 4.5*se {
			t.Errorf("inside the %gσ ellipse: %.4f, want %.4f ± %.4f", k, got, p, 4.5*se)
		}
	}
	if d := reg.Mahalanobis(reg.RA, reg.Dec); d > 1e-6 {
		t.Errorf("centre at %gσ from itself", d)
	}
	if len(reg.Samples) != 10000 || reg.UTC != g.UTC || reg.Method != SamplingCovariance {
		t.Errorf("%d samples, UTC %v, method %q", len(reg.Samples), reg.UTC, reg.Method)
	}
	for _, s := range reg.Samples {
		if math.IsNaN(float64(s.RA)) || math.IsNaN(float64(s.Dec)) || math.IsNaN(s.Weight) || !(s.DeltaAU > 0) {
			t.Fatalf("sample %+v", s)
		}
	}
}

// Orbits that cannot be propagated are left out and counted, places far
// from the centre are kept but left out of the covariance, and nothing in
// the region is NaN.
func TestSampledRegionLostSamples(t *testing.T) {
	ts, ss := rgTwoNights(1, 1)
	obs, truth := rgSynthetic(t, rgMainBelt, ts, ss, 0.5, nil)
	g := obs[0].Geo
	near := truth
	near.Pos.X += 1e-4
	bad := truth
	bad.Pos.Y = math.NaN()
	far := truth
	far.Pos = r3.Scale(-1, truth.Pos) // the far side of the Sun
	set := &OrbitSamples{Method: SamplingCovariance,
		States:  []State{truth, bad, near, far},
		Weights: []float64{0.4, 0.1, 0.4, 0.1}}
	reg, err := set.Predict(g, MonteCarloSettings{})
	if err != nil {
		t.Fatal(err)
	}
	if reg.Failed != 1 || reg.Far != 1 || math.Abs(reg.LostWeight-0.2) > 1e-15 || len(reg.Samples) != 3 {
		t.Fatalf("failed %d, far %d, lost weight %g, %d samples", reg.Failed, reg.Far, reg.LostWeight, len(reg.Samples))
	}
	off, w := reg.Offsets()
	if len(off) != 2 || len(w) != 2 || w[0] != 0.4 {
		t.Errorf("offsets %v, weights %v", off, w)
	}
	e := reg.Ellipse(3)
	for _, v := range []float64{float64(reg.RA), float64(reg.Dec), reg.DeltaAU, reg.EffectiveN, e.SemiMajorArcsec, e.SemiMinorArcsec, float64(e.PA), e.Inside,
		reg.CovArcsec2[0][0], reg.CovArcsec2[0][1], reg.CovArcsec2[1][1]} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Fatalf("non-finite value in %+v / %+v", reg, e)
		}
	}
	if len(reg.Notes) == 0 {
		t.Error("no note on the lost samples")
	}
	// Every orbit failing is an error.
	if _, err := (&OrbitSamples{States: []State{bad}, Weights: []float64{1}}).Predict(g, MonteCarloSettings{}); err == nil {
		t.Error("no error when no orbit can be propagated")
	}
}
