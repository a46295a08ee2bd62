package fit

import (
	"errors"
	"fmt"
	"math"
	"strconv"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit/orbit"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// ElementsJSON is an element set as arcfit prints it (fit --json "elements"
// and "elements_sigma", the fit file's orbit): epoch and perihelion time as TT
// Julian dates, angles in degrees, distances in au. A value that does not
// apply (a and M of a hyperbolic or near-parabolic orbit) is null.
type ElementsJSON struct {
	EpochTTJD *float64 `json:"epoch_tt_jd"`
	AAU       *float64 `json:"a_au"`
	E         *float64 `json:"e"`
	IDeg      *float64 `json:"i_deg"`
	NodeDeg   *float64 `json:"node_deg"`
	PeriDeg   *float64 `json:"peri_deg"`
	MDeg      *float64 `json:"m_deg"`
	QAU       *float64 `json:"q_au"`
	TpTTJD    *float64 `json:"tp_tt_jd"`
}

// ElementsRecords returns the printed form of the orbit's elements and of
// their 1-σ uncertainties (for the σ, epoch_tt_jd is null and tp_tt_jd holds
// the σ of the perihelion time in days). The epoch is the orbit's TDB epoch
// (TDB − TT < 2 ms, below any figure printed).
func (f *OrbitFit) ElementsRecords() (el, sigma ElementsJSON) {
	e, s := f.Elements, f.Sigma
	v := func(x float64) *float64 {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return nil
		}
		return &x
	}
	el = ElementsJSON{EpochTTJD: v(e.Epoch.Float()), E: v(e.E), IDeg: v(e.I.Degrees()), NodeDeg: v(astro.Angle(e.Node).Normalized().Degrees()),
		PeriDeg: v(astro.Angle(e.Peri).Normalized().Degrees()), QAU: v(e.Q), TpTTJD: v(e.Tp.Float())}
	sigma = ElementsJSON{E: v(s.E), IDeg: v(s.I.Degrees()), NodeDeg: v(s.Node.Degrees()), PeriDeg: v(s.Peri.Degrees()),
		QAU: v(s.Q), TpTTJD: v(s.TpDays)}
	if !s.PerihelionForm && e.A > 0 {
		el.AAU, el.MDeg = v(e.A), v(astro.Angle(e.M).Normalized().Degrees())
		sigma.AAU, sigma.MDeg = v(s.A), v(s.M.Degrees())
	}
	return el, sigma
}

// orbitJSON is the fit file's "orbit" object: the orbit chosen as the
// model (kepler or nbody), as a state at an epoch with its covariance and
// its dynamics; the elements, their σ and the class are for people (the
// reader recomputes them from the state). A file without "dynamics" (written
// before the perturbed orbit) is read as two-body motion.
type orbitJSON struct {
	EpochTDB       jdJSON         `json:"epoch_tdb"`
	Dynamics       string         `json:"dynamics"`
	PositionAU     [3]float64     `json:"position_au"`
	VelocityAUDay  [3]float64     `json:"velocity_au_per_day"`
	Frame          string         `json:"frame"`
	Covariance     [][]float64    `json:"covariance"`
	Chi2           float64        `json:"chi2"`
	DoF            int            `json:"dof"`
	Chi2DoF        float64        `json:"chi2_dof"`
	Scaled         bool           `json:"scaled"`
	RMSArcsec      float64        `json:"rms_arcsec"`
	NumUsed        int            `json:"n_used"`
	Cond           *float64       `json:"cond"`
	Start          string         `json:"start"`
	H              *float64       `json:"h"`
	HSigma         *float64       `json:"h_sigma"`
	G              float64        `json:"g"`
	NumMag         int            `json:"n_mag"`
	FirstUTC       jdJSON         `json:"first_utc"`
	LastUTC        jdJSON         `json:"last_utc"`
	Notes          []string       `json:"notes"`
	Elements       ElementsJSON   `json:"elements"`
	ElementsSigma  ElementsJSON   `json:"elements_sigma"`
	Class          string         `json:"class"`
	OrbitResiduals []orbitResJSON `json:"residuals"`
	// Encounters are the close approaches the integration through the arc
	// found (nbody only).
	Encounters []encounterRecJSON `json:"encounters,omitempty"`
}

// encounterRecJSON is a close approach as the fit file keeps it.
type encounterRecJSON struct {
	Body       string  `json:"body"`
	TDB        jdJSON  `json:"tdb"`
	DistanceAU float64 `json:"distance_au"`
	HillAU     float64 `json:"hill_au"`
	AtEnd      bool    `json:"at_end"`
}

// orbitResJSON is one observation's residual against the orbit.
type orbitResJSON struct {
	Index      int     `json:"index"`
	Line       int     `json:"line"`
	UTC        jdJSON  `json:"utc"`
	DRAArcsec  float64 `json:"dra_arcsec"`
	DDecArcsec float64 `json:"ddec_arcsec"`
	Chi2       float64 `json:"chi2"`
	Flagged    bool    `json:"flagged"`
	Used       bool    `json:"used"`
}

// orbitFrame and orbitFrameNBody name the frame of the orbit's state in the
// fit file, for two-body and for perturbed motion.
const (
	orbitFrame      = "heliocentric ICRS axes, au and au/day, TDB, two-body motion with GM = k²"
	orbitFrameNBody = "heliocentric ICRS axes, au and au/day, TDB, the osculating state of an orbit moved by the Sun, the eight planets and the Moon (arcfit's n-body integration)"
)

// marshalOrbit returns the fit file's orbit object of f.
func marshalOrbit(f *OrbitFit) (*orbitJSON, error) {
	s := f.Solution
	if s == nil || s.Cov == nil || s.Cov.SymmetricDim() != 6 || !s.State.Valid() {
		return nil, errors.New("fit: the orbit has no usable state and covariance")
	}
	el, sg := f.ElementsRecords()
	o := &orbitJSON{
		EpochTDB:      toJD(s.State.Epoch),
		PositionAU:    [3]float64{s.State.Pos.X, s.State.Pos.Y, s.State.Pos.Z},
		VelocityAUDay: [3]float64{s.State.Vel.X, s.State.Vel.Y, s.State.Vel.Z},
		Frame:         orbitFrame,
		Dynamics:      orbit.MotionName(s.State.Motion),
		Chi2:          s.Chi2, DoF: s.DoF, Chi2DoF: s.Chi2DoF, Scaled: s.Scaled, RMSArcsec: s.RMSArcsec,
		NumUsed: s.NumUsed, Cond: optional(s.Cond), Start: s.Start, H: optional(s.H), HSigma: optional(s.HSigma),
		G: s.G, NumMag: s.NumMag, FirstUTC: toJD(s.FirstUTC), LastUTC: toJD(s.LastUTC),
		Notes: append([]string{}, s.Notes...), Elements: el, ElementsSigma: sg, Class: f.Class.String(),
		OrbitResiduals: []orbitResJSON{},
	}
	o.Covariance = make([][]float64, 6)
	for i := range 6 {
		o.Covariance[i] = make([]float64, 6)
		for j := range 6 {
			v := s.Cov.At(i, j)
			if !finite(v) {
				return nil, errors.New("fit: an orbit covariance element is not finite")
			}
			o.Covariance[i][j] = v
		}
	}
	if s.State.Motion != nil {
		o.Frame = orbitFrameNBody
	}
	for _, e := range s.Encounters {
		if !finite(e.DistanceAU) || !finite(e.HillAU) {
			return nil, errors.New("fit: an encounter distance is not finite")
		}
		o.Encounters = append(o.Encounters, encounterRecJSON{Body: e.Body, TDB: toJD(e.TDB), DistanceAU: e.DistanceAU, HillAU: e.HillAU, AtEnd: e.AtEnd})
	}
	for _, r := range s.Residuals {
		o.OrbitResiduals = append(o.OrbitResiduals, orbitResJSON{Index: r.Index, Line: r.Line, UTC: toJD(r.UTC),
			DRAArcsec: r.DEArcsec, DDecArcsec: r.DNArcsec, Chi2: r.Chi2, Flagged: r.Flagged, Used: r.Used})
	}
	for _, x := range []float64{s.Chi2, s.Chi2DoF, s.RMSArcsec, s.G} {
		if !finite(x) {
			return nil, errors.New("fit: an orbit figure is not finite")
		}
	}
	return o, nil
}

// buildOrbit checks the fit file's orbit object and makes the OrbitFit.
func (r *fitFileReader) buildOrbit(o *orbitJSON) (*OrbitFit, error) {
	epoch, err := r.jdFrom(o.EpochTDB, "orbit.epoch_tdb", astro.TDB)
	if err != nil {
		return nil, err
	}
	for i, v := range append(o.PositionAU[:], o.VelocityAUDay[:]...) {
		if !finite(v) {
			return nil, r.fail(fmt.Sprintf("orbit state component %d", i), "a finite number", fmt.Sprint(v), ErrFitFile)
		}
	}
	motion, err := orbit.ParseMotion(o.Dynamics)
	if err != nil {
		return nil, r.fail("orbit.dynamics", fmt.Sprintf("%q or %q", orbit.DynamicsTwoBody, orbit.DynamicsNBody), strconv.Quote(o.Dynamics), ErrFitFile)
	}
	st := orbit.State{Epoch: epoch, Pos: r3.Vec{X: o.PositionAU[0], Y: o.PositionAU[1], Z: o.PositionAU[2]},
		Vel: r3.Vec{X: o.VelocityAUDay[0], Y: o.VelocityAUDay[1], Z: o.VelocityAUDay[2]}, Motion: motion}
	if r3.Norm(st.Pos) < 0.001 || r3.Norm(st.Pos) > 1e5 {
		return nil, r.fail("orbit.position_au", "a heliocentric position between 0.001 and 1e5 au", fmt.Sprint(r3.Norm(st.Pos)), ErrFitFile)
	}
	if len(o.Covariance) != 6 {
		return nil, r.fail("orbit.covariance", "a 6×6 matrix", fmt.Sprintf("%d rows", len(o.Covariance)), ErrFitFile)
	}
	cov := mat.NewSymDense(6, nil)
	for i, row := range o.Covariance {
		if len(row) != 6 {
			return nil, r.fail(fmt.Sprintf("orbit.covariance[%d]", i), "6 numbers", fmt.Sprint(len(row)), ErrFitFile)
		}
		for j, v := range row {
			if !finite(v) || math.Abs(v-o.Covariance[j][i]) > 1e-12*math.Max(math.Abs(v), math.Abs(o.Covariance[j][i])) || (i == j && v < 0) {
				return nil, r.fail(fmt.Sprintf("orbit.covariance[%d][%d]", i, j), "a finite symmetric covariance with diagonal ≥ 0", fmt.Sprint(v), ErrFitFile)
			}
			if j >= i {
				cov.SetSym(i, j, v)
			}
		}
	}
	for _, v := range []struct {
		name string
		x    float64
	}{{"orbit.chi2", o.Chi2}, {"orbit.chi2_dof", o.Chi2DoF}, {"orbit.rms_arcsec", o.RMSArcsec}, {"orbit.g", o.G}} {
		if !finite(v.x) {
			return nil, r.fail(v.name, "a finite number", fmt.Sprint(v.x), ErrFitFile)
		}
	}
	first, err := r.jdFrom(o.FirstUTC, "orbit.first_utc", astro.UTC)
	if err != nil {
		return nil, err
	}
	last, err := r.jdFrom(o.LastUTC, "orbit.last_utc", astro.UTC)
	if err != nil {
		return nil, err
	}
	sol := &orbit.Solution{State: st, Cov: cov, Chi2: o.Chi2, DoF: o.DoF, Chi2DoF: o.Chi2DoF, Scaled: o.Scaled,
		RMSArcsec: o.RMSArcsec, NumUsed: o.NumUsed, Cond: valueOr(o.Cond), Start: o.Start, H: valueOr(o.H),
		HSigma: valueOr(o.HSigma), G: o.G, NumMag: o.NumMag, FirstUTC: first, LastUTC: last, Notes: o.Notes}
	for i, e := range o.Encounters {
		tdb, err := r.jdFrom(e.TDB, fmt.Sprintf("orbit.encounters[%d].tdb", i), astro.TDB)
		if err != nil {
			return nil, err
		}
		if !finite(e.DistanceAU) || !(e.DistanceAU >= 0) || !finite(e.HillAU) || e.Body == "" {
			return nil, r.fail(fmt.Sprintf("orbit.encounters[%d]", i), "a body and finite distances ≥ 0", fmt.Sprint(e.DistanceAU), ErrFitFile)
		}
		sol.Encounters = append(sol.Encounters, orbit.Encounter{Body: e.Body, TDB: tdb, DistanceAU: e.DistanceAU, HillAU: e.HillAU, AtEnd: e.AtEnd})
	}
	for i, rr := range o.OrbitResiduals {
		utc, err := r.jdFrom(rr.UTC, fmt.Sprintf("orbit.residuals[%d].utc", i), astro.UTC)
		if err != nil {
			return nil, err
		}
		sol.Residuals = append(sol.Residuals, orbit.ObsResidual{Index: rr.Index, Line: rr.Line, UTC: utc,
			DEArcsec: rr.DRAArcsec, DNArcsec: rr.DDecArcsec, Chi2: rr.Chi2, Flagged: rr.Flagged, Used: rr.Used})
	}
	of, err := newOrbitFit(sol, nil, nil)
	if err != nil {
		return nil, r.fail("orbit", "a state that has elements", err.Error(), ErrFitFile)
	}
	return of, nil
}

// orbitAbout is the fit file's "about" line when it holds an orbit.
func orbitAbout(f *OrbitFit) string {
	what := "a two-body orbit"
	if f.Solution.State.Motion != nil {
		what = "an orbit perturbed by the planets (nbody)"
	}
	return "arcfit fit file: " + what + " (orbit) and the best sky-plane motion model fitted to the observations in source.file; read by arcfit predict and arcfit night"
}

// orbitElementsOf is a helper for printing: the elements of an orbit fit
// with H and G.
func orbitElementsOf(f *OrbitFit) ephem.Elements { return f.Elements }
