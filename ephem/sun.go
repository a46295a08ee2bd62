package ephem

import (
	"sync"

	"arcfit/astro"

	"gonum.org/v1/gonum/spatial/r3"
)

// sunMassRatio is, per planet, the ratio of the Sun's mass to the planet's
// (for the Earth, to the Earth and Moon together), from the IAU 2009 System of
// Astronomical Constants (Luzum, B., et al., "The IAU 2009 system of
// astronomical constants: the report of the IAU working group on numerical
// standards for Fundamental Astronomy", Celest. Mech. Dyn. Astr. 110, 293–304
// (2011), Table 1; retained by IAU 2015 Resolution B3). The values are quoted
// from memory; the Earth–Moon ratio is 332946.0487/(1 + 0.0123000371).
var sunMassRatio = [...]float64{
	Mercury: 6023597.400,
	Venus:   408523.719,
	Earth:   328900.5596,
	Mars:    3098703.59,
	Jupiter: 1047.348644,
	Saturn:  3497.9018,
	Uranus:  22902.98,
	Neptune: 19412.26,
}

// sunReflexTermAU is the size, in the Sun's barycentric position, below which a
// planet's VSOP87 term is left out of SunBarycentricICRS: a term of amplitude A
// in the planet's position moves the Sun by about A/ratio, so the planet's
// series is cut at sunReflexTermAU·ratio.
const sunReflexTermAU = 2e-9

// sunReflexSeries holds, per planet, the VSOP87 series cut for the Sun's
// reflex motion.
var sunReflexSeries [Neptune + 1]func() (*vsop87Series, error)

func init() {
	for b := Mercury; b <= Neptune; b++ {
		sunReflexSeries[b] = sync.OnceValues(func() (*vsop87Series, error) {
			return loadVSOP87(b, sunReflexTermAU*sunMassRatio[b])
		})
	}
}

// SunBarycentricICRS returns the position (au) and velocity (au/day) of the
// Sun's centre with respect to the solar-system barycentre, in ICRS axes, at
// the instant tdb (TDB; TT is accepted), from the planets' heliocentric
// VSOP87 positions r_i and velocities and their masses m_i:
//
//	S = −Σ m_i r_i / (M☉ + Σ m_i),   Ṡ = −Σ m_i ṙ_i / (M☉ + Σ m_i)
//
// (the definition of the barycentre; common practice), with the IAU 2009 mass
// ratios M☉/m_i (Luzum et al. 2011; the Earth with the Moon, placed at the
// Earth's centre, which moves the result by 1e-10 au). Each planet's series is
// cut where a term would move the Sun by less than 2e-9 au (about a thousand
// terms in all, 3e-8 au at most from the full series over 1900–2100). Pluto, the asteroids and the Kuiper belt are left out.
//
// The span is that of [HeliocentricEclipticJ2000]; outside it, or for a date
// on another scale, the result is the zero vector (the Sun taken at the
// barycentre, wrong by up to 0.01 au).
//
// Accuracy: against ERFA's epv00 (barycentric minus heliocentric Earth, a fit
// to JPL DE405) over 1900–2100 the position is within 3.9e-7 au (59 km; Pluto
// alone accounts for up to 3e-7 au) and the velocity within 4.6e-10 au/day
// (0.8 mm/s); measured by TestSunBarycentricAgainstEpv00. In an astrometric place
// the Sun's offset enters only through its motion during the light time.
//
// Reference: Bretagnon & Francou (1988), VSOP87; Luzum et al. (2011) for the
// masses; Explanatory Supplement to the Astronomical Almanac (2013), ch. 8
// (barycentric and heliocentric coordinates).
func SunBarycentricICRS(tdb astro.JD) (pos, vel r3.Vec) {
	tau, err := vsop87Tau(Sun, tdb)
	if err != nil {
		return r3.Vec{}, r3.Vec{}
	}
	var sum float64 = 1 // M☉ + Σ m_i, in units of M☉
	for b := Mercury; b <= Neptune; b++ {
		s, err := sunReflexSeries[b]()
		if err != nil {
			return r3.Vec{}, r3.Vec{}
		}
		p, v := s.cartesian(tau)
		mu := 1 / sunMassRatio[b]
		pos = r3.Sub(pos, r3.Scale(mu, p))
		vel = r3.Sub(vel, r3.Scale(mu, v))
		sum += mu
	}
	m := vsop87ToICRS
	return r3.Scale(1/sum, m.MulVec(pos)), r3.Scale(1/sum, m.MulVec(vel))
}

// EarthBarycentricICRS returns the barycentric position (au) and velocity
// (au/day) of the Earth's centre in ICRS axes at the instant tdb (TDB; TT is
// accepted): the heliocentric VSOP87 Earth of [HeliocentricICRS] plus the
// Sun's barycentric offset of [SunBarycentricICRS].
//
// Errors are those of [HeliocentricICRS] (date outside the span, wrong scale).
// Accuracy: against ERFA's epv00 over 1900–2100, at most the sum of the two
// parts' measured errors: 5.8e-7 au in position and 11 mm/s in velocity.
//
// Reference: Bretagnon & Francou (1988); Luzum et al. (2011).
func EarthBarycentricICRS(tdb astro.JD) (pos, vel r3.Vec, err error) {
	pos, vel, err = HeliocentricICRS(Earth, tdb)
	if err != nil {
		return r3.Vec{}, r3.Vec{}, err
	}
	sp, sv := SunBarycentricICRS(tdb)
	return r3.Add(pos, sp), r3.Add(vel, sv), nil
}

// sunAberrationConstant is Meeus' constant of the Sun's aberration in
// longitude, 20.4898″ at 1 au (Meeus, Astronomical Algorithms, 2nd ed., ch. 25,
// eq. 25.10): the annual aberration 20.49552″ with the light time of the Sun's
// own (heliocentric) motion folded in.
const sunAberrationConstant = 20.4898 * astro.Arcsecond

// SunGeometricEclipticOfDate returns the Sun's geometric geocentric ecliptic
// longitude (in [0, 2π)), latitude and distance (au) at the instant tt (TT;
// TDB is accepted), referred to the mean ecliptic and equinox of date of the
// FK5, by Meeus' high-accuracy method: the Earth's heliocentric VSOP87
// position reversed (Θ = L + 180°, β = −B), corrected from the VSOP87 frame
// to the FK5 (Meeus eq. 32.3 as applied in example 25.b; see [HeliocentricICRS])
// and carried from the ecliptic of J2000 to that of date with the IAU 1976
// precession ([EclipticPrecession1976]). Meeus uses VSOP87D, referred
// directly to the ecliptic of date; arcfit has the J2000 version B and
// precesses it, which is the same to a few mas over 1900–2100.
//
// No light time and no aberration are applied. Errors: a date outside the
// VSOP87 span or on another scale (see [HeliocentricEclipticJ2000]).
//
// Accuracy: against Meeus' full-VSOP87 values of example 25.a (1992 Oct 13.0
// TD: λ = 199°54′26.18″, β = +0.72″, R = 0.99760853 au) within 0.02″ and 2e-8 au
// (measured in the tests).
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 25 ("higher
// accuracy", example 25.b), ch. 32 (VSOP87 to FK5) and ch. 21 (eq. 21.7).
func SunGeometricEclipticOfDate(tt astro.JD) (lon, lat astro.Angle, rAU float64, err error) {
	e, _, err := HeliocentricEclipticJ2000(Earth, tt)
	if err != nil {
		return 0, 0, 0, err
	}
	g := r3.Scale(-1, vsop87ToFK5.MulVec(e))
	g = EclipticPrecession1976(tt).MulVec(g)
	lon, lat, rAU = astro.Spherical(g)
	return lon, lat, rAU, nil
}

// SunApparentEclipticOfDate returns the Sun's apparent geocentric ecliptic
// longitude (in [0, 2π)), latitude and distance (au) at the instant tt (TT;
// TDB is accepted), referred to the true ecliptic and equinox of date, by
// Meeus' high-accuracy method:
//
//	λ = Θ + Δψ − 20.4898″/R,   β = β_geometric
//
// with Θ, β, R from [SunGeometricEclipticOfDate], Δψ the nutation in longitude
// ([astro.Nutation1980], IAU 1980) and the last term the aberration together
// with the light time (Meeus eq. 25.10). The aberration in latitude (below
// 0.001″) is not applied. Errors as [SunGeometricEclipticOfDate].
//
// Accuracy: against Meeus' full-VSOP87 apparent longitude of example 25.a,
// 199°54′21.56″, and ERFA's rigorous recomputation (21.57″; see
// /work/shared/checks/meeus.md), within 0.05″ (measured in the tests). The
// method neglects the Sun's motion about the barycentre in the aberration
// (up to about 0.01″).
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 25 (example 25.b,
// eq. 25.10) and ch. 22 (nutation).
func SunApparentEclipticOfDate(tt astro.JD) (lon, lat astro.Angle, rAU float64, err error) {
	lon, lat, rAU, err = SunGeometricEclipticOfDate(tt)
	if err != nil {
		return 0, 0, 0, err
	}
	dpsi, _ := astro.Nutation1980(ttScaled(tt))
	lon = (lon + dpsi - sunAberrationConstant/astro.Angle(rAU)).Normalized()
	return lon, lat, rAU, nil
}

// SunApparentEquatorialOfDate returns the Sun's apparent geocentric right
// ascension (in [0, 2π)) and declination, true equator and equinox of date,
// and its distance (au), at the instant tt (TT; TDB is accepted), by Meeus'
// high-accuracy method: [SunApparentEclipticOfDate] turned to the equator with
// the true obliquity ε = ε0 + Δε, ε0 of IAU 1980 ([astro.MeanObliquity1980],
// Meeus eq. 22.2) and Δε from [astro.Nutation1980] (Meeus eqs. 13.3, 13.4).
//
// Accuracy: against Meeus' example 25.a (α = 13h13m30.749s, δ = −7°47′01.74″)
// and ERFA's recomputation, within 0.05″ (measured). Against the apparent
// place from JPL DE405 with the IAU 2006/2000A precession-nutation (200
// instants 1960–2060, ephem/testdata/de405_places.txt) within 0.17″: the
// difference grows by about 0.25″ per century from J2000, as expected from
// the IAU 1976 precession used here (IAU 2000 corrected its rate in
// longitude by −0.30″ per century, from memory). For the apparent place of the Sun seen from a
// site, with the IAU 2006 frame, use [PlaceOfBody].
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 25 (example 25.b),
// ch. 13 and ch. 22.
func SunApparentEquatorialOfDate(tt astro.JD) (ra, dec astro.Angle, rAU float64, err error) {
	lon, lat, rAU, err := SunApparentEclipticOfDate(tt)
	if err != nil {
		return 0, 0, 0, err
	}
	t := ttScaled(tt)
	_, deps := astro.Nutation1980(t)
	ra, dec = astro.EclipticToEquatorial(lon, lat, astro.MeanObliquity1980(t)+deps)
	return ra.Normalized(), dec, rAU, nil
}

// ttScaled returns j labelled TT (a TDB date is read as TT; the difference,
// under 2 ms, does not matter for nutation and obliquity).
func ttScaled(j astro.JD) astro.JD {
	j.Scale = astro.TT
	return j
}
