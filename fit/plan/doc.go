// Package plan says where and when to point at one moving target on one
// night at one site: the night plan behind `arcfit night OBS|FIT|--elements`.
//
// A target is anything that predicts ([Target]): a saved sky-plane fit
// (fit.SavedFit), a published element set ([ElementsTarget]), and any later
// solution with the same Predict method. [Night] joins the target's
// predictions with the night's sky of ephem.NightAt:
//
//   - the window: the parts of the astronomical dark window (the Sun's centre
//     below −18°) in which the target stands at least Options.MinAlt high
//     (refracted altitude for 10 °C and 1010 hPa, as fit.PointingOf gives
//     it), found by sampling every 5 minutes, refining every local extremum
//     of the samples by golden-section search and every crossing of the
//     limit by bisection, to about a second;
//   - the best time: the highest altitude within the window;
//   - at the best time: where to point (astrometric ICRS and apparent of
//     date), the search region at Options.Sigma, the rate of motion, the
//     predicted magnitude, the Moon's separation, altitude and illumination;
//   - a table of rows at Options.Step across the dark window, each marked
//     whether it lies in the target's window;
//   - when the target cannot be observed, the reason ([Reason]) in plain
//     words and the next nights on which it can (up to Options.NextNights,
//     searched over up to Options.SearchNights nights);
//   - the cautions of design.md: the Sun within 15° (no rows unless
//     Options.AllowNearSun), a prediction beyond the fit's validity
//     horizon, a search region wider than the field of view.
//
// # Units and scales
//
// Angles are astro.Angle (radians); instants are UTC astro.JD; durations of
// options are time.Duration; local times are those of the NightSky's
// Location (the site's local mean solar time unless one is given).
//
// # Accuracy
//
// Against an independent computation with python3-astropy 5.2.1 and a numpy
// two-body solver for invented element sets at three invented sites
// (testdata/night_windows.txt, made by testdata/gen/night_windows.py) the
// window ends and best times agree within a few seconds (see
// window_reference_test.go for the measured worst cases); the issue's
// tolerance is 2 minutes. Real refraction near the altitude limit, not
// modelled beyond standard air, shifts a window end by more than that.
//
// # References
//
//  1. Press, W. H., Teukolsky, S. A., Vetterling, W. T., Flannery, B. P.,
//     Numerical Recipes, 3rd ed. (2007), §9.1 (bracketing and bisection),
//     §10.2 (golden-section search).
//  2. Meeus, J., Astronomical Algorithms, 2nd ed. (1998), ch. 13 (horizontal
//     coordinates), ch. 16 (refraction), ch. 48 (the Moon's illuminated
//     fraction).
//  3. Explanatory Supplement to the Astronomical Almanac (1992), §9.33
//     (twilight: the Sun 18° below the horizon for astronomical darkness).
//  4. Kasten, F., Young, A. T., "Revised optical air mass tables and
//     approximation formula", Applied Optics 28 (1989), 4735–4738 (the
//     airmass).
package plan
