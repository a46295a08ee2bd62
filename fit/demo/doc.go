// Package demo holds arcfit's built-in demo scenario: invented measurements of
// an invented asteroid from two invented sites, with the invented orbit they
// came from and noise-free positions for checking predictions.
//
// # The scenario
//
// The object, "Demo-1 (invented)", is not a real body: its orbital elements
// were made up to resemble a typical main-belt asteroid (a = 2.614 au,
// e = 0.148, i = 7.86°, heliocentric, ecliptic and equinox J2000, epoch
// 2027 January 1 0h TT), placed so that it stands near opposition in early
// February 2027 (elongation about 172°, distance 1.28 au, Dec +23°, V ≈ 18.1).
// The sites, "Alder Ridge" (42.3150° N, 101.5280° W, 930 m) and "Birch
// Hollow" (44.0520° N, 2.9310° E, 610 m), are invented places, not
// observatories.
//
// It is observed on the local nights of 3, 5 and 7 February 2027: four
// measurements from Alder Ridge on each of those nights but the 5th, which has
// three from Alder Ridge and three from Birch Hollow; fourteen in all, early in
// each night, at altitudes of 36°–65° with the Sun below −30°.
//
// The positions are astrometric ICRS places, topocentric for the site, made by
// the committed generator testdata/gen/demo_scenario.py with python3-erfa 2.0.0.1
// and numpy 1.24.2 (two-body motion about the Sun with GM = k², light time
// iterated, Earth from ERFA's epv00, the site from gd2gc and c2t06a, UT1 taken
// equal to UTC), plus seeded Gaussian noise of 0.5″ per coordinate (RA on the
// sky). Magnitudes follow the H-G law (H = 15.5, G = 0.15) with 0.1 mag of
// noise. Each file's header states the command and the definitions used.
//
// # The files
//
// [Observations] is arcfit's observation CSV, [Sites] its sites CSV,
// [Elements] its orbital-elements CSV and [Truth] a CSV of noise-free positions
// (at the observation times, then hourly over the following 60 nights while the
// Sun is below −6° at each site), with distances, elongation, refracted
// altitude and azimuth. [Files] lists them under the names the demo command
// writes them as.
//
// # References
//
//  1. Bowell, E., et al., "Application of photometric models to asteroids",
//     in Asteroids II, Univ. of Arizona Press (1989), 524–556 (the H-G law, as
//     given in Meeus, Astronomical Algorithms, 2nd ed., ch. 33).
//  2. IAU SOFA Board, ERFA (Essential Routines for Fundamental Astronomy),
//     through python3-erfa 2.0.0.1: epv00, gd2gc, c2t06a, atco13, utctai,
//     taitt, dtdb.
package demo
