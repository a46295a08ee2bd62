package orbit

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"arcfit/astro"

	"gonum.org/v1/gonum/spatial/r3"
)

// dcRelDiff returns |a − b|/|b| of two vectors.
func dcRelDiff(a, b r3.Vec) float64 { return r3.Norm(r3.Sub(a, b)) / r3.Norm(b) }

// Noise-free observations of an invented orbit, made by ephem's Kepler-
// equation propagation: the correction must recover the true state from
// starts 1 % and 10 % off in position (and 1 % in velocity). 1e-6 relative is
// the recovery asked for; the two propagations agree to ~1e-13 au (ephem's
// stated accuracy of PropagateUniversal), so any miss is the fit's.
//
// The comet's χ² has a second minimum, a hyperbolic orbit (e ≈ 1.65) with
// χ²/dof ≈ 62: some starts 10 % off fall into it (measured: 3 of 50, seeded).
// Such an outcome is a converged fit and must say that it does not fit the
// observations to their σ; the test asks that it be rare and so labelled.
func TestCorrectFromPerturbedStates(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	const trials = 10
	for _, c := range dcCases() {
		ts, ss := c.schedule()
		obs := dcSynthObservations(t, c.el, ts, ss, 0.5, nil)
		truth := c.truth(t)
		for _, frac := range []float64{0.01, 0.1} {
			secondary := 0
			for trial := 0; trial < trials; trial++ {
				start := dcPerturbed(truth, frac, rng)
				start.Vel = dcPerturbed(truth, 0.01, rng).Vel
				sol, err := Correct(obs, start, Options{})
				if err != nil {
					t.Errorf("%s, %g off, trial %d: %v", c.name, frac, trial, err)
					continue
				}
				dcCheckFinite(t, c.name, sol)
				dp, dv := dcRelDiff(sol.State.Pos, truth.Pos), dcRelDiff(sol.State.Vel, truth.Vel)
				if dp > 1e-6 || dv > 1e-6 {
					if c.name == "comet e=0.9" && frac == 0.1 && sol.Chi2DoF > poorFitChi2DoF && hasNote(sol, "secondary minimum") {
						secondary++
						continue
					}
					t.Errorf("%s, %g off: recovered to %.2g (pos), %.2g (vel) relative, want 1e-6; χ²/dof %.3g", c.name, frac, dp, dv, sol.Chi2DoF)
					continue
				}
				if sol.RMSArcsec > 1e-4 || sol.NumUsed != len(obs) || sol.DoF != 2*len(obs)-6 {
					t.Errorf("%s: rms %.3g″ used %d dof %d", c.name, sol.RMSArcsec, sol.NumUsed, sol.DoF)
				}
				if trial == 0 {
					t.Logf("%s, %g off: %d iterations, Δpos %.2g, Δvel %.2g relative, cond %.3g", c.name, frac, sol.Iterations, dp, dv, sol.Cond)
				}
			}
			if secondary > trials/5 {
				t.Errorf("%s, %g off: %d of %d starts ended in the secondary minimum", c.name, frac, secondary, trials)
			}
		}
	}
}

// Starts 20 % off in position (2 % in velocity) on the comet's arc reach
// either the true orbit or the secondary, hyperbolic minimum (measured: 26
// of 50), or fail with a typed error. Every secondary solution must carry
// the note that it does not fit the observations to their σ.
func TestCorrectSecondaryMinimumLabelled(t *testing.T) {
	c := dcCases()[2]
	ts, ss := c.schedule()
	obs := dcSynthObservations(t, c.el, ts, ss, 0.5, nil)
	truth := c.truth(t)
	rng := rand.New(rand.NewPCG(9, 10))
	secondary := 0
	for trial := 0; trial < 20; trial++ {
		start := dcPerturbed(truth, 0.2, rng)
		start.Vel = dcPerturbed(truth, 0.02, rng).Vel
		sol, err := Correct(obs, start, Options{})
		if err != nil {
			var ce *CorrectError
			if !errors.As(err, &ce) {
				t.Errorf("untyped error %v", err)
			}
			continue
		}
		dcCheckFinite(t, c.name, sol)
		if dcRelDiff(sol.State.Pos, truth.Pos) < 1e-6 {
			continue
		}
		secondary++
		if !(sol.Chi2DoF > poorFitChi2DoF) || !hasNote(sol, "secondary minimum") {
			t.Errorf("a solution off the truth with χ²/dof %.3g and notes %q", sol.Chi2DoF, sol.Notes)
		}
	}
	if secondary == 0 {
		t.Error("no start reached the secondary minimum; the case no longer tests the note")
	}
}

// hasNote reports whether a note of sol contains s.
func hasNote(sol *Solution, s string) bool {
	for _, n := range sol.Notes {
		if strings.Contains(n, s) {
			return true
		}
	}
	return false
}

// dcCheckFinite fails on any NaN or Inf in a solution's numbers.
func dcCheckFinite(t *testing.T, name string, sol *Solution) {
	t.Helper()
	bad := func(x float64) bool { return math.IsNaN(x) || math.IsInf(x, 0) }
	for i := 0; i < 6; i++ {
		for j := 0; j < 6; j++ {
			if bad(sol.Cov.At(i, j)) {
				t.Fatalf("%s: Cov[%d][%d] = %g", name, i, j, sol.Cov.At(i, j))
			}
		}
	}
	for _, x := range []float64{sol.Chi2, sol.Chi2DoF, sol.RMSArcsec, sol.Cond, sol.HSigma, sol.G} {
		if bad(x) {
			t.Fatalf("%s: non-finite statistic in %+v", name, sol)
		}
	}
	for _, r := range sol.Residuals {
		if bad(r.DEArcsec) || bad(r.DNArcsec) || bad(r.Chi2) {
			t.Fatalf("%s: non-finite residual %+v", name, r)
		}
	}
}

// An iteration limit too small, too few observations and a start that
// cannot be computed give typed one-line errors that say what would help.
func TestCorrectErrors(t *testing.T) {
	c := dcCases()[0]
	ts, ss := c.schedule()
	obs := dcSynthObservations(t, c.el, ts, ss, 0.5, nil)
	truth := c.truth(t)
	rng := rand.New(rand.NewPCG(3, 4))

	check := func(name string, err error, want error) {
		t.Helper()
		var ce *CorrectError
		if !errors.As(err, &ce) || !errors.Is(err, want) {
			t.Errorf("%s: error %v, want a *CorrectError wrapping %v", name, err, want)
			return
		}
		msg := err.Error()
		if strings.Contains(msg, "\n") || !strings.HasPrefix(msg, "orbit: ") || strings.Contains(msg, "NaN") {
			t.Errorf("%s: message %q: want one line, prefixed, without NaN", name, msg)
		}
		if ce.Hint == "" || !strings.Contains(msg, "would help") {
			t.Errorf("%s: message %q says nothing of what would help", name, msg)
		}
		if math.IsNaN(ce.Chi2DoF) || math.IsInf(ce.Chi2DoF, 0) {
			t.Errorf("%s: Chi2DoF = %g", name, ce.Chi2DoF)
		}
	}

	_, err := Correct(obs, dcPerturbed(truth, 0.1, rng), Options{MaxIterations: 1})
	check("one iteration", err, ErrNotConverged)

	_, err = Correct(obs[:2], truth, Options{})
	check("two observations", err, ErrTooFewObservations)

	bad := truth
	bad.Pos.X = math.NaN()
	_, err = Correct(obs, bad, Options{})
	check("NaN start", err, ErrInvalidStart)

	bad = truth
	bad.Pos = r3.Vec{}
	_, err = Correct(obs, bad, Options{})
	check("start at the Sun", err, ErrInvalidStart)

	// Three observations of one night from one site cannot fix six
	// parameters well; whatever the outcome, it is a typed error or a
	// finite solution.
	sol, err := Correct(obs[:3], dcPerturbed(truth, 0.01, rng), Options{})
	if err != nil {
		var ce *CorrectError
		if !errors.As(err, &ce) {
			t.Errorf("one night: untyped error %v", err)
		}
	} else {
		dcCheckFinite(t, "one night", sol)
	}

	if _, err := Correct(obs, truth, Options{RejectChi2: -1}); err == nil {
		t.Error("negative threshold accepted")
	}
}

// Observations that no orbit fits (directions scattered at random over a
// few degrees) give a typed error or a finite solution, never NaN.
func TestCorrectScatteredData(t *testing.T) {
	c := dcCases()[0]
	ts, ss := c.schedule()
	obs := dcSynthObservations(t, c.el, ts, ss, 0.5, nil)
	rng := rand.New(rand.NewPCG(5, 6))
	for i := range obs {
		obs[i].RA += astro.Angle(0.05 * (rng.Float64() - 0.5))
		obs[i].Dec += astro.Angle(0.05 * (rng.Float64() - 0.5))
	}
	sol, err := Correct(obs, c.truth(t), Options{})
	if err != nil {
		var ce *CorrectError
		if !errors.As(err, &ce) {
			t.Fatalf("untyped error %v", err)
		}
		t.Logf("scattered data: %v", err)
		return
	}
	dcCheckFinite(t, "scattered", sol)
	if sol.Chi2DoF < 100 {
		t.Errorf("scattered data fitted with χ²/dof %.3g", sol.Chi2DoF)
	}
}

// A 12″ error on one observation of σ = 0.5″ (χ² ≈ 576, far above 11.83) is
// flagged, listed in the notes with its residual, and left out; with KeepAll
// nothing is flagged.
func TestCorrectFlagsOutlier(t *testing.T) {
	c := dcCases()[0]
	ts, ss := c.schedule()
	rng := rand.New(rand.NewPCG(7, 8))
	obs := dcSynthObservations(t, c.el, ts, ss, 0.5, rng)
	bad := 9
	obs[bad].Dec += 12 * astro.Arcsecond
	sol, err := Correct(obs, dcPerturbed(c.truth(t), 0.01, rng), Options{})
	if err != nil {
		t.Fatal(err)
	}
	var flagged []int
	for i, r := range sol.Residuals {
		if r.Flagged {
			flagged = append(flagged, i)
		}
	}
	if len(flagged) != 1 || flagged[0] != bad {
		t.Fatalf("flagged %v, want [%d]; notes %q", flagged, bad, sol.Notes)
	}
	r := sol.Residuals[bad]
	if r.Used || math.Abs(r.DNArcsec-12) > 2 {
		t.Errorf("flagged residual %+v, want unused with ΔN ≈ +12″", r)
	}
	if sol.NumUsed != len(obs)-1 {
		t.Errorf("NumUsed %d, want %d", sol.NumUsed, len(obs)-1)
	}
	found := false
	for _, n := range sol.Notes {
		if strings.Contains(n, "line 11") && strings.Contains(n, "north +1") {
			found = true
		}
	}
	if !found {
		t.Errorf("notes %q do not list line 11 with its residual", sol.Notes)
	}
	keep, err := Correct(obs, sol.State, Options{KeepAll: true})
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range keep.Residuals {
		if r.Flagged || !r.Used {
			t.Errorf("KeepAll flagged %+v", r)
		}
	}
}
