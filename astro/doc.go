// Package astro holds the fundamentals of positional astronomy that every other
// part of arcfit stands on: time scales and Julian dates, angles and sexagesimal
// notation, coordinate frames, precession and nutation, sidereal time and the
// Earth rotation angle, the observer's site, refraction and airmass.
//
// # Units and conventions
//
// Angles are radians internally, carried as [Angle] where a bare float64 could be
// misread. Distances are astronomical units (au) unless a name says otherwise
// (heightM, radiusKm). Times are two-part Julian dates ([JD]) that carry their time
// scale explicitly; arithmetic between scales goes through the named conversions
// (UTCToTAI, TAIToTT, TTToTDB, …), never through a bare float.
// Degrees, hours, arcseconds and calendar strings exist only at the edges, in the
// parsers and formatters.
//
// Right ascension and declination are ICRS (astrometric) unless a name says "of
// date". Azimuth runs from north through east. East longitude is positive.
//
// # References
//
//  1. Meeus, J., Astronomical Algorithms, 2nd ed., Willmann-Bell, 1998.
//  2. Urban, S. E., Seidelmann, P. K. (eds.), Explanatory Supplement to the
//     Astronomical Almanac, 3rd ed., University Science Books, 2013.
//  3. IERS Conventions (2010), IERS Technical Note 36, Petit, G., Luzum, B. (eds.).
//  4. Capitaine, N., Wallace, P. T., Chapront, J., "Expressions for IAU 2000
//     precession quantities", Astron. Astrophys. 412, 567–586 (2003).
//  5. Espenak, F., Meeus, J., Five Millennium Canon of Solar Eclipses, NASA/TP-2006-214141
//     (2006), section on ΔT polynomial expressions.
//  6. Vincenty, T., "Direct and inverse solutions of geodesics on the ellipsoid",
//     Survey Review 23 (1975), 88–93 (the spherical special case for separations).
package astro
