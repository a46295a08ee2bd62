package ephem

import (
	"math"

	"arcfit/astro"

	"gonum.org/v1/gonum/spatial/r3"
)

// MoonIllumination returns the Moon's phase angle i (the angle Sun–Moon–Earth,
// 0 at full Moon, π at new Moon) and the illuminated fraction k of its disk,
// from the geocentric position vectors of the Moon and the Sun, in one frame
// and one length unit (au, say):
//
//	cos i = (−m)·(s − m) / (|m| |s − m|),   k = (1 + cos i)/2
//
// i is computed as atan2(|a×b|, a·b), which keeps its precision at new and
// full Moon. This is the vector form of Meeus' eqs. 48.2–48.3 (cos ψ from the
// two directions, tan i = R sin ψ/(Δ − R cos ψ)) with eq. 48.1 for k; it holds
// for any body lit by the Sun, not only the Moon. The vectors should be those
// of the same instant; the Sun's light time (8 min) moves i by 20″ at most.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 48, eqs.
// 48.1–48.3; example 48.a.
func MoonIllumination(moonGeo, sunGeo r3.Vec) (phaseAngle astro.Angle, fraction float64) {
	toEarth := r3.Scale(-1, moonGeo)
	toSun := r3.Sub(sunGeo, moonGeo)
	i := math.Atan2(r3.Norm(r3.Cross(toEarth, toSun)), r3.Dot(toEarth, toSun))
	return astro.Angle(i), (1 + math.Cos(i)) / 2
}

// MoonBrightLimbAngle returns χ, the position angle of the midpoint of the
// Moon's bright limb, measured from the north point of the disk through east,
// in [0, 2π):
//
//	tan χ = cos δ0 sin(α0 − α) / (sin δ0 cos δ − cos δ0 sin δ cos(α0 − α))
//
// with α, δ the Moon's and α0, δ0 the Sun's right ascension and declination,
// geocentric, in one frame (apparent of date, as in Meeus, or ICRS). It is the
// position angle of the Sun seen from the Moon's centre. The angle is from the
// north of the equator of that frame, not from the local vertical.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 48, eq. 48.5.
func MoonBrightLimbAngle(moonRA, moonDec, sunRA, sunDec astro.Angle) astro.Angle {
	sd0, cd0 := math.Sincos(float64(sunDec))
	sd, cd := math.Sincos(float64(moonDec))
	sda, cda := math.Sincos(float64(sunRA - moonRA))
	return astro.Angle(math.Atan2(cd0*sda, sd0*cd-cd0*sd*cda)).Normalized()
}
