package ephem

import "arcfit/astro"

// EclipticPrecession1976 returns the matrix that takes a vector from the
// ecliptic and equinox J2000 to the mean ecliptic and equinox of the date tdb,
// v_date = M · v_J2000, with the IAU 1976 precession (Lieske et al. 1977):
//
//	t = (JD − 2451545.0)/36525                       (Julian centuries, TDB or TT)
//	η = 47.0029″ t − 0.03302″ t² + 0.000060″ t³       (inclination of the ecliptic of
//	                                                   date on that of J2000)
//	Π = 174.876384° − 869.8089″ t + 0.03536″ t²       (longitude of its ascending node,
//	                                                   on the J2000 ecliptic)
//	p = 5029.0966″ t + 1.11113″ t² − 0.000006″ t³     (general precession in longitude)
//	M = R3(−(Π + p)) · R1(η) · R3(Π)
//
// which is Meeus' eq. 21.7 in matrix form with the rotations of [astro.RotX].
// The date is TDB; TT gives the same matrix to far better than a microarcsecond.
// Within 1900–2100 the matrix agrees with ERFA's IAU 1976 equatorial precession
// carried to the ecliptic (pmat76 with obl80) to 0.1 mas; the polynomials are
// meant for some centuries around J2000, and the two forms drift apart to
// 0.05″ at AD 1000 and 0.16″ at AD 3000 (measured; see the package tests).
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 21, eq. 21.5 (with
// T = 0) and 21.7; Lieske, J. H., et al., "Expressions for the precession
// quantities based upon the IAU (1976) system of astronomical constants",
// Astron. Astrophys. 58, 1–16 (1977).
func EclipticPrecession1976(tdb astro.JD) astro.Mat3 {
	t := tdb.CenturiesSinceJ2000()
	eta := astro.Angle((47.0029+(-0.03302+0.000060*t)*t)*t) * astro.Arcsecond
	pi := 174.876384*astro.Degree + astro.Angle((-869.8089+0.03536*t)*t)*astro.Arcsecond
	p := astro.Angle((5029.0966+(1.11113-0.000006*t)*t)*t) * astro.Arcsecond
	return astro.RotZ(-(pi + p)).Mul(astro.RotX(eta)).Mul(astro.RotZ(pi))
}
