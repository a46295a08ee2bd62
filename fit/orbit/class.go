package orbit

import (
	"fmt"
	"math"

	"arcfit/ephem"
)

// Reference distances of the orbit classes (au).
const (
	// jupiterAAU is Jupiter's mean semi-major axis, 5.2026 au (J2000 mean
	// elements, Standish, "Keplerian elements for approximate positions of
	// the major planets", JPL (1992); value from memory).
	jupiterAAU = 5.2026
	// neptuneAAU is Neptune's mean semi-major axis, 30.07 au (same source,
	// from memory).
	neptuneAAU = 30.07
	// marsQAU is Mars's aphelion distance, 1.666 au, the boundary of the
	// Mars-crossers and the inner edge of the main belt (common practice).
	marsQAU = 1.666
	// earthQAU and earthqAU are the Earth's aphelion and perihelion
	// distances, 1.017 and 0.983 au, the boundaries of the near-Earth
	// subclasses (common practice).
	earthQAU = 1.017
	earthqAU = 0.983
	// daysPerYear is the Julian year, 365.25 days.
	daysPerYear = 365.25
)

// Class is the plain orbit class of an element set.
type Class struct {
	// Name is the class in plain words: "near-Earth", "Mars-crosser",
	// "Hungaria", "main belt", "outer main belt", "Hilda", "Jupiter trojan",
	// "Centaur", "trans-Neptunian", "Jupiter family", "Halley type",
	// "long period", "near-parabolic", "hyperbolic", or "other".
	Name string
	// Subclass refines it where common practice does: for near-Earth orbits
	// "Atira", "Aten", "Apollo" or "Amor"; for the main belt "inner",
	// "middle" or "outer"; "" otherwise.
	Subclass string
	// Reason states the boundaries the orbit falls within, with its values.
	Reason string
	// TisserandJ is the Tisserand parameter with respect to Jupiter.
	TisserandJ float64
	// PeriodYears is the orbital period, 0 for an open orbit.
	PeriodYears float64
	// CometLike reports an orbit of a kind comets have (T_J < 3 outside the
	// Hildas and trojans, or e ≥ 0.98): the class says nothing about whether
	// the object shows activity.
	CometLike bool
}

// String returns the class and subclass, "near-Earth (Apollo)".
func (c Class) String() string {
	if c.Subclass == "" {
		return c.Name
	}
	return c.Name + " (" + c.Subclass + ")"
}

// Tisserand returns the Tisserand parameter of an orbit with respect to
// Jupiter,
//
//	T_J = a_J/a + 2 cos i √((a/a_J)(1 − e²)) = a_J(1 − e)/q + 2 cos i √(q(1 + e)/a_J),
//
// the second form valid for every conic (a(1 − e²) = q(1 + e) is the
// semi-latus rectum). i is measured from the ecliptic, as common practice
// does (Jupiter's orbit is inclined 1.3° to it). a_J = 5.2026 au.
//
// Reference: Murray & Dermott, Solar System Dynamics (1999), §3.4, eq. 3.43;
// Levison, "Comet taxonomy", ASP Conf. Ser. 107 (1996), 173.
func Tisserand(el ephem.Elements) float64 {
	q := perihelionDistance(el)
	return jupiterAAU*(1-el.E)/q + 2*math.Cos(float64(el.I))*math.Sqrt(q*(1+el.E)/jupiterAAU)
}

// perihelionDistance returns el.Q, or a(1 − e) when the element set is in
// the mean-anomaly form without Q.
func perihelionDistance(el ephem.Elements) float64 {
	if el.Q > 0 {
		return el.Q
	}
	return el.A * (1 - el.E)
}

// Classify returns the plain orbit class of the element set el (heliocentric,
// ecliptic J2000) from its perihelion distance q, semi-major axis a,
// eccentricity e, inclination i and the Tisserand parameter T_J.
//
// The boundaries are common practice (as the minor-planet and comet
// literature draws them; they are conventions, not physics, and sources
// differ by a few hundredths of an au). They are tried in this order:
//
//	hyperbolic        e > 1 (open orbit)
//	near-parabolic    e ≥ 0.98
//	near-Earth        q < 1.3 au: Atira Q < 0.983 au; Aten a < 1 au, Q ≥ 0.983 au;
//	                  Apollo a ≥ 1 au, q < 1.017 au; Amor 1.017 ≤ q < 1.3 au
//	trans-Neptunian   a > 30.07 au (Neptune) and T_J ≥ 2
//	Centaur           5.5 < a ≤ 30.07 au, q > 5.2 au (between Jupiter and Neptune)
//	Jupiter trojan    5.05 < a < 5.35 au, e < 0.3
//	Hilda             3.7 < a < 4.2 au, e < 0.3, i < 20° (the 3:2 resonance)
//	Halley type       T_J < 2, P ≤ 200 yr
//	long period       T_J < 2, P > 200 yr
//	Jupiter family    2 ≤ T_J < 3, P < 20 yr
//	Halley type       2 ≤ T_J < 3, 20 ≤ P ≤ 200 yr
//	Mars-crosser      1.3 ≤ q < 1.666 au, a < 3.2 au
//	Hungaria          1.78 < a < 2.0 au, e < 0.18, 16° < i < 34°
//	main belt         2.0 < a < 3.3 au, q ≥ 1.666 au: inner a < 2.5, middle
//	                  2.5 ≤ a < 2.82, outer a ≥ 2.82 (the 3:1 and 5:2 Kirkwood gaps)
//	outer main belt   3.3 ≤ a < 5.05 au, T_J ≥ 3 (the Cybele region and beyond)
//	other             anything else
//
// The comet classes follow the Tisserand scheme of Levison (1996), with the
// classical 20-year and 200-year periods; an orbit in them is CometLike, but
// an orbit class cannot tell a comet from an asteroid.
//
// Reference: Levison, "Comet taxonomy", ASP Conf. Ser. 107 (1996), 173 (T_J
// classes); the near-Earth subclasses and the belt boundaries as used in the
// minor-planet literature (common practice; e.g. Bottke et al., Asteroids III
// (2002), p. 409 for the near-Earth definitions).
func Classify(el ephem.Elements) Class {
	e := el.E
	q := perihelionDistance(el)
	i := float64(el.I) * 180 / math.Pi
	c := Class{TisserandJ: Tisserand(el)}
	if !(q > 0) || math.IsNaN(e) || math.IsInf(q, 0) {
		c.Name, c.Reason = "other", "the element set has no valid perihelion distance"
		return c
	}
	a := math.Inf(1)
	if e < 1 {
		a = q / (1 - e)
		c.PeriodYears = a * math.Sqrt(a) * 2 * math.Pi / ephem.GaussK / daysPerYear
	}
	bigQ := a * (1 + e)
	tj := c.TisserandJ
	p := c.PeriodYears
	set := func(name, sub, reason string, comet bool) Class {
		c.Name, c.Subclass, c.Reason, c.CometLike = name, sub, reason, comet
		return c
	}
	switch {
	case e > 1:
		return set("hyperbolic", "", fmt.Sprintf("e = %.4f > 1: an open orbit", e), true)
	case e >= 0.98:
		return set("near-parabolic", "", fmt.Sprintf("e = %.4f ≥ 0.98", e), true)
	case q < 1.3:
		sub, why := "", ""
		switch {
		case bigQ < earthqAU:
			sub, why = "Atira", fmt.Sprintf("aphelion Q = %.3f au < %.3f au (inside the Earth's orbit)", bigQ, earthqAU)
		case a < 1:
			sub, why = "Aten", fmt.Sprintf("a = %.3f au < 1 au, Q = %.3f au ≥ %.3f au", a, bigQ, earthqAU)
		case q < earthQAU:
			sub, why = "Apollo", fmt.Sprintf("a = %.3f au ≥ 1 au, q < %.3f au", a, earthQAU)
		default:
			sub, why = "Amor", fmt.Sprintf("%.3f ≤ q < 1.3 au", earthQAU)
		}
		return set("near-Earth", sub, fmt.Sprintf("q = %.3f au < 1.3 au; %s", q, why), tj < 3)
	case a > neptuneAAU && tj >= 2:
		return set("trans-Neptunian", "", fmt.Sprintf("a = %.2f au > %.2f au (Neptune), T_J = %.2f", a, neptuneAAU, tj), false)
	case a > 5.5 && a <= neptuneAAU && q > jupiterAAU:
		return set("Centaur", "", fmt.Sprintf("5.5 < a = %.2f ≤ %.2f au and q = %.2f au > %.2f au (between Jupiter and Neptune)", a, neptuneAAU, q, jupiterAAU), tj < 3)
	case a > 5.05 && a < 5.35 && e < 0.3:
		return set("Jupiter trojan", "", fmt.Sprintf("5.05 < a = %.3f < 5.35 au, e = %.3f < 0.3 (Jupiter's distance)", a, e), false)
	case a > 3.7 && a < 4.2 && e < 0.3 && i < 20:
		return set("Hilda", "", fmt.Sprintf("3.7 < a = %.3f < 4.2 au, e = %.3f < 0.3, i = %.1f° < 20° (the 3:2 resonance with Jupiter)", a, e, i), false)
	case tj < 2 && p <= 200:
		return set("Halley type", "", fmt.Sprintf("T_J = %.2f < 2, P = %.1f yr ≤ 200 yr", tj, p), true)
	case tj < 2:
		return set("long period", "", fmt.Sprintf("T_J = %.2f < 2, P = %.0f yr > 200 yr", tj, p), true)
	case tj < 3 && p < 20:
		return set("Jupiter family", "", fmt.Sprintf("2 ≤ T_J = %.2f < 3, P = %.1f yr < 20 yr", tj, p), true)
	case tj < 3 && p <= 200:
		return set("Halley type", "", fmt.Sprintf("2 ≤ T_J = %.2f < 3, 20 ≤ P = %.1f yr ≤ 200 yr", tj, p), true)
	case q < marsQAU && a < 3.2:
		return set("Mars-crosser", "", fmt.Sprintf("1.3 ≤ q = %.3f < %.3f au (Mars's aphelion), a = %.3f au < 3.2 au", q, marsQAU, a), false)
	case a > 1.78 && a < 2.0 && e < 0.18 && i > 16 && i < 34:
		return set("Hungaria", "", fmt.Sprintf("1.78 < a = %.3f < 2.0 au, e = %.3f < 0.18, 16° < i = %.1f° < 34°", a, e, i), false)
	case a > 2.0 && a < 3.3 && q >= marsQAU:
		sub := "outer"
		switch {
		case a < 2.5:
			sub = "inner"
		case a < 2.82:
			sub = "middle"
		}
		return set("main belt", sub, fmt.Sprintf("2.0 < a = %.3f < 3.3 au, q = %.3f au ≥ %.3f au", a, q, marsQAU), false)
	case a >= 3.3 && a < 5.05 && q >= marsQAU:
		return set("outer main belt", "", fmt.Sprintf("3.3 ≤ a = %.3f < 5.05 au, T_J = %.2f ≥ 3", a, tj), false)
	}
	return set("other", "", fmt.Sprintf("q = %.3f au, a = %.3f au, e = %.3f, T_J = %.2f fall in none of the plain classes", q, a, e, tj), tj < 3)
}
