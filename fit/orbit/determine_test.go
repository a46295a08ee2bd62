package orbit

import (
	"errors"
	"math/rand/v2"
	"strings"
	"testing"
)

// Determine from the observations alone (Gauss's method, then the
// correction) recovers the invented orbits: to 1e-6 relative from
// noise-free data, and to within 5σ of the stated position covariance with
// 0.5″ noise (seeded; a 5σ miss in one of three fits has odds ~1e-5).
func TestDetermine(t *testing.T) {
	for _, c := range dcCases() {
		ts, ss := c.schedule()
		obs := dcSynthObservations(t, c.el, ts, ss, 0.5, nil)
		sol, err := Determine(obs, Options{})
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		truth := c.truth(t)
		at, _, err := sol.State.At(truth.Epoch)
		if err != nil {
			t.Fatal(err)
		}
		if d := dcRelDiff(at, truth.Pos); d > 1e-6 {
			t.Errorf("%s: noise-free Determine off by %.2g relative (start %s, notes %q)", c.name, d, sol.Start, sol.Notes)
		}
		if sol.Start != MethodGauss || !strings.Contains(sol.Notes[0], "start(s) tried") {
			t.Errorf("%s: start %q, notes %q", c.name, sol.Start, sol.Notes)
		}
		dcCheckFinite(t, c.name, sol)

		rng := rand.New(rand.NewPCG(61, 62))
		dcAddNoise(obs, rng)
		sol, err = Determine(obs, Options{})
		if err != nil {
			t.Fatalf("%s, noisy: %v", c.name, err)
		}
		// Compare at the solution's epoch.
		tp, _, err := truth.At(sol.State.Epoch)
		if err != nil {
			t.Fatal(err)
		}
		sp, _ := sol.Sigma()
		d := [3]float64{sol.State.Pos.X - tp.X, sol.State.Pos.Y - tp.Y, sol.State.Pos.Z - tp.Z}
		for k := 0; k < 3; k++ {
			if d[k] > 5*sp[k] || d[k] < -5*sp[k] {
				t.Errorf("%s, noisy: position %d off by %.3g au, σ %.3g", c.name, k, d[k], sp[k])
			}
		}
	}
}

// Observations of a single night give no orbit by Gauss's method; Determine
// falls back to the distance search and then either reports a solution
// (from a "ranging" start) or a typed error that says what would help —
// never NaN. Two observations give an error naming both methods.
func TestDetermineShortArc(t *testing.T) {
	c := dcCases()[0]
	ts, ss := c.schedule()
	obs := dcSynthObservations(t, c.el, ts[:4], ss[:4], 0.5, rand.New(rand.NewPCG(63, 64)))
	sol, err := Determine(obs, Options{})
	if err != nil {
		var ce *CorrectError
		if !errors.As(err, &ce) || !strings.Contains(err.Error(), "would help") {
			t.Errorf("one night: error %v, want a *CorrectError with a hint", err)
		}
		t.Logf("one night: %v", err)
	} else {
		dcCheckFinite(t, "one night", sol)
		if sol.Start != MethodRanging {
			t.Errorf("one night: start %q, want %q", sol.Start, MethodRanging)
		}
		t.Logf("one night: a solution from %s, χ²/dof %.3g, cond %.3g", sol.Start, sol.Chi2DoF, sol.Cond)
	}

	_, err = Determine(obs[:2], Options{})
	var de *DegenerateError
	var re *RangingError
	if !errors.As(err, &de) || !errors.As(err, &re) || strings.Contains(err.Error(), ": orbit: ") || strings.Contains(err.Error(), "\n") {
		t.Errorf("two observations: %v, want both methods' errors in one message", err)
	}
}
