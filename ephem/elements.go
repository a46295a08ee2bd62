package ephem

import (
	"fmt"
	"math"
	"strconv"

	"arcfit/astro"

	"gonum.org/v1/gonum/spatial/r3"
)

// Constants of heliocentric two-body motion.
const (
	// GaussK is the Gaussian gravitational constant k, au^(3/2)/day (IAU 1976
	// System of Astronomical Constants; common practice for heliocentric
	// orbital elements).
	GaussK = 0.01720209895
	// GMSun is the Sun's gravitational parameter k², au³/day², time in TDB days
	// (the mass of the orbiting body neglected).
	GMSun = GaussK * GaussK
)

// nearParabolicBand is the half-width of the band of eccentricities around 1
// (e ≠ 1) in which [Elements.StateAt] uses the universal-variable solution from
// perihelion ([NearParabolicMotion]) rather than the elliptic or hyperbolic
// Kepler equation. Both are accurate on either side of it (the tests compare
// them); the band keeps the solution that is best conditioned near e = 1.
const nearParabolicBand = 0.01

// Elements is a set of heliocentric osculating orbital elements, ecliptic and
// equinox J2000.
//
// Which fields are authoritative:
//
//   - e < 1 and A ≠ 0: the mean-anomaly form (the asteroid form): A, E, M at
//     Epoch. Q and Tp are ignored (ElementsFromState fills them consistently).
//   - e < 1 and A = 0: the perihelion form (the comet form): Q, E, Tp. Epoch
//     and M are ignored.
//   - e ≥ 1: always the perihelion form Q, E, Tp; A, M and Epoch are ignored.
//
// I, Node and Peri are used in every case. Epoch and Tp must be TT or TDB
// dates; two-body motion does not distinguish the two (TDB − TT < 2 ms).
type Elements struct {
	Name  string
	Epoch astro.JD // epoch of M (TT or TDB), mean-anomaly form only
	A     float64  // semi-major axis, au (e < 1); 0 selects the perihelion form
	E     float64  // eccentricity, e ≥ 0

	I    astro.Angle // inclination to the ecliptic J2000, [0, π]
	Node astro.Angle // longitude of the ascending node, equinox J2000
	Peri astro.Angle // argument of perihelion
	M    astro.Angle // mean anomaly at Epoch (mean-anomaly form)

	Q  float64  // perihelion distance, au (perihelion form)
	Tp astro.JD // time of perihelion passage (TT or TDB; perihelion form)

	H, G float64 // absolute magnitude and slope parameter; NaN when absent

	// Sigma holds the stated 1-σ uncertainties of the elements, nil when the
	// set states none.
	Sigma *ElementSigma

	// GM is the gravitational parameter of the motion, au³/day²; 0 means GMSun.
	// ElementsFromState records its gm here so that StateAt gives the state back.
	GM float64
}

// ElementError reports an element set that cannot describe an orbit. Its text
// is one line:
//
//	ephem: element set "Invented-1": e = -0.1, want e ≥ 0
//
// It wraps [astro.ErrRange].
type ElementError struct {
	Name  string // name of the element set (may be empty)
	Field string // the offending element, such as "e", "a", "q", "epoch"
	Got   string // its value as text
	Want  string // what is required
}

// Error returns the one-line message.
func (e *ElementError) Error() string {
	set := "ephem: element set"
	if e.Name != "" {
		set += " " + strconv.Quote(e.Name)
	}
	return fmt.Sprintf("%s: %s = %s, want %s", set, e.Field, e.Got, e.Want)
}

// Unwrap returns [astro.ErrRange].
func (e *ElementError) Unwrap() error { return astro.ErrRange }

// Validate reports the first element that makes el unusable, as an
// *[ElementError]: e < 0 or NaN; an inclination outside [0°, 180°]; angles not
// finite; for e < 1 in the mean-anomaly form a ≤ 0 (or not finite), M not
// finite, Epoch not a finite TT or TDB date; in the perihelion form (e ≥ 1, or
// e < 1 with A = 0) q ≤ 0 (or not finite) or Tp not a finite TT or TDB date;
// GM < 0 or not finite. H and G are not checked (NaN means absent).
func (el Elements) Validate() error {
	bad := func(field string, got any, want string) error {
		g := fmt.Sprint(got)
		if f, ok := got.(float64); ok {
			g = strconv.FormatFloat(f, 'g', -1, 64)
		}
		return &ElementError{Name: el.Name, Field: field, Got: g, Want: want}
	}
	switch {
	case math.IsNaN(el.E) || math.IsInf(el.E, 0):
		return bad("e", el.E, "a finite eccentricity")
	case el.E < 0:
		return bad("e", el.E, "e ≥ 0")
	case !tbFinite(float64(el.I)) || el.I < 0 || el.I > math.Pi:
		return bad("i", fmt.Sprintf("%g°", el.I.Degrees()), "an inclination 0°…180°")
	case !tbFinite(float64(el.Node)):
		return bad("node", float64(el.Node), "a finite angle")
	case !tbFinite(float64(el.Peri)):
		return bad("peri", float64(el.Peri), "a finite angle")
	case !tbFinite(el.GM) || el.GM < 0:
		return bad("gm", el.GM, "gm ≥ 0 au³/day² (0 for the Sun)")
	}
	if el.E < 1 && el.A != 0 {
		switch {
		case !tbFinite(el.A) || el.A < 0:
			return bad("a", fmt.Sprintf("%g au", el.A), fmt.Sprintf("a > 0 au for an ellipse (e = %g)", el.E))
		case !tbFinite(float64(el.M)):
			return bad("m", float64(el.M), "a finite mean anomaly")
		case !tbDynamicalDate(el.Epoch):
			return bad("epoch", el.Epoch, "a TT or TDB date")
		}
		return nil
	}
	if el.E < 1 && el.Q == 0 {
		return bad("a", fmt.Sprintf("%g au", el.A), fmt.Sprintf("a > 0 au for an ellipse (e = %g), or q > 0 with a perihelion time", el.E))
	}
	switch {
	case !tbFinite(el.Q) || el.Q <= 0:
		return bad("q", fmt.Sprintf("%g au", el.Q), "a perihelion distance q > 0 au")
	case !tbDynamicalDate(el.Tp):
		return bad("tp", el.Tp, "a TT or TDB perihelion time")
	}
	return nil
}

// StateAt returns the heliocentric position pos (au) and velocity vel
// (au/day), ecliptic and equinox J2000, of the body at the instant t (TT or
// TDB) by two-body motion with GM = el.GM (or [GMSun]).
//
// The solution depends on the conic:
//
//   - e < 0.99: Kepler's equation ([SolveKepler]); position and velocity from
//     the eccentric anomaly, x = a(cos E − e), y = a√(1 − e²) sin E (Meeus
//     ch. 33, written as x = q − 2a sin²(E/2) to avoid cancellation);
//   - e = 1: Barker's equation ([ParabolicMotion], Meeus ch. 34);
//   - 0.99 ≤ e < 1.01, e ≠ 1: universal variables from perihelion
//     ([NearParabolicMotion], in place of Meeus' ch. 35 method);
//   - e ≥ 1.01: the hyperbolic Kepler equation ([SolveKeplerHyperbolic]).
//
// The orbital-plane vectors are turned to the ecliptic with the Gaussian
// vectors P = Rz(Ω)Rx(i)Rz(ω)·x̂, Q = Rz(Ω)Rx(i)Rz(ω)·ŷ (Meeus ch. 33 with
// the obliquity set to zero).
//
// Errors: el fails [Elements.Validate]; t is not a finite TT or TDB date; the
// solution overflows (a hyperbolic time far outside any practical range).
//
// Reference: Meeus, Astronomical Algorithms, 2nd ed. (1998), ch. 30, 33, 34,
// 35; Danby, Fundamentals of Celestial Mechanics, 2nd ed. (1988), ch. 6.
func (el Elements) StateAt(t astro.JD) (pos, vel r3.Vec, err error) {
	if err := el.Validate(); err != nil {
		return r3.Vec{}, r3.Vec{}, err
	}
	if !tbDynamicalDate(t) {
		return r3.Vec{}, r3.Vec{}, fmt.Errorf("ephem: StateAt: time %v is not a finite TT or TDB date: %w", t, astro.ErrRange)
	}
	p, q := gaussianVectors(el.I, el.Node, el.Peri)
	return el.stateIn(t, p, q)
}

// stateIn is [Elements.StateAt] for a valid el and a valid t, with the
// Gaussian vectors p, q of el (gaussianVectors) given, for callers that
// need many states of one element set.
func (el Elements) stateIn(t astro.JD, p, q r3.Vec) (pos, vel r3.Vec, err error) {
	x, y, vx, vy, err := el.planeState(t)
	if err != nil {
		return r3.Vec{}, r3.Vec{}, err
	}
	pos = r3.Add(r3.Scale(x, p), r3.Scale(y, q))
	vel = r3.Add(r3.Scale(vx, p), r3.Scale(vy, q))
	if !tbFiniteVec(pos) || !tbFiniteVec(vel) {
		return r3.Vec{}, r3.Vec{}, fmt.Errorf("ephem: StateAt: no finite state at %v: %w", t, astro.ErrRange)
	}
	return pos, vel, nil
}

// gravParam returns el.GM, or GMSun when it is 0.
func (el Elements) gravParam() float64 {
	if el.GM > 0 {
		return el.GM
	}
	return GMSun
}

// planeState returns the position (au) and velocity (au/day) in the orbital
// plane, x towards perihelion, at t, choosing the solution by eccentricity.
func (el Elements) planeState(t astro.JD) (x, y, vx, vy float64, err error) {
	gm := el.gravParam()
	e := el.E
	near := e != 1 && math.Abs(e-1) < nearParabolicBand
	switch {
	case e < 1 && el.A != 0:
		a := el.A
		n := math.Sqrt(gm/a) / a
		dt := tbDays(t, el.Epoch)
		if near {
			sincePeri := dt + tbWrap(float64(el.M))/n
			return nearParabolicPlane(a*(1-e), e, sincePeri, gm)
		}
		return ellipticPlane(a, e, float64(el.M)+n*dt, gm)
	case near:
		return nearParabolicPlane(el.Q, e, tbDays(t, el.Tp), gm)
	case e < 1:
		a := el.Q / (1 - e)
		n := math.Sqrt(gm/a) / a
		return ellipticPlane(a, e, n*tbDays(t, el.Tp), gm)
	case e == 1:
		return parabolicPlane(el.Q, tbDays(t, el.Tp), gm)
	default:
		return hyperbolicPlane(el.Q, e, tbDays(t, el.Tp), gm)
	}
}

// ellipticPlane returns the orbital-plane state of an ellipse at mean anomaly
// m (radians): with E from Kepler's equation and r = a(1 − e cos E),
//
//	x = a(cos E − e), y = a√(1 − e²)·sin E,
//	vx = −√(gm·a)·sin E/r, vy = √(gm·a(1 − e²))·cos E/r
//
// (Meeus ch. 30 and 33; the velocity from dE/dt = n·a/r).
func ellipticPlane(a, e, m, gm float64) (x, y, vx, vy float64, err error) {
	E, err := SolveKepler(e, astro.Angle(m))
	if err != nil {
		return 0, 0, 0, 0, err
	}
	sn, cs := math.Sincos(float64(E))
	h := math.Sin(0.5 * float64(E))
	two := 2 * a * h * h // a(1 − cos E)
	q := a * (1 - e)
	r := q + e*two
	ome2 := (1 - e) * (1 + e)
	x = q - two
	y = a * math.Sqrt(ome2) * sn
	vx = -math.Sqrt(gm*a) * sn / r
	vy = math.Sqrt(gm*a*ome2) * cs / r
	return x, y, vx, vy, nil
}

// gaussianVectors returns the unit vectors P (towards perihelion) and Q (90°
// ahead in the direction of motion) of the orbital plane in ecliptic axes:
//
//	P = (cos ω cos Ω − sin ω sin Ω cos i, cos ω sin Ω + sin ω cos Ω cos i, sin ω sin i)
//	Q = (−sin ω cos Ω − cos ω sin Ω cos i, −sin ω sin Ω + cos ω cos Ω cos i, cos ω sin i)
//
// (Meeus ch. 33 with ε = 0; common practice).
func gaussianVectors(i, node, peri astro.Angle) (p, q r3.Vec) {
	si, ci := math.Sincos(float64(i))
	sn, cn := math.Sincos(float64(node))
	sw, cw := math.Sincos(float64(peri))
	p = r3.Vec{X: cw*cn - sw*sn*ci, Y: cw*sn + sw*cn*ci, Z: sw * si}
	q = r3.Vec{X: -sw*cn - cw*sn*ci, Y: -sw*sn + cw*cn*ci, Z: cw * si}
	return p, q
}

// ElementsFromState returns the osculating elements of a body at position pos
// (au) and velocity vel (au/day), heliocentric ecliptic J2000, at the instant
// epoch (TT or TDB), for the gravitational parameter gm (au³/day²; [GMSun]).
//
// The reduction (common practice; Danby, Fundamentals of Celestial Mechanics,
// 2nd ed. (1988), ch. 6): h = r × v gives i = atan2(√(hx² + hy²), hz) and
// Ω = atan2(hx, −hy); p = h²/gm; e·cos ν = p/r − 1 and e·sin ν = (r·v)·h/(gm·r)
// give e and ν; the argument of latitude u from the node line gives ω = u − ν;
// q = p/(1 + e). For e < 1 also a = q/(1 − e) and the mean anomaly M at epoch
// (in (−π, π], which keeps the digits of a small negative M), from E = atan2(√(1 − e²) sin ν, e + cos ν); the perihelion time
// is the one nearest the epoch. For e = 1 the time from Barker's equation, for
// e > 1 from sinh H = √(e² − 1) sin ν/(1 + e cos ν). A and M are left 0 for
// e ≥ 1; H and G are NaN; GM is gm. For an equatorial orbit (i = 0 or π) the
// node is put at Ω = 0; for a circular one the perihelion at the node.
//
// Errors: gm ≤ 0, a zero position, a state without angular momentum (radial
// motion), inputs not finite, or an epoch that is not TT or TDB.
func ElementsFromState(pos, vel r3.Vec, epoch astro.JD, gm float64) (Elements, error) {
	switch {
	case !(gm > 0) || math.IsInf(gm, 1):
		return Elements{}, twoBodyRangeError(fmt.Sprintf("ephem: ElementsFromState: gm = %g, want a finite gm > 0", gm))
	case !tbFiniteVec(pos) || !tbFiniteVec(vel):
		return Elements{}, twoBodyRangeError("ephem: ElementsFromState: position or velocity is not finite")
	case !tbDynamicalDate(epoch):
		return Elements{}, twoBodyRangeError(fmt.Sprintf("ephem: ElementsFromState: epoch %v is not a finite TT or TDB date", epoch))
	}
	r := r3.Norm(pos)
	h := r3.Cross(pos, vel)
	hn := r3.Norm(h)
	if r == 0 || hn == 0 {
		return Elements{}, twoBodyRangeError("ephem: ElementsFromState: state has no angular momentum (zero position or radial motion)")
	}
	hxy := math.Hypot(h.X, h.Y)
	inc := math.Atan2(hxy, h.Z)
	node := 0.0
	if hxy > 0 {
		node = math.Atan2(h.X, -h.Y)
	}
	p := hn * hn / gm
	rv := r3.Dot(pos, vel)
	ecos := p/r - 1
	esin := rv * hn / (gm * r)
	e := math.Hypot(ecos, esin)
	nu := math.Atan2(esin, ecos)
	sn, cn := math.Sincos(node)
	nHat := r3.Vec{X: cn, Y: sn}
	ahead := r3.Cross(r3.Scale(1/hn, h), nHat)
	u := math.Atan2(r3.Dot(pos, ahead), r3.Dot(pos, nHat))
	q := p / (1 + e)

	el := Elements{
		Epoch: epoch, E: e,
		I: astro.Angle(inc), Node: astro.Angle(node).Normalized(),
		Peri: astro.Angle(u - nu).Normalized(),
		Q:    q, H: math.NaN(), G: math.NaN(), GM: gm,
	}
	var sincePeri float64 // days since perihelion at epoch
	snu, cnu := math.Sincos(nu)
	switch {
	case e < 1:
		a := q / (1 - e)
		E := math.Atan2(math.Sqrt((1-e)*(1+e))*snu, e+cnu)
		m := keplerResidual(e, E, 0)
		n := math.Sqrt(gm/a) / a
		sincePeri = m / n
		el.A = a
		el.M = astro.Angle(m) // in (−π, π]: no rounding of small negative M
	case e == 1:
		s := math.Tan(0.5 * nu)
		sincePeri = (3*s + s*s*s) / (3 * math.Sqrt(gm/(2*q)) / q)
	default:
		H := math.Asinh(math.Sqrt((e-1)*(e+1)) * snu / (1 + e*cnu))
		a := q / (e - 1)
		n := math.Sqrt(gm/a) / a
		sincePeri = ((e-1)*H + e*sinhMinusX(H)) / n
	}
	el.Tp = epoch.AddDays(-sincePeri)
	return el, nil
}

// tbDays returns t − t0 in days for two TT or TDB dates, without the scale
// check of astro.JD.Sub (two-body motion does not distinguish TT from TDB).
func tbDays(t, t0 astro.JD) float64 { return (t.Day - t0.Day) + (t.Frac - t0.Frac) }

// tbDynamicalDate reports whether j is a finite TT or TDB date.
func tbDynamicalDate(j astro.JD) bool {
	return (j.Scale == astro.TT || j.Scale == astro.TDB) && tbFinite(j.Day) && tbFinite(j.Frac)
}

// tbWrap returns x reduced to [−π, π], leaving |x| ≤ π untouched (so that a
// tiny negative mean anomaly keeps its digits, which a reduction through
// [0, 2π) would round away).
func tbWrap(x float64) float64 {
	if math.Abs(x) <= math.Pi {
		return x
	}
	return x - 2*math.Pi*math.Round(x/(2*math.Pi))
}

func tbFinite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
