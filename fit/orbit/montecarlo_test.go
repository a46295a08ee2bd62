package orbit

import (
	"math"
	"strings"
	"sync"
	"sync/atomic"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/mat"
)

// mcTestSolution returns an invented main-belt orbit with the covariance a
// 10-day, three-night arc of 0.5″ observations gives it (mcLaplaceCov).
func mcTestSolution(tb testing.TB) (State, *mat.SymDense) {
	tb.Helper()
	ts, ss := mcThreeNights(10)
	obs, truth := rgSynthetic(tb, rgMainBelt, ts, ss, 0.5, nil)
	return truth, mcLaplaceCov(tb, truth, obs)
}

// The drawn states must have the covariance's mean and covariance within
// their sampling error. For N independent normal draws the sample mean of
// component j has σ_j/√N, and the sample covariance S_jk has the variance
// (Σ_jj·Σ_kk + Σ_jk²)/N (the Wishart second moments; Anderson, An
// Introduction to Multivariate Statistical Analysis, 3rd ed. (2003), ch. 7,
// the Wishart distribution; the section from memory).
// Band: 4.5 standard errors, which a correct sampler exceeds with
// probability 7e-6 per quantity (two-sided normal tail; 27 quantities, 2e-4
// in all).
func TestCovarianceOrbitsMoments(t *testing.T) {
	st, cov := mcTestSolution(t)
	const n = 20000
	set, err := CovarianceOrbits(st, cov, MonteCarloSettings{N: n, Seed: 42})
	if err != nil {
		t.Fatal(err)
	}
	if len(set.States) != n || set.Method != SamplingCovariance || set.EffectiveN != n {
		t.Fatalf("got %d states, method %q, effective N %g", len(set.States), set.Method, set.EffectiveN)
	}
	x0 := mcVec(st)
	var mean [6]float64
	for _, s := range set.States {
		x := mcVec(s)
		for j := range 6 {
			mean[j] += (x[j] - x0[j]) / n
		}
	}
	for j := range 6 {
		se := math.Sqrt(cov.At(j, j) / n)
		if math.Abs(mean[j]) > 4.5*se {
			t.Errorf("mean of component %d off by %.3g (%.1f standard errors)", j, mean[j], mean[j]/se)
		}
	}
	var s [6][6]float64
	for _, st := range set.States {
		x := mcVec(st)
		for j := range 6 {
			for k := j; k < 6; k++ {
				s[j][k] += (x[j] - x0[j] - mean[j]) * (x[k] - x0[k] - mean[k]) / (n - 1)
			}
		}
	}
	for j := range 6 {
		for k := j; k < 6; k++ {
			c := cov.At(j, k)
			se := math.Sqrt((cov.At(j, j)*cov.At(k, k) + c*c) / n)
			if d := s[j][k] - c; math.Abs(d) > 4.5*se {
				t.Errorf("covariance[%d][%d] = %.4g, want %.4g (%.1f standard errors)", j, k, s[j][k], c, d/se)
			}
		}
	}
}

// With a covariance small enough for the place to be linear in the state
// over its spread, the Monte Carlo sky covariance must be the linear one,
// G·Cov·Gᵀ with G the 2×6 Jacobian of the place by central differences
// (mcSkyJacobian, this test's own). Here the 10-day arc's covariance scaled
// by 1e-4 (σ a hundred times smaller), 30 days after the arc. Tolerance: 10 %
// on each 1σ semi-axis, against a sampling error of 1/√(2N) = 0.7 % for
// N = 10 000 (the relative standard error of a standard deviation; common
// practice); 3° on the position angle of an ellipse whose axes differ by
// more than a factor two; the centre within 0.05σ of the nominal place
// (5 standard errors of a mean, σ/√N = 0.01σ).
func TestCovarianceOrbitsMatchLinear(t *testing.T) {
	st, cov := mcTestSolution(t)
	cov.ScaleSym(1e-4, cov)
	g, err := ephem.ObserverGeometryAt(astro.JD{Day: 2461487.5, Frac: 0.1, Scale: astro.UTC}, rgAlderRidge, 0)
	if err != nil {
		t.Fatal(err)
	}
	set, err := CovarianceOrbits(st, cov, MonteCarloSettings{N: 10000, Seed: 7})
	if err != nil {
		t.Fatal(err)
	}
	reg, err := set.Predict(g, MonteCarloSettings{})
	if err != nil {
		t.Fatal(err)
	}
	jac, c := mcSkyJacobian(t, st, g)
	var lin [2][2]float64
	for a := range 2 {
		for b := range 2 {
			v := 0.0
			for j := range 6 {
				for k := range 6 {
					v += jac[a][j] * cov.At(j, k) * jac[b][k]
				}
			}
			lin[a][b] = v / (float64(astro.Arcsecond) * float64(astro.Arcsecond))
		}
	}
	le := (&SampledRegion{CovArcsec2: lin}).Ellipse(1)
	me := reg.Ellipse(1)
	if r := me.SemiMajorArcsec / le.SemiMajorArcsec; math.Abs(r-1) > 0.1 {
		t.Errorf("semi-major axis %.4g″, linear %.4g″", me.SemiMajorArcsec, le.SemiMajorArcsec)
	}
	if r := me.SemiMinorArcsec / le.SemiMinorArcsec; math.Abs(r-1) > 0.1 {
		t.Errorf("semi-minor axis %.4g″, linear %.4g″", me.SemiMinorArcsec, le.SemiMinorArcsec)
	}
	if le.SemiMajorArcsec > 2*le.SemiMinorArcsec {
		d := math.Abs(float64(me.PA-le.PA)) / float64(astro.Degree)
		d = math.Min(d, 180-d)
		if d > 3 {
			t.Errorf("PA %.2f°, linear %.2f°", me.PA.Degrees(), le.PA.Degrees())
		}
	}
	ra, dec, _ := astro.Spherical(c)
	m := (&SampledRegion{RA: reg.RA, Dec: reg.Dec, CovArcsec2: lin}).Mahalanobis(ra, dec)
	if m > 0.05 {
		t.Errorf("centre %.3gσ from the nominal place", m)
	}
	if reg.Failed != 0 || reg.Far != 0 || math.Abs(reg.EffectiveN-10000) > 1e-6 {
		t.Errorf("failed %d, far %d, effective N %g", reg.Failed, reg.Far, reg.EffectiveN)
	}
}

// Sample i draws from its own generator: one worker and two give the same
// orbits and the same region, bit for bit.
func TestMonteCarloWorkersDeterministic(t *testing.T) {
	st, cov := mcTestSolution(t)
	g, err := ephem.ObserverGeometryAt(astro.JD{Day: 2461487.5, Frac: 0.1, Scale: astro.UTC}, rgBirchHollow, 0)
	if err != nil {
		t.Fatal(err)
	}
	var regs [2]*SampledRegion
	var sets [2]*OrbitSamples
	for k, w := range []int{1, 2} {
		s := MonteCarloSettings{N: 3000, Seed: 99, Workers: w}
		sets[k], err = CovarianceOrbits(st, cov, s)
		if err != nil {
			t.Fatal(err)
		}
		regs[k], err = sets[k].Predict(g, s)
		if err != nil {
			t.Fatal(err)
		}
	}
	for i := range sets[0].States {
		if sets[0].States[i] != sets[1].States[i] {
			t.Fatalf("orbit %d differs between 1 and 2 workers", i)
		}
	}
	if regs[0].RA != regs[1].RA || regs[0].Dec != regs[1].Dec || regs[0].CovArcsec2 != regs[1].CovArcsec2 {
		t.Errorf("regions differ: %v %v %v vs %v %v %v", regs[0].RA, regs[0].Dec, regs[0].CovArcsec2, regs[1].RA, regs[1].Dec, regs[1].CovArcsec2)
	}
	// Another seed gives other orbits.
	other, err := CovarianceOrbits(st, cov, MonteCarloSettings{N: 3000, Seed: 100})
	if err != nil {
		t.Fatal(err)
	}
	if other.States[0] == sets[0].States[0] {
		t.Error("seeds 99 and 100 give the same first orbit")
	}
}

// The progress callback: never two calls at once, done increasing, ending
// at done == total.
func TestMonteCarloProgress(t *testing.T) {
	st, cov := mcTestSolution(t)
	var mu sync.Mutex
	var active atomic.Int32
	var calls []int
	total := -1
	s := MonteCarloSettings{N: 5000, Workers: 4, Progress: func(done, tot int) {
		if active.Add(1) != 1 {
			t.Error("two progress calls at once")
		}
		mu.Lock()
		calls = append(calls, done)
		total = tot
		mu.Unlock()
		active.Add(-1)
	}}
	if _, err := CovarianceOrbits(st, cov, s); err != nil {
		t.Fatal(err)
	}
	if total != 5000 || len(calls) == 0 || calls[len(calls)-1] != 5000 {
		t.Fatalf("total %d, calls %v", total, calls)
	}
	for k := 1; k < len(calls); k++ {
		if calls[k] <= calls[k-1] {
			t.Fatalf("done not increasing: %v", calls)
		}
	}
}

// A semi-definite covariance (one direction without uncertainty) is
// sampled in the other five; bad covariances and settings are errors with
// one-line messages.
func TestCovarianceOrbitsBadInput(t *testing.T) {
	st, cov := mcTestSolution(t)
	// Remove the uncertainty of Vel.Z: zero its row and column.
	semi := mat.NewSymDense(6, nil)
	semi.CopySym(cov)
	for k := range 6 {
		semi.SetSym(5, k, 0)
	}
	set, err := CovarianceOrbits(st, semi, MonteCarloSettings{N: 200})
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range set.States {
		if s.Vel.Z != st.Vel.Z {
			t.Fatalf("Vel.Z varies (%g vs %g) with zero variance", s.Vel.Z, st.Vel.Z)
		}
	}
	if !strings.Contains(strings.Join(set.Notes, " "), "singular") {
		t.Errorf("notes %q do not mention the singular covariance", set.Notes)
	}
	neg := mat.NewSymDense(6, nil)
	neg.CopySym(cov)
	neg.SetSym(0, 0, -cov.At(0, 0))
	nan := mat.NewSymDense(6, nil)
	nan.CopySym(cov)
	nan.SetSym(2, 3, math.NaN())
	bad := State{Epoch: st.Epoch, Pos: st.Pos, Vel: st.Vel}
	bad.Pos.X = math.Inf(1)
	for _, c := range []struct {
		name string
		st   State
		cov  *mat.SymDense
		s    MonteCarloSettings
	}{
		{"nil covariance", st, nil, MonteCarloSettings{}},
		{"3×3 covariance", st, mat.NewSymDense(3, nil), MonteCarloSettings{}},
		{"negative variance", st, neg, MonteCarloSettings{}},
		{"NaN covariance", st, nan, MonteCarloSettings{}},
		{"infinite state", bad, cov, MonteCarloSettings{}},
		{"negative N", st, cov, MonteCarloSettings{N: -1}},
		{"too many", st, cov, MonteCarloSettings{N: MaxSamples + 1}},
		{"negative workers", st, cov, MonteCarloSettings{Workers: -2}},
	} {
		_, err := CovarianceOrbits(c.st, c.cov, c.s)
		if err == nil {
			t.Errorf("%s: no error", c.name)
			continue
		}
		if msg := err.Error(); strings.Contains(msg, "\n") || !strings.HasPrefix(msg, "orbit: ") {
			t.Errorf("%s: message %q", c.name, msg)
		}
	}
	var empty *OrbitSamples
	if _, err := empty.Predict(ephem.ObserverGeometry{}, MonteCarloSettings{}); err == nil {
		t.Error("Predict of no orbits: no error")
	}
}
