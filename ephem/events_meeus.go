package ephem

import (
	"fmt"
	"math"

	"arcfit/astro"
)

// RiseTransitSetTimes are the times of rise, transit and set of a body on one
// day by Meeus' interpolation method, as fractions m of the day D (0h UT to
// 24h UT). A value outside [0, 1) means the event falls on the previous or
// the next day (Meeus, ch. 15, p. 103: add or subtract 1 to bring m into
// the day; an event that then belongs to another day is that day's).
type RiseTransitSetTimes struct {
	Transit, Rise, Set float64
	// Visibility is AlwaysAbove when the body does not set (circumpolar) and
	// AlwaysBelow when it does not rise on D, both judged at the declination
	// of 0h TT on D as Meeus does; Rise and Set are then NaN.
	Visibility Visibility
	// Iterations is the number of correction steps taken (Meeus takes one;
	// this function repeats them until they are below 1e-8 d).
	Iterations int
}

// RiseTransitSetMeeus returns the times of transit, rise and set on the
// UT day D of a body seen from geodetic latitude lat and east longitude lon
// (Meeus' L is west positive: lon = −L), given, as in Meeus' method:
//
//   - theta0: the apparent sidereal time at Greenwich at 0h UT on D;
//   - ra, dec: the body's apparent right ascension and declination at 0h TT
//     (Meeus' TD) on D − 1, D and D + 1;
//   - h0: the standard altitude (−0.5667° for stars and planets,
//     −0.8333° for the Sun, 0.7275 π − 0.5667° for the Moon);
//   - deltaTSec: ΔT = TT − UT in seconds.
//
// The method (Meeus, ch. 15, eqs. 15.1–15.2 and the steps that follow):
//
//	cos H0 = (sin h0 − sin φ sin δ2) / (cos φ cos δ2)
//	m0 = (α2 − lon − θ0)/360°,  m1 = m0 − H0/360°,  m2 = m0 + H0/360°   (each in [0, 1))
//	for each m:  θ = θ0 + 360.985647° m,  n = m + ΔT/86400,
//	             α, δ interpolated at n (eq. 3.3),  H = θ + lon − α  (in ±180°),
//	             h = asin(sin φ sin δ + cos φ cos δ cos H)
//	             Δm = −H/360°  (transit),   Δm = (h − h0)/(360° cos δ cos φ sin H)  (rise, set)
//
// Meeus applies the correction once; here it is repeated until |Δm| < 1e-8
// (at most 20 times), which handles the faster movers (the Moon) as well as
// three daily positions allow. The right ascensions are unwrapped across 0h
// before interpolation (Meeus, p. 30). cos H0 outside [−1, 1] gives the
// Visibility instead of a rise and set.
//
// Errors: non-finite input, or |lat| ≥ 90° (the hour angle of rise is then
// undefined).
//
// Accuracy: that of the three positions and of interpolating them; for Venus
// in Meeus' example 15.a the times agree with the book to 1e-5 d (1 s).
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 15, pp.
// 101–104 and example 15.a; ch. 3, eq. 3.3 (interpolation from three values).
func RiseTransitSetMeeus(lat, lon, theta0 astro.Angle, ra, dec [3]astro.Angle, h0 astro.Angle, deltaTSec float64) (RiseTransitSetTimes, error) {
	vals := []float64{float64(lat), float64(lon), float64(theta0), float64(h0), deltaTSec}
	for i := range 3 {
		vals = append(vals, float64(ra[i]), float64(dec[i]))
	}
	for _, v := range vals {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return RiseTransitSetTimes{}, fmt.Errorf("ephem: rise/transit/set: input %g is not finite: %w", v, astro.ErrRange)
		}
	}
	if !(math.Abs(float64(lat)) < math.Pi/2) {
		return RiseTransitSetTimes{}, fmt.Errorf("ephem: rise/transit/set: latitude %g°, want within ±90°: %w", lat.Degrees(), astro.ErrRange)
	}
	const rev = 2 * math.Pi
	// Sidereal rate in radians per day of UT: 360.985647° (Meeus, p. 103).
	const siderealRate = 360.985647 * math.Pi / 180
	sp, cp := math.Sincos(float64(lat))

	// Right ascensions unwrapped so that the differences are in (−π, π].
	a1 := float64(ra[0])
	a2 := a1 + float64((ra[1] - ra[0]).Wrapped())
	a3 := a2 + float64((ra[2] - ra[1]).Wrapped())
	interp := func(y1, y2, y3, n float64) float64 {
		a, b := y2-y1, y3-y2
		return y2 + n/2*(a+b+n*(b-a)) // Meeus eq. 3.3
	}
	frac := func(x float64) float64 { return x - math.Floor(x) }

	m0 := frac((a2 - float64(lon) - float64(theta0)) / rev)
	out := RiseTransitSetTimes{Rise: math.NaN(), Set: math.NaN()}
	cosH0 := (math.Sin(float64(h0)) - sp*math.Sin(float64(dec[1]))) / (cp * math.Cos(float64(dec[1])))
	var ms []float64
	switch {
	case cosH0 < -1:
		out.Visibility = AlwaysAbove
		ms = []float64{m0}
	case cosH0 > 1:
		out.Visibility = AlwaysBelow
		ms = []float64{m0}
	default:
		bigH0 := math.Acos(cosH0)
		ms = []float64{m0, frac(m0 - bigH0/rev), frac(m0 + bigH0/rev)}
	}
	for k := range ms {
		m := ms[k]
		for it := 1; it <= 20; it++ {
			theta := float64(theta0) + siderealRate*m
			n := m + deltaTSec/astro.SecondsPerDay
			alpha := interp(a1, a2, a3, n)
			delta := interp(float64(dec[0]), float64(dec[1]), float64(dec[2]), n)
			bigH := float64(astro.Angle(theta + float64(lon) - alpha).Wrapped())
			var dm float64
			if k == 0 {
				dm = -bigH / rev
			} else {
				sd, cd := math.Sincos(delta)
				h := math.Asin(sp*sd + cp*cd*math.Cos(bigH))
				dm = (h - float64(h0)) / (rev * cd * cp * math.Sin(bigH))
			}
			m += dm
			if it > out.Iterations {
				out.Iterations = it
			}
			if math.Abs(dm) < 1e-8 {
				break
			}
		}
		ms[k] = m
	}
	out.Transit = ms[0]
	if len(ms) == 3 {
		out.Rise, out.Set = ms[1], ms[2]
	}
	return out, nil
}
