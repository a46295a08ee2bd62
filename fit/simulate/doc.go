// Package simulate makes synthetic observations of a moving object: the
// timed astrometric positions an observer would measure from chosen sites on
// chosen nights, at a chosen cadence, with seeded Gaussian noise, written in
// arcfit's observation CSV. It is the library behind `arcfit simulate`:
// teachers use it to show how arc length, cadence and measurement error shape
// a search region; observers to see how much one more night would shrink a
// region before they spend it.
//
// # What is simulated
//
// The object is a [plan.Target]: a published element set
// (plan.ElementsTarget, whose noise-free place is ephem.PlaceOfElements:
// two-body motion, light time, the astrometric ICRS place seen from the site)
// or a saved fit (fit.SavedFit, whose place is its Predict: an orbit, or a
// sky-plane model extrapolated from its arc — the model's path, not
// necessarily the object's, beyond the fit's validity horizon).
//
// For every night and site, the night's plan ([plan.Night]) gives the
// windows in which the Sun's centre is below −18° (astronomical darkness)
// and the object stands at least the altitude limit high (refracted for
// 10 °C and 1010 hPa). The night's Config.PerNight observations are spaced by
// Config.Cadence and centred on the best time (the object's highest altitude
// in the windows), moved to lie within the window holding it (less a second
// at each end, the precision of its ends); those that would fall beyond its
// end are not made. Times fall on whole UTC seconds.
// Each time is checked again before it is used: the Sun's geometric altitude
// at most −18° (ephem.PlaceOfBody) and the object's refracted altitude at
// least the limit (fit.PointingOf); a time that fails is dropped.
//
// # The noise
//
// Each position is offset from the noise-free place by independent Gaussian
// deviates of standard deviation Config.SigmaArcsec in the two standard
// coordinates of the tangent plane at that place, ξ (east, RA·cos δ) and η
// (north, Dec); within 1° of the tangent point they are the offsets on the
// sky to 1 part in 10⁴. The magnitude, when the object has one, gets a
// deviate of Config.MagSigma. The deviates come from Box–Muller pairs of
// uniform deviates of math/rand/v2's PCG generator (128-bit state, DXSM
// output), seeded with Config.Seed and a stream constant for positions and
// another for magnitudes: the same seed gives the same observations, and a
// magnitude noise does not change the positions. Noise is drawn in the order
// nights, then sites, then times, after all the noise-free places are known,
// so it does not depend on the number of workers.
//
// # The file
//
// [Result.WriteCSV] writes design.md's observation CSV (time, ra_deg,
// dec_deg, sigma, site, and mag and band when magnitudes are known) under a
// '#' comment header that says the observations are synthetic and gives the
// object, the sites, the nights, the cadence, the noise and the seed.
// Positions are written to 1e-9° (3.6 µas) and times to the second; the
// Sample values are the written ones, so that astro/obs reads back exactly
// the numbers of Result.Samples.
//
// # References
//
//  1. Box, G. E. P., Muller, M. E., "A note on the generation of random normal
//     deviates", Annals of Mathematical Statistics 29 (1958), 610–611.
//  2. O'Neill, M. E., "PCG: a family of simple fast space-efficient
//     statistically good algorithms for random number generation", Harvey
//     Mudd College, HMC-CS-2014-0905 (2014).
//  3. Calabretta, M. R., Greisen, E. W., "Representations of celestial
//     coordinates in FITS", A&A 395 (2002), 1077, §5.1.3 (the gnomonic
//     projection).
//  4. Explanatory Supplement to the Astronomical Almanac (1992), §9.33
//     (astronomical twilight: the Sun's centre 18° below the horizon).
package simulate
