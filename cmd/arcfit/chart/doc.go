// Package chart draws arcfit's charts with gonum/plot and writes them as PNG
// or SVG: the search region on the sky and the altitude through the night
// (the night command), the residuals of a fit, and the growth of each
// model's uncertainty beyond the arc (for teaching).
//
// Every chart is a [Figure] of one or more panels; [Figure.Encode] renders it
// to PNG (96 dots per inch) or SVG (fonts embedded) bytes and [Save] writes it
// to a file whose extension names the format (.png or .svg), through a
// temporary file in the same directory renamed into place, so that a failed
// write leaves no partial file.
//
// The charts and their builders:
//
//   - [NightFigure]: one image of two panels for a night plan, the search
//     region ([SkyRegion]) beside the altitudes ([Altitude], sampled by
//     [SampleNight]); [NightSkyFigure] the altitudes alone, without a target;
//   - [ResidualsFigure]: a fit's residuals ([ComparisonResiduals]);
//   - [GrowthFigure]: each model's 3-σ region and offset beyond the arc
//     ([ComparisonGrowth]).
//
// # Conventions
//
//   - The sky is drawn as it is seen looking up: north up and east to the
//     left. Offsets are on the tangent plane at the predicted position, in
//     RA·cos δ (east positive) and Dec, in arcseconds or arcminutes as the
//     axis label says, with the same scale on both axes.
//   - Times are UTC; the altitude chart labels each hour in UTC and, below
//     it, in the night's local time; the residual chart's time axis is
//     broken between nights, each night in hours, the time between them
//     written in the break.
//   - Search ellipses are drawn at 1, 2 and 3 σ; the probability that a
//     two-dimensional Gaussian error falls inside the k-σ ellipse is
//     1 − exp(−k²/2): 39.3 %, 86.5 %, 98.9 % (Press et al., Numerical Recipes,
//     3rd ed. (2007), §15.6.5).
//   - Altitudes are refracted (10 °C, 1010 hPa), as fit.PointingOf gives them.
//
// The charts compute nothing the library does not: positions, covariances,
// windows and twilights come from fit, fit/plan and ephem. Only the sampling
// of the altitude curves through the night and of the predictions beyond the
// arc is done here.
package chart
