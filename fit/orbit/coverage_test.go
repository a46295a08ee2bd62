package orbit

import (
	"math"
	"math/rand/v2"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
)

// With Gaussian errors of the stated σ (0.5″, seeded), the stated
// uncertainties must cover the truth as often as the normal law says, in
// 100 realisations of the main-belt and near-Earth cases:
//
//   - each element (a, e, i, Ω, ω, M) within its stated 3σ: the chance of a
//     miss is 0.27 % (normal law), so the misses in 100 are binomial with
//     mean 0.27; at most 3 are allowed (P(≥ 4) ≈ 2e-4);
//   - the state's Mahalanobis distance d² = Δxᵀ C⁻¹ Δx with the unscaled
//     covariance is χ²(6): at most 3 of 100 beyond its 99.73 % quantile
//     (gonum distuv.ChiSquared), and the mean of d² within 6 ± 3·√(12/100)
//     (the standard error of the mean of χ²(6), variance 12);
//   - the predicted place 20 days after the arc, seen from Alder Ridge,
//     against the true place (ephem.PlaceOfElements): its 2-dof χ² with the
//     unscaled sky covariance beyond 11.83 at most 3 times, mean within
//     2 ± 3·√(4/100).
//
// The unscaled covariance (Cov/χ²dof when Scaled) is the one the statistics
// are about; the stated (scaled) one can only be wider. (200 fits, about a
// second.)
func TestCorrectNoiseCoverage(t *testing.T) {
	q6 := distuv.ChiSquared{K: 6}.Quantile(0.9973)
	for _, c := range dcCases()[:2] {
		ts, ss := c.schedule()
		clean := dcSynthObservations(t, c.el, ts, ss, 0.5, nil)
		truth := c.truth(t)
		trueEl, err := truth.Elements()
		if err != nil {
			t.Fatal(err)
		}
		tv := elementVector(trueEl)
		atUTC := ts[len(ts)-1].AddDays(20)
		truePl, err := ephem.PlaceOfElements(c.el, atUTC, ephem.Observer{Site: dcAlderRidge})
		if err != nil {
			t.Fatal(err)
		}
		rng := rand.New(rand.NewPCG(11, 12))
		const n = 100
		var miss [6]int
		missState, missPred := 0, 0
		sumD2, sumP2 := 0.0, 0.0
		for k := 0; k < n; k++ {
			obs := make([]Observation, len(clean))
			copy(obs, clean)
			dcAddNoise(obs, rng)
			sol, err := Correct(obs, dcPerturbed(truth, 0.01, rng), Options{KeepAll: true})
			if err != nil {
				t.Fatalf("%s, realisation %d: %v", c.name, k, err)
			}
			el, sig, err := sol.Elements()
			if err != nil {
				t.Fatal(err)
			}
			v := elementVector(el)
			sv := [6]float64{sig.A, sig.E, float64(sig.I), float64(sig.Node), float64(sig.Peri), float64(sig.M)}
			for i := 0; i < 6; i++ {
				d := v[i] - tv[i]
				if i >= 2 {
					d = float64(astro.Angle(d).Wrapped())
				}
				if math.Abs(d) > 3*sv[i] {
					miss[i]++
				}
			}
			unscale := 1.0
			if sol.Scaled {
				unscale = 1 / sol.Chi2DoF
			}
			var cov mat.SymDense
			cov.ScaleSym(unscale, sol.Cov)
			dx := mat.NewVecDense(6, nil)
			xs, xt := stateVector(sol.State), stateVector(truth)
			for i := range xs {
				dx.SetVec(i, xs[i]-xt[i])
			}
			var ch mat.Cholesky
			if !ch.Factorize(&cov) {
				t.Fatal("covariance not positive definite")
			}
			var w mat.VecDense
			if err := ch.SolveVecTo(&w, dx); err != nil {
				t.Fatal(err)
			}
			d2 := mat.Dot(dx, &w)
			sumD2 += d2
			if d2 > q6 {
				missState++
			}
			pr, err := sol.Predict(atUTC, dcAlderRidge)
			if err != nil {
				t.Fatal(err)
			}
			dE, dN := Residual(truePl.RA, truePl.Dec, astro.UnitVector(pr.RA, pr.Dec))
			dE, dN = astro.Angle(dE).Arcseconds(), astro.Angle(dN).Arcseconds()
			a, b, cc := pr.CovArcsec2[0][0]*unscale, pr.CovArcsec2[0][1]*unscale, pr.CovArcsec2[1][1]*unscale
			det := a*cc - b*b
			p2 := (cc*dE*dE - 2*b*dE*dN + a*dN*dN) / det
			sumP2 += p2
			if p2 > DefaultRejectChi2 {
				missPred++
			}
		}
		names := [6]string{"a", "e", "i", "Ω", "ω", "M"}
		for i, m := range miss {
			if m > 3 {
				t.Errorf("%s: %s outside its 3σ in %d of %d realisations, want ≤ 3", c.name, names[i], m, n)
			}
		}
		meanD2, meanP2 := sumD2/n, sumP2/n
		if missState > 3 || math.Abs(meanD2-6) > 3*math.Sqrt(12.0/n) {
			t.Errorf("%s: state d² beyond the 99.73 %% level %d times, mean %.2f; want ≤ 3 and 6 ± %.2f", c.name, missState, meanD2, 3*math.Sqrt(12.0/n))
		}
		if missPred > 3 || math.Abs(meanP2-2) > 3*math.Sqrt(4.0/n) {
			t.Errorf("%s: prediction χ² beyond 11.83 %d times, mean %.2f; want ≤ 3 and 2 ± %.2f", c.name, missPred, meanP2, 3*math.Sqrt(4.0/n))
		}
		t.Logf("%s: element misses %v, state d² misses %d (mean %.2f), prediction misses %d (mean %.2f)",
			c.name, miss, missState, meanD2, missPred, meanP2)
	}
}
