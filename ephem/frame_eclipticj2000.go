package ephem

import "arcfit/astro"

// ObliquityJ2000 is the obliquity of the ecliptic at J2000 used for the
// ecliptic and equinox J2000, 84381.448″ = 23°26′21.448″: the IAU 1976 value
// (Lieske et al. 1977; Meeus, Astronomical Algorithms, 2nd ed., ch. 22, eq. 22.2
// at T = 0), the one VSOP87 and orbital elements referred to J2000 use. IAU
// 2006 uses 84381.406″; the difference moves a point by up to 0.042″.
const ObliquityJ2000 astro.Angle = 84381.448 * astro.Arcsecond

// EclipticJ2000ToICRS takes a vector from the ecliptic and equinox J2000 to
// ICRS (equatorial) axes, v_ICRS = M · v_ecl:
//
//	M = R1(−ε0),   ε0 = 84381.448″
//
// (Meeus, Astronomical Algorithms, 2nd ed., ch. 13, eq. 13.3–13.4 in matrix
// form, with the passive rotation of [astro.RotX]). The ecliptic J2000 is taken
// as the ICRS equator turned by ε0 about the ICRS x axis, the common practice for
// orbital elements referred to the ICRS (from memory); no frame bias is applied.
// VSOP87's own ecliptic differs from this one by about 0.1″ (see
// [HeliocentricICRS], which corrects for it).
//
// Reference: Meeus, ch. 13; Lieske et al. (1977) for ε0.
var EclipticJ2000ToICRS = astro.RotX(-ObliquityJ2000)

// ICRSToEclipticJ2000 is the inverse (the transpose) of [EclipticJ2000ToICRS]:
// v_ecl = R1(ε0) · v_ICRS.
//
// Reference: as [EclipticJ2000ToICRS].
var ICRSToEclipticJ2000 = astro.RotX(ObliquityJ2000)
