package orbit

import (
	"fmt"
	"math"
	"sort"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// Limits of the heliocentric application of Gauss's method.
const (
	// StartMaxEccentricity is the largest eccentricity of an admissible
	// start: bound orbits and mildly hyperbolic ones (the hyperbolic comets
	// of the catalogues have e below about 1.1; common practice). A larger e
	// is, for a new object, almost always a spurious root.
	StartMaxEccentricity = 1.5
	// StartMinSunDistanceAU is the smallest admissible distance from the Sun
	// at the three observations, au (0.05 au, about ten solar radii: nothing
	// closer is observable from the ground).
	StartMinSunDistanceAU = 0.05
	// gaussMinSpanDays is the shortest arc Gauss's method is tried on: one
	// hour. Below it the curvature of the track is far below the noise of
	// any amateur measurement.
	gaussMinSpanDays = 1.0 / 24
	// gaussSameTimeDays: observations closer than this (1 s) count as taken
	// at one time.
	gaussSameTimeDays = 1.0 / 86400
	// gaussNightGapDays: a gap longer than this (7.2 h) between consecutive
	// observations starts a new night.
	gaussNightGapDays = 0.3
	// gaussCurvatureSigmas is how many σ the middle line of sight must lie
	// off the great circle through the outer two for the track's curvature
	// to count as measured: the usual 3σ detection threshold (common
	// practice; the same as the motion check of the observation readers).
	gaussCurvatureSigmas = 3.0
	// gaussMaxTriples bounds the triples tried.
	gaussMaxTriples = 6
	// gaussNearObserverAU is the Earth's Hill radius, about 0.01 au
	// (common practice): a solution closer to the observer gets a note.
	gaussNearObserverAU = 0.01
	// gaussMinBalance is the smallest share of the triple's arc on either
	// side of its middle observation.
	gaussMinBalance = 0.02
)

// GaussStarts returns the initial orbits that Gauss's method ([Gauss]) gives
// for the used observations obs, best first (smallest χ² against all the used
// observations, [State.Residuals]). Each Start has Method [MethodGauss] and
// its State at the TDB instant of the middle observation of its triple.
//
// The three observations: the used observations are sorted by time (those
// within 1 s of an earlier one set aside) and grouped into nights (a gap of
// more than 7.2 h starts a new one). The first triple is the first
// observation, the one nearest the middle of the arc in time — on a night of
// its own when there are three nights or more — and the last. Alternatives,
// tried in turn when a triple gives no admissible orbit, move the middle to
// the next-nearest candidates and the ends inwards by one and two
// observations; a triple whose middle is within 2% of the arc of an end is
// skipped; at most six are tried. The first triple that gives an admissible
// orbit is used, all its admissible roots kept.
//
// A triple is tried only when its curvature is measured: the middle line of
// sight must lie more than 3σ off the great circle through the outer two, σ
// combining the three observations' uncertainties (the larger coordinate σ
// of each, the outer ones weighted by their interpolation weights τ3/τ and
// τ1/τ).
//
// Each solution (distances refined with exact f and g and light time,
// observer geometry from [Observation.Geo], the Sun's barycentric motion
// during the light time included through [GaussInput.CentreVel]) is found
// at the light-time-corrected instant of the middle observation and
// propagated by two-body motion to its TDB instant. It is kept when it is
// physically admissible: distances from the observer above the Earth's
// radius, distances from the Sun above [StartMinSunDistanceAU], eccentricity
// below [StartMaxEccentricity], a finite χ². Solutions that refine to the
// same orbit are merged.
//
// Errors, each a *[DegenerateError] (so that the caller can fall back to a
// method made for short arcs): fewer than three used observations at
// distinct times; no motion measurable above the noise (no two positions
// more than 3σ apart, as the readers' motion check); all observations within
// one hour; the lines of sight of every triple tried on one great circle
// within the noise (through the Sun or not); no admissible root.
func GaussStarts(obs []Observation) ([]Start, error) {
	idx := gaussUsable(obs)
	if len(idx) < 3 {
		return nil, &DegenerateError{Case: DegenerateTooFew,
			Reason: fmt.Sprintf("%d used observation(s) at distinct times, three are needed", len(idx)),
			Hint:   "more observations, on more than one night"}
	}
	if err := gaussCheckMotion(obs, idx); err != nil {
		return nil, err
	}
	first, last := &obs[idx[0]], &obs[idx[len(idx)-1]]
	span := gaussDays(last.Geo.TDB, first.Geo.TDB)
	if span < gaussMinSpanDays {
		return nil, &DegenerateError{Case: DegenerateShortArc,
			Reason: fmt.Sprintf("all %d observations lie within %.0f min, too short an arc for Gauss's method", len(idx), span*1440),
			Hint:   "observations on a second night (a single night's arc needs the short-arc distance search)"}
	}

	var firstErr *DegenerateError
	triples := gaussTriples(obs, idx)
	for k, tr := range triples {
		starts, derr := gaussTriple(obs, tr)
		if derr != nil {
			if firstErr == nil {
				firstErr = derr
			}
			continue
		}
		if k > 0 {
			for i := range starts {
				starts[i].Notes = append(starts[i].Notes, fmt.Sprintf("the %d triple(s) tried before failed; the first: %s", k, firstErr.Reason))
			}
		}
		return starts, nil
	}
	if firstErr == nil {
		return nil, &DegenerateError{Case: DegenerateNoSolution,
			Reason: "no three observations well spread over the arc",
			Hint:   "observations on three or more nights"}
	}
	return nil, &DegenerateError{Case: firstErr.Case,
		Reason: fmt.Sprintf("%s (%d triple(s) tried)", firstErr.Reason, len(triples)),
		Hint:   firstErr.Hint}
}

// gaussUsable returns the indices of the used observations with finite data,
// sorted by TDB, dropping any within 1 s of the previous one kept.
func gaussUsable(obs []Observation) []int {
	var idx []int
	for i := range obs {
		o := &obs[i]
		if !o.Used || !gaussFinite(o.Geo.HelioPos) || !gaussFinite(o.Geo.SunBaryVel) ||
			math.IsNaN(float64(o.RA)+float64(o.Dec)) || math.IsInf(float64(o.RA)+float64(o.Dec), 0) ||
			!(o.SigmaRA > 0) || !(o.SigmaDec > 0) ||
			math.IsNaN(o.Geo.TDB.Day+o.Geo.TDB.Frac) || math.IsInf(o.Geo.TDB.Day+o.Geo.TDB.Frac, 0) {
			continue
		}
		idx = append(idx, i)
	}
	sort.SliceStable(idx, func(a, b int) bool {
		return gaussDays(obs[idx[a]].Geo.TDB, obs[idx[b]].Geo.TDB) < 0
	})
	out := idx[:0]
	for _, i := range idx {
		if len(out) > 0 && gaussDays(obs[i].Geo.TDB, obs[out[len(out)-1]].Geo.TDB) < gaussSameTimeDays {
			continue
		}
		out = append(out, i)
	}
	return out
}

// gaussCheckMotion reports a track with no two positions more than 3σ apart
// (σ the two positions' larger coordinate uncertainties in quadrature), by
// the two-pass farthest-point scan of the readers' motion check.
func gaussCheckMotion(obs []Observation, idx []int) error {
	ref := idx[0]
	best := 0.0
	for range 2 {
		far, farSep := ref, -1.0
		for _, i := range idx {
			if i == ref {
				continue
			}
			sep := float64(astro.Separation(obs[ref].RA, obs[ref].Dec, obs[i].RA, obs[i].Dec))
			sig := math.Hypot(gaussSigma(&obs[ref]), gaussSigma(&obs[i]))
			if sep > gaussCurvatureSigmas*sig {
				return nil
			}
			best = math.Max(best, sep/sig)
			if sep > farSep {
				far, farSep = i, sep
			}
		}
		ref = far
	}
	return &DegenerateError{Case: DegenerateStationary,
		Reason: fmt.Sprintf("no motion measurable above the noise: the %d positions lie within %.1fσ of each other", len(idx), best),
		Hint:   "a longer arc (and a check that the object is not a star or at a stationary point of its path)"}
}

// gaussSigma returns the larger of an observation's two coordinate σ, radians.
func gaussSigma(o *Observation) float64 { return math.Max(o.SigmaRA, o.SigmaDec) }

// gaussTriples returns the triples (indices into obs) to try, in order (see
// [GaussStarts]).
func gaussTriples(obs []Observation, idx []int) [][3]int {
	n := len(idx)
	t := make([]float64, n)
	night := make([]int, n)
	for k, i := range idx {
		t[k] = gaussDays(obs[i].Geo.TDB, obs[idx[0]].Geo.TDB)
		if k > 0 {
			night[k] = night[k-1]
			if t[k]-t[k-1] > gaussNightGapDays {
				night[k]++
			}
		}
	}
	nights := night[n-1] + 1
	mid := 0.5 * t[n-1]
	// Middle candidates: off the first and last nights first (with three
	// nights or more), then nearest the middle of the arc.
	cand := make([]int, 0, n)
	for k := 1; k < n-1; k++ {
		cand = append(cand, k)
	}
	offEnds := func(k int) bool { return nights < 3 || (night[k] != 0 && night[k] != nights-1) }
	sort.SliceStable(cand, func(a, b int) bool {
		ka, kb := cand[a], cand[b]
		if offEnds(ka) != offEnds(kb) {
			return offEnds(ka)
		}
		return math.Abs(t[ka]-mid) < math.Abs(t[kb]-mid)
	})
	if len(cand) > 3 {
		cand = cand[:3]
	}
	var out [][3]int
	for shift := 0; shift < 3 && len(out) < gaussMaxTriples; shift++ {
		k1, k3 := shift, n-1-shift
		if k3-k1 < 2 {
			break
		}
		for _, k2 := range cand {
			if len(out) >= gaussMaxTriples {
				break
			}
			arc := t[k3] - t[k1]
			if k2 <= k1 || k2 >= k3 || math.Min(t[k2]-t[k1], t[k3]-t[k2]) < gaussMinBalance*arc {
				continue
			}
			out = append(out, [3]int{idx[k1], idx[k2], idx[k3]})
		}
	}
	return out
}

// gaussTriple applies Gauss's method to the observations tr of obs and
// returns the admissible starts, best first.
func gaussTriple(obs []Observation, tr [3]int) ([]Start, *DegenerateError) {
	o := [3]*Observation{&obs[tr[0]], &obs[tr[1]], &obs[tr[2]]}
	tdb2 := o[1].Geo.TDB
	var in GaussInput
	for i := range 3 {
		in.T[i] = gaussDays(o[i].Geo.TDB, tdb2)
		in.L[i] = astro.UnitVector(o[i].RA, o[i].Dec)
		in.R[i] = o[i].Geo.HelioPos
		in.CentreVel[i] = o[i].Geo.SunBaryVel
	}
	in.Mu = ephem.GMSun
	in.C = astro.SpeedOfLightAUDay
	in.MinRange = astro.WGS84EquatorialRadiusKm / astro.AUKm
	in.MinRadius = StartMinSunDistanceAU
	lines := fmt.Sprintf("lines %d, %d, %d", o[0].Line, o[1].Line, o[2].Line)

	if derr := gaussCurvature(&in, o); derr != nil {
		derr.Reason = "observations at " + lines + ": " + derr.Reason
		return nil, derr
	}
	sols, err := Gauss(in)
	if err != nil {
		if d, ok := err.(*DegenerateError); ok {
			return nil, &DegenerateError{Case: d.Case, Reason: "observations at " + lines + ": " + d.Reason, Hint: d.Hint}
		}
		return nil, &DegenerateError{Case: DegenerateNoSolution, Reason: "observations at " + lines + ": " + err.Error(),
			Hint: "observations better spread over a longer arc"}
	}
	var starts []Start
	var buf []float64
	rejected := 0
	for k, s := range sols {
		pos, vel, err := ephem.PropagateUniversal(s.Pos, s.Vel, -s.Epoch, ephem.GMSun)
		if err != nil {
			rejected++
			continue
		}
		st := State{Epoch: tdb2, Pos: pos, Vel: vel}
		ecc := gaussEccentricity(pos, vel, ephem.GMSun)
		if !st.Valid() || !(ecc < StartMaxEccentricity) {
			rejected++
			continue
		}
		var chi2 float64
		buf, chi2, err = st.Residuals(obs, buf[:0])
		if err != nil || math.IsNaN(chi2) || math.IsInf(chi2, 0) {
			rejected++
			continue
		}
		if gaussDuplicate(starts, st) {
			continue
		}
		notes := []string{
			fmt.Sprintf("Gauss's method on the observations at %s (arc %.2f d, %.2f d before and %.2f d after the middle)",
				lines, in.T[2]-in.T[0], -in.T[0], in.T[2]),
			fmt.Sprintf("solution %d of %d, from the root r = %.4f au of the eighth-degree equation; distance from the observer %.4f au, e = %.3f",
				k+1, len(sols), s.Root, s.Range[1], ecc),
		}
		if s.Range[1] < gaussNearObserverAU {
			notes = append(notes, fmt.Sprintf("the distance from the observer, %.4f au, is inside the Earth's sphere of influence: heliocentric two-body motion is a poor model there (often the spurious root near the observer)", s.Range[1]))
		}
		if s.Converged {
			notes = append(notes, fmt.Sprintf("refined with exact f and g and light time in %d Newton steps", s.Iterations))
		} else {
			notes = append(notes, "the refinement did not converge: first approximation (truncated f and g series)")
		}
		starts = append(starts, Start{State: st, Method: MethodGauss, Chi2: chi2, Notes: notes})
	}
	if len(starts) == 0 {
		return nil, &DegenerateError{Case: DegenerateNoSolution,
			Reason: fmt.Sprintf("observations at %s: none of the %d solution(s) is physically admissible (e < %g, r > %g au)",
				lines, len(sols), StartMaxEccentricity, StartMinSunDistanceAU),
			Hint: "observations better spread over a longer arc"}
	}
	sort.SliceStable(starts, func(a, b int) bool { return starts[a].Chi2 < starts[b].Chi2 })
	return starts, nil
}

// gaussCurvature reports a triple whose middle line of sight lies within 3σ
// of the great circle through the outer two.
func gaussCurvature(in *GaussInput, o [3]*Observation) *DegenerateError {
	n := r3.Cross(in.L[0], in.L[2])
	nn := r3.Norm(n)
	tau := in.T[2] - in.T[0]
	w1, w3 := in.T[2]/tau, -in.T[0]/tau
	s1, s2, s3 := gaussSigma(o[0]), gaussSigma(o[1]), gaussSigma(o[2])
	sig := math.Sqrt(s2*s2 + w1*w1*s1*s1 + w3*w3*s3*s3)
	off := 0.0
	if nn > 0 {
		off = math.Abs(r3.Dot(in.L[1], n)) / nn
	}
	if nn > 0 && off > gaussCurvatureSigmas*sig {
		return nil
	}
	where := "one great circle"
	if nn > 0 {
		sun := r3.Scale(-1/r3.Norm(in.R[1]), in.R[1])
		if math.Abs(r3.Dot(sun, n))/nn < math.Sin(float64(astro.Degree)) {
			where = "one great circle through the Sun"
		}
	}
	return &DegenerateError{Case: DegenerateGreatCircle,
		Reason: fmt.Sprintf("the three lines of sight lie on %s within the noise (the middle one %.2f″ off it, σ %.2f″): the track shows no curvature to give the distance",
			where, off/float64(astro.Arcsecond), sig/float64(astro.Arcsecond)),
		Hint: "a longer arc, or observations on a third night"}
}

// gaussEccentricity returns |e| of the two-body orbit (r, v) about gm, from the
// eccentricity vector e = ((v² − gm/r)·r − (r·v)·v)/gm (common practice).
func gaussEccentricity(r, v r3.Vec, gm float64) float64 {
	rn := r3.Norm(r)
	ev := r3.Sub(r3.Scale(r3.Norm2(v)-gm/rn, r), r3.Scale(r3.Dot(r, v), v))
	return r3.Norm(ev) / gm
}

// gaussDuplicate reports whether st is, to 1e-9 relative, the state of one
// of starts (two roots refined to one orbit).
func gaussDuplicate(starts []Start, st State) bool {
	for i := range starts {
		p, v := starts[i].State.Pos, starts[i].State.Vel
		if r3.Norm(r3.Sub(p, st.Pos)) <= 1e-9*r3.Norm(p) && r3.Norm(r3.Sub(v, st.Vel)) <= 1e-9*r3.Norm(v) {
			return true
		}
	}
	return false
}

// gaussDays returns t − t0 in days (two dates on one scale).
func gaussDays(t, t0 astro.JD) float64 { return (t.Day - t0.Day) + (t.Frac - t0.Frac) }
