package plan

import (
	"math"
	"sort"

	"arcfit/astro"
	"arcfit/fit"
)

// Window is one stretch of a night in which the target is observable: the
// Sun's centre below −18° and the target at least the altitude limit high.
type Window struct {
	Start, End astro.JD // UTC
	// StartsAtDark and EndsAtDark report an end set by the dark window (the
	// target is already above the limit when darkness begins, or still above
	// it when darkness ends) rather than by the target crossing the limit.
	StartsAtDark, EndsAtDark bool
}

// Hours returns the window's length in hours.
func (w Window) Hours() float64 { return w.End.Sub(w.Start) * 24 }

// Contains reports whether t lies in the window, ends included.
func (w Window) Contains(t astro.JD) bool { return !t.Before(w.Start) && !w.End.Before(t) }

// The sampling of the altitude through the dark window.
const (
	// sampleStepDays is the longest interval between the altitude samples:
	// 5 minutes. The altitude of a target far from the zenith curves by at
	// most the square of the Earth's rotation rate, (0.26 rad/h)², so between
	// samples it departs from the straight line through them by at most
	// 0.07 rad/h² × (1/12 h)²/8 = 0.003°; close to the zenith by more (0.2°
	// for a target passing 1° from it).
	sampleStepDays = 5.0 / 1440
	// timeTolDays is the precision of the crossings and extrema: 0.5 s.
	timeTolDays = 0.5 / 86400
	// dipMargin: a sampled local minimum less than this above the limit is
	// refined, in case the altitude dips below the limit between samples
	// (the bound above, with room for a target near the zenith).
	dipMargin = 0.5 * astro.Degree
	// goldenRatio is (√5 − 1)/2, the interval ratio of the golden-section
	// search (Press et al. 2007, §10.2).
	goldenRatio = 0.6180339887498949
)

// altFunc returns the target's refracted altitude and its elongation from
// the Sun at a UTC instant.
type altFunc func(t astro.JD) (alt, elong astro.Angle, err error)

// altitudeOf returns the altitude function of target t seen from site: the
// place of its Positioner when it has one, else of Predict, through
// fit.PointingOf (refraction for 10 °C and 1010 hPa, UT1 = UTC).
func altitudeOf(t Target, site *astro.Site) altFunc {
	pos, cheap := t.(Positioner)
	return func(utc astro.JD) (astro.Angle, astro.Angle, error) {
		var p fit.Prediction
		if cheap {
			ra, dec, err := pos.Position(utc, site)
			if err != nil {
				return 0, 0, err
			}
			p = fit.Prediction{UTC: utc, Site: site, RA: ra, Dec: dec}
		} else {
			var err error
			if p, err = t.Predict(utc, site); err != nil {
				return 0, 0, err
			}
		}
		pt, err := fit.PointingOf(p)
		if err != nil {
			return 0, 0, err
		}
		return pt.Alt, pt.SunElongation, nil
	}
}

// node is one altitude sample: x days after the span's start.
type node struct {
	x   float64
	alt float64 // radians
}

// windowResult is what findWindows finds.
type windowResult struct {
	windows []Window
	// best is the instant of the highest altitude within the windows and
	// bestWindow its index; both unset (−1) without a window.
	best       astro.JD
	bestAlt    astro.Angle
	bestWindow int
	// highest is the instant of the highest altitude in the whole span.
	highest    astro.JD
	highestAlt astro.Angle
}

// findWindows finds the parts of the span [from, to] in which f is at least
// minAlt, and the highest altitude in them and in the span.
//
// The altitude is sampled at equal steps of at most sampleStepDays, ends
// included. Every local maximum of the samples (an end counts when it is
// higher than its neighbour) is refined by golden-section search over the
// two intervals around it, and so is every local minimum less than dipMargin
// above the limit; the refined extrema join the samples. Between consecutive
// samples on either side of the limit the crossing is found by bisection to
// timeTolDays. The highest altitude of a window is the highest of its
// samples and refined maxima, so a culmination is found to timeTolDays.
//
// Reference: Press et al., Numerical Recipes, 3rd ed. (2007), §9.1
// (bracketing and bisection) and §10.2 (golden-section search).
func findWindows(f altFunc, from, to astro.JD, minAlt astro.Angle) (windowResult, error) {
	span := to.Sub(from)
	n := int(math.Ceil(span / sampleStepDays))
	if n < 2 {
		n = 2
	}
	h := span / float64(n)
	alt := func(x float64) (float64, error) {
		a, _, err := f(from.AddDays(x))
		return float64(a), err
	}
	nodes := make([]node, n+1)
	for i := range nodes {
		x := float64(i) * h
		if i == n {
			x = span
		}
		a, err := alt(x)
		if err != nil {
			return windowResult{}, err
		}
		nodes[i] = node{x, a}
	}
	lim := float64(minAlt)
	var extra []node
	for i := 0; i <= n; i++ {
		v := nodes[i].alt
		lo, hi := nodes[max(i-1, 0)].x, nodes[min(i+1, n)].x
		isMax := (i == 0 || v >= nodes[i-1].alt) && (i == n || v >= nodes[i+1].alt)
		isMin := (i == 0 || v <= nodes[i-1].alt) && (i == n || v <= nodes[i+1].alt)
		var e node
		var err error
		switch {
		case isMax:
			e, err = goldenSection(alt, lo, hi, +1)
		case isMin && v >= lim && v < lim+float64(dipMargin):
			e, err = goldenSection(alt, lo, hi, -1)
		default:
			continue
		}
		if err != nil {
			return windowResult{}, err
		}
		extra = append(extra, e)
	}
	nodes = mergeNodes(nodes, extra)

	at := func(x float64) astro.JD { return from.AddDays(x) }
	above := func(a float64) bool { return a >= lim }
	res := windowResult{bestWindow: -1}
	hi := 0
	for i, nd := range nodes {
		if nd.alt > nodes[hi].alt {
			hi = i
		}
	}
	res.highest, res.highestAlt = at(nodes[hi].x), astro.Angle(nodes[hi].alt)

	var cur *Window
	var curBest node
	for i, nd := range nodes {
		if i > 0 && above(nodes[i-1].alt) != above(nd.alt) {
			x, err := bisect(alt, nodes[i-1], nd, lim)
			if err != nil {
				return windowResult{}, err
			}
			if above(nd.alt) {
				cur = &Window{Start: at(x)}
				curBest = nd
			} else {
				cur.End = at(x)
				res.addWindow(*cur, curBest, at)
				cur = nil
			}
		}
		if !above(nd.alt) {
			continue
		}
		if cur == nil { // above at the span's start
			cur = &Window{Start: from, StartsAtDark: true}
			curBest = nd
		}
		if nd.alt > curBest.alt {
			curBest = nd
		}
	}
	if cur != nil {
		cur.End, cur.EndsAtDark = to, true
		res.addWindow(*cur, curBest, at)
	}
	return res, nil
}

// addWindow appends w, whose highest sample is best, and keeps the best.
func (r *windowResult) addWindow(w Window, best node, at func(float64) astro.JD) {
	r.windows = append(r.windows, w)
	if r.bestWindow < 0 || best.alt > float64(r.bestAlt) {
		r.bestWindow = len(r.windows) - 1
		r.best, r.bestAlt = at(best.x), astro.Angle(best.alt)
	}
}

// mergeNodes adds the extra nodes to the sorted samples, dropping any within
// timeTolDays of one already there.
func mergeNodes(nodes, extra []node) []node {
	if len(extra) == 0 {
		return nodes
	}
	all := append(append([]node{}, nodes...), extra...)
	sort.SliceStable(all, func(i, j int) bool { return all[i].x < all[j].x })
	out := all[:1]
	for _, nd := range all[1:] {
		if nd.x-out[len(out)-1].x > timeTolDays {
			out = append(out, nd)
		} else if nd.alt > out[len(out)-1].alt {
			out[len(out)-1] = nd
		}
	}
	return out
}

// goldenSection finds the maximum (sign +1) or minimum (sign −1) of alt on
// [a, b] to timeTolDays by golden-section search; a monotonic function gives
// the end it rises (falls) towards.
//
// Reference: Press et al., Numerical Recipes, 3rd ed. (2007), §10.2.
func goldenSection(alt func(float64) (float64, error), a, b, sign float64) (node, error) {
	g := func(x float64) (float64, error) {
		v, err := alt(x)
		return sign * v, err
	}
	c, d := b-goldenRatio*(b-a), a+goldenRatio*(b-a)
	gc, err := g(c)
	if err != nil {
		return node{}, err
	}
	gd, err := g(d)
	if err != nil {
		return node{}, err
	}
	for b-a > timeTolDays {
		if gc >= gd {
			b, d, gd = d, c, gc
			c = b - goldenRatio*(b-a)
			if gc, err = g(c); err != nil {
				return node{}, err
			}
		} else {
			a, c, gc = c, d, gd
			d = a + goldenRatio*(b-a)
			if gd, err = g(d); err != nil {
				return node{}, err
			}
		}
	}
	x := 0.5 * (a + b)
	v, err := alt(x)
	return node{x, v}, err
}

// bisect returns the instant between nodes p and q, on either side of lim,
// at which alt crosses lim, to timeTolDays.
//
// Reference: Press et al., Numerical Recipes, 3rd ed. (2007), §9.1.
func bisect(alt func(float64) (float64, error), p, q node, lim float64) (float64, error) {
	lo, hi := p.x, q.x
	loAbove := p.alt >= lim
	for hi-lo > timeTolDays {
		mid := 0.5 * (lo + hi)
		v, err := alt(mid)
		if err != nil {
			return 0, err
		}
		if (v >= lim) == loAbove {
			lo = mid
		} else {
			hi = mid
		}
	}
	return 0.5 * (lo + hi), nil
}
