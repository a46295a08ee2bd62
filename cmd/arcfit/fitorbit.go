package main

import (
	"fmt"
	"io"
	"math"

	"arcfit/astro"
	"arcfit/fit"
)

// chosenFit is the figures of the chosen model that fit prints, whether a
// sky-plane model or the two-body orbit.
type chosenFit struct {
	rms, chi2DoF, cond float64
	dof, nUsed         int
	scaled             bool
	notes              []string
}

// chosen returns the chosen model's figures.
func chosen(a *analysis) chosenFit {
	if of := a.cmp.Orbit; of != nil {
		s := of.Solution
		return chosenFit{rms: s.RMSArcsec, chi2DoF: s.Chi2DoF, cond: s.Cond, dof: s.DoF, nUsed: s.NumUsed, scaled: s.Scaled,
			notes: append(append([]string{}, s.Notes...), a.cmp.Notes...)}
	}
	s := a.cmp.Solution
	return chosenFit{rms: s.RMSArcsec, chi2DoF: s.Chi2DoF, cond: s.Cond, dof: s.DoF, nUsed: s.NumUsed, scaled: s.Scaled,
		notes: append(append([]string{}, s.Notes...), a.cmp.Notes...)}
}

// orbitResidualRows are the residuals against the chosen orbit.
func orbitResidualRows(a *analysis) []residualRow {
	of := a.cmp.Orbit
	rows := make([]residualRow, 0, len(of.Solution.Residuals))
	for _, r := range of.Solution.Residuals {
		site := ""
		if r.Index >= 0 && r.Index < len(a.set.Obs) {
			site = a.set.Obs[r.Index].Site
		}
		rows = append(rows, residualRow{Line: r.Line, TimeUTC: astro.FormatISO8601(r.UTC, 2), Site: site,
			DRAArcsec: round(r.DEArcsec, 3), DDecArcsec: round(r.DNArcsec, 3), Chi2: round(r.Chi2, 3),
			Flagged: r.Flagged, Used: r.Used})
	}
	return rows
}

// orbitJSONOf is fit --json's orbit part.
type orbitJSONOf struct {
	Elements      fit.ElementsJSON `json:"elements"`
	ElementsSigma fit.ElementsJSON `json:"elements_sigma"`
	Class         string           `json:"orbit_class"`
	ClassReason   string           `json:"orbit_class_reason"`
	H             *float64         `json:"h"`
	HSigma        *float64         `json:"h_sigma"`
	G             *float64         `json:"g"`
	Start         string           `json:"start_method"`
	ElementsNote  string           `json:"elements_note"`
	// Dynamics is "twobody" (model kepler) or "nbody"; ElementsKind says
	// the elements are osculating at the epoch.
	Dynamics     string `json:"dynamics"`
	ElementsKind string `json:"elements_kind"`
	// Encounters are the perturbed orbit's close approaches through the arc
	// and to the predictions (nbody only).
	Encounters []encounterJSON `json:"encounters,omitempty"`
}

// encounterJSON is a close approach in the JSON of fit, predict and night.
type encounterJSON struct {
	Body       string  `json:"body"`
	TimeUTC    string  `json:"time_utc"`
	DistanceAU float64 `json:"distance_au"`
	// Words says it in plain words (fit.EncounterWords).
	Words string `json:"text"`
}

// encounterRecords returns the close approaches of an orbit fit through
// its arc and to the instants at: an empty list for a perturbed orbit that
// has none, nil for two-body motion (no field printed).
func encounterRecords(of *fit.OrbitFit, at []astro.JD) []encounterJSON {
	if of == nil || of.Dynamics() != "nbody" {
		return nil
	}
	out := []encounterJSON{}
	for _, e := range of.Encounters(at...) {
		out = append(out, encounterJSON{Body: e.Body, TimeUTC: fit.EncounterUTC(e), DistanceAU: e.DistanceAU, Words: fit.EncounterWords(e)})
	}
	return out
}

// writeEncounters prints the close approaches, one line each, under a
// heading (nothing for none).
func writeEncounters(w io.Writer, indent string, es []encounterJSON) {
	for _, e := range es {
		fmt.Fprintf(w, "%sclose approach: %s\n", indent, e.Words)
	}
}

// predictionTimes returns the instants of the comparison's predictions (fit
// --at).
func predictionTimes(c *fit.Comparison) []astro.JD {
	for _, r := range c.Rows {
		if len(r.Preds) > 0 {
			ts := make([]astro.JD, len(r.Preds))
			for i, p := range r.Preds {
				ts[i] = p.UTC
			}
			return ts
		}
	}
	return nil
}

// orbitChosenName names the chosen orbit model for fit's text.
func orbitChosenName(of *fit.OrbitFit) string {
	if of.Dynamics() == "nbody" {
		return "nbody (an orbit about the Sun perturbed by the planets and the Moon)"
	}
	return "kepler (a two-body orbit about the Sun)"
}

// orbitValidity is fit's validity line for an orbit model.
func orbitValidity(of *fit.OrbitFit) string {
	if of.Dynamics() == "nbody" {
		return "a perturbed orbit has no polynomial horizon; its search region grows with the distance from the arc"
	}
	return "a two-body orbit has no polynomial horizon; its search region grows with the distance from the arc"
}

// orbitRecord returns the orbit part of fit --json; at are the instants of
// the predictions asked for (their close approaches are included).
func orbitRecord(of *fit.OrbitFit, at []astro.JD) orbitJSONOf {
	el, sg := of.ElementsRecords()
	r := orbitJSONOf{Elements: el, ElementsSigma: sg, Class: of.Class.String(), ClassReason: of.Class.Reason,
		Start: of.Solution.Start, ElementsNote: of.Sigma.Note, Dynamics: of.Dynamics(), ElementsKind: "osculating at the epoch",
		Encounters: encounterRecords(of, at)}
	if of.Solution.NumMag > 0 {
		r.H, r.HSigma, r.G = finite(of.Solution.H), finite(of.Solution.HSigma), finite(of.Solution.G)
	}
	return r
}

// writeOrbitText prints the orbit's elements, class and magnitude, and for
// a perturbed orbit its dynamics and close approaches (through the arc and
// to the instants at).
func writeOrbitText(w io.Writer, of *fit.OrbitFit, at []astro.JD) {
	p := func(format string, args ...any) { fmt.Fprintf(w, format, args...) }
	el, sg := of.Elements, of.Sigma
	if of.Dynamics() == "nbody" {
		p("\norbit: osculating elements at epoch %s TDB, heliocentric (ecliptic and equinox J2000), ± 1σ\n", astro.FormatISO8601(el.Epoch, 3))
		p("  dynamics: the Sun, the eight planets and the Moon (n-body integration); the elements osculate at the epoch and change along the orbit\n")
	} else {
		p("\norbit: osculating heliocentric elements at %s TDB (ecliptic and equinox J2000), ± 1σ\n", astro.FormatISO8601(el.Epoch, 3))
	}
	pm := func(name string, v, s float64, unit string, d int) {
		p("  %-6s %s ± %s%s\n", name, fmtNum(v, d), fmtNum(s, d), unit)
	}
	if !sg.PerihelionForm && el.A > 0 {
		pm("a", el.A, sg.A, " au", 6)
	}
	pm("e", el.E, sg.E, "", 6)
	pm("i", el.I.Degrees(), sg.I.Degrees(), "°", 4)
	pm("node", astro.Angle(el.Node).Normalized().Degrees(), sg.Node.Degrees(), "°", 4)
	pm("peri", astro.Angle(el.Peri).Normalized().Degrees(), sg.Peri.Degrees(), "°", 4)
	if !sg.PerihelionForm && el.A > 0 {
		pm("M", astro.Angle(el.M).Normalized().Degrees(), sg.M.Degrees(), "°", 4)
	}
	pm("q", el.Q, sg.Q, " au", 6)
	if !math.IsNaN(el.Tp.Float()) && el.Tp.Float() != 0 {
		p("  %-6s %s TDB ± %s d\n", "Tp", astro.FormatISO8601(el.Tp, 0), fmtNum(sg.TpDays, 2))
	}
	if sg.Note != "" {
		p("  %s\n", wrapIndent(sg.Note, 76, "  "))
	}
	p("  class: %s\n", of.Class)
	if of.Class.Reason != "" {
		p("    %s\n", wrapIndent(of.Class.Reason, 74, "    "))
	}
	if s := of.Solution; s.NumMag > 0 {
		p("  H = %.2f ± %.2f (G = %.2f, from %d magnitude%s)\n", s.H, s.HSigma, s.G, s.NumMag, plural(s.NumMag))
	}
	p("  start: %s\n", of.Solution.Start)
	writeEncounters(w, "  ", encounterRecords(of, at))
}
