package fit

import (
	"errors"
	"fmt"
	"math"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// ElementsModelName is the model name of a prediction from a published
// element set.
const ElementsModelName = "elements"

// PredictElements returns the position of the body with the element set el
// at the UTC instant utc as seen from site (nil: the geocentre): the
// astrometric ICRS place of [ephem.PlaceOfElements] (two-body motion, light
// time, topocentric observer), its magnitude when el gives H, and its search
// region when el states σ ([ephem.ElementSigma]).
//
// The covariance propagates the stated σ, taken as independent, through the
// Jacobian of the place with respect to the six elements of el's form
// (a, e, i, Ω, ω, M or q, e, i, Ω, ω, Tp), by central differences of ±σ/10 (a
// step small against σ, so the result is the linear propagation, and large
// against rounding): C = Σ_k g_k g_kᵀ σ_k², g_k = ∂(Δα cos δ, Δδ)/∂x_k. Without
// σ the covariance is zero: the element set's own uncertainty is unknown, and
// the search region is a point (the caller should say so). The rate is the
// central difference of the place over ±1 min.
//
// Errors: those of [ephem.PlaceOfElements] (an invalid element set, a time
// outside the supported span).
//
// Reference: covariance propagation, Press et al., Numerical Recipes, 3rd ed.
// (2007), §15.6; the place, Meeus, Astronomical Algorithms, 2nd ed. (1998),
// ch. 33.
func PredictElements(el ephem.Elements, utc astro.JD, site *astro.Site) (Prediction, error) {
	var st *astro.Site
	if site != nil {
		c := *site
		st = &c
	}
	o := ephem.Observer{Site: st, NoRefraction: true}
	pl, err := ephem.PlaceOfElements(el, utc, o)
	if err != nil && !(errors.Is(err, astro.ErrStaleTable) || errors.Is(err, astro.ErrUTCBefore1972)) {
		return Prediction{}, fmt.Errorf("fit: %v", err)
	}
	pr := Prediction{UTC: utc, Site: st, Model: ElementsModelName, RA: pl.RA, Dec: pl.Dec,
		HorizonDays: math.NaN(), Mag: pl.Mag, DeltaAU: pl.DeltaAU, Method: "linear"}
	c := astro.UnitVector(pl.RA, pl.Dec)
	east, north := localEastNorth(c)
	offset := func(e ephem.Elements, t astro.JD) (dE, dN float64, err error) {
		q, err := ephem.PlaceOfElements(e, t, o)
		if err != nil && !(errors.Is(err, astro.ErrStaleTable) || errors.Is(err, astro.ErrUTCBefore1972)) {
			return 0, 0, err
		}
		v := astro.UnitVector(q.RA, q.Dec)
		w := r3.Dot(v, c)
		return r3.Dot(v, east) / w, r3.Dot(v, north) / w, nil
	}
	if sg := el.Sigma; sg != nil {
		as := astro.Arcsecond.Radians()
		for _, k := range elementSteps(el, *sg) {
			if k.sigma == 0 {
				continue
			}
			h := k.sigma / 10
			ep, em := el, el
			k.set(&ep, h)
			k.set(&em, -h)
			e1, n1, err1 := offset(ep, utc)
			e0, n0, err0 := offset(em, utc)
			if err1 != nil || err0 != nil {
				return Prediction{}, fmt.Errorf("fit: the element set's σ of %s reaches an invalid orbit; the search region cannot be formed", k.name)
			}
			gE, gN := (e1-e0)/(2*h)*k.sigma/as, (n1-n0)/(2*h)*k.sigma/as
			pr.CovArcsec2[0][0] += gE * gE
			pr.CovArcsec2[0][1] += gE * gN
			pr.CovArcsec2[1][1] += gN * gN
		}
		pr.CovArcsec2[1][0] = pr.CovArcsec2[0][1]
	}
	e1, n1, err1 := offset(el, utc.AddDays(rateStepDays))
	e0, n0, err0 := offset(el, utc.AddDays(-rateStepDays))
	if err1 == nil && err0 == nil {
		dE, dN := (e1-e0)/2, (n1-n0)/2 // radians per minute
		pr.RateArcsecPerMin = astro.Angle(math.Hypot(dE, dN)).Arcseconds()
		pr.RatePA = astro.Angle(math.Atan2(dE, dN)).Normalized()
	}
	return pr, nil
}

// elementStep is one element to vary: its σ and how to change it.
type elementStep struct {
	name  string
	sigma float64
	set   func(e *ephem.Elements, d float64)
}

// elementSteps lists the six elements of el's form with their σ.
func elementSteps(el ephem.Elements, sg ephem.ElementSigma) []elementStep {
	common := []elementStep{
		{"e", sg.E, func(e *ephem.Elements, d float64) { e.E += d }},
		{"i", float64(sg.I), func(e *ephem.Elements, d float64) { e.I += astro.Angle(d) }},
		{"node", float64(sg.Node), func(e *ephem.Elements, d float64) { e.Node += astro.Angle(d) }},
		{"peri", float64(sg.Peri), func(e *ephem.Elements, d float64) { e.Peri += astro.Angle(d) }},
	}
	if el.A > 0 && el.E < 1 {
		return append(common,
			elementStep{"a", sg.A, func(e *ephem.Elements, d float64) { e.A += d; e.Q = e.A * (1 - e.E) }},
			elementStep{"m", float64(sg.M), func(e *ephem.Elements, d float64) { e.M += astro.Angle(d) }})
	}
	return append(common,
		elementStep{"q", sg.Q, func(e *ephem.Elements, d float64) { e.Q += d }},
		elementStep{"tp", sg.TpDays, func(e *ephem.Elements, d float64) { e.Tp = e.Tp.AddDays(d) }})
}
