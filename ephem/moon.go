package ephem

import (
	"math"

	"arcfit/astro"

	"gonum.org/v1/gonum/spatial/r3"
)

// moon47Term is one row of Meeus' Table 47.A or 47.B: the multipliers of the
// arguments D, M, M′, F, and the coefficients of sin(arg) (s, in 1e-6 degree;
// Σl or Σb) and of cos(arg) (c, in 1e-3 km; Σr, zero in Table 47.B). The rows
// are generated into moon_table.go.
type moon47Term struct {
	d, m, mp, f int8
	s, c        float64
}

// moon47Addend is one of the additive terms of Σl and Σb (Meeus p. 338):
// coef·sin(a1·A1 + a2·A2 + a3·A3 + lp·L′ + mp·M′ + f·F), coef in 1e-6 degree.
type moon47Addend struct {
	coef                  float64
	a1, a2, a3, lp, mp, f int8
}

// horner evaluates the polynomial c[0] + c[1] t + c[2] t² + … .
func horner(c []float64, t float64) float64 {
	s := 0.0
	for i := len(c) - 1; i >= 0; i-- {
		s = s*t + c[i]
	}
	return s
}

// degToRad reduces an angle in degrees to [0, 360) before converting it, so
// that large arguments keep their precision.
func degToRad(deg float64) float64 {
	return math.Mod(deg, 360) * (math.Pi / 180)
}

// moonLightTimeLon is the constant part of the light-time effect that Meeus'
// mean longitude L′ contains: the Moon's mean motion in longitude (the T
// coefficient of eq. 47.1) times the light time over the mean distance,
// 385000.56 km / c = 1.2842 s. It comes to 0.705″. Adding it to Meeus' λ gives
// the geometric longitude.
var moonLightTimeLon = astro.Angle(moon47MeanLongitude[1]/(astro.DaysPerJulianCentury*astro.SecondsPerDay)*
	moon47MeanDistanceKm/astro.SpeedOfLightKmS) * astro.Degree

// moon47Parts holds the intermediate quantities of Meeus' ch. 47 at one
// instant: the arguments (radians, reduced), E, and the sums Σl, Σb (1e-6
// degree) and Σr (1e-3 km), the additive terms included.
type moon47Parts struct {
	lp, d, m, mp, f float64
	a               [3]float64
	e               float64
	sl, sb, sr      float64
}

// moon47Evaluate evaluates Meeus' ch. 47 series at T Julian centuries of TT
// from J2000.
func moon47Evaluate(t float64) moon47Parts {
	var p moon47Parts
	p.lp = degToRad(horner(moon47MeanLongitude[:], t))
	p.d = degToRad(horner(moon47Elongation[:], t))
	p.m = degToRad(horner(moon47SunAnomaly[:], t))
	p.mp = degToRad(horner(moon47MoonAnomaly[:], t))
	p.f = degToRad(horner(moon47ArgLatitude[:], t))
	p.e = horner(moon47Eccentricity[:], t)
	for i, c := range moon47A {
		p.a[i] = degToRad(c[0] + c[1]*t)
	}
	eFactor := [3]float64{1, p.e, p.e * p.e}
	for _, r := range moon47LonDist {
		arg := float64(r.d)*p.d + float64(r.m)*p.m + float64(r.mp)*p.mp + float64(r.f)*p.f
		s, c := math.Sincos(arg)
		k := eFactor[abs8(r.m)]
		p.sl += r.s * k * s
		p.sr += r.c * k * c
	}
	for _, r := range moon47Lat {
		arg := float64(r.d)*p.d + float64(r.m)*p.m + float64(r.mp)*p.mp + float64(r.f)*p.f
		p.sb += r.s * eFactor[abs8(r.m)] * math.Sin(arg)
	}
	add := func(x moon47Addend) float64 {
		arg := float64(x.a1)*p.a[0] + float64(x.a2)*p.a[1] + float64(x.a3)*p.a[2] +
			float64(x.lp)*p.lp + float64(x.mp)*p.mp + float64(x.f)*p.f
		return x.coef * math.Sin(arg)
	}
	for _, x := range moon47AddLon {
		p.sl += add(x)
	}
	for _, x := range moon47AddLat {
		p.sb += add(x)
	}
	return p
}

// moonMeeus47 evaluates Meeus' ch. 47 series as published at T Julian
// centuries of TT from J2000: longitude and latitude on the mean ecliptic and
// equinox of date, with the light time included in L′, and the distance in km.
func moonMeeus47(t float64) (lon, lat astro.Angle, distKm float64) {
	p := moon47Evaluate(t)
	lon = (astro.Angle(p.lp) + astro.Angle(p.sl*1e-6)*astro.Degree).Normalized()
	lat = astro.Angle(p.sb*1e-6) * astro.Degree
	return lon, lat, moon47MeanDistanceKm + p.sr*1e-3
}

func abs8(x int8) int8 {
	if x < 0 {
		return -x
	}
	return x
}

// MoonEclipticOfDate returns the geometric geocentric position of the Moon's
// centre at the instant tt: ecliptic longitude lon in [0, 2π) and latitude lat,
// referred to the mean ecliptic and mean equinox of date (no nutation), and
// the distance from the centre of the Earth in km.
//
// The series is Meeus' abridgement of ELP-2000/82 (Tables 47.A and 47.B, 60
// terms each, with eqs. 47.1–47.6 and the additive terms of p. 338):
//
//	λ = L′ + Σl·1e-6°,  β = Σb·1e-6°,  Δ = 385000.56 km + Σr·1e-3 km,
//
// the terms with M multiplied by E (|M| = 1) or E² (|M| = 2). Meeus' L′ holds
// the constant part of the light-time effect, so his λ is the direction the
// Moon is seen in, 1.28 s late; this function removes it to give the
// geometric position, adding the Moon's mean motion times the mean light time
// (0.705″; the light time's 1.3 % variation over the orbit, 0.01″, stays).
//
// Input: tt, a TT Julian date (TDB gives the same result to far better than
// the accuracy; UT does not: the Moon moves 0.5″ per second).
// Accuracy: Meeus' 60+60 terms give about 10″ in λ and 4″ in β (Meeus, p. 337);
// against the fuller ELP/MPP02 the series is off by 2.9″ RMS, 18″ at worst
// (ERFA's notes on its own implementation of the same series).
// Against ERFA's moon98, the same series, over 300 dates 1900–2100: 0.039″ in
// λ (a constant: moon98's light-time constant is 0.74″, this one 0.705″),
// 0.0002″ in β, 4 mm in distance (TestMoonERFA).
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 47, eqs.
// 47.1–47.6, Tables 47.A, 47.B; Chapront-Touzé, M., Chapront, J., "The lunar
// ephemeris ELP 2000", Astron. Astrophys. 124, 50–62 (1983).
func MoonEclipticOfDate(tt astro.JD) (lon, lat astro.Angle, distKm float64) {
	lon, lat, distKm = moonMeeus47(tt.CenturiesSinceJ2000())
	return (lon + moonLightTimeLon).Normalized(), lat, distKm
}

// MoonApparentEclipticOfDate returns the Moon's apparent geocentric ecliptic
// position at tt: longitude on the true equinox of date (the mean equinox
// plus the nutation in longitude Δψ of [astro.Nutation1980]), latitude, and
// distance in km, the direction being that in which the Moon is seen, light
// time included, as Meeus computes it:
//
//	λ_app = λ(Meeus) + Δψ
//
// λ(Meeus) keeps Meeus' mean longitude with its constant light-time term (see
// [MoonEclipticOfDate]). The Moon shares the Earth's annual motion, so no
// annual aberration applies. The true obliquity to go to right ascension and
// declination is [astro.MeanObliquity1980] plus Δε in Meeus' example 47.a.
//
// Input: tt, a TT Julian date. Accuracy: that of [MoonEclipticOfDate].
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 47, p. 343
// (example 47.a); ch. 22 for Δψ.
func MoonApparentEclipticOfDate(tt astro.JD) (lon, lat astro.Angle, distKm float64) {
	lon, lat, distKm = moonMeeus47(tt.CenturiesSinceJ2000())
	dpsi, _ := astro.Nutation1980(tt)
	return (lon + dpsi).Normalized(), lat, distKm
}

// MoonGeocentricICRS returns the geometric geocentric position of the Moon's
// centre at tt in au, in ICRS (GCRS) axes: the position of
// [MoonEclipticOfDate] turned from the mean ecliptic and equinox of date to
// the ICRS by
//
//	r_ICRS = Bᵀ · Pᵀ · R1(−εA) · Δ (cos β cos λ, cos β sin λ, sin β)
//
// with εA the IAU 2006 mean obliquity of date ([astro.MeanObliquity2006]), P the
// IAU 2006 precession ([astro.PrecessionMatrix2006]) and B the frame bias
// ([astro.FrameBiasMatrix]). The chain treats Meeus' ecliptic of date as the IAU
// 2006 one; the IAU 1976 ecliptic of Meeus' era differs from it by about 0.05″,
// far below the series' own error.
//
// Light time: this is where the Moon is at tt. The astrometric place seen at
// tt is the position at tt − τ, τ = |r|/c ≈ 1.28 s, minus the observer's
// geocentric position at tt; using the position at tt moves the Moon by 0.7″.
//
// Input: tt, a TT Julian date. Accuracy: that of [MoonEclipticOfDate] (the
// frame chain adds less than 0.1″).
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 47; IERS
// Conventions (2010), ch. 5 (P, B and εA of IAU 2006); Hilton et al., Celest.
// Mech. Dyn. Astr. 94, 351 (2006) for the ecliptic of date.
func MoonGeocentricICRS(tt astro.JD) r3.Vec {
	lon, lat, distKm := MoonEclipticOfDate(tt)
	m := astro.FrameBiasMatrix().T().
		Mul(astro.PrecessionMatrix2006(tt).T()).
		Mul(astro.RotX(-astro.MeanObliquity2006(tt)))
	return r3.Scale(distKm/astro.AUKm, m.MulVec(astro.UnitVector(lon, lat)))
}

// MoonHorizontalParallax returns the Moon's equatorial horizontal parallax π
// for a geocentric distance distKm, sin π = 6378.14 km / Δ, with Meeus' Earth
// radius (the IAU 1976 value, [astro.IAU1976]). For Δ ≤ 6378.14 km it returns
// NaN.
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 47, p. 337.
func MoonHorizontalParallax(distKm float64) astro.Angle {
	return astro.Angle(math.Asin(astro.IAU1976.EquatorialRadiusKm / distKm))
}
