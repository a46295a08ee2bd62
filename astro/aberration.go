package astro

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Aberration returns the apparent direction of a source seen by an observer
// moving with barycentric velocity velAUDay, given its direction dir for an
// observer at rest in the barycentric frame (annual aberration; add the
// observer's diurnal velocity to velAUDay for diurnal aberration too). The
// special-relativistic law is used:
//
//	V = v/c,  β⁻¹ = √(1 − V²),
//	p′ = (β⁻¹ p + (1 + p·V/(1 + β⁻¹)) V) / (1 + p·V)
//
// with p the unit vector of dir. The term of the Sun's gravitational potential
// at the observer (a relative size 2GM☉/(c²r) ≈ 2e-8 of the aberration, below
// 1 µas) and gravitational light deflection are not applied.
//
// Inputs: dir, any non-zero vector towards the source (ICRS axes, or any
// axes as long as velAUDay is in the same); velAUDay, the observer's
// barycentric velocity in au per day (TDB). Output: a unit vector in the same
// axes. The zero vector gives the zero vector.
// Accuracy: exact to first and second order in V; it reproduces ERFA's ab to
// about 1 µas (see the tests).
//
// Reference: Explanatory Supplement to the Astronomical Almanac (1992),
// §3.252, eq. 3.252-3; Klioner, S. A., "A practical relativistic model for
// microarcsecond astrometry in space", AJ 125, 1580–1597 (2003).
func Aberration(dir, velAUDay r3.Vec) r3.Vec {
	n := r3.Norm(dir)
	if n == 0 {
		return r3.Vec{}
	}
	p := r3.Scale(1/n, dir)
	v := r3.Scale(1/SpeedOfLightAUDay, velAUDay)
	binv := math.Sqrt(1 - r3.Dot(v, v))
	pv := r3.Dot(p, v)
	q := r3.Add(r3.Scale(binv, p), r3.Scale(1+pv/(1+binv), v))
	return r3.Unit(q)
}

// Mass ratio of the Moon to the Earth, μ = M☾/M⊕ = 0.0123000371 (IAU 2009
// system of astronomical constants, Luzum et al. 2011; value from memory,
// common practice).
const moonEarthMassRatio = 0.0123000371

// earthHelioApproxEclipticOfDate returns the Earth's heliocentric position in
// au, mean ecliptic and equinox of date, from the Sun's low-accuracy
// geometric position (Meeus ch. 25, eqs. 25.2–25.5) and the reflex of the
// Moon's mean motion with its largest term (Meeus ch. 47, eq. 47.1 and the
// first terms of Table 47.A), for t Julian centuries of TDB since J2000.0.
func earthHelioApproxEclipticOfDate(t float64) r3.Vec {
	// The Sun (Meeus 25.2–25.5).
	l0 := 280.46646 + t*(36000.76983+t*0.0003032)
	m := (357.52911 + t*(35999.05029-t*0.0001537)) * float64(Degree)
	e := 0.016708634 - t*(0.000042037+t*0.0000001267)
	c := (1.914602-t*(0.004817+t*0.000014))*math.Sin(m) +
		(0.019993-0.000101*t)*math.Sin(2*m) + 0.000289*math.Sin(3*m)
	sunLon := (l0 + c) * float64(Degree)
	nu := m + c*float64(Degree)
	r := 1.000001018 * (1 - e*e) / (1 + e*math.Cos(nu))
	// The Earth, as seen from the Sun, in the ecliptic of date: the Sun's
	// geometric position reversed. Meeus' low-accuracy series is in effect that
	// of the Earth–Moon barycentre; the Earth lies μ/(1+μ) of the geocentric
	// Moon vector on the far side of it.
	sl, cl := math.Sincos(sunLon)
	earth := r3.Vec{X: -r * cl, Y: -r * sl}
	// The Moon: mean longitude (47.1), mean anomaly (47.4), with the equation of
	// the centre and the mean distance (Table 47.A, first term of Σl and Σr).
	lm := 218.3164477 + 481267.88123421*t
	mp := (134.9633964 + 477198.8675055*t) * float64(Degree)
	moonLon := (lm + 6.288774*math.Sin(mp)) * float64(Degree)
	moonDistAU := (385000.56 - 20905.355*math.Cos(mp)) / AUKm
	sm, cm := math.Sincos(moonLon)
	k := moonEarthMassRatio / (1 + moonEarthMassRatio) * moonDistAU
	return r3.Vec{X: earth.X - k*cm, Y: earth.Y - k*sm}
}

// earthHelioApproxICRS returns the position of earthHelioApproxEclipticOfDate
// rotated to ICRS axes: ecliptic of date → mean equator of date (IAU 2006
// obliquity) → mean equator of J2000.0 (IAU 2006 precession) → ICRS (bias).
func earthHelioApproxICRS(tdb JD) r3.Vec {
	p := earthHelioApproxEclipticOfDate(tdb.CenturiesSinceJ2000())
	eq := RotX(-MeanObliquity2006(tdb)).MulVec(p)
	m := PrecessionMatrix2006(tdb).Mul(FrameBiasMatrix())
	return m.T().MulVec(eq)
}

// EarthVelocityApprox returns an approximate barycentric velocity of the
// Earth's centre in ICRS axes, for annual aberration. It is the time
// derivative (a central difference over ±0.05 d, taken in the fixed ICRS
// axes so that the precession of the ecliptic of date drops out) of the
// Earth's heliocentric position from the Sun's low-accuracy theory of Meeus
// ch. 25 (eqs. 25.2–25.5), corrected for the Earth's motion about the
// Earth–Moon barycentre with the Moon's mean longitude and its equation of
// the centre (Meeus ch. 47, eq. 47.1, Table 47.A, first terms) and the mass
// ratio μ = 0.0123000371. The Sun's own motion about the solar-system
// barycentre (up to about 15 m/s) and the lunar inclination are neglected.
//
// Input: tdb, a TDB Julian date (TT is indistinguishable here).
// Output: the velocity in au per day.
// Accuracy: against ERFA's epv00 over 1900–2100 the error is at most about
// 1.3e-5 au/day (22 m/s), which makes the aberration wrong by at most 0.016″;
// the measured worst cases on 301 instants are 1.0e-5 au/day (17.6 m/s) and
// 0.012″ (see the tests).
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 25 (eqs. 25.2–25.5)
// and ch. 47 (eq. 47.1, Table 47.A).
func EarthVelocityApprox(tdb JD) r3.Vec {
	const h = 0.05 // days
	p1 := earthHelioApproxICRS(tdb.AddDays(h))
	p0 := earthHelioApproxICRS(tdb.AddDays(-h))
	return r3.Scale(1/(2*h), r3.Sub(p1, p0))
}
