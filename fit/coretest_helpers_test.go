package fit

import (
	"bytes"
	"math"
	"testing"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/fit/demo"
)

// demoTrack reads the invented demo scenario (fit/demo) into a track.
func demoTrack(t testing.TB) (*Track, map[string]astro.Site) {
	t.Helper()
	sites, err := obs.ReadSites(bytes.NewReader(demo.Sites()), demo.SitesFile)
	if err != nil {
		t.Fatal(err)
	}
	set, err := obs.Read(bytes.NewReader(demo.Observations()), demo.ObservationsFile, obs.ReadOptions{Sites: sites})
	if err != nil {
		t.Fatal(err)
	}
	tr, err := NewTrack(set, sites)
	if err != nil {
		t.Fatal(err)
	}
	return tr, sites
}

// synthTrack builds a track by hand: points at times ts (days from the
// epoch), plane coordinates from truth, site vectors from site (nil: none),
// σ = sigmaRad in both coordinates with correlation corr.
func synthTrack(ts []float64, truth func(tDays float64) (xi, eta float64), site func(i int, tDays float64) (sx, se float64), sigmaRad, corr float64) *Track {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, x := range ts {
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	tr := &Track{
		Plane:         astro.TangentPlane{RA0: astro.AngleFromDegrees(150), Dec0: astro.AngleFromDegrees(12)},
		EpochTT:       astro.JD{Day: 2461500.5, Scale: astro.TT},
		TimeScaleDays: (hi - lo) / 2,
		Sites:         map[string]astro.Site{},
		NumNights:     1,
	}
	for i, x := range ts {
		xi, eta := truth(x)
		p := Point{ObsIndex: i, Line: i + 2, UTC: astro.JD{Day: 2461500.5, Frac: x, Scale: astro.UTC}, T: x,
			SigmaXi: sigmaRad, SigmaEta: sigmaRad, Corr: corr, Used: true}
		if site != nil {
			p.SiteXi, p.SiteEta = site(i, x)
			p.Site = "s"
		}
		p.Xi, p.Eta = xi, eta
		tr.Points = append(tr.Points, p)
	}
	return tr
}

// inventedSite returns an invented site vector (au) of Earth-radius size
// (4.26e-5 au, common knowledge) turning once a sidereal day, with a phase
// per site: a stand-in for a diurnal circle, not a real place.
func inventedSite(i int, tDays float64) (sx, se float64) {
	const r = 4.26e-5
	phase := 0.0
	if i%2 == 1 {
		phase = 1.9 // a second invented site
	}
	w := 2 * math.Pi * 1.00273781 * tDays
	return r * 0.7 * math.Sin(w+phase), r * (0.45 + 0.3*math.Cos(w+phase))
}

// arcTimes returns n times per night over nights nights, 1-day apart, each
// night spanning 4 hours, centred on 0.
func arcTimes(nights, n int) []float64 {
	var ts []float64
	for k := 0; k < nights; k++ {
		for j := 0; j < n; j++ {
			ts = append(ts, float64(k)-float64(nights-1)/2+float64(j)*(4.0/24)/float64(n-1)-2.0/24)
		}
	}
	return ts
}
