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
	"runtime"
	"sort"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/fit/orbit"
)

// Calibration of the perturbed orbit's search region against the two-body
// one, end to end through the library call a user's prediction takes
// ([OrbitRegion]: NewTrack → the fit with Dynamics "nbody" or "twobody" →
// Prepare → Predict), on the perturbed synthetic reference of package orbit
// (orbit/testdata/nbody_synthetic: noise-free places of three invented
// objects whose truth is an n-body integration — scipy DOP853 at rtol
// 2.5e-13 with the Sun, the eight planets and the Moon, DE405 positions and
// masses — made by testdata/gen/nbody_synthetic.py with python3-scipy
// 1.10.1, python3-erfa 2.0.0.1, numpy 1.24.2 and python3-casacore 3.5.2 on
// Debian 12; the truth places of predictions.csv and the noise-free
// two-body fits of twobody_fit.csv come from the same script).
//
// Each realisation adds seeded Gaussian noise of the files' stated σ (0.5″
// in RA·cos δ and in Dec, independent; ocNoisy) to the noise-free places,
// fits the same noisy set twice, with the planets and without, and predicts
// the places 30 and 90 days after the last observation for the site (or
// the geocentre) of one of predictions.csv's rows, taken in turn. The truth
// is inside when its Mahalanobis distance from the predicted place under
// the reported covariance (Prediction.CovArcsec2, the sampled one when the
// region is sampled) is at most 3: inside the reported 3-σ ellipse. When
// the region is sampled the truth is also judged by the samples
// (ocInsideSamples).
//
// The statistics (stated once):
//
//   - A right 2-D Gaussian region holds the truth in its 3-σ ellipse with
//     probability 1 − exp(−9/2) = 98.89 % (the χ² survival function for two
//     degrees of freedom; Press et al., Numerical Recipes, 3rd ed. (2007),
//     §15.6), the figure twobody_fit.csv's header gives for a correct model.
//   - The issue: "the truth 90 days after the last observation lies inside
//     the 3-σ region in at least 95% of at least 100 noisy realisations". It
//     is held per object over its three arcs, pcRealisations per arc (300).
//     The misses of a right region are binomial(300, 0.0111): 3.3 ± 1.8,
//     and the 95 % bound (15 misses) lies 6.4 standard deviations beyond:
//     P(≥ 16 | binomial(300, 0.0111)) = 4e-7. A region whose true coverage
//     were 95 % passes with probability P(≤ 15 | binomial(300, 0.05)) =
//     57 %, one at 93 % with 10 % (P(≤ 15 | binomial(300, 0.07))); the
//     test checks the 95 %, not the nominal 98.9 %.
//   - Per case (one object and arc, 100 realisations) the n-body misses at
//     +90 d are held to pcMaxCaseMisses, which flags an arc far below the
//     issue's figure even when its object's three arcs pass together.
//   - The two-body region "misses it": twobody_fit.csv gives, for each arc,
//     the fraction of noisy realisations whose two-body 3-σ ellipse misses
//     the truth (the noise-free two-body fit's bias in its linear
//     covariance, P(noncentral χ²(2, d²) > 9)). Where that fraction is at
//     least pcTwoBodyMissSure (jf2 and neo2 on every arc at +90 d: their
//     d is 34.5 to 253, the expected coverage at most exp(−(d − 3)²/2) <
//     1e-200, the Rayleigh tail of a 2-D Gaussian), the library's
//     two-body coverage is held to at most pcTwoBodyMaxCoverage. The
//     allowance is wide on purpose: the library's region is not the
//     generator's (its covariance is scaled by χ²/dof when that exceeds 1,
//     which for jf2's 90-day arc, rms 2.1″ against σ 0.5″, χ²/dof 20,
//     widens it 4.5 times; it may be sampled), but a two-body region
//     calibrated as a right one (98.9 %) fails it by 79 points. mb2, whose expected two-body miss
//     is 7.5 %, 44 % and 96 % on the three arcs, is reported, not held.
//
// Failures of OrbitRegion are counted and reported by case, with the rule
// of orbitcalibration_test.go: a refusal (left out of the coverage's
// denominator) only when it is the library's typed refusal of a degenerate
// arc (ocRefusal) and the noise-free arc is refused the same way; every
// other failure is a miss. The arcs here (8 to 12 nights over 30 to 90
// days) are not degenerate, so a failure is expected to count as a miss.
//
// The seeds are fixed (noise: PCG(pcNoiseSeed, case·1000 + realisation);
// Monte Carlo: MonteCarloSettings.Seed = the same stream number, one worker
// per fit), so each run is reproducible and does not depend on how many
// realisations run at once. Both dynamics fit the same noisy set.

// pcDir is the perturbed synthetic reference of package orbit.
const pcDir = "orbit/testdata/nbody_synthetic"

// pcNoiseSeed is the first word of every realisation's noise generator
// (apart from ocNoiseSeed, so the two studies draw different noise).
const pcNoiseSeed = 20280715

// pcHorizons are the predictions of predictions.csv, days after the last
// observation; pcHeld is the one the issue holds.
var pcHorizons = []int{30, 90}

const pcHeld = 90

// pcDynamics are the two fits of every noisy set.
var pcDynamics = []string{orbit.DynamicsNBody, orbit.DynamicsTwoBody}

// pcObjects are the reference's objects (README.md).
var pcObjects = []ocObject{
	{"Invented-MB2", "mb2", "outer main belt"},
	{"Invented-JF2", "jf2", "Jupiter-family comet, Jupiter at 0.53 au"},
	{"Invented-NEO2", "neo2", "near-Earth, the Earth at 0.035 au"},
}

// pcArcs are the reference's arcs: 8 nights over 30 days, 10 over 60, 12
// over 90.
var pcArcs = []string{"30d", "60d", "90d"}

// pcRealisations is the number of noisy realisations per object and arc.
const pcRealisations = 100

// pcSamples is the number of orbits a sampled region draws: a tenth of
// orbit.DefaultSamples, to bound the run time (the integration of the
// sampled orbits with the planets is most of it). The sampling rule
// reports the sampled region instead of the linear one when its semi-axes
// differ by more than 20 % (orbit.RuleSizeChange) or its centre lies more
// than 0.5σ away (orbit.RuleCentreSigmas). With 200 samples the relative
// standard error of a semi-axis is 1/√(2·200) = 5 % and that of the centre
// 1/√200 = 0.07σ (common practice, Gaussian), 4 and 7 standard errors
// within the thresholds, so the rule decides as it would with the default
// number.
const pcSamples = 200

// pcMaxCaseMisses is the per-case bound on the n-body misses at +90 d: at
// most 10 in 100. A case at the 95 % has 11 or more with
// probability P(≥ 11 | binomial(100, 0.05)) = 1.1 %; a right region
// (1.11 % misses) with probability 2e-8.
const pcMaxCaseMisses = 10

// pcTwoBodyMissSure and pcTwoBodyMaxCoverage: where twobody_fit.csv's
// expected two-body miss at +90 d is at least 99 %, the library's two-body
// coverage there is held to at most 20 % (see the top of this file).
const (
	pcTwoBodyMissSure    = 0.99
	pcTwoBodyMaxCoverage = 0.20
)

// pcRef is one row of twobody_fit.csv: the generator's noise-free two-body
// fit of an arc, predicted for the geocentre.
type pcRef struct {
	Line         int
	BiasE, BiasN float64 // fitted minus truth on the tangent plane at the truth, arcsec
	// Mahalanobis is the truth's distance from the fit's prediction in its
	// linear covariance; ExpMiss the expected fraction of noisy two-body
	// 3-σ ellipses that miss the truth.
	Mahalanobis, ExpMiss float64
}

// pcReadTruth reads predictions.csv: the truth rows by object name and days
// after the last observation, in the file's order (the geocentre, then the
// two sites).
func pcReadTruth(t testing.TB) map[string]map[int][]ocTruth {
	t.Helper()
	out := map[string]map[int][]ocTruth{}
	pcReadCSV(t, filepath.Join(pcDir, "predictions.csv"),
		[]string{"orbit", "days_after", "time_utc", "site", "ra_deg", "dec_deg"},
		func(line int, field func(string) string, num func(string) float64) {
			utc, err := astro.ParseISO8601(field("time_utc"))
			if err != nil {
				t.Fatalf("predictions.csv:%d: time_utc: %v", line, err)
			}
			site := field("site")
			if site == "geocentre" {
				site = ""
			}
			name, days := field("orbit"), int(num("days_after"))
			if out[name] == nil {
				out[name] = map[int][]ocTruth{}
			}
			out[name][days] = append(out[name][days], ocTruth{Line: line, UTC: utc, Site: site,
				RA: astro.AngleFromDegrees(num("ra_deg")), Dec: astro.AngleFromDegrees(num("dec_deg"))})
		})
	return out
}

// pcReadRefs reads twobody_fit.csv by object name, arc and days after.
func pcReadRefs(t testing.TB) map[string]pcRef {
	t.Helper()
	out := map[string]pcRef{}
	pcReadCSV(t, filepath.Join(pcDir, "twobody_fit.csv"),
		[]string{"orbit", "arc", "days_after", "bias_e_arcsec", "bias_n_arcsec", "mahalanobis", "expected_miss"},
		func(line int, field func(string) string, num func(string) float64) {
			out[pcRefKey(field("orbit"), field("arc"), int(num("days_after")))] = pcRef{Line: line,
				BiasE: num("bias_e_arcsec"), BiasN: num("bias_n_arcsec"),
				Mahalanobis: num("mahalanobis"), ExpMiss: num("expected_miss")}
		})
	return out
}

// pcReadCSV reads a commented CSV file of the reference, checks that it has
// the columns want, and calls row for every data row with accessors of its
// fields by column name (num fails the test on a field that is not a
// number).
func pcReadCSV(t testing.TB, path string, want []string, row func(line int, field func(string) string, num func(string) float64)) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	r := csv.NewReader(f)
	r.Comment = '#'
	col := map[string]int{}
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
			for _, h := range want {
				if _, ok := col[h]; !ok {
					t.Fatalf("%s: no column %q", path, h)
				}
			}
			continue
		}
		line, _ := r.FieldPos(0)
		field := func(h string) string { return rec[col[h]] }
		num := func(h string) float64 {
			v, err := strconv.ParseFloat(rec[col[h]], 64)
			if err != nil {
				t.Fatalf("%s:%d: %s: %v", path, line, h, err)
			}
			return v
		}
		row(line, field, num)
	}
}

func pcRefKey(name, arc string, days int) string { return fmt.Sprintf("%s/%s/%d", name, arc, days) }

// pcCase is one object and arc, ready for realisations.
type pcCase struct {
	obj   ocObject
	arc   string
	index uint64 // place in pcObjects × pcArcs
	clean *obs.Set
	sites map[string]astro.Site
	// truth[h][j] is the truth row of site j (geocentre, then the sites)
	// pcHorizons[h] days after the last observation.
	truth [][]ocTruth
	refs  map[int]pcRef // twobody_fit.csv by days after
}

// pcLoadCase reads one object's arc, its truth rows and its two-body
// reference rows, and checks what the calibration assumes of them.
func pcLoadCase(t testing.TB, index int, sites map[string]astro.Site, truth map[string]map[int][]ocTruth, refs map[string]pcRef) pcCase {
	t.Helper()
	o, arc := pcObjects[index/len(pcArcs)], pcArcs[index%len(pcArcs)]
	set, err := obs.ReadFile(filepath.Join(pcDir, o.Stem+"_"+arc+".csv"), obs.ReadOptions{Sites: sites})
	if err != nil {
		t.Fatal(err)
	}
	for _, ob := range set.Obs {
		if math.Abs(ob.SigmaRA.Arcseconds()-ocSigmaArcsec) > 1e-12 || math.Abs(ob.SigmaDec.Arcseconds()-ocSigmaArcsec) > 1e-12 {
			t.Fatalf("%s line %d: σ %g″, %g″; the calibration assumes the stated %g″", set.File, ob.Line,
				ob.SigmaRA.Arcseconds(), ob.SigmaDec.Arcseconds(), ocSigmaArcsec)
		}
	}
	c := pcCase{obj: o, arc: arc, index: uint64(index), clean: set, sites: sites, refs: map[int]pcRef{}}
	last := set.Obs[len(set.Obs)-1].Time
	for _, h := range pcHorizons {
		rows := truth[o.Name][h]
		if len(rows) == 0 {
			t.Fatalf("predictions.csv: no +%d-day row for %s", h, o.Name)
		}
		// The README: 30 and 90 days after the last observation, the site
		// rows at 22:00 local mean time of the nearest evening.
		for j, p := range rows {
			if d := p.UTC.Sub(last); math.Abs(d-float64(h)) > 1 {
				t.Fatalf("predictions.csv:%d: %s is %.2f d after the last observation of arc %s, want %d ± 1", p.Line, o.Name, d, arc, h)
			}
			if len(c.truth) > 0 && rows[j].Site != c.truth[0][j].Site {
				t.Fatalf("predictions.csv:%d: site %q, the +%d-day rows have %q in that place", p.Line, p.Site, pcHorizons[0], c.truth[0][j].Site)
			}
		}
		if len(c.truth) > 0 && len(rows) != len(c.truth[0]) {
			t.Fatalf("predictions.csv: %s has %d rows at +%d d and %d at +%d d", o.Name, len(c.truth[0]), pcHorizons[0], len(rows), h)
		}
		c.truth = append(c.truth, rows)
		r, ok := refs[pcRefKey(o.Name, arc, h)]
		if !ok {
			t.Fatalf("twobody_fit.csv: no row for %s arc %s +%d d", o.Name, arc, h)
		}
		c.refs[h] = r
	}
	return c
}

// pcOutcome is one fit of one realisation: its outcome at each horizon.
type pcOutcome struct {
	at  []ocOutcome // by pcHorizons
	sep []float64   // distance of the truth from the region's centre, arcsec, by pcHorizons
	// ruled reports, by pcHorizons, that the sampling rule asked for sampled
	// orbits (orbit.ChooseSampling, as OrbitFit.Predict applies it).
	ruled []bool
	dur   time.Duration
}

// pcRun fits set with dynamics dyn and judges the regions at every horizon
// for site j of the truth rows.
func pcRun(c pcCase, set *obs.Set, j int, dyn string, seed uint64) pcOutcome {
	out := pcOutcome{at: make([]ocOutcome, len(pcHorizons)), sep: make([]float64, len(pcHorizons)), ruled: make([]bool, len(pcHorizons))}
	var site *astro.Site
	if name := c.truth[0][j].Site; name != "" {
		s := c.sites[name]
		site = &s
	}
	at := make([]astro.JD, len(pcHorizons))
	for h := range pcHorizons {
		at[h] = c.truth[h][j].UTC
	}
	t0 := time.Now()
	ps, of, err := OrbitRegion(set, c.sites, at, site, RegionOptions{Dynamics: dyn,
		MonteCarlo: orbit.MonteCarloSettings{N: pcSamples, Seed: seed, Workers: 1}})
	out.dur = time.Since(t0)
	for h := range pcHorizons {
		o := &out.at[h]
		if err != nil {
			o.failed, o.refusal, o.err = true, ocRefusal(err), err.Error()
			continue
		}
		pr, tr := ps[h], c.truth[h][j]
		out.ruled[h] = of.RangingOnly || orbit.ChooseSampling(of.Obs, at[h], of.Solution.Cov != nil).Method != orbit.SamplingLinear
		o.method = pr.Method
		o.major = pr.Ellipse(3).SemiMajorArcsec
		x, y := orbit.Residual(tr.RA, tr.Dec, astro.UnitVector(pr.RA, pr.Dec))
		x, y = astro.Angle(x).Arcseconds(), astro.Angle(y).Arcseconds()
		o.d = ocMahalanobis(pr.CovArcsec2, x, y)
		out.sep[h] = math.Hypot(x, y)
		o.inside = o.d <= 3
		if pr.Method == "montecarlo" && len(pr.Samples) > 0 {
			o.sampleIn = ocInsideSamples(pr, x, y)
		}
	}
	return out
}

// pcTally sums the outcomes of one case, one dynamics, one horizon.
type pcTally struct {
	ocTally
	dyn  string
	days int
	ref  pcRef
	ds   []float64 // Mahalanobis distances of the judged fits
	seps []float64 // distances of the truth from their centres, arcsec
	fits int       // fits timed (both horizons share one)
	// ruled counts the regions for which the sampling rule drew orbits
	// (reported as sampled only when they differ from the linear one: mc).
	ruled int
}

func (k *pcTally) add(o ocOutcome, sep float64, ruled bool, dur time.Duration) {
	k.ocTally.add(o)
	k.fitDur += dur
	k.fits++
	if !o.failed {
		k.ds = append(k.ds, o.d)
		k.seps = append(k.seps, sep)
		if ruled {
			k.ruled++
		}
	}
}

func (k *pcTally) medianD() float64 { return pcMedian(k.ds) }

func pcMedian(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	m := append([]float64(nil), v...)
	sort.Float64s(m)
	if len(m)%2 == 1 {
		return m[len(m)/2]
	}
	return (m[len(m)/2-1] + m[len(m)/2]) / 2
}

// pcStudy runs n realisations of the cases given (places in pcObjects ×
// pcArcs) with every dynamics, on as many goroutines as processors, and
// returns the tallies keyed by dynamics and horizon, each in the order of
// cases. Realisation i of case c draws its noise from PCG(pcNoiseSeed,
// stream) and its Monte Carlo orbits with Seed stream, stream = first +
// 1000·c + i; it is predicted for site i mod 3 of the truth rows.
// noiseFree fits the noise-free places instead (the smoke version).
func pcStudy(t *testing.T, cases []int, n int, first uint64, noiseFree bool) map[string][]*pcTally {
	t.Helper()
	sites, err := obs.ReadSitesFile(filepath.Join(pcDir, "sites.csv"))
	if err != nil {
		t.Fatal(err)
	}
	truth, refs := pcReadTruth(t), pcReadRefs(t)
	type job struct {
		c      int // index into cs
		i      int
		stream uint64
	}
	cs := make([]pcCase, len(cases))
	var jobs []job
	for ci, idx := range cases {
		cs[ci] = pcLoadCase(t, idx, sites, truth, refs)
		for i := range n {
			jobs = append(jobs, job{ci, i, first + 1000*cs[ci].index + uint64(i)})
		}
	}
	results := make([][]pcOutcome, len(jobs)) // by job, then pcDynamics
	var next int
	var mu sync.Mutex
	var wg sync.WaitGroup
	for range runtime.GOMAXPROCS(0) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				mu.Lock()
				k := next
				next++
				mu.Unlock()
				if k >= len(jobs) {
					return
				}
				jb := jobs[k]
				c := cs[jb.c]
				set := c.clean
				if !noiseFree {
					set = ocNoisy(c.clean, rand.New(rand.NewPCG(pcNoiseSeed, jb.stream)))
				}
				j := jb.i % len(c.truth[0])
				res := make([]pcOutcome, len(pcDynamics))
				for d, dyn := range pcDynamics {
					r := pcRun(c, set, j, dyn, jb.stream)
					if r.at[0].failed && r.at[0].refusal {
						// A refusal counts only if the noise-free arc is refused too.
						if clean := pcRun(c, c.clean, j, dyn, jb.stream); !(clean.at[0].failed && clean.at[0].refusal) {
							for h := range r.at {
								r.at[h].refusal = false
							}
						}
					}
					res[d] = r
				}
				results[k] = res
			}
		}()
	}
	wg.Wait()
	out := map[string][]*pcTally{}
	tallies := map[string]map[int]*pcTally{}
	for _, dyn := range pcDynamics {
		for _, h := range pcHorizons {
			key := pcKey(dyn, h)
			tallies[key] = map[int]*pcTally{}
			for ci, c := range cs {
				k := &pcTally{ocTally: ocTally{obj: c.obj, arc: c.arc}, dyn: dyn, days: h, ref: c.refs[h]}
				tallies[key][ci] = k
				out[key] = append(out[key], k)
			}
		}
	}
	for k, jb := range jobs {
		for d, dyn := range pcDynamics {
			r := results[k][d]
			for h, days := range pcHorizons {
				tallies[pcKey(dyn, days)][jb.c].add(r.at[h], r.sep[h], r.ruled[h], r.dur)
			}
		}
	}
	return out
}

func pcKey(dyn string, days int) string { return fmt.Sprintf("%s+%d", dyn, days) }

// pcAllCases are the places of every object and arc.
func pcAllCases() []int {
	var v []int
	for i := range len(pcObjects) * len(pcArcs) {
		v = append(v, i)
	}
	return v
}

// pcTable formats the tallies of one dynamics and horizon as a Markdown
// table, with twobody_fit.csv's noise-free two-body bias and expected
// two-body miss beside them.
func pcTable(ks []*pcTally) string {
	var b strings.Builder
	fmt.Fprintln(&b, "| object | arc | N | inside | coverage | sampled: drawn / reported | inside by samples | median 3σ semi-major (″) | median centre − truth (″) | median d (σ) | worst d (σ) | failures (miss) | refusals | two-body bias, noise-free (twobody_fit.csv, ″) | two-body miss expected (twobody_fit.csv) | s per fit |")
	fmt.Fprintln(&b, "|---|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|")
	for _, k := range ks {
		samp := "–"
		if k.mc > 0 {
			samp = fmt.Sprintf("%d/%d", k.mcSample, k.mc)
		}
		per := 0.0
		if k.fits > 0 {
			per = k.fitDur.Seconds() / float64(k.fits)
		}
		fmt.Fprintf(&b, "| %s | %s | %d | %d | %.1f%% | %d / %d | %s | %s | %s | %.2f | %s | %d | %d | %s | %.1f%% | %.3f |\n",
			k.obj.Stem, k.arc, k.judged(), k.inside, 100*k.coverage(), k.ruled, k.mc, samp, pcNum(k.medianMajor()), pcNum(pcMedian(k.seps)),
			k.medianD(), pcNum(k.worstD), k.fails, k.refusals, pcNum(math.Hypot(k.ref.BiasE, k.ref.BiasN)), 100*k.ref.ExpMiss, per)
	}
	return b.String()
}

// pcNum formats a table's figure to three significant digits, without an
// exponent below a million.
func pcNum(v float64) string {
	if math.Abs(v) >= 1000 && math.Abs(v) < 1e6 {
		return fmt.Sprintf("%.0f", v)
	}
	return fmt.Sprintf("%.3g", v)
}

// pcErrors lists the distinct failure messages of the tallies.
func pcErrors(ks []*pcTally) string {
	var b strings.Builder
	for _, k := range ks {
		msgs := make([]string, 0, len(k.errs))
		for e := range k.errs {
			msgs = append(msgs, e)
		}
		sort.Strings(msgs)
		for _, e := range msgs {
			fmt.Fprintf(&b, "%s %s %s +%d d: %d× %s\n", k.dyn, k.obj.Stem, k.arc, k.days, k.errs[e], e)
		}
	}
	return b.String()
}

// pcObjectSums adds up the tallies of one object: realisations judged,
// truths inside.
func pcObjectSums(ks []*pcTally, o ocObject) (n, inside int) {
	for _, k := range ks {
		if k.obj.Name == o.Name {
			n += k.judged()
			inside += k.inside
		}
	}
	return n, inside
}

// pcLogTables logs the tables of every dynamics and horizon, the
// per-object sums and the failures.
func pcLogTables(t *testing.T, ts map[string][]*pcTally, n int) {
	t.Helper()
	for _, h := range []int{pcHeld, 30} {
		for _, dyn := range pcDynamics {
			ks := ts[pcKey(dyn, h)]
			var sums []string
			for _, o := range pcObjects {
				m, in := pcObjectSums(ks, o)
				sums = append(sums, fmt.Sprintf("%s %d/%d (%.1f%%)", o.Stem, in, m, 100*float64(in)/float64(max(m, 1))))
			}
			t.Logf("dynamics %s, truth at +%d d inside the reported 3-σ ellipse (%d realisations per case, σ = %g″); by object: %s\n%s",
				dyn, h, n, ocSigmaArcsec, strings.Join(sums, ", "), pcTable(ks))
			if e := pcErrors(ks); e != "" {
				t.Logf("failures:\n%s", e)
			}
		}
	}
}

// TestPerturbedCalibration is the calibration of the perturbed
// orbit's region (statistics at the top of this file):
//
//   - for each object, the truth inside the n-body 3-σ ellipse in at least
//     95 % of its 300 realisations (100 per arc, at least the 100),
//     at +90 d and at +30 d (the same statistics);
//   - for each object and arc, at most pcMaxCaseMisses n-body misses;
//   - where twobody_fit.csv expects the two-body region to miss the truth
//     (expected miss ≥ pcTwoBodyMissSure: jf2 and neo2, every arc), the
//     two-body coverage at most pcTwoBodyMaxCoverage.
//
// The two-body regions at +30 d, and mb2's at +90 d, are reported.
func TestPerturbedCalibration(t *testing.T) {
	if testing.Short() {
		t.Skip("the perturbed-orbit calibration takes one to two minutes; run without -short")
	}
	start := time.Now()
	ts := pcStudy(t, pcAllCases(), pcRealisations, 0, false)
	pcLogTables(t, ts, pcRealisations)
	for _, h := range pcHorizons {
		for _, o := range pcObjects {
			n, in := pcObjectSums(ts[pcKey(orbit.DynamicsNBody, h)], o)
			cov := float64(in) / float64(max(n, 1))
			if n < pcRealisations {
				t.Errorf("%s, +%d d: only %d realisations judged, the issue asks for at least %d", o.Name, h, n, pcRealisations)
			}
			if !(cov >= 0.95) {
				t.Errorf("%s, n-body, +%d d: coverage %.1f%% (%d of %d), want ≥ 95%%", o.Name, h, 100*cov, in, n)
			}
		}
	}
	nb := ts[pcKey(orbit.DynamicsNBody, pcHeld)]
	for _, k := range nb {
		if miss := k.judged() - k.inside; miss > pcMaxCaseMisses {
			t.Errorf("%s arc %s, n-body, +%d d: %d misses in %d realisations (coverage %.0f%%), want ≤ %d (P(≥ %d | binomial(%d, 0.05)) = 1.1 %%)",
				k.obj.Name, k.arc, pcHeld, miss, k.judged(), 100*k.coverage(), pcMaxCaseMisses, pcMaxCaseMisses+1, pcRealisations)
		}
	}
	held := 0
	for _, k := range ts[pcKey(orbit.DynamicsTwoBody, pcHeld)] {
		if k.ref.ExpMiss < pcTwoBodyMissSure {
			continue
		}
		held++
		if !(k.coverage() <= pcTwoBodyMaxCoverage) {
			t.Errorf("%s arc %s, two-body, +%d d: coverage %.1f%% (%d of %d), want ≤ %.0f%%: twobody_fit.csv:%d expects %.1f%% of the two-body regions to miss (d = %.3g)",
				k.obj.Name, k.arc, pcHeld, 100*k.coverage(), k.inside, k.judged(), 100*pcTwoBodyMaxCoverage, k.ref.Line, 100*k.ref.ExpMiss, k.ref.Mahalanobis)
		}
	}
	if held != 6 {
		t.Errorf("%d cases with a sure two-body miss in twobody_fit.csv, want 6 (jf2 and neo2 on each arc)", held)
	}
	t.Logf("run time %.1f s on %d processors", time.Since(start).Seconds(), runtime.GOMAXPROCS(0))
}

// pcSmokeFirst is the first stream of the smoke version, apart from the
// full calibration's (which use streams below 1000·9).
const pcSmokeFirst = 1_000_000

// TestPerturbedCalibrationSmoke is the quick version in every run, -short
// included: each object and arc once, noise-free, predicted +90 d on for
// the geocentre (the first truth row, and the place of twobody_fit.csv).
// The n-body fit of noise-free places of an n-body truth recovers it, up to
// the differences between this project's force model and observer and the
// generator's (VSOP87 against DE405 and epv00), far inside the region: its
// 3-σ ellipse holds the truth. The two-body fit misses it by the planets'
// pull, its centre farther from the truth than the n-body one (by the bias
// twobody_fit.csv gives, logged beside it).
func TestPerturbedCalibrationSmoke(t *testing.T) {
	ts := pcStudy(t, pcAllCases(), 1, pcSmokeFirst, true)
	nb, tb := ts[pcKey(orbit.DynamicsNBody, pcHeld)], ts[pcKey(orbit.DynamicsTwoBody, pcHeld)]
	for i := range nb {
		if len(nb[i].seps) != 1 || len(tb[i].seps) != 1 {
			t.Errorf("%s arc %s: a fit failed:\n%s", nb[i].obj.Name, nb[i].arc, pcErrors([]*pcTally{nb[i], tb[i]}))
			continue
		}
		if nb[i].inside != 1 {
			t.Errorf("%s arc %s, n-body, +%d d: the noise-free truth is %.3g σ from the centre, outside the 3-σ ellipse",
				nb[i].obj.Name, nb[i].arc, pcHeld, nb[i].ds[0])
		}
		if !(tb[i].seps[0] > nb[i].seps[0]) {
			t.Errorf("%s arc %s, +%d d: the two-body centre is %.3g″ from the noise-free truth, the n-body one %.3g″, want it farther",
				nb[i].obj.Name, nb[i].arc, pcHeld, tb[i].seps[0], nb[i].seps[0])
		}
	}
	t.Logf("n-body:\n%s", pcTable(nb))
	t.Logf("two-body:\n%s", pcTable(tb))
}
