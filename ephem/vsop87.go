package ephem

import (
	"embed"
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"sync"

	"arcfit/astro"

	"gonum.org/v1/gonum/spatial/r3"
)

// The VSOP87B coefficients, converted from the npm package astronomia 4.2.0
// (MIT licence) by testdata/gen/vsop87.go; format and provenance in
// data/PROVENANCE.md.
//
//go:embed data/vsop87b_*.bin
var vsop87Files embed.FS

// The span over which the VSOP87 positions are offered: J2000 ± one Julian
// millennium of TDB, |τ| ≤ 1, about AD 1000 to 3000.
const (
	vsop87FirstJD = astro.J2000 - astro.DaysPerJulianMillennium // 2086295.0
	vsop87LastJD  = astro.J2000 + astro.DaysPerJulianMillennium // 2816795.0
)

// vsop87TruncationAU is, per body, the amplitude below which a term is dropped,
// as a length in au: a term of L or B is kept if A·a ≥ it (a the body's mean
// distance, the constant term of R), a term of R if A ≥ it. Since |τ| ≤ 1 over
// the span, no single dropped term moves the position by more than this. The
// values were chosen so that the truncation error, seen from the Earth at the
// planet's closest approach, stays below about 0.01″ (Earth: 3e-8 au);
// Jupiter and Uranus keep their full series. The measured errors are in the doc comment of
// HeliocentricEclipticJ2000 and are checked by TestVSOP87Truncation.
var vsop87TruncationAU = [...]float64{
	Mercury: 3e-10,
	Venus:   3e-10,
	Earth:   1e-9,
	Mars:    3e-10,
	Jupiter: 3e-9,
	Saturn:  1e-8,
	Uranus:  1e-8,
	Neptune: 3e-8,
}

// vsop87Term is one term A·cos(B + C·τ) with AC = A·C kept for the rate.
type vsop87Term struct{ a, b, c, ac float64 }

// vsop87Series holds the series of one body: coord[k][α] for k = L, B, R and the
// powers α of τ.
type vsop87Series struct {
	coord [3][][]vsop87Term
	terms int // number of terms kept
}

var vsop87Truncated [Neptune + 1]func() (*vsop87Series, error)

func init() {
	for b := Mercury; b <= Neptune; b++ {
		vsop87Truncated[b] = sync.OnceValues(func() (*vsop87Series, error) {
			return loadVSOP87(b, vsop87TruncationAU[b])
		})
	}
}

// loadVSOP87 reads body b's embedded series and keeps the terms whose
// amplitude, as a length (see vsop87TruncationAU), is at least minAU; minAU = 0
// keeps the full series.
func loadVSOP87(b Body, minAU float64) (*vsop87Series, error) {
	name := "data/vsop87b_" + lowerName(b) + ".bin"
	raw, err := vsop87Files.ReadFile(name)
	if err != nil {
		return nil, fmt.Errorf("ephem: %v", err)
	}
	bad := func(what string) error { return fmt.Errorf("ephem: %s: %s", name, what) }
	if len(raw) < 8 || string(raw[:4]) != "V87B" || binary.LittleEndian.Uint32(raw[4:8]) != 1 {
		return nil, bad("not a version-1 VSOP87B file")
	}
	pos := 8
	u32 := func() (int, bool) {
		if pos+4 > len(raw) {
			return 0, false
		}
		v := binary.LittleEndian.Uint32(raw[pos:])
		pos += 4
		return int(v), true
	}
	f64 := func() float64 {
		v := math.Float64frombits(binary.LittleEndian.Uint64(raw[pos:]))
		pos += 8
		return v
	}
	s := &vsop87Series{}
	var scale [3]float64
	for k := range 3 {
		np, ok := u32()
		if !ok || np == 0 || np > 10 {
			return nil, bad("bad number of powers")
		}
		s.coord[k] = make([][]vsop87Term, np)
		for p := range np {
			n, ok := u32()
			if !ok || pos+24*n > len(raw) {
				return nil, bad("truncated file")
			}
			ts := make([]vsop87Term, 0, n)
			for range n {
				t := vsop87Term{a: f64(), b: f64(), c: f64()}
				t.ac = t.a * t.c
				if k == 2 && p == 0 && t.c == 0 {
					scale[0], scale[1] = t.a, t.a // the mean distance scales L and B
				}
				ts = append(ts, t)
			}
			s.coord[k][p] = ts
		}
	}
	if pos != len(raw) {
		return nil, bad("trailing bytes")
	}
	if scale[0] == 0 {
		return nil, bad("no constant term in R")
	}
	scale[2] = 1
	for k := range 3 {
		for p, ts := range s.coord[k] {
			kept := ts[:0]
			for _, t := range ts {
				if math.Abs(t.a)*scale[k] >= minAU {
					kept = append(kept, t)
				}
			}
			s.coord[k][p] = kept
			s.terms += len(kept)
		}
	}
	return s, nil
}

func lowerName(b Body) string {
	n := []byte(b.String())
	if len(n) > 0 && n[0] >= 'A' && n[0] <= 'Z' {
		n[0] += 'a' - 'A'
	}
	return string(n)
}

// eval returns the value of coordinate k and its rate per Julian millennium:
//
//	X = Σ_α τ^α Σ_i A cos(B + Cτ)
//	dX/dτ = Σ_α [α τ^(α−1) Σ_i A cos(B + Cτ) − τ^α Σ_i A C sin(B + Cτ)]
func (s *vsop87Series) eval(k int, tau float64) (x, dx float64) {
	tp, dtp := 1.0, 0.0 // τ^α and α τ^(α−1)
	for p, ts := range s.coord[k] {
		var sc, ss float64
		for i := range ts {
			t := &ts[i]
			sn, cs := math.Sincos(t.b + t.c*tau)
			sc += t.a * cs
			ss += t.ac * sn
		}
		x += tp * sc
		dx += dtp*sc - tp*ss
		dtp = float64(p+1) * tp
		tp *= tau
	}
	return x, dx
}

// spherical evaluates L, B, R and their rates per day.
func (s *vsop87Series) spherical(tau float64) (l, b, r, dl, db, dr float64) {
	l, dl = s.eval(0, tau)
	b, db = s.eval(1, tau)
	r, dr = s.eval(2, tau)
	const perDay = 1 / astro.DaysPerJulianMillennium
	return l, b, r, dl * perDay, db * perDay, dr * perDay
}

// cartesian evaluates the rectangular position (au) and velocity (au/day).
func (s *vsop87Series) cartesian(tau float64) (pos, vel r3.Vec) {
	l, b, r, dl, db, dr := s.spherical(tau)
	sl, cl := math.Sincos(l)
	sb, cb := math.Sincos(b)
	pos = r3.Vec{X: r * cb * cl, Y: r * cb * sl, Z: r * sb}
	vel = r3.Vec{
		X: dr*cb*cl - r*sb*cl*db - r*cb*sl*dl,
		Y: dr*cb*sl - r*sb*sl*db + r*cb*cl*dl,
		Z: dr*sb + r*cb*db,
	}
	return pos, vel
}

// ErrNoSeries reports a body that VSOP87 does not cover (the Moon).
var ErrNoSeries = errors.New("no VSOP87 series for this body")

// vsop87Tau checks the body and the date and returns τ, the Julian millennia of
// TDB since J2000.
func vsop87Tau(b Body, tdb astro.JD) (float64, error) {
	if !b.IsPlanet() && b != Sun {
		if b == Moon {
			return 0, fmt.Errorf("ephem: %v: %w", b, ErrNoSeries)
		}
		return 0, fmt.Errorf("ephem: %v is not a body", b)
	}
	if tdb.Scale != astro.TDB && tdb.Scale != astro.TT {
		return 0, fmt.Errorf("ephem: %v: date on the %v scale, want TDB (or TT)", b, tdb.Scale)
	}
	d := tdb.DaysSinceJ2000()
	if !(math.Abs(d) <= astro.DaysPerJulianMillennium) { // NaN fails too
		return 0, fmt.Errorf("ephem: %v: JD %.5f %v is outside the VSOP87 span, JD %.1f to %.1f TDB (J2000 ± 1000 years): %w",
			b, tdb.Float(), tdb.Scale, vsop87FirstJD, vsop87LastJD, astro.ErrUnsupportedDate)
	}
	return d / astro.DaysPerJulianMillennium, nil
}

// HeliocentricEclipticJ2000 returns the heliocentric position (au) and velocity
// (au/day) of planet b at the instant tdb, in rectangular coordinates referred
// to the ecliptic and dynamical equinox J2000 (VSOP87 version B):
//
//	τ = (JD_TDB − 2451545.0)/365250                 (Julian millennia)
//	L, B, R = Σ_α τ^α Σ_i A_i cos(B_i + C_i τ)       (L, B in rad, R in au)
//	x = R cos B cos L,  y = R cos B sin L,  z = R sin B
//
// The velocity is the analytical derivative of the series, d/dτ of
// τ^α A cos(B + Cτ) = A[α τ^(α−1) cos(B + Cτ) − C τ^α sin(B + Cτ)], divided by
// 365250 days and carried through the spherical-to-rectangular formulas. b may
// be Mercury to Neptune or [Earth] (the Earth itself, not the Earth–Moon
// barycentre); [Sun] gives zero vectors, the origin.
//
// The date is TDB; a TT date is accepted (TT − TDB < 2 ms, at most 60 m of the
// Earth's motion). The span is J2000 ± 1000 Julian years of TDB, JD 2086295.0 to
// 2816795.0 (about AD 1000–3000), inside the span over which Bretagnon & Francou
// (1988) give VSOP87 a precision of 1″ or better for every planet (from
// memory: 4000 years either side of J2000 for Mercury to Mars, less for Jupiter
// and Saturn). Outside it,
// or on another time scale, or for the Moon, the vectors are zero and err is
// not nil (outside the span it wraps [astro.ErrUnsupportedDate]; for the Moon
// [ErrNoSeries]).
//
// The series are the complete VSOP87B files, truncated when first used: a term
// is dropped when its largest effect on the position over the span is below
// 1e-9 au (Earth), 3e-10 au (Mercury, Venus, Mars), 1e-8 au (Saturn) or 3e-8
// au (Neptune); Jupiter and Uranus keep every term. Against the full series
// from the same data, the position error of the truncated series is at most,
// over the span (and over 1900–2100): Mercury 1.5e-8 au (1e-8), Venus 4e-9
// (2.5e-9), Earth 3e-8 (3e-8), Mars 7e-9 (5e-10), Saturn 4e-7 (3.5e-7),
// Neptune 8e-7 (6.5e-7), Jupiter and Uranus 0 — as seen from the Earth at the
// planet's closest approach, 0.01″ or less. Against ERFA's epv00 see
// [HeliocentricICRS]; against ERFA's plan94 the planets agree to within
// plan94's own stated errors (up to 87″ in longitude for Saturn). Against JPL
// DE405 (ephem/testdata/de405_places.txt, 200 instants 1960–2060) the
// geocentric astrometric places of [PlaceOfBody] are within 0.06″ (Mercury,
// Venus), 0.08″ (Mars), 0.25″ (Jupiter), 0.40″ (Saturn), 1.7″ (Uranus) and
// 3.2″ (Neptune, above 2″ from about 2034); against DE200, the ephemeris
// VSOP87 was fitted to, within 0.36″ for every planet. The excess for Uranus
// and Neptune is DE200's own departure from DE405 (1.6″ and 2.9″ by 2060),
// which VSOP87 inherits. Mars to Neptune are the planet-system barycentres,
// as in the JPL ephemerides.
//
// Reference: Bretagnon, P., Francou, G., "Planetary theories in rectangular and
// spherical variables. VSOP87 solutions", Astron. Astrophys. 202, 309–315
// (1988); Meeus, Astronomical Algorithms, 2nd ed., ch. 32 (evaluation of the
// series, τ in millennia).
func HeliocentricEclipticJ2000(b Body, tdb astro.JD) (pos, vel r3.Vec, err error) {
	tau, err := vsop87Tau(b, tdb)
	if err != nil || b == Sun {
		return r3.Vec{}, r3.Vec{}, err
	}
	s, err := vsop87Truncated[b]()
	if err != nil {
		return r3.Vec{}, r3.Vec{}, err
	}
	pos, vel = s.cartesian(tau)
	return pos, vel, nil
}

// vsop87ToFK5 is the small rotation that takes VSOP87's ecliptic and dynamical
// equinox J2000 to the ecliptic and equinox J2000 of the FK5: Meeus'
// correction (Astronomical Algorithms, 2nd ed., ch. 32, eq. 32.3; the equation
// number is from memory, the formula is the one applied in examples 25.b and
// 33.a)
//
//	ΔL = −0.09033″ + 0.03916″ (cos L′ + sin L′) tan B
//	ΔB = +0.03916″ (cos L′ − sin L′)
//
// with L′ = L − 1.397° T − 0.00031° T², which for coordinates already referred to
// J2000 is L itself (T = 0). To first order in these angles the correction is
// the rotation v′ = v + ω × v with ω = (−0.03916″, −0.03916″, −0.09033″) in the
// ecliptic axes, that is the passive rotations R3(0.09033″)·R2(0.03916″)·R1(0.03916″).
var vsop87ToFK5 = astro.RotZ(0.09033 * astro.Arcsecond).Mul(astro.RotY(0.03916 * astro.Arcsecond)).Mul(astro.RotX(0.03916 * astro.Arcsecond))

// vsop87ToICRS takes VSOP87 vectors to ICRS axes.
var vsop87ToICRS = EclipticJ2000ToICRS.Mul(vsop87ToFK5)

// HeliocentricICRS returns the heliocentric position (au) and velocity (au/day)
// of planet b at the instant tdb in ICRS (equatorial) axes:
//
//	v_ICRS = R1(−ε0) · C · v_VSOP87
//
// where v_VSOP87 is the vector of [HeliocentricEclipticJ2000], C Meeus' VSOP87 to
// FK5 correction (ch. 32, eq. 32.3, at T = 0: a rotation by −0.09033″ about the
// ecliptic pole and 0.055″ about an axis in the ecliptic) and R1(−ε0) the
// obliquity 84381.448″ ([EclipticJ2000ToICRS]). The FK5 axes of J2000 are
// taken for the ICRS; they differ by some 0.02–0.03″ (Mignard & Froeschlé 2000),
// a rotation that was not applied because it takes the Earth further from
// ERFA's epv00, not nearer (measured: see the tests).
//
// Against epv00 (VSOP2000 fit to JPL DE405, in ICRS axes) the Earth's position is
// within 1.9e-7 au (0.04″ at 1 au; 1.0e-7 au RMS) over 1900–2100, and its
// velocity within 10 mm/s (measured: 9.7 mm/s). Without C it is 5.6e-7 au;
// with the IERS frame bias instead of C, 5.2e-7 au; with C and the FK5 to ICRS
// rotation, 3.1e-7 au. VSOP87 was fit to JPL's DE200, and the two differ by a
// slow rotation (about 18 mas per century about the ecliptic pole, by our own
// least-squares fit) that no fixed rotation removes: the best fixed rotation
// still leaves 1.6e-7 au. Against JPL DE405 itself (200 instants 1960–2060,
// ephem/testdata/de405_places.txt) the Earth is within 1.5e-7 au (22 km), and
// against DE200, in DE200's own axes, within 5.8e-8 au (8.7 km); epv00 is
// 7.4e-8 au (11.1 km) from DE405 at those instants. Nearly all of the
// difference from DE405 is the slow rotation between DE200's axes and
// DE405's (ICRF): a rotation ω0 + ω1·T fitted to the DE200 and DE405 Earths
// leaves 3.7e-9 au (measured in the tests). Span and errors as for
// [HeliocentricEclipticJ2000].
//
// Reference: Bretagnon & Francou (1988); Meeus, Astronomical Algorithms, 2nd
// ed., ch. 32 (VSOP87 to FK5) and ch. 13 (ecliptic to equator);
// Mignard, F., Froeschlé, M., Astron. Astrophys. 354, 732–739 (2000) (FK5 and
// the Hipparcos/ICRS frame).
func HeliocentricICRS(b Body, tdb astro.JD) (pos, vel r3.Vec, err error) {
	pos, vel, err = HeliocentricEclipticJ2000(b, tdb)
	if err != nil {
		return r3.Vec{}, r3.Vec{}, err
	}
	return vsop87ToICRS.MulVec(pos), vsop87ToICRS.MulVec(vel), nil
}

// HeliocentricSpherical returns planet b's heliocentric ecliptic longitude
// (in [0, 2π)), latitude and distance (au) at the instant tdb, referred to the
// ecliptic and equinox J2000: the VSOP87B series L, B, R summed directly (see
// [HeliocentricEclipticJ2000] for the series, span, accuracy and errors). [Sun]
// gives zeros. For the ecliptic and equinox of date, turn the vector
// astro.UnitVector(lon, lat) by [EclipticPrecession1976].
//
// Reference: Bretagnon & Francou (1988); Meeus, Astronomical Algorithms, 2nd
// ed., ch. 32.
func HeliocentricSpherical(b Body, tdb astro.JD) (lon, lat astro.Angle, rAU float64, err error) {
	tau, err := vsop87Tau(b, tdb)
	if err != nil || b == Sun {
		return 0, 0, 0, err
	}
	s, err := vsop87Truncated[b]()
	if err != nil {
		return 0, 0, 0, err
	}
	l, bb, r, _, _, _ := s.spherical(tau)
	return astro.Angle(l).Normalized(), astro.Angle(bb), r, nil
}
