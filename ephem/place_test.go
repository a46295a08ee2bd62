package ephem

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"testing"

	"arcfit/astro"

	"gonum.org/v1/gonum/spatial/r3"
)

// placeTol is the tolerance for one row against the ERFA table.
type placeTol struct {
	posArcsec  float64 // astrometric place
	deltaAU    float64 // distances from the observer and the Sun
	angArcsec  float64 // elongation
	phArcsec   float64 // phase angle
	moonArcsec float64 // Moon separation
}

// The Earth's position error: our VSOP87 Earth is within 1.9e-7 au of epv00
// over 1900–2100 (vsop87.go, TestEarthAgainstEpv00); seen from a body Δ au
// away that is 1.9e-7/Δ rad.
const earthErrAU = 1.9e-7

// tolFor returns the tolerance of a row and why:
//   - Sun: 1″ (the requirement). The reference is epv00 (a fit to
//     DE405, 11 km worst for the Earth).
//   - element sets: 0.1″ (the requirement), or the Earth's error
//     1.9e-7 au/Δ where that is larger (Δ < 0.39 au): both sides propagate the
//     same two-body elements; what differs is the Earth, the Sun's barycentric
//     motion and the frame.
//   - planets: the issue asked for 2″, but ERFA's plan94 is not that good
//     (references.md says 1″; its own documentation, plan94MaxError in
//     vsop87_test.go, says up to 87″ heliocentric over 1800–2100). The
//     tolerance is plan94's stated maximum error carried to the observer,
//     plus 0.1″; the planets'
//     VSOP87 positions are checked more tightly by Meeus 33.a (0.1″) and in
//     vsop87_test.go.
//   - Moon separation: 1″ more than the position; both Moons are Meeus'
//     ch. 47 series (ERFA moon98), differing in frame details by well below
//     1″ (moon_test.go).
//
// Apparent places and alt/az add 0.05″ to the position tolerance: IAU 1980
// nutation against IAU 2000A in pnm06a and gst06a (astro: about 0.03″ at
// most).
func tolFor(body string, row placeRow) placeTol {
	const rad = 180 / math.Pi * 3600
	b, err := ParseBody(body)
	switch {
	case err == nil && b == Sun:
		return placeTol{posArcsec: 1, deltaAU: 3e-7, angArcsec: 1, phArcsec: 1, moonArcsec: 2}
	case err == nil:
		e := plan94MaxError[b] // vsop87_test.go: against DE200, 1800–2100
		helioAU := row.r*math.Hypot(e[0], e[1])/rad + e[2]/astro.AUKm
		pos := (helioAU+earthErrAU)/row.delta*rad + 0.1
		return placeTol{posArcsec: pos, deltaAU: helioAU + earthErrAU, angArcsec: pos,
			phArcsec: pos + helioAU/row.r*rad, moonArcsec: pos + 1}
	}
	pos := max(0.1, earthErrAU/row.delta*rad)
	return placeTol{posArcsec: pos, deltaAU: 3e-7, angArcsec: pos, phArcsec: pos + 3e-7/row.delta*rad, moonArcsec: pos + 1}
}

// TestPlacesAgainstERFA checks Astrometric (through PlaceOfBody and
// PlaceOfElements' helio functions) against ../testdata/erfa_places.txt:
// ERFA epv00 / plan94 / the generator's own two-body propagator, light time,
// ab and pnm06a, gst06a and hd2ae, for 200 UTC instants 1972–2100 at four
// invented sites and the geocentre, 40 TT instants 1900–1971 at the
// geocentre, and four invented element sets with e = 0.2, 0.6, 0.97 and 1.
func TestPlacesAgainstERFA(t *testing.T) {
	tab := readPlaceTable(t)
	type worst struct {
		pos, app, alt, az, delta, elong, phase, moon, refr float64
		n                                                  int
	}
	worsts := map[string]*worst{}
	for _, row := range tab.rows {
		var helio func(astro.JD) (r3.Vec, error)
		switch b, err := ParseBody(row.body); {
		case err == nil && b == Sun:
			helio = sunHelio
		case err == nil:
			helio = planetHelio(b)
		default:
			el, ok := tab.elements[row.body]
			if !ok {
				t.Fatalf("line %d: unknown body %q", row.line, row.body)
			}
			helio = elementsHelio(el)
		}
		tol := tolFor(row.body, row)
		o := Observer{DUT1Sec: row.dut1, NoRefraction: true}
		if row.site != "geocentre" {
			o.Site = tab.sites[row.site]
			if o.Site == nil {
				t.Fatalf("line %d: unknown site %q", row.line, row.site)
			}
		}
		var pl Place
		var err error
		if row.key == "utc" {
			pl, err = Astrometric(helio, row.utc, o)
			if err != nil && !errors.Is(err, astro.ErrStaleTable) {
				t.Fatalf("line %d: Astrometric(%s, %v, %s): %v", row.line, row.body, row.utc, row.site, err)
			}
		} else {
			pl, err = placeAt(helio, instant{tt: row.tt, tdb: astro.TTToTDB(row.tt)}, o)
			if err != nil {
				t.Fatalf("line %d: placeAt(%s, %v): %v", row.line, row.body, row.tt, err)
			}
		}
		name := fmt.Sprintf("line %d: %s at %s, %v", row.line, row.body, row.site, row.utc)
		if row.key == "tt" {
			name = fmt.Sprintf("line %d: %s at the geocentre, %v", row.line, row.body, row.tt)
		}
		w := worsts[row.body]
		if w == nil {
			w = &worst{}
			worsts[row.body] = w
		}
		w.n++
		up := func(p *float64, v float64) { *p = max(*p, v) }

		d := sepArcsec(pl.RA, pl.Dec, deg(row.ra), deg(row.dec))
		up(&w.pos, d)
		if d > tol.posArcsec {
			t.Errorf("%s: astrometric RA, Dec = %.7f°, %.7f°, want %.7f°, %.7f° (Δ %.3g″, tol %g″)",
				name, pl.RA.Degrees(), pl.Dec.Degrees(), row.ra, row.dec, d, tol.posArcsec)
		}
		d = sepArcsec(pl.RAApp, pl.DecApp, deg(row.raApp), deg(row.decApp))
		up(&w.app, d)
		if d > tol.posArcsec+0.05 {
			t.Errorf("%s: apparent RA, Dec = %.7f°, %.7f°, want %.7f°, %.7f° (Δ %.3g″)",
				name, pl.RAApp.Degrees(), pl.DecApp.Degrees(), row.raApp, row.decApp, d)
		}
		dTol := tol.deltaAU
		if dd := math.Abs(pl.DeltaAU - row.delta); dd > dTol {
			t.Errorf("%s: DeltaAU = %.10f, want %.10f (Δ %.3g au)", name, pl.DeltaAU, row.delta, dd)
		} else {
			up(&w.delta, dd)
		}
		if dd := math.Abs(pl.LightTimeDays - row.tau); dd > dTol/astro.SpeedOfLightAUDay {
			t.Errorf("%s: LightTimeDays = %.12f, want %.12f", name, pl.LightTimeDays, row.tau)
		}
		if dd := math.Abs(pl.RAU - row.r); dd > tol.deltaAU {
			t.Errorf("%s: RAU = %.10f, want %.10f (Δ %.3g au)", name, pl.RAU, row.r, dd)
		}
		d = math.Abs(pl.Elongation.Degrees()-row.elong) * 3600
		up(&w.elong, d)
		if d > tol.angArcsec {
			t.Errorf("%s: Elongation = %.7f°, want %.7f° (Δ %.3g″)", name, pl.Elongation.Degrees(), row.elong, d)
		}
		// The phase angle is seen from the body: the Earth's position error
		// subtends 3e-7/Δ rad there.
		d = math.Abs(pl.PhaseAngle.Degrees()-row.phase) * 3600
		up(&w.phase, d)
		if pTol := tol.phArcsec; d > pTol {
			t.Errorf("%s: PhaseAngle = %.7f°, want %.7f° (Δ %.3g″, tol %.3g″)", name, pl.PhaseAngle.Degrees(), row.phase, d, pTol)
		}
		d = math.Abs(pl.MoonSeparation.Degrees()-row.moonSep) * 3600
		up(&w.moon, d)
		if d > tol.moonArcsec {
			t.Errorf("%s: MoonSeparation = %.6f°, want %.6f° (Δ %.3g″)", name, pl.MoonSeparation.Degrees(), row.moonSep, d)
		}
		if o.Site == nil {
			if pl.Topocentric || pl.Alt != 0 || pl.Az != 0 || !math.IsNaN(pl.Airmass) {
				t.Errorf("%s: geocentric place has Topocentric %v, Alt %v, Az %v, Airmass %v; want false, 0, 0, NaN",
					name, pl.Topocentric, pl.Alt, pl.Az, pl.Airmass)
			}
			continue
		}
		d = math.Abs(pl.Alt.Degrees()-row.alt) * 3600
		up(&w.alt, d)
		if d > tol.posArcsec+0.05 {
			t.Errorf("%s: unrefracted Alt = %.7f°, want %.7f° (Δ %.3g″)", name, pl.Alt.Degrees(), row.alt, d)
		}
		if math.Abs(row.alt) < 89.9 {
			d = math.Abs((pl.Az - deg(row.az)).Wrapped().Arcseconds()) * math.Cos(row.alt*math.Pi/180)
			up(&w.az, d)
			if d > tol.posArcsec+0.05 {
				t.Errorf("%s: Az = %.7f°, want %.7f° (Δ %.3g″ on the sky)", name, pl.Az.Degrees(), row.az, d)
			}
		}
		// Refraction: ours is Saemundsson's (Meeus eq. 16.5), ERFA's the refco
		// model; references.md measured ours about 4 % larger. Allowed: 6 %
		// of ERFA's plus 1″.
		if !math.IsNaN(row.altRf) {
			ours := refraction(pl.Alt, Observer{}).Arcseconds()
			theirs := (row.altRf - row.alt) * 3600
			if row.alt < 60 {
				up(&w.refr, math.Abs((ours-theirs)/theirs))
			}
			if math.Abs(ours-theirs) > 0.06*theirs+1 {
				t.Errorf("%s: refraction at %.3f° = %.2f″, ERFA refco %.2f″", name, row.alt, ours, theirs)
			}
		}
	}
	names := make([]string, 0, len(worsts))
	for n := range worsts {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		w := worsts[n]
		t.Logf("%-14s %4d rows: worst astrometric %.4f″, apparent %.4f″, alt %.4f″, az %.4f″, Δ %.2g au, elong %.4f″, phase %.4f″, Moon sep %.3f″, refraction (alt < 60°) %.1f %%",
			n, w.n, w.pos, w.app, w.alt, w.az, w.delta, w.elong, w.phase, w.moon, 100*w.refr)
	}
}
