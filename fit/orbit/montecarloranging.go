package orbit

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Constants of the statistical-ranging sampler (see [RangingOrbits]).
const (
	// mcPilotMin is the smallest pilot round; a pilot round is N/4 orbits
	// but at least this many.
	mcPilotMin = 1000
	// mcMaxPilots bounds the pilot rounds that adapt the proposal.
	mcMaxPilots = 10
	// mcPilotESS is the effective sample size two successive pilots need
	// for their agreement to end the pilots; mcDefensiveESS the size a pilot
	// needs for its extent to set the defensive part; below mcCollapseESS
	// its weight sits on one or two orbits and the box is halved about the
	// best instead of fitted.
	mcPilotESS     = 20
	mcDefensiveESS = 50
	mcCollapseESS  = 3
	// mcBoxSigmas is the half-width of the box about the weighted mean, in
	// weighted standard deviations of the pilot's samples.
	mcBoxSigmas = 6
	// mcNormalScale widens the normal part of the proposal to 1.5 times the
	// pilot's weighted covariance (in σ), and mcBoxShare is the share of
	// the defensive part (Hesterberg 1995).
	mcNormalScale = 1.5
	mcBoxShare    = 0.2
	// mcStartScale is the σ of the first proposal of the anchors' offsets,
	// in units of their fitted σ: 1.25, a proposal a little wider than the
	// target (Robert & Casella, Monte Carlo Statistical Methods, 2nd ed.
	// (2004), ch. 3). A pilot that finds nothing halves it.
	mcStartScale = 1.25
	// mcChi2Cut: orbits whose χ² exceeds the best refined χ² by more than
	// this weigh less than exp(−50) ≈ 2e-22 of the best and are dropped
	// (their χ² sum is cut short).
	mcChi2Cut = 100
	// mcEdgeShare: a final round with more weight than this within the
	// outer 5 % of a side of the box (or beyond it) widens that side and is
	// drawn again.
	mcEdgeShare = 0.01
	// mcMaxWiden bounds those redraws.
	mcMaxWiden = 2
)

// mcDraw is one proposed orbit.
type mcDraw struct {
	st State
	th [mcDim]float64
	m  float64 // −2 ln w up to a constant: see [rgProblem.sample]
	ok bool
}

// RangingOrbits draws s.N orbits consistent with the used observations obs
// by statistical ranging, for orbits that a covariance cannot describe (one
// or two nights: the region of acceptable orbits is then long and curved).
//
// Each orbit passes through the two anchors of the ranging ([RangingStarts]
// explains the construction; [rgAnchor] the anchors, fitted to the first
// and the last night): it is fixed by θ = (ρA, ρ̇, ζ₁…ζ₄), the distance at
// anchor A, the mean distance rate ρ̇ = (ρB − ρA)/Δt, and the offsets of the
// anchors' places from their fitted ones in units of their fitted σ. The
// posterior density of θ is taken as
//
//	p(θ) ∝ exp(−χ²(θ)/2)   for admissible orbits, 0 otherwise,
//
// χ² against all the used observations: a prior uniform in the topocentric
// distances and directions, the choice of Virtanen et al. (2001), restricted
// to bound orbits with their perihelion outside the Sun (the admissible
// region of Milani et al. 2004). It is sampled by adaptive importance
// sampling: orbits drawn from a proposal q get the weight w ∝ p(θ)/q(θ).
//
// The proposal: first, a defensive mixture ([mcProposal]) of 80 % the
// Laplace approximation at the most probable θ (a normal distribution with
// 1.5² times the covariance (JᵀJ)⁻¹ there, [rgProblem.mode]) and 20 % the
// box of the systematic grid's nodes within Δχ² = 100 of its best (ρA and ρ̇
// uniform, the offsets normal with σ 1.25). Pilot rounds of N/4 orbits (at
// least 1000) then refit it to their weighted samples: the normal part to
// their weighted mean and 1.5² times their weighted covariance, the
// defensive box to their mean ± 6 weighted σ in (ρA, ρ̇) once their
// effective sample size reaches 50. A pilot in which nothing fits halves the
// offsets' σ; one whose weight sits on one or two orbits (effective size
// below 3) halves the box about its best orbit as well. The pilots stop when
// two successive fits with effective sizes of 20 or more agree (each side of
// their μ ± 6σ box within a fifth of its width), after 10 at most. The
// final round draws N orbits; if more than 1 % of its weight lies in the
// outer 5 % of a side of the box (or beyond), that side is widened by half,
// the normal part by 1.5, and the round drawn again (at most twice; Notes
// report a remaining edge weight).
//
// Orbit i of a round is drawn from its own generator seeded from (s.Seed,
// round, i), so the result does not depend on s.Workers. The returned set
// holds the admissible orbits of the final round with weights summing to 1;
// its EffectiveN says how many equal-weight orbits they are worth.
//
// Errors: those of [RangingStarts] (too few observations, too short an arc,
// no motion, no admissible orbit), and no admissible orbit drawn.
//
// Reference: Virtanen, Muinonen & Bowell, "Statistical ranging of asteroid
// orbits", Icarus 154 (2001), 412–431 (orbits through two observations
// at sampled distances, directions perturbed by the noise, weights from χ²);
// Milani, Gronchi, de' Michieli Vitturi & Knežević, Celest. Mech. Dyn.
// Astron. 90 (2004), 57–85 (admissible region); Cappé, Guillin, Marin &
// Robert, J. Comput. Graph. Stat. 13 (2004), 907–929 (adaptive importance
// sampling); Robert & Casella, Monte Carlo Statistical Methods, 2nd ed.
// (2004), ch. 3 (importance sampling).
func RangingOrbits(obs []Observation, s MonteCarloSettings) (*OrbitSamples, error) {
	s, err := s.resolved()
	if err != nil {
		return nil, err
	}
	p, err := rgNewProblem(obs)
	if err != nil {
		return nil, err
	}
	g := p.grid()
	if g.nOK == 0 || math.IsInf(g.best, 1) {
		return nil, &RangingError{Case: DegenerateNoSolution,
			Reason: fmt.Sprintf("no bound heliocentric orbit passes through the anchors (lines %d and %d) at any distance from %g to %g au",
				obs[p.ia].Line, obs[p.ib].Line, rgGridRhoMinAU, rgGridRhoMaxAU),
			Hint: "a check of the observations' times, sites and positions"}
	}
	// The best refined minimum fixes the χ² scale; the grid nodes near it
	// the first box.
	chiMin := g.best
	box := mcBox{rho0: math.Inf(1), rho1: 0, rd0: math.Inf(1), rd1: math.Inf(-1)}
	include := func(rhoA, rhoB float64) {
		rd := (rhoB - rhoA) / p.dt
		box.rho0, box.rho1 = math.Min(box.rho0, rhoA), math.Max(box.rho1, rhoA)
		box.rd0, box.rd1 = math.Min(box.rd0, rd), math.Max(box.rd1, rd)
	}
	var best rgFit
	best.chi2 = math.Inf(1)
	for _, ci := range g.minima(rgRefineMinima) {
		c := g.cells[ci]
		if f, ok := p.refine(c.rhoA, c.rhoB); ok {
			chiMin = math.Min(chiMin, f.chi2)
			if f.chi2 <= g.best+mcChi2Cut {
				include(f.rhoA, f.rhoB)
			}
			if f.chi2 < best.chi2 {
				best = f
			}
		}
	}
	for _, c := range g.cells {
		if c.ok && c.full && c.chi2 <= g.best+mcChi2Cut {
			include(c.rhoA, c.rhoB)
		}
	}
	step := math.Pow(10, 1.0/rgGridPerDecade)
	w := box.rd1 - box.rd0
	box = mcBox{rho0: box.rho0 / step, rho1: box.rho1 * step, rd0: box.rd0 - 0.2*w - 1e-5, rd1: box.rd1 + 0.2*w + 1e-5}
	box.clip()
	q := mcProposal{box: box, alpha: 1, zs: mcStartScale}
	var last mcBox // the normal part's μ ± 6σ box of the last fit
	fitted := false
	if !math.IsInf(best.chi2, 1) {
		// The first proposal's normal part: the Laplace approximation at the
		// mode over all six parameters.
		if md, ok := p.mode(best.rhoA, best.rhoB); ok {
			if qn, ok := mcNormalProposal(md.th, md.cov); ok {
				last = qn.box
				qn.box, qn.zs = box, mcStartScale
				q = qn
				chiMin = math.Min(chiMin, md.chi2)
			}
		}
	}

	nPilot := max(mcPilotMin, s.N/4)
	prog := mcNewProgress(s.Progress, mcMaxPilots*nPilot+(1+mcMaxWiden)*s.N)
	limit := chiMin + mcChi2Cut
	round := 0
	draws := make([]mcDraw, max(nPilot, s.N))
	for range mcMaxPilots {
		d := draws[:nPilot]
		p.sample(d, &q, limit, s, round, prog)
		round++
		wts, ess := mcWeights(d)
		if ess == 0 {
			// Nothing fits: the anchors' offsets are too wide for the arc.
			q.zs /= 2
			q.alpha = 1
			fitted = false
			continue
		}
		next, ok := mcFitProposal(d, wts)
		if ess < mcCollapseESS || !ok {
			zc := q.zc
			if b := mcBest(d, wts); b >= 0 {
				copy(zc[:], d[b].th[2:])
			}
			q = mcProposal{box: q.box.halvedAbout(d, wts), alpha: 1, zc: zc, zs: q.zs / 2}
			q.box.clip()
			fitted = false
			continue
		}
		nb := next.box
		if ess < mcDefensiveESS {
			// Too few samples to trust their extent: keep the defensive
			// part as it was.
			next.box, next.zc, next.zs = q.box, q.zc, math.Max(q.zs, next.zs)
		}
		agree := fitted && ess >= mcPilotESS && last.agrees(nb)
		q, last, fitted = next, nb, true
		if agree {
			break
		}
	}
	d := draws[:s.N]
	var wts []float64
	var ess, edge float64
	for widen := 0; ; widen++ {
		p.sample(d, &q, limit, s, round, prog)
		round++
		wts, ess = mcWeights(d)
		var sides [4]float64
		sides, edge = q.box.edgeWeight(d, wts)
		if edge <= mcEdgeShare || widen == mcMaxWiden || ess == 0 {
			break
		}
		q.box.widen(sides)
		q.box.clip()
		q.widen(mcNormalScale)
	}
	box = q.box
	prog.finish()
	out := &OrbitSamples{Method: SamplingRanging, Proposed: s.N}
	for i := range d {
		if wts[i] > 0 {
			out.States = append(out.States, d[i].st)
			out.Weights = append(out.Weights, wts[i])
		}
	}
	if len(out.States) == 0 {
		return nil, &RangingError{Case: DegenerateNoSolution,
			Reason: fmt.Sprintf("none of the %d orbits drawn by ranging is admissible and fits the observations", s.N),
			Hint:   "a check of the observations, or a longer arc"}
	}
	out.EffectiveN = ess
	out.Notes = []string{
		fmt.Sprintf("statistical ranging through anchors at lines %d and %d (%.2f d apart, %d night(s)): %d orbits drawn (seed %d), %d admissible, effective sample size %.0f",
			obs[p.ia].Line, obs[p.ib].Line, p.dt, p.night, s.N, s.Seed, len(out.States), ess),
		fmt.Sprintf("distance at the first anchor sampled over %.4g–%.4g au, mean distance rate %.3g to %.3g au/day (%d round(s)); best χ² %.4g against the %d used observation(s)",
			box.rho0, box.rho1, box.rd0, box.rd1, round, chiMin, len(p.all)),
	}
	if edge > mcEdgeShare {
		out.Notes = append(out.Notes, fmt.Sprintf("%.1f%% of the weight lies at the edge of the sampled box: the region may extend beyond it", 100*edge))
	}
	if ess < 100 {
		out.Notes = append(out.Notes, fmt.Sprintf("only %.0f effective samples: the region's shape is rough; more samples would help", ess))
	}
	return out, nil
}

// sample fills d with orbits proposed by q (see [RangingOrbits]); χ² sums
// beyond limit are cut short and count as not admissible. Each admissible
// draw records
//
//	m = −2 ln w = χ² + 2 ln q(θ)
//
// (constants dropped): the posterior exp(−χ²/2) over the proposal.
func (p *rgProblem) sample(d []mcDraw, q *mcProposal, limit float64, s MonteCarloSettings, round int, prog *mcProgress) {
	seed := s.Seed + uint64(round)*0x632be59bd9b4e019
	mcRun(len(d), s.Workers, prog, func() func(i int) {
		var pcg rand.PCG
		r := rand.New(&pcg)
		return func(i int) {
			mcSeed(&pcg, seed, mcStreamRanging, i)
			th := q.draw(r)
			rho, rhoB := th[0], th[0]+th[1]*p.dt
			d[i] = mcDraw{th: th}
			if !(rho > 0) || !(rhoB > 0) {
				return
			}
			ua := p.a.dir(rho, 1, th[2], th[3])
			ub := p.b.dir(rhoB, 1, th[4], th[5])
			st, ok := p.orbit(rho, rhoB, ua, ub)
			if !ok {
				return
			}
			chi2, _, full := p.chi2(st, p.all, limit, nil)
			if !full {
				return
			}
			d[i] = mcDraw{st: st, th: th, m: chi2 + 2*q.lnDensity(th), ok: true}
		}
	})
}

// mcBest returns the index of the draw of largest weight, −1 when none has
// weight.
func mcBest(d []mcDraw, w []float64) int {
	best := -1
	for i := range d {
		if w[i] > 0 && (best < 0 || w[i] > w[best]) {
			best = i
		}
	}
	return best
}

// mcWeights returns the normalised weights exp(−(m − m_min)/2) of the
// admissible draws (0 for the others) and Kish's effective sample size;
// all zero when none is admissible.
func mcWeights(d []mcDraw) ([]float64, float64) {
	w := make([]float64, len(d))
	lo := math.Inf(1)
	for i := range d {
		if d[i].ok {
			lo = math.Min(lo, d[i].m)
		}
	}
	if math.IsInf(lo, 1) {
		return w, 0
	}
	sum := 0.0
	for i := range d {
		if d[i].ok {
			w[i] = math.Exp(-0.5 * (d[i].m - lo))
			sum += w[i]
		}
	}
	s2 := 0.0
	for i := range w {
		w[i] /= sum
		s2 += w[i] * w[i]
	}
	return w, 1 / s2
}

// halvedAbout returns the box of half the widths centred on the draw of
// largest weight (the whole box, doubled, when no draw is admissible).
func (b mcBox) halvedAbout(d []mcDraw, w []float64) mcBox {
	best := -1
	for i := range d {
		if w[i] > 0 && (best < 0 || w[i] > w[best]) {
			best = i
		}
	}
	hr, hd := (b.rho1-b.rho0)/4, (b.rd1-b.rd0)/4
	if best < 0 {
		cr, cd := (b.rho0+b.rho1)/2, (b.rd0+b.rd1)/2
		return mcBox{rho0: cr - 4*hr, rho1: cr + 4*hr, rd0: cd - 4*hd, rd1: cd + 4*hd}
	}
	return mcBox{rho0: d[best].th[0] - hr, rho1: d[best].th[0] + hr, rd0: d[best].th[1] - hd, rd1: d[best].th[1] + hd}
}

// agrees reports whether two boxes overlap in most of their extent: each
// side of c within a fifth of b's width of b's.
func (b mcBox) agrees(c mcBox) bool {
	wr, wd := b.rho1-b.rho0, b.rd1-b.rd0
	return math.Abs(c.rho0-b.rho0) <= 0.2*wr && math.Abs(c.rho1-b.rho1) <= 0.2*wr &&
		math.Abs(c.rd0-b.rd0) <= 0.2*wd && math.Abs(c.rd1-b.rd1) <= 0.2*wd
}

// edgeWeight returns the weight within the outer 5 % of each side (ρ low,
// ρ high, ρ̇ low, ρ̇ high) and the largest of the four.
func (b mcBox) edgeWeight(d []mcDraw, w []float64) ([4]float64, float64) {
	var s [4]float64
	wr, wd := b.rho1-b.rho0, b.rd1-b.rd0
	for i := range d {
		if w[i] == 0 {
			continue
		}
		if d[i].th[0] < b.rho0+0.05*wr && b.rho0 > RangingMinRhoAU*1.0001 {
			s[0] += w[i]
		}
		if d[i].th[0] > b.rho1-0.05*wr {
			s[1] += w[i]
		}
		if d[i].th[1] < b.rd0+0.05*wd {
			s[2] += w[i]
		}
		if d[i].th[1] > b.rd1-0.05*wd {
			s[3] += w[i]
		}
	}
	return s, math.Max(math.Max(s[0], s[1]), math.Max(s[2], s[3]))
}

// widen moves each side carrying more than mcEdgeShare of the weight out by
// half the box's width.
func (b *mcBox) widen(s [4]float64) {
	wr, wd := b.rho1-b.rho0, b.rd1-b.rd0
	if s[0] > mcEdgeShare {
		b.rho0 -= wr / 2
	}
	if s[1] > mcEdgeShare {
		b.rho1 += wr / 2
	}
	if s[2] > mcEdgeShare {
		b.rd0 -= wd / 2
	}
	if s[3] > mcEdgeShare {
		b.rd1 += wd / 2
	}
}

// clip keeps the box within the distances searched and non-empty.
func (b *mcBox) clip() {
	b.rho0 = math.Max(b.rho0, RangingMinRhoAU)
	b.rho1 = math.Min(b.rho1, RangingMaxRhoAU)
	if !(b.rho1 > b.rho0) {
		b.rho1 = b.rho0 * 1.0001
	}
	if !(b.rd1 > b.rd0) {
		m := (b.rd0 + b.rd1) / 2
		b.rd0, b.rd1 = m-1e-7, m+1e-7
	}
}
