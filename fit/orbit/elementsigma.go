package orbit

import (
	"fmt"
	"math"

	"arcfit/astro"
	"arcfit/ephem"
)

// nearParabolicE is the eccentricity from which the semi-major axis and the
// mean anomaly of a fitted orbit are not reported as meaningful: the band
// 0.99 ≤ e < 1.01 that [ephem.Elements.StateAt] treats as near-parabolic,
// where a and M change wildly with e while q and Tp stay well determined.
const nearParabolicE = 0.99

// ElementSigma holds the 1-σ uncertainties of the osculating elements of a
// fitted orbit (ecliptic and equinox J2000), from the state covariance.
type ElementSigma struct {
	A float64     // semi-major axis, au
	E float64     // eccentricity
	I astro.Angle // inclination
	// Node, Peri are the σ of the longitude of the ascending node and the
	// argument of perihelion.
	Node, Peri astro.Angle
	M          astro.Angle // mean anomaly at the epoch
	Q          float64     // perihelion distance, au
	TpDays     float64     // time of perihelion, days
	// PerihelionForm reports that a and M are not meaningful — the orbit is
	// hyperbolic, near-parabolic (e ≥ 0.99), or e + 3σ_e reaches 1 — and that
	// q and Tp describe it; A and M are then 0 and Note says why.
	PerihelionForm bool
	Note           string
}

// Elements returns the osculating elements of the fitted orbit at its epoch
// (ecliptic and equinox J2000, [State.Elements]; H and G from the magnitude
// fit, NaN when none) and their 1-σ uncertainties.
//
// The σ propagate the state covariance linearly, C_el = K Cov Kᵀ, through the
// Jacobian K = ∂(a, e, i, Ω, ω, M, q, Tp)/∂(state), formed by central
// differences with the steps of the orbit fit (fdSteps). The differences of
// the angles are taken modulo 2π (unwrapped), and of Tp modulo the period,
// so that a value at the wrap-around (Ω near 0°, M near ±180°, where the
// perihelion passage nearest the epoch jumps by a period) gives the right
// derivative. Near e = 0 the perihelion (ω, M, Tp) and near i = 0 the node
// are ill defined: their σ are then large, as they should be.
//
// For e ≥ 0.99, or e + 3σ_e ≥ 1, a and M are not meaningful (PerihelionForm):
// their σ are 0 and the element set is in the perihelion form q, e, Tp
// (A = 0), as ephem reads comets.
//
// Errors: a state the reduction to elements rejects (radial motion).
//
// Reference: linear propagation of covariance, Press et al., Numerical
// Recipes, 3rd ed. (2007), §15.6; central differences, §5.7; the elements
// from the state, Danby, Fundamentals of Celestial Mechanics, 2nd ed. (1988),
// ch. 6 (via [ephem.ElementsFromState]).
func (s *Solution) Elements() (ephem.Elements, ElementSigma, error) {
	el, err := s.State.Elements()
	if err != nil {
		return ephem.Elements{}, ElementSigma{}, fmt.Errorf("orbit: elements of the fitted orbit: %w", err)
	}
	el.H, el.G = s.H, math.NaN()
	if !math.IsNaN(s.H) {
		el.G = s.G
	}
	x0 := stateVector(s.State)
	h := fdSteps(x0)
	period := math.Inf(1)
	if el.E < 1 && el.A > 0 {
		period = 2 * math.Pi * el.A * math.Sqrt(el.A) / ephem.GaussK
	}
	var k [8][6]float64
	for j := 0; j < 6; j++ {
		xp, xm := x0, x0
		xp[j] += h[j]
		xm[j] -= h[j]
		ep, err := stateOfVector(s.State.Epoch, xp).Elements()
		if err != nil {
			return ephem.Elements{}, ElementSigma{}, fmt.Errorf("orbit: element uncertainties: %w", err)
		}
		em, err := stateOfVector(s.State.Epoch, xm).Elements()
		if err != nil {
			return ephem.Elements{}, ElementSigma{}, fmt.Errorf("orbit: element uncertainties: %w", err)
		}
		vp, vm := elementVector(ep), elementVector(em)
		for i := 0; i < 8; i++ {
			d := vp[i] - vm[i]
			switch {
			case i >= 2 && i <= 5:
				d = float64(astro.Angle(d).Wrapped())
			case i == 7 && !math.IsInf(period, 0):
				d -= period * math.Round(d/period)
			}
			k[i][j] = d / (2 * h[j])
		}
	}
	var sig [8]float64
	for i := 0; i < 8; i++ {
		v := 0.0
		for a := 0; a < 6; a++ {
			if k[i][a] == 0 {
				continue
			}
			for b := 0; b < 6; b++ {
				v += k[i][a] * s.Cov.At(a, b) * k[i][b]
			}
		}
		sig[i] = sqrtNonNeg(v)
	}
	es := ElementSigma{
		A: sig[0], E: sig[1], I: astro.Angle(sig[2]), Node: astro.Angle(sig[3]),
		Peri: astro.Angle(sig[4]), M: astro.Angle(sig[5]), Q: sig[6], TpDays: sig[7],
	}
	if el.E >= nearParabolicE || el.E+3*es.E >= 1 {
		es.PerihelionForm = true
		es.A, es.M = 0, 0
		switch {
		case el.E >= 1:
			es.Note = fmt.Sprintf("e = %.4f ≥ 1: the orbit is open; a and M are not defined, q and Tp describe it", el.E)
		case el.E >= nearParabolicE:
			es.Note = fmt.Sprintf("e = %.4f is near 1: a and M are not meaningful, q and Tp describe the orbit", el.E)
		default:
			es.Note = fmt.Sprintf("e = %.4f ± %.4f reaches 1 within 3σ: a and M are not meaningful, q and Tp describe the orbit", el.E, es.E)
		}
		el.A, el.M = 0, 0
	}
	return el, es, nil
}

// elementVector returns (a, e, i, Ω, ω, M, q, Tp − epoch) of el; for e ≥ 1
// a is q/(1 − e) and M is 0 (not used).
func elementVector(el ephem.Elements) [8]float64 {
	a := el.A
	if el.E >= 1 {
		a = el.Q / (1 - el.E)
	}
	return [8]float64{a, el.E, float64(el.I), float64(el.Node), float64(el.Peri), float64(el.M), el.Q,
		(el.Tp.Day - el.Epoch.Day) + (el.Tp.Frac - el.Epoch.Frac)}
}
