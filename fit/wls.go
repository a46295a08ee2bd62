package fit

import (
	"errors"
	"fmt"
	"math"
	"slices"

	"arcfit/astro"

	"gonum.org/v1/gonum/mat"
)

// ParallaxMode says how a fit treats the diurnal parallax.
type ParallaxMode int

const (
	// ParallaxFit estimates the inverse distance u = 1/Δ (au⁻¹) as one more
	// parameter (the default). When every observation is geocentric there is
	// no parallax and the column is left out (Solution.Notes says so).
	ParallaxFit ParallaxMode = iota
	// ParallaxFixed applies the parallax with u = Settings.InvDistance, known
	// from an orbit fit or given by the user.
	ParallaxFixed
	// ParallaxOff ignores the parallax: the topocentric positions are fitted
	// as if geocentric (the plain sky-plane polynomial).
	ParallaxOff
)

// String returns "fit", "fixed" or "off".
func (p ParallaxMode) String() string {
	switch p {
	case ParallaxFit:
		return "fit"
	case ParallaxFixed:
		return "fixed"
	case ParallaxOff:
		return "off"
	}
	return fmt.Sprintf("ParallaxMode(%d)", int(p))
}

// DefaultRejectChi2 is the default outlier threshold on an observation's
// normalised 2-dof χ²: 11.83 = −2 ln(0.0027), the 3-σ-equivalent level (the
// probability 0.27 % of a larger value for a Gaussian error in two
// coordinates; for 2 dof the χ² survival function is exp(−x/2), so the value
// is exact algebra — common practice, Press et al. 2007, §15.6, Table).
const DefaultRejectChi2 = 11.83

// MaxRejectFraction is the largest fraction of the used observations the
// outlier rejection may flag (20 %); beyond it the data, not a few points,
// disagree with the model.
const MaxRejectFraction = 0.2

// Settings control [Fit].
type Settings struct {
	Parallax    ParallaxMode
	InvDistance float64 // au⁻¹, for ParallaxFixed (1/Δ, e.g. 1/--distance)
	KeepAll     bool    // no outlier rejection
	// RejectChi2 is the threshold on a point's 2-dof normalised χ² (see
	// [Fit]); 0 means DefaultRejectChi2.
	RejectChi2 float64
	// ModelError is the rule by which [Compare] derives each model's error
	// between nights from its cross-validation (Solution.ModelErrorArcsec);
	// the zero value is ModelErrorExcess. [Fit] does not use it.
	ModelError ModelErrorRule
}

// Residual is one observation's O − C.
type Residual struct {
	ObsIndex, Line int
	UTC            astro.JD
	// DRAArcsec, DDecArcsec are observed minus computed, in RA·cos δ and in
	// Dec, arcseconds (the plane residual carried back to the local east and
	// north by the inverse of the projection's Jacobian).
	DRAArcsec, DDecArcsec float64
	// Chi2 is the point's normalised χ² with 2 degrees of freedom, rᵀC⁻¹r
	// with the stated covariance C of the observation.
	Chi2    float64
	Flagged bool // rejected as an outlier
	// Used reports whether the point took part in the final fit (false for a
	// flagged point and a reader-dropped duplicate).
	Used bool
}

// Solution is a fitted model.
type Solution struct {
	Model    Model
	Settings Settings
	Track    *Track
	// Params are laid out as [ξ coefficients of the basis (in τ), η
	// coefficients, u]; u (au⁻¹) is present iff the fit estimated it
	// (see [Solution.FitsInvDistance]).
	Params []float64
	// Cov is the parameter covariance (AᵀWA)⁻¹, multiplied by Chi2DoF when
	// Scaled.
	Cov     *mat.SymDense
	Chi2    float64
	DoF     int
	Chi2DoF float64 // NaN when DoF is 0
	// Scaled reports that χ²/dof > 1: the stated σ look too small and Cov was
	// multiplied by χ²/dof (Notes says so).
	Scaled bool
	// Cond is the 2-norm condition number of the whitened design after its
	// columns were scaled to unit length (the scaling does not change the
	// solution; it keeps the inverse-distance column, whose entries are the
	// Earth's radius in au, from dominating the figure).
	Cond      float64
	NumUsed   int
	Residuals []Residual // every point, flagged or not, in Track order
	// RMSArcsec pools the RA·cos δ and Dec residuals of the used, unflagged
	// observations: √(Σ(ΔE² + ΔN²)/(2n)).
	RMSArcsec                     float64
	InvDistance, InvDistanceSigma float64 // au⁻¹; NaN when not applied
	// Notes are plain-words remarks: scaled covariance, a parallax left out,
	// a poorly determined distance, outliers flagged.
	Notes []string
	// ModelErrorArcsec is a measured model error between nights, in
	// arcseconds per coordinate, added in quadrature to the covariance of
	// every prediction; 0 means none. [Compare] sets it from the
	// leave-one-night-out cross-validation ([CrossValidate]) by the rule
	// Settings.ModelError names: by default (ModelErrorExcess) the excess
	// √(CV² − σ̄²) of the cross-validated RMS miss over the observations'
	// scatter σ̄ (conservative: it includes the folds' own prediction
	// error); with ModelErrorCalibrated the s that brings the misses'
	// normalised mean square to 1 when a χ² test finds it significantly
	// above 1, and 0 otherwise (see [ModelErrorRule]).
	ModelErrorArcsec float64
}

// FitsInvDistance reports whether the inverse distance is the last parameter.
func (s *Solution) FitsInvDistance() bool { return len(s.Params) == s.Model.NumMotionParams()+1 }

// NumParams returns the number of fitted parameters.
func (s *Solution) NumParams() int { return len(s.Params) }

// singularCond is the condition number (of the column-scaled whitened
// design) beyond which the design is treated as rank-deficient: 1e12 leaves
// about 4 significant digits in the worst-determined parameter combination
// at double precision (ε ≈ 2.2e-16; Golub & Van Loan 2013, §5.3.8).
const singularCond = 1e12

// Fit fits the model m to the used points of tr by weighted least squares.
//
// Each used point contributes two equations, in ξ and η:
//
//	ξ_obs = Σ_j a_j f_j(τ) − u·SiteXi,   η_obs = Σ_j b_j f_j(τ) − u·SiteEta
//
// (f_j the model's basis, τ = T/TimeScaleDays; the u terms as Settings.Parallax
// says). The pair is whitened by L⁻¹, L the Cholesky factor of the point's 2×2
// covariance [σξ², ρσξση; ρσξση, ση²]; the whitened columns are scaled to unit
// length and the system solved by Householder QR. The parameter covariance is
// R⁻¹R⁻ᵀ (unscaled back); χ² is the sum of squared whitened residuals, with
// DoF = 2n − p. When χ²/dof > 1 the covariance is multiplied by χ²/dof
// (Scaled). The normal equations are never formed.
//
// Outliers (unless KeepAll): after each fit, the point with the largest
// normalised χ² (Residual.Chi2) divided by max(1, χ²/dof of the other points)
// is flagged if that exceeds RejectChi2 (default [DefaultRejectChi2]), and the
// model is refitted; one point per pass, until none exceeds it, or flagging
// one more would leave fewer than Need + 1 points, or exceed
// [MaxRejectFraction] of the used points. Dividing by the others' χ²/dof keeps
// a uniformly understated σ from flagging good points.
//
// Parallax: with ParallaxFit and only geocentric points, the u column is left
// out (a note says so). With ParallaxFit and the design rank-deficient with u
// but not without it, the error is [ErrParallaxNotEstimable]: no silent guess.
//
// Errors: *[TooFewError] (wrapping [ErrTooFewObservations]) when the used
// points at distinct times number fewer than the model's parameters per
// coordinate (plus one when u is fitted); [ErrSingular] for a rank-deficient
// design (a knot with no data on one side); an invalid model or settings.
//
// Reference: Björck, Numerical Methods for Least Squares Problems (1996),
// ch. 1–2 (QR solution, R⁻¹R⁻ᵀ, column scaling, whitening); Golub & Van Loan,
// Matrix Computations, 4th ed. (2013), §5.2–5.3; Press et al., Numerical
// Recipes, 3rd ed. (2007), §15.4, §15.6; Bevington & Robinson (2003), ch. 11
// (scaling by χ²/dof).
func Fit(tr *Track, m Model, s Settings) (*Solution, error) {
	return fitWith(tr, m, s, nil, nil, false, nil)
}

// fitWith is [Fit] with a design of tr's points already built for the model
// (see [design.gather]) or, when d is nil or does not match the columns the
// fit needs, with the design built here, from the inverse plane Jacobians
// jinv of tr's points when given (see planeJacobians; nil computes them).
// The results are those of Fit, except that with lean the solution has no
// Residuals and no RMSArcsec (for a cross-validation fold, of which only the
// parameters and their covariance are used). A non-nil only restricts the
// fit to the used points i with only[i]: a fold fitted on the whole track's
// design gives the fit of the fold's Subset (the solution's Track is tr).
func fitWith(tr *Track, m Model, s Settings, d *design, jinv [][2][2]float64, lean bool, only []bool) (*Solution, error) {
	if tr == nil {
		return nil, errors.New("fit: no track")
	}
	if err := m.validate(); err != nil {
		return nil, err
	}
	if !(tr.TimeScaleDays > 0) || math.IsInf(tr.TimeScaleDays, 0) {
		return nil, errors.New("fit: the track's time scale must be positive and finite")
	}
	switch s.Parallax {
	case ParallaxFit, ParallaxOff:
	case ParallaxFixed:
		if math.IsNaN(s.InvDistance) || math.IsInf(s.InvDistance, 0) || s.InvDistance < 0 {
			return nil, fmt.Errorf("fit: inverse distance %g au⁻¹ must be finite and not negative", s.InvDistance)
		}
	default:
		return nil, fmt.Errorf("fit: unknown parallax mode %d", int(s.Parallax))
	}
	if s.RejectChi2 < 0 || math.IsNaN(s.RejectChi2) {
		return nil, fmt.Errorf("fit: outlier threshold %g must be positive", s.RejectChi2)
	}
	if m.Kind == KindPiecewise {
		m = Piecewise(m.Knots)
	}
	active := make([]bool, len(tr.Points))
	for i, p := range tr.Points {
		active[i] = p.Used && (only == nil || only[i])
	}
	var notes []string
	fitU := s.Parallax == ParallaxFit
	if fitU && !hasSite(tr, active) {
		fitU = false
		notes = append(notes, "all observations are geocentric: no parallax term")
	}
	if err := checkCount(tr, m, fitU, active); err != nil {
		return nil, err
	}
	if err := checkKnots(tr, m, active); err != nil {
		return nil, err
	}
	if !d.fits(tr, m, s, fitU) {
		d = newDesign(tr, m, s, fitU, jinv)
		defer d.release()
	}
	sol, err := solve(tr, m, s, fitU, active, d)
	if err != nil {
		return nil, err
	}
	if !s.KeepAll {
		sol, err = rejectOutliers(tr, m, s, fitU, active, sol, d)
		if err != nil {
			return nil, err
		}
	}
	if !lean {
		sol.fillResiduals(active, d)
	}
	sol.Notes = append(notes, sol.Notes...)
	return sol, nil
}

// hasSite reports whether any used point has a non-zero site vector.
func (tr *Track) hasSite() bool {
	for _, p := range tr.Points {
		if p.Used && (p.SiteXi != 0 || p.SiteEta != 0) {
			return true
		}
	}
	return false
}

// hasSite reports whether any active point of tr has a non-zero site vector.
func hasSite(tr *Track, active []bool) bool {
	for i, p := range tr.Points {
		if active[i] && (p.SiteXi != 0 || p.SiteEta != 0) {
			return true
		}
	}
	return false
}

// needFor returns the observations at distinct times a model needs.
func needFor(m Model, fitU bool) int {
	n := m.NumPerCoord()
	if fitU {
		n++
	}
	return n
}

// distinctTimes counts the active points at distinct times.
func distinctTimes(tr *Track, active []bool) int {
	ts := make([]float64, 0, len(tr.Points))
	for i, p := range tr.Points {
		if active[i] {
			ts = append(ts, p.T)
		}
	}
	slices.Sort(ts)
	n := 0
	for i, t := range ts {
		if i == 0 || t != ts[i-1] {
			n++
		}
	}
	return n
}

// distinctTimesUpTo counts the active points at distinct times, stopping at
// limit: it returns min(distinctTimes(tr, active), limit) without sorting
// (a track of a million points reaches a small limit in its first points).
func distinctTimesUpTo(tr *Track, active []bool, limit int) int {
	seen := make([]float64, 0, limit)
	for i, p := range tr.Points {
		if !active[i] || slices.Contains(seen, p.T) {
			continue
		}
		if seen = append(seen, p.T); len(seen) >= limit {
			break
		}
	}
	return len(seen)
}

func checkCount(tr *Track, m Model, fitU bool, active []bool) error {
	need := needFor(m, fitU)
	have := distinctTimesUpTo(tr, active, need) // exact when below need
	if have >= need {
		return nil
	}
	e := &TooFewError{Model: m.Name(), Need: need, Have: have}
	for d := 1; d <= 3; d++ {
		if have >= needFor(Poly(d), fitU) {
			e.Allowed = append(e.Allowed, Poly(d).Name())
		}
	}
	return e
}

// checkKnots reports a knot with no active point on one side.
func checkKnots(tr *Track, m Model, active []bool) error {
	for _, k := range m.Knots {
		before, after := false, false
		for i, p := range tr.Points {
			if !active[i] {
				continue
			}
			if p.T < k {
				before = true
			}
			if p.T > k {
				after = true
			}
		}
		if !before || !after {
			return fmt.Errorf("%w: piecewise knot at %+.4f d has no observations on one side", ErrSingular, k)
		}
	}
	return nil
}

// solve performs one weighted least-squares fit of the active points, with
// the rows of d (built for fitU, or for the first 2q columns of a design
// built with the u column when fitU is false).
func solve(tr *Track, m Model, s Settings, fitU bool, active []bool, d *design) (*Solution, error) {
	q := m.NumPerCoord()
	np := 2 * q
	if fitU {
		np++
	}
	n := 0
	for _, a := range active {
		if a {
			n++
		}
	}
	rows := 2 * n
	if rows < np {
		return nil, &TooFewError{Model: m.Name(), Need: needFor(m, fitU), Have: distinctTimes(tr, active)}
	}
	// Column scaling: each column's sum of squares over the active rows,
	// gathered night by night as the rows are compressed (see
	// design.factorNights).
	scale := make([]float64, np)
	d.factorNights(tr, active, np, scale)
	for j, ss := range scale {
		if ss == 0 {
			if fitU && j == np-1 {
				return nil, fmt.Errorf("%w (no used observation has a site position)", ErrParallaxNotEstimable)
			}
			return nil, fmt.Errorf("%w: parameter %d has no data", ErrSingular, j+1)
		}
		scale[j] = math.Sqrt(ss)
	}
	a, b, solved := d.stackSolve(active, np, scale)
	// R, the upper triangle of the factorised (column-scaled) design.
	rr := mat.NewDense(np, np, nil)
	for i := 0; i < np; i++ {
		for j := i; j < np; j++ {
			rr.Set(i, j, a[i*np+j])
		}
	}
	var svd mat.SVD
	if !svd.Factorize(rr, mat.SVDNone) {
		return nil, fmt.Errorf("%w: the singular value decomposition did not converge", ErrSingular)
	}
	sv := svd.Values(nil)
	cond := math.Inf(1)
	if sv[len(sv)-1] > 0 {
		cond = sv[0] / sv[len(sv)-1]
	}
	if !(cond < singularCond) {
		if fitU {
			// Is the parallax column to blame?
			s2 := s
			s2.Parallax = ParallaxOff
			if _, err := solve(tr, m, s2, false, active, d); err == nil {
				return nil, fmt.Errorf("%w (the parallax cannot be told from the %s motion terms; give a distance or turn the parallax term off)",
					ErrParallaxNotEstimable, m.Name())
			}
		}
		return nil, fmt.Errorf("%w: the observations cannot separate the %s parameters (condition number %.3g)", ErrSingular, m.Name(), cond)
	}
	if !solved {
		return nil, fmt.Errorf("%w: %v", ErrSingular, mat.Condition(math.Inf(1)))
	}
	// Covariance of the scaled parameters: R⁻¹R⁻ᵀ.
	rt := mat.NewTriDense(np, mat.Upper, nil)
	for i := 0; i < np; i++ {
		for j := i; j < np; j++ {
			rt.SetTri(i, j, rr.At(i, j))
		}
	}
	var rinv mat.TriDense
	if err := rinv.InverseTri(rt); err != nil {
		return nil, fmt.Errorf("%w: %v", ErrSingular, err)
	}
	cov := mat.NewSymDense(np, nil)
	for i := 0; i < np; i++ {
		for j := i; j < np; j++ {
			var sum float64
			for k := j; k < np; k++ { // rinv upper: rinv[i][k] nonzero for k ≥ i
				sum += rinv.At(i, k) * rinv.At(j, k)
			}
			cov.SetSym(i, j, sum/(scale[i]*scale[j]))
		}
	}
	params := make([]float64, np)
	for j := range params {
		params[j] = b[j] / scale[j]
	}
	sol := &Solution{
		Model:            m,
		Settings:         s,
		Track:            tr,
		Params:           params,
		Cov:              cov,
		Cond:             cond,
		NumUsed:          n,
		DoF:              rows - np,
		InvDistance:      math.NaN(),
		InvDistanceSigma: math.NaN(),
	}
	switch {
	case fitU:
		sol.InvDistance = params[np-1]
	case s.Parallax == ParallaxFixed:
		sol.InvDistance, sol.InvDistanceSigma = s.InvDistance, 0
	}
	// χ² only: the residuals in full are filled for the final solution
	// (fitWith), the passes of the outlier rejection need only the points' χ².
	sol.Chi2 = d.pointChi2(sol, active)
	if sol.DoF > 0 {
		sol.Chi2DoF = sol.Chi2 / float64(sol.DoF)
	} else {
		sol.Chi2DoF = math.NaN()
	}
	if sol.Chi2DoF > 1 {
		sol.Cov.ScaleSym(sol.Chi2DoF, sol.Cov)
		sol.Scaled = true
		sol.Notes = append(sol.Notes, fmt.Sprintf(
			"χ²/dof = %.2f: the stated uncertainties look too small by a factor %.2f; the covariance is scaled by χ²/dof",
			sol.Chi2DoF, math.Sqrt(sol.Chi2DoF)))
	}
	if fitU {
		sol.InvDistanceSigma = math.Sqrt(sol.Cov.At(np-1, np-1))
		u, su := sol.InvDistance, sol.InvDistanceSigma
		switch {
		case u <= 0:
			sol.Notes = append(sol.Notes, fmt.Sprintf(
				"the fitted inverse distance %.3g ± %.3g au⁻¹ is not positive (unphysical); the parallax is poorly determined", u, su))
		case su > u:
			sol.Notes = append(sol.Notes, fmt.Sprintf(
				"the inverse distance is poorly determined: %.3g ± %.3g au⁻¹ (distance %.3g au)", u, su, 1/u))
		}
	}
	return sol, nil
}

// cholesky2 returns the Cholesky factor L = [l11 0; l21 l22] of the point's
// covariance [σξ², ρσξση; ρσξση, ση²]: l11 = σξ, l21 = ρση, l22 = ση√(1 − ρ²).
func cholesky2(p Point) (l11, l21, l22 float64) {
	return p.SigmaXi, p.Corr * p.SigmaEta, p.SigmaEta * math.Sqrt(1-p.Corr*p.Corr)
}

// computed returns the model's ξ, η at point p (geocentric track minus the
// parallax with the solution's u).
func (s *Solution) computed(p Point) (xi, eta float64) {
	xi, eta = s.geocentric(p.T)
	if u := s.InvDistance; !math.IsNaN(u) {
		xi -= u * p.SiteXi
		eta -= u * p.SiteEta
	}
	return xi, eta
}

// geocentric returns the geocentric track at T days from the epoch.
func (s *Solution) geocentric(tDays float64) (xi, eta float64) {
	q := s.Model.NumPerCoord()
	var buf [8]float64
	f := buf[:0]
	if q <= len(buf) {
		f = buf[:q]
	} else {
		f = make([]float64, q)
	}
	s.Model.basis(f, tDays/s.Track.TimeScaleDays, s.Track.TimeScaleDays)
	for j := 0; j < q; j++ {
		xi += s.Params[j] * f[j]
		eta += s.Params[q+j] * f[j]
	}
	return xi, eta
}

// PointResidual returns the O − C of any point (of the solution's track or of
// a track on the same plane and epoch, e.g. a night left out in
// cross-validation), with its normalised χ²; Flagged and Used are false. It
// uses the point's own site vector, so it needs no ephemeris work.
func (s *Solution) PointResidual(p Point) Residual {
	frame := newPlaneFrame(s.Track.Plane)
	return s.pointResidual(p, inv2(frame.skyToPlane(p.Xi, p.Eta)))
}

// planeJacobians returns, for every point of tr, the inverse of the
// projection's Jacobian at the point (plane offsets → east, north).
func planeJacobians(tr *Track) [][2][2]float64 {
	return planeJacobiansTo(make([][2][2]float64, len(tr.Points)), tr)
}

// planeJacobiansTo is planeJacobians into dst (len(tr.Points) long).
func planeJacobiansTo(dst [][2][2]float64, tr *Track) [][2][2]float64 {
	frame := newPlaneFrame(tr.Plane)
	for i := range tr.Points {
		p := &tr.Points[i]
		dst[i] = inv2(frame.skyToPlane(p.Xi, p.Eta))
	}
	return dst
}

func (s *Solution) pointResidual(p Point, jinv [2][2]float64) Residual {
	cx, ce := s.computed(p)
	l11, l21, l22 := cholesky2(p)
	return residualOf(p, cx, ce, l11, l21, l22, jinv)
}

// residualOf returns the residual of point p from its computed ξ, η, the
// Cholesky factor of its covariance and its inverse plane Jacobian.
func residualOf(p Point, cx, ce, l11, l21, l22 float64, jinv [2][2]float64) Residual {
	dx, de := p.Xi-cx, p.Eta-ce
	z1 := dx / l11
	z2 := (de - l21*z1) / l22
	dE := jinv[0][0]*dx + jinv[0][1]*de
	dN := jinv[1][0]*dx + jinv[1][1]*de
	return Residual{
		ObsIndex:   p.ObsIndex,
		Line:       p.Line,
		UTC:        p.UTC,
		DRAArcsec:  astro.Angle(dE).Arcseconds(),
		DDecArcsec: astro.Angle(dN).Arcseconds(),
		Chi2:       z1*z1 + z2*z2,
	}
}

// fillResiduals computes the residuals of every point, χ² (as
// design.pointChi2 does) and the RMS of the active points, with the basis values, Cholesky factors and plane Jacobians
// cached in d (the same arithmetic as [Solution.computed] and
// [Solution.pointResidual]).
func (s *Solution) fillResiduals(active []bool, d *design) {
	s.Residuals = make([]Residual, len(s.Track.Points))
	s.Chi2 = 0
	var ss float64
	n := 0
	q := d.q
	u := s.InvDistance
	for i, p := range s.Track.Points {
		k := d.src(i)
		f := d.basis[k*q : (k+1)*q]
		var cx, ce float64
		for j := 0; j < q; j++ {
			cx += s.Params[j] * f[j]
			ce += s.Params[q+j] * f[j]
		}
		if !math.IsNaN(u) {
			cx -= u * p.SiteXi
			ce -= u * p.SiteEta
		}
		c := d.chol[k]
		r := residualOf(p, cx, ce, c[0], c[1], c[2], d.jinv[k])
		r.Used = active[i]
		r.Flagged = p.Used && !active[i]
		if active[i] {
			s.Chi2 += r.Chi2
			ss += r.DRAArcsec*r.DRAArcsec + r.DDecArcsec*r.DDecArcsec
			n++
		}
		s.Residuals[i] = r
	}
	if n > 0 {
		s.RMSArcsec = math.Sqrt(ss / float64(2*n))
	}
}
