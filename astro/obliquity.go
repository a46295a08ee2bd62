package astro

// MeanObliquity2006 returns the mean obliquity of the ecliptic of date, εA, of
// the IAU 2006 precession theory: the angle between the mean equator of date
// and the ecliptic of date,
//
//	εA = 84381.406″ − 46.836769″ t − 0.0001831″ t² + 0.00200340″ t³
//	     − 0.000000576″ t⁴ − 0.0000000434″ t⁵,
//
// t in Julian centuries of TT since J2000.0.
//
// Input: tt, a TT Julian date (TDB gives the same result to far below 1 µas).
// Output: εA in radians.
// Accuracy: the polynomial is the IAU 2006 definition; it reproduces ERFA's
// obl06 to machine precision over 1900–2100 (see the tests).
//
// Reference: Hilton, J. L., et al., "Report of the IAU Division I Working Group
// on Precession and the Ecliptic", Celest. Mech. Dyn. Astr. 94, 351–367 (2006);
// IERS Conventions (2010), ch. 5, eq. 5.40; Capitaine, Wallace & Chapront (2003),
// A&A 412, 567 (P03 solution).
func MeanObliquity2006(tt JD) Angle {
	t := tt.CenturiesSinceJ2000()
	as := 84381.406 + t*(-46.836769+t*(-0.0001831+t*(0.00200340+t*(-0.000000576+t*(-0.0000000434)))))
	return Angle(as) * Arcsecond
}

// MeanObliquity1980 returns the mean obliquity of the ecliptic of date of the
// IAU 1976/1980 system (Lieske et al. 1977),
//
//	ε0 = 23°26′21.448″ − 46.8150″ T − 0.00059″ T² + 0.001813″ T³,
//
// T in Julian centuries of TT since J2000.0. Use it with Meeus' worked
// examples and with [PrecessionMatrix1976]; arcfit's own frames use
// [MeanObliquity2006], which is 0.042″ smaller at J2000.0.
//
// Input: tt, a TT Julian date. Output: ε0 in radians.
// Accuracy: Meeus gives 0.01″ over 2000 years (1″ over 4000 years) about J2000.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 22, eq. 22.2;
// Lieske, J. H., et al., A&A 58, 1–16 (1977).
func MeanObliquity1980(tt JD) Angle {
	t := tt.CenturiesSinceJ2000()
	as := 84381.448 + t*(-46.8150+t*(-0.00059+t*0.001813))
	return Angle(as) * Arcsecond
}

// TrueObliquity returns the true obliquity of date, the angle between the true
// equator of date and the ecliptic of date:
//
//	ε = εA + Δε,
//
// with εA from [MeanObliquity2006] (IAU 2006) and Δε from [Nutation1980]
// (IAU 1980 series). It is the obliquity that [NutationMatrix] rotates by.
// Meeus' ε (ch. 22) uses ε0 of IAU 1980 instead; the two differ by
// 0.042″ + 0.0218″·T.
//
// Input: tt, a TT Julian date. Output: ε in radians.
// Accuracy: that of Δε, a few mas against IAU 2000A nutation.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed., ch. 22 (ε = ε0 + Δε);
// IERS Conventions (2010), ch. 5, eq. 5.40 (εA).
func TrueObliquity(tt JD) Angle {
	_, deps := Nutation1980(tt)
	return MeanObliquity2006(tt) + deps
}
