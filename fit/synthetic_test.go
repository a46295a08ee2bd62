package fit

import (
	"math"
	"math/rand/v2"
	"testing"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/ephem"
)

// Test-only helpers that make synthetic tracks with a known truth: plane-level
// tracks (a polynomial or piecewise-linear geocentric motion plus the parallax
// of invented site vectors, exact by construction) and topocentric tracks of
// an invented main-belt asteroid seen from two invented sites (places from
// ephem.PlaceOfElements). All objects, element sets and sites are invented.

// calibPlaneMotion is a noise-free geocentric motion on the tangent plane,
// ξ(T) = Σ_k Xi[k] T^k + Σ_j HingeXi[j] max(0, T − Knots[j]) (T in days, the
// coefficients in radians per day^k), likewise η, and the inverse distance U
// (au⁻¹) of the parallax term ξ_obs = ξ − U·SiteXi.
type calibPlaneMotion struct {
	Xi, Eta           []float64
	Knots             []float64
	HingeXi, HingeEta []float64
	U                 float64
}

// at returns the geocentric ξ, η at T days.
func (m calibPlaneMotion) at(tDays float64) (xi, eta float64) {
	p := 1.0
	for k := range m.Xi {
		xi += m.Xi[k] * p
		eta += m.Eta[k] * p
		p *= tDays
	}
	for j, k := range m.Knots {
		if h := tDays - k; h > 0 {
			xi += m.HingeXi[j] * h
			eta += m.HingeEta[j] * h
		}
	}
	return xi, eta
}

// calibPlaneSite is an invented observing site for plane-level tracks: east
// longitude and geocentric latitude (radians), at the Earth's equatorial
// radius. Its vectors are not those of astro.SitePositionGCRS; plane-level
// tracks are predicted for the geocentre only.
type calibPlaneSite struct {
	name     string
	lon, lat float64
}

// calibEarthRadiusAU is the WGS84 equatorial radius in au (6378.137 km, IAU 2012 au
// of 149 597 870.7 km; constants of astro).
var calibEarthRadiusAU = astro.WGS84EquatorialRadiusKm / astro.AUKm

// siteVector returns the invented site's geocentric position (au) projected
// on the plane's east (ξ) and north (η) axes at T days, for a tangent point
// at declination dec0: the site turns once per sidereal day (1.00273781
// turns per solar day, common practice) about the pole, with an invented
// phase (hour angle −0.3 rad at T = 0 at longitude 0).
//
//	ξ = −r cos φ sin H,  η = r (sin φ cos δ0 − cos φ sin δ0 cos H)
//
// (the topocentric correction's geometry, Meeus, Astronomical Algorithms,
// 2nd ed., ch. 40, in plane components).
func (s calibPlaneSite) siteVector(tDays, dec0 float64) (sxi, seta float64) {
	h := 2*math.Pi*1.00273781*tDays + s.lon - 0.3
	r := calibEarthRadiusAU
	sxi = -r * math.Cos(s.lat) * math.Sin(h)
	seta = r * (math.Sin(s.lat)*math.Cos(dec0) - math.Cos(s.lat)*math.Sin(dec0)*math.Cos(h))
	return sxi, seta
}

// calibTrackSpec describes a plane-level synthetic track.
type calibTrackSpec struct {
	motion      calibPlaneMotion
	plane       astro.TangentPlane
	epochTT     astro.JD
	nights      []float64 // T of each night's first observation, days
	perNight    int       // observations per night, spread over spanDays
	spanDays    float64
	sites       []calibPlaneSite // taken in turn; nil or empty for the geocentre
	sigmaArcsec float64          // σ of ξ and η
	corr        float64          // correlation of every other point's errors (the rest 0)
}

// track returns the noise-free track: ObsIndex, Line, UTC, T, Xi, Eta (the
// observed, topocentric standard coordinates), σ, Corr, site vectors, Night.
func (sp calibTrackSpec) track(t *testing.T) *Track {
	t.Helper()
	var pts []Point
	first, last := math.Inf(1), math.Inf(-1)
	for n, t0 := range sp.nights {
		for j := 0; j < sp.perNight; j++ {
			tt := t0
			if sp.perNight > 1 {
				tt += sp.spanDays * float64(j) / float64(sp.perNight-1)
			}
			xi, eta := sp.motion.at(tt)
			p := Point{
				ObsIndex: len(pts), Line: len(pts) + 1,
				UTC: calibUTCAtT(t, sp.epochTT, tt), T: tt,
				SigmaXi:  sp.sigmaArcsec * astro.Arcsecond.Radians(),
				SigmaEta: sp.sigmaArcsec * astro.Arcsecond.Radians(),
				Night:    n, Used: true,
			}
			if j%2 == 1 {
				p.Corr = sp.corr
			}
			if len(sp.sites) > 0 {
				s := sp.sites[j%len(sp.sites)]
				p.Site = s.name
				p.SiteXi, p.SiteEta = s.siteVector(tt, float64(sp.plane.Dec0))
				xi -= sp.motion.U * p.SiteXi
				eta -= sp.motion.U * p.SiteEta
			}
			p.Xi, p.Eta = xi, eta
			pts = append(pts, p)
			first, last = math.Min(first, tt), math.Max(last, tt)
		}
	}
	return &Track{
		Plane: sp.plane, EpochTT: sp.epochTT,
		TimeScaleDays: math.Max((last-first)/2, 1e-6),
		Points:        pts, NumNights: len(sp.nights),
		Sites: map[string]astro.Site{}, Source: "synthetic plane track",
	}
}

// calibNoisyCopy returns a copy of tr whose Xi, Eta carry Gaussian errors drawn
// with each point's σ and correlation (e = L z, L the Cholesky factor of the
// 2×2 covariance, z standard normal).
func calibNoisyCopy(tr *Track, rng *rand.Rand) *Track {
	out := *tr
	out.Points = append([]Point(nil), tr.Points...)
	for i := range out.Points {
		p := &out.Points[i]
		z1, z2 := rng.NormFloat64(), rng.NormFloat64()
		p.Xi += p.SigmaXi * z1
		p.Eta += p.SigmaEta * (p.Corr*z1 + math.Sqrt(1-p.Corr*p.Corr)*z2)
	}
	return &out
}

// calibSkyOffsetArcsec returns the offset of (ra, dec) from the reference (ra0,
// dec0) as the standard coordinates of the former about the latter, in arcsec:
// east (RA·cos δ) and north (Dec), exact to second order in the offset.
func calibSkyOffsetArcsec(t *testing.T, ra, dec, ra0, dec0 astro.Angle) (east, north float64) {
	t.Helper()
	xi, eta, err := astro.TangentPlane{RA0: ra0, Dec0: dec0}.Project(ra, dec)
	if err != nil {
		t.Fatalf("calibSkyOffsetArcsec: %v", err)
	}
	return astro.Angle(xi).Arcseconds(), astro.Angle(eta).Arcseconds()
}

// calibInsideEllipse reports whether the sky offset (east, north) in arcsec lies
// inside the ellipse: along the major axis (position angle PA, north through
// east) the offset is east·sin PA + north·cos PA, along the minor axis
// east·cos PA − north·sin PA.
func calibInsideEllipse(el Ellipse, east, north float64) bool {
	s, c := math.Sincos(float64(el.PA))
	a := east*s + north*c
	b := east*c - north*s
	return (a/el.SemiMajorArcsec)*(a/el.SemiMajorArcsec)+(b/el.SemiMinorArcsec)*(b/el.SemiMinorArcsec) <= 1
}

// mainBeltScenario is a topocentric track of an invented main-belt asteroid:
// noise-free astrometric places from ephem.PlaceOfElements at the
// observation times from two invented sites, and the true place at a later
// time from one of them.
type mainBeltScenario struct {
	sites     map[string]astro.Site
	set       *obs.Set // noise-free positions, σ = sigmaArcsec
	truthUTC  astro.JD
	truthSite astro.Site
	truth     ephem.Place
	sigma     astro.Angle
}

// calibMainBelt is the invented element set of the parallax study: a = 2.71
// au, e = 0.12, i = 9.3°, placed near opposition in late March 2027
// (elongation ≈ 169°, Δ ≈ 1.41 au, Dec ≈ +1°; values from ephem for these
// elements, not from a catalogue). Invented, not a real object.
var calibMainBelt = ephem.Elements{
	Name:  "Calib-7 (invented)",
	Epoch: astro.JD{Day: 2461485, Frac: 0.5, Scale: astro.TT}, // 2027-03-21 0h TT
	A:     2.71, E: 0.12,
	I: 9.3 * astro.Degree, Node: 40 * astro.Degree, Peri: 120 * astro.Degree, M: 12 * astro.Degree,
	H: math.NaN(), G: math.NaN(),
}

// Two invented sites in different longitudes (not observatories).
var (
	calibSiteWest = astro.Site{Name: "Cedar Flat", Lat: 34.6 * astro.Degree, Lon: -111.9 * astro.Degree, HeightM: 2100}
	calibSiteEast = astro.Site{Name: "Dunmore Field", Lat: 46.2 * astro.Degree, Lon: 14.5 * astro.Degree, HeightM: 800}
)

// newMainBeltScenario makes the scenario: three consecutive nights, on each
// three observations from each site spread over ±2 h about the object's
// transit (the site's local midnight near opposition), σ = sigmaArcsec per
// coordinate; the truth one day after the last observation, from the western
// site.
func newMainBeltScenario(t *testing.T, sigmaArcsec float64) *mainBeltScenario {
	t.Helper()
	sc := &mainBeltScenario{
		sites: map[string]astro.Site{calibSiteWest.Name: calibSiteWest, calibSiteEast.Name: calibSiteEast},
		set:   &obs.Set{File: "synthetic main-belt track", Format: "csv"},
		sigma: astro.Angle(sigmaArcsec) * astro.Arcsecond,
	}
	// UTC hours of the observations: the eastern site about 21–01 h, the
	// western about 05:30–09:30 h (transit at local midnight ± the object's
	// offset from opposition).
	type slot struct {
		site  astro.Site
		hours []float64
	}
	slots := []slot{
		{calibSiteEast, []float64{21.0, 23.0, 25.0}},
		{calibSiteWest, []float64{29.5, 31.5, 33.5}},
	}
	day0 := 2461482.5 // 2027-03-18 0h UTC
	var last astro.JD
	for night := 0; night < 3; night++ {
		for _, s := range slots {
			for _, h := range s.hours {
				utc := astro.JD{Day: day0 + float64(night), Frac: h / 24, Scale: astro.UTC}.Normalized()
				site := s.site
				pl, err := ephem.PlaceOfElements(calibMainBelt, utc, ephem.Observer{Site: &site})
				if err != nil {
					t.Fatalf("PlaceOfElements: %v", err)
				}
				if pl.Alt < 25*astro.Degree {
					t.Fatalf("invented scenario: %s at %v: altitude %.1f°, want ≥ 25°", site.Name, utc, pl.Alt.Degrees())
				}
				sc.set.Obs = append(sc.set.Obs, obs.Observation{
					Line: len(sc.set.Obs) + 1, Time: utc, RA: pl.RA, Dec: pl.Dec,
					SigmaRA: sc.sigma, SigmaDec: sc.sigma, Site: site.Name, Mag: math.NaN(), Used: true,
				})
				last = utc
			}
		}
	}
	sc.truthUTC = last.AddDays(1)
	sc.truthSite = calibSiteWest
	pl, err := ephem.PlaceOfElements(calibMainBelt, sc.truthUTC, ephem.Observer{Site: &sc.truthSite})
	if err != nil {
		t.Fatalf("PlaceOfElements(truth): %v", err)
	}
	sc.truth = pl
	return sc
}

// noisySet returns a copy of the scenario's observations with Gaussian errors
// of σ added in RA·cos δ and in Dec.
func (sc *mainBeltScenario) noisySet(rng *rand.Rand) *obs.Set {
	out := *sc.set
	out.Obs = append([]obs.Observation(nil), sc.set.Obs...)
	for i := range out.Obs {
		o := &out.Obs[i]
		o.RA = (o.RA + sc.sigma*astro.Angle(rng.NormFloat64())/astro.Angle(math.Cos(float64(o.Dec)))).Normalized()
		o.Dec += sc.sigma * astro.Angle(rng.NormFloat64())
	}
	return &out
}
