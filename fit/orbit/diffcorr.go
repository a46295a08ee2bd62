package orbit

import (
	"fmt"
	"math"
	"strings"

	"arcfit/astro"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// Outlier rule and limits of the differential correction. The rejection rule
// and its two constants mirror those of the sky-plane fit (package fit,
// outliers.go: DefaultRejectChi2 and MaxRejectFraction), which this package
// cannot import; the two must stay equal.
const (
	// DefaultRejectChi2 is the default outlier threshold on an observation's
	// normalised 2-dof χ²: 11.83 = −2 ln(0.0027), the level exceeded with
	// probability 0.27 % (the "3 σ" level) by a Gaussian error in two
	// coordinates, whose χ² survival function is exp(−x/2) (Press et al.,
	// Numerical Recipes, 3rd ed. (2007), §15.6; common practice).
	DefaultRejectChi2 = 11.83
	// MaxRejectFraction is the largest fraction of the used observations the
	// outlier rejection may flag (20 %); beyond it the data, not a few points,
	// disagree with the orbit.
	MaxRejectFraction = 0.2
	// DefaultMaxIterations bounds the Levenberg–Marquardt iterations (each
	// one forms a Jacobian); a start within the basin of the solution
	// converges in well under 20.
	DefaultMaxIterations = 50
	// MaxCond is the condition number of the scaled, whitened Jacobian at
	// the solution beyond which the orbit counts as undetermined: 1e12
	// leaves about 4 significant digits in the worst-determined combination
	// of parameters at double precision (ε ≈ 2.2e-16; Golub & Van Loan,
	// Matrix Computations, 4th ed. (2013), §5.3.8). The sky-plane fit uses
	// the same limit.
	MaxCond = 1e12
	// minRadiusAU is the smallest admissible heliocentric distance of a
	// trial orbit at its epoch: the Sun's radius, 696 000 km = 0.00465 au
	// (IAU 2015 Resolution B3 nominal solar radius).
	minRadiusAU = 0.00465
	// maxVInfAUDay bounds the hyperbolic excess speed of a trial orbit,
	// v∞ = √(v² − 2GM/r): 0.0578 au/day = 100 km/s, about three times the
	// arrival speed of the fastest interstellar visitors seen so far (≈ 30
	// km/s, from memory). A step beyond it is an iteration running away
	// (an orbit hundreds of au out moving at a fraction of c can pass near
	// a few lines of sight), not a candidate orbit.
	maxVInfAUDay = 100 * astro.SecondsPerDay / astro.AUKm
)

// Options control [Correct] and [Determine]. The zero value is the default.
type Options struct {
	// KeepAll turns the outlier rejection off.
	KeepAll bool
	// RejectChi2 is the threshold on an observation's normalised 2-dof χ²;
	// 0 means [DefaultRejectChi2].
	RejectChi2 float64
	// MaxIterations bounds the iterations of one correction; 0 means
	// [DefaultMaxIterations].
	MaxIterations int
	// SlopeG is the slope parameter G of the H, G magnitude fit; 0 means
	// ephem.DefaultSlopeG (0.15).
	SlopeG float64
	// Motion is the dynamics [Determine] fits the orbit with (nil: two-body
	// motion). [Correct] takes the dynamics of the state it starts from.
	Motion Motion
}

// ObsResidual is one observation's residual against a fitted orbit.
type ObsResidual struct {
	// Index is the observation's index in the slice given to the fit; Line
	// its line in the file.
	Index, Line int
	UTC         astro.JD
	// DEArcsec, DNArcsec are observed minus computed along the local east
	// (Δα cos δ) and north (Δδ), arcseconds (see [Residual]).
	DEArcsec, DNArcsec float64
	// Chi2 is the observation's 2-dof χ² against its stated covariance.
	Chi2 float64
	// Flagged reports an observation rejected as an outlier.
	Flagged bool
	// Used reports whether it took part in the final fit (false when flagged,
	// and for one the caller marked unused).
	Used bool
}

// Solution is a differentially corrected orbit.
type Solution struct {
	// State is the fitted orbit at its epoch (that of the starting state).
	State State
	// Cov is the 6×6 covariance of State in the order Pos.X, Pos.Y, Pos.Z,
	// Vel.X, Vel.Y, Vel.Z (au, au/day), multiplied by Chi2DoF when Scaled.
	Cov *mat.SymDense
	// Chi2 is the sum of the used observations' χ²; DoF = 2·NumUsed − 6.
	Chi2 float64
	DoF  int
	// Chi2DoF is Chi2/DoF; 0 when DoF is 0 (an exactly determined orbit,
	// which Notes mention).
	Chi2DoF float64
	// Scaled reports that χ²/dof > 1: the stated σ look too small and Cov was
	// multiplied by χ²/dof (Notes say so).
	Scaled bool
	// RMSArcsec pools the east and north residuals of the used observations:
	// √(Σ(ΔE² + ΔN²)/(2n)), as the sky-plane fit does.
	RMSArcsec float64
	// Residuals lists every observation given, in order.
	Residuals []ObsResidual
	// NumUsed is the number of observations in the final fit.
	NumUsed int
	// Iterations is the number of Levenberg–Marquardt iterations, summed
	// over the refits of the outlier rejection.
	Iterations int
	// Cond is the 2-norm condition number of the whitened Jacobian at the
	// solution after its columns were scaled to unit length.
	Cond float64
	// Start names the method of the starting orbit ("gauss", "ranging", …);
	// "given" for a state passed to [Correct] directly.
	Start string
	// H is the fitted absolute magnitude for the slope G, HSigma its 1-σ
	// and NumMag the number of magnitudes used (see [FitH]); H is NaN and
	// NumMag 0 when no used observation has a magnitude.
	H, HSigma, G float64
	NumMag       int
	// FirstUTC and LastUTC bound the arc of the used observations.
	FirstUTC, LastUTC astro.JD
	// Encounters are the close approaches the integration of the orbit from
	// its epoch to the observations found (within 0.05 au of the Earth,
	// inside a planet's Hill sphere); always nil for two-body motion.
	Encounters []Encounter
	// Notes are plain-words remarks: scaled covariance, outliers flagged
	// (each with its residual), no degrees of freedom, the magnitude fit.
	Notes []string
}

// Correct fits the orbit to the used observations by weighted least squares,
// starting from the state start, and returns the orbit at start.Epoch with
// its covariance.
//
// Parameters: the six Cartesian components of the state at start.Epoch
// (heliocentric ICRS, au and au/day; the osculating state when start has a
// Motion), moved by start.Motion (two-body motion when nil). The residuals
// are those of [State.Residuals]: light-time-retarded topocentric places
// (each observation's stored site geometry, UTC → TT → TDB) against the
// observed ones, on the tangent plane, whitened by each observation's 2×2
// covariance (σ in RA·cos δ and Dec, and their correlation). With a Motion
// each evaluation is one integration to all the observations.
//
// Method: Levenberg–Marquardt. At each iterate x the whitened Jacobian
// J = ∂r/∂x is formed by central differences for two-body motion (see
// [jacobianFD] for the step sizes), and from the state transition matrices
// of one integration with the variational equations for a Motion (see
// [corrector.jacobianSTM]); its columns are scaled to unit length (J̃ = J·D⁻¹, the scaling of
// Moré 1978, which puts positions in au and velocities in au/day on one
// footing), and J̃ is factorised by the SVD, J̃ = U Σ Vᵀ. The damped step is
//
//	D·δ = −V · diag(σᵢ/(σᵢ² + λ)) · Uᵀ r,
//
// the minimiser of |r + Jδ|² + λ|Dδ|², starting from λ = 1e-3. A step that
// lowers χ² is taken and λ multiplied by max(1/10, 1 − (2ρ − 1)³), ρ the
// ratio of the actual to the linearly predicted decrease of χ² (Nielsen
// 1999, with the floor 1/10 of Marquardt's schedule); otherwise λ is
// multiplied by ν = 2, 4, 8, … and the step retried.
// A step to an invalid orbit (a propagation that fails, r below the Sun's
// radius, a hyperbolic excess speed above 100 km/s, a non-finite residual)
// counts as not lowering χ². The normal equations are never formed.
//
// Convergence: at each new Jacobian the decrease of χ² the full Gauss–Newton
// step would bring, |Uᵀr|², is compared with 1e-10·χ² + 1e-10 (a relative
// change of χ² below 1e-10; equivalently a step shorter than 1e-5 of the
// parameters' σ in the metric of the covariance). The iteration stops with
// [ErrNotConverged] after opt.MaxIterations Jacobians, or when λ exceeds
// 1e16 without a step lowering χ² while the predicted decrease is still above
// 1e-6·(1 + χ²) — with [ErrUndetermined] instead when the steps that would
// lower χ² leave the admissible orbits (the data prefer an orbit beyond the
// limits, as a single night's arc can), or the condition number exceeds
// [MaxCond].
//
// Covariance: (JᵀJ)⁻¹ = D⁻¹ V Σ⁻² Vᵀ D⁻¹ at the solution, multiplied by χ²/dof
// when that exceeds 1 (Scaled). An orbit whose scaled Jacobian has a
// condition number above [MaxCond] is reported with [ErrUndetermined].
//
// Outliers (unless opt.KeepAll): the rule of the sky-plane fit. After each
// converged fit, the used observation with the largest
//
//	χ²ᵢ / max(1, (χ² − χ²ᵢ)/(dof − 2))
//
// (its 2-dof χ² over the reduced χ² of the others) is flagged if that exceeds
// opt.RejectChi2 (default [DefaultRejectChi2]), and the orbit is refitted from
// the current one; one observation per pass, at most [MaxRejectFraction] of
// the used observations, and never below four used. Each flagged observation
// is listed in Notes with its residual.
//
// obs is not modified. The magnitudes of the used observations give H
// ([FitH]).
//
// Errors: *[CorrectError] wrapping [ErrTooFewObservations] (fewer than three
// used observations), [ErrInvalidStart], [ErrNotConverged] or
// [ErrUndetermined]; an option out of range.
//
// Reference: Levenberg (1944), Q. Appl. Math. 2, 164; Marquardt (1963),
// J. SIAM 11, 431; Nielsen, "Damping parameter in Marquardt's method",
// IMM-REP-1999-05, DTU (1999) (the λ update); Moré, "The Levenberg–Marquardt
// algorithm: implementation and theory", Lecture Notes in Mathematics 630
// (1978), 105 (scaling);
// Press et al., Numerical Recipes, 3rd ed. (2007), §15.4–15.5 (SVD solution,
// the λ schedule), §15.6 (covariance, χ² levels); Björck, Numerical Methods
// for Least Squares Problems (1996), ch. 1–2.
func Correct(obs []Observation, start State, opt Options) (*Solution, error) {
	o, err := opt.resolved()
	if err != nil {
		return nil, err
	}
	work := make([]Observation, len(obs))
	copy(work, obs)
	nUsed := 0
	for i := range work {
		if work[i].Used {
			nUsed++
		}
	}
	if nUsed < 3 {
		return nil, &CorrectError{
			Reason: fmt.Sprintf("%d used observation(s); an orbit has six parameters and needs at least three observations", nUsed),
			Hint:   "more observations, on more nights, would help",
			Err:    ErrTooFewObservations,
		}
	}
	if start.Epoch.Scale != astro.TDB && start.Epoch.Scale != astro.TT {
		return nil, &CorrectError{Reason: fmt.Sprintf("starting orbit has a %v epoch", start.Epoch.Scale),
			Hint: "give the epoch in TDB", Err: ErrInvalidStart}
	}
	c := newCorrector(work, start.Epoch)
	c.motion = start.Motion
	res, err := c.run(stateVector(start), o.MaxIterations)
	if err != nil {
		return nil, err
	}
	iters := res.iterations
	var flaggedNotes []string
	if !o.KeepAll {
		res, flaggedNotes, iters = c.rejectOutliers(res, o, iters, nUsed)
	}
	sol, err := c.finish(res, o)
	if err != nil {
		return nil, err
	}
	sol.Iterations = iters
	sol.Start = "given"
	sol.Notes = append(sol.Notes, flaggedNotes...)
	return sol, nil
}

// resolved returns the options with their defaults filled in, or an error
// for an option out of range.
func (o Options) resolved() (Options, error) {
	switch {
	case math.IsNaN(o.RejectChi2) || math.IsInf(o.RejectChi2, 0) || o.RejectChi2 < 0:
		return o, fmt.Errorf("orbit: outlier threshold %g, want a finite χ² > 0 (0 for the default %.2f)", o.RejectChi2, DefaultRejectChi2)
	case o.MaxIterations < 0:
		return o, fmt.Errorf("orbit: %d iterations, want a positive limit (0 for the default %d)", o.MaxIterations, DefaultMaxIterations)
	case math.IsNaN(o.SlopeG) || math.IsInf(o.SlopeG, 0):
		return o, fmt.Errorf("orbit: slope parameter G = %g, want a finite value (0 for the default 0.15)", o.SlopeG)
	}
	if o.RejectChi2 == 0 {
		o.RejectChi2 = DefaultRejectChi2
	}
	if o.MaxIterations == 0 {
		o.MaxIterations = DefaultMaxIterations
	}
	return o, nil
}

// corrector holds one differential correction: the observations (Used
// cleared for the flagged ones), the epoch and work buffers.
type corrector struct {
	obs    []Observation
	inUsed []bool // Used as given
	epoch  astro.JD
	motion Motion     // the dynamics of the start; nil for two-body
	r      []float64  // whitened residuals at the current iterate
	rp, rm []float64  // buffers of the finite differences
	jac    *mat.Dense // whitened Jacobian, columns scaled to unit length
}

func newCorrector(obs []Observation, epoch astro.JD) *corrector {
	c := &corrector{obs: obs, epoch: epoch, inUsed: make([]bool, len(obs))}
	for i := range obs {
		c.inUsed[i] = obs[i].Used
	}
	return c
}

// lmResult is a converged fit.
type lmResult struct {
	x          [6]float64
	chi2       float64
	r          []float64 // whitened residuals, two per used observation
	iterations int
	cov        *mat.SymDense // unscaled (JᵀJ)⁻¹
	cond       float64
}

// stateVector and stateOfVector map a State to the parameter vector and back.
func stateVector(s State) [6]float64 {
	return [6]float64{s.Pos.X, s.Pos.Y, s.Pos.Z, s.Vel.X, s.Vel.Y, s.Vel.Z}
}

func stateOfVector(epoch astro.JD, x [6]float64) State {
	return State{Epoch: epoch, Pos: r3.Vec{X: x[0], Y: x[1], Z: x[2]}, Vel: r3.Vec{X: x[3], Y: x[4], Z: x[5]}}
}

// state returns the corrector's orbit of parameter vector x, with its
// dynamics.
func (c *corrector) state(x [6]float64) State {
	st := stateOfVector(c.epoch, x)
	st.Motion = c.motion
	return st
}

// residuals evaluates the whitened residuals of the parameter vector x into
// dst (reused); an orbit that cannot be evaluated gives an error.
func (c *corrector) residuals(x [6]float64, dst []float64) ([]float64, float64, error) {
	st := c.state(x)
	if !st.Valid() {
		return dst, math.Inf(1), fmt.Errorf("orbit: state not finite")
	}
	if r3.Norm(st.Pos) < minRadiusAU {
		return dst, math.Inf(1), fmt.Errorf("orbit: state inside the Sun (r = %.3g au)", r3.Norm(st.Pos))
	}
	if e := st.Energy(); e > 0.5*maxVInfAUDay*maxVInfAUDay {
		kms := func(v float64) float64 { return v * astro.AUKm / astro.SecondsPerDay }
		return dst, math.Inf(1), fmt.Errorf("orbit: hyperbolic excess speed %.0f km/s, above the limit of %.0f km/s", kms(math.Sqrt(2*e)), kms(maxVInfAUDay))
	}
	dst, chi2, err := st.Residuals(c.obs, dst[:0])
	if err != nil {
		return dst, math.Inf(1), err
	}
	if math.IsNaN(chi2) || math.IsInf(chi2, 0) {
		return dst, math.Inf(1), fmt.Errorf("orbit: residuals not finite")
	}
	return dst, chi2, nil
}

// poorFitChi2DoF is the χ²/dof above which a solution gets a note that it
// does not fit the observations to their σ: 9, residuals three times the
// stated σ. Amateur σ are often understated by a factor up to about two;
// beyond three a secondary minimum of χ² is the likelier cause.
const poorFitChi2DoF = 9

// Convergence constants of [Correct] (see its doc comment).
const (
	convTolRel   = 1e-10
	convTolAbs   = 1e-10
	stallTol     = 1e-6
	lambdaStart  = 1e-3
	lambdaMin    = 1e-12
	lambdaGiveUp = 1e16
)

// run iterates Levenberg–Marquardt from x0 on the used observations.
func (c *corrector) run(x0 [6]float64, maxIter int) (lmResult, error) {
	var err error
	var chi2 float64
	c.r, chi2, err = c.residuals(x0, c.r)
	if err != nil {
		return lmResult{}, &CorrectError{
			Reason: fmt.Sprintf("starting orbit cannot be computed for the observations (%v)", err),
			Hint:   "another starting orbit would help", Err: ErrInvalidStart}
	}
	x := x0
	m := len(c.r)
	dof := m - 6
	lambda, nu := lambdaStart, 2.0
	lastCond := 0.0
	var svd mat.SVD
	var u, v mat.Dense
	ur := make([]float64, 6)
	rn := make([]float64, 0, m)
	for iter := 1; iter <= maxIter; iter++ {
		d, err := c.jacobian(x)
		if err != nil {
			return lmResult{}, &CorrectError{
				Reason:     fmt.Sprintf("partial derivatives could not be formed at iteration %d (%v)", iter, err),
				Hint:       "another starting orbit would help",
				Iterations: iter, Chi2DoF: chi2PerDoF(chi2, dof), Err: ErrNotConverged}
		}
		if !svd.Factorize(c.jac, mat.SVDThin) {
			return lmResult{}, &CorrectError{Reason: "the singular value decomposition of the Jacobian failed",
				Hint: "a longer arc or more nights would help", Iterations: iter, Err: ErrUndetermined}
		}
		sv := svd.Values(nil)
		lastCond = math.Inf(1)
		if sv[5] > 0 {
			lastCond = sv[0] / sv[5]
		}
		svd.UTo(&u)
		svd.VTo(&v)
		pred := 0.0
		for i := 0; i < 6; i++ {
			s := 0.0
			for k := 0; k < m; k++ {
				s += u.At(k, i) * c.r[k]
			}
			ur[i] = s
			if sv[i] > sv[0]*1e-15 {
				pred += s * s
			}
		}
		if pred <= convTolRel*chi2+convTolAbs {
			return c.converged(x, chi2, iter, sv, &v, d)
		}
		var edge error // why a step left the admissible orbits, in this iteration
		for {
			var z [6]float64
			for j := 0; j < 6; j++ {
				for i := 0; i < 6; i++ {
					if sv[i] > sv[0]*1e-15 {
						z[j] -= v.At(j, i) * sv[i] * ur[i] / (sv[i]*sv[i] + lambda)
					}
				}
			}
			xn := x
			for j := range xn {
				xn[j] += z[j] / d[j]
			}
			// Decrease of χ² the linear model predicts for the step.
			lin := 0.0
			for i := 0; i < 6; i++ {
				if sv[i] > sv[0]*1e-15 {
					f := lambda / (sv[i]*sv[i] + lambda)
					lin += ur[i] * ur[i] * (1 - f*f)
				}
			}
			var chi2n float64
			rn, chi2n, err = c.residuals(xn, rn)
			if err != nil {
				edge = err
			}
			if err == nil && chi2n < chi2 {
				rho := (chi2 - chi2n) / lin
				x, chi2 = xn, chi2n
				c.r, rn = rn, c.r
				lambda = math.Max(lambda*math.Max(0.1, 1-math.Pow(2*rho-1, 3)), lambdaMin)
				nu = 2
				break
			}
			lambda *= nu
			nu *= 2
			if lambda > lambdaGiveUp {
				if pred <= stallTol*(1+chi2) {
					return c.converged(x, chi2, iter, sv, &v, d)
				}
				if !(lastCond <= MaxCond) {
					return lmResult{}, undetermined(lastCond, iter, chi2PerDoF(chi2, dof))
				}
				if edge != nil {
					return lmResult{}, &CorrectError{
						Reason: fmt.Sprintf("the observations do not determine the orbit: after %d iterations (χ²/dof %.3g) the best fit lies beyond the admissible orbits (%v)",
							iter, chi2PerDoF(chi2, dof), strings.TrimPrefix(edge.Error(), "orbit: ")),
						Hint:       "a longer arc or more nights would help (a second night usually suffices); meanwhile the sky-plane models give the position for the next hours",
						Iterations: iter, Chi2DoF: chi2PerDoF(chi2, dof), Err: ErrUndetermined}
				}
				return lmResult{}, &CorrectError{
					Reason: fmt.Sprintf("differential correction stalled after %d iterations (χ²/dof %.3g): no step lowers χ²",
						iter, chi2PerDoF(chi2, dof)),
					Hint:       "a longer arc, more nights, or another starting orbit would help",
					Iterations: iter, Chi2DoF: chi2PerDoF(chi2, dof), Err: ErrNotConverged}
			}
		}
	}
	if !(lastCond <= MaxCond) {
		return lmResult{}, undetermined(lastCond, maxIter, chi2PerDoF(chi2, dof))
	}
	return lmResult{}, &CorrectError{
		Reason: fmt.Sprintf("differential correction did not converge in %d iterations (χ²/dof %.3g at the last step)",
			maxIter, chi2PerDoF(chi2, dof)),
		Hint:       "a longer arc, more nights, or another starting orbit would help",
		Iterations: maxIter, Chi2DoF: chi2PerDoF(chi2, dof), Err: ErrNotConverged}
}

// converged builds the result at the converged x from the SVD of its scaled
// Jacobian.
func (c *corrector) converged(x [6]float64, chi2 float64, iter int, sv []float64, v *mat.Dense, d [6]float64) (lmResult, error) {
	cond := math.Inf(1)
	if sv[5] > 0 {
		cond = sv[0] / sv[5]
	}
	if !(cond <= MaxCond) {
		return lmResult{}, undetermined(cond, iter, chi2PerDoF(chi2, len(c.r)-6))
	}
	r := make([]float64, len(c.r))
	copy(r, c.r)
	return lmResult{x: x, chi2: chi2, r: r, iterations: iter, cov: covFromSVD(sv, v, d), cond: cond}, nil
}

// undetermined returns the error of an orbit whose scaled Jacobian has the
// condition number cond > MaxCond.
func undetermined(cond float64, iter int, chi2DoF float64) error {
	c := "infinite"
	if !math.IsInf(cond, 0) && !math.IsNaN(cond) {
		c = fmt.Sprintf("%.2g", cond)
	}
	return &CorrectError{
		Reason:     fmt.Sprintf("the observations do not determine all six orbital parameters (condition number %s > %.0e)", c, MaxCond),
		Hint:       "a longer arc or more nights would help (a second night usually suffices); meanwhile the sky-plane models give the position for the next hours",
		Iterations: iter, Chi2DoF: chi2DoF, Err: ErrUndetermined}
}

// chi2PerDoF returns χ²/dof, 0 when dof ≤ 0.
func chi2PerDoF(chi2 float64, dof int) float64 {
	if dof <= 0 {
		return 0
	}
	return chi2 / float64(dof)
}

// rejectOutliers runs the iterative rejection of [Correct] from the converged
// result res; it returns the final result, one note per flagged observation
// and the iterations summed.
func (c *corrector) rejectOutliers(res lmResult, o Options, iters, nUsed int) (lmResult, []string, int) {
	maxFlag := int(math.Floor(MaxRejectFraction * float64(nUsed)))
	var notes []string
	for flagged := 0; flagged < maxFlag && nUsed-flagged > 4; {
		dof := len(res.r) - 6
		worst, worstStat, worstChi2 := -1, 0.0, 0.0
		k := 0
		for i := range c.obs {
			if !c.obs[i].Used {
				continue
			}
			chi2 := res.r[2*k]*res.r[2*k] + res.r[2*k+1]*res.r[2*k+1]
			k++
			scale := 1.0
			if dof > 2 {
				scale = math.Max(1, (res.chi2-chi2)/float64(dof-2))
			}
			if st := chi2 / scale; st > worstStat {
				worst, worstStat, worstChi2 = i, st, chi2
			}
		}
		if worst < 0 || worstStat <= o.RejectChi2 {
			break
		}
		c.obs[worst].Used = false
		next, err := c.run(res.x, o.MaxIterations)
		if err != nil {
			c.obs[worst].Used = true
			notes = append(notes, fmt.Sprintf("line %d looks like an outlier (normalised χ² %.1f) but the orbit without it did not converge; kept",
				c.obs[worst].Line, worstStat))
			break
		}
		iters += next.iterations
		ob := &c.obs[worst]
		dE, dN := 0.0, 0.0
		if seen, err := c.state(next.x).Observe(ob.Geo); err == nil {
			dE, dN = Residual(ob.RA, ob.Dec, seen.Dir)
		}
		notes = append(notes, fmt.Sprintf(
			"line %d (%s) flagged as an outlier and left out: residual east %+.2f″ north %+.2f″, normalised χ² %.1f > %.2f (χ² %.1f)",
			ob.Line, astro.FormatISO8601(ob.Geo.UTC, 1), astro.Angle(dE).Arcseconds(), astro.Angle(dN).Arcseconds(),
			worstStat, o.RejectChi2, worstChi2))
		res = next
		flagged++
	}
	return res, notes, iters
}

// finish builds the Solution from the final result: residuals of every
// observation, χ² statistics, the scaled covariance, H.
func (c *corrector) finish(res lmResult, o Options) (*Solution, error) {
	st := c.state(res.x)
	sol := &Solution{State: st, Chi2: res.chi2, Cond: res.cond, H: math.NaN()}
	// One propagation to every observation, used or not (to the used ones
	// alone when an unused one cannot be reached).
	path, idx, err := st.usedPath(c.obs, true)
	if err != nil {
		if path, idx, err = st.usedPath(c.obs, false); err != nil {
			return nil, err
		}
	}
	sol.Encounters = path.Encounters
	sumSq, n := 0.0, 0
	first, last := math.Inf(1), math.Inf(-1)
	sol.Residuals = make([]ObsResidual, len(c.obs))
	seen := make([]Seen, len(c.obs))
	ok := make([]bool, len(c.obs))
	unevaluated := 0
	for i := range c.obs {
		ob := &c.obs[i]
		rr := ObsResidual{Index: ob.Index, Line: ob.Line, UTC: ob.Geo.UTC, Used: ob.Used}
		rr.Flagged = c.inUsed[i] && !ob.Used
		var s Seen
		err := errNoMotion
		if idx[i] >= 0 {
			s, err = path.Observe(idx[i], ob.Geo)
		}
		if err != nil {
			if ob.Used { // evaluated by the fit a moment ago: cannot happen
				return nil, fmt.Errorf("orbit: line %d: %v", ob.Line, err)
			}
			unevaluated++
			sol.Residuals[i] = rr
			continue
		}
		seen[i], ok[i] = s, true
		dE, dN := Residual(ob.RA, ob.Dec, s.Dir)
		w1, w2 := ob.Whitened(dE, dN)
		rr.DEArcsec, rr.DNArcsec = astro.Angle(dE).Arcseconds(), astro.Angle(dN).Arcseconds()
		rr.Chi2 = w1*w1 + w2*w2
		sol.Residuals[i] = rr
		if ob.Used {
			sumSq += rr.DEArcsec*rr.DEArcsec + rr.DNArcsec*rr.DNArcsec
			n++
			t := ob.Geo.UTC.Float()
			if t < first {
				first, sol.FirstUTC = t, ob.Geo.UTC
			}
			if t > last {
				last, sol.LastUTC = t, ob.Geo.UTC
			}
		}
	}
	if unevaluated > 0 {
		sol.Notes = append(sol.Notes, fmt.Sprintf("%d unused observation(s) could not be computed for the orbit; their residuals are 0", unevaluated))
	}
	sol.NumUsed = n
	sol.RMSArcsec = math.Sqrt(sumSq / float64(2*n))
	sol.DoF = 2*n - 6
	sol.Chi2DoF = chi2PerDoF(sol.Chi2, sol.DoF)
	sol.Cov = mat.NewSymDense(6, nil)
	sol.Cov.CopySym(res.cov)
	switch {
	case sol.DoF == 0:
		sol.Notes = append(sol.Notes, "three observations and six parameters: no degree of freedom, the orbit passes through the observations and χ²/dof is undefined (reported as 0)")
	case sol.Chi2DoF > 1:
		sol.Scaled = true
		sol.Cov.ScaleSym(sol.Chi2DoF, sol.Cov)
		sol.Notes = append(sol.Notes, fmt.Sprintf("χ²/dof = %.2f > 1: the stated σ look too small; the covariance is scaled by it", sol.Chi2DoF))
		if sol.Chi2DoF > poorFitChi2DoF {
			sol.Notes = append(sol.Notes, fmt.Sprintf(
				"the residuals are %.1f times the stated σ: the correction may have stopped in a secondary minimum (another starting orbit may help), or the σ are understated",
				math.Sqrt(sol.Chi2DoF)))
		}
	}
	g := o.SlopeG
	if g == 0 {
		g = defaultSlopeG
	}
	sol.G = g
	h, hs, nm, notes := FitH(c.obs, seen, ok, g)
	sol.H, sol.HSigma, sol.NumMag = h, hs, nm
	sol.Notes = append(sol.Notes, notes...)
	return sol, nil
}
