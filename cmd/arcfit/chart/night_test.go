package chart

import (
	"strings"
	"testing"
	"time"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit"
	"arcfit/fit/plan"
)

// TestNightFigure renders the night chart of the demo fit, of an invented
// element set on an observable night and on a night near the Sun, as PNG
// and SVG, and checks what the files hold.
func TestNightFigure(t *testing.T) {
	c, sites := demoComparison(t)
	el := plan.ElementsTarget{Elements: inventedElements()}
	cases := []struct {
		name     string
		target   plan.Target
		date     plan.Date
		site     func() ephem.NightSky
		wantText []string // texts the SVG must hold
		observ   bool
	}{
		{name: "demo-fit", target: fit.NewSavedFit(c), date: mustDate(t, 2027, time.February, 9),
			wantText: []string{"where to point", "3σ (98.9 %)", "30′ field", "N", "E", "limit 25°", "best time", "dark: Sun below −18°"}, observ: true},
		{name: "elements", target: el, date: mustDate(t, 2026, time.December, 11),
			wantText: []string{"where to point", "Moon,", "observable "}, observ: true},
		{name: "near-sun", target: el, date: mustDate(t, 2026, time.April, 28),
			wantText: []string{"no search region", "no pointing drawn"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			site := inventedSite()
			if tc.name == "demo-fit" {
				site = sites["Alder Ridge"]
				site.Name = "Alder Ridge"
			}
			p, curves := nightPlan(t, tc.target, tc.name, tc.date, site, nil)
			if p.Observable != tc.observ {
				t.Fatalf("observable %v, want %v (%s)", p.Observable, tc.observ, p.Why)
			}
			fg, err := NightFigure(p, curves)
			if err != nil {
				t.Fatal(err)
			}
			png, err := fg.Encode(PNG)
			if err != nil {
				t.Fatal(err)
			}
			w, h := pixels(fg)
			if w != 1536 || h != 672 {
				t.Errorf("night chart %d × %d px, want 1536 × 672", w, h)
			}
			checkPNG(t, png, w, h)
			keep(t, "night-"+tc.name+".png", png)
			svg, err := fg.Encode(SVG)
			if err != nil {
				t.Fatal(err)
			}
			keep(t, "night-"+tc.name+".svg", svg)
			texts := checkSVG(t, svg, 20, 10)
			all := strings.Join(texts, "\n")
			for _, want := range tc.wantText {
				if !strings.Contains(all, want) {
					t.Errorf("SVG has no text %q", want)
				}
			}
		})
	}
}

// TestNightSkyFigure renders the night without a target, twilights and the
// Moon only: a February night at the invented site, and a June night at an
// invented site at 66° N where the Sun stays above −18° (no darkness, whose
// shade and legend entry must then be missing).
func TestNightSkyFigure(t *testing.T) {
	north := inventedSite()
	north.Name, north.Lat = "Invented North", astro.AngleFromDegrees(66)
	for _, c := range []struct {
		name     string
		site     astro.Site
		m, d     int
		wantDark bool
	}{
		{"night-sky", inventedSite(), 2, 20, true},
		{"night-sky-june-66n", north, 6, 21, false},
	} {
		sky, err := ephem.NightAt(2027, c.m, c.d, c.site, nil)
		if err != nil {
			t.Fatal(err)
		}
		curves, err := SampleNight(nil, sky, 0)
		if err != nil {
			t.Fatal(err)
		}
		if curves.TargetAlt != nil {
			t.Errorf("%s: no target, yet %d target altitudes", c.name, len(curves.TargetAlt))
		}
		fg, err := NightSkyFigure(sky, curves)
		if err != nil {
			t.Fatal(err)
		}
		png, err := fg.Encode(PNG)
		if err != nil {
			t.Fatal(err)
		}
		w, h := pixels(fg)
		checkPNG(t, png, w, h)
		keep(t, c.name+".png", png)
		svg, err := fg.Encode(SVG)
		if err != nil {
			t.Fatal(err)
		}
		all := strings.Join(checkSVG(t, svg, 10, 5), "\n")
		if got := strings.Contains(all, "dark: Sun below −18°"); got != c.wantDark {
			t.Errorf("%s: legend has the dark window %v, want %v", c.name, got, c.wantDark)
		}
	}
}

// TestSampleNightSpan checks that the curves run from an hour before
// sunset to an hour after sunrise, and that the target's altitude at the
// best time agrees with the plan's (the same computation, sampled).
func TestSampleNightSpan(t *testing.T) {
	el := plan.ElementsTarget{Elements: inventedElements()}
	p, c := nightPlan(t, el, "Invented-N1", mustDate(t, 2026, time.December, 11), inventedSite(), nil)
	first, last := c.Times[0], c.Times[len(c.Times)-1]
	if d := p.Sky.Sunset.Sub(first) * 24; d < 0.999 || d > 1.001 {
		t.Errorf("curves start %.3f h before sunset, want 1", d)
	}
	if d := last.Sub(p.Sky.Sunrise) * 24; d < 0.999 || d > 1.001 {
		t.Errorf("curves end %.3f h after sunrise, want 1", d)
	}
	// The nearest sample to the best time is within 5 min of it: the
	// altitude differs by less than 15°/h × 5 min = 1.25°.
	best := p.Best
	k := 0
	for i, tm := range c.Times {
		if abs(tm.Sub(best.UTC)) < abs(c.Times[k].Sub(best.UTC)) {
			k = i
		}
	}
	if d := abs(c.TargetAlt[k].Degrees() - best.Pointing.Alt.Degrees()); d > 1.25 {
		t.Errorf("sampled altitude near the best time %.2f°, plan's best %.2f° (Δ %.2f°)", c.TargetAlt[k].Degrees(), best.Pointing.Alt.Degrees(), d)
	}
	if _, err := SampleNight(el, p.Sky, 2*time.Hour); err == nil {
		t.Error("a 2-hour step was accepted")
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}
