package orbit

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"
)

// nbTruth returns the invented case c's state at its epoch as an n-body
// orbit (its elements read as osculating at the epoch).
func nbTruth(t testing.TB, c dcCase) State {
	t.Helper()
	st := c.truth(t)
	st.Motion = NBody
	return st
}

// nbSynthObservations returns observations at the instants ts from the
// sites ss of the orbit truth as this package computes it (one propagation
// to all the instants, the light time by a step from there: [Path.Observe])
// with, when rng is not nil, Gaussian errors of sigmaArcsec per coordinate:
// a self-consistency set, the truth made by the model the fit uses.
func nbSynthObservations(t testing.TB, truth State, ts []astro.JD, ss []*astro.Site, sigmaArcsec float64, rng *rand.Rand) []Observation {
	t.Helper()
	out := make([]Observation, len(ts))
	sig := float64(astro.Angle(sigmaArcsec) * astro.Arcsecond)
	tdbs := make([]astro.JD, len(ts))
	for i := range ts {
		g, err := ephem.ObserverGeometryAt(ts[i], ss[i], 0)
		if err != nil && !errors.Is(err, astro.ErrStaleTable) { // a date past the leap-second table is still computed
			t.Fatal(err)
		}
		name := ""
		if ss[i] != nil {
			name = ss[i].Name
		}
		out[i] = Observation{Index: i, Line: i + 2, Geo: g, SigmaRA: sig, SigmaDec: sig, Site: name, Mag: math.NaN(), Used: true}
		tdbs[i] = g.TDB
	}
	p, err := truth.Propagate(tdbs, false)
	if err != nil {
		t.Fatal(err)
	}
	for i := range out {
		seen, err := p.Observe(i, out[i].Geo)
		if err != nil {
			t.Fatal(err)
		}
		ra, dec, _ := astro.Spherical(seen.Dir)
		out[i].RA, out[i].Dec = ra.Normalized(), dec
	}
	if rng != nil {
		dcAddNoise(out, rng)
	}
	return out
}

// nbYearSchedule returns nights observations a night, 25 min apart, on
// nights spread evenly over spanDays starting 180 days before the case's
// epoch, alternating the two invented sites (c.schedule's pattern).
func nbYearSchedule(c dcCase, nights, perNight int, spanDays float64) ([]astro.JD, []*astro.Site) {
	c.nights = nil
	for k := range nights {
		c.nights = append(c.nights, math.Floor(c.epoch.Day-spanDays/2+spanDays*float64(k)/float64(nights-1))+0.5)
	}
	c.perNight = perNight
	return c.schedule()
}

// nbTruthAt returns the orbit truth moved to the TDB instant epoch by its
// own Motion, as an orbit with that Motion.
func nbTruthAt(t testing.TB, truth State, epoch astro.JD) State {
	t.Helper()
	p, err := truth.Propagate([]astro.JD{epoch}, false)
	if err != nil {
		t.Fatal(err)
	}
	a, err := p.Anchor(0)
	if err != nil {
		t.Fatal(err)
	}
	a.Motion = truth.Motion
	return a
}
