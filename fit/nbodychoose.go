package fit

import (
	"fmt"
	"math"
	"strings"

	"arcfit/astro"
	"arcfit/fit/orbit"
)

// NBodySpanDays is the span of the auto rule for the perturbed orbit: when
// the arc and the prediction horizon together exceed it, the planets matter
// and the nbody fit replaces the two-body one.
//
// The figure is a measurement (fit/orbit's TestNBodySpanMeasurement reruns
// it; docs/models.md has the table): an invented main-belt orbit
// (a = 2.61 au, e = 0.17, i = 9.3°) at eight phases of its orbit and node,
// observed three times a night every other night with 1″ stated σ (an
// amateur's), noise-free places from the n-body integration, fitted with
// two-body motion and predicted. The two-body prediction's bias against the
// perturbed truth, median of the eight (and the worst in the two-body
// region's own σ), by arc and span = arc + horizon:
//
//	arc  3 d:  span 33 d 0.04″,  63 d 0.35″,  93 d 1.3″,  183 d 6.8″  (all < 0.03σ)
//	arc 14 d:  span 29 d 0.01″,  74 d 0.28″ (0.18σ),  104 d 1.1″ (0.32σ)
//	arc 30 d:  span 30 d 0.001″, 60 d 0.06″ (0.47σ),  90 d 0.35″ (0.97σ), 120 d 1.3″ (1.7σ)
//	arc 60 d:  span 60 d 0.007″ (0.59σ),  90 d 0.10″ (2.3σ),  120 d 0.60″ (4.1σ)
//	arc 90 d:  span 90 d 0.02″ (2.2σ),  120 d 0.17″ (6.2σ)
//
// Up to about 40 days the bias is below 0.05″, a twentieth of the amateur
// σ. From 60 days on the worst case reaches half the region's σ for arcs
// of 30–60 days, and beyond it several σ: the two-body region starts to
// miss; a short arc's region is wide enough to hold the bias, but its
// centre is off by a third of an arcsecond and more (worst cases tens of
// arcseconds) for a horizon of two months. So from a span of 60 days the
// perturbed orbit, which costs a few tens of milliseconds more, is used.
const NBodySpanDays = 60

// nbodyNeed says whether the planets matter for an orbit fit of a track
// with predictions at some times, and why.
type nbodyNeed struct {
	need bool
	// spanDays is the arc plus the prediction horizon; reason says why in
	// plain words.
	spanDays float64
	reason   string
}

// planetsMatter applies the auto rule: the planets matter when the arc and
// the horizon of the predictions at (UTC) span more than [NBodySpanDays],
// or when the orbit (the two-body one kf when there is one) integrated with
// the planets from its epoch through the arc and to the predictions passes
// within 0.05 au of the Earth or inside a planet's Hill sphere.
func planetsMatter(tr *Track, kf *OrbitFit, at []astro.JD) nbodyNeed {
	first, last := tr.ArcTT()
	lo, hi := first, last
	var ts []astro.JD
	ts = append(ts, tr.EpochTT.AddDays(first), tr.EpochTT.AddDays(last))
	for _, u := range at {
		tt, err := astro.UTCToTT(u)
		if err != nil && tt == (astro.JD{}) {
			continue
		}
		d := tt.Sub(tr.EpochTT)
		lo, hi = math.Min(lo, d), math.Max(hi, d)
		ts = append(ts, tt)
	}
	n := nbodyNeed{spanDays: hi - lo}
	horizon := (hi - lo) - (last - first)
	if n.spanDays > NBodySpanDays {
		n.need = true
		n.reason = fmt.Sprintf("the arc (%.1f d) and the prediction horizon (%.1f d) span %.0f d, more than the %d d beyond which the planets move a main-belt orbit by as much as an amateur's σ",
			last-first, horizon, n.spanDays, NBodySpanDays)
		return n
	}
	if kf != nil && kf.Solution != nil && kf.Solution.State.Valid() {
		st := kf.Solution.State
		st.Motion = orbit.NBody
		if p, err := st.Propagate(ts, false); err == nil {
			for _, e := range mergeEncounters(p.Encounters) {
				n.need = true
				n.reason = "the two-body orbit, integrated with the planets, passes " + EncounterWords(e) + ", during the arc or before the prediction"
				return n
			}
		}
	}
	n.reason = fmt.Sprintf("the arc (%.1f d) and the prediction horizon (%.1f d) span %.0f d, within the %d d in which the planets move a main-belt orbit by less than an amateur's σ, and the orbit passes no planet closely",
		last-first, horizon, n.spanDays, NBodySpanDays)
	return n
}

// nbodyRowFor fits the perturbed orbit for the comparison: corrected from
// the kepler row's orbit when it has one (nbodyFromKepler), else determined
// afresh ([FitNBody]); cross-validated night by night like the kepler row,
// each fold corrected with the planets from the whole arc's solution.
func nbodyRowFor(tr *Track, s Settings, kf *OrbitFit) ModelRow {
	var of *OrbitFit
	var err error
	if kf != nil {
		of, err = nbodyFromKepler(kf, s)
	}
	if of == nil {
		of, err = FitNBody(tr, s)
	}
	var fold foldFit
	if of != nil {
		start := of.Solution.State
		fold = func(obs []orbit.Observation) (*orbit.Solution, error) {
			return orbit.Correct(obs, start, orbit.Options{KeepAll: true})
		}
	}
	return orbitRow(tr, NBody(), of, err, fold)
}

// chooseNBody decides whether the nbody row replaces the model chosen so
// far (index chosen, the kepler row or a sky-plane one; sky is the best
// sky-plane row): when the planets matter (need) and the perturbed orbit
// passes the data tests of [chooseKepler] against the sky-plane model.
// It returns the index and the reason ("" when there is no nbody row).
func chooseNBody(c *Comparison, tr *Track, chosen, sky int, need nbodyNeed) (int, string) {
	k := -1
	for i, r := range c.Rows {
		if r.Spec.Kind == KindNBody {
			k = i
		}
	}
	if k < 0 {
		return chosen, ""
	}
	nr := c.Rows[k]
	if !need.need {
		return chosen, "nbody not used: " + need.reason
	}
	if nr.Orbit == nil {
		return chosen, "nbody not used: " + oneLineReason(nr.Err)
	}
	if nr.Orbit.RangingOnly && tr.NumNights < 2 {
		return chosen, "nbody not used: one night cannot determine an orbit (its region, from sampled orbits, is given with --model nbody); a second night would help"
	}
	if sky < 0 {
		return chosen, ""
	}
	if why := orbitDataTest(nr, c.Rows[sky]); why != "" {
		return chosen, "nbody not used: " + why
	}
	was := c.Rows[chosen].Model
	return k, fmt.Sprintf("nbody: the planets matter — %s; the perturbed orbit fits the data (χ²/dof %.2f) and replaces %s (osculating elements at the epoch, started from %s)",
		need.reason, nr.Orbit.Solution.Chi2DoF, was, startName(nr.Orbit.Solution.Start))
}

// Encounter distances are said in Earth radii below one lunar distance and
// in lunar distances up to 0.05 au, for the Earth and the Moon: the
// equatorial radius 6378.137 km (IAU 2015 Resolution B3, nominal) and the
// mean Earth–Moon distance 384 400 km (common practice).
const (
	earthRadiusKm     = 6378.137
	lunarDistanceKm   = 384400.0
	encounterTimeDigs = 0
)

// EncounterWords says a close approach in plain words: the body, the date
// and time UTC (to the minute) and the distance in au, with Earth radii or
// lunar distances for the Earth and the Moon, and the Hill sphere for a
// planet: "the Earth on 2027-02-03 14:20 UTC at 0.0182 au (7.1 lunar
// distances)".
func EncounterWords(e orbit.Encounter) string {
	body := e.Body
	switch body {
	case "Earth", "Moon", "Sun":
		body = "the " + body
	}
	when := EncounterUTC(e)
	km := e.DistanceAU * astro.AUKm
	var dist string
	switch {
	case e.Body == "Earth" || e.Body == "Moon":
		if km < lunarDistanceKm {
			dist = fmt.Sprintf("%.4g au (%.1f Earth radii)", e.DistanceAU, km/earthRadiusKm)
		} else {
			dist = fmt.Sprintf("%.4g au (%.1f lunar distances)", e.DistanceAU, km/lunarDistanceKm)
		}
	default:
		dist = fmt.Sprintf("%.4g au, inside its Hill sphere of %.3g au", e.DistanceAU, e.HillAU)
	}
	s := fmt.Sprintf("%s on %s at %s", body, when, dist)
	if e.AtEnd {
		s += " (still approaching at the end of the integration)"
	}
	return s
}

// EncounterUTC returns the encounter's instant as UTC ISO 8601 to the
// minute ("2027-02-03T14:20Z"); the TDB instant when the leap-second table
// cannot serve it.
func EncounterUTC(e orbit.Encounter) string {
	utc, err := astro.TTToUTC(astro.TDBToTT(e.TDB))
	if err != nil && utc == (astro.JD{}) {
		return astro.FormatISO8601(e.TDB, encounterTimeDigs) + " TDB"
	}
	s := astro.FormatISO8601(utc.AddSeconds(30), encounterTimeDigs) // rounded to the minute below
	// To the minute: drop the seconds.
	if i := strings.LastIndex(s, ":"); i > 0 && strings.HasSuffix(s, "Z") && i > strings.Index(s, "T")+3 {
		s = s[:i] + "Z"
	}
	return s
}
