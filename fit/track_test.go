package fit

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/ephem"
	"arcfit/fit/demo"
)

// TestNewTrackDemo: the demo scenario (fit/demo/doc.go: 14 observations on
// the local nights of 3, 5 and 7 February 2027) gives 3 nights; the plane
// round-trips every observation; site vectors are at most an Earth radius
// (6378.137 km = 4.2635e-5 au, WGS84 and IAU 2012 au — published constants).
func TestNewTrackDemo(t *testing.T) {
	tr, _ := demoTrack(t)
	if len(tr.Points) != 14 || tr.NumNights != 3 {
		t.Fatalf("demo: %d points, %d nights; want 14, 3 (fit/demo/doc.go)", len(tr.Points), tr.NumNights)
	}
	re := 6378.137 / astro.AUKm
	for i, p := range tr.Points {
		if i > 0 && p.Night < tr.Points[i-1].Night {
			t.Errorf("night numbers not in time order at line %d", p.Line)
		}
		ra, dec := tr.Plane.Deproject(p.Xi, p.Eta)
		// The set's RA/Dec are not kept in Point; re-projecting must agree.
		xi, eta, err := tr.Plane.Project(ra, dec)
		if err != nil || math.Hypot(xi-p.Xi, eta-p.Eta) > 1e-14 {
			t.Errorf("line %d: projection round trip off by %.3g rad", p.Line, math.Hypot(xi-p.Xi, eta-p.Eta))
		}
		if h := math.Hypot(p.SiteXi, p.SiteEta); !(h > 0.3*re && h <= re*1.0005) {
			t.Errorf("line %d: |site vector on plane| = %.4g au, want (0.3…1) Earth radius %.5g au", p.Line, h, re)
		}
		// 0.5″ on the sky (fit/demo/doc.go); 1° from the tangent point the
		// projection's scale departs from 1 by < 3e-4.
		s := 0.5 * float64(astro.Arcsecond)
		if math.Abs(p.SigmaXi/s-1) > 3e-4 || math.Abs(p.SigmaEta/s-1) > 3e-4 {
			t.Errorf("line %d: σ = %.6g, %.6g rad, want %.6g (±3e-4)", p.Line, p.SigmaXi, p.SigmaEta, s)
		}
	}
	if tr.Points[0].Night != 0 || tr.Points[13].Night != 2 {
		t.Errorf("nights of first and last point = %d, %d; want 0, 2", tr.Points[0].Night, tr.Points[13].Night)
	}
	first, last := tr.ArcTT()
	if math.Abs(first+last) > 1.0/1440 || math.Abs(tr.TimeScaleDays-(last-first)/2) > 1e-12 {
		t.Errorf("epoch not mid-arc: first %+.6f, last %+.6f d, scale %.6f", first, last, tr.TimeScaleDays)
	}
}

// TestSiteVectorIsParallax: the plane's parallax term −u·(SiteXi, SiteEta)
// equals the difference between the topocentric and geocentric places that
// ephem.PlaceOfElements computes independently (full vector geometry, light
// time) for the demo's invented orbit, with u = 1/Δ_geo. Tolerance 2 mas:
// second-order parallax terms (p²/… ≈ (5″)² rad ≈ 1e-4 mas) and the light-time
// difference between the two places (Δ differs by ≤ an Earth radius, 0.02 s
// of light time, ~0.3 mas of motion at 0.8″/min) are far below it.
func TestSiteVectorIsParallax(t *testing.T) {
	tr, sites := demoTrack(t)
	els, _, err := ephem.ReadElements(bytes.NewReader(demo.Elements()), demo.ElementsFile)
	if err != nil {
		t.Fatal(err)
	}
	el := els[0]
	for _, p := range tr.Points {
		st := sites[p.Site]
		topo, err := ephem.PlaceOfElements(el, p.UTC, ephem.Observer{Site: &st})
		if err != nil {
			t.Fatal(err)
		}
		geo, err := ephem.PlaceOfElements(el, p.UTC, ephem.Observer{})
		if err != nil {
			t.Fatal(err)
		}
		xt, et, _ := tr.Plane.Project(topo.RA, topo.Dec)
		xg, eg, _ := tr.Plane.Project(geo.RA, geo.Dec)
		u := 1 / geo.DeltaAU
		dx := (xt - xg) - (-u * p.SiteXi)
		de := (et - eg) - (-u * p.SiteEta)
		if d := math.Hypot(dx, de); d > 2*mas {
			t.Errorf("line %d: parallax on plane (%.4f″, %.4f″) vs ephem (%.4f″, %.4f″): Δ %.3g mas, want ≤ 2 mas (ephem.PlaceOfElements)",
				p.Line, astro.Angle(-u*p.SiteXi).Arcseconds(), astro.Angle(-u*p.SiteEta).Arcseconds(),
				astro.Angle(xt-xg).Arcseconds(), astro.Angle(et-eg).Arcseconds(), d/mas)
		}
	}
}

// straightSet makes an observation set moving in a straight line on the
// sky through (ra0, dec0) at rate (east, north) radians per day, sampled from
// the geocentre over 3 days, 4 points a day.
func straightSet(ra0, dec0 astro.Angle, east, north float64) *obs.Set {
	tp := astro.TangentPlane{RA0: ra0, Dec0: dec0}
	set := &obs.Set{File: "synthetic"}
	s := 0.5 * astro.Arcsecond
	for k := 0; k < 12; k++ {
		x := -1.375 + float64(k)*0.25 // symmetric about 0, so the mean direction is the truth's tangent point
		ra, dec := tp.Deproject(east*x, north*x)
		set.Obs = append(set.Obs, obs.Observation{Line: k + 2, Time: astro.JD{Day: 2461500.5, Frac: x, Scale: astro.UTC}.Normalized(),
			RA: ra, Dec: dec, SigmaRA: s, SigmaDec: s, Mag: math.NaN(), Used: true})
	}
	return set
}

// TestTrackAcrossZeroAndPole: arcs across RA 0h/24h and within 1° of the
// north pole (one crossing it) give a continuous track. The synthetic truth
// moves uniformly along a straight line of the gnomonic plane at its middle
// point, sampled symmetrically, so the track's plane (at the mean direction)
// is that same plane and poly1 must fit to rounding; the prediction one day
// past the end must land on the truth (exact synthetic truth).
func TestTrackAcrossZeroAndPole(t *testing.T) {
	cases := []struct {
		name    string
		ra, dec float64 // degrees
		e, n    float64 // rad/day
	}{
		{"RA 0h", 0, 5, 2e-3, 3e-4},
		{"RA 0h south", 359.95, -30, 1.5e-3, -4e-4},
		{"near pole", 123, 89.3, 3e-3, 2e-3},
		{"across pole", 40, 89.9, 2e-3, 2e-3},
	}
	for _, c := range cases {
		set := straightSet(astro.AngleFromDegrees(c.ra), astro.AngleFromDegrees(c.dec), c.e, c.n)
		tr, err := NewTrack(set, nil)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		sol, err := Fit(tr, Poly(1), Settings{KeepAll: true})
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if sol.RMSArcsec > 1e-6 {
			t.Errorf("%s: poly1 RMS %.3g″ on a great circle, want < 1e-6″ (gnomonic: great circles are lines)", c.name, sol.RMSArcsec)
		}
		// Prediction one day past the end is on the same great circle.
		pr, err := sol.Predict(set.Obs[11].Time.AddDays(1), nil)
		if err != nil {
			t.Fatal(err)
		}
		want := astro.TangentPlane{RA0: astro.AngleFromDegrees(c.ra), Dec0: astro.AngleFromDegrees(c.dec)}
		wra, wdec := want.Deproject(c.e*2.375, c.n*2.375) // last point at x = 1.375 d, plus 1 d
		sep := math.Acos(math.Min(1, math.Sin(float64(wdec))*math.Sin(float64(pr.Dec))+
			math.Cos(float64(wdec))*math.Cos(float64(pr.Dec))*math.Cos(float64(wra-pr.RA))))
		if astro.Angle(sep).Arcseconds() > 1e-3 {
			t.Errorf("%s: prediction %.3g″ from the truth, want < 1 mas (exact synthetic truth)", c.name, astro.Angle(sep).Arcseconds())
		}
	}
}

// TestNewTrackErrors: bad sets get one-line errors.
func TestNewTrackErrors(t *testing.T) {
	one := straightSet(1, 0.2, 1e-3, 1e-3)
	one.Obs = one.Obs[:1]
	instant := straightSet(1, 0.2, 1e-3, 1e-3)
	for i := range instant.Obs {
		instant.Obs[i].Time = instant.Obs[0].Time
	}
	site := straightSet(1, 0.2, 1e-3, 1e-3)
	site.Obs[3].Site = "Nowhere Hill"
	for _, c := range []struct {
		name string
		set  *obs.Set
		want string
	}{
		{"one observation", one, "at least 2"},
		{"one instant", instant, "one instant"},
		{"unknown site", site, "unknown site"},
		{"nil", nil, "no observations"},
	} {
		_, err := NewTrack(c.set, nil)
		if err == nil || !strings.Contains(err.Error(), c.want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("NewTrack(%s) error = %v, want one line containing %q", c.name, err, c.want)
		}
	}
}

// TestSubset keeps plane and epoch and renumbers nothing.
func TestSubset(t *testing.T) {
	tr, _ := demoTrack(t)
	sub := tr.Subset(func(p Point) bool { return p.Night != 1 })
	if sub.Plane != tr.Plane || sub.EpochTT != tr.EpochTT || sub.NumNights != 2 || len(sub.Points) != 8 {
		t.Errorf("Subset: plane/epoch kept %v/%v, nights %d (want 2), points %d (want 8: fit/demo/doc.go has 6 on the middle night)",
			sub.Plane == tr.Plane, sub.EpochTT == tr.EpochTT, sub.NumNights, len(sub.Points))
	}
}
