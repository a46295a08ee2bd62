package chart

import (
	"bytes"
	"strings"
	"testing"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/fit"
	"arcfit/fit/demo"
)

// movedRow is the demo observation the residual test moves 8″ north, which
// the fit then flags.
const movedRow = "2027-02-08T04:21:36.00Z"

// outlierComparison fits the demo scenario with the observation at movedRow
// moved 8″ north.
func outlierComparison(t *testing.T) *fit.Comparison {
	t.Helper()
	sites, err := obs.ReadSites(bytes.NewReader(demo.Sites()), demo.SitesFile)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(string(demo.Observations()), "\n")
	moved := false
	for i, l := range lines {
		if !strings.HasPrefix(l, movedRow+",") {
			continue
		}
		f := strings.Split(l, ",")
		dec, err := astro.ParseDec(f[2])
		if err != nil {
			t.Fatal(err)
		}
		f[2] = astro.FormatDMS(dec+8*astro.Arcsecond, 2)
		lines[i], moved = strings.Join(f, ","), true
	}
	if !moved {
		t.Fatalf("the demo has no row at %s to move", movedRow)
	}
	set, err := obs.Read(strings.NewReader(strings.Join(lines, "\n")), "outlier.csv", obs.ReadOptions{Sites: sites})
	if err != nil {
		t.Fatal(err)
	}
	tr, err := fit.NewTrack(set, sites)
	if err != nil {
		t.Fatal(err)
	}
	c, err := fit.Compare(tr, fit.CandidateModels(tr), fit.Settings{}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// TestResidualsFigure renders the residuals of the chosen model of the
// demo scenario with an outlier, as PNG and SVG.
func TestResidualsFigure(t *testing.T) {
	c := outlierComparison(t)
	model, pts := ComparisonResiduals(c)
	movedFlagged := false
	for _, p := range pts {
		if p.Flagged && astro.FormatISO8601(p.UTC, 2) == movedRow {
			movedFlagged = true
		}
		if c.Orbit == nil && !(p.SigmaRAArcsec > 0.49 && p.SigmaRAArcsec < 0.51) {
			t.Errorf("σ of RA %.3f″, want the demo's 0.5″", p.SigmaRAArcsec)
		}
	}
	if !movedFlagged {
		t.Fatalf("the observation moved 8″ at %s is not flagged", movedRow)
	}
	fg, err := ResidualsFigure(model, pts)
	if err != nil {
		t.Fatal(err)
	}
	png, err := fg.Encode(PNG)
	if err != nil {
		t.Fatal(err)
	}
	w, h := pixels(fg)
	checkPNG(t, png, w, h)
	keep(t, "residuals.png", png)
	svg, err := fg.Encode(SVG)
	if err != nil {
		t.Fatal(err)
	}
	keep(t, "residuals.svg", svg)
	all := strings.Join(checkSVG(t, svg, 20, 10), "\n")
	for _, want := range []string{"residuals of " + model, "ΔRA·cos δ (arcsec)", "ΔDec (arcsec)", "flagged outlier, not used", "UTC"} {
		if !strings.Contains(all, want) {
			t.Errorf("SVG has no text %q", want)
		}
	}
	if _, err := ResidualsFigure("none", nil); err == nil {
		t.Error("no residuals: no error")
	}
}
