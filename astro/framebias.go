package astro

// Frame-bias constants of the IAU 2006 system: the offsets of the mean pole and
// equinox of J2000.0 (the dynamical frame) from the ICRS axes. IERS
// Conventions (2010), §5.5.4, eq. 5.33 (values in arcseconds).
const (
	frameBiasXi0Arcsec     = -0.0166170 // ξ0, pole offset in x
	frameBiasEta0Arcsec    = -0.0068192 // η0, pole offset in y
	frameBiasDAlpha0Arcsec = -0.01460   // dα0, offset of the equinox in right ascension
)

// FrameBiasMatrix returns the frame-bias matrix B that takes coordinates in the
// ICRS (GCRS) axes to the mean equator and equinox of J2000.0 (the dynamical
// J2000 frame of the IAU 2006 precession):
//
//	B = R1(−η0) · R2(ξ0) · R3(dα0),
//	ξ0 = −0.0166170″, η0 = −0.0068192″, dα0 = −0.01460″,
//
// with the passive rotations [RotX], [RotY], [RotZ].
//
// Accuracy: the rotation is about 23 mas; B agrees with the bias that ERFA's
// bp06 derives from the Fukushima–Williams angles at J2000.0 to 0.3 µas
// (see the tests).
//
// Reference: IERS Conventions (2010), IERS Technical Note 36, §5.5.4, eq. 5.33.
func FrameBiasMatrix() Mat3 {
	return RotX(-frameBiasEta0Arcsec * Arcsecond).
		Mul(RotY(frameBiasXi0Arcsec * Arcsecond)).
		Mul(RotZ(frameBiasDAlpha0Arcsec * Arcsecond))
}
