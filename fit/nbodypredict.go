package fit

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"sync"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit/orbit"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// The anchors of a perturbed orbit's predictions. A prediction at the TDB
// instant t is formed from the orbit (and its sampled orbits) integrated to
// the anchor nearest t, epoch + i·H_L with H_L = nbodyAnchorDays/2^L, by a
// two-body step of at most H_L/2 (and the light time). The level L is the
// coarsest at which the two-body steps from the anchor to the edges of its
// cell, ±H_L/2, stay within nbodyStepTolRad of the integration, as seen
// from the geocentre (checked on the orbit when the anchor is made): the
// planets' pull over half a day moves a main-belt orbit by ~6e-9 au
// (½·a_p·Δt², a_p ≈ 5e-8 au/day²), 1 mas at 1.2 au, so L = 0 mostly holds;
// near the Earth the cells shrink. The night's many predictions of a plan
// then cost an integration per cell, not per instant.
const (
	// nbodyAnchorDays is the cell of level 0: half a day.
	nbodyAnchorDays = 0.5
	// nbodyMaxLevel bounds the refinement: 0.5 d/2¹² ≈ 10.5 s.
	nbodyMaxLevel = 12
	// nbodyStepTolRad is the accepted error of a step: 1 mas, a hundredth
	// of the 0.1″ the perturbed propagation is held to.
	nbodyStepTolRad = 1e-3 * 4.84813681109536e-6
)

// nbodyKey names an anchor: level L and index i.
type nbodyKey struct {
	level int
	i     int64
}

// nbodyAnchor is the orbit integrated to one anchor.
type nbodyAnchor struct {
	tdb astro.JD
	// fine reports that the steps to the cell's edges met nbodyStepTolRad
	// (always true at nbodyMaxLevel).
	fine bool
	// local is the solution carried to the anchor (orbit.Solution.MovedTo):
	// a two-body orbit osculating there with the propagated covariance.
	local *orbit.Solution
	// encounters are those of the integration from the epoch to the anchor.
	encounters []orbit.Encounter
}

// nbodyCache holds a perturbed orbit's anchors and its sampled orbits moved
// to them.
type nbodyCache struct {
	mu      sync.Mutex
	anchors map[nbodyKey]*nbodyAnchor
	// samples are the sampled orbits (by method) moved to an anchor.
	samples map[string]map[nbodyKey]*orbit.OrbitSamples
}

// cache returns the orbit's cache, made on first use.
func (f *OrbitFit) cache() *nbodyCache {
	if f.nb == nil {
		f.nb = &nbodyCache{anchors: map[nbodyKey]*nbodyAnchor{}, samples: map[string]map[nbodyKey]*orbit.OrbitSamples{}}
	}
	return f.nb
}

// anchorTDB returns the instant of anchor k of an orbit of epoch e.
func anchorTDB(e astro.JD, k nbodyKey) astro.JD {
	h := nbodyAnchorDays / math.Ldexp(1, k.level)
	return astro.JD{Day: e.Day, Frac: e.Frac + float64(k.i)*h, Scale: e.Scale}.Normalized()
}

// anchorFor returns the anchor for the TDB instant tdb: the nearest of the
// coarsest level that is fine, made as needed.
func (f *OrbitFit) anchorFor(tdb astro.JD) (nbodyKey, *nbodyAnchor, error) {
	c := f.cache()
	e := f.Solution.State.Epoch
	x := (tdb.Day - e.Day) + (tdb.Frac - e.Frac)
	for l := 0; ; l++ {
		h := nbodyAnchorDays / math.Ldexp(1, l)
		k := nbodyKey{level: l, i: int64(math.Round(x / h))}
		c.mu.Lock()
		a, ok := c.anchors[k]
		c.mu.Unlock()
		if !ok {
			var err error
			if a, err = f.makeAnchor(k); err != nil {
				return k, nil, err
			}
			c.mu.Lock()
			c.anchors[k] = a
			c.mu.Unlock()
		}
		if a.fine || l >= nbodyMaxLevel {
			return k, a, nil
		}
	}
}

// makeAnchor integrates the orbit to anchor k and to the edges of its cell,
// checks the two-body steps to the edges against the integration, and
// carries the solution there.
func (f *OrbitFit) makeAnchor(k nbodyKey) (*nbodyAnchor, error) {
	sol := f.Solution
	ta := anchorTDB(sol.State.Epoch, k)
	h := nbodyAnchorDays / math.Ldexp(1, k.level)
	ts := []astro.JD{ta, ta.AddDays(-h / 2), ta.AddDays(h / 2)}
	moved, path, err := sol.MovedTo(ts)
	if err != nil {
		// An edge beyond what can be integrated: the anchor alone.
		if moved, path, err = sol.MovedTo(ts[:1]); err != nil {
			return nil, err
		}
		return &nbodyAnchor{tdb: ta, fine: true, local: moved[0], encounters: path.Encounters}, nil
	}
	a := &nbodyAnchor{tdb: ta, fine: true, local: moved[0], encounters: path.Encounters}
	for _, j := range []int{1, 2} {
		p, _, err := moved[0].State.At(ts[j])
		if err != nil {
			a.fine = false
			continue
		}
		want := moved[j].State.Pos
		earth, _, err := ephem.HeliocentricICRS(ephem.Earth, ts[j])
		if err != nil {
			return nil, err
		}
		delta := r3.Norm(r3.Sub(want, earth))
		if !(r3.Norm(r3.Sub(p, want)) <= nbodyStepTolRad*delta) {
			a.fine = false
		}
	}
	return a, nil
}

// nbodyPrefetch are the anchors, relative to the one asked for, to which a
// sampled orbit is integrated at once: the night's other cell and the next
// three days' (a search for the next observable nights goes forward a day
// at a time). The extra instants cost a few short steps of an integration
// whose length is set by the distance from the epoch.
var nbodyPrefetch = []int64{0, -1, 1, 2, 3, 4, 5, 6}

// movedSamples returns the orbit's samples of method moved to anchor k:
// integrated once (in parallel) to the anchor and its neighbours of the
// same level (nbodyPrefetch), which a night's predictions usually need next.
func (f *OrbitFit) movedSamples(method string, k nbodyKey) (*orbit.OrbitSamples, error) {
	c := f.cache()
	c.mu.Lock()
	if s, ok := c.samples[method][k]; ok {
		c.mu.Unlock()
		return s, nil
	}
	c.mu.Unlock()
	keys := make([]nbodyKey, len(nbodyPrefetch))
	for j, d := range nbodyPrefetch {
		keys[j] = nbodyKey{k.level, k.i + d}
	}
	if err := f.moveSamples(method, keys); err != nil {
		return nil, err
	}
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.samples[method][k], nil
}

// moveSamples integrates the samples of method once to every anchor of keys
// not moved yet.
func (f *OrbitFit) moveSamples(method string, keys []nbodyKey) error {
	set, err := f.sampled(method)
	if err != nil {
		return err
	}
	c := f.cache()
	c.mu.Lock()
	if c.samples[method] == nil {
		c.samples[method] = map[nbodyKey]*orbit.OrbitSamples{}
	}
	var need []nbodyKey
	var ts []astro.JD
	for _, k := range keys {
		if _, ok := c.samples[method][k]; !ok {
			need = append(need, k)
			ts = append(ts, anchorTDB(f.Solution.State.Epoch, k))
		}
	}
	c.mu.Unlock()
	if len(need) == 0 {
		return nil
	}
	moved, err := set.Propagated(ts, f.MonteCarlo)
	if err != nil {
		return err
	}
	c.mu.Lock()
	defer c.mu.Unlock()
	for j, k := range need {
		c.samples[method][k] = moved[j]
	}
	return nil
}

// samplingMethod returns the sampling the orbit's prediction at utc needs
// (orbit.SamplingLinear for none), as [OrbitFit.Predict] decides it.
func (f *OrbitFit) samplingMethod(utc astro.JD) string {
	if f.NoSampling {
		return orbit.SamplingLinear
	}
	method := orbit.SamplingCovariance
	if f.Obs != nil {
		method = orbit.ChooseSampling(f.Obs, utc, true).Method
	}
	if f.RangingOnly && f.Obs != nil {
		method = orbit.SamplingRanging
	}
	return method
}

// predictNBody is [OrbitFit.Predict] of a perturbed orbit: the linear
// prediction of the solution carried to the anchor of utc
// ([orbit.Solution.MovedTo]; its covariance propagated through the
// integration), and, when the sampling rule asks for it, the region of the
// sampled orbits integrated to the anchor, each then stepped to utc.
func (f *OrbitFit) predictNBody(utc astro.JD, site *astro.Site, sampling bool) (Prediction, error) {
	var st *astro.Site
	if site != nil {
		c := *site
		st = &c
	}
	g, err := ephem.ObserverGeometryAt(utc, st, 0)
	if err != nil && !errors.Is(err, astro.ErrStaleTable) && !errors.Is(err, astro.ErrUTCBefore1972) {
		return Prediction{}, fmt.Errorf("fit: prediction time: %w", err)
	}
	k, a, err := f.anchorFor(g.TDB)
	if err != nil {
		return Prediction{}, fmt.Errorf("fit: prediction at %s: %w", astro.FormatISO8601(utc, 0), err)
	}
	sp, err := a.local.Predict(utc, st)
	if err != nil {
		return Prediction{}, err
	}
	lin := predictionOfSky(sp, st)
	lin.Model = NBody().Name()
	method := f.samplingMethod(utc)
	if method == orbit.SamplingLinear || !sampling {
		return lin, nil
	}
	set, err := f.movedSamples(method, k)
	if err != nil {
		return lin, nil
	}
	r, err := set.Predict(g, f.MonteCarlo)
	if err != nil {
		return lin, nil
	}
	return sampledPrediction(lin, sp, r, method), nil
}

// Prepare integrates the perturbed orbit, and the sampled orbits the
// sampling rule will ask for, once to the anchors of all the UTC instants
// utcs, so that the predictions there that follow cost no integration of
// their own: one integration per sampled orbit for all the instants, not
// one per instant. A two-body orbit needs nothing (Prepare returns nil).
//
// Errors: an instant the time scales or the integration cannot serve.
func (f *OrbitFit) Prepare(utcs []astro.JD) error {
	if f.Solution.State.Motion == nil || len(utcs) == 0 {
		return nil
	}
	byMethod := map[string][]nbodyKey{}
	for _, u := range utcs {
		g, err := ephem.ObserverGeometryAt(u, nil, 0)
		if err != nil && !errors.Is(err, astro.ErrStaleTable) && !errors.Is(err, astro.ErrUTCBefore1972) {
			return fmt.Errorf("fit: prediction time: %w", err)
		}
		k, _, err := f.anchorFor(g.TDB)
		if err != nil {
			return err
		}
		if m := f.samplingMethod(u); m != orbit.SamplingLinear {
			byMethod[m] = append(byMethod[m], k)
		}
	}
	for m, keys := range byMethod {
		if err := f.moveSamples(m, keys); err != nil {
			return nil // a sampling that fails leaves the linear regions, as Predict does
		}
	}
	return nil
}

// Encounters returns the close approaches of the perturbed orbit found by
// its integrations from the epoch through the arc (Solution.Encounters) and
// to each of the UTC instants utcs: within 0.05 au of the Earth, inside a
// planet's Hill sphere. Approaches to one body less than a day apart are
// one (the least distance kept, one at the end of an integrated span giving
// way to a minimum inside another); they are sorted by time. A two-body
// orbit has none.
func (f *OrbitFit) Encounters(utcs ...astro.JD) []orbit.Encounter {
	if f.Solution.State.Motion == nil {
		return nil
	}
	all := append([]orbit.Encounter(nil), f.Solution.Encounters...)
	for _, u := range utcs {
		g, err := ephem.ObserverGeometryAt(u, nil, 0)
		if err != nil && !errors.Is(err, astro.ErrStaleTable) && !errors.Is(err, astro.ErrUTCBefore1972) {
			continue
		}
		if _, a, err := f.anchorFor(g.TDB); err == nil {
			all = append(all, a.encounters...)
		}
	}
	return mergeEncounters(all)
}

// mergeEncounters joins approaches to one body less than a day apart (see
// [OrbitFit.Encounters]) and sorts them by time.
func mergeEncounters(es []orbit.Encounter) []orbit.Encounter {
	sort.SliceStable(es, func(i, j int) bool { return es[i].TDB.Sub(es[j].TDB) < 0 })
	var out []orbit.Encounter
	for _, e := range es {
		merged := false
		for i := range out {
			o := &out[i]
			if o.Body != e.Body || math.Abs(o.TDB.Sub(e.TDB)) >= 1 {
				continue
			}
			if (o.AtEnd && !e.AtEnd) || (o.AtEnd == e.AtEnd && e.DistanceAU < o.DistanceAU) {
				*o = e
			}
			merged = true
			break
		}
		if !merged {
			out = append(out, e)
		}
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].TDB.Sub(out[j].TDB) < 0 })
	return out
}

// mat6Copy returns a copy of a 6×6 covariance.
func mat6Copy(c *mat.SymDense) *mat.SymDense {
	out := mat.NewSymDense(c.SymmetricDim(), nil)
	out.CopySym(c)
	return out
}
