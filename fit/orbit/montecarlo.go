package orbit

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sync"
	"sync/atomic"

	"arcfit/astro"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// The ways of sampling orbits consistent with the data, and the linear
// alternative ([ChooseSampling]).
const (
	// SamplingLinear: the covariance propagated linearly (no sampling).
	SamplingLinear = "linear"
	// SamplingCovariance: orbits drawn from the solution's covariance
	// ([CovarianceOrbits]).
	SamplingCovariance = "covariance"
	// SamplingRanging: orbits drawn by statistical ranging ([RangingOrbits]).
	SamplingRanging = "ranging"
)

// DefaultSamples is the number of orbits drawn when [MonteCarloSettings].N
// is 0: 2000, enough for the 3σ ellipse's semi-axes to about 2 % (the
// relative standard error of a sample standard deviation is 1/√(2N) for a
// Gaussian; common practice).
const DefaultSamples = 2000

// MaxSamples bounds [MonteCarloSettings].N (memory: a sampled orbit and its
// place take about 100 bytes).
const MaxSamples = 10_000_000

// MonteCarloSettings control the sampling of orbits and their propagation.
// The zero value is the default.
type MonteCarloSettings struct {
	// N is the number of orbits to draw; 0 means [DefaultSamples].
	N int
	// Seed selects the pseudo-random sequence. Sample i uses its own
	// generator, seeded from (Seed, i), so that the result does not depend
	// on Workers.
	Seed uint64
	// Workers is the number of goroutines; 0 means runtime.GOMAXPROCS(0).
	Workers int
	// Progress, when not nil, is called as the work advances with the number
	// of samples done and the total, from the worker goroutines but never
	// two calls at once, done increasing, ending with done == total.
	Progress func(done, total int)
}

// resolved returns the settings with defaults filled in.
func (s MonteCarloSettings) resolved() (MonteCarloSettings, error) {
	if s.N < 0 || s.N > MaxSamples {
		return s, fmt.Errorf("orbit: Monte Carlo: %d samples, want 1 to %d (0 for the default %d)", s.N, MaxSamples, DefaultSamples)
	}
	if s.N == 0 {
		s.N = DefaultSamples
	}
	if s.Workers < 0 {
		return s, fmt.Errorf("orbit: Monte Carlo: %d workers, want ≥ 0 (0 for one per processor)", s.Workers)
	}
	if s.Workers == 0 {
		s.Workers = runtime.GOMAXPROCS(0)
	}
	return s, nil
}

// OrbitSamples is a weighted set of orbits consistent with the observations.
type OrbitSamples struct {
	// Method is [SamplingCovariance] or [SamplingRanging].
	Method string
	// States are the sampled orbits (their epochs may differ), Weights their
	// weights, summing to 1. Orbits of weight 0 are left out.
	States  []State
	Weights []float64
	// Proposed is the number of orbits drawn (N); Kept = len(States).
	Proposed int
	// EffectiveN is Kish's effective sample size (Σw)²/Σw²: N for equal
	// weights, less when a few orbits carry most of the weight.
	EffectiveN float64
	// Notes say how the orbits were drawn, one line each.
	Notes []string
}

// CovarianceOrbits draws s.N orbits from the multivariate normal
// distribution of mean st and covariance cov (6×6, in the order Pos.X,
// Pos.Y, Pos.Z, Vel.X, Vel.Y, Vel.Z; au, au/day — a [Solution]'s State and
// Cov), all at st.Epoch with st.Motion and equal weights:
//
//	x = x̄ + B·z,   z ~ N(0, I₆),   B·Bᵀ = cov
//
// with B the Cholesky factor of cov, or, for a covariance that is only
// positive semi-definite, B = V·√Λ from its eigen-decomposition (eigenvalues
// above −1e-12 of the largest taken as 0). Each sample's six normal
// deviates come from a PCG generator seeded from (s.Seed, sample index)
// through the SplitMix64 finaliser, so that the draw does not depend on the
// number of workers.
//
// Errors: st not valid; cov nil, not 6×6, not finite, or with a clearly
// negative eigenvalue; settings out of range.
//
// Reference: Gentle, Random Number Generation and Monte Carlo Methods, 2nd
// ed. (2003), ch. 5 (multivariate normal by a factor of the covariance);
// O'Neill, "PCG: a family of simple fast space-efficient statistically good
// algorithms for random number generation", HMC-CS-2014-0905 (2014);
// Steele, Lea & Flood, "Fast splittable pseudorandom number generators",
// OOPSLA 2014 (SplitMix64).
func CovarianceOrbits(st State, cov *mat.SymDense, s MonteCarloSettings) (*OrbitSamples, error) {
	s, err := s.resolved()
	if err != nil {
		return nil, err
	}
	if !st.Valid() {
		return nil, errors.New("orbit: Monte Carlo: the mean orbit is not a valid state")
	}
	b, note, err := mcFactor(cov)
	if err != nil {
		return nil, err
	}
	x0 := [6]float64{st.Pos.X, st.Pos.Y, st.Pos.Z, st.Vel.X, st.Vel.Y, st.Vel.Z}
	states := make([]State, s.N)
	prog := mcNewProgress(s.Progress, s.N)
	mcRun(s.N, s.Workers, prog, func() func(i int) {
		var pcg rand.PCG
		r := rand.New(&pcg)
		return func(i int) {
			mcSeed(&pcg, s.Seed, mcStreamCovariance, i)
			var z [6]float64
			for k := range z {
				z[k] = r.NormFloat64()
			}
			var x [6]float64
			for j := range 6 {
				v := x0[j]
				for k := range 6 {
					v += b[j][k] * z[k]
				}
				x[j] = v
			}
			states[i] = State{Epoch: st.Epoch, Pos: r3.Vec{X: x[0], Y: x[1], Z: x[2]}, Vel: r3.Vec{X: x[3], Y: x[4], Z: x[5]}, Motion: st.Motion}
		}
	})
	w := make([]float64, s.N)
	for i := range w {
		w[i] = 1 / float64(s.N)
	}
	out := &OrbitSamples{Method: SamplingCovariance, States: states, Weights: w, Proposed: s.N, EffectiveN: float64(s.N),
		Notes: []string{fmt.Sprintf("%d orbits drawn from the solution's covariance (seed %d)", s.N, s.Seed)}}
	if note != "" {
		out.Notes = append(out.Notes, note)
	}
	return out, nil
}

// mcFactor returns B with B·Bᵀ = cov (see [CovarianceOrbits]) and a note when
// the covariance was only semi-definite.
func mcFactor(cov *mat.SymDense) ([6][6]float64, string, error) {
	var b [6][6]float64
	if cov == nil {
		return b, "", errors.New("orbit: Monte Carlo: no covariance")
	}
	if cov.SymmetricDim() != 6 {
		return b, "", fmt.Errorf("orbit: Monte Carlo: covariance is %d×%d, want 6×6", cov.SymmetricDim(), cov.SymmetricDim())
	}
	for j := range 6 {
		for k := range 6 {
			if !rgFiniteF(cov.At(j, k)) {
				return b, "", errors.New("orbit: Monte Carlo: covariance not finite")
			}
		}
	}
	var ch mat.Cholesky
	if ch.Factorize(cov) {
		var l mat.TriDense
		ch.LTo(&l)
		for j := range 6 {
			for k := 0; k <= j; k++ {
				b[j][k] = l.At(j, k)
			}
		}
		return b, "", nil
	}
	var es mat.EigenSym
	if !es.Factorize(cov, true) {
		return b, "", errors.New("orbit: Monte Carlo: eigen-decomposition of the covariance failed")
	}
	vals := es.Values(nil)
	var vec mat.Dense
	es.VectorsTo(&vec)
	top := 0.0
	for _, v := range vals {
		top = math.Max(top, math.Abs(v))
	}
	zero := 0
	for k, v := range vals {
		if v < -1e-12*top {
			return b, "", fmt.Errorf("orbit: Monte Carlo: covariance not positive semi-definite (eigenvalue %.3g, largest %.3g)", v, top)
		}
		sv := math.Sqrt(math.Max(v, 0))
		if v <= 0 {
			zero++
		}
		for j := range 6 {
			b[j][k] = vec.At(j, k) * sv
		}
	}
	return b, fmt.Sprintf("the covariance is singular (%d zero eigenvalue(s)): the orbits spread in %d dimensions only", zero, 6-zero), nil
}

// Streams of the pseudo-random sequences, mixed into the seed so that the
// covariance and ranging samplers (and the rounds of the latter) draw
// independent numbers for the same Seed.
const (
	mcStreamCovariance = 0x636f76 // "cov"
	mcStreamRanging    = 0x72616e // "ran"
)

// mcSeed seeds pcg for sample i of the given stream: PCG state
// (SplitMix64(seed ⊕ stream), SplitMix64(i)).
func mcSeed(pcg *rand.PCG, seed, stream uint64, i int) {
	pcg.Seed(mcSplitMix(seed^(stream*0x9e3779b97f4a7c15)), mcSplitMix(uint64(i)))
}

// mcSplitMix is the SplitMix64 finaliser of x + γ (Steele, Lea & Flood
// 2014): a bijection of uint64 that spreads consecutive integers over the
// whole range.
func mcSplitMix(x uint64) uint64 {
	z := x + 0x9e3779b97f4a7c15
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9
	z = (z ^ (z >> 27)) * 0x94d049bb133111eb
	return z ^ (z >> 31)
}

// mcChunk is the number of consecutive samples a worker takes at a time.
const mcChunk = 64

// mcRun calls work(i) for i = 0…n−1 on the given number of goroutines, each
// with its own closure from newWork (worker-local buffers and generators).
// It returns when all are done.
func mcRun(n, workers int, prog *mcProgress, newWork func() func(i int)) {
	if workers > (n+mcChunk-1)/mcChunk {
		workers = max(1, (n+mcChunk-1)/mcChunk)
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			work := newWork()
			for {
				lo := int(next.Add(mcChunk)) - mcChunk
				if lo >= n {
					return
				}
				hi := min(lo+mcChunk, n)
				for i := lo; i < hi; i++ {
					work(i)
				}
				prog.add(hi - lo)
			}
		}()
	}
	wg.Wait()
}

// mcProgress reports progress through a callback, one call at a time, with
// done increasing.
type mcProgress struct {
	fn    func(done, total int)
	total int
	done  atomic.Int64
	mu    sync.Mutex
	last  int
}

// mcNewProgress returns a reporter for total samples; nil fn gives one that
// does nothing.
func mcNewProgress(fn func(done, total int), total int) *mcProgress {
	return &mcProgress{fn: fn, total: total}
}

// add records k more samples done and reports the new count.
func (p *mcProgress) add(k int) {
	if p == nil || p.fn == nil {
		return
	}
	d := int(p.done.Add(int64(k)))
	p.mu.Lock()
	defer p.mu.Unlock()
	if d > p.last {
		d = min(d, p.total)
		p.last = d
		p.fn(d, p.total)
	}
}

// finish reports done == total if that was not reported yet (work skipped
// because an adaptive stage ended early).
func (p *mcProgress) finish() {
	if p == nil || p.fn == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	if p.last < p.total {
		p.last = p.total
		p.fn(p.total, p.total)
	}
}

// Propagated returns the set moved to each TDB instant of tdbs: for each
// instant a set with the same method, weights and notes whose orbits are
// the states there, as two-body orbits osculating at that instant (Motion
// nil), good for the short steps of [OrbitSamples.Predict] near it (see
// [Path] for what a step neglects). Each orbit with a Motion is integrated
// once to all the instants, the orbits in parallel across s.Workers
// goroutines (s.Progress is called as they finish); a two-body orbit is
// propagated by two-body motion. An orbit whose integration fails keeps a
// state that is not finite, which [OrbitSamples.Predict] counts among the
// failed orbits.
//
// Errors: no orbits; settings out of range.
func (o *OrbitSamples) Propagated(tdbs []astro.JD, s MonteCarloSettings) ([]*OrbitSamples, error) {
	if o == nil || len(o.States) == 0 {
		return nil, errors.New("orbit: Monte Carlo: no sampled orbits to propagate")
	}
	s.N = len(o.States)
	s, err := s.resolved()
	if err != nil {
		return nil, err
	}
	n, m := len(o.States), len(tdbs)
	out := make([]*OrbitSamples, m)
	for j := range out {
		out[j] = &OrbitSamples{Method: o.Method, States: make([]State, n), Weights: append([]float64(nil), o.Weights...),
			Proposed: o.Proposed, EffectiveN: o.EffectiveN, Notes: append([]string(nil), o.Notes...)}
	}
	nan := math.NaN()
	bad := State{Pos: r3.Vec{X: nan, Y: nan, Z: nan}, Vel: r3.Vec{X: nan, Y: nan, Z: nan}}
	prog := mcNewProgress(s.Progress, n)
	mcRun(n, s.Workers, prog, func() func(i int) {
		return func(i int) {
			st := o.States[i]
			p, err := st.Propagate(tdbs, false)
			for j := range tdbs {
				a := bad
				a.Epoch = tdbs[j]
				if err == nil {
					if aj, aerr := p.Anchor(j); aerr == nil {
						a = aj
					}
				}
				out[j].States[i] = a
			}
		}
	})
	prog.finish()
	return out, nil
}
