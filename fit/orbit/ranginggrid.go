package orbit

import (
	"math"
	"sort"

	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// The systematic grid of the ranging search.
const (
	// rgGridRhoMinAU … rgGridRhoMaxAU, log-spaced with rgGridPerDecade
	// distances per decade (a step of 21 %): the geocentric distance at the
	// middle of the arc.
	rgGridRhoMinAU  = 0.01
	rgGridRhoMaxAU  = 100.0
	rgGridPerDecade = 12
	// rgGridRates is the number of distance rates per distance, spread
	// evenly over the bound interval of the rate.
	rgGridRates = 25
	// rgEnergySlack widens the bound interval of the rate (GM taken 25 %
	// larger): the interval comes from a linear model of the track, and the
	// exact test (e < 1 for the orbit through A and B) follows.
	rgEnergySlack = 1.25
)

// rgCell is one node of the grid: the distances from the observers of A and
// B and the χ² of the orbit through them against the used observations.
type rgCell struct {
	rhoA, rhoB float64
	chi2       float64
	ok         bool // an admissible orbit
	full       bool // χ² summed over every observation (not cut short)
}

// rgGrid is the grid over (ρ, ρ̇): nRho distances by nRate rates.
type rgGrid struct {
	nRho, nRate int
	rho         []float64
	cells       []rgCell
	best        float64 // smallest full χ²
	nOK         int
}

// grid evaluates the systematic grid over the geocentric distance ρ at the
// middle of the arc A–B and its rate ρ̇, in the admissible region of Milani
// et al. (2004): for each ρ the rates for which the heliocentric two-body
// energy is negative,
//
//	E(ρ, ρ̇) = ½|Ȯ + ρ·u̇ + ρ̇·u|² − GM/|O + ρ·u| < 0,
//
// an interval ρ̇ ∈ −b ± √(b² − |Ȯ + ρu̇|² + 2GM/|O + ρu|), b = u·Ȯ (u·u̇ = 0),
// with O, Ȯ the geocentre at the middle (cubic Hermite interpolation between
// A's and B's observers), u the mean direction and u̇ the mean angular
// velocity of the track between A and B, both corrected for A's and B's
// diurnal parallax at the distance ρ. Each node (ρ, ρ̇) is turned into the
// distances ρA = ρ − ρ̇·Δt/2, ρB = ρ + ρ̇·Δt/2 of the statistical ranging of
// Virtanen et al. (2001), and the orbit through the anchors A and B at those
// distances ([rgAnchor.dir]) is scored by its χ² against the used
// observations.
//
// Reference: Milani, Gronchi, de' Michieli Vitturi & Knežević, "Orbit
// determination with very short arcs. I. Admissible regions", Celest. Mech.
// Dyn. Astron. 90 (2004), 57–85 (the energy condition as a quadratic in
// ρ̇); Virtanen, Muinonen & Bowell, "Statistical ranging of asteroid orbits",
// Icarus 154 (2001), 412–431 (orbits through two observations at trial
// distances).
func (p *rgProblem) grid() *rgGrid {
	n := int(math.Round(math.Log10(rgGridRhoMaxAU/rgGridRhoMinAU)*rgGridPerDecade)) + 1
	g := &rgGrid{nRho: n, nRate: rgGridRates, rho: make([]float64, n), cells: make([]rgCell, n*rgGridRates), best: math.Inf(1)}
	h := p.dt
	oa := r3.Sub(p.ga.HelioPos, p.ga.GeoPos)
	ob := r3.Sub(p.gb.HelioPos, p.gb.GeoPos)
	va, vb := p.ga.HelioVel, p.gb.HelioVel
	o0 := r3.Add(r3.Scale(0.5, r3.Add(oa, ob)), r3.Scale(h/8, r3.Sub(va, vb)))
	v0 := r3.Sub(r3.Scale(1.5/h, r3.Sub(ob, oa)), r3.Scale(0.25, r3.Add(va, vb)))
	for i := range n {
		rho := rgGridRhoMinAU * math.Pow(10, float64(i)/rgGridPerDecade)
		g.rho[i] = rho
		da := r3.Unit(r3.Add(p.ga.GeoPos, r3.Scale(rho, p.a.dir(rho, 0, 0, 0))))
		db := r3.Unit(r3.Add(p.gb.GeoPos, r3.Scale(rho, p.b.dir(rho, 0, 0, 0))))
		u0 := r3.Unit(r3.Add(da, db))
		ud := r3.Scale(1/h, r3.Sub(db, da))
		ud = r3.Sub(ud, r3.Scale(r3.Dot(ud, u0), u0))
		w := r3.Add(v0, r3.Scale(rho, ud))
		b := r3.Dot(u0, v0)
		disc := b*b - r3.Norm2(w) + 2*rgEnergySlack*ephem.GMSun/r3.Norm(r3.Add(o0, r3.Scale(rho, u0)))
		if !(disc > 0) {
			continue
		}
		s := math.Sqrt(disc)
		lo, step := -b-s, 2*s/rgGridRates
		for k := range rgGridRates {
			rd := lo + (float64(k)+0.5)*step
			c := &g.cells[i*rgGridRates+k]
			c.rhoA, c.rhoB = rho-rd*h/2, rho+rd*h/2
			st, ok := p.orbit(c.rhoA, c.rhoB, p.a.dir(c.rhoA, 0, 0, 0), p.b.dir(c.rhoB, 0, 0, 0))
			if !ok {
				continue
			}
			limit := math.Inf(1)
			if !math.IsInf(g.best, 1) {
				limit = 2*g.best + 50 + 4*float64(len(p.all))
			}
			chi2, _, full := p.chi2(st, p.all, limit, nil)
			if math.IsInf(chi2, 1) {
				continue
			}
			c.ok, c.full, c.chi2 = true, full, chi2
			g.nOK++
			if full && chi2 < g.best {
				g.best = chi2
			}
		}
	}
	return g
}

// minima returns the indices of the grid's local minima (full nodes whose χ²
// is not above that of any of their eight neighbours that are full), best
// first, at most max of them.
func (g *rgGrid) minima(max int) []int {
	var out []int
	for i := range g.nRho {
		for k := range g.nRate {
			c := g.cells[i*g.nRate+k]
			if !c.ok || !c.full {
				continue
			}
			isMin := true
			for di := -1; di <= 1 && isMin; di++ {
				for dk := -1; dk <= 1; dk++ {
					ii, kk := i+di, k+dk
					if (di == 0 && dk == 0) || ii < 0 || kk < 0 || ii >= g.nRho || kk >= g.nRate {
						continue
					}
					nb := g.cells[ii*g.nRate+kk]
					if nb.ok && nb.full && nb.chi2 < c.chi2 {
						isMin = false
						break
					}
				}
			}
			if isMin {
				out = append(out, i*g.nRate+k)
			}
		}
	}
	sort.SliceStable(out, func(a, b int) bool { return g.cells[out[a]].chi2 < g.cells[out[b]].chi2 })
	if len(out) > max {
		out = out[:max]
	}
	return out
}
