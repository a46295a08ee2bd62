package astro

// PrecessionAngles1976 returns the equatorial precession angles ζ, z and θ of
// the IAU 1976 precession (Lieske et al. 1977) from the mean equator and
// equinox of J2000.0 to those of date, in the form Meeus gives for a start
// epoch of J2000.0:
//
//	ζ = 2306.2181″ t + 0.30188″ t² + 0.017998″ t³
//	z = 2306.2181″ t + 1.09468″ t² + 0.018203″ t³
//	θ = 2004.3109″ t − 0.42665″ t² − 0.041833″ t³
//
// t in Julian centuries of TT since J2000.0. It exists for Meeus' worked
// examples and for comparison; arcfit's frames use [PrecessionAngles2006].
//
// Input: tt, a TT Julian date. Output: the three angles in radians.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 21, eqs. 21.2–21.4
// with T = 0; Lieske, J. H., et al., A&A 58, 1–16 (1977).
func PrecessionAngles1976(tt JD) (zeta, z, theta Angle) {
	t := tt.CenturiesSinceJ2000()
	zetaAs := t * (2306.2181 + t*(0.30188+t*0.017998))
	zAs := t * (2306.2181 + t*(1.09468+t*0.018203))
	thetaAs := t * (2004.3109 + t*(-0.42665+t*(-0.041833)))
	return Angle(zetaAs) * Arcsecond, Angle(zAs) * Arcsecond, Angle(thetaAs) * Arcsecond
}

// PrecessionMatrix1976 returns the IAU 1976 precession matrix from the mean
// equator and equinox of J2000.0 (FK5) to the mean equator and equinox of date,
//
//	P = R3(−z) · R2(θ) · R3(−ζ),
//
// with the angles of [PrecessionAngles1976]. This is Meeus' rigorous method
// (eqs. 21.4) written as a rotation.
//
// Input: tt, a TT Julian date. Output: the rotation matrix.
// Accuracy: IAU 1976 precession departs from IAU 2006 by about 0.3″ per
// century in longitude; reproduces Meeus 21.b to 1 ms / 0.01″.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 21, eqs. 21.3–21.4.
func PrecessionMatrix1976(tt JD) Mat3 {
	zeta, z, theta := PrecessionAngles1976(tt)
	return RotZ(-z).Mul(RotY(theta)).Mul(RotZ(-zeta))
}
