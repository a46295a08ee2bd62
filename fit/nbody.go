package fit

import (
	"fmt"

	"arcfit/fit/orbit"
)

// FitNBody determines the perturbed orbit of the track's observations: the
// orbit moved by the Sun, the eight planets and the Moon ([orbit.NBody], the
// integration of package ephem/nbody), fitted by [orbit.Determine] with that
// Motion — a two-body orbit first (Gauss's method, or the search over the
// distance for a short arc), then its differential correction with the
// planets, the partial derivatives from the integration's state transition
// matrix — with the outlier rule of the sky-plane fit (s.KeepAll and
// s.RejectChi2 apply). The elements are osculating at the epoch. On an arc of
// fewer than three nights that the correction cannot settle, the model is
// the cloud of orbits sampled by ranging (RangingOnly), each integrated with
// the planets for a prediction.
//
// Errors: those of [FitOrbit].
func FitNBody(tr *Track, s Settings) (*OrbitFit, error) {
	return fitOrbitMotion(tr, s, orbit.NBody)
}

// nbodyFromKepler corrects the two-body orbit fit kf with the planets from
// its state ([orbit.Correct] with orbit.NBody, the observations' Used flags
// as given, so that the outlier rule starts afresh); a ranging cloud
// (RangingOnly) keeps its orbits, each then integrated with the planets.
// It is the nbody row's fit when the kepler row has one: the two-body
// solution lies well within the basin of the perturbed one on the arcs a
// comparison sees, and its Gauss and ranging starts are not repeated.
func nbodyFromKepler(kf *OrbitFit, s Settings) (*OrbitFit, error) {
	if kf == nil || kf.Obs == nil {
		return nil, fmt.Errorf("fit: no two-body orbit with its observations to start from")
	}
	if kf.RangingOnly {
		of := *kf
		of.Solution = copySolution(kf.Solution)
		of.samples = map[string]*orbit.OrbitSamples{}
		for k, v := range kf.samples {
			c := *v
			c.States = append([]orbit.State(nil), v.States...)
			of.samples[k] = &c
		}
		of.setMotion(orbit.NBody)
		return &of, nil
	}
	st := kf.Solution.State
	st.Motion = orbit.NBody
	sol, err := orbit.Correct(kf.Obs, st, orbit.Options{KeepAll: s.KeepAll, RejectChi2: s.RejectChi2})
	if err != nil {
		return nil, err
	}
	sol.Start = kf.Solution.Start
	sol.Notes = append([]string{fmt.Sprintf("nbody: the two-body orbit (χ²/dof %.3g) corrected with the planets (χ²/dof %.3g)",
		kf.Solution.Chi2DoF, sol.Chi2DoF)}, sol.Notes...)
	of, err := newOrbitFit(sol, kf.Obs, kf.Warnings)
	if err != nil {
		return nil, err
	}
	of.MonteCarlo, of.NoSampling = kf.MonteCarlo, kf.NoSampling
	return of, nil
}

// copySolution returns a copy of s whose slices and covariance are its own.
func copySolution(s *orbit.Solution) *orbit.Solution {
	c := *s
	c.Residuals = append([]orbit.ObsResidual(nil), s.Residuals...)
	c.Notes = append([]string(nil), s.Notes...)
	c.Encounters = append([]orbit.Encounter(nil), s.Encounters...)
	if s.Cov != nil {
		c.Cov = mat6Copy(s.Cov)
	}
	return &c
}

// setMotion gives the orbit and its cached samples the dynamics m and drops
// the integrations cached for the old dynamics.
func (f *OrbitFit) setMotion(m orbit.Motion) {
	f.Solution.State.Motion = m
	for _, s := range f.samples {
		for i := range s.States {
			s.States[i].Motion = m
		}
	}
	f.nb = nil
}

// Dynamics returns the name of the orbit's dynamics: "twobody" (model
// kepler) or "nbody".
func (f *OrbitFit) Dynamics() string { return orbit.MotionName(f.Solution.State.Motion) }

// ModelName returns the orbit model's name: "kepler" for two-body motion,
// "nbody" for the perturbed orbit.
func (f *OrbitFit) ModelName() string {
	if f.Solution.State.Motion != nil {
		return NBody().Name()
	}
	return Kepler().Name()
}
