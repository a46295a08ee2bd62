package fit

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"testing"
	"time"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/fit/orbit"
)

// Calibration of the kepler model's search region, end to end through the
// path a user takes: an observation set → NewTrack → FitOrbit →
// OrbitFit.Predict, on the synthetic reference of package orbit
// (orbit/testdata/synthetic: noise-free places of six invented objects made
// by testdata/gen/orbit_synthetic.py with python3-erfa 2.0.0.1 and numpy
// 1.24.2, Debian 12; the truth places of predictions.csv come from the same
// script). Each realisation adds seeded Gaussian noise of the files' stated
// σ (0.5″ in RA·cos δ and in Dec, independent) to the noise-free places,
// fits the orbit and predicts the place 30 days after the last observation
// for the site of one of predictions.csv's rows; the truth is inside when its
// Mahalanobis distance from the predicted place under the reported
// covariance (Prediction.CovArcsec2) is at most 3 — inside the reported 3-σ
// ellipse.
//
// The statistics (stated once):
//
//   - A right 2-D Gaussian region holds the truth in its 3-σ ellipse with
//     probability 1 − exp(−9/2) = 98.89 % (the χ² survival function for two
//     degrees of freedom; Press et al., Numerical Recipes, 3rd ed. (2007),
//     §15.6).
//   - The issue asks for at least 95 % over all realisations. The number of
//     misses in N realisations is binomial: for the issue's four types on
//     the reference's four arcs, N = 640, and with the nominal 1.11 % miss
//     rate it is 7.1 ± 2.7, so the 95 % bound (32 misses) lies 9.4 standard
//     deviations beyond it: a right region passes for every seed but a
//     negligible fraction (P(≥ 33 | binomial(640, 0.0111)) ≈ 1e-12). A
//     region whose true coverage were 94 % would pass with probability
//     16 %, one at 93 % with 2.4 % (P(≤ 32 | binomial(640, 0.06 or
//     0.07))): the test checks the 95 % the issue wants, not the nominal
//     98.9 %. For all six types (N = 960) the figures are 10.7 ± 3.2 misses
//     against a bound of 48; a 94 % region passes with probability 11 %.
//   - Per case (one object and arc, 40 realisations) the misses are
//     binomial(40, p): see ocMaxCaseMisses. The per-case bound flags a case
//     whose coverage is far below the issue's figure even when the overall
//     figure passes.
//
// Failures of FitOrbit are counted and reported by case. A failure counts
// as a refusal (left out of the coverage's denominator) only when it is the
// library's typed refusal of a degenerate arc — an *orbit.DegenerateError
// and an *orbit.RangingError whose Cases are too few observations, an arc
// under an hour or no measurable motion — and the noise-free arc is refused
// the same way; every other failure, and every failed prediction, is a
// miss. The arcs used here (at least 9 observations on two nights or more)
// are not degenerate, so a failure is expected to count as a miss.
//
// The seeds are fixed (noise: PCG(ocNoiseSeed, case·1000 + realisation);
// Monte Carlo: MonteCarloSettings.Seed = the same stream number), so each
// run is reproducible and does not depend on the number of workers.

// ocDir is the synthetic reference of package orbit.
const ocDir = "orbit/testdata/synthetic"

// ocSigmaArcsec is the σ the observation files state (their places carry
// no noise).
const ocSigmaArcsec = 0.5

// ocNoiseSeed is the first word of every realisation's noise generator.
const ocNoiseSeed = 20271105

// ocDaysAfter is the prediction of the issue: 30 days after the last
// observation.
const ocDaysAfter = 30

// ocObject is one invented object of the reference (elements.csv).
type ocObject struct {
	Name, Stem, Kind string
}

// ocObjects are the reference's objects: the four types the issue names
// (main belt, near-Earth with a close approach, Jupiter-family comet,
// near-parabolic comet) and the parabolic and hyperbolic comets.
var ocObjects = []ocObject{
	{"Invented-MB1", "mb1", "main belt"},
	{"Invented-NEO1", "neo1", "near-Earth, 0.034 au approach"},
	{"Invented-JFC1", "jfc1", "Jupiter-family comet"},
	{"Invented-NP1", "np1", "near-parabolic, e = 0.998"},
	{"Invented-PA1", "pa1", "parabolic, e = 1"},
	{"Invented-HY1", "hy1", "hyperbolic, e = 1.02"},
}

// ocArcs are the reference's arcs: 2 consecutive nights, 4 nights over 7
// days, 6 nights over 20 days, 8 nights over 40 days.
var ocArcs = []string{"2n1", "2n", "4n", "20d", "40d"}

// ocArcOneSite is the two-night arc seen from one site: the observations of
// the 2n file made from the site of its first one. Every 2n file holds two
// evenings of that site and one of the other (its places 14 h or more from
// the others), so by the sampling rule's count of nights (gaps of more than
// 7.2 h) the full file has three; this arc has two, as a lone observer's
// two-night arc does, and takes the ranging path.
const ocArcOneSite = "2n1"

// ocKeepSite drops the observations of set not made from site and checks
// that two nights remain.
func ocKeepSite(t testing.TB, set *obs.Set, site string) {
	t.Helper()
	var kept []obs.Observation
	for _, o := range set.Obs {
		if o.Site == site {
			kept = append(kept, o)
		}
	}
	nights := 1
	for i := 1; i < len(kept); i++ {
		if kept[i].Time.Sub(kept[i-1].Time) > 0.3 {
			nights++
		}
	}
	if nights != 2 || len(kept) < 6 {
		t.Fatalf("%s from %s: %d observations on %d nights, want two nights", set.File, site, len(kept), nights)
	}
	set.Obs = kept
}

// ocTruth is one truth place of predictions.csv.
type ocTruth struct {
	Line    int
	UTC     astro.JD
	Site    string // "" for the geocentre
	RA, Dec astro.Angle
}

// ocCase is one object and arc, ready for realisations.
type ocCase struct {
	obj   ocObject
	arc   string
	clean *obs.Set // noise-free places as read
	sites map[string]astro.Site
	truth []ocTruth // the +30-day rows, one per site and the geocentre
}

// ocLoadCase reads one object's arc and its +30-day truth places.
func ocLoadCase(t testing.TB, o ocObject, arc string, preds map[string][]ocTruth) ocCase {
	t.Helper()
	sites, err := obs.ReadSitesFile(filepath.Join(ocDir, "sites.csv"))
	if err != nil {
		t.Fatal(err)
	}
	file := arc
	if arc == ocArcOneSite {
		file = "2n"
	}
	set, err := obs.ReadFile(filepath.Join(ocDir, o.Stem+"_"+file+".csv"), obs.ReadOptions{Sites: sites})
	if err != nil {
		t.Fatal(err)
	}
	if arc == ocArcOneSite {
		ocKeepSite(t, set, set.Obs[0].Site)
	}
	for _, ob := range set.Obs {
		if math.Abs(ob.SigmaRA.Arcseconds()-ocSigmaArcsec) > 1e-12 || math.Abs(ob.SigmaDec.Arcseconds()-ocSigmaArcsec) > 1e-12 {
			t.Fatalf("%s line %d: σ %g″, %g″; the calibration assumes the stated %g″", set.File, ob.Line,
				ob.SigmaRA.Arcseconds(), ob.SigmaDec.Arcseconds(), ocSigmaArcsec)
		}
	}
	tr := preds[o.Name]
	if len(tr) == 0 {
		t.Fatalf("predictions.csv: no +%d-day row for %s", ocDaysAfter, o.Name)
	}
	// The truth rows must lie about 30 days after the arc's last observation
	// (the README: "1, 7, 30 days after the last observation"; the site rows
	// at 22:00 local mean time of the nearest evening).
	last := set.Obs[len(set.Obs)-1].Time
	for _, p := range tr {
		if d := p.UTC.Sub(last); math.Abs(d-ocDaysAfter) > 1 {
			t.Fatalf("predictions.csv:%d: %s is %.2f d after the last observation of arc %s, want %d ± 1", p.Line, o.Name, d, arc, ocDaysAfter)
		}
	}
	return ocCase{obj: o, arc: arc, clean: set, sites: sites, truth: tr}
}

// ocReadTruth reads the +30-day rows of predictions.csv by object name.
func ocReadTruth(t testing.TB) map[string][]ocTruth {
	t.Helper()
	path := filepath.Join(ocDir, "predictions.csv")
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	r := csv.NewReader(f)
	r.Comment = '#'
	col := map[string]int{}
	out := map[string][]ocTruth{}
	for {
		rec, err := r.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Fatalf("%s: %v", path, err)
		}
		if len(col) == 0 {
			for i, h := range rec {
				col[h] = i
			}
			for _, h := range []string{"orbit", "days_after", "time_utc", "site", "ra_deg", "dec_deg"} {
				if _, ok := col[h]; !ok {
					t.Fatalf("%s: no column %q", path, h)
				}
			}
			continue
		}
		line, _ := r.FieldPos(0)
		num := func(h string) float64 {
			v, err := strconv.ParseFloat(rec[col[h]], 64)
			if err != nil {
				t.Fatalf("%s:%d: %s: %v", path, line, h, err)
			}
			return v
		}
		if int(num("days_after")) != ocDaysAfter {
			continue
		}
		utc, err := astro.ParseISO8601(rec[col["time_utc"]])
		if err != nil {
			t.Fatalf("%s:%d: time_utc: %v", path, line, err)
		}
		site := rec[col["site"]]
		if site == "geocentre" {
			site = ""
		}
		name := rec[col["orbit"]]
		out[name] = append(out[name], ocTruth{Line: line, UTC: utc, Site: site,
			RA: astro.AngleFromDegrees(num("ra_deg")), Dec: astro.AngleFromDegrees(num("dec_deg"))})
	}
	return out
}

// ocNoisy returns a copy of the set with Gaussian errors of σ = ocSigmaArcsec
// added to every place: Δδ = σ·z₁, Δα = σ·z₂ / cos δ (the error on the sky,
// RA·cos δ, is σ·z₂).
func ocNoisy(set *obs.Set, rng *rand.Rand) *obs.Set {
	c := *set
	c.Obs = append([]obs.Observation(nil), set.Obs...)
	s := ocSigmaArcsec * astro.Arcsecond.Radians()
	for i := range c.Obs {
		o := &c.Obs[i]
		dDec := s * rng.NormFloat64()
		dRA := s * rng.NormFloat64() / math.Cos(float64(o.Dec))
		o.Dec += astro.Angle(dDec)
		o.RA = (o.RA + astro.Angle(dRA)).Normalized()
	}
	return &c
}

// ocOutcome is the result of one realisation.
type ocOutcome struct {
	failed   bool   // FitOrbit or Predict failed
	refusal  bool   // a failure that is a refusal of a degenerate arc
	err      string // the failure's message
	inside   bool   // truth within the reported 3-σ ellipse
	d        float64
	major    float64 // 3-σ semi-major axis, arcsec
	method   string  // Prediction.Method
	sampleIn bool    // for a Monte Carlo region: truth within the samples' 98.9 % region
	fitDur   time.Duration
	predDur  time.Duration
}

// ocRefusal reports whether err is the library's refusal of a degenerate arc
// (see the rule at the top of this file; the noise-free check is the
// caller's).
func ocRefusal(err error) bool {
	refused := func(c orbit.Degeneracy) bool {
		return c == orbit.DegenerateTooFew || c == orbit.DegenerateShortArc || c == orbit.DegenerateStationary
	}
	var de *orbit.DegenerateError
	var re *orbit.RangingError
	gauss := errors.As(err, &de) && refused(de.Case)
	ranging := errors.As(err, &re) && refused(re.Case)
	return gauss && ranging
}

// ocRun fits one realisation and judges its +30-day region.
func ocRun(c ocCase, set *obs.Set, truth ocTruth, seed uint64) ocOutcome {
	var out ocOutcome
	t0 := time.Now()
	tr, err := NewTrack(set, c.sites)
	var of *OrbitFit
	if err == nil {
		of, err = FitOrbit(tr, Settings{})
	}
	out.fitDur = time.Since(t0)
	if err != nil {
		out.failed, out.refusal, out.err = true, ocRefusal(err), err.Error()
		return out
	}
	of.MonteCarlo = orbit.MonteCarloSettings{Seed: seed}
	var site *astro.Site
	if truth.Site != "" {
		s := c.sites[truth.Site]
		site = &s
	}
	t1 := time.Now()
	pr, err := of.Predict(truth.UTC, site)
	out.predDur = time.Since(t1)
	if err != nil {
		out.failed, out.err = true, "predict: "+err.Error()
		return out
	}
	out.method = pr.Method
	out.major = pr.Ellipse(3).SemiMajorArcsec
	x, y := orbit.Residual(truth.RA, truth.Dec, astro.UnitVector(pr.RA, pr.Dec))
	x, y = astro.Angle(x).Arcseconds(), astro.Angle(y).Arcseconds()
	out.d = ocMahalanobis(pr.CovArcsec2, x, y)
	out.inside = out.d <= 3
	if pr.Method == "montecarlo" && len(pr.Samples) > 0 {
		out.sampleIn = ocInsideSamples(pr, x, y)
	}
	return out
}

// ocMahalanobis returns √(vᵀC⁻¹v) for the offset v = (x, y) (arcsec) and
// the sky covariance C (arcsec²); +Inf for a degenerate C.
func ocMahalanobis(c [2][2]float64, x, y float64) float64 {
	a, b, d := c[0][0], c[0][1], c[1][1]
	det := a*d - b*b
	if !(det > 0) {
		return math.Inf(1)
	}
	return math.Sqrt((d*x*x - 2*b*x*y + a*y*y) / det)
}

// ocInsideSamples reports whether the truth, at offset (x, y) arcsec from
// the predicted place, lies within the part of the sampled places that
// holds 98.89 % of their weight (the 3-σ share of a 2-D Gaussian), ranked
// by their Mahalanobis distance under the reported covariance: the truth is
// inside when the weight of the samples nearer than it is at most
// 1 − exp(−9/2). (A check on the shape of the cloud; the criterion of the
// calibration is the ellipse.)
func ocInsideSamples(pr Prediction, x, y float64) bool {
	dt := ocMahalanobis(pr.CovArcsec2, x, y)
	w := pr.SampleWeights
	nearer, total := 0.0, 0.0
	for i, s := range pr.Samples {
		wi := 1.0
		if len(w) == len(pr.Samples) {
			wi = w[i]
		}
		total += wi
		if ocMahalanobis(pr.CovArcsec2, s[0], s[1]) < dt {
			nearer += wi
		}
	}
	return total > 0 && nearer/total <= 1-math.Exp(-4.5)
}

// ocTally sums the outcomes of one case.
type ocTally struct {
	obj          ocObject
	arc          string
	n            int // realisations
	inside       int
	fails        int // failures counted as misses
	refusals     int // failures left out of the denominator
	mc, mcSample int // Monte Carlo regions; of them, truth inside by the samples
	majors       []float64
	errs         map[string]int
	fitDur       time.Duration
	predDur      time.Duration
	worstD       float64
}

func (k *ocTally) add(o ocOutcome) {
	k.n++
	k.fitDur += o.fitDur
	k.predDur += o.predDur
	switch {
	case o.failed && o.refusal:
		k.refusals++
	case o.failed:
		k.fails++
	default:
		if o.inside {
			k.inside++
		}
		k.majors = append(k.majors, o.major)
		k.worstD = math.Max(k.worstD, o.d)
		if o.method == "montecarlo" {
			k.mc++
			if o.sampleIn {
				k.mcSample++
			}
		}
	}
	if o.failed {
		if k.errs == nil {
			k.errs = map[string]int{}
		}
		k.errs[o.err]++
	}
}

// judged is the number of realisations the coverage is over.
func (k *ocTally) judged() int { return k.n - k.refusals }

func (k *ocTally) coverage() float64 {
	if k.judged() == 0 {
		return math.NaN()
	}
	return float64(k.inside) / float64(k.judged())
}

func (k *ocTally) medianMajor() float64 {
	if len(k.majors) == 0 {
		return math.NaN()
	}
	m := append([]float64(nil), k.majors...)
	sort.Float64s(m)
	if len(m)%2 == 1 {
		return m[len(m)/2]
	}
	return (m[len(m)/2-1] + m[len(m)/2]) / 2
}

// ocStudy runs n realisations of every object and arc given and returns
// the tallies in that order. Realisation i of a case draws its noise from
// PCG(ocNoiseSeed, stream) and its Monte Carlo orbits with Seed stream,
// stream = first + 1000·(the case's place in ocObjects × ocArcs) + i, so a
// case's realisations do not depend on which other cases run.
func ocStudy(t *testing.T, objects []ocObject, arcs []string, n int, first uint64) []*ocTally {
	t.Helper()
	preds := ocReadTruth(t)
	var out []*ocTally
	for _, o := range objects {
		for _, arc := range arcs {
			c := ocLoadCase(t, o, arc, preds)
			k := &ocTally{obj: o, arc: arc}
			id := first + 1000*ocCaseIndex(t, o, arc)
			for i := 0; i < n; i++ {
				stream := id + uint64(i)
				rng := rand.New(rand.NewPCG(ocNoiseSeed, stream))
				truth := c.truth[i%len(c.truth)]
				r := ocRun(c, ocNoisy(c.clean, rng), truth, stream)
				if r.failed && r.refusal {
					// A refusal counts only if the noise-free arc is refused too.
					if clean := ocRun(c, c.clean, truth, stream); !(clean.failed && clean.refusal) {
						r.refusal = false
					}
				}
				k.add(r)
			}
			out = append(out, k)
		}
	}
	return out
}

// ocCaseIndex returns the place of an object and arc in ocObjects × ocArcs.
func ocCaseIndex(t testing.TB, o ocObject, arc string) uint64 {
	t.Helper()
	for i, x := range ocObjects {
		for j, a := range ocArcs {
			if x.Name == o.Name && a == arc {
				return uint64(i*len(ocArcs) + j)
			}
		}
	}
	t.Fatalf("no case %s %s", o.Name, arc)
	return 0
}

// ocSums adds up the tallies for which keep is true: realisations judged,
// truths inside.
func ocSums(ks []*ocTally, keep func(k *ocTally) bool) (n, inside int) {
	for _, k := range ks {
		if keep(k) {
			n += k.judged()
			inside += k.inside
		}
	}
	return n, inside
}

// ocTable formats the tallies as a Markdown table.
func ocTable(ks []*ocTally) string {
	var b strings.Builder
	fmt.Fprintln(&b, "| type | arc | N | inside | coverage | median 3σ semi-major (″) | montecarlo share | inside by samples | failures (miss) | refusals | worst d (σ) | fit + predict (s) |")
	fmt.Fprintln(&b, "|---|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|")
	for _, k := range ks {
		ok := k.n - k.fails - k.refusals
		share, samp := "–", "–"
		if ok > 0 {
			share = fmt.Sprintf("%.0f%%", 100*float64(k.mc)/float64(ok))
		}
		if k.mc > 0 {
			samp = fmt.Sprintf("%d/%d", k.mcSample, k.mc)
		}
		fmt.Fprintf(&b, "| %s | %s | %d | %d | %.1f%% | %.3g | %s | %s | %d | %d | %.2f | %.1f + %.1f |\n",
			k.obj.Kind, k.arc, k.judged(), k.inside, 100*k.coverage(), k.medianMajor(), share, samp,
			k.fails, k.refusals, k.worstD, k.fitDur.Seconds(), k.predDur.Seconds())
	}
	return b.String()
}

// ocErrors lists the distinct failure messages of the tallies.
func ocErrors(ks []*ocTally) string {
	var b strings.Builder
	for _, k := range ks {
		msgs := make([]string, 0, len(k.errs))
		for e := range k.errs {
			msgs = append(msgs, e)
		}
		sort.Strings(msgs)
		for _, e := range msgs {
			fmt.Fprintf(&b, "%s %s: %d× %s\n", k.obj.Stem, k.arc, k.errs[e], e)
		}
	}
	return b.String()
}

// ocIssueTypes are the four types the issue names: the first four objects.
func ocIssueType(k *ocTally) bool {
	for _, o := range ocObjects[:4] {
		if o.Name == k.obj.Name {
			return true
		}
	}
	return false
}

// ocReferenceArc reports whether the tally is of an arc file of the
// reference (not the one-site subset).
func ocReferenceArc(k *ocTally) bool { return k.arc != ocArcOneSite }

// ocRealisations is the number of realisations per object and arc of the
// full calibration: 40, so the issue's four types on the reference's four
// arcs give 640 (the issue asks for at least 200), all six types 960, and
// the one-site two-night arcs 240 more.
const ocRealisations = 40

// ocMaxCaseMisses is the per-case bound of the full calibration: at most 6
// misses in 40 realisations. A case whose coverage were the issue's 95 %
// would have 7 or more with probability P(≥ 7 | binomial(40, 0.05)) =
// 0.34 %; a right region (1.11 % misses) with probability 3e-7.
const ocMaxCaseMisses = 6

// TestOrbitCalibration is the issue's calibration (statistics at the top of
// this file), checked on the reference's own arcs (2n, 4n, 20d, 40d):
//
//   - the issue's four types (main belt, near-Earth with a close approach,
//     Jupiter-family comet, near-parabolic comet): the truth at +30 d inside
//     the reported 3-σ ellipse in at least 95 % of the 640 realisations;
//   - all six types (with the parabolic and hyperbolic comets, 960
//     realisations): at least 95 % as well;
//   - every one of the 24 cases: at most ocMaxCaseMisses misses in 40.
//
// The one-site two-night arcs (ocArcOneSite, the ranging path) are run and
// reported case by case but not held to the 95 %: they do not meet it (see
// the log), for reasons in the orbit determination and in the shape of the
// region, not in its calibration where it is a usable one.
func TestOrbitCalibration(t *testing.T) {
	if testing.Short() {
		t.Skip("the orbit calibration takes about a minute; run without -short")
	}
	start := time.Now()
	ks := ocStudy(t, ocObjects, ocArcs, ocRealisations, 0)
	t.Logf("kepler model, truth at +%d d inside the reported 3-σ ellipse (%d realisations per case, σ = %g″):\n%s",
		ocDaysAfter, ocRealisations, ocSigmaArcsec, ocTable(ks))
	if e := ocErrors(ks); e != "" {
		t.Logf("failures:\n%s", e)
	}
	for _, g := range []struct {
		what string
		keep func(k *ocTally) bool
		min  int
	}{
		{"the issue's four types, reference arcs", func(k *ocTally) bool { return ocIssueType(k) && ocReferenceArc(k) }, 200},
		{"all six types, reference arcs", ocReferenceArc, 200},
		{"all six types, one-site two-night arcs (reported, not held to 95 %)", func(k *ocTally) bool { return !ocReferenceArc(k) }, 0},
	} {
		n, in := ocSums(ks, g.keep)
		cov := float64(in) / float64(max(n, 1))
		t.Logf("%s: %d of %d inside (%.1f%%)", g.what, in, n, 100*cov)
		if g.min == 0 {
			continue
		}
		if n < g.min {
			t.Errorf("%s: only %d realisations judged, the issue asks for at least %d", g.what, n, g.min)
		}
		if !(cov >= 0.95) {
			t.Errorf("%s: coverage %.1f%% (%d of %d), want ≥ 95%%", g.what, 100*cov, in, n)
		}
	}
	for _, k := range ks {
		if !ocReferenceArc(k) {
			continue
		}
		if miss := k.judged() - k.inside; miss > ocMaxCaseMisses {
			t.Errorf("%s arc %s: %d misses in %d realisations (coverage %.0f%%), want ≤ %d (P(≥ %d | binomial(%d, 0.05)) = 0.34 %%)",
				k.obj.Name, k.arc, miss, k.judged(), 100*k.coverage(), ocMaxCaseMisses, ocMaxCaseMisses+1, ocRealisations)
		}
	}
	t.Logf("run time %.1f s", time.Since(start).Seconds())
}

// ocSmokeFirst is the first stream of the smoke version, apart from the full
// calibration's (which use streams below 1000·len(ocObjects)·len(ocArcs)).
const ocSmokeFirst = 1_000_000

// TestOrbitCalibrationSmoke is the quick version in every run, -short
// included: one realisation of each of the issue's four types on each
// reference arc (16). A right region misses 3 or more of 16 with
// probability P(≥ 3 | binomial(16, 0.0111)) = 7e-4; one at the issue's 95 %
// with probability 4.3 %. A failed fit counts as a miss.
func TestOrbitCalibrationSmoke(t *testing.T) {
	ks := ocStudy(t, ocObjects[:4], []string{"2n", "4n", "20d", "40d"}, 1, ocSmokeFirst)
	n, in := ocSums(ks, func(*ocTally) bool { return true })
	if n != 16 {
		t.Fatalf("%d realisations judged, want 16 (a refusal of a reference arc)", n)
	}
	if miss := n - in; miss >= 3 {
		t.Errorf("%d of %d truths outside the reported 3-σ ellipse, want ≤ 2:\n%s%s", miss, n, ocTable(ks), ocErrors(ks))
	}
	t.Logf("%d of %d inside:\n%s", in, n, ocTable(ks))
}
