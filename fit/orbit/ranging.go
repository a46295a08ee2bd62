package orbit

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/spatial/r3"
)

// MethodRanging is the [Start.Method] of an initial orbit found by the
// systematic search over the topocentric distance ([RangingStarts]).
const MethodRanging = "ranging"

// RangingMaxStarts is the largest number of starts [RangingStarts] returns.
const RangingMaxStarts = 4

// rgRefineMinima is the number of the grid's local minima refined.
const rgRefineMinima = 6

// RangingError reports observations from which the ranging search cannot
// give an orbit. Its text is one line:
//
//	orbit: ranging: all 4 observations lie within 38 min; below an hour every distance fits the track; what would help: observations over a longer part of the night, or on a second night
type RangingError struct {
	Case   Degeneracy // DegenerateTooFew, DegenerateShortArc, DegenerateStationary or DegenerateNoSolution
	Reason string     // what is wrong with the observations
	Hint   string     // what would help
}

// Error returns the one-line message.
func (e *RangingError) Error() string {
	if e.Hint == "" {
		return "orbit: ranging: " + e.Reason
	}
	return "orbit: ranging: " + e.Reason + "; what would help: " + e.Hint
}

// RangingStarts returns initial orbits for the used observations obs found
// by a systematic search over the topocentric distance, for arcs too short
// for Gauss's method (one or two nights) or where it fails. Each Start has
// Method [MethodRanging], its State at the TDB instant of the used
// observation nearest the middle of the arc, and Chi2 against the used
// observations (as [State.Residuals]; an observation with a place or σ that
// is not finite is left out); best first, at most [RangingMaxStarts].
//
// Method: statistical ranging (Virtanen, Muinonen & Bowell 2001) on a
// systematic grid in the admissible region (Milani et al. 2004). Every trial
// orbit passes through two anchors, A on the first night and B on the last
// (the track's place at one observation's instant, fitted to that night's
// observations from the site, diurnal parallax included; [rgAnchor]), at
// trial distances ρA, ρB from their observers: the orbit through the two
// positions in the time between them, light time included (Lambert's
// problem, [rgLambert]). The trial distances form a grid over the geocentric
// distance ρ at the middle, 0.01–100 au with 12 steps per decade, and its
// rate ρ̇, 25 steps across the interval in which the heliocentric orbit is
// bound ([rgProblem.grid]). Orbits that are not admissible are dropped:
// e ≥ [RangingMaxEccentricity] (only bound orbits are kept), a perihelion
// inside the Sun, a distance from the Sun below [StartMinSunDistanceAU] at
// A or B. The others are scored by their χ² against the used observations
// (a sum cut short once it is clearly not a minimum). The grid's local
// minima, best first, are refined by Levenberg–Marquardt over (ln ρA,
// ln ρB) ([rgProblem.refine]); the distinct results are then polished over
// all six parameters, the anchors' places free too ([rgProblem.mode]).
//
// The starts are starting points for [Correct]. The Notes give the anchors,
// the distances, the orbit's a and e, and the range of distances the grid
// found within Δχ² = 9 of its best node — a wide range says that the arc
// does not determine the distance, and the cloud of [RangingOrbits]
// describes the orbit better than any one start.
//
// Cost: about 1 200 trial orbits on the grid and a few hundred more for the
// refinement, each scored against the observations (BenchmarkRangingStarts).
//
// Errors, each a *[RangingError]: fewer than three used observations at
// distinct times; all within an hour; no motion above the noise; no
// admissible orbit at any node of the grid.
//
// Reference: Virtanen, Muinonen & Bowell, "Statistical ranging of asteroid
// orbits", Icarus 154 (2001), 412–431; Milani, Gronchi, de' Michieli Vitturi
// & Knežević, "Orbit determination with very short arcs. I. Admissible
// regions", Celest. Mech. Dyn. Astron. 90 (2004), 57–85.
func RangingStarts(obs []Observation) ([]Start, error) {
	p, err := rgNewProblem(obs)
	if err != nil {
		return nil, err
	}
	g := p.grid()
	if g.nOK == 0 || math.IsInf(g.best, 1) {
		return nil, &RangingError{Case: DegenerateNoSolution,
			Reason: fmt.Sprintf("no bound heliocentric orbit passes through the anchors (lines %d and %d) at any distance from %g to %g au",
				obs[p.ia].Line, obs[p.ib].Line, rgGridRhoMinAU, rgGridRhoMaxAU),
			Hint: "a check of the observations' times, sites and positions (an artificial satellite, or a mix of two objects?)"}
	}
	var fits []rgFit
	for _, ci := range g.minima(rgRefineMinima) {
		c := g.cells[ci]
		f, ok := p.refine(c.rhoA, c.rhoB)
		if !ok {
			continue
		}
		dup := false
		for k := range fits {
			if math.Abs(math.Log(f.rhoA/fits[k].rhoA)) < 1e-4 && math.Abs(math.Log(f.rhoB/fits[k].rhoB)) < 1e-4 {
				dup = true
				if f.chi2 < fits[k].chi2 {
					fits[k] = f
				}
				break
			}
		}
		if !dup {
			fits = append(fits, f)
		}
	}
	loRho, hiRho := math.Inf(1), 0.0
	for _, c := range g.cells {
		if c.ok && c.full && c.chi2 <= g.best+9 {
			r := 0.5 * (c.rhoA + c.rhoB)
			loRho, hiRho = math.Min(loRho, r), math.Max(hiRho, r)
		}
	}
	// Polish each minimum over all six parameters (the anchors' places
	// free as well).
	for k := range fits {
		if md, ok := p.mode(fits[k].rhoA, fits[k].rhoB); ok && md.chi2 < fits[k].chi2 {
			fits[k].rhoA, fits[k].rhoB = md.th[0], md.th[0]+md.th[1]*p.dt
			fits[k].chi2, fits[k].st = md.chi2, md.st
			fits[k].polished = true
		}
	}
	mid := &obs[p.mid]
	var starts []Start
	for k, f := range fits {
		pos, vel, err := f.st.At(mid.Geo.TDB)
		if err != nil {
			continue
		}
		st := State{Epoch: mid.Geo.TDB, Pos: pos, Vel: vel}
		if !st.Valid() {
			continue
		}
		chi2, _, full := p.chi2(st, p.all, math.Inf(1), nil)
		if !full {
			continue
		}
		e, q := rgConic(pos, vel)
		a := q / (1 - e)
		notes := []string{
			fmt.Sprintf("ranging through anchors at lines %d and %d (%.2f d apart; arc %.2f d, %d night(s)): distance %.4g au at the first, %.4g au at the second",
				obs[p.ia].Line, obs[p.ib].Line, p.dt, p.span, p.night, f.rhoA, f.rhoB),
			fmt.Sprintf("minimum %d of %d refined from the grid (%d Levenberg–Marquardt iterations over the two distances%s): a = %.4g au, e = %.3f, q = %.4g au, r = %.4g au",
				k+1, len(fits), f.iters, rgPolished(f), a, e, q, r3.Norm(pos)),
			fmt.Sprintf("the grid fits within Δχ² = 9 of its best node from %.3g to %.3g au (geocentric distance at mid-arc)", loRho, hiRho),
		}
		starts = append(starts, Start{State: st, Method: MethodRanging, Chi2: chi2, Notes: notes})
	}
	if len(starts) == 0 {
		return nil, &RangingError{Case: DegenerateNoSolution,
			Reason: "no minimum of χ² on the distance grid refined to an admissible orbit",
			Hint:   "a check of the observations (times, sites), or a longer arc"}
	}
	sort.SliceStable(starts, func(a, b int) bool { return starts[a].Chi2 < starts[b].Chi2 })
	if len(starts) > RangingMaxStarts {
		starts = starts[:RangingMaxStarts]
	}
	return starts, nil
}

// rgPolished says in a note whether the six-parameter polish improved a fit.
func rgPolished(f rgFit) string {
	if f.polished {
		return ", then all six parameters"
	}
	return ""
}
