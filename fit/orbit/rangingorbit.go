package orbit

import (
	"fmt"
	"math"
	"sort"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// Limits of the ranging search.
const (
	// RangingMinRhoAU and RangingMaxRhoAU bound the topocentric distances
	// searched, au: from 0.001 au (a tenth of the Earth's Hill radius, about
	// 0.01 au; heliocentric two-body motion means nothing closer) to 200 au
	// (beyond the known trans-Neptunian objects' perihelia). The systematic
	// grid itself spans 0.01–100 au; refinement and sampling may go past it.
	RangingMinRhoAU = 0.001
	RangingMaxRhoAU = 200.0
	// RangingMaxEccentricity is the largest eccentricity a ranging orbit may
	// have: 1, bound orbits only, as in the admissible region of Milani et
	// al. (2004). Mildly hyperbolic orbits are not admitted: for a one- or
	// two-night arc they would add a large region of unbound orbits around
	// every object. A near-parabolic comet whose orbit is bound keeps its
	// region; the rare comets with a slightly hyperbolic osculating orbit
	// (e up to about 1.06 for the most extreme known; from memory) lose the
	// part with e ≥ 1 and need a longer arc and the differential correction.
	RangingMaxEccentricity = 1.0
	// rgSunRadiusAU is the Sun's radius, 696 000 km (IAU 2015 Resolution B3,
	// nominal solar radius): no admissible orbit has its perihelion inside it.
	rgSunRadiusAU = 696000.0 / astro.AUKm
	// rgMinSpanDays is the shortest arc ranging is tried on: one hour (below
	// it a track shows only a position and a rate; every distance fits).
	rgMinSpanDays = 1.0 / 24
	// rgSameTimeDays: observations closer than 1 s count as simultaneous.
	rgSameTimeDays = 1.0 / 86400
	// rgNightGapDays: a gap longer than 7.2 h starts a new night.
	rgNightGapDays = 0.3
	// rgMotionSigmas: the track's motion counts as measured when two
	// positions lie more than 3σ apart (the usual detection threshold;
	// common practice).
	rgMotionSigmas = 3.0
)

// rgProblem is what a ranging search needs from the observations: the two
// anchors every trial orbit passes through (A on the first night, B on the
// last; see [rgAnchor]) and the observations against which its χ² is scored.
type rgProblem struct {
	obs    []Observation
	used   []int // used observations, by time
	a, b   rgAnchor
	ia, ib int // the anchor observations, indices into obs
	ga, gb ephem.ObserverGeometry
	dt     float64 // TDB days from A to B
	// all lists the used observations, those farthest in time from both
	// anchors first (they constrain the distance most; a χ² sum cut short
	// early is then most often cut by them).
	all   []int
	mid   int // the used observation nearest the middle of the arc
	maxE  float64
	night int // number of nights
	span  float64
}

// rgNewProblem checks the observations and prepares the search. Errors are
// *[RangingError].
//
// The anchors: with two nights or more, A is the observation nearest the
// mean time of the first night's observations from that night's most
// frequent site, fitted to them ([rgNewAnchor]), and B likewise on the last
// night; with a single night, the first and the last observation, each on
// its own.
func rgNewProblem(obs []Observation) (*rgProblem, error) {
	var used []int
	for i := range obs {
		o := &obs[i]
		if !o.Used || !rgFinite(o.Geo.HelioPos) || !rgFinite(o.Geo.SunBaryVel) || !rgFinite(o.Geo.HelioVel) || !rgFinite(o.Geo.GeoPos) ||
			!rgFiniteF(float64(o.RA)) || !rgFiniteF(float64(o.Dec)) || !rgFiniteF(o.Geo.TDB.Day+o.Geo.TDB.Frac) ||
			!(o.SigmaRA > 0) || !(o.SigmaDec > 0) || !rgFiniteF(o.SigmaRA) || !rgFiniteF(o.SigmaDec) || !(math.Abs(o.Corr) < 1) {
			continue
		}
		used = append(used, i)
	}
	sort.SliceStable(used, func(a, b int) bool { return rgDays(obs[used[a]].Geo.TDB, obs[used[b]].Geo.TDB) < 0 })
	distinct := make([]int, 0, len(used))
	for _, i := range used {
		if len(distinct) > 0 && rgDays(obs[i].Geo.TDB, obs[distinct[len(distinct)-1]].Geo.TDB) < rgSameTimeDays {
			continue
		}
		distinct = append(distinct, i)
	}
	if len(distinct) < 3 {
		return nil, &RangingError{Case: DegenerateTooFew,
			Reason: fmt.Sprintf("%d used observation(s) at distinct times; scoring a trial orbit needs at least three", len(distinct)),
			Hint:   "more observations"}
	}
	p := &rgProblem{obs: obs, maxE: RangingMaxEccentricity, used: used}
	first, last := &obs[distinct[0]], &obs[distinct[len(distinct)-1]]
	p.span = rgDays(last.Geo.TDB, first.Geo.TDB)
	if p.span < rgMinSpanDays {
		return nil, &RangingError{Case: DegenerateShortArc,
			Reason: fmt.Sprintf("all %d observations lie within %.0f min; below an hour every distance fits the track", len(distinct), p.span*1440),
			Hint:   "observations over a longer part of the night, or on a second night"}
	}
	if err := rgCheckMotion(obs, distinct); err != nil {
		return nil, err
	}
	// Nights of the used observations.
	var nights [][]int
	for k, i := range used {
		if k == 0 || rgDays(obs[i].Geo.TDB, obs[used[k-1]].Geo.TDB) > rgNightGapDays {
			nights = append(nights, nil)
		}
		nights[len(nights)-1] = append(nights[len(nights)-1], i)
	}
	p.night = len(nights)
	if p.night == 1 {
		p.a = rgNewAnchor(obs, nil, distinct[0])
		p.b = rgNewAnchor(obs, nil, distinct[len(distinct)-1])
	} else {
		p.a = rgNightAnchor(obs, nights[0])
		p.b = rgNightAnchor(obs, nights[len(nights)-1])
	}
	p.ia, p.ib = p.a.obs, p.b.obs
	p.ga, p.gb = obs[p.ia].Geo, obs[p.ib].Geo
	p.dt = rgDays(p.gb.TDB, p.ga.TDB)
	best := math.Inf(1)
	for _, i := range distinct {
		if d := math.Abs(rgDays(obs[i].Geo.TDB, first.Geo.TDB) - 0.5*p.span); d < best {
			best, p.mid = d, i
		}
	}
	far := func(i int) float64 {
		t := rgDays(obs[i].Geo.TDB, p.ga.TDB)
		return math.Min(math.Abs(t), math.Abs(p.dt-t))
	}
	p.all = append([]int(nil), used...)
	sort.SliceStable(p.all, func(x, y int) bool { return far(p.all[x]) > far(p.all[y]) })
	return p, nil
}

// rgNightAnchor returns the anchor of one night's used observations night:
// at the observation nearest their mean time among those from the night's
// most frequent site, fitted to that site's observations.
func rgNightAnchor(obs []Observation, night []int) rgAnchor {
	count := map[string]int{}
	site := ""
	for _, i := range night {
		count[obs[i].Site]++
		if c := count[obs[i].Site]; c > count[site] || (c == count[site] && obs[i].Site < site) {
			site = obs[i].Site
		}
	}
	var members []int
	mean := 0.0
	t0 := obs[night[0]].Geo.TDB
	for _, i := range night {
		if obs[i].Site == site {
			members = append(members, i)
			mean += rgDays(obs[i].Geo.TDB, t0)
		}
	}
	mean /= float64(len(members))
	k, best := members[0], math.Inf(1)
	for _, i := range members {
		if d := math.Abs(rgDays(obs[i].Geo.TDB, t0) - mean); d < best {
			k, best = i, d
		}
	}
	return rgNewAnchor(obs, members, k)
}

// rgCheckMotion reports a track whose positions all lie within 3σ of each
// other (σ the two positions' larger coordinate uncertainties in
// quadrature): the farthest pair is found from the first observation and
// then from the one farthest from it.
func rgCheckMotion(obs []Observation, idx []int) error {
	sig := func(o *Observation) float64 { return math.Max(o.SigmaRA, o.SigmaDec) }
	ref := idx[0]
	best := 0.0
	for range 2 {
		far, farSep := ref, -1.0
		for _, i := range idx {
			sep := float64(astro.Separation(obs[ref].RA, obs[ref].Dec, obs[i].RA, obs[i].Dec))
			s := math.Hypot(sig(&obs[ref]), sig(&obs[i]))
			if sep > rgMotionSigmas*s {
				return nil
			}
			best = math.Max(best, sep/s)
			if sep > farSep {
				far, farSep = i, sep
			}
		}
		ref = far
	}
	return &RangingError{Case: DegenerateStationary,
		Reason: fmt.Sprintf("no motion measurable above the noise: the %d positions lie within %.1fσ of each other", len(idx), best),
		Hint:   "a longer arc (and a check that the object is not a star)"}
}

// orbit returns the two-body orbit through the observer-relative positions
// ρA·ua (from A's observer) and ρB·ub (from B's) at their light-time
// retarded instants, as a state at A's retarded instant, and whether it is
// admissible: finite, e < p.maxE, perihelion outside the Sun, and at least
// [StartMinSunDistanceAU] from the Sun at both ends.
//
// The heliocentric position seen along u at distance ρ from an observer with
// stored geometry g is h = g.HelioPos + ρ·u + τ·g.SunBaryVel, τ = ρ/c: the
// inverse of the place [ObserverGeometry.Direction] computes.
func (p *rgProblem) orbit(rhoA, rhoB float64, ua, ub r3.Vec) (State, bool) {
	const c = astro.SpeedOfLightAUDay
	if !(rhoA >= RangingMinRhoAU && rhoB >= RangingMinRhoAU && rhoA <= RangingMaxRhoAU && rhoB <= RangingMaxRhoAU) {
		return State{}, false
	}
	tauA, tauB := rhoA/c, rhoB/c
	ha := r3.Add(r3.Add(p.ga.HelioPos, r3.Scale(rhoA, ua)), r3.Scale(tauA, p.ga.SunBaryVel))
	hb := r3.Add(r3.Add(p.gb.HelioPos, r3.Scale(rhoB, ub)), r3.Scale(tauB, p.gb.SunBaryVel))
	dt := p.dt - tauB + tauA
	if r3.Norm(ha) < StartMinSunDistanceAU || r3.Norm(hb) < StartMinSunDistanceAU {
		return State{}, false
	}
	va, _, ok := rgLambert(ha, hb, dt, ephem.GMSun)
	if !ok {
		return State{}, false
	}
	e, q := rgConic(ha, va)
	if !(e < p.maxE) || !(q > rgSunRadiusAU) {
		return State{}, false
	}
	return State{Epoch: p.ga.TDB.AddDays(-tauA), Pos: ha, Vel: va}, true
}

// rgConic returns the eccentricity e = |((v² − μ/r)·r − (r·v)·v)/μ| and the
// perihelion distance q = |r × v|²/(μ(1 + e)) of the heliocentric two-body
// orbit (r, v) (common practice; Danby, Fundamentals of Celestial
// Mechanics, 2nd ed. (1988), ch. 6).
func rgConic(r, v r3.Vec) (e, q float64) {
	mu := ephem.GMSun
	rn := r3.Norm(r)
	ev := r3.Sub(r3.Scale(r3.Norm2(v)-mu/rn, r), r3.Scale(r3.Dot(r, v), v))
	e = r3.Norm(ev) / mu
	h2 := r3.Norm2(r3.Cross(r, v))
	return e, h2 / (mu * (1 + e))
}

// chi2 returns the χ² of st against the observations list (indices into
// p.obs), appending the whitened residuals to dst when dst is not nil. It
// stops once the sum exceeds limit, returning complete = false; an orbit
// that cannot be propagated gives +Inf.
func (p *rgProblem) chi2(st State, list []int, limit float64, dst []float64) (chi2 float64, out []float64, complete bool) {
	for _, i := range list {
		o := &p.obs[i]
		seen, err := st.Observe(o.Geo)
		if err != nil {
			return math.Inf(1), dst, false
		}
		dE, dN := Residual(o.RA, o.Dec, seen.Dir)
		w1, w2 := o.Whitened(dE, dN)
		chi2 += w1*w1 + w2*w2
		if dst != nil {
			dst = append(dst, w1, w2)
		}
		if chi2 > limit {
			return chi2, dst, false
		}
	}
	if !rgFiniteF(chi2) {
		return math.Inf(1), dst, false
	}
	return chi2, dst, true
}

// rgDays returns t − t0 in days (two dates on one scale).
func rgDays(t, t0 astro.JD) float64 { return (t.Day - t0.Day) + (t.Frac - t0.Frac) }

// rgFiniteF reports whether x is finite.
func rgFiniteF(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
