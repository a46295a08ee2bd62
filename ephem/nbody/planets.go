package nbody

import (
	"fmt"
	"math"
	"sync"

	"arcfit/astro"
	"arcfit/ephem"
)

// body indexes the perturbing bodies of the force model.
type body int

const (
	bMercury body = iota
	bVenus
	bEarth
	bMoon
	bMars
	bJupiter
	bSaturn
	bUranus
	bNeptune
	nBodies
)

// bodyInfo holds what the force model knows of one perturbing body.
type bodyInfo struct {
	name string
	eb   ephem.Body // the ephem body (ephem.Moon for the Moon)
	gm   float64    // au³/day², DE405 (masses.go)
	// segDays and nCoef are the length of the interpolation segments (a
	// power of two, so segment boundaries are exact) and the number of
	// Chebyshev coefficients per coordinate; chosen so the interpolation
	// error is below 1e-10 au (measured by TestPlanetCacheAgainstDirect).
	segDays float64
	nCoef   int
	// meanDistAU is the mean distance from the Sun (for the Moon, from the
	// Earth) that sets the Hill radius.
	meanDistAU float64
	// radiusAU is the body's radius (0 when DE405 gives none).
	radiusAU float64
}

// bodies lists the perturbers. The mean distances of the planets are the
// constant terms of the semi-major axes of the mean orbital elements in
// Meeus, Astronomical Algorithms, 2nd ed., table 31.a (VSOP87, J2000; values
// from memory, rounded to 7 digits, ample for a Hill radius); the Moon's is
// its mean distance from the Earth, 384400 km (common practice).
var bodies = [nBodies]bodyInfo{
	bMercury: {"Mercury", ephem.Mercury, gmMercury, 16, 16, 0.3870983, radiusMercuryKm / de405AUKm},
	bVenus:   {"Venus", ephem.Venus, gmVenus, 32, 12, 0.7233298, radiusVenusKm / de405AUKm},
	bEarth:   {"Earth", ephem.Earth, gmEarth, 16, 16, 1.0000010, radiusEarthKm / de405AUKm},
	bMoon:    {"Moon", ephem.Moon, gmMoon, 8, 14, 384400 / de405AUKm, radiusMoonKm / de405AUKm},
	bMars:    {"Mars", ephem.Mars, gmMars, 64, 16, 1.5236793, radiusMarsKm / de405AUKm},
	bJupiter: {"Jupiter", ephem.Jupiter, gmJupiter, 64, 16, 5.2026032, 0},
	bSaturn:  {"Saturn", ephem.Saturn, gmSaturn, 64, 18, 9.5549096, 0},
	bUranus:  {"Uranus", ephem.Uranus, gmUranus, 64, 16, 19.2184461, 0},
	bNeptune: {"Neptune", ephem.Neptune, gmNeptune, 32, 16, 30.1103869, 0},
}

// hillAU returns the radius of body b's Hill sphere, a·(m/3M)^(1/3), a its
// mean distance and M the Sun's mass (for the Moon, the Earth's).
//
// Reference: Hill's limiting surface in the restricted three-body problem;
// Murray & Dermott, Solar System Dynamics (1999), §3.13, eq. 3.75 (from
// memory).
func hillAU(b body) float64 {
	central := ephem.GMSun
	if b == bMoon {
		central = gmEarth
	}
	return bodies[b].meanDistAU * math.Cbrt(bodies[b].gm/(3*central))
}

// segment holds one body's Chebyshev interpolant over one time segment: for
// each coordinate (ICRS x, y, z) nCoef coefficients c_k of
//
//	p(τ) = Σ_k c_k T_k(s) − c_0/2,   s = 2(τ − τ0)/L − 1,
//
// τ the TDB days since J2000, τ0 the segment's start and L its length.
type segment struct {
	once sync.Once
	c    []float64 // 3·nCoef, x then y then z
	err  error
}

// ephemCache is the process-wide store of the perturbers' interpolants,
// filled lazily. A segment's coefficients depend only on the body and the
// segment (its nodes are fixed), so the content does not depend on who asked
// first or in which order; sync.Once makes the fill happen once, and
// sync.Map makes the look-up safe and cheap for concurrent readers.
type ephemCache struct {
	seg [nBodies]sync.Map // int64 segment index -> *segment
}

var cache = new(ephemCache)

// resetCache empties the cache (for the cold-cache benchmark and the tests).
func resetCache() { cache = new(ephemCache) }

// get returns the filled segment idx of body b.
func (c *ephemCache) get(b body, idx int64) *segment {
	v, ok := c.seg[b].Load(idx)
	if !ok {
		v, _ = c.seg[b].LoadOrStore(idx, new(segment))
	}
	s := v.(*segment)
	s.once.Do(func() { s.c, s.err = fillSegment(b, idx) })
	return s
}

// fillSegment evaluates body b at the n Chebyshev nodes of the first kind of
// segment idx and returns the interpolating coefficients:
//
//	s_j = cos(π(j + ½)/n),  c_k = (2/n) Σ_j f(s_j) cos(πk(j + ½)/n)
//
// Reference: Press, Teukolsky, Vetterling & Flannery, Numerical Recipes, 3rd
// ed. (2007), §5.8 (Chebyshev approximation), eq. 5.8.7; Rivlin, The
// Chebyshev Polynomials (1974), ch. 1 (interpolation at the Chebyshev nodes).
func fillSegment(b body, idx int64) ([]float64, error) {
	info := &bodies[b]
	n := info.nCoef
	L := info.segDays
	t0 := float64(idx) * L
	f := make([]float64, 3*n) // values at the nodes
	for j := range n {
		s := math.Cos(math.Pi * (float64(j) + 0.5) / float64(n))
		tau := t0 + 0.5*L*(s+1)
		p, err := bodyPosition(b, tau)
		if err != nil {
			return nil, err
		}
		f[j], f[n+j], f[2*n+j] = p[0], p[1], p[2]
	}
	c := make([]float64, 3*n)
	for k := range n {
		for j := range n {
			w := math.Cos(math.Pi * float64(k) * (float64(j) + 0.5) / float64(n))
			for q := range 3 {
				c[q*n+k] += f[q*n+j] * w
			}
		}
	}
	for i := range c {
		c[i] *= 2 / float64(n)
	}
	return c, nil
}

// bodyPosition evaluates body b directly at τ TDB days since J2000:
// heliocentric ICRS au for the planets (VSOP87, ephem.HeliocentricICRS), and
// for the Moon its geocentric ICRS position (Meeus ch. 47,
// ephem.MoonGeocentricICRS), evaluated at the TT instant numerically equal
// to the TDB one (TT − TDB < 2 ms, which moves the Moon by less than 3 m).
func bodyPosition(b body, tau float64) ([3]float64, error) {
	if b == bMoon {
		if !(math.Abs(tau) <= astro.DaysPerJulianMillennium) {
			return [3]float64{}, fmt.Errorf("nbody: the Moon at JD %.5f TDB: outside the span of the planetary series (J2000 ± 1000 years): %w",
				astro.J2000+tau, astro.ErrUnsupportedDate)
		}
		m := ephem.MoonGeocentricICRS(astro.JD{Day: astro.J2000, Frac: tau, Scale: astro.TT})
		return [3]float64{m.X, m.Y, m.Z}, nil
	}
	p, _, err := ephem.HeliocentricICRS(bodies[b].eb, astro.JD{Day: astro.J2000, Frac: tau, Scale: astro.TDB})
	if err != nil {
		return [3]float64{}, fmt.Errorf("nbody: %w", err)
	}
	return [3]float64{p.X, p.Y, p.Z}, nil
}

// chebEval returns Σ c_k T_k(s) − c_0/2 and, when deriv, its derivative with
// respect to s, by Clenshaw's recurrence (Numerical Recipes, 3rd ed., §5.8,
// eq. 5.8.11, and §5.9 for the derivative series).
func chebEval(c []float64, s float64) (v, dv float64) {
	// Clenshaw for the value and, alongside, for the derivative:
	// d/ds of b_k = 2s b_{k+1} − b_{k+2} + c_k.
	var b1, b2, d1, d2 float64
	s2 := 2 * s
	for k := len(c) - 1; k >= 1; k-- {
		b1, b2 = s2*b1-b2+c[k], b1
		d1, d2 = s2*d1-d2+2*b2, d1
	}
	v = s*b1 - b2 + 0.5*c[0]
	dv = s*d1 - d2 + b1
	return v, dv
}

// chebValue returns Σ c_k T_k(s) − c_0/2 by Clenshaw's recurrence.
func chebValue(c []float64, s float64) float64 {
	var b1, b2 float64
	s2 := 2 * s
	for k := len(c) - 1; k >= 1; k-- {
		b1, b2 = s2*b1-b2+c[k], b1
	}
	return s*b1 - b2 + 0.5*c[0]
}

// chebValue3 evaluates the three series of c (x, y, z; n coefficients
// each) at s together, as chebValue does for one.
func chebValue3(c []float64, n int, s float64) [3]float64 {
	cx, cy, cz := c[:n], c[n:2*n], c[2*n:3*n]
	var x1, x2, y1, y2, z1, z2 float64
	s2 := 2 * s
	for k := n - 1; k >= 1; k-- {
		x1, x2 = s2*x1-x2+cx[k], x1
		y1, y2 = s2*y1-y2+cy[k], y1
		z1, z2 = s2*z1-z2+cz[k], z1
	}
	return [3]float64{s*x1 - x2 + 0.5*cx[0], s*y1 - y2 + 0.5*cy[0], s*z1 - z2 + 0.5*cz[0]}
}

// view is one integration's window on the cache: it keeps the segment last
// used per body, so the shared map is consulted only when a segment ends.
type view struct {
	cur  [nBodies]*segment
	idx  [nBodies]int64
	have [nBodies]bool
}

// position returns body b at τ (TDB days since J2000): heliocentric for the
// planets, geocentric for the Moon, and the time derivative (au/day) when
// vel is true.
func (w *view) position(b body, tau float64, vel bool) (p, v [3]float64, err error) {
	info := &bodies[b]
	L := info.segDays
	fi := math.Floor(tau / L)
	if !(math.Abs(fi) < 1e15) {
		return p, v, fmt.Errorf("nbody: %s at TDB day %g since J2000: %w", info.name, tau, astro.ErrUnsupportedDate)
	}
	idx := int64(fi)
	if !w.have[b] || w.idx[b] != idx {
		w.cur[b] = cache.get(b, idx)
		w.idx[b] = idx
		w.have[b] = true
	}
	seg := w.cur[b]
	if seg.err != nil {
		return p, v, seg.err
	}
	s := 2*(tau-fi*L)/L - 1
	n := info.nCoef
	if !vel {
		p = chebValue3(seg.c, n, s)
		return p, v, nil
	}
	for q := range 3 {
		x, dx := chebEval(seg.c[q*n:(q+1)*n], s)
		p[q], v[q] = x, dx*2/L
	}
	return p, v, nil
}
