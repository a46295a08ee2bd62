package orbit

import (
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mat"
)

// mcDim is the dimension of the ranging sampler's parameters
// θ = (ρA, ρ̇, ζ₁, ζ₂, ζ₃, ζ₄): the distance at anchor A (au), the mean
// distance rate (ρB − ρA)/Δt (au/day), and the offsets of the anchors' places
// from their fitted ones in units of their fitted σ (ζ₁, ζ₂ for A, ζ₃, ζ₄
// for B; see [rgAnchor.dir]).
const mcDim = 6

// mcBox is a box in the distances: ρA in [rho0, rho1], ρ̇ in [rd0, rd1].
type mcBox struct{ rho0, rho1, rd0, rd1 float64 }

// mcProposal is the proposal density of θ: a defensive mixture of
//
//   - (share alpha) the box, uniform in (ρA, ρ̇), times an isotropic normal
//     N(zc, zs²·I) in the four offsets ζ, and
//   - (share 1 − alpha) a normal N(mu, L·Lᵀ) in all six.
//
// The defensive part keeps the importance weights bounded where the normal
// part falls short of the target's tails.
//
// Reference: Hesterberg, "Weighted average importance sampling and
// defensive mixture distributions", Technometrics 37 (1995), 185–194;
// Cappé, Guillin, Marin & Robert, "Population Monte Carlo", J. Comput.
// Graph. Stat. 13 (2004), 907–929 (proposals adapted from weighted samples).
type mcProposal struct {
	box    mcBox
	zc     [4]float64
	zs     float64
	alpha  float64
	mu     [mcDim]float64
	l      [mcDim][mcDim]float64 // lower triangular
	lnNorm float64               // −ln((2π)³·Π lᵢᵢ)
}

// draw returns a proposal θ. The same deviates are drawn whichever part is
// chosen (one uniform for the choice, two for the box, six normal).
func (q *mcProposal) draw(r *rand.Rand) [mcDim]float64 {
	u, u1, u2 := r.Float64(), r.Float64(), r.Float64()
	var z [mcDim]float64
	for k := range z {
		z[k] = r.NormFloat64()
	}
	var th [mcDim]float64
	if u < q.alpha {
		th[0] = q.box.rho0 + u1*(q.box.rho1-q.box.rho0)
		th[1] = q.box.rd0 + u2*(q.box.rd1-q.box.rd0)
		for k := range 4 {
			th[2+k] = q.zc[k] + q.zs*z[k]
		}
		return th
	}
	for j := range mcDim {
		v := q.mu[j]
		for k := 0; k <= j; k++ {
			v += q.l[j][k] * z[k]
		}
		th[j] = v
	}
	return th
}

// lnDensity returns ln q(θ); +Inf where q underflows to 0 (weight 0).
func (q *mcProposal) lnDensity(th [mcDim]float64) float64 {
	b := q.box
	pb := 0.0
	if th[0] >= b.rho0 && th[0] <= b.rho1 && th[1] >= b.rd0 && th[1] <= b.rd1 {
		s2 := 0.0
		for k := range 4 {
			d := (th[2+k] - q.zc[k]) / q.zs
			s2 += d * d
		}
		pb = q.alpha / ((b.rho1 - b.rho0) * (b.rd1 - b.rd0)) * math.Exp(-0.5*s2-2*math.Log(2*math.Pi)-4*math.Log(q.zs))
	}
	pn := 0.0
	if q.alpha < 1 {
		var y [mcDim]float64
		s2 := 0.0
		for j := range mcDim {
			v := th[j] - q.mu[j]
			for k := 0; k < j; k++ {
				v -= q.l[j][k] * y[k]
			}
			y[j] = v / q.l[j][j]
			s2 += y[j] * y[j]
		}
		pn = (1 - q.alpha) * math.Exp(q.lnNorm-0.5*s2)
	}
	if !(pb+pn > 0) {
		return math.Inf(1) // not reachable for a draw of q; gives weight 0
	}
	return math.Log(pb + pn)
}

// widen scales the normal part's spread and the defensive offsets' σ by f.
func (q *mcProposal) widen(f float64) {
	q.zs *= f
	if q.alpha >= 1 {
		return
	}
	for j := range mcDim {
		for k := range mcDim {
			q.l[j][k] *= f
		}
	}
	q.lnNorm -= mcDim * math.Log(f)
}

// mcFitProposal returns the mixture fitted to weighted draws: the normal
// part with their weighted mean and mcNormalScale² times their weighted
// covariance; the box their mean ± mcBoxSigmas weighted standard deviations
// in (ρA, ρ̇), the defensive offsets centred on their mean with
// mcNormalScale times their largest standard deviation. ok is false for a
// covariance that is not positive definite.
func mcFitProposal(d []mcDraw, w []float64) (mcProposal, bool) {
	var mu [mcDim]float64
	for i := range d {
		for j := range mcDim {
			mu[j] += w[i] * d[i].th[j]
		}
	}
	cov := mat.NewSymDense(mcDim, nil)
	for i := range d {
		if w[i] == 0 {
			continue
		}
		for j := range mcDim {
			for k := j; k < mcDim; k++ {
				cov.SetSym(j, k, cov.At(j, k)+w[i]*(d[i].th[j]-mu[j])*(d[i].th[k]-mu[k]))
			}
		}
	}
	q, ok := mcNormalProposal(mu, cov)
	if !ok {
		return q, false
	}
	zs := 0.0
	for k := range 4 {
		q.zc[k] = mu[2+k]
		zs = math.Max(zs, math.Sqrt(cov.At(2+k, 2+k)))
	}
	q.zs = mcNormalScale * zs
	return q, true
}

// mcNormalProposal returns the mixture whose normal part has mean mu and
// covariance mcNormalScale²·cov, and whose box is mu ± mcBoxSigmas·σ in
// (ρA, ρ̇) (the defensive offsets are left for the caller). ok is false for
// a covariance that is not positive definite.
func mcNormalProposal(mu [mcDim]float64, cov *mat.SymDense) (mcProposal, bool) {
	var ch mat.Cholesky
	if !ch.Factorize(cov) {
		return mcProposal{}, false
	}
	var l mat.TriDense
	ch.LTo(&l)
	f := mcNormalScale
	q := mcProposal{alpha: mcBoxShare, mu: mu}
	q.lnNorm = -0.5 * mcDim * math.Log(2*math.Pi)
	for j := range mcDim {
		for k := 0; k <= j; k++ {
			q.l[j][k] = f * l.At(j, k)
		}
		q.lnNorm -= math.Log(q.l[j][j])
	}
	sr, sd := math.Sqrt(cov.At(0, 0)), math.Sqrt(cov.At(1, 1))
	q.box = mcBox{rho0: mu[0] - mcBoxSigmas*sr, rho1: mu[0] + mcBoxSigmas*sr, rd0: mu[1] - mcBoxSigmas*sd, rd1: mu[1] + mcBoxSigmas*sd}
	q.box.clip()
	return q, true
}
