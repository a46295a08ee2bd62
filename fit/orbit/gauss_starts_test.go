package orbit

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// gaussSite is an invented observing site.
var gaussSite = &astro.Site{Name: "Heron Flats", Lat: -30.85 * astro.Degree, Lon: 148.40 * astro.Degree, HeightM: 620}

// gaussEpoch is the start of the invented observing runs (2027 Jan 28.5 UTC).
var gaussEpoch = astro.JD{Day: 2461434.5, Scale: astro.UTC}

// synthObservations returns noise-free observations of the element set el
// at the UTC instants days after gaussEpoch from site: the astrometric place
// of its two-body orbit ([State.Observe]), σ = sigmaArcsec in each
// coordinate.
func synthObservations(t testing.TB, el ephem.Elements, site *astro.Site, days []float64, sigmaArcsec float64) []Observation {
	t.Helper()
	out := make([]Observation, 0, len(days))
	for i, d := range days {
		g, err := ephem.ObserverGeometryAt(gaussEpoch.AddDays(d), site, 0)
		if err != nil {
			t.Fatal(err)
		}
		st, err := StateFromElements(el, g.TDB)
		if err != nil {
			t.Fatal(err)
		}
		seen, err := st.Observe(g)
		if err != nil {
			t.Fatal(err)
		}
		ra, dec, _ := astro.Spherical(seen.Dir)
		sig := sigmaArcsec * float64(astro.Arcsecond)
		out = append(out, Observation{Index: i, Line: i + 2, Geo: g, RA: ra, Dec: dec,
			SigmaRA: sig, SigmaDec: sig, Mag: math.NaN(), Used: true})
	}
	return out
}

// Invented element sets (ecliptic J2000), the mean anomaly or perihelion
// time chosen so that each is well placed in the sky in early 2027.
var (
	gaussMainBelt = ephem.Elements{Name: "Invented-MB", Epoch: astro.JD{Day: 2461440.5, Scale: astro.TT},
		A: 2.64, E: 0.12, I: 8.5 * astro.Degree, Node: 80 * astro.Degree, Peri: 150 * astro.Degree, M: 98 * astro.Degree,
		H: math.NaN(), G: math.NaN()}
	gaussNearEarth = ephem.Elements{Name: "Invented-NE", Epoch: astro.JD{Day: 2461440.5, Scale: astro.TT},
		A: 1.35, E: 0.45, I: 11 * astro.Degree, Node: 330 * astro.Degree, Peri: 60 * astro.Degree, M: 50 * astro.Degree,
		H: math.NaN(), G: math.NaN()}
	gaussComet = ephem.Elements{Name: "Invented-C", E: 0.9, Q: 1.1, Tp: astro.JD{Day: 2461450.5, Scale: astro.TT},
		I: 65 * astro.Degree, Node: 200 * astro.Degree, Peri: 40 * astro.Degree,
		H: math.NaN(), G: math.NaN()}
)

// Noise-free observations of invented orbits over 2 to 20 days: Gauss's
// method with the refinement gives back the orbit at the middle observation
// to 1e-6 relative (the method is exact for exact observations; the
// tolerance is the task's requirement), the truth among the starts when
// there are several.
func TestGaussStartsRecoversSyntheticOrbits(t *testing.T) {
	// σ is 0.3″ (0.1″ for the two-day main-belt arc, whose curvature, 0.9″,
	// a 0.3″ measurement does not show at 3σ); the data are noise-free.
	cases := []struct {
		name  string
		el    ephem.Elements
		days  []float64
		sigma float64
	}{
		{"main belt, 2 d", gaussMainBelt, []float64{0.45, 1.52, 2.47}, 0.1},
		{"main belt, 10 d", gaussMainBelt, []float64{0.45, 5.50, 10.46}, 0.3},
		{"main belt, 20 d", gaussMainBelt, []float64{0.45, 10.48, 20.44}, 0.3},
		{"near-Earth, 2 d", gaussNearEarth, []float64{0.45, 1.49, 2.46}, 0.3},
		{"near-Earth, 8 d", gaussNearEarth, []float64{0.45, 4.47, 8.50}, 0.3},
		{"comet e = 0.9, 4 d", gaussComet, []float64{0.45, 2.45, 4.45}, 0.3},
		{"comet e = 0.9, 20 d", gaussComet, []float64{0.45, 10.52, 20.44}, 0.3},
	}
	for _, c := range cases {
		obs := synthObservations(t, c.el, gaussSite, c.days, c.sigma)
		starts, err := GaussStarts(obs)
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		truth, err := StateFromElements(c.el, obs[1].Geo.TDB)
		if err != nil {
			t.Fatal(err)
		}
		best, bestK := math.Inf(1), -1
		for k, s := range starts {
			if s.Method != MethodGauss || s.State.Epoch != obs[1].Geo.TDB || s.State.Epoch.Scale != astro.TDB {
				t.Errorf("%s: start %d: method %q, epoch %v; want gauss at the middle TDB", c.name, k, s.Method, s.State.Epoch)
			}
			dp := r3.Norm(r3.Sub(s.State.Pos, truth.Pos)) / r3.Norm(truth.Pos)
			dv := r3.Norm(r3.Sub(s.State.Vel, truth.Vel)) / r3.Norm(truth.Vel)
			if d := math.Max(dp, dv); d < best {
				best, bestK = d, k
			}
		}
		if best > 1e-6 {
			t.Errorf("%s: nearest of %d starts is %.3g relative from the truth, want ≤ 1e-6", c.name, len(starts), best)
		}
		for k := 1; k < len(starts); k++ {
			if starts[k].Chi2 < starts[k-1].Chi2 {
				t.Errorf("%s: starts not ordered by χ²", c.name)
			}
		}
		t.Logf("%s: %d start(s), the truth is start %d (%.2g relative, χ² %.3g); %s", c.name, len(starts), bestK+1, best,
			starts[bestK].Chi2, strings.Join(starts[bestK].Notes, "; "))
	}
}

// With more observations the triple is first, nearest-the-middle (on a
// night of its own), last; and a bad middle observation makes the next
// triple be tried.
func TestGaussStartsTripleChoice(t *testing.T) {
	days := []float64{0.40, 0.43, 0.46, 4.41, 4.44, 4.47, 9.42, 9.45, 9.48, 9.51}
	obs := synthObservations(t, gaussMainBelt, gaussSite, days, 0.3)
	tr := gaussTriples(obs, gaussUsable(obs))
	if len(tr) == 0 || tr[0] != [3]int{0, 5, 9} {
		t.Fatalf("first triple %v, want [0 5 9] (first, nearest the middle of the arc on the middle night, last)", tr)
	}
	starts, err := GaussStarts(obs)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(starts[0].Notes[0], "lines 2, 7, 11") {
		t.Errorf("notes %q, want the triple at lines 2, 7, 11", starts[0].Notes)
	}
	// With ten observations the χ² against all of them puts the truth first
	// (noise-free: the other roots fit the triple but not the rest).
	truth, err := StateFromElements(gaussMainBelt, obs[5].Geo.TDB)
	if err != nil {
		t.Fatal(err)
	}
	if d := r3.Norm(r3.Sub(starts[0].State.Pos, truth.Pos)) / r3.Norm(truth.Pos); d > 1e-6 {
		t.Errorf("best of %d starts is %.3g relative from the truth, want ≤ 1e-6", len(starts), d)
	}
	// The three lines of sight of the preferred triple made coplanar: the
	// middle observation moved onto the great circle through the outer two.
	n := r3.Unit(r3.Cross(astro.UnitVector(obs[0].RA, obs[0].Dec), astro.UnitVector(obs[9].RA, obs[9].Dec)))
	l := astro.UnitVector(obs[5].RA, obs[5].Dec)
	l = r3.Unit(r3.Sub(l, r3.Scale(r3.Dot(l, n), n)))
	obs[5].RA, obs[5].Dec, _ = astro.Spherical(l)
	starts, err = GaussStarts(obs)
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(starts[0].Notes[0], "lines 2, 7, 11") {
		t.Errorf("the degenerate triple was used: %q", starts[0].Notes)
	}
	if last := starts[0].Notes[len(starts[0].Notes)-1]; !strings.Contains(last, "tried before failed") {
		t.Errorf("no note of the failed triple: %q", starts[0].Notes)
	}
}

// The degenerate cases give a *DegenerateError of the right case, with a
// one-line message that says what would help.
func TestGaussStartsDegenerate(t *testing.T) {
	check := func(name string, obs []Observation, want Degeneracy, words ...string) {
		t.Helper()
		starts, err := GaussStarts(obs)
		var de *DegenerateError
		if !errors.As(err, &de) {
			t.Errorf("%s: starts %d, err %v; want a *DegenerateError", name, len(starts), err)
			return
		}
		msg := err.Error()
		if de.Case != want || strings.Contains(msg, "\n") || !strings.Contains(msg, "what would help") {
			t.Errorf("%s: case %v, message %q; want case %v, one line with a hint", name, de.Case, msg, want)
		}
		for _, w := range words {
			if !strings.Contains(msg, w) {
				t.Errorf("%s: message %q does not say %q", name, msg, w)
			}
		}
	}
	good := synthObservations(t, gaussMainBelt, gaussSite, []float64{0.45, 5.50, 10.46}, 0.5)

	check("two observations", good[:2], DegenerateTooFew, "three are needed")
	dup := append([]Observation{}, good[:2]...)
	dup = append(dup, good[1])
	check("a repeated time", dup, DegenerateTooFew, "distinct times")
	unused := append([]Observation{}, good...)
	unused[2].Used = false
	check("one not used", unused, DegenerateTooFew)

	hour := synthObservations(t, gaussMainBelt, gaussSite, []float64{0.40, 0.41, 0.42, 0.43, 0.44}, 0.5)
	check("within an hour", hour, DegenerateShortArc, "within 58 min", "second night")

	star := synthObservations(t, gaussMainBelt, gaussSite, []float64{0.45, 1.46, 3.44, 5.47}, 0.5)
	for i := range star {
		star[i].RA, star[i].Dec = star[0].RA+astro.Angle(0.1*float64(i))*astro.Arcsecond, star[0].Dec
	}
	check("a stationary object", star, DegenerateStationary, "no motion")

	// An invented object moving in the plane of the ecliptic, seen from the
	// geocentre: every line of sight lies on the ecliptic, a great circle
	// through the Sun (the Earth's VSOP87 latitude, under 1″, is the only
	// departure).
	flat := gaussMainBelt
	flat.Name, flat.I = "Invented-flat", 0
	ecl := synthObservations(t, flat, nil, []float64{0.45, 5.50, 10.46, 15.5}, 1.0)
	check("on a great circle through the Sun", ecl, DegenerateGreatCircle, "great circle through the Sun", "2 triple(s) tried")

	// The middle observation moved 1° off the great circle of the outer two,
	// on the side away from the track's curvature (22″ the other way): no
	// orbit seen from here curves so; every root gives a negative distance.
	bad := append([]Observation{}, good...)
	l1, l2, l3 := astro.UnitVector(bad[0].RA, bad[0].Dec), astro.UnitVector(bad[1].RA, bad[1].Dec), astro.UnitVector(bad[2].RA, bad[2].Dec)
	n := r3.Unit(r3.Cross(l1, l3))
	off := r3.Dot(l2, n)
	l2 = r3.Sub(l2, r3.Scale(off+math.Copysign(float64(astro.Degree), off), n))
	bad[1].RA, bad[1].Dec, _ = astro.Spherical(r3.Unit(l2))
	check("curvature the wrong way", bad, DegenerateNoSolution, "positive distances")
}

// Random observation sets — tracks with noise, outliers, odd σ, one or more
// nights — never panic and never give a NaN start: either a *DegenerateError
// or starts with finite states and χ².
func TestGaussStartsRandomNoNaN(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	n := 60
	if testing.Short() {
		n = 15
	}
	nStarts, nErr := 0, 0
	for k := range n {
		m := 3 + rng.IntN(6)
		days := make([]float64, m)
		span := math.Pow(10, 3*rng.Float64()-1.5) // 0.03 to 30 days
		for i := range days {
			days[i] = span * rng.Float64()
		}
		el := gaussMainBelt
		el.M = astro.Angle(2*math.Pi*rng.Float64()) * astro.Radian
		el.A = 0.8 + 4*rng.Float64()
		el.E = 0.6 * rng.Float64()
		obs := synthObservations(t, el, gaussSite, days, 0.1+2*rng.Float64())
		for i := range obs {
			jitter := rng.NormFloat64() * math.Pow(10, 3*rng.Float64()-1) * float64(astro.Arcsecond)
			obs[i].Dec += astro.Angle(jitter)
			obs[i].RA += astro.Angle(rng.NormFloat64() * 2 * float64(astro.Arcsecond))
		}
		starts, err := GaussStarts(obs)
		if err != nil {
			var de *DegenerateError
			if !errors.As(err, &de) || starts != nil {
				t.Fatalf("case %d: err %v (%T), starts %d", k, err, err, len(starts))
			}
			nErr++
			continue
		}
		nStarts++
		for _, s := range starts {
			if !s.State.Valid() || math.IsNaN(s.Chi2) || math.IsInf(s.Chi2, 0) {
				t.Fatalf("case %d: bad start %+v", k, s)
			}
		}
	}
	if nStarts == 0 || nErr == 0 {
		t.Errorf("%d sets gave starts, %d errors: both outcomes should be exercised", nStarts, nErr)
	}
	t.Logf("%d sets gave starts, %d a *DegenerateError", nStarts, nErr)
}

// BenchmarkGaussStarts: 50 observations of the invented main-belt orbit
// over 20 days (five nights of ten). The whole orbit fit's target is 50 ms;
// Gauss's method should be a small part of it.
func BenchmarkGaussStarts(b *testing.B) {
	var days []float64
	for night := range 5 {
		for k := range 10 {
			days = append(days, 5*float64(night)+0.40+0.01*float64(k))
		}
	}
	obs := synthObservations(b, gaussMainBelt, gaussSite, days, 0.5)
	b.ResetTimer()
	for b.Loop() {
		if _, err := GaussStarts(obs); err != nil {
			b.Fatal(err)
		}
	}
}
