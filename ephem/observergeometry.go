package ephem

import (
	"arcfit/astro"

	"gonum.org/v1/gonum/spatial/r3"
)

// ObserverGeometry is where an observer is at one instant, relative to the
// Sun, in ICRS axes: what an orbit fitter needs once per observation, so that
// each trial orbit costs only a two-body propagation.
type ObserverGeometry struct {
	UTC, TT, TDB astro.JD
	// HelioPos and HelioVel are the observer's position and velocity
	// relative to the Sun's barycentric position (au, au/day):
	// O(t) − S(t), Ȯ(t) − Ṡ(t), with O the Earth's VSOP87 position plus the
	// site's geocentric position.
	HelioPos, HelioVel r3.Vec
	// SunBaryVel is the Sun's barycentric velocity Ṡ(t) (au/day). A body
	// with heliocentric position h at t − τ is then seen along
	// h + S(t − τ) − O(t) ≈ h − HelioPos − τ·SunBaryVel, the same
	// approximation [TopocentricAstrometricDirection] makes.
	SunBaryVel r3.Vec
	// GeoPos is the site's geocentric GCRS position (au); zero for the
	// geocentre.
	GeoPos r3.Vec
}

// ObserverGeometryAt returns the observer's geometry for an observation at
// the UTC instant utc from site (nil: the geocentre), UT1 = UTC + dut1Sec.
// It uses the same time scales, Earth position and site vector as
// [TopocentricAstrometricDirection], so that a direction formed from it with
// [ObserverGeometry.Direction] agrees with that function to rounding.
//
// Errors and warnings as [TopocentricAstrometricDirection]: a warning (stale
// leap-second table, UTC before 1972) comes with a valid result.
func ObserverGeometryAt(utc astro.JD, site *astro.Site, dut1Sec float64) (ObserverGeometry, error) {
	if err := checkObserver(Observer{Site: site}); err != nil {
		return ObserverGeometry{}, err
	}
	in, warn, err := newInstant(utc, dut1Sec)
	if err != nil {
		return ObserverGeometry{}, err
	}
	st, err := stateOf(site, in)
	if err != nil {
		return ObserverGeometry{}, err
	}
	return ObserverGeometry{
		UTC: in.utc, TT: in.tt, TDB: in.tdb,
		HelioPos:   r3.Sub(st.pos, st.sunPos),
		HelioVel:   r3.Sub(st.vel, st.sunVel),
		SunBaryVel: st.sunVel,
		GeoPos:     st.geo,
	}, warn
}

// Direction returns the astrometric direction (unit vector, ICRS), the
// distance Δ (au) and the light time τ (days) of a body whose heliocentric
// ICRS position at a TDB instant is given by helio, seen by the observer g:
// the light-time iteration of [TopocentricAstrometricDirection] on g's
// stored geometry.
func (g ObserverGeometry) Direction(helio func(tdb astro.JD) (r3.Vec, error)) (dir r3.Vec, deltaAU, tauDays float64, err error) {
	st := observerState{pos: g.HelioPos, sunVel: g.SunBaryVel}
	p, _, tau, err := lightTime(helio, st, g.TDB)
	if err != nil {
		return r3.Vec{}, 0, 0, err
	}
	d := r3.Norm(p)
	return r3.Scale(1/d, p), d, tau, nil
}
