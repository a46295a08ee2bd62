package fit

import (
	"fmt"
	"math"
)

// rejectOutliers runs the iterative rejection described in [Fit] from the
// first solution sol, flagging at most one point per pass. It returns the
// final solution, whose Residuals mark the flagged points.
//
// The test statistic of point i is χ²_i / max(1, (χ² − χ²_i)/(DoF − 2)): its
// normalised 2-dof χ² against the stated covariance, divided by the reduced χ²
// of the other points when that exceeds 1 (a leave-one-out estimate of how
// much the stated σ understate the scatter, so that the statistic stays
// comparable with the χ²(2) threshold). Iterative rejection at a fixed
// threshold is common practice in astrometric reduction.
//
// Reference: Press et al., Numerical Recipes, 3rd ed. (2007), §15.6 (the
// χ²(2) level 11.8 for 99.73 %); §15.7 on the fragility of least squares to
// outliers.
func rejectOutliers(tr *Track, m Model, s Settings, fitU bool, active []bool, sol *Solution, d *design) (*Solution, error) {
	thr := s.RejectChi2
	if thr == 0 {
		thr = DefaultRejectChi2
	}
	nUsed := 0
	for _, a := range active {
		if a {
			nUsed++
		}
	}
	maxFlag := int(math.Floor(MaxRejectFraction * float64(nUsed)))
	need := needFor(m, fitU)
	flagged := 0
	for flagged < maxFlag {
		worst, worstStat := -1, 0.0
		for i, chi2 := range d.ws.chi2 { // the points' χ² under sol
			if !active[i] {
				continue
			}
			scale := 1.0
			if sol.DoF > 2 {
				scale = math.Max(1, (sol.Chi2-chi2)/float64(sol.DoF-2))
			}
			if st := chi2 / scale; st > worstStat {
				worst, worstStat = i, st
			}
		}
		if worst < 0 || worstStat <= thr {
			break
		}
		active[worst] = false
		// Counting distinct times costs a sort; a point count well above the
		// need settles it.
		if (nUsed-flagged-1 < 4*(need+1) && distinctTimes(tr, active) < need+1) ||
			(len(m.Knots) > 0 && checkKnots(tr, m, active) != nil) {
			active[worst] = true
			break
		}
		next, err := solve(tr, m, s, fitU, active, d)
		if err != nil {
			// Removing the point made the design singular: keep it.
			active[worst] = true
			break
		}
		sol = next
		flagged++
	}
	if flagged > 0 {
		sol.Notes = append(sol.Notes, fmt.Sprintf(
			"%d observation(s) flagged as outliers (normalised χ² above %.2f) and left out of the fit; see the residuals",
			flagged, thr))
	}
	return sol, nil
}
