package chart

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"arcfit/astro"
	"arcfit/fit"

	"gonum.org/v1/plot/vg"
)

// TestEllipseOrientation checks the outline of an ellipse against its
// position angle: PA 0° puts the major axis north–south, PA 90° east–west,
// PA 30° toward north-east (x = east, y = north).
func TestEllipseOrientation(t *testing.T) {
	for _, c := range []struct {
		paDeg  float64
		ex, ny float64 // the unit vector of the major axis, east and north
	}{
		{0, 0, 1}, {90, 1, 0}, {30, 0.5, math.Sqrt(3) / 2},
	} {
		e := fit.Ellipse{Sigma: 3, SemiMajorArcsec: 10, SemiMinorArcsec: 2, PA: astro.AngleFromDegrees(c.paDeg)}
		far := 0.0
		var fx, fy float64
		for _, q := range ellipseXYs(e) {
			if r := math.Hypot(q.X, q.Y); r > far {
				far, fx, fy = r, q.X, q.Y
			}
		}
		if math.Abs(far-10) > 1e-9 {
			t.Errorf("PA %g°: farthest point %.6f″ from the centre, want the semi-major axis 10″", c.paDeg, far)
		}
		// Either end of the axis.
		if d := math.Min(math.Hypot(fx/10-c.ex, fy/10-c.ny), math.Hypot(fx/10+c.ex, fy/10+c.ny)); d > 1e-9 {
			t.Errorf("PA %g°: major axis toward (%.3f, %.3f), want ±(%.3f, %.3f)", c.paDeg, fx/10, fy/10, c.ex, c.ny)
		}
	}
}

// invented is an invented prediction: RA 9h, Dec +24°, a covariance whose
// 1-σ ellipse is 40″ × 12″ with its long axis at PA 60°, moving 0.6″/min.
func invented() fit.Prediction {
	pa := astro.AngleFromDegrees(60)
	sp, cp := math.Sincos(float64(pa))
	a2, b2 := 40.0*40.0, 12.0*12.0
	// Σ = a² u uᵀ + b² v vᵀ with u = (sin PA, cos PA), v ⟂ u (east, north).
	var cov [2][2]float64
	cov[0][0] = a2*sp*sp + b2*cp*cp
	cov[1][1] = a2*cp*cp + b2*sp*sp
	cov[0][1] = (a2 - b2) * sp * cp
	cov[1][0] = cov[0][1]
	return fit.Prediction{UTC: astro.NewJD(2461446.75, astro.UTC), Model: "invented", RA: astro.AngleFromHours(9),
		Dec: astro.AngleFromDegrees(24), CovArcsec2: cov, RateArcsecPerMin: 0.6, RatePA: astro.AngleFromDegrees(290),
		Method: "linear"}
}

// TestSkyRegionAxes checks the sky panel's geometry: east to the left (the
// x axis inverted), the same range on both axes before the equal scaling,
// the ellipse's PA read back from the covariance, and the units chosen by
// the view's size.
func TestSkyRegionAxes(t *testing.T) {
	pr := invented()
	if e := pr.Ellipse(1); math.Abs(e.SemiMajorArcsec-40) > 1e-9 || math.Abs(e.PA.Degrees()-60) > 1e-9 {
		t.Fatalf("the invented covariance gives %.3f″ at PA %.3f°, want 40″ at 60°", e.SemiMajorArcsec, e.PA.Degrees())
	}
	pn, err := SkyRegion(pr, nil, SkyOptions{FOVArcmin: 10})
	if err != nil {
		t.Fatal(err)
	}
	p := pn.Plot
	if !(p.X.Norm(-1) > p.X.Norm(1)) {
		t.Error("x axis not inverted: east would be to the right")
	}
	if !(p.Y.Norm(1) > p.Y.Norm(-1)) {
		t.Error("y axis inverted: north would be down")
	}
	if p.X.Max-p.X.Min != p.Y.Max-p.Y.Min {
		t.Errorf("ranges x %g, y %g: want a square view", p.X.Max-p.X.Min, p.Y.Max-p.Y.Min)
	}
	// The 10′ field's half-diagonal, 424″, with the margin: arcminutes.
	if !strings.Contains(p.X.Label.Text, "arcmin") || !pn.EqualScale || !pn.LegendBeside {
		t.Errorf("x label %q, equal scale %v, legend beside %v", p.X.Label.Text, pn.EqualScale, pn.LegendBeside)
	}
	// Without a field, the 3-σ ellipse (120″) frames the view: arcminutes
	// just over 2′; a 1″ region, arcseconds.
	small := pr
	small.CovArcsec2 = [2][2]float64{{0.1, 0}, {0, 0.1}}
	pn, err = SkyRegion(small, nil, SkyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(pn.Plot.X.Label.Text, "arcsec") {
		t.Errorf("a 1″ region: x label %q, want arcsec", pn.Plot.X.Label.Text)
	}
	if !strings.Contains(pn.Aside, "RA 09:00:00.0") || !strings.Contains(pn.Aside, "toward PA 290°") {
		t.Errorf("note %q lacks the place or the motion", pn.Aside)
	}
	bad := pr
	bad.RA = astro.Angle(math.NaN())
	if _, err := SkyRegion(bad, nil, SkyOptions{}); err == nil {
		t.Error("a NaN place: no error")
	}
}

// TestSkyRegionCloud renders a region with a Monte Carlo cloud (2000
// invented samples from the covariance, seeded) and a track, as PNG and SVG,
// on its own.
func TestSkyRegionCloud(t *testing.T) {
	pr := invented()
	rng := rand.New(rand.NewPCG(1, 2))
	sp, cp := math.Sincos(float64(astro.AngleFromDegrees(60)))
	for range 2000 {
		u, v := 40*rng.NormFloat64(), 12*rng.NormFloat64()
		// A bent cloud, as sampled orbits give: the minor offset grows
		// with the square of the major one.
		v += 0.004 * u * u
		pr.Samples = append(pr.Samples, [2]float64{u*sp + v*cp, u*cp - v*sp})
	}
	var track []fit.Prediction
	for k := -8; k <= 8; k++ {
		q := pr
		q.UTC = pr.UTC.AddDays(float64(k) / 48)
		// 0.6″/min toward PA 290°: 18″ each half hour.
		d := astro.AngleFromArcseconds(18 * float64(k))
		q.RA = pr.RA + astro.Angle(math.Sin(290*math.Pi/180))*d/astro.Angle(math.Cos(float64(pr.Dec)))
		q.Dec = pr.Dec + astro.Angle(math.Cos(290*math.Pi/180))*d
		track = append(track, q)
	}
	pn, err := SkyRegion(pr, track, SkyOptions{FOVArcmin: 8, Title: "invented region with sampled orbits"})
	if err != nil {
		t.Fatal(err)
	}
	fg := &Figure{Width: 9 * vg.Inch, Height: 6 * vg.Inch, Panels: []Panel{pn}}
	png, err := fg.Encode(PNG)
	if err != nil {
		t.Fatal(err)
	}
	w, h := pixels(fg)
	checkPNG(t, png, w, h)
	keep(t, "sky-cloud.png", png)
	svg, err := fg.Encode(SVG)
	if err != nil {
		t.Fatal(err)
	}
	all := strings.Join(checkSVG(t, svg, 20, 10), "\n")
	for _, want := range []string{"sampled orbits (2000)", "8′ field", "1σ (39 %)", "N", "E", "← east"} {
		if !strings.Contains(all, want) {
			t.Errorf("SVG has no text %q", want)
		}
	}
}

// TestScaleBar checks the scale bar's length (a 1-2-5 number of arcminutes,
// at most a quarter of the view) and its label.
func TestScaleBar(t *testing.T) {
	for _, c := range []struct {
		widthArcsec, want float64
		label             string
	}{
		{3600, 10, "10′"}, {2400, 10, "10′"}, {1000, 2, "2′"}, {150, 0.5, "0.5′ = 30″"}, {30, 0.1, "0.1′ = 6″"}, {40000, 120, "2°"}, {400000, 1200, "20°"},
	} {
		if got := scaleBarArcmin(c.widthArcsec); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("scaleBarArcmin(%g″) = %g′, want %g′", c.widthArcsec, got, c.want)
		}
		if got := scaleLabel(c.want); got != c.label {
			t.Errorf("scaleLabel(%g) = %q, want %q", c.want, got, c.label)
		}
	}
}
