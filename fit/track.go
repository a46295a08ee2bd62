package fit

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"arcfit/astro"
	"arcfit/astro/obs"

	"gonum.org/v1/gonum/spatial/r3"
)

// Point is one observation on the tangent plane of its [Track].
type Point struct {
	ObsIndex int      // index into the obs.Set's Obs
	Line     int      // line in the input file
	UTC      astro.JD // observation time, UTC
	T        float64  // TT − EpochTT, days (unscaled)
	// Xi, Eta are the standard coordinates of the observed (topocentric)
	// position, radians.
	Xi, Eta float64
	// SigmaXi, SigmaEta are the 1-σ uncertainties of Xi and Eta (radians) and
	// Corr their correlation. They are the observation's sky covariance (σ of
	// RA·cos δ and of Dec, with its correlation) carried into the plane
	// exactly to first order, C_plane = J C_sky Jᵀ with J = ∂(ξ, η)/∂(east,
	// north) at the observation: this applies the small rotation between the
	// local east/north and the plane axes (the convergence of the meridians,
	// ≈ Δα sin δ) and the projection's scale (1/cos ρ, 1/cos² ρ).
	SigmaXi, SigmaEta float64
	Corr              float64
	// SiteXi, SiteEta are the site's geocentric GCRS position (au) dotted
	// with the gradients of ξ and η at the observed direction (the exact
	// local basis of the projection, see [Track]); 0 for a geocentric
	// observation. To first order in the parallax the observed coordinates
	// are ξ_obs = ξ_geo − u·SiteXi, η_obs = η_geo − u·SiteEta with u = 1/Δ
	// (au⁻¹).
	SiteXi, SiteEta float64
	Site            string // site name, "" for the geocentre
	// Night is the 0-based index of the observing night: nights run from
	// local mean noon to noon at the site (the night numbered
	// floor(JD_UTC + λ/2π), as obs.Summarize counts them; λ = 0 for the
	// geocentre), numbered consecutively in time over the used
	// observations. Two sites observing on the same local date share a
	// night.
	Night int
	Used  bool // false for reader-dropped duplicates
}

// Track is a set of observations on a common tangent plane with a common
// time origin, ready to be fitted.
type Track struct {
	Plane   astro.TangentPlane
	EpochTT astro.JD // time origin, TT: mid-time of the used observations rounded to the minute
	// TimeScaleDays scales time for conditioning, τ = T/TimeScaleDays: half
	// the arc of the used observations (so τ runs over [−1, 1]), 1 d when the
	// arc is shorter than 1e-6 d.
	TimeScaleDays float64
	Points        []Point // in the order of the obs.Set (time order)
	NumNights     int     // number of distinct nights among the used points
	Sites         map[string]astro.Site
	Source        string   // the observation file's name
	SourceSHA256  string   // hex SHA-256 of the file's bytes when known, "" otherwise
	Warnings      []string // time-scale warnings (stale leap-second table, UT before 1972)
	// Set is the observation set the track was made from (nil for a track
	// loaded from a fit file): the orbit fit works on it directly.
	Set *obs.Set
}

// minArcDays is the shortest time span of the used observations that is not
// "all at one instant" (1e-6 d = 0.086 s, far below any exposure time).
const minArcDays = 1e-6

// NewTrack projects the observations of set onto the tangent plane at the
// normalised mean of the used observations' unit vectors and measures their
// times in TT from the arc's mid-time.
//
// sites are the known sites by name (a sites file); the set's own Sites are
// used too and win for a name both give. An observation with Site "" is
// geocentric. UTC is converted to TT with astro.UTCToTT (its warnings, such as
// a stale leap-second table, go to Track.Warnings); the site's GCRS position
// comes from astro.SitePositionGCRS with UT1 taken equal to UTC (|UT1 − UTC|
// < 0.9 s turns the site by < 4″ of hour angle, < 0.1 m at the surface).
//
// SiteXi and SiteEta use the exact local basis: the gradients of ξ and η at
// the observed direction (see planeFrame.gradients), not the tangent point's
// east and north, which would misstate the parallax of an observation 1° from
// the tangent point by about 1.7 % (0.1″ of a 5″ main-belt parallax).
//
// Errors: fewer than 2 used observations; all used observations at one
// instant; a site name not among the sites; an observation 90° or more from
// the mean direction; a σ that is not positive and finite or a correlation
// outside (−1, 1).
//
// Reference: the gnomonic projection, Calabretta & Greisen (2002), A&A 395,
// 1077, §5.1.3; the topocentric correction to first order, Meeus,
// Astronomical Algorithms, 2nd ed. (1998), ch. 40.
func NewTrack(set *obs.Set, sites map[string]astro.Site) (*Track, error) {
	if set == nil {
		return nil, errors.New("fit: no observations")
	}
	known := make(map[string]astro.Site, len(sites)+len(set.Sites))
	for k, v := range sites {
		known[k] = v
	}
	for k, v := range set.Sites {
		known[k] = v
	}
	var sum r3.Vec
	nUsed := 0
	for i := range set.Obs {
		o := &set.Obs[i]
		if !o.Used {
			continue
		}
		if o.Site != "" {
			if _, ok := known[o.Site]; !ok {
				return nil, fmt.Errorf("fit: line %d: unknown site %q (not in the sites given)", o.Line, o.Site)
			}
		}
		sum = r3.Add(sum, astro.UnitVector(o.RA, o.Dec))
		nUsed++
	}
	if nUsed < 2 {
		return nil, fmt.Errorf("fit: %d used observation(s); a fit needs at least 2", nUsed)
	}
	if r3.Norm(sum) < 1e-9*float64(nUsed) {
		return nil, errors.New("fit: the observations have no mean direction (they surround the sphere)")
	}
	ra0, dec0, _ := astro.Spherical(sum)
	tr := &Track{
		Plane:  astro.TangentPlane{RA0: ra0.Normalized(), Dec0: dec0},
		Sites:  known,
		Source: set.File,
		Set:    set,
	}
	frame := newPlaneFrame(tr.Plane)

	// Times.
	tts := make([]astro.JD, len(set.Obs))
	warned := map[string]bool{}
	var first, last astro.JD
	haveFirst := false
	for i := range set.Obs {
		o := &set.Obs[i]
		tt, err := astro.UTCToTT(o.Time)
		if err != nil {
			if !errors.Is(err, astro.ErrStaleTable) && !errors.Is(err, astro.ErrUTCBefore1972) {
				return nil, fmt.Errorf("fit: line %d: %v", o.Line, err)
			}
			if msg := err.Error(); !warned[msg] {
				warned[msg] = true
				tr.Warnings = append(tr.Warnings, msg)
			}
		}
		tts[i] = tt
		if !o.Used {
			continue
		}
		if !haveFirst || tt.Sub(first) < 0 {
			first = tt
		}
		if !haveFirst || tt.Sub(last) > 0 {
			last = tt
		}
		haveFirst = true
	}
	arc := last.Sub(first)
	if !(arc >= minArcDays) {
		return nil, errors.New("fit: all observations are at one instant; a motion fit needs observations at different times")
	}
	mid := first.AddDays(arc / 2).Normalized()
	// Round the epoch to the minute (both parts exact in binary for a whole
	// day part; the fraction keeps its rounding error below 1e-16 d).
	mid.Frac = math.Round(mid.Frac*1440) / 1440
	tr.EpochTT = mid.Normalized()
	tr.TimeScaleDays = arc / 2

	// Nights: local noon-to-noon night numbers of the used observations.
	nightNum := make([]float64, len(set.Obs))
	var distinct []float64
	seen := map[float64]bool{}
	for i := range set.Obs {
		o := &set.Obs[i]
		lon := 0.0
		if st, ok := known[o.Site]; ok && o.Site != "" {
			lon = float64(st.Lon)
		}
		n := math.Floor(o.Time.Day + o.Time.Frac + lon/(2*math.Pi))
		nightNum[i] = n
		if o.Used && !seen[n] {
			seen[n] = true
			distinct = append(distinct, n)
		}
	}
	sort.Float64s(distinct)
	index := make(map[float64]int, len(distinct))
	for i, n := range distinct {
		index[n] = i
	}
	tr.NumNights = len(distinct)

	tr.Points = make([]Point, len(set.Obs))
	for i := range set.Obs {
		o := &set.Obs[i]
		xi, eta, err := tr.Plane.Project(o.RA, o.Dec)
		if err != nil {
			return nil, fmt.Errorf("fit: line %d: the observation is 90° or more from the arc's mean direction", o.Line)
		}
		sra, sdec := float64(o.SigmaRA), float64(o.SigmaDec)
		if !(sra > 0) || !(sdec > 0) || math.IsInf(sra, 0) || math.IsInf(sdec, 0) {
			return nil, fmt.Errorf("fit: line %d: uncertainty must be positive and finite", o.Line)
		}
		if !(math.Abs(o.Corr) < 1) {
			return nil, fmt.Errorf("fit: line %d: RA/Dec correlation %g outside (−1, 1)", o.Line, o.Corr)
		}
		j := frame.skyToPlane(xi, eta)
		c := congruence(j, [2][2]float64{
			{sra * sra, o.Corr * sra * sdec},
			{o.Corr * sra * sdec, sdec * sdec},
		})
		p := Point{
			ObsIndex: i,
			Line:     o.Line,
			UTC:      o.Time,
			T:        tts[i].Sub(tr.EpochTT),
			Xi:       xi,
			Eta:      eta,
			SigmaXi:  math.Sqrt(c[0][0]),
			SigmaEta: math.Sqrt(c[1][1]),
			Site:     o.Site,
			Used:     o.Used,
			Night:    -1,
		}
		p.Corr = c[0][1] / (p.SigmaXi * p.SigmaEta)
		if k, ok := index[nightNum[i]]; ok {
			p.Night = k
		}
		if o.Site != "" {
			st := known[o.Site]
			pos, _ := astro.SitePositionGCRS(st, astro.UTCToUT1(o.Time, 0), tts[i]) // au
			gx, ge := frame.gradients(frame.direction(xi, eta))
			p.SiteXi, p.SiteEta = r3.Dot(gx, pos), r3.Dot(ge, pos)
		}
		tr.Points[i] = p
	}
	return tr, nil
}

// Subset returns a track with the same plane, epoch, time scale, sites and
// source but only the points for which keep returns true (for
// cross-validation). Points keep their Night numbers from tr; NumNights counts
// the distinct nights among the kept used points.
func (tr *Track) Subset(keep func(p Point) bool) *Track {
	out := *tr
	out.Points = nil
	seen := map[int]bool{}
	for i, p := range tr.Points {
		if keep(p) {
			if out.Points == nil {
				// Room for the rest, allocated once.
				out.Points = make([]Point, 0, len(tr.Points)-i)
			}
			out.Points = append(out.Points, p)
			if p.Used {
				seen[p.Night] = true
			}
		}
	}
	out.NumNights = len(seen)
	out.Warnings = append([]string(nil), tr.Warnings...)
	return &out
}

// NumUsed returns the number of points with Used set.
func (tr *Track) NumUsed() int {
	n := 0
	for _, p := range tr.Points {
		if p.Used {
			n++
		}
	}
	return n
}

// ArcTT returns the TT offsets (days from EpochTT) of the first and last used
// points.
func (tr *Track) ArcTT() (firstDays, lastDays float64) {
	firstDays, lastDays = math.Inf(1), math.Inf(-1)
	for _, p := range tr.Points {
		if p.Used {
			firstDays = math.Min(firstDays, p.T)
			lastDays = math.Max(lastDays, p.T)
		}
	}
	return firstDays, lastDays
}
