package chart

import (
	"strings"
	"testing"
)

// TestComparisonGrowth renders the growth chart of the demo scenario's
// models, as PNG and SVG.
func TestComparisonGrowth(t *testing.T) {
	c, _ := demoComparison(t)
	cands := ComparisonCandidates(c)
	if len(cands) < 2 {
		t.Fatalf("%d fitted models, want at least 2 to compare", len(cands))
	}
	fg, err := ComparisonGrowth(c, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	png, err := fg.Encode(PNG)
	if err != nil {
		t.Fatal(err)
	}
	w, h := pixels(fg)
	checkPNG(t, png, w, h)
	keep(t, "growth.png", png)
	svg, err := fg.Encode(SVG)
	if err != nil {
		t.Fatal(err)
	}
	keep(t, "growth.svg", svg)
	all := strings.Join(checkSVG(t, svg, 20, 10), "\n")
	wants := []string{"3σ semi-major axis (arcsec)", "days after the last observation", c.Chosen + " (chosen)", "validity horizon"}
	for _, cd := range cands {
		wants = append(wants, cd.Name)
	}
	for _, want := range wants {
		if !strings.Contains(all, want) {
			t.Errorf("SVG has no text %q", want)
		}
	}
}

// TestGrowthErrors checks the refusals of GrowthFigure.
func TestGrowthErrors(t *testing.T) {
	c, _ := demoComparison(t)
	cands := ComparisonCandidates(c)
	last := c.Solution.Track.Points[len(c.Solution.Track.Points)-1].UTC
	if _, err := GrowthFigure(nil, last, GrowthOptions{}); err == nil {
		t.Error("no models: no error")
	}
	none := append([]Candidate{}, cands...)
	for i := range none {
		none[i].Chosen = false
	}
	if _, err := GrowthFigure(none, last, GrowthOptions{}); err == nil {
		t.Error("no chosen model: no error")
	}
	if _, err := GrowthFigure(cands, last, GrowthOptions{FromDays: 5, ToDays: 1}); err == nil {
		t.Error("from after to: no error")
	}
}
