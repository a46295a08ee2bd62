package chart

import (
	"bytes"
	"encoding/xml"
	"flag"
	"image"
	"image/png"
	"io"
	"os"
	"path/filepath"
	"sync"
	"testing"
	"time"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/ephem"
	"arcfit/fit"
	"arcfit/fit/demo"
	"arcfit/fit/plan"
)

// chartDir, when given (go test ./fit/chart -args -chartdir DIR), is where
// the tests also write every chart they render, to be looked at.
var chartDir = flag.String("chartdir", "", "also write the rendered charts into this directory")

// keep writes data to chartDir/name when -chartdir is given.
func keep(t *testing.T, name string, data []byte) {
	t.Helper()
	if *chartDir == "" {
		return
	}
	if err := os.WriteFile(filepath.Join(*chartDir, name), data, 0o644); err != nil {
		t.Fatal(err)
	}
}

var (
	demoOnce sync.Once
	demoCmp  *fit.Comparison
	demoErr  error
	demoSite map[string]astro.Site
)

// demoComparison fits the invented demo scenario (fit/demo) and compares
// its models, once for the package's tests.
func demoComparison(t testing.TB) (*fit.Comparison, map[string]astro.Site) {
	t.Helper()
	demoOnce.Do(func() {
		sites, err := obs.ReadSites(bytes.NewReader(demo.Sites()), demo.SitesFile)
		if err != nil {
			demoErr = err
			return
		}
		set, err := obs.Read(bytes.NewReader(demo.Observations()), demo.ObservationsFile, obs.ReadOptions{Sites: sites})
		if err != nil {
			demoErr = err
			return
		}
		tr, err := fit.NewTrack(set, sites)
		if err != nil {
			demoErr = err
			return
		}
		demoCmp, demoErr = fit.Compare(tr, fit.CandidateModels(tr), fit.Settings{}, nil, nil)
		demoSite = sites
	})
	if demoErr != nil {
		t.Fatal(demoErr)
	}
	return demoCmp, demoSite
}

// inventedElements is an invented main-belt element set (not a real
// object), the one of fit/plan's example.
func inventedElements() ephem.Elements {
	deg := astro.AngleFromDegrees
	el := ephem.Elements{Name: "Invented-N1", Epoch: astro.NewJD(2461300.5, astro.TT), A: 2.55, E: 0.12,
		I: deg(11), Node: deg(80), Peri: deg(140), M: deg(200), H: 14.8, G: 0.15}
	el.Q = el.A * (1 - el.E)
	return el
}

// inventedSite is an invented site (fit/plan's example).
func inventedSite() astro.Site {
	deg := astro.AngleFromDegrees
	return astro.Site{Name: "Alder Ridge", Lat: deg(44.52), Lon: deg(-72.80), HeightM: 410}
}

// nightPlan makes the plan and the curves of target t on the night of date
// at site.
func nightPlan(t *testing.T, target plan.Target, name string, date plan.Date, site astro.Site, tune func(*plan.Options)) (*plan.NightPlan, NightCurves) {
	t.Helper()
	opts := plan.DefaultOptions()
	opts.Name = name
	opts.NextNights = 0
	if tune != nil {
		tune(&opts)
	}
	p, err := plan.Night(target, date, site, opts)
	if err != nil {
		t.Fatal(err)
	}
	c, err := SampleNight(target, p.Sky, 10*time.Minute)
	if err != nil {
		t.Fatal(err)
	}
	return p, c
}

// mustDate returns the date or fails.
func mustDate(t *testing.T, y int, m time.Month, d int) plan.Date {
	t.Helper()
	dt, err := plan.NewDate(y, m, d)
	if err != nil {
		t.Fatal(err)
	}
	return dt
}

// checkPNG decodes data as PNG and checks its size in pixels and that it
// is not a single colour (nor nearly so: at least minColours distinct
// colours among the pixels).
func checkPNG(t *testing.T, data []byte, wantW, wantH int) image.Image {
	t.Helper()
	img, err := png.Decode(bytes.NewReader(data))
	if err != nil {
		t.Fatalf("not a PNG: %v", err)
	}
	b := img.Bounds()
	if b.Dx() != wantW || b.Dy() != wantH {
		t.Errorf("PNG is %d × %d pixels, want %d × %d", b.Dx(), b.Dy(), wantW, wantH)
	}
	colours := map[[4]uint32]int{}
	for y := b.Min.Y; y < b.Max.Y; y += 3 {
		for x := b.Min.X; x < b.Max.X; x += 3 {
			r, g, bb, a := img.At(x, y).RGBA()
			colours[[4]uint32{r, g, bb, a}]++
		}
	}
	if len(colours) < 8 {
		t.Errorf("PNG has %d colours: nearly blank", len(colours))
	}
	return img
}

// checkSVG parses data as XML and counts its path and text elements; it
// fails when it is not well formed, not an svg document, or has fewer than
// minPaths paths or minTexts texts.
func checkSVG(t *testing.T, data []byte, minPaths, minTexts int) (texts []string) {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(data))
	paths, root := 0, ""
	inText := false
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("SVG is not well-formed XML: %v", err)
		}
		switch e := tok.(type) {
		case xml.StartElement:
			if root == "" {
				root = e.Name.Local
			}
			switch e.Name.Local {
			case "path":
				paths++
			case "text":
				inText = true
				texts = append(texts, "")
			}
		case xml.CharData:
			if inText {
				texts[len(texts)-1] += string(e)
			}
		case xml.EndElement:
			if e.Name.Local == "text" {
				inText = false
			}
		}
	}
	if root != "svg" {
		t.Errorf("root element %q, want svg", root)
	}
	if paths < minPaths {
		t.Errorf("SVG has %d paths, want at least %d", paths, minPaths)
	}
	if len(texts) < minTexts {
		t.Errorf("SVG has %d texts, want at least %d", len(texts), minTexts)
	}
	return texts
}

// pixels returns the size in pixels of a figure rendered as PNG.
func pixels(fg *Figure) (w, h int) {
	return int(float64(fg.Width)/72*PNGDPI + 0.5), int(float64(fg.Height)/72*PNGDPI + 0.5)
}
