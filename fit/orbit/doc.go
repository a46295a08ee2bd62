// Package orbit determines a heliocentric two-body orbit from timed
// astrometric RA/Dec observations: an initial orbit (Gauss's method, or a
// systematic search over the topocentric distance for arcs too short for it),
// its differential correction by weighted least squares against every
// observation, the covariance of the solution, and predictions with search
// regions by linear propagation or Monte Carlo sampling.
//
// # Frames and units
//
// Orbits are states at an epoch: heliocentric position (au) and velocity
// (au/day) in ICRS axes at a TDB instant ([State]), moved by two-body motion
// about the Sun with GM = k² (ephem.GMSun, Gaussian gravitational constant).
// Elements are printed in the ecliptic and equinox J2000
// (ephem.ICRSToEclipticJ2000).
//
// # Observations
//
// Each [Observation] carries the observer's heliocentric geometry computed
// once ([ephem.ObserverGeometryAt]: the Earth's VSOP87 position plus the
// site's GCRS vector, UTC → TT → TDB), so that a trial orbit costs one
// two-body propagation per observation and light-time step. The computed
// place of an orbit for an observation ([State.Observe]) is the astrometric
// ICRS direction of the body's light-time-retarded position from the
// observer, as [ephem.TopocentricAstrometricDirection] forms it: what an
// observer measures against a star catalogue.
//
// # Residuals
//
// An observed place is compared with the computed one on the tangent plane
// at the computed direction ([Residual]): ΔE along the local east (Δα cos δ)
// and ΔN along the local north (Δδ), in radians, exact at the poles and
// across 0h.
package orbit
