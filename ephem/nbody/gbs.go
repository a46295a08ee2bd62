package nbody

import (
	"errors"
	"math"
)

// The extrapolation integrator for y″ = f(t, y): Störmer's rule on n_j = 2j
// substeps, Richardson extrapolation of the results in h², and the order and
// step-size control of the GBS method.
//
// Reference: Hairer, E., Nørsett, S. P., Wanner, G., Solving Ordinary
// Differential Equations I, 2nd ed. (Springer 1993): §II.14 (extrapolation
// for second-order equations: Störmer's rule with the starting step and the
// derivative formula, its expansion in even powers of h after Gragg 1965),
// §II.9 (the extrapolation tableau by the Aitken–Neville formula, the error
// estimate from its last two entries, the optimal step sizes and the work per
// unit step that choose the order, the convergence window k−1, k, k+1).

const (
	maxRows  = 11     // rows of the tableau, n = 2, 4, …, 22 (order up to 22)
	minKc    = 2      // smallest target row (0-based), so rows 1…3 decide
	maxKc    = 9      // largest target row (0-based)
	maxSteps = 200000 // accepted and rejected steps per direction
	// safety factors of the optimal step size H_j = H·fac1·(fac2/err_j)^(1/(2j+1))
	// (HNW §II.9 suggest 0.94 and 0.65; from memory, tuning values only)
	fac1, fac2     = 0.94, 0.65
	facMin, facMax = 0.02, 4.0
)

// maxStepDays bounds the step size: a fifth of Mercury's orbital period
// (88 days). Through the indirect term the whole heliocentric force
// oscillates with the inner planets' periods (Mercury's part alone is
// GM/r² ≈ 3e-10 au/day²), and the extrapolation's error estimate, which is
// asymptotic, underestimates the error of steps that span much of such a
// period: measured on a main-belt orbit over a year at the default
// tolerance, 4e-11 au with free steps (about 90 days), 6e-13 au with this
// bound, for 20 % more force evaluations (TestStepBound).
const maxStepDays = 16.0

// errNonFinite marks a force evaluation that overflowed (a trial step far
// too long, or a collision); the step is retried shorter.
var errNonFinite = errors.New("nbody: non-finite acceleration")

// seqN returns n_j = 2(j+1), the substeps of row j (0-based).
func seqN(j int) int { return 2 * (j + 1) }

// stormer integrates y″ = f(t, y) over one macro step H with n substeps of
// Störmer's rule in the summed form (HNW §II.14, eq. 14.32 in the form with
// the differences Δ_i = y_{i+1} − y_i, which limits rounding):
//
//	h = H/n,  Δ_0 = h(y′_0 + (h/2) f(t, y_0)),  y_1 = y_0 + Δ_0,
//	Δ_i = Δ_{i−1} + h² f(t + ih, y_i),  y_{i+1} = y_i + Δ_i,  i = 1 … n−1,
//	y′_n = Δ_{n−1}/h + (h/2) f(t + H, y_n).
//
// f0 is f(t, y0), shared by all rows. The result goes to out: first the m
// increments y_n − y0 (summed as increments, so the rounding of the sums is
// relative to the step's motion rather than to |y|), then the m derivatives
// y′_n.
func (s *stepper) stormer(t, H float64, n int, y0, yp0, f0, out []float64) error {
	m := len(y0)
	h := H / float64(n)
	h2 := h * h
	yi, d, fi, u := s.yi, s.d, s.fi, s.u
	for q := range m {
		d[q] = h * (yp0[q] + 0.5*h*f0[q])
		u[q] = d[q]
		yi[q] = y0[q] + u[q]
	}
	for i := 1; i < n; i++ {
		if err := s.f(t+float64(i)*h, yi, fi); err != nil {
			return err
		}
		for q := range m {
			d[q] += h2 * fi[q]
			u[q] += d[q]
			yi[q] = y0[q] + u[q]
		}
	}
	if err := s.f(t+H, yi, fi); err != nil {
		return err
	}
	for q := range m {
		out[q] = u[q]
		out[m+q] = d[q]/h + 0.5*h*fi[q]
	}
	return nil
}

// stepper holds the integrator's state and work arrays for one direction.
type stepper struct {
	f   func(t float64, y, a []float64) error
	tol float64
	m   int // second-order components (3, or 21 with the STM)

	tab       [maxRows][]float64 // tableau rows: T[j][0 … j] packed as (j+1)·2m
	yi, d, fi []float64
	u, f0     []float64
	hopt      [maxRows]float64
	work      [maxRows]float64

	steps, rejects int
}

func newStepper(m int, tol float64, f func(t float64, y, a []float64) error) *stepper {
	s := &stepper{f: f, tol: tol, m: m}
	for j := range maxRows {
		s.tab[j] = make([]float64, (j+1)*2*m)
	}
	s.yi = make([]float64, m)
	s.d = make([]float64, m)
	s.fi = make([]float64, m)
	s.u = make([]float64, m)
	s.f0 = make([]float64, m)
	return s
}

// cost returns A_j, the force evaluations for rows 0…j: 1 + Σ n_i.
func cost(j int) float64 {
	a := 1
	for i := 0; i <= j; i++ {
		a += seqN(i)
	}
	return float64(a)
}

// row computes tableau row j for the macro step (t, H) from (y0, yp0) and
// extrapolates it (Aitken–Neville in h², HNW §II.9, eq. 9.10):
//
//	T_{j,k+1} = T_{j,k} + (T_{j,k} − T_{j−1,k}) / ((n_j/n_{j−k})² − 1).
func (s *stepper) row(j int, t, H float64, y0, yp0 []float64) error {
	w := 2 * s.m
	T := s.tab[j]
	if err := s.stormer(t, H, seqN(j), y0, yp0, s.f0, T[:w]); err != nil {
		return err
	}
	for k := 0; k < j; k++ {
		r := float64(seqN(j)) / float64(seqN(j-k-1))
		den := 1 / (r*r - 1)
		prev := s.tab[j-1][k*w : (k+1)*w]
		cur := T[k*w : (k+1)*w]
		next := T[(k+1)*w : (k+2)*w]
		for q := range w {
			next[q] = cur[q] + (cur[q]-prev[q])*den
		}
	}
	return nil
}

// best returns the extrapolated value of row j, T_{j,j}: the increments of
// the positions, then the derivatives.
func (s *stepper) best(j int) []float64 {
	w := 2 * s.m
	return s.tab[j][j*w : (j+1)*w]
}

// result writes the state after the step, T_{j,j} added to the start
// (y0, yp0), into (y, yp).
func (s *stepper) result(j int, y0, y, yp []float64) {
	b := s.best(j)
	for q := range s.m {
		y[q] = y0[q] + b[q]
	}
	copy(yp, b[s.m:])
}

// errNorm returns the scaled difference of T_{j,j−1} and T_{j,j} over the
// object's position and velocity (the STM is carried along but not
// controlled, so the steps, and therefore the states, do not depend on
// whether it is asked): an RMS over the six components, each scaled by
// tol·max(|r0|, |r1|) for the position and tol·max(|v0|, |v1|) for the
// velocity (vector norms, so a coordinate crossing zero is harmless).
func (s *stepper) errNorm(j int, y0, yp0 []float64) float64 {
	w := 2 * s.m
	a := s.tab[j][(j-1)*w : j*w]
	b := s.tab[j][j*w : (j+1)*w]
	m := s.m
	r0 := math.Sqrt(y0[0]*y0[0] + y0[1]*y0[1] + y0[2]*y0[2])
	e0, e1, e2 := y0[0]+b[0], y0[1]+b[1], y0[2]+b[2]
	r1 := math.Sqrt(e0*e0 + e1*e1 + e2*e2)
	v0 := math.Sqrt(yp0[0]*yp0[0] + yp0[1]*yp0[1] + yp0[2]*yp0[2])
	v1 := math.Sqrt(b[m]*b[m] + b[m+1]*b[m+1] + b[m+2]*b[m+2])
	sp := s.tol * math.Max(r0, r1)
	sv := s.tol * math.Max(v0, v1)
	var sum float64
	for q := range 3 {
		e := (a[q] - b[q]) / sp
		sum += e * e
		e = (a[m+q] - b[m+q]) / sv
		sum += e * e
	}
	v := math.Sqrt(sum / 6)
	if math.IsNaN(v) {
		return math.Inf(1)
	}
	return v
}

// optimal records, for row j with error err, the optimal step size H_j and
// the work per unit step W_j = A_j/|H_j| (HNW §II.9, eqs. 9.25–9.26).
func (s *stepper) optimal(j int, err, H float64) {
	fac := facMax
	if err > 0 {
		fac = fac1 * math.Pow(fac2/err, 1/float64(2*j+1))
		fac = math.Min(facMax, math.Max(facMin, fac))
	}
	s.hopt[j] = H * fac
	s.work[j] = cost(j) / math.Abs(s.hopt[j])
}

// outcome of one step attempt.
type attempt struct {
	accepted bool
	row      int     // the row whose T_{j,j} is the new state (when accepted)
	hNext    float64 // the step proposed next
	kNext    int     // the target row proposed next
}

// try attempts the macro step (t, H) at target row kc from (y0, yp0); on
// acceptance the new state is s.best(row). lastRejected forbids growing the
// order or the step right after a rejection (HNW §II.9). With early, the
// step is accepted at the first row whose error estimate passes (a step cut
// short to land on a requested instant needs fewer rows than the order
// chosen for the natural step).
func (s *stepper) try(t, H float64, kc int, y0, yp0 []float64, lastRejected, early bool) (attempt, error) {
	if err := s.f(t, y0, s.f0); err != nil {
		return attempt{}, err
	}
	n0 := float64(seqN(0))
	for j := 0; j <= kc+1 && j < maxRows; j++ {
		if err := s.row(j, t, H, y0, yp0); err != nil {
			return attempt{}, err
		}
		if j == 0 {
			continue
		}
		e := s.errNorm(j, y0, yp0)
		s.optimal(j, e, H)
		if early && e <= 1 {
			return s.accept(j, kc, H, lastRejected), nil
		}
		switch {
		case j == kc-1:
			if e <= 1 {
				return s.accept(j, kc, H, lastRejected), nil
			}
			nk1, nk := float64(seqN(kc+1)), float64(seqN(kc))
			if e > (nk1*nk/(n0*n0))*(nk1*nk/(n0*n0)) {
				return s.reject(j), nil
			}
		case j == kc:
			if e <= 1 {
				return s.accept(j, kc, H, lastRejected), nil
			}
			nk1 := float64(seqN(kc + 1))
			if e > (nk1/n0)*(nk1/n0) {
				return s.reject(j), nil
			}
		case j == kc+1:
			if e <= 1 {
				return s.accept(j, kc, H, lastRejected), nil
			}
			return s.reject(j), nil
		}
	}
	return s.reject(kc), nil
}

// accept chooses the next order and step after convergence in row j.
func (s *stepper) accept(j, kc int, H float64, lastRejected bool) attempt {
	a := attempt{accepted: true, row: j}
	kNew := j
	if j >= 2 && s.work[j-1] < 0.8*s.work[j] {
		kNew = j - 1
	}
	hNew := s.hopt[kNew]
	if kNew == j && s.work[j] < 0.9*s.work[j-1] && j+1 <= maxKc {
		kNew = j + 1
		hNew = s.hopt[j] * cost(j+1) / cost(j)
	}
	kNew = max(minKc, min(maxKc, kNew))
	if lastRejected {
		kNew = min(kNew, kc)
		if math.Abs(hNew) > math.Abs(H) {
			hNew = H
		}
	}
	a.hNext, a.kNext = hNew, kNew
	return a
}

// reject proposes a shorter step after failing in row j.
func (s *stepper) reject(j int) attempt {
	kNew := j
	if j >= 2 && s.work[j-1] < 0.8*s.work[j] {
		kNew = j - 1
	}
	kNew = max(minKc, min(maxKc, kNew))
	h := s.hopt[min(kNew, j)]
	return attempt{hNext: h, kNext: kNew}
}
