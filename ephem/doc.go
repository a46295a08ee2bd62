// Package ephem computes where the bodies of the solar system are: the Sun,
// the Earth, the Moon and the planets, and bodies given by orbital elements;
// and, from those, the events of a night at a site.
//
// # Units, frames and time
//
// Positions are in astronomical units (au), velocities in au per day (of 86400 s
// of TDB). Angles are radians, carried as [astro.Angle]. Rectangular vectors are
// gonum's r3.Vec.
//
// The frames are named in each function: the ecliptic and equinox J2000
// (VSOP87's frame, and that of orbital elements), or the ICRS (equatorial axes,
// the frame of astrometric right ascension and declination). [EclipticJ2000ToICRS]
// and [ICRSToEclipticJ2000] pass between the two. "Heliocentric" means from the
// centre of the Sun, not from the solar-system barycentre.
//
// The time argument of the ephemerides is a Julian date on the TDB scale
// (TT is accepted where the difference, under 2 ms, does not matter; each
// function says so). Each model states the span over which it is offered;
// outside it the functions return an error that wraps
// [astro.ErrUnsupportedDate].
//
// # References
//
//  1. Bretagnon, P., Francou, G., "Planetary theories in rectangular and
//     spherical variables. VSOP87 solutions", Astron. Astrophys. 202, 309–315
//     (1988).
//  2. Meeus, J., Astronomical Algorithms, 2nd ed., Willmann-Bell, 1998.
//  3. Lieske, J. H., Lederle, T., Fricke, W., Morando, B., "Expressions for the
//     precession quantities based upon the IAU (1976) system of astronomical
//     constants", Astron. Astrophys. 58, 1–16 (1977).
//  4. Mignard, F., Froeschlé, M., "Global and local bias in the FK5 from the
//     Hipparcos data", Astron. Astrophys. 354, 732–739 (2000).
//
// The VSOP87 coefficients are data, embedded from data/vsop87b_*.bin; how they
// were made, from which package and under which licence, is in
// data/PROVENANCE.md.
package ephem
