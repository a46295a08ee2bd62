// Package orbit determines a heliocentric orbit (two-body, or perturbed by
// the planets) from timed astrometric RA/Dec observations: an initial orbit
// (Gauss's method, or a
// systematic search over the topocentric distance for arcs too short for it),
// its differential correction by weighted least squares against every
// observation, the covariance of the solution, and predictions with search
// regions by linear propagation or Monte Carlo sampling.
//
// # Frames and units
//
// Orbits are states at an epoch: heliocentric position (au) and velocity
// (au/day) in ICRS axes at a TDB instant ([State]), moved by two-body motion
// about the Sun with GM = k² (ephem.GMSun, Gaussian gravitational constant)
// or, when the State carries a [Motion], by that force model: [NBody], the
// Sun, the planets and the Moon integrated by package ephem/nbody, the state
// then osculating at the epoch. Elements are printed in the ecliptic and
// equinox J2000 (ephem.ICRSToEclipticJ2000).
//
// # Dynamics
//
// Two-body motion (a nil Motion) propagates from the epoch for every place.
// A Motion is integrated once per parameter vector to every instant a
// computation needs ([State.Propagate], a [Path]): the residuals of an arc,
// the instants of a prediction, each sampled orbit; the light time is then a
// short two-body step from the state integrated at the observation instant
// (what that neglects: [Path]). The differential correction's Jacobian comes
// from the state transition matrix of the same integration
// ([corrector.jacobianSTM]), the prediction's covariance from Φ·Cov·Φᵀ
// ([Solution.MovedTo]), and the Monte Carlo orbits are integrated in
// parallel ([OrbitSamples.PredictAll], [OrbitSamples.Propagated]).
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
