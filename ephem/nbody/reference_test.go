package nbody_test

import (
	"bufio"
	"math"
	"os"
	"sort"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/ephem/nbody"
)

// refPath is the external reference of this file's tests: three invented
// orbits (a main-belt asteroid, a Jupiter-family comet that passes Jupiter
// inside its Hill sphere, a near-Earth asteroid that passes the Earth at
// 0.0125 au) integrated a year forward and a year back from a 2027 epoch by
// scipy's DOP853 at rtol 2.5e-13 under the Sun and the planets, made by
// testdata/gen/nbody_reference.py (its header gives the command, the package
// versions, the force model, the convergence and the definitions). Three
// models: "nbody_de405" (every body from JPL DE405, the accurate reference),
// "nbody" (planets from ERFA's plan94, Earth epv00, Moon moon98) and
// "twobody" (the planets' masses zero).
const refPath = "testdata/reference_states.txt"

// refState is one "state" row of the reference file.
type refState struct {
	line    int
	tdb     float64 // TDB Julian date (exact in the file: a whole or half day)
	dt      float64 // days from the epoch
	x       [6]float64
	earth   r3.Vec  // erfa.epv00 heliocentric Earth at tdb, au
	tauDays float64 // light time
	dir     r3.Vec  // unit vector of the geocentric astrometric direction
	deltaAU float64
	raDeg   float64
	decDeg  float64
}

// refEncounter is one "encounter" row.
type refEncounter struct {
	line           int
	model, orbit   string
	body           string
	tdb            astro.JD
	distAU, hillAU float64
}

// refTable holds the file: states[model][orbit], in time order.
type refTable struct {
	states     map[string]map[string][]refState
	encounters []refEncounter
}

func readReference(t testing.TB) *refTable {
	t.Helper()
	f, err := os.Open(refPath)
	if err != nil {
		t.Fatalf("reference table: %v (made by testdata/gen/nbody_reference.py)", err)
	}
	defer f.Close()
	tab := &refTable{states: map[string]map[string][]refState{}}
	sc := bufio.NewScanner(f)
	sc.Buffer(make([]byte, 1<<16), 1<<20)
	line := 0
	for sc.Scan() {
		line++
		s := strings.TrimSpace(sc.Text())
		if s == "" || strings.HasPrefix(s, "#") {
			continue
		}
		fs := strings.Fields(s)
		num := func(i int) float64 {
			v, err := strconv.ParseFloat(fs[i], 64)
			if err != nil {
				t.Fatalf("%s:%d: field %d: %v", refPath, line, i+1, err)
			}
			return v
		}
		switch fs[0] {
		case "state":
			if len(fs) != 18 {
				t.Fatalf("%s:%d: state row has %d fields, want 18", refPath, line, len(fs))
			}
			r := refState{line: line, tdb: num(3), dt: num(4)}
			for i := range r.x {
				r.x[i] = num(5 + i)
			}
			r.earth = r3.Vec{X: num(11), Y: num(12), Z: num(13)}
			r.tauDays, r.raDeg, r.decDeg, r.deltaAU = num(14), num(15), num(16), num(17)
			r.dir = unitRADec(r.raDeg, r.decDeg)
			m := tab.states[fs[1]]
			if m == nil {
				m = map[string][]refState{}
				tab.states[fs[1]] = m
			}
			m[fs[2]] = append(m[fs[2]], r)
		case "encounter":
			if len(fs) != 8 {
				t.Fatalf("%s:%d: encounter row has %d fields, want 8", refPath, line, len(fs))
			}
			tab.encounters = append(tab.encounters, refEncounter{
				line: line, model: fs[1], orbit: fs[2], body: fs[3],
				tdb:    astro.JD{Day: num(4), Frac: num(5), Scale: astro.TDB},
				distAU: num(6), hillAU: num(7),
			})
		default:
			t.Fatalf("%s:%d: unknown row kind %q", refPath, line, fs[0])
		}
	}
	if err := sc.Err(); err != nil {
		t.Fatalf("%s: %v", refPath, err)
	}
	for _, model := range []string{"nbody", "nbody_de405", "twobody"} {
		for _, orbit := range refOrbits {
			rows := tab.states[model][orbit]
			sort.Slice(rows, func(i, j int) bool { return rows[i].dt < rows[j].dt })
			if len(rows) != 147 {
				t.Fatalf("%s: %s %s: %d rows, want 147", refPath, model, orbit, len(rows))
			}
		}
	}
	return tab
}

// refOrbits are the orbits of the file.
var refOrbits = []string{"MB", "JFC", "NEO"}

func unitRADec(raDeg, decDeg float64) r3.Vec {
	ra, dec := raDeg*math.Pi/180, decDeg*math.Pi/180
	return r3.Vec{X: math.Cos(dec) * math.Cos(ra), Y: math.Cos(dec) * math.Sin(ra), Z: math.Sin(dec)}
}

func vec(x [6]float64) (pos, vel r3.Vec) {
	return r3.Vec{X: x[0], Y: x[1], Z: x[2]}, r3.Vec{X: x[3], Y: x[4], Z: x[5]}
}

// angleArcsec is the angle between a and b in arcseconds.
func angleArcsec(a, b r3.Vec) float64 {
	return math.Atan2(r3.Norm(r3.Cross(a, b)), r3.Dot(a, b)) / astro.Arcsecond.Radians()
}

func tdbJD(jd float64) astro.JD { return astro.NewJD(jd, astro.TDB) }

// refEpoch returns the epoch row of an orbit (the same initial state in every
// model: checked).
func refEpoch(t *testing.T, tab *refTable, orbit string) refState {
	t.Helper()
	var e refState
	for i, model := range []string{"nbody_de405", "nbody", "twobody"} {
		rows := tab.states[model][orbit]
		r := rows[len(rows)/2]
		if r.dt != 0 {
			t.Fatalf("%s:%d: %s %s: middle row at dt %g, want the epoch", refPath, r.line, model, orbit, r.dt)
		}
		if i == 0 {
			e = r
		} else if r.x != e.x {
			t.Fatalf("%s:%d: %s %s: epoch state differs from nbody_de405's (line %d)", refPath, r.line, model, orbit, e.line)
		}
	}
	return e
}

// propagated holds arcfit's integration of one orbit to the reference's
// instants: the state at each instant t and at t − τ (τ the reference's
// light time).
type propagated struct {
	at, retarded [][6]float64
	res          *nbody.Result
}

func propagateOrbit(t *testing.T, epoch refState, rows []refState) propagated {
	t.Helper()
	ts := make([]astro.JD, 0, 2*len(rows))
	for _, r := range rows {
		ts = append(ts, tdbJD(r.tdb))
	}
	for _, r := range rows {
		ts = append(ts, tdbJD(r.tdb).AddDays(-r.tauDays))
	}
	res, err := nbody.Propagate(tdbJD(epoch.tdb), epoch.x, ts, nbody.Options{})
	if err != nil {
		t.Fatalf("nbody.Propagate(%s epoch JD %.1f TDB, %d instants over ±365 d): %v", refPath, epoch.tdb, len(ts), err)
	}
	if len(res.States) != len(ts) {
		t.Fatalf("nbody.Propagate: %d states for %d instants", len(res.States), len(ts))
	}
	return propagated{at: res.States[:len(rows)], retarded: res.States[len(rows):], res: res}
}

// geocentric returns the geocentric astrometric direction (unit vector) of
// the reference's definition, ρ = r(t − τ) − E(t), heliocentric, τ = |ρ|/c,
// from the heliocentric state xr at t − τ0 (τ0 the reference's light time):
// the position is moved by its velocity to the converged τ (the change of τ
// is the position difference over c, microseconds; the neglected curvature
// term is below 1e-15 au).
func geocentric(xr [6]float64, tau0 float64, earth r3.Vec) (dir r3.Vec, deltaAU float64) {
	p, v := vec(xr)
	tau := tau0
	var rho r3.Vec
	for range 3 {
		rho = r3.Sub(r3.Sub(p, r3.Scale(tau-tau0, v)), earth)
		tau = r3.Norm(rho) / astro.SpeedOfLightAUDay
	}
	rho = r3.Sub(r3.Sub(p, r3.Scale(tau-tau0, v)), earth)
	return r3.Unit(rho), r3.Norm(rho)
}

// dirTolArcsec is the figure: agreement with the reference integration
// within 0.1″ in the sky position seen from the Earth after one year.
const dirTolArcsec = 0.1

// earthVSOP87ErrAU is the stated error of package ephem's VSOP87 Earth against
// ERFA's epv00, 1.9e-7 au over 1900–2100 ([ephem.HeliocentricICRS]); it
// widens the tolerance of the direction computed with arcfit's own Earth.
const earthVSOP87ErrAU = 1.9e-7

// TestPropagateAgainstReference integrates the three reference orbits with
// Propagate from the reference's epoch state to its 146 instants a year
// either side and compares: the heliocentric position (km and au), and the
// geocentric astrometric direction computed with the reference's own Earth
// (epv00, so that only the integrations differ) and with arcfit's Earth
// (VSOP87, the total a user sees). After one year (±365 d) the direction
// must agree with the DE405-planet reference within 0.1″ (the issue's
// figure); with the plan94-planet reference within 0.1″ plus that
// reference's own planet-source uncertainty at the instant (its difference
// from the DE405 one, up to 5.3″ for the comet past Jupiter: plan94's Jupiter
// is 93,000 km from DE405's, see the file's header); with arcfit's Earth
// within 0.1″ plus the Earth's stated error over the distance. The worst
// differences over all instants are logged per orbit.
func TestPropagateAgainstReference(t *testing.T) {
	tab := readReference(t)
	for _, orbit := range refOrbits {
		t.Run(orbit, func(t *testing.T) {
			epoch := refEpoch(t, tab, orbit)
			de := tab.states["nbody_de405"][orbit]
			p94 := tab.states["nbody"][orbit]
			two := tab.states["twobody"][orbit]
			got := propagateOrbit(t, epoch, de)
			var worstKm, worstDir, worstDir94, worstOwn float64
			var worstKmAt, worstDirAt, worstOwnAt float64
			for i, r := range de {
				pos, _ := vec(got.at[i])
				refPos, _ := vec(r.x)
				dKm := r3.Norm(r3.Sub(pos, refPos)) * astro.AUKm
				dir, delta := geocentric(got.retarded[i], r.tauDays, r.earth)
				dDir := angleArcsec(dir, r.dir)
				dDir94 := angleArcsec(dir, p94[i].dir)
				src94 := angleArcsec(r.dir, p94[i].dir)
				ePos, _, err := ephem.HeliocentricICRS(ephem.Earth, tdbJD(r.tdb))
				if err != nil {
					t.Fatalf("ephem.HeliocentricICRS(Earth, JD %.1f TDB): %v", r.tdb, err)
				}
				own, _ := geocentric(got.retarded[i], r.tauDays, ePos)
				dOwn := angleArcsec(own, r.dir)
				if dKm > worstKm {
					worstKm, worstKmAt = dKm, r.dt
				}
				if dDir > worstDir {
					worstDir, worstDirAt = dDir, r.dt
				}
				worstDir94 = math.Max(worstDir94, dDir94)
				if dOwn > worstOwn {
					worstOwn, worstOwnAt = dOwn, r.dt
				}
				if math.Abs(r.dt) != 365 {
					continue
				}
				pert := angleArcsec(r.dir, two[i].dir)
				t.Logf("%s %+4.0f d (%s:%d): position Δ %.1f km (%.2e au); direction Δ %.4f″ (DE405-planet reference), %.4f″ (plan94 reference; the two references differ by %.4f″), %.4f″ with arcfit's Earth; Δ %.3f au; the planets' perturbation here %.1f″",
					orbit, r.dt, refPath, r.line, dKm, dKm/astro.AUKm, dDir, dDir94, src94, dOwn, delta, pert)
				if dDir > dirTolArcsec {
					t.Errorf("%s %+.0f d (%s:%d): direction differs from the DE405-planet reference by %.4f″, tolerance %.2f″",
						orbit, r.dt, refPath, r.line, dDir, dirTolArcsec)
				}
				if tol := dirTolArcsec + src94; dDir94 > tol {
					t.Errorf("%s %+.0f d (%s:%d): direction differs from the plan94-planet reference by %.4f″, tolerance %.4f″ (0.1″ + the references' own difference)",
						orbit, r.dt, refPath, p94[i].line, dDir94, tol)
				}
				earthTol := earthVSOP87ErrAU / delta / astro.Arcsecond.Radians()
				if tol := dirTolArcsec + earthTol; dOwn > tol {
					t.Errorf("%s %+.0f d (%s:%d): direction with arcfit's Earth differs from the reference by %.4f″, tolerance %.4f″ (0.1″ + %.2g au / Δ)",
						orbit, r.dt, refPath, r.line, dOwn, tol, earthVSOP87ErrAU)
				}
			}
			t.Logf("%s worst over the 147 instants: position %.1f km (%.2e au) at %+.0f d; direction %.4f″ at %+.0f d (DE405-planet reference), %.4f″ (plan94 reference), %.4f″ at %+.0f d with arcfit's Earth; %d steps",
				orbit, worstKm, worstKm/astro.AUKm, worstKmAt, worstDir, worstDirAt, worstDir94, worstOwn, worstOwnAt, got.res.Steps)
		})
	}
}

// TestPropagateReversibility integrates each reference orbit a year forward
// and back again: the start must come back to 1e-10 au (the figure),
// through the comet's pass inside Jupiter's Hill sphere and the asteroid's
// 0.0125 au pass by the Earth.
func TestPropagateReversibility(t *testing.T) {
	tab := readReference(t)
	for _, orbit := range refOrbits {
		epoch := refEpoch(t, tab, orbit)
		t0 := tdbJD(epoch.tdb)
		for _, days := range []float64{365, -365} {
			t1 := t0.AddDays(days)
			fwd, err := nbody.Propagate(t0, epoch.x, []astro.JD{t1}, nbody.Options{})
			if err != nil {
				t.Fatalf("%s: nbody.Propagate to %+.0f d: %v", orbit, days, err)
			}
			back, err := nbody.Propagate(t1, fwd.States[0], []astro.JD{t0}, nbody.Options{})
			if err != nil {
				t.Fatalf("%s: nbody.Propagate back from %+.0f d: %v", orbit, days, err)
			}
			p0, _ := vec(epoch.x)
			p1, _ := vec(back.States[0])
			d := r3.Norm(r3.Sub(p1, p0))
			t.Logf("%s: %+.0f d and back: %.2e au (%.2f m)", orbit, days, d, d*astro.AUKm*1000)
			if d > 1e-10 {
				t.Errorf("%s: %+.0f d and back: start missed by %.3g au, want ≤ 1e-10 au", orbit, days, d)
			}
		}
	}
}

// TestPropagateEncountersAgainstReference checks the close approaches that
// Propagate reports against the reference's (DE405 planets): the asteroid's
// pass by the Earth and the comet's pass inside Jupiter's Hill sphere.
// Tolerances: for the Earth, the distance within 1e-6 au (five times the
// VSOP87 Earth's stated error, 1.9e-7 au) and the instant within 0.001 d
// (the time the asteroid takes, at 9 km/s relative to the Earth, to cover
// that 1e-6 au five times over); for Jupiter, 3e-5 au (about three times
// VSOP87's Jupiter error against DE405, 0.25″ at up to 6 au, see
// [ephem.HeliocentricEclipticJ2000]) and 0.05 d (the minimum is shallow:
// the comet moves at 0.002 au/day relative to Jupiter, and the plan94 and
// DE405 references put it 0.2 d apart).
func TestPropagateEncountersAgainstReference(t *testing.T) {
	tab := readReference(t)
	checks := []struct {
		orbit, body    string
		distTolAU, dtD float64
	}{
		{"NEO", "Earth", 1e-6, 0.001},
		{"JFC", "Jupiter", 3e-5, 0.05},
	}
	for _, c := range checks {
		var want *refEncounter
		for i := range tab.encounters {
			e := &tab.encounters[i]
			if e.model == "nbody_de405" && e.orbit == c.orbit && e.body == c.body {
				want = e
			}
		}
		if want == nil {
			t.Fatalf("%s: no %s encounter of %s in the reference", refPath, c.body, c.orbit)
		}
		epoch := refEpoch(t, tab, c.orbit)
		res, err := nbody.Propagate(tdbJD(epoch.tdb), epoch.x, []astro.JD{tdbJD(epoch.tdb + 365)}, nbody.Options{})
		if err != nil {
			t.Fatalf("%s: nbody.Propagate: %v", c.orbit, err)
		}
		var got *nbody.Encounter
		for i := range res.Encounters {
			if res.Encounters[i].Body == c.body {
				got = &res.Encounters[i]
			}
		}
		if got == nil {
			t.Errorf("%s: Propagate reports no %s encounter; the reference (%s:%d) has %.6f au at JD %.4f TDB (Hill radius %.4f au); got %v",
				c.orbit, c.body, refPath, want.line, want.distAU, want.tdb.Float(), want.hillAU, res.Encounters)
			continue
		}
		dDist := got.DistanceAU - want.distAU
		dT := got.TDB.Sub(want.tdb)
		t.Logf("%s: %s encounter at JD %.5f TDB, %.9f au (Hill %.4f au); reference (%s:%d) JD %.5f, %.9f au (Hill %.4f au at the instant): Δ %.2e au, %.4f d",
			c.orbit, c.body, got.TDB.Float(), got.DistanceAU, got.HillAU, refPath, want.line, want.tdb.Float(), want.distAU, want.hillAU, dDist, dT)
		if math.Abs(dDist) > c.distTolAU || math.Abs(dT) > c.dtD {
			t.Errorf("%s: %s encounter JD %.5f TDB %.9f au, want JD %.5f ± %.3f d, %.9f ± %.1e au (%s:%d)",
				c.orbit, c.body, got.TDB.Float(), got.DistanceAU, want.tdb.Float(), c.dtD, want.distAU, c.distTolAU, refPath, want.line)
		}
	}
}

// TestReferenceTwoBody checks the reference file itself from this side: its
// two-body rows (the planets' masses zero, same integrator and tolerances)
// against package ephem's universal-variable propagation, stated good to
// about 1e-13 au ([ephem.PropagateUniversal]); 1e-11 au allows the
// reference's own convergence (below 1e-13 au, its header) and a year of
// rounding. It also logs how large the planets' perturbations are.
func TestReferenceTwoBody(t *testing.T) {
	tab := readReference(t)
	for _, orbit := range refOrbits {
		epoch := refEpoch(t, tab, orbit)
		p0, v0 := vec(epoch.x)
		var worst, worstPert float64
		for i, r := range tab.states["twobody"][orbit] {
			p, _, err := ephem.PropagateUniversal(p0, v0, r.dt, ephem.GMSun)
			if err != nil {
				t.Fatalf("%s: ephem.PropagateUniversal(%+.0f d): %v", orbit, r.dt, err)
			}
			rp, _ := vec(r.x)
			d := r3.Norm(r3.Sub(p, rp))
			worst = math.Max(worst, d)
			if d > 1e-11 {
				t.Errorf("%s:%d: two-body %s %+.0f d: reference differs from ephem.PropagateUniversal by %.3g au, want ≤ 1e-11 au",
					refPath, r.line, orbit, r.dt, d)
			}
			worstPert = math.Max(worstPert, angleArcsec(r.dir, tab.states["nbody_de405"][orbit][i].dir))
		}
		t.Logf("%s: two-body rows vs ephem.PropagateUniversal: worst %.2e au; n-body − two-body direction up to %.1f″", orbit, worst, worstPert)
	}
}

// TestReferenceDirections checks that this file's definition of the
// geocentric direction is the reference's: the direction made by
// [geocentric] from the reference's own state at t, moved to t − τ by a
// second-order Taylor step under the Sun alone, must give the RA and Dec
// the file lists. The neglected terms (the planets' pull during τ, the
// Sun's third-order term) stay below 1e-4″; the file's 10 decimals of a
// degree, 4e-7″; tolerance 1e-3″.
func TestReferenceDirections(t *testing.T) {
	tab := readReference(t)
	gm := ephem.GMSun
	for model, byOrbit := range tab.states {
		var worst float64
		for orbit, rows := range byOrbit {
			for _, r := range rows {
				p, v := vec(r.x)
				rn := r3.Norm(p)
				a := r3.Scale(-gm/(rn*rn*rn), p)
				tau := r.tauDays
				pr := r3.Add(r3.Sub(p, r3.Scale(tau, v)), r3.Scale(tau*tau/2, a))
				var xr [6]float64
				xr[0], xr[1], xr[2] = pr.X, pr.Y, pr.Z
				xr[3], xr[4], xr[5] = v.X, v.Y, v.Z
				dir, delta := geocentric(xr, tau, r.earth)
				d := angleArcsec(dir, r.dir)
				worst = math.Max(worst, d)
				if d > 1e-3 || math.Abs(delta-r.deltaAU) > 1e-8 {
					t.Errorf("%s:%d: %s %s %+.0f d: direction from the state differs from the listed one by %.2g″ (Δ %.12f au, listed %.12f)",
						refPath, r.line, model, orbit, r.dt, d, delta, r.deltaAU)
				}
			}
		}
		t.Logf("%s: listed directions reproduced from the states to %.1e″", model, worst)
	}
}
