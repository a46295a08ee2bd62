package fit

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/ephem"
	"arcfit/fit/orbit"

	"gonum.org/v1/gonum/spatial/r3"
)

// Self-consistency tests of the nbody model through the track API:
// observations of an invented main-belt asteroid whose places come from
// this project's own n-body path (the integration of ephem/nbody and the
// light time of package orbit), with seeded noise, read back as a CSV. The
// external reference of the perturbed motion is ephem/nbody's own test
// against a scipy integration.

// nbSites are the invented sites of these tests.
var nbSites = map[string]astro.Site{
	"Alder Ridge":  {Name: "Alder Ridge", Lat: 44.52 * astro.Degree, Lon: -72.80 * astro.Degree, HeightM: 410},
	"Birch Hollow": {Name: "Birch Hollow", Lat: -30.85 * astro.Degree, Lon: 148.40 * astro.Degree, HeightM: 620},
}

// nbTruthState is the invented main-belt orbit (a = 2.61 au, e = 0.17,
// i = 9.3°; osculating at 2027-02-08.5 TDB) moved by the planets.
func nbTruthState(t testing.TB) orbit.State {
	t.Helper()
	nan := math.NaN()
	el := ephem.Elements{Name: "Invented-MB", Epoch: astro.JD{Day: 2461444.5, Scale: astro.TT}, A: 2.61, E: 0.17,
		I: 9.3 * astro.Degree, Node: 55 * astro.Degree, Peri: 33 * astro.Degree, M: 40 * astro.Degree, H: nan, G: nan}
	st, err := orbit.StateFromElements(el, astro.JD{Day: 2461444.5, Scale: astro.TDB})
	if err != nil {
		t.Fatal(err)
	}
	st.Motion = orbit.NBody
	return st
}

// nbSchedule returns nights nights over spanDays from JD 2461430.5 (UTC),
// three observations 25 min apart a night, alternating the two sites.
func nbSchedule(nights int, spanDays float64) ([]astro.JD, []string) {
	var ts []astro.JD
	var ss []string
	for k := range nights {
		day := 2461430.5 + math.Floor(spanDays*float64(k)/float64(nights-1))
		site, start := "Alder Ridge", 0.16
		if k%2 == 1 {
			site, start = "Birch Hollow", 0.54
		}
		for j := range 3 {
			ts = append(ts, astro.JD{Day: day, Frac: start + float64(j)*25.0/1440, Scale: astro.UTC})
			ss = append(ss, site)
		}
	}
	return ts, ss
}

// nbPlace returns the truth's astrometric place at utc from site (""
// geocentre): the package's n-body path.
func nbPlace(t testing.TB, truth orbit.State, utc astro.JD, site string) (ra, dec astro.Angle) {
	t.Helper()
	var s *astro.Site
	if site != "" {
		c := nbSites[site]
		s = &c
	}
	g, err := ephem.ObserverGeometryAt(utc, s, 0)
	if err != nil && !errors.Is(err, astro.ErrStaleTable) {
		t.Fatal(err)
	}
	seen, err := truth.Observe(g)
	if err != nil {
		t.Fatal(err)
	}
	ra, dec, _ = astro.Spherical(seen.Dir)
	return ra.Normalized(), dec
}

// nbSet returns the observation set of the truth at the schedule, with
// Gaussian noise of 0.5″ per coordinate (seeded; none for seed 0), as a CSV
// read back.
func nbSet(t testing.TB, truth orbit.State, ts []astro.JD, ss []string, seed uint64) *obs.Set {
	t.Helper()
	rng := rand.New(rand.NewPCG(seed, 1))
	noise := 1.0
	if seed == 0 {
		noise = 0
	}
	var b strings.Builder
	b.WriteString("time,ra_deg,dec_deg,sigma,site\n")
	sig := 0.5 * astro.Arcsecond.Radians()
	for i := range ts {
		ra, dec := nbPlace(t, truth, ts[i], ss[i])
		c := astro.UnitVector(ra, dec)
		e, n := orbit.EastNorth(c)
		d := r3.Add(c, r3.Add(r3.Scale(noise*rng.NormFloat64()*sig, e), r3.Scale(noise*rng.NormFloat64()*sig, n)))
		ra, dec, _ = astro.Spherical(d)
		fmt.Fprintf(&b, "%s,%.10f,%.10f,0.5,%s\n", astro.FormatISO8601(ts[i], 2), ra.Normalized().Degrees(), dec.Degrees(), ss[i])
	}
	set, err := obs.Read(strings.NewReader(b.String()), "nbody-synthetic.csv", obs.ReadOptions{Sites: nbSites})
	if err != nil {
		t.Fatal(err)
	}
	return set
}

// nbMahalanobis is the distance of (ra, dec) from the prediction p in its
// covariance, σ.
func nbMahalanobis(p Prediction, ra, dec astro.Angle) float64 {
	x, y := orbit.Residual(ra, dec, astro.UnitVector(p.RA, p.Dec))
	as := astro.Arcsecond.Radians()
	x, y = x/as, y/as
	a, b, c := p.CovArcsec2[0][0], p.CovArcsec2[0][1], p.CovArcsec2[1][1]
	return math.Sqrt((c*x*x - 2*b*x*y + a*y*y) / (a*c - b*b))
}

// TestCompareChoosesNBody: the auto rule. A 40-day arc predicted 5 days on
// spans 45 d, within NBodySpanDays: kepler is chosen and no nbody row is
// fitted. Predicted 60 days on it spans 100 d: the nbody row is fitted from
// the kepler orbit and chosen, the reason saying the planets matter and
// giving the span.
func TestCompareChoosesNBody(t *testing.T) {
	truth := nbTruthState(t)
	ts, ss := nbSchedule(10, 40)
	tr, err := NewTrack(nbSet(t, truth, ts, ss, 7), nbSites)
	if err != nil {
		t.Fatal(err)
	}
	site := nbSites["Alder Ridge"]
	last := ts[len(ts)-1]
	near, err := Compare(tr, CandidateModels(tr), Settings{}, []astro.JD{last.AddDays(5)}, &site)
	if err != nil {
		t.Fatal(err)
	}
	if near.Chosen != "kepler" {
		t.Errorf("span 45 d: chosen %s (%s), want kepler", near.Chosen, near.Reason)
	}
	for _, r := range near.Rows {
		if r.Model == "nbody" {
			t.Errorf("span 45 d: an nbody row was fitted")
		}
	}
	far, err := Compare(tr, CandidateModels(tr), Settings{}, []astro.JD{last.AddDays(60)}, &site)
	if err != nil {
		t.Fatal(err)
	}
	if far.Chosen != "nbody" || far.Orbit == nil || far.Orbit.Dynamics() != orbit.DynamicsNBody {
		t.Fatalf("span 100 d: chosen %s (%s), want nbody", far.Chosen, far.Reason)
	}
	if !strings.Contains(far.Reason, "the planets matter") || !strings.Contains(far.Reason, "span 100 d") {
		t.Errorf("reason %q", far.Reason)
	}
	ra, dec := nbPlace(t, truth, last.AddDays(60), "Alder Ridge")
	for _, r := range far.Rows {
		if r.Model == "nbody" && r.Pred != nil {
			if m := nbMahalanobis(*r.Pred, ra, dec); m > 3 {
				t.Errorf("nbody row: the truth 60 d on is %.2f σ from its prediction", m)
			}
		}
	}
	t.Logf("reason: %s", far.Reason)
}

// TestNBodyPredictAnchors: a prediction of the nbody model, made from the
// orbit integrated to the anchor of its instant and a two-body step
// (nbodypredict.go), against the orbit integrated to the instant itself
// (orbit.Solution.Predict): the place within the anchors' stated step
// tolerance, 1 mas (plus the light-time step's 1e-6″); the covariance, a
// propagation through the STM to the anchor and the two-body partials over
// at most 6 h where the direct one goes through the STM to the instant,
// to 1e-4 of its largest element (the planets change the partials over
// 6 h by ~a_p·Δt²/r ≈ 1e-9 relative; the two-body partials are central
// differences good to ~1e-9). And the truth 30 days on within the 3-σ
// ellipse.
func TestNBodyPredictAnchors(t *testing.T) {
	truth := nbTruthState(t)
	ts, ss := nbSchedule(8, 30)
	tr, err := NewTrack(nbSet(t, truth, ts, ss, 8), nbSites)
	if err != nil {
		t.Fatal(err)
	}
	of, err := FitNBody(tr, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	of.NoSampling = true
	site := nbSites["Birch Hollow"]
	last := ts[len(ts)-1]
	for _, d := range []float64{-12.3, 0.37, 5.12, 30.2, 30.45} {
		u := last.AddDays(d)
		p, err := of.Predict(u, &site)
		if err != nil {
			t.Fatal(err)
		}
		if p.Model != "nbody" {
			t.Errorf("model %q", p.Model)
		}
		sp, err := of.Solution.Predict(u, &site)
		if err != nil {
			t.Fatal(err)
		}
		if d := astro.Separation(p.RA, p.Dec, sp.RA, sp.Dec).Arcseconds(); d > 1e-3 {
			t.Errorf("%+.2f d: anchored place %.2g″ from the direct one", d, d)
		}
		big := math.Max(sp.CovArcsec2[0][0], sp.CovArcsec2[1][1])
		for a := range 2 {
			for b := range 2 {
				if e := math.Abs(p.CovArcsec2[a][b] - sp.CovArcsec2[a][b]); e > 1e-4*big {
					t.Errorf("%+.2f d: covariance [%d][%d] %.6g, direct %.6g", d, a, b, p.CovArcsec2[a][b], sp.CovArcsec2[a][b])
				}
			}
		}
		if d > 30 {
			ra, dec := nbPlace(t, truth, u, "Birch Hollow")
			if m := nbMahalanobis(p, ra, dec); m > 3 {
				t.Errorf("%+.2f d: the truth is %.2f σ from the prediction", d, m)
			}
		}
	}
	if len(of.cache().anchors) > 12 {
		t.Errorf("%d anchors for 5 instants", len(of.cache().anchors))
	}
}

// TestNBodyFitFileRoundTrip: a saved nbody fit records its dynamics and
// predicts, read back, exactly what it predicted before (the state, the
// covariance and the dynamics are the same numbers); a file whose orbit has
// no "dynamics" (written before the perturbed orbit) reads as two-body; an
// unknown dynamics is an error naming the field.
func TestNBodyFitFileRoundTrip(t *testing.T) {
	truth := nbTruthState(t)
	ts, ss := nbSchedule(10, 40)
	tr, err := NewTrack(nbSet(t, truth, ts, ss, 9), nbSites)
	if err != nil {
		t.Fatal(err)
	}
	c, err := Compare(tr, append(CandidateModels(tr), NBody()), Settings{}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	if err := c.Choose("nbody"); err != nil {
		t.Fatal(err)
	}
	saved := NewSavedFit(c)
	data, err := MarshalFitFile(saved)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(data, []byte(`"dynamics": "nbody"`)) {
		t.Fatalf("the fit file does not record the dynamics")
	}
	back, err := ParseFitFile(data, "nb.json")
	if err != nil {
		t.Fatal(err)
	}
	if back.Orbit == nil || back.Orbit.Dynamics() != orbit.DynamicsNBody {
		t.Fatalf("read back as %v", back.Orbit)
	}
	u := ts[len(ts)-1].AddDays(20)
	site := nbSites["Alder Ridge"]
	p0, err := saved.Predict(u, &site)
	if err != nil {
		t.Fatal(err)
	}
	p1, err := back.Predict(u, &site)
	if err != nil {
		t.Fatal(err)
	}
	if p0.RA != p1.RA || p0.Dec != p1.Dec || p0.CovArcsec2 != p1.CovArcsec2 || p1.Model != "nbody" {
		t.Errorf("read back: %v %v %v, before %v %v %v", p1.RA, p1.Dec, p1.CovArcsec2, p0.RA, p0.Dec, p0.CovArcsec2)
	}
	old := bytes.Replace(data, []byte(`"dynamics": "nbody",`), nil, 1)
	if bytes.Equal(old, data) {
		t.Fatal("could not remove the dynamics")
	}
	ob, err := ParseFitFile(old, "old.json")
	if err != nil {
		t.Fatal(err)
	}
	if ob.Orbit.Dynamics() != orbit.DynamicsTwoBody {
		t.Errorf("a file without dynamics reads as %s", ob.Orbit.Dynamics())
	}
	bad := bytes.Replace(data, []byte(`"dynamics": "nbody"`), []byte(`"dynamics": "threebody"`), 1)
	if _, err := ParseFitFile(bad, "bad.json"); err == nil || !strings.Contains(err.Error(), "orbit.dynamics") {
		t.Errorf("unknown dynamics: %v", err)
	}
}

// TestEncounterWords: the plain words of a close approach (values
// invented; the lunar distance 384 400 km and the Earth's radius
// 6378.137 km are the constants of nbodychoose.go).
func TestEncounterWords(t *testing.T) {
	// 2027-02-24 06:00 TDB = 05:58:50.8 UTC (TDB − UTC = 32.184 s + 37 s
	// and a periodic term of 1.7 ms at most): 05:59 to the minute.
	tdb := astro.JD{Day: 2461460.5, Frac: 0.25, Scale: astro.TDB}
	for _, c := range []struct {
		e    orbit.Encounter
		want string
	}{
		{orbit.Encounter{Body: "Earth", TDB: tdb, DistanceAU: 0.0182, HillAU: 0.0098},
			"the Earth on 2027-02-24T05:59Z at 0.0182 au (7.1 lunar distances)"},
		{orbit.Encounter{Body: "Earth", TDB: tdb, DistanceAU: 0.0002},
			"the Earth on 2027-02-24T05:59Z at 0.0002 au (4.7 Earth radii)"},
		{orbit.Encounter{Body: "Jupiter", TDB: tdb, DistanceAU: 0.12, HillAU: 0.355},
			"Jupiter on 2027-02-24T05:59Z at 0.12 au, inside its Hill sphere of 0.355 au"},
	} {
		if got := EncounterWords(c.e); got != c.want {
			t.Errorf("EncounterWords(%+v) = %q, want %q", c.e, got, c.want)
		}
	}
}

// TestOrbitRegion: the library path of a prediction region with either
// dynamics, as the calibration of the perturbed orbit uses it. On noisy
// observations over 40 days the perturbed region holds the truth 60 days on
// within 3 σ. On noise-free ones the perturbed fit recovers the truth (its
// prediction within 0.01″: the fit stops within 1e-5 σ of it, and the
// integration's noise is ~1e-11 rad), while the two-body one misses it by
// the planets' pull, ten times more at least (the bias measured for a
// 100-day span is 0.14–1.4″ median, NBodySpanDays).
func TestOrbitRegion(t *testing.T) {
	truth := nbTruthState(t)
	ts, ss := nbSchedule(10, 40)
	u := ts[len(ts)-1].AddDays(60)
	site := nbSites["Alder Ridge"]
	ra, dec := nbPlace(t, truth, u, "Alder Ridge")
	miss := map[string]float64{}
	for _, seed := range []uint64{10, 0} {
		set := nbSet(t, truth, ts, ss, seed)
		for _, dyn := range []string{"twobody", "nbody"} {
			ps, of, err := OrbitRegion(set, nbSites, []astro.JD{u}, &site, RegionOptions{Dynamics: dyn, MonteCarlo: orbit.MonteCarloSettings{N: 500, Seed: 1}})
			if err != nil {
				t.Fatalf("%s: %v", dyn, err)
			}
			if of.Dynamics() != dyn || len(ps) != 1 {
				t.Fatalf("%s: fitted %s, %d predictions", dyn, of.Dynamics(), len(ps))
			}
			m := nbMahalanobis(ps[0], ra, dec)
			d := astro.Separation(ps[0].RA, ps[0].Dec, ra, dec).Arcseconds()
			t.Logf("seed %d, %s: %s region, truth %.3g″ from its centre, %.2f σ", seed, dyn, ps[0].Method, d, m)
			if seed != 0 && dyn == "nbody" && m > 3 {
				t.Errorf("%s: the truth is %.2f σ from the region's centre", dyn, m)
			}
			if seed == 0 {
				miss[dyn] = d
			}
		}
	}
	if miss["nbody"] > 0.01 || !(miss["twobody"] > 10*miss["nbody"]) {
		t.Errorf("noise-free: the two-body region is centred %.3g″ from the truth, the perturbed one %.3g″", miss["twobody"], miss["nbody"])
	}
	if _, _, err := OrbitRegion(nbSet(t, truth, ts, ss, 0), nbSites, []astro.JD{u}, nil, RegionOptions{Dynamics: "threebody"}); err == nil {
		t.Error("an unknown dynamics was accepted")
	}
}
