package nbody

import (
	"fmt"
	"math"
)

// EarthApproachAU is the distance from the Earth below which a passage is
// reported as an encounter (issue 7; the usual threshold for a close
// approach to the Earth, common practice).
const EarthApproachAU = 0.05

// thresholdAU returns the distance below which a passage near body b is an
// encounter: the Hill radius, and for the Earth at least EarthApproachAU.
func thresholdAU(b body) float64 {
	h := hillAU(b)
	if b == bEarth {
		return math.Max(h, EarthApproachAU)
	}
	return h
}

// tracker follows the distance to each body during one direction of an
// integration and collects the close approaches.
type tracker struct {
	sign  float64
	alone bool
	// per body: distance and its rate (in the direction of integration) at
	// the end of the last step
	d, rate [nBodies]float64
	// the passage in progress: its least distance so far
	in     [nBodies]bool
	bestD  [nBodies]float64
	bestT  [nBodies]float64
	atEnd  [nBodies]bool
	events []Encounter
}

// geometry returns the distance from body b and its rate of change d·ḋ/d
// (per day of t) for the object state (y, yp) at t.
func geometry(r *run, b body, t float64, y, yp []float64) (d, rate float64, err error) {
	p, v, err := r.model.state(b, t)
	if err != nil {
		return 0, 0, err
	}
	var dot float64
	for q := range 3 {
		rho := y[q] - p[q]
		d += rho * rho
		dot += rho * (yp[q] - v[q])
	}
	d = math.Sqrt(d)
	return d, dot / d, nil
}

// start records the geometry at the epoch. When alone (no integration on
// the other side of the epoch) a passage that is receding at the epoch has
// its least distance there, at the end of the span.
func (k *tracker) start(r *run, t float64, y, yp []float64, sign float64, alone bool) error {
	k.sign, k.alone = sign, alone
	for b := range nBodies {
		d, rate, err := geometry(r, b, t, y, yp)
		if err != nil {
			return err
		}
		if err := impact(r, b, t, d); err != nil {
			return err
		}
		k.d[b], k.rate[b] = d, rate*sign
		if alone && d < thresholdAU(b) && k.rate[b] >= 0 {
			k.candidate(b, t, d, true)
		}
	}
	return nil
}

// impact reports an object inside body b's radius.
func impact(r *run, b body, t, d float64) error {
	if rad := bodies[b].radiusAU; rad > 0 && d < rad {
		return fmt.Errorf("nbody: at JD %.5f TDB the object is %.1f km from the centre of %s, inside its radius (%.1f km): %w",
			r.jd(t).Float(), d*de405AUKm, bodies[b].name, rad*de405AUKm, ErrImpact)
	}
	return nil
}

// candidate records a least distance d at t for body b.
func (k *tracker) candidate(b body, t, d float64, atEnd bool) {
	if !k.in[b] || d < k.bestD[b] {
		k.bestD[b], k.bestT[b], k.atEnd[b] = d, t, atEnd
	}
	k.in[b] = true
}

// flush closes the passage in progress of body b.
func (k *tracker) flush(r *run, b body) {
	if !k.in[b] {
		return
	}
	k.events = append(k.events, Encounter{
		Body: bodies[b].name, TDB: r.jd(k.bestT[b]), DistanceAU: k.bestD[b],
		HillAU: hillAU(b), AtEnd: k.atEnd[b],
	})
	k.in[b] = false
}

// step examines the step from t0 (state r.y0, r.yp0) to t1 (state r.y, r.yp),
// taken with tableau row j: a distance that was falling and is rising at the
// end has a minimum inside, refined when it can be below the threshold.
func (k *tracker) step(r *run, t0, t1 float64, j int, sign float64) error {
	for b := range nBodies {
		d1, rate1, err := geometry(r, b, t1, r.y, r.yp)
		if err != nil {
			return err
		}
		rate1 *= sign
		d0, rate0 := k.d[b], k.rate[b]
		thr := thresholdAU(b)
		if rate0 < 0 && rate1 >= 0 {
			// A minimum inside the step; it cannot be below the least end
			// distance minus what the distance can change in the step.
			reach := math.Min(d0, d1) - math.Max(-rate0, rate1)*math.Abs(t1-t0)
			if reach < thr {
				tm, dm, err := k.refine(r, b, t0, t1, j, rate0, rate1)
				if err != nil {
					return err
				}
				if err := impact(r, b, tm, dm); err != nil {
					return err
				}
				if dm < thr {
					k.candidate(b, tm, dm, false)
				}
			}
		}
		if err := impact(r, b, t1, d1); err != nil {
			return err
		}
		if d1 >= thr {
			k.flush(r, b)
		}
		k.d[b], k.rate[b] = d1, rate1
	}
	return nil
}

// finish closes the passages at the far end of the span: a body still
// approaching there has its least distance at the end.
func (k *tracker) finish(r *run) error {
	for b := range nBodies {
		if k.d[b] < thresholdAU(b) && k.rate[b] < 0 {
			k.candidate(b, r.lastT, k.d[b], true)
		}
		k.flush(r, b)
	}
	return nil
}

// refine finds the least distance from body b inside the accepted step
// (t0, t1] as the root of the radial velocity ρ·ρ̇ by the Illinois variant of
// regula falsi (Dahlquist & Björck, Numerical Methods (1974), §6.2.3), the
// object's state at each trial instant coming from a fresh extrapolation step
// from t0 with the same tableau rows (so as accurate as the step itself).
func (k *tracker) refine(r *run, b body, t0, t1 float64, j int, ga, gc float64) (tm, dm float64, err error) {
	g := func(t float64) (float64, float64, error) {
		y, yp, err := r.subStep(t0, t-t0, j)
		if err != nil {
			return 0, 0, err
		}
		d, rate, err := geometry(r, b, t, y, yp)
		return rate * k.sign, d, err
	}
	a, c := t0, t1
	best, bestT := math.Inf(1), t1
	side := 0
	for range 40 {
		if gc == ga {
			break
		}
		tn := (a*gc - c*ga) / (gc - ga)
		if !(math.Min(a, c) < tn && tn < math.Max(a, c)) {
			tn = 0.5 * (a + c)
		}
		gn, dn, err := g(tn)
		if err != nil {
			return 0, 0, err
		}
		if dn < best {
			best, bestT = dn, tn
		}
		if math.Abs(c-a) < 1e-9 || gn == 0 {
			break
		}
		if (gn < 0) == (ga < 0) {
			a, ga = tn, gn
			if side == -1 {
				gc /= 2
			}
			side = -1
		} else {
			c, gc = tn, gn
			if side == 1 {
				ga /= 2
			}
			side = 1
		}
		if math.Abs(c-a) < 1e-8 {
			break
		}
	}
	// the end of the step may still be the nearer point
	if d1, _, err := geometry(r, b, t1, r.y, r.yp); err == nil && d1 < best {
		best, bestT = d1, t1
	}
	return bestT, best, nil
}

// subStep returns the object's position and velocity at t0 + h from the state
// at t0 kept in r.y0, r.yp0 by one extrapolation step with rows 0…j.
func (r *run) subStep(t0, h float64, j int) ([]float64, []float64, error) {
	if h == 0 {
		return r.y0, r.yp0, nil
	}
	s := r.st
	if err := s.f(t0, r.y0, s.f0); err != nil {
		return nil, nil, err
	}
	for i := 0; i <= j; i++ {
		if err := s.row(i, t0, h, r.y0, r.yp0); err != nil {
			return nil, nil, err
		}
	}
	s.result(j, r.y0, r.ys, r.yps)
	return r.ys, r.yps, nil
}
