package orbit

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// The external reference for the orbit fit: noise-free observations of
// invented objects made by testdata/gen/orbit_synthetic.py (python3-erfa and
// the script's own two-body solution; its definitions are in each file's
// header and the script's docstring). Everything in testdata/synthetic is
// invented: objects, elements, sites.

// synthDir holds the generator's files.
const synthDir = "testdata/synthetic"

// synthObjects are the invented objects of elements.csv with their file stems.
var synthObjects = []struct{ Name, Stem string }{
	{"Invented-MB1", "mb1"},   // main-belt asteroid
	{"Invented-NEO1", "neo1"}, // near-Earth asteroid, passes the Earth at 0.034 au
	{"Invented-JFC1", "jfc1"}, // Jupiter-family comet
	{"Invented-NP1", "np1"},   // near-parabolic comet, e = 0.998
	{"Invented-PA1", "pa1"},   // parabolic comet, e = 1
	{"Invented-HY1", "hy1"},   // hyperbolic comet, e = 1.02
}

// synthArcs are the arcs of every object: 2 consecutive nights, 4 nights over
// 7 days, 6 nights over 20 days, 8 nights over 40 days. All arcs of an object
// end with the same observation.
var synthArcs = []string{"2n", "4n", "20d", "40d"}

// synthSigmaArcsec is the σ the observation files state (the positions carry
// no noise).
const synthSigmaArcsec = 0.5

// truthPlace is one row of predictions.csv: the true astrometric place of an
// object DaysAfter days after the last observation of its arcs.
type truthPlace struct {
	Line      int
	DaysAfter int
	UTC, TDB  astro.JD
	Site      string // "" for the geocentre
	RA, Dec   astro.Angle
	DeltaAU   float64 // observer distance at t − τ
	RAU       float64 // heliocentric distance at t − τ
	ElongDeg  float64 // Sun–observer–object angle
}

// geomRow is one row of <stem>_geometry.csv: the generator's geometry of one
// observation instant (ERFA's epv00 Earth), its noise-free place and light
// time.
type geomRow struct {
	Line         int
	Time, Site   string // as written in the observation files ("" site: none)
	UTC, TT, TDB astro.JD
	// HelioPos, HelioVel: O − S, the observer's heliocentric position (au)
	// and velocity (au/day); SunBaryVel the Sun's barycentric velocity;
	// GeoPos the site's GCRS position (au).
	HelioPos, HelioVel, SunBaryVel, GeoPos r3.Vec
	RA, Dec                                astro.Angle // noise-free astrometric place
	TauDays, DeltaAU, RAU                  float64
	ElongDeg, AltDeg                       float64
}

// geometry returns the row as the fitter's observer geometry, so that a test
// can run the fit on the reference's own Earth (isolating it from ours).
func (g geomRow) geometry() ephem.ObserverGeometry {
	return ephem.ObserverGeometry{UTC: g.UTC, TT: g.TT, TDB: g.TDB,
		HelioPos: g.HelioPos, HelioVel: g.HelioVel, SunBaryVel: g.SunBaryVel, GeoPos: g.GeoPos}
}

// synthStem returns the file stem of an object name of synthObjects.
func synthStem(t testing.TB, name string) string {
	t.Helper()
	for _, o := range synthObjects {
		if o.Name == name {
			return o.Stem
		}
	}
	t.Fatalf("no synthetic object %q", name)
	return ""
}

// loadSynthetic reads one object's arc: the observations as read by
// obs.ReadFile (sorted by time), the sites, the true elements, the true state
// at the arc's middle observation (TDB), the truth places after the arc, and
// the generator's geometry for each observation: geometry[i] belongs to
// set.Obs[i].
func loadSynthetic(t testing.TB, orbitName, arc string) (set *obs.Set, sites map[string]astro.Site, truth ephem.Elements,
	truthState State, predictions []truthPlace, geometry []geomRow) {
	t.Helper()
	stem := synthStem(t, orbitName)
	sites, err := obs.ReadSitesFile(filepath.Join(synthDir, "sites.csv"))
	if err != nil {
		t.Fatal(err)
	}
	els, _, err := ephem.ReadElementsFile(filepath.Join(synthDir, "elements.csv"))
	if err != nil {
		t.Fatal(err)
	}
	if truth, err = ephem.FindElements(els, orbitName); err != nil {
		t.Fatal(err)
	}
	set, err = obs.ReadFile(filepath.Join(synthDir, stem+"_"+arc+".csv"), obs.ReadOptions{Sites: sites})
	if err != nil {
		t.Fatal(err)
	}
	all := readSynthGeometry(t, stem)
	for i := range set.Obs {
		o := &set.Obs[i]
		k := -1
		for j := range all {
			if all[j].Site == o.Site && math.Abs(all[j].UTC.Sub(o.Time)) < 1e-9 {
				k = j
				break
			}
		}
		if k < 0 {
			t.Fatalf("%s line %d: no geometry row for %v at %q", set.File, o.Line, o.Time, o.Site)
		}
		geometry = append(geometry, all[k])
	}
	truthState = readSynthState(t, orbitName, arc)
	for _, p := range readSynthPredictions(t) {
		if p.orbit == orbitName {
			predictions = append(predictions, p.truthPlace)
		}
	}
	return set, sites, truth, truthState, predictions, geometry
}

// synthCSV reads a generator CSV ('#' comments, a header) into rows keyed by
// column name, with their line numbers.
func synthCSV(t testing.TB, name string) (rows []map[string]string, lines []int) {
	t.Helper()
	path := filepath.Join(synthDir, name)
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	r := csv.NewReader(f)
	r.Comment = '#'
	var header []string
	for {
		rec, err := r.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Fatalf("%s: %v", path, err)
		}
		if header == nil {
			header = rec
			continue
		}
		line, _ := r.FieldPos(0)
		m := make(map[string]string, len(rec))
		for i, h := range header {
			m[h] = rec[i]
		}
		rows = append(rows, m)
		lines = append(lines, line)
	}
	return rows, lines
}

// synthFields converts named fields of a row to numbers.
type synthFields struct {
	t    testing.TB
	file string
	line int
	row  map[string]string
}

func (s synthFields) num(col string) float64 {
	s.t.Helper()
	v, err := strconv.ParseFloat(s.row[col], 64)
	if err != nil {
		s.t.Fatalf("%s:%d: %s: %v", s.file, s.line, col, err)
	}
	return v
}

func (s synthFields) jd(col string, sc astro.Scale) astro.JD {
	s.t.Helper()
	return astro.JD{Day: s.num(col + "_day"), Frac: s.num(col + "_frac"), Scale: sc}
}

func (s synthFields) vec(prefix, suffix string) r3.Vec {
	s.t.Helper()
	return r3.Vec{X: s.num(prefix + "x" + suffix), Y: s.num(prefix + "y" + suffix), Z: s.num(prefix + "z" + suffix)}
}

func (s synthFields) utc(col string) astro.JD {
	s.t.Helper()
	j, err := astro.ParseISO8601(s.row[col])
	if err != nil {
		s.t.Fatalf("%s:%d: %s: %v", s.file, s.line, col, err)
	}
	return j
}

// readSynthGeometry reads <stem>_geometry.csv.
func readSynthGeometry(t testing.TB, stem string) []geomRow {
	t.Helper()
	name := stem + "_geometry.csv"
	rows, lines := synthCSV(t, name)
	out := make([]geomRow, len(rows))
	for i, row := range rows {
		f := synthFields{t, name, lines[i], row}
		out[i] = geomRow{
			Line: lines[i], Time: row["time"], Site: row["site"],
			UTC: f.jd("utc", astro.UTC), TT: f.jd("tt", astro.TT), TDB: f.jd("tdb", astro.TDB),
			HelioPos: f.vec("obs_", "_au"), HelioVel: f.vec("obs_v", "_au_d"),
			SunBaryVel: f.vec("sun_v", "_au_d"), GeoPos: f.vec("geo_", "_au"),
			RA: astro.AngleFromDegrees(f.num("ra_deg")), Dec: astro.AngleFromDegrees(f.num("dec_deg")),
			TauDays: f.num("tau_d"), DeltaAU: f.num("delta_au"), RAU: f.num("r_au"),
			ElongDeg: f.num("elong_deg"), AltDeg: f.num("alt_deg"),
		}
		if j := f.utc("time"); math.Abs(j.Sub(out[i].UTC)) > 1e-9 {
			t.Fatalf("%s:%d: time %s is not utc_day + utc_frac", name, lines[i], row["time"])
		}
	}
	return out
}

// readSynthState reads the true state of one object and arc from states.csv.
func readSynthState(t testing.TB, orbitName, arc string) State {
	t.Helper()
	rows, lines := synthCSV(t, "states.csv")
	for i, row := range rows {
		if row["orbit"] == orbitName && row["arc"] == arc {
			f := synthFields{t, "states.csv", lines[i], row}
			return State{Epoch: f.jd("tdb", astro.TDB), Pos: f.vec("", "_au"), Vel: f.vec("v", "_au_d")}
		}
	}
	t.Fatalf("states.csv: no state for %s arc %s", orbitName, arc)
	return State{}
}

type synthPrediction struct {
	orbit string
	truthPlace
}

// readSynthPredictions reads predictions.csv.
func readSynthPredictions(t testing.TB) []synthPrediction {
	t.Helper()
	rows, lines := synthCSV(t, "predictions.csv")
	out := make([]synthPrediction, len(rows))
	for i, row := range rows {
		f := synthFields{t, "predictions.csv", lines[i], row}
		site := row["site"]
		if site == "geocentre" {
			site = ""
		}
		out[i] = synthPrediction{row["orbit"], truthPlace{
			Line: lines[i], DaysAfter: int(f.num("days_after")), UTC: f.utc("time_utc"), TDB: f.jd("tdb", astro.TDB),
			Site: site, RA: astro.AngleFromDegrees(f.num("ra_deg")), Dec: astro.AngleFromDegrees(f.num("dec_deg")),
			DeltaAU: f.num("delta_au"), RAU: f.num("r_au"), ElongDeg: f.num("elong_deg"),
		}}
	}
	return out
}

// synthPlaceTolArcsec is the agreement to expect between our place of the true
// orbit (VSOP87 Earth) and the reference's (ERFA's epv00 Earth) at distance
// deltaAU: ephem's documented 0.1″ (TopocentricAstrometricDirection, for
// Δ ≥ 0.23 au), or, where it is larger (Δ < 0.39 au), the Earth's documented
// worst position error over Δ, 1.9e-7 au / Δ (ephem.HeliocentricICRS).
func synthPlaceTolArcsec(deltaAU float64) float64 {
	return math.Max(0.1, 1.9e-7/deltaAU/float64(astro.Arcsecond))
}

// synthSepArcsec returns the angle between a unit vector and a place, arcsec.
func synthSepArcsec(dir r3.Vec, ra, dec astro.Angle) float64 {
	u := astro.UnitVector(ra, dec)
	return math.Atan2(r3.Norm(r3.Cross(dir, u)), r3.Dot(dir, u)) / float64(astro.Arcsecond)
}

// The reference agrees with our own code where it must: our observer geometry
// with the generator's (the difference is that of our VSOP87 Earth from
// ERFA's epv00), our place of the true orbit with its noise-free places, our
// two-body state of the true elements with its states, and, on the
// generator's own geometry, our place with its place to the level of two
// independent two-body solutions.
func TestSyntheticReferenceConsistency(t *testing.T) {
	sites, err := obs.ReadSitesFile(filepath.Join(synthDir, "sites.csv"))
	if err != nil {
		t.Fatal(err)
	}
	els, _, err := ephem.ReadElementsFile(filepath.Join(synthDir, "elements.csv"))
	if err != nil {
		t.Fatal(err)
	}
	preds := readSynthPredictions(t)
	const (
		// ephem.HeliocentricICRS: the Earth within 1.9e-7 au of epv00; the
		// site vectors agree to metres (IAU 1980 against 2000A nutation).
		helioPosTolAU = 2.0e-7
		// The Earth's velocity within 10 mm/s of epv00 (5.8e-9 au/day).
		helioVelTolAUDay = 6e-9
		// ephem.SunBarycentricICRS: the Sun's velocity within 4.6e-10 au/day.
		sunVelTolAUDay = 5e-10
		// Site vector: nutation and GAST models differ by a few mas, under
		// 1 m at the Earth's radius (7e-12 au).
		geoTolAU = 7e-12
		// TDB: astro.TDBMinusTT (7 terms, geocentric) within 10 µs of
		// ERFA's dtdb, whose topocentric terms add up to 2 µs.
		tdbTolSec = 12e-6
		// On the generator's geometry the places differ only by the two-body
		// solutions (1e-12 au) and the Sun's motion during the light time
		// (linear in ephem, 5e-11 au): 1 mas is ample.
		sameGeomTolArcsec = 0.001
		// Two independent two-body solutions of the same elements.
		statePosTolAU, stateVelTolAUDay = 1e-11, 1e-13
	)
	var worstPos, worstVel, worstSun, worstGeo, worstTDB, worstSame, worstTau float64
	var worstPlace, worstPlaceRatio, worstPlaceDelta, worstFar float64
	var worstState, worstStateVel float64
	n := 0
	for _, o := range synthObjects {
		truth, err := ephem.FindElements(els, o.Name)
		if err != nil {
			t.Fatal(err)
		}
		for _, g := range readSynthGeometry(t, o.Stem) {
			n++
			var site *astro.Site
			if g.Site != "" {
				s, ok := sites[g.Site]
				if !ok {
					t.Fatalf("%s_geometry.csv:%d: unknown site %q", o.Stem, g.Line, g.Site)
				}
				site = &s
			}
			where := fmt.Sprintf("%s_geometry.csv:%d (%s %s, %s)", o.Stem, g.Line, o.Name, g.Time, g.Site)
			ours, err := ephem.ObserverGeometryAt(g.UTC, site, 0)
			if err != nil && !errors.Is(err, astro.ErrStaleTable) {
				t.Fatalf("%s: %v", where, err)
			}
			if d := math.Abs(ours.TT.Sub(g.TT)) * astro.SecondsPerDay; d > 1e-6 {
				t.Errorf("%s: TT differs by %.3g s", where, d)
			}
			dTDB := math.Abs(ours.TDB.Sub(g.TDB)) * astro.SecondsPerDay
			dPos := r3.Norm(r3.Sub(ours.HelioPos, g.HelioPos))
			dVel := r3.Norm(r3.Sub(ours.HelioVel, g.HelioVel))
			dSun := r3.Norm(r3.Sub(ours.SunBaryVel, g.SunBaryVel))
			dGeo := r3.Norm(r3.Sub(ours.GeoPos, g.GeoPos))
			worstTDB, worstPos = math.Max(worstTDB, dTDB), math.Max(worstPos, dPos)
			worstVel, worstSun, worstGeo = math.Max(worstVel, dVel), math.Max(worstSun, dSun), math.Max(worstGeo, dGeo)
			if dTDB > tdbTolSec || dPos > helioPosTolAU || dVel > helioVelTolAUDay || dSun > sunVelTolAUDay || dGeo > geoTolAU {
				t.Errorf("%s: geometry differs: TDB %.3g s, O−S %.3g au, its velocity %.3g au/d, Sun velocity %.3g au/d, site %.3g au",
					where, dTDB, dPos, dVel, dSun, dGeo)
			}

			// Our place of the true orbit, on our geometry.
			st, err := StateFromElements(truth, ours.TDB)
			if err != nil {
				t.Fatalf("%s: %v", where, err)
			}
			seen, err := st.Observe(ours)
			if err != nil {
				t.Fatalf("%s: %v", where, err)
			}
			d := synthSepArcsec(seen.Dir, g.RA, g.Dec)
			tol := synthPlaceTolArcsec(g.DeltaAU)
			if d > worstPlace {
				worstPlace, worstPlaceDelta = d, g.DeltaAU
			}
			worstPlaceRatio = math.Max(worstPlaceRatio, d/tol)
			if g.DeltaAU >= 0.23 {
				worstFar = math.Max(worstFar, d)
			}
			if d > tol {
				t.Errorf("%s: our place of the true orbit is %.4f″ from the reference, want ≤ %.4f″ (Δ = %.3f au)", where, d, tol, g.DeltaAU)
			}

			// On the generator's geometry: only the two-body solutions differ.
			st2, err := StateFromElements(truth, g.TDB)
			if err != nil {
				t.Fatalf("%s: %v", where, err)
			}
			seen2, err := st2.Observe(g.geometry())
			if err != nil {
				t.Fatalf("%s: %v", where, err)
			}
			d2 := synthSepArcsec(seen2.Dir, g.RA, g.Dec)
			dTau := math.Abs(seen2.TauDays - g.TauDays)
			worstSame, worstTau = math.Max(worstSame, d2), math.Max(worstTau, dTau)
			if d2 > sameGeomTolArcsec || dTau > 1e-10 {
				t.Errorf("%s: on the reference geometry our place is %.3g″ from it (want ≤ %g″), light time %.3g d off", where, d2, sameGeomTolArcsec, dTau)
			}
		}

		// Every arc file reads, and its rows are rows of the geometry file.
		for _, arc := range synthArcs {
			set, _, _, ts, _, geom := loadSynthetic(t, o.Name, arc)
			if set.Used() != len(set.Obs) || len(set.Obs) < 6 {
				t.Errorf("%s arc %s: %d observations, %d used", o.Name, arc, len(set.Obs), set.Used())
			}
			for i, ob := range set.Obs {
				if ob.RA != geom[i].RA || ob.Dec != geom[i].Dec {
					t.Errorf("%s line %d: place differs from the geometry file's", set.File, ob.Line)
				}
				if math.Abs(ob.SigmaRA.Arcseconds()-synthSigmaArcsec) > 1e-12 {
					t.Errorf("%s line %d: sigma %g″", set.File, ob.Line, ob.SigmaRA.Arcseconds())
				}
			}
			mine, err := StateFromElements(truth, ts.Epoch)
			if err != nil {
				t.Fatal(err)
			}
			dp, dv := r3.Norm(r3.Sub(mine.Pos, ts.Pos)), r3.Norm(r3.Sub(mine.Vel, ts.Vel))
			worstState, worstStateVel = math.Max(worstState, dp), math.Max(worstStateVel, dv)
			if dp > statePosTolAU || dv > stateVelTolAUDay {
				t.Errorf("%s arc %s: our state of the true elements differs from states.csv by %.3g au, %.3g au/d", o.Name, arc, dp, dv)
			}
		}
	}

	// The truth places after the arcs.
	var worstPred, worstPredDelta float64
	for _, p := range preds {
		truth, err := ephem.FindElements(els, p.orbit)
		if err != nil {
			t.Fatal(err)
		}
		var site *astro.Site
		if p.Site != "" {
			s := sites[p.Site]
			site = &s
		}
		g, err := ephem.ObserverGeometryAt(p.UTC, site, 0)
		if err != nil && !errors.Is(err, astro.ErrStaleTable) {
			t.Fatal(err)
		}
		st, err := StateFromElements(truth, g.TDB)
		if err != nil {
			t.Fatal(err)
		}
		seen, err := st.Observe(g)
		if err != nil {
			t.Fatal(err)
		}
		d := synthSepArcsec(seen.Dir, p.RA, p.Dec)
		if d > worstPred {
			worstPred, worstPredDelta = d, p.DeltaAU
		}
		if tol := synthPlaceTolArcsec(p.DeltaAU); d > tol || math.Abs(seen.DeltaAU-p.DeltaAU) > 1e-6 {
			t.Errorf("predictions.csv:%d (%s +%d d, %q): our place %.4f″ off (want ≤ %.4f″), Δ %.3g au off",
				p.Line, p.orbit, p.DaysAfter, p.Site, d, tol, seen.DeltaAU-p.DeltaAU)
		}
	}
	t.Logf("%d observation instants, %d predictions", n, len(preds))
	t.Logf("geometry, ours − reference: O−S %.3g au, its velocity %.3g au/d, Sun velocity %.3g au/d, site %.3g au, TDB %.3g s",
		worstPos, worstVel, worstSun, worstGeo, worstTDB)
	t.Logf("place of the true orbit on our geometry: worst %.4f″ (at Δ = %.3f au), %.4f″ for Δ ≥ 0.23 au, worst %.2f of the tolerance; predictions worst %.4f″ (Δ = %.3f au)",
		worstPlace, worstPlaceDelta, worstFar, worstPlaceRatio, worstPred, worstPredDelta)
	t.Logf("on the reference geometry: place %.3g″, light time %.3g d; true states %.3g au, %.3g au/d",
		worstSame, worstTau, worstState, worstStateVel)
}
