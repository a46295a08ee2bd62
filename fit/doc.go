// Package fit fits motion models to the timed RA/Dec measurements of a moving
// object and predicts where it will be, with a search region.
//
// # The track
//
// [NewTrack] projects the observations onto the gnomonic (tangent) plane at
// the normalised mean of their unit vectors and measures time in TT days from
// the arc's mid-time. Standard coordinates ξ (east) and η (north) are in
// radians; the per-observation uncertainties, given on the sky (RA·cos δ and
// Dec), are carried into the plane with the local Jacobian of the projection.
//
// # The models
//
// Every model ([Model]) describes the geocentric track in ξ and η as a linear
// combination of basis functions of the scaled time τ = T/TimeScaleDays:
// polynomials of degree 1, 2 or 3, or a continuous piecewise-linear path built
// from the hinge basis max(0, τ − κ) with knots κ in the gaps between nights.
// The topocentric observations are modelled as the geocentric track minus
// u times the site's geocentric position projected on the plane (the diurnal
// parallax to first order), with u = 1/Δ the object's inverse geocentric
// distance in au⁻¹, fitted as one more parameter, fixed, or left out
// ([Settings]).
//
// # The fit
//
// [Fit] whitens each observation's two equations by the Cholesky factor of
// its 2×2 covariance (σ and the RA/Dec correlation), equilibrates the columns
// and solves the least-squares problem by Householder QR (gonum's mat.QR),
// never by forming and inverting the normal equations. The parameter
// covariance is R⁻¹R⁻ᵀ from the triangular factor; when χ²/dof exceeds 1 it
// is multiplied by χ²/dof and the solution says so. Outliers are rejected one
// at a time at a stated χ² threshold and every flagged observation is listed.
//
// # Prediction
//
// [Solution.Predict] evaluates the geocentric track at a time, adds the
// parallax of the requested site, projects back to ICRS RA/Dec and propagates
// the parameter covariance to a 2×2 sky covariance in RA·cos δ and Dec;
// [Prediction.Ellipse] draws it as an ellipse at a chosen σ level.
//
// # Model choice and the model error
//
// [Compare] fits the candidate models and scores each by BIC and by
// leave-one-night-out cross-validation ([CrossValidate]), whose folds are
// solved from night-by-night blocks of the full fit's QR factorisation; the
// auto rule takes the simplest model within one standard error of the
// lowest cross-validated error. Each model's predictions then carry a model
// error between nights (Solution.ModelErrorArcsec), by the rule
// Settings.ModelError names ([ModelErrorRule]):
//
//   - ModelErrorExcess (the default) adds the excess of the cross-validated
//     RMS miss over the observations' scatter. It is conservative: the
//     misses include the folds' own prediction error, which with few nights
//     is much larger than the full fit's, so right models get search
//     regions far larger than needed.
//   - ModelErrorCalibrated tests the cross-validation: the misses of the
//     nights left out, normalised by the covariance the model claims for
//     them, must have a mean square near 1. When it is significantly larger
//     (a χ² test at 1 %, with Satterthwaite's effective degrees of freedom
//     for misses correlated within and across the folds), the model error
//     that brings it to 1 is added. A bias that the folds' own uncertainty
//     hides — as with three nights, where every fold extrapolates a short
//     arc — is not detected and adds nothing.
//
// # Units
//
// Angles in radians internally, arcseconds in fields whose names say so;
// times as astro.JD with explicit scales; distances in au.
//
// # References
//
//  1. Calabretta, M. R., Greisen, E. W., "Representations of celestial
//     coordinates in FITS", Astron. Astrophys. 395 (2002), 1077–1122, §5.1.3
//     (the gnomonic projection); Smart, W. M., Textbook on Spherical
//     Astronomy, 6th ed. (1977), ch. XI (standard coordinates).
//  2. Golub, G. H., Van Loan, C. F., Matrix Computations, 4th ed. (2013),
//     §5.2 (Householder QR), §5.3 (the least-squares problem, solution by QR
//     and its sensitivity), §2.4 (the SVD and the 2-norm condition number).
//  3. Björck, Å., Numerical Methods for Least Squares Problems, SIAM (1996),
//     ch. 1 (the covariance (AᵀA)⁻¹ = R⁻¹R⁻ᵀ from the QR factor; generalised
//     least squares by whitening with the Cholesky factor of the error
//     covariance) and ch. 2 (column scaling).
//  4. Press, W. H., Teukolsky, S. A., Vetterling, W. T., Flannery, B. P.,
//     Numerical Recipes, 3rd ed. (2007), §15.4 (general linear least
//     squares), §15.6 (confidence limits, the χ² of ν = 2 degrees of freedom:
//     Δχ² = 11.8 for 99.73 %).
//  5. Bevington, P. R., Robinson, D. K., Data Reduction and Error Analysis for
//     the Physical Sciences, 3rd ed. (2003), ch. 11 (χ²/dof as a test of the
//     stated uncertainties; scaling of the covariance).
//  6. Meeus, J., Astronomical Algorithms, 2nd ed. (1998), ch. 40 (the
//     topocentric correction: parallax of the observer's geocentric position
//     divided by the distance).
//  7. Press et al. (2007), §11.1 (the Jacobi rotation of a symmetric 2×2
//     matrix, tan 2θ = 2b/(a − c)), used for the axes and orientation of the
//     error ellipse.
//  8. Hastie, T., Tibshirani, R., Friedman, J., The Elements of Statistical
//     Learning, 2nd ed. (2009), §7.10 (cross-validation and its standard
//     error); Stone, M., J. R. Stat. Soc. B 36 (1974), 111–147.
//  9. Isserlis, L., Biometrika 12 (1918), 134–139 (moments of the normal
//     distribution: the variance of a sum of squares of correlated Gaussian
//     variables); Satterthwaite, F. E., Biometrics Bulletin 2 (1946),
//     110–114 (effective degrees of freedom); Press et al. (2007), §6.2 (the
//     χ² probability function).
//  10. Higham, N. J., Accuracy and Stability of Numerical Algorithms, 2nd
//     ed. (2002), Theorem 19.4 (the columnwise backward stability of
//     Householder QR, which makes the night-by-night factorisation
//     insensitive to column scaling).
package fit
