package astro

// PrecessionAngles2006 returns the equatorial precession angles ζA, zA and θA
// of the IAU 2006 (P03) precession, from the mean equator and equinox of
// J2000.0 to the mean equator and equinox of date:
//
//	ζA = 2.650545″ + 2306.083227″ t + 0.2988499″ t² + 0.01801828″ t³
//	     − 0.000005971″ t⁴ − 0.0000003173″ t⁵
//	zA = −2.650545″ + 2306.077181″ t + 1.0927348″ t² + 0.01826837″ t³
//	     − 0.000028596″ t⁴ − 0.0000002904″ t⁵
//	θA = 2004.191903″ t − 0.4294934″ t² − 0.04182264″ t³
//	     − 0.000007089″ t⁴ − 0.0000001274″ t⁵
//
// t in Julian centuries of TT since J2000.0. (The coefficients were written
// out from the published expressions; the tests check the angles against
// ERFA's p06e and the matrix against ERFA's bp06.)
//
// Input: tt, a TT Julian date. Output: the three angles in radians.
//
// Reference: Capitaine, N., Wallace, P. T., Chapront, J., "Expressions for IAU
// 2000 precession quantities", A&A 412, 567–586 (2003), P03 solution;
// IERS Conventions (2010), ch. 5, eq. 5.40.
func PrecessionAngles2006(tt JD) (zeta, z, theta Angle) {
	t := tt.CenturiesSinceJ2000()
	zetaAs := 2.650545 + t*(2306.083227+t*(0.2988499+t*(0.01801828+t*(-0.000005971+t*(-0.0000003173)))))
	zAs := -2.650545 + t*(2306.077181+t*(1.0927348+t*(0.01826837+t*(-0.000028596+t*(-0.0000002904)))))
	thetaAs := t * (2004.191903 + t*(-0.4294934+t*(-0.04182264+t*(-0.000007089+t*(-0.0000001274)))))
	return Angle(zetaAs) * Arcsecond, Angle(zAs) * Arcsecond, Angle(thetaAs) * Arcsecond
}

// PrecessionMatrix2006 returns the IAU 2006 precession matrix P that takes
// coordinates on the mean equator and equinox of J2000.0 (the dynamical frame,
// not the ICRS: see [FrameBiasMatrix]) to the mean equator and equinox of date:
//
//	P = R3(−zA) · R2(θA) · R3(−ζA)
//
// with the angles of [PrecessionAngles2006] and the passive rotations [RotZ],
// [RotY]. P·B, B = [FrameBiasMatrix](), takes ICRS coordinates to the mean
// equator and equinox of date.
//
// Input: tt, a TT Julian date. Output: the rotation matrix.
// Accuracy: the P03 model itself is good to a few mas over 1900–2100; this
// matrix reproduces ERFA's bp06 precession part to 0.5 µas (largest element
// difference 2.4e-12; ERFA builds it from the Fukushima–Williams angles) and
// ERFA's pmat06, as P·B, to 0.8 µas (see the tests).
//
// Reference: IERS Conventions (2010), ch. 5, §5.6.4, eqs. 5.39–5.40;
// Capitaine, Wallace & Chapront (2003), A&A 412, 567; Meeus, Astronomical
// Algorithms, 2nd ed., ch. 21 (the same rotation sequence for IAU 1976).
func PrecessionMatrix2006(tt JD) Mat3 {
	zeta, z, theta := PrecessionAngles2006(tt)
	return RotZ(-z).Mul(RotY(theta)).Mul(RotZ(-zeta))
}
