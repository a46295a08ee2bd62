// Package nbody integrates heliocentric orbits of small bodies (asteroids,
// comets) under the gravity of the Sun and the planets: the perturbed-orbit
// propagator of the orbit fit, its covariance and its Monte Carlo.
//
// # Frame, units, time
//
// States are heliocentric (the Sun's centre), in ICRS axes, in au and
// au/day; times are TDB Julian dates (TT is accepted and read as TDB: the two
// differ by less than 2 ms). The object is massless.
//
// # Force model
//
// The Sun and nine bodies as point masses: Mercury, Venus, the Earth, the
// Moon, and the Mars, Jupiter, Saturn, Uranus and Neptune systems (planet and
// satellites, at their barycentres, as VSOP87 gives them), with the indirect
// term of the heliocentric frame (the Sun's own acceleration by each body):
//
//	r̈ = −GM☉ r/r³ + Σ_j GM_j [ (r_j − r)/|r_j − r|³ − r_j/r_j³ ]
//
// (Danby, Fundamentals of Celestial Mechanics, 2nd ed. (1988), §9.1).
//
// Masses: the header constants of the JPL development ephemeris DE405
// (Standish, E. M., "JPL Planetary and Lunar Ephemerides, DE405/LE405", JPL
// IOM 312.F-98-048, 1998), GM1, GM2, GM4 … GM8 and, for the Earth and the
// Moon, GMB·EMRAT/(1 + EMRAT) and GMB/(1 + EMRAT); masses.go is generated
// from Debian's casacore-data-jpl-de405 table keywords by
// testdata/gen/nbody_masses.py. The Sun's GM is ephem.GMSun = k² (k the
// Gaussian constant 0.01720209895), so that with the planets left out
// ([Options.Omit]) the integration is exactly the two-body motion of package
// ephem; DE405's GMS equals k² to 2e-16 (relative), its au being defined so.
//
// Positions of the bodies: the Earth and the planets from VSOP87
// (ephem.HeliocentricICRS, the Earth itself, not the Earth–Moon
// barycentre); the Moon as the Earth plus Meeus' geocentric Moon
// (ephem.MoonGeocentricICRS, km turned to au; evaluated at the TT instant
// numerically equal to the TDB one, which moves the Moon by less than 3 m).
// Evaluating VSOP87 at every force evaluation would be far too slow, so each
// body is interpolated by Chebyshev series over fixed time segments (8 to 64
// days, 12 to 18 coefficients per coordinate: planets.go), fitted at the
// Chebyshev nodes of each segment, filled when first needed and kept for the
// whole process (about 0.4 kB per segment; a year of all nine bodies is
// about 140 segments). The cache is safe for concurrent use and deterministic: a
// segment's coefficients depend only on the body and the segment. Measured
// against direct evaluation at 300 random instants 1900–2100: 3e-12 au at
// worst (TestPlanetCacheAgainstDirect), far below VSOP87's own errors
// (against DE405 the Earth is within 1.5e-7 au; see package ephem).
//
// # Integrator
//
// Gragg–Bulirsch–Stoer extrapolation for second-order equations: Störmer's
// rule on n = 2, 4, 6, … substeps, extrapolated in h² by the Aitken–Neville
// tableau, with the order and step-size control of Hairer, Nørsett & Wanner,
// Solving Ordinary Differential Equations I, 2nd ed. (1993), §II.14 and §II.9
// (gbs.go). The step is also bounded by 16 days (maxStepDays: the indirect
// term makes the force oscillate with Mercury's period, which the
// asymptotic error estimate misjudges on longer steps). Every requested
// instant is the end of a step, so the states carry no interpolation error.
// With [Options.STM] the variational equations Φ̈r = G Φr, G the gravity
// gradient of the Sun and the bodies (the indirect term does not depend on
// the object's state), are integrated on the same steps; the step control
// looks at the state only, so the states do not change when the STM is
// asked for.
//
// # Close approaches
//
// At every step the distance to each body and its rate are checked; a
// minimum inside a step is refined as the root of ρ·ρ̇ (regula falsi on
// re-integrated sub-steps, as accurate as the step). Passages within
// [EarthApproachAU] of the Earth or inside a body's Hill sphere a(m/3M)^(1/3)
// (a the mean distance: Meeus, Astronomical Algorithms, 2nd ed., table 31.a;
// for the Moon its distance from the Earth, M the Earth's mass) are listed
// in [Result.Encounters]. The step control keeps the accuracy through them
// (an invented fly-by at 0.01 au: 1e-12 au from the tightest tolerance after
// a year, reversible to 2e-13 au). An object that enters the Earth, the
// Moon, Mercury, Venus or Mars (radii from the DE405 header) stops the
// integration with [ErrImpact]; one whose step size collapses, with
// [ErrTolerance].
//
// # What is neglected, and how much it matters
//
// Sizes after one year for the invented test orbits (main belt a = 2.71 au;
// Jupiter-family comet q = 1.35 au; a near-Earth object with a 0.01 au
// Earth fly-by; e = 0.97, q = 0.09 au), measured by TestNeglectSizes unless
// said otherwise:
//
//   - General relativity (the Sun's Schwarzschild term, as the
//     velocity-independent force with the same perihelion advance):
//     5e-8 au (main belt), 2e-7 au (comet), 3e-7 au (NEO), 4.5e-6 au (q =
//     0.09 au). At 1 au from the Earth 1e-7 au is 0.02″.
//   - Pluto: 1e-11 to 2e-11 au.
//   - The asteroids (1) Ceres, (2) Pallas, (4) Vesta (DE405 masses) on
//     approximate orbits, none close to the test orbits: 1e-9 to 3e-9 au. A
//     close approach to one of them, which this model cannot see, matters
//     more: Ceres passed at 0.01 au and 5 km/s changes the velocity by
//     2GM/(b·v) ≈ 1e-8 au/day, some 3e-6 au after a year (estimate).
//   - Non-gravitational forces, not modelled: for an active comet the
//     outgassing acceleration at 1 au is typically 1e-8 to 1e-9 au/day²
//     (the radial and transverse parameters A1, A2 of Marsden, Sekanina &
//     Yeomans, Astron. J. 78, 211 (1973); typical values from memory),
//     which moves the position by 1e-5 to 1e-4 au in a year — the dominant
//     error for comets; the Yarkovsky effect on a kilometre-sized asteroid,
//     a transverse acceleration of order 1e-14 au/day² (from memory), about
//     1e-9 au in a year; radiation pressure on a body of 100 m or more, a
//     fraction β < 3e-12 of the Sun's pull (β ≈ 5.7e-4/(ρ s), ρ in g/cm³, s
//     the radius in µm: Burns, Lamy & Soter, Icarus 40, 1 (1979); from
//     memory), negligible.
//   - The planets' positions: VSOP87 against DE405 (package ephem: the
//     Earth within 1.5e-7 au, the outer planets within some 1e-6 au), which
//     matters only near an encounter: against a reference integrated with
//     the DE405 bodies (reference_test.go) the comet that passes Jupiter at
//     0.31 au differs by 1.4e-6 au after a year, the NEO by 6e-8 au, the
//     main-belt orbit by 6e-10 au.
//   - The Sun's oblateness (DE405's J2SUN = 2e-7) and the planets'
//     figures: below the relativity term by orders of magnitude outside a
//     few solar radii (estimate from the size of J2·(R☉/r)²).
//
// # Speed
//
// Benchmarks (go test -bench . -run '^$' ./ephem/nbody/) on the project's
// 2-core machine: see BenchmarkPropagateYear (one orbit one year, warm and
// cold cache), BenchmarkPropagateArc200 (the STM at 200 instants) and
// BenchmarkMonteCarlo1000 (1,000 orbits, 90 days, in parallel).
//
// References:
//
//  1. Hairer, E., Nørsett, S. P., Wanner, G., Solving Ordinary Differential
//     Equations I: Nonstiff Problems, 2nd ed., Springer (1993), §II.9 and
//     §II.14.
//  2. Standish, E. M., JPL Planetary and Lunar Ephemerides, DE405/LE405,
//     JPL IOM 312.F-98-048 (1998).
//  3. Danby, J. M. A., Fundamentals of Celestial Mechanics, 2nd ed. (1988).
//  4. Bretagnon, P., Francou, G., Astron. Astrophys. 202, 309 (1988)
//     (VSOP87); Meeus, J., Astronomical Algorithms, 2nd ed. (1998), ch. 31,
//     32, 47.
//  5. Press, W. H., et al., Numerical Recipes, 3rd ed. (2007), §5.8
//     (Chebyshev approximation).
package nbody
