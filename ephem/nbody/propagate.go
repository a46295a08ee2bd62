package nbody

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"

	"arcfit/astro"
	"arcfit/ephem"
)

// DefaultTolerance is the integrator's local error tolerance when
// [Options.Tolerance] is 0. With it (measured by the tests, one year from a
// 2026 epoch) an invented main-belt orbit is within 2.5e-13 au of an
// integration at MinTolerance, a Jupiter-family comet within 1e-13 au and a
// near-Earth object passing the Earth at 0.01 au within 1.0e-12 au; forward
// one year and back returns each to 5e-13 au or better.
const DefaultTolerance = 1e-13

// The range of tolerances accepted by [Propagate].
const (
	MinTolerance = 1e-15
	MaxTolerance = 1e-6
)

// Options control [Propagate]. The zero value is the default: the full force
// model, [DefaultTolerance], no STM.
type Options struct {
	// Tolerance is the integrator's local error tolerance (relative, per
	// step; see [Propagate]); 0 means [DefaultTolerance]. It must lie in
	// [MinTolerance, MaxTolerance].
	Tolerance float64
	// STM asks for the state transition matrix ∂x(t)/∂x(epoch) at each
	// requested instant (the variational equations are integrated too).
	// Asking for it does not change the states: the step control looks at
	// the state alone.
	STM bool
	// Omit lists perturbing bodies to leave out of the force model (any of
	// ephem.Mercury … ephem.Neptune and ephem.Moon; [Perturbers] lists them
	// all). Omitting all of them leaves the two-body problem with
	// GM = ephem.GMSun. Close approaches are tracked for every body whatever
	// the force model.
	Omit []ephem.Body

	// maxStep overrides maxStepDays (tests only; 0 means maxStepDays).
	maxStep float64
	// extra, when set, adds an acceleration to the object's (tests only: it
	// sizes what the force model neglects). t is TDB days since J2000.
	extra func(t float64, r [3]float64) [3]float64
}

// Perturbers returns the bodies of the force model: Mercury, Venus, the
// Earth, the Moon, Mars, Jupiter, Saturn, Uranus and Neptune.
func Perturbers() []ephem.Body {
	out := make([]ephem.Body, nBodies)
	for b := range nBodies {
		out[b] = bodies[b].eb
	}
	return out
}

// Encounter is a close approach found during an integration: within 0.05 au
// of the Earth, or inside the Hill sphere of a planet or of the Moon.
type Encounter struct {
	// Body is the planet ("Earth", "Jupiter", …) or "Moon".
	Body string
	// TDB is the instant of least distance, DistanceAU that distance (from
	// the body's centre; for Mars to Neptune, from the planet-system
	// barycentre).
	TDB        astro.JD
	DistanceAU float64
	// HillAU is the body's Hill-sphere radius (au).
	HillAU float64
	// AtEnd reports a least distance at an end of the integrated span (the
	// epoch or the farthest requested instant) rather than a minimum inside
	// it: the object was still approaching there.
	AtEnd bool
}

// Result holds the states of one integration.
type Result struct {
	// States are the heliocentric ICRS position (au) and velocity (au/day)
	// at each requested instant, in the order asked.
	States [][6]float64
	// STM holds, when asked, ∂States[i]/∂x(epoch), row-major.
	STM [][36]float64
	// Encounters lists the close approaches between the epoch and the
	// requested instants, in time order.
	Encounters []Encounter
	// Steps is the number of integrator steps taken (both directions).
	Steps int
	// Rejected is the number of steps rejected by the step control.
	Rejected int
	// Evaluations is the number of force evaluations.
	Evaluations int
}

// Errors of [Propagate], wrapped with the instant and the circumstances;
// test with errors.Is.
var (
	// ErrTolerance reports an integration whose step size fell below what
	// the tolerance can be met with (an impact-like encounter), or that took
	// too many steps.
	ErrTolerance = errors.New("integration cannot meet its tolerance")
	// ErrImpact reports an object that comes closer to a body's centre than
	// the body's radius (the Earth, the Moon, Mercury, Venus, Mars).
	ErrImpact = errors.New("object enters a body")
)

// Propagate integrates the heliocentric ICRS state x (au, au/day) at the TDB
// instant epoch to each TDB instant in ts (any order, before or after the
// epoch; repeated instants are fine) under the Sun and the planets, and
// returns the states there. TT instants are accepted and read as TDB (the two
// differ by less than 2 ms).
//
// Force model: the Sun (GM = ephem.GMSun = k²), Mercury, Venus, the Earth,
// the Moon, and the Mars … Neptune systems as point masses with the DE405
// masses, the indirect term of the heliocentric frame included; see doc.go.
// The bodies' positions come from VSOP87 (ephem.HeliocentricICRS) and Meeus'
// Moon (ephem.MoonGeocentricICRS) through Chebyshev interpolants cached for
// the whole process (error below 1e-10 au).
//
// Integrator: Gragg–Bulirsch–Stoer extrapolation of Störmer's rule for
// second-order equations with order and step-size control (Hairer, Nørsett &
// Wanner, Solving ODEs I, 2nd ed., §II.14 and §II.9). The local error of each
// step is kept below Tolerance times the object's heliocentric distance (and
// speed, for the velocity). Every requested instant is the end of a step: the
// states carry no interpolation error. Forward and backward instants are
// integrated separately from the epoch.
//
// With opt.STM the 6×6 state transition matrix is integrated by the
// variational equations (the gravity gradients of the Sun and the bodies).
//
// Close approaches (within 0.05 au of the Earth, inside a Hill sphere) are
// found at the steps, refined to the least distance by a root of the radial
// velocity, and listed in Result.Encounters.
//
// Errors: a scale other than TDB or TT, non-finite inputs, a zero position, a
// tolerance out of range; an instant outside the span of the planetary
// series (J2000 ± 1000 years; wraps astro.ErrUnsupportedDate); an object that
// enters a body ([ErrImpact]) or an encounter so deep that the step size
// collapses ([ErrTolerance]). No partial result is returned with an error.
//
// Propagate is safe for concurrent use.
func Propagate(epoch astro.JD, x [6]float64, ts []astro.JD, opt Options) (*Result, error) {
	tol := opt.Tolerance
	if tol == 0 {
		tol = DefaultTolerance
	}
	if !(tol >= MinTolerance && tol <= MaxTolerance) {
		return nil, fmt.Errorf("nbody: tolerance %g outside [%g, %g]", opt.Tolerance, MinTolerance, MaxTolerance)
	}
	if err := checkScale("epoch", epoch); err != nil {
		return nil, err
	}
	for q, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("nbody: state component %d is %g, want a finite number", q, v)
		}
	}
	if x[0] == 0 && x[1] == 0 && x[2] == 0 {
		return nil, errors.New("nbody: zero position vector")
	}
	d0 := epoch.DaysSinceJ2000()
	if err := checkSpan(d0); err != nil {
		return nil, err
	}
	dts := make([]float64, len(ts))
	for i, t := range ts {
		if err := checkScale(fmt.Sprintf("instant %d", i), t); err != nil {
			return nil, err
		}
		dts[i] = (t.Day - epoch.Day) + (t.Frac - epoch.Frac)
		if math.IsNaN(dts[i]) || math.IsInf(dts[i], 0) {
			return nil, fmt.Errorf("nbody: instant %d is not finite", i)
		}
		if err := checkSpan(d0 + dts[i]); err != nil {
			return nil, err
		}
	}
	res := &Result{States: make([][6]float64, len(ts))}
	if opt.STM {
		res.STM = make([][36]float64, len(ts))
	}
	var fwd, bwd []int
	for i, dt := range dts {
		switch {
		case dt > 0:
			fwd = append(fwd, i)
		case dt < 0:
			bwd = append(bwd, i)
		default:
			res.States[i] = x
			if opt.STM {
				for q := range 6 {
					res.STM[i][q*6+q] = 1
				}
			}
		}
	}
	sort.SliceStable(fwd, func(a, b int) bool { return dts[fwd[a]] < dts[fwd[b]] })
	sort.SliceStable(bwd, func(a, b int) bool { return dts[bwd[a]] > dts[bwd[b]] })
	for pass, idx := range [][]int{fwd, bwd} {
		if len(idx) == 0 {
			continue
		}
		other := pass == 0 && len(bwd) > 0 || pass == 1 && len(fwd) > 0
		r, err := newRun(epoch, x, tol, opt)
		if err != nil {
			return nil, err
		}
		if err := r.integrate(idx, dts, res, !other); err != nil {
			return nil, err
		}
		res.Steps += r.st.steps
		res.Rejected += r.st.rejects
		res.Evaluations += r.model.evals
		res.Encounters = append(res.Encounters, r.enc.events...)
	}
	if len(fwd) == 0 && len(bwd) == 0 {
		// No integration: the epoch alone; report an encounter there.
		r, err := newRun(epoch, x, tol, opt)
		if err != nil {
			return nil, err
		}
		if err := r.enc.start(r, 0, r.y, r.yp, 1, true); err != nil {
			return nil, err
		}
		r.enc.finish(r)
		res.Encounters = r.enc.events
	}
	slices.SortStableFunc(res.Encounters, func(a, b Encounter) int {
		d := a.TDB.Sub(b.TDB)
		switch {
		case d < 0:
			return -1
		case d > 0:
			return 1
		}
		return 0
	})
	return res, nil
}

func checkScale(what string, t astro.JD) error {
	if t.Scale != astro.TDB && t.Scale != astro.TT {
		return fmt.Errorf("nbody: %s is on the %v scale, want TDB (or TT)", what, t.Scale)
	}
	if math.IsNaN(t.Day+t.Frac) || math.IsInf(t.Day+t.Frac, 0) {
		return fmt.Errorf("nbody: %s is not finite", what)
	}
	return nil
}

// checkSpan rejects an instant (TDB days since J2000) outside the span of the
// planetary series.
func checkSpan(d float64) error {
	if !(math.Abs(d) <= astro.DaysPerJulianMillennium-1) {
		return fmt.Errorf("nbody: JD %.5f TDB is outside the span of the planetary series, JD %.1f to %.1f (J2000 ± 1000 years): %w",
			astro.J2000+d, astro.J2000-astro.DaysPerJulianMillennium+1, astro.J2000+astro.DaysPerJulianMillennium-1, astro.ErrUnsupportedDate)
	}
	return nil
}

// run is one direction of one integration.
type run struct {
	epoch astro.JD
	model *forceModel
	st    *stepper
	y, yp []float64 // current state (positions, velocities; STM columns after)
	// y0, yp0 keep the state at the start of the current step
	y0, yp0 []float64
	ys, yps []float64 // work space of the encounter refinement
	stm     bool
	enc     tracker
	lastT   float64 // the end of the integrated span, days from the epoch
	hmax    float64 // the largest step, days
}

func newRun(epoch astro.JD, x [6]float64, tol float64, opt Options) (*run, error) {
	model, err := newForceModel(epoch, opt.Omit)
	if err != nil {
		return nil, err
	}
	model.extra = opt.extra
	m := 3
	if opt.STM {
		m = 21
	}
	r := &run{epoch: epoch, model: model, stm: opt.STM, hmax: maxStepDays}
	if opt.maxStep > 0 {
		r.hmax = opt.maxStep
	}
	r.st = newStepper(m, tol, model.accel)
	r.y, r.yp = make([]float64, m), make([]float64, m)
	r.y0, r.yp0 = make([]float64, m), make([]float64, m)
	r.ys, r.yps = make([]float64, m), make([]float64, m)
	copy(r.y, x[:3])
	copy(r.yp, x[3:])
	if opt.STM {
		for i := range 3 {
			r.y[3+6*i+i] = 1    // ∂r/∂r0 = I
			r.yp[3+6*i+3+i] = 1 // ∂v/∂v0 = I
		}
	}
	return r, nil
}

// integrate takes the run through the instants idx (sorted in the direction
// of integration; all dts of one sign) and writes the states into res.
// alone reports that no integration goes the other way from the epoch.
func (r *run) integrate(idx []int, dts []float64, res *Result, alone bool) error {
	sign := math.Copysign(1, dts[idx[0]])
	t := 0.0
	rn := math.Sqrt(r.y[0]*r.y[0] + r.y[1]*r.y[1] + r.y[2]*r.y[2])
	vn := math.Sqrt(r.yp[0]*r.yp[0] + r.yp[1]*r.yp[1] + r.yp[2]*r.yp[2])
	H := sign * math.Min(math.Abs(dts[idx[len(idx)-1]]), 0.05*rn/math.Max(vn, 1e-12))
	kc := 4
	lastRejected := false
	if err := r.enc.start(r, t, r.y, r.yp, sign, alone); err != nil {
		return err
	}
	for _, i := range idx {
		target := dts[i]
		for t != target {
			if r.st.steps+r.st.rejects >= maxSteps {
				return r.failure(t, fmt.Sprintf("%d steps without reaching JD %.5f", maxSteps, r.jd(target).Float()), ErrTolerance)
			}
			if math.Abs(H) > r.hmax {
				H = math.Copysign(r.hmax, H)
			}
			h := H
			clipped := false
			if rem := target - t; math.Abs(rem) <= 1.01*math.Abs(H) {
				h = rem
				clipped = true
			}
			a, err := r.st.try(t, h, kc, r.y, r.yp, lastRejected, clipped)
			if errors.Is(err, errNonFinite) {
				a = attempt{hNext: h / 4, kNext: kc}
				err = nil
			}
			if err != nil {
				return err
			}
			if !a.accepted {
				r.st.rejects++
				H, kc = a.hNext, a.kNext
				lastRejected = true
				if math.Abs(H) < 1e-11*math.Max(1, math.Abs(t)) {
					return r.failure(t, fmt.Sprintf("the step size fell to %.1e days", math.Abs(H)), ErrTolerance)
				}
				continue
			}
			r.st.steps++
			copy(r.y0, r.y)
			copy(r.yp0, r.yp)
			r.st.result(a.row, r.y0, r.y, r.yp)
			for q := range 3 {
				if math.IsNaN(r.y[q]+r.yp[q]) || math.IsInf(r.y[q]+r.yp[q], 0) {
					return r.failure(t, "the state is no longer finite", ErrTolerance)
				}
			}
			t0 := t
			if clipped {
				t = target
			} else {
				t += h
			}
			if err := r.enc.step(r, t0, t, a.row, sign); err != nil {
				return err
			}
			if !clipped || math.Abs(h) > 0.5*math.Abs(H) {
				kc, H = a.kNext, a.hNext
			}
			// else: a step cut short to land on an instant says little about
			// the natural step; keep the planned one.
			lastRejected = false
		}
		r.emit(i, res)
	}
	r.lastT = t
	return r.enc.finish(r)
}

// emit writes the current state (and STM) as result i.
func (r *run) emit(i int, res *Result) {
	copy(res.States[i][:3], r.y[:3])
	copy(res.States[i][3:], r.yp[:3])
	if !r.stm {
		return
	}
	phi := &res.STM[i]
	for row := range 3 {
		copy(phi[row*6:row*6+6], r.y[3+6*row:3+6*row+6])
		copy(phi[(row+3)*6:(row+3)*6+6], r.yp[3+6*row:3+6*row+6])
	}
}

// jd returns the instant t days from the epoch.
func (r *run) jd(t float64) astro.JD {
	return astro.JD{Day: r.epoch.Day, Frac: r.epoch.Frac + t, Scale: astro.TDB}.Normalized()
}

// failure builds the error of an integration that stops at t, naming the
// nearest body.
func (r *run) failure(t float64, what string, sentinel error) error {
	name, d := r.nearest(t, r.y)
	return fmt.Errorf("nbody: at JD %.5f TDB, %.3g au from the %s: %s: %w", r.jd(t).Float(), d, name, what, sentinel)
}

// nearest returns the body nearest to position y at t and its distance.
func (r *run) nearest(t float64, y []float64) (string, float64) {
	best, name := math.Inf(1), "Sun"
	if d := math.Sqrt(y[0]*y[0] + y[1]*y[1] + y[2]*y[2]); d < best {
		best = d
	}
	for b := range nBodies {
		p, _, err := r.model.state(b, t)
		if err != nil {
			continue
		}
		dx, dy, dz := y[0]-p[0], y[1]-p[1], y[2]-p[2]
		if d := math.Sqrt(dx*dx + dy*dy + dz*dz); d < best {
			best, name = d, bodies[b].name
		}
	}
	return name, best
}
