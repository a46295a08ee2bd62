// Command peers is the arcfit side of bench/compare.sh: it writes the inputs
// that both sides of each comparison read, and times arcfit's library on
// them. bench/peers.py is the other side (numpy, python3-ephem, astropy).
//
// Usage:
//
//	peers fit-gen N FILE          write N invented tangent-plane observations
//	peers fit FILE REPS           time fit.Fit (poly2) on them
//	peers ephem ROWS REPS PREFIX  time an element-set table of ROWS rows
//	peers sunmoon ROWS REPS PREFIX  time Sun and Moon tables of ROWS rows
//
// Every timing excludes process start-up, input generation and reading: the
// clock runs around the library call only. Each case is run REPS times and
// the median (and the minimum) reported. The result is one JSON object on
// stdout, with the process's peak resident memory (getrusage ru_maxrss) at
// the end; positions and coefficients go to PREFIX files for bench/peers.py
// to compare.
//
// All data are invented: the track is a synthetic quadratic with Gaussian
// noise, the element set an invented main-belt orbit.
package main

import (
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"runtime"
	"slices"
	"strconv"
	"syscall"
	"time"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit"
)

func main() {
	if err := run(os.Args[1:]); err != nil {
		fmt.Fprintln(os.Stderr, "peers:", err)
		os.Exit(2)
	}
}

func run(args []string) error {
	if len(args) == 0 {
		return errors.New("want a subcommand: fit-gen, fit, ephem, sunmoon")
	}
	num := func(i int) (int, error) {
		if len(args) <= i {
			return 0, fmt.Errorf("%s: missing argument %d", args[0], i)
		}
		return strconv.Atoi(args[i])
	}
	switch args[0] {
	case "fit-gen":
		n, err := num(1)
		if err != nil || len(args) != 3 {
			return errors.New("usage: peers fit-gen N FILE")
		}
		return writeFitInput(args[2], n)
	case "fit":
		reps, err := num(2)
		if err != nil || len(args) != 3 {
			return errors.New("usage: peers fit FILE REPS")
		}
		return benchFit(args[1], reps)
	case "ephem", "sunmoon":
		rows, err := num(1)
		if err != nil {
			return err
		}
		reps, err := num(2)
		if err != nil || len(args) != 4 {
			return fmt.Errorf("usage: peers %s ROWS REPS PREFIX", args[0])
		}
		if args[0] == "ephem" {
			return benchElements(rows, reps, args[3])
		}
		return benchSunMoon(rows, reps, args[3])
	}
	return fmt.Errorf("unknown subcommand %q", args[0])
}

// fitMagic starts a fit input file: then n (int64), the time scale (days),
// and the arrays T (days), ξ, η, σξ, ση (radians), each n float64, all
// little-endian.
const fitMagic = "ARCFITB1"

// nightsOf is the number of observing nights the n observations are spread
// over (a night 8 h long, one a day).
const nightsOf = 10

// writeFitInput writes n invented observations of a quadratic track.
func writeFitInput(path string, n int) error {
	if n < 30 {
		return errors.New("fit-gen: want at least 30 observations")
	}
	rng := rand.New(rand.NewPCG(20270210, uint64(n)))
	const arcsec = math.Pi / (180 * 3600)
	t := make([]float64, n)
	per := (n + nightsOf - 1) / nightsOf
	for i := range t {
		night, k := i/per, i%per
		// nights one day apart, each observed over 8 h, centred on the arc
		t[i] = float64(night) - float64(nightsOf-1)/2 + (float64(k)/float64(per)-0.5)*(8.0/24)
	}
	lo, hi := slices.Min(t), slices.Max(t)
	mid := (lo + hi) / 2
	for i := range t {
		t[i] -= mid
	}
	scale := (hi - lo) / 2
	xi, eta, sx, se := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	for i, ti := range t {
		tau := ti / scale
		sx[i] = (0.3 + 1.7*rng.Float64()) * arcsec
		se[i] = (0.3 + 1.7*rng.Float64()) * arcsec
		xi[i] = 1.2e-3 + 2.4e-3*tau + 3.1e-5*tau*tau + sx[i]*rng.NormFloat64()
		eta[i] = -4.0e-4 - 1.1e-3*tau + 1.7e-5*tau*tau + se[i]*rng.NormFloat64()
	}
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	w := func(v any) {
		if err == nil {
			err = binary.Write(f, binary.LittleEndian, v)
		}
	}
	w([]byte(fitMagic))
	w(int64(n))
	w(scale)
	for _, a := range [][]float64{t, xi, eta, sx, se} {
		w(a)
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	return err
}

// readFitInput reads a file of writeFitInput into a track.
func readFitInput(path string) (*fit.Track, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	magic := make([]byte, len(fitMagic))
	var n int64
	var scale float64
	for _, v := range []any{magic, &n, &scale} {
		if err := binary.Read(f, binary.LittleEndian, v); err != nil {
			return nil, err
		}
	}
	if string(magic) != fitMagic || n < 1 {
		return nil, fmt.Errorf("%s: not a fit input file", path)
	}
	cols := make([][]float64, 5)
	for i := range cols {
		cols[i] = make([]float64, n)
		if err := binary.Read(f, binary.LittleEndian, cols[i]); err != nil {
			return nil, err
		}
	}
	epoch := astro.NewJD(2461446.5, astro.TT)
	tr := &fit.Track{
		Plane:         astro.TangentPlane{RA0: 1.1, Dec0: 0.2},
		EpochTT:       epoch,
		TimeScaleDays: scale,
		Points:        make([]fit.Point, n),
		NumNights:     nightsOf,
		Source:        path,
	}
	per := (int(n) + nightsOf - 1) / nightsOf
	for i := range tr.Points {
		tr.Points[i] = fit.Point{
			ObsIndex: i, Line: i + 2,
			UTC: astro.JD{Day: epoch.Day, Frac: epoch.Frac + cols[0][i], Scale: astro.UTC},
			T:   cols[0][i],
			Xi:  cols[1][i], Eta: cols[2][i],
			SigmaXi: cols[3][i], SigmaEta: cols[4][i],
			Night: i / per, Used: true,
		}
	}
	return tr, nil
}

// result is what a benchmark prints.
type result struct {
	Case    string    `json:"case"`
	N       int       `json:"n"`
	Reps    int       `json:"reps"`
	MedianS float64   `json:"median_s"`
	MinS    float64   `json:"min_s"`
	TimesS  []float64 `json:"times_s"`
	// CPUMedianS is the median of the process CPU time (user + system, all
	// threads) of each repetition.
	CPUMedianS float64   `json:"cpu_median_s"`
	CPUTimesS  []float64 `json:"cpu_times_s"`
	MaxRSSKB   int64     `json:"max_rss_kb"`
	Workers    int       `json:"workers"`
	Params     []float64 `json:"params,omitempty"`
	Note       string    `json:"note,omitempty"`
}

// times are the wall and CPU times of the repetitions, seconds.
type times struct{ wall, cpu []float64 }

// cpuSeconds returns the CPU time the process has used (user + system).
func cpuSeconds() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return math.NaN()
	}
	tv := func(t syscall.Timeval) float64 { return float64(t.Sec) + float64(t.Usec)*1e-6 }
	return tv(ru.Utime) + tv(ru.Stime)
}

// timeIt runs f reps times and returns the wall and CPU times.
func timeIt(reps int, f func() error) (times, error) {
	if reps < 1 {
		return times{}, errors.New("want at least one repetition")
	}
	ts := times{wall: make([]float64, reps), cpu: make([]float64, reps)}
	for i := range reps {
		start, c0 := time.Now(), cpuSeconds()
		if err := f(); err != nil {
			return times{}, err
		}
		ts.wall[i] = time.Since(start).Seconds()
		ts.cpu[i] = cpuSeconds() - c0
	}
	return ts, nil
}

// median returns the median of v.
func median(v []float64) float64 {
	s := slices.Clone(v)
	slices.Sort(s)
	if len(s)%2 == 0 {
		return (s[len(s)/2-1] + s[len(s)/2]) / 2
	}
	return s[len(s)/2]
}

// finish fills the statistics and the peak memory and prints r.
func finish(r result, ts times) error {
	r.TimesS, r.CPUTimesS = ts.wall, ts.cpu
	r.Reps = len(ts.wall)
	r.MinS = slices.Min(ts.wall)
	r.MedianS = median(ts.wall)
	r.CPUMedianS = median(ts.cpu)
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err == nil {
		r.MaxRSSKB = int64(ru.Maxrss) // kilobytes on Linux
	}
	enc := json.NewEncoder(os.Stdout)
	return enc.Encode(r)
}

// benchFit times the degree-2 sky-plane fit of the observations in path:
// fit.Fit with the parallax off and no outlier rejection, the plain weighted
// least-squares problem that numpy.linalg.lstsq solves on the peer side.
func benchFit(path string, reps int) error {
	tr, err := readFitInput(path)
	if err != nil {
		return err
	}
	s := fit.Settings{Parallax: fit.ParallaxOff, KeepAll: true}
	var sol *fit.Solution
	ts, err := timeIt(reps, func() error {
		sol = nil // the previous solution may be collected during this one
		var err error
		sol, err = fit.Fit(tr, fit.Poly(2), s)
		return err
	})
	if err != nil {
		return err
	}
	return finish(result{Case: "fit-poly2", N: len(tr.Points), Params: sol.Params, Workers: 1,
		Note: "fit.Fit(track, poly2, parallax off, keep all): QR of the whitened 2n×6 design, covariance, condition number, residuals"}, ts)
}

// peerElements is the invented element set of the element-table comparison:
// an outer main-belt orbit (it stays beyond 1.6 au of the Earth, where
// python3-ephem's own Earth error matters least).
var peerElements = ephem.Elements{
	Name:  "Invented-Peer",
	Epoch: astro.NewJD(2461400.5, astro.TT),
	A:     3.05, E: 0.11,
	I: 12.3 * astro.Degree, Node: 75.2 * astro.Degree, Peri: 210.4 * astro.Degree, M: 15.0 * astro.Degree,
	H: 13.1, G: 0.15,
}

// tableStart is the first instant of the tables (2027-02-10 0h UTC) and
// the steps: 10 minutes for the element set, 1 hour for the Sun and Moon.
const (
	tableStartJD       = 2461446.5
	elementsStepDays   = 10.0 / 1440
	sunMoonStepDays    = 1.0 / 24
	stepsNote          = "geocentric; ICRS astrometric RA/Dec"
	degPerRad          = 180 / math.Pi
	specFileSuffix     = ".spec.json"
	positionFileSuffix = ".f64"
)

// tableSpec tells the peer which instants and which body to compute.
type tableSpec struct {
	FromJDUTC float64 `json:"from_jd_utc"`
	StepDays  float64 `json:"step_days"`
	Rows      int     `json:"rows"`
	// The element set (mean-anomaly form), degrees, epoch a TT Julian date.
	Name     string   `json:"name,omitempty"`
	EpochTT  float64  `json:"epoch_tt,omitempty"`
	AAU      float64  `json:"a_au,omitempty"`
	E        float64  `json:"e,omitempty"`
	IDeg     float64  `json:"i_deg,omitempty"`
	NodeDeg  float64  `json:"node_deg,omitempty"`
	PeriDeg  float64  `json:"peri_deg,omitempty"`
	MDeg     float64  `json:"m_deg,omitempty"`
	H        float64  `json:"h,omitempty"`
	G        float64  `json:"g,omitempty"`
	Bodies   []string `json:"bodies,omitempty"`
	Contents string   `json:"contents"`
}

// writeJSON writes v to path.
func writeJSON(path string, v any) error {
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		return err
	}
	return os.WriteFile(path, append(b, '\n'), 0o644)
}

// writeFloats writes the arrays one after another, little-endian float64.
func writeFloats(path string, arrays ...[]float64) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	for _, a := range arrays {
		if err == nil {
			err = binary.Write(f, binary.LittleEndian, a)
		}
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	return err
}

// table makes one ephemeris table of rows rows from the start at step,
// geocentric; a stale leap-second table is a warning only.
func table(tg ephem.TableTarget, rows int, stepDays float64) ([]ephem.Place, error) {
	from := astro.NewJD(tableStartJD, astro.UTC)
	to := from.AddDays(float64(rows-1) * stepDays)
	places, err := ephem.EphemerisTable(tg, from, to, stepDays, ephem.Observer{})
	if err != nil && !errors.Is(err, astro.ErrStaleTable) {
		return nil, err
	}
	if len(places) != rows {
		return nil, fmt.Errorf("table of %d rows, want %d", len(places), rows)
	}
	return places, nil
}

// benchElements times ephem.EphemerisTable for peerElements (the library
// call behind arcfit ephem --elements), geocentric.
func benchElements(rows, reps int, prefix string) error {
	el := peerElements
	spec := tableSpec{
		FromJDUTC: tableStartJD, StepDays: elementsStepDays, Rows: rows,
		Name: el.Name, EpochTT: el.Epoch.Float(), AAU: el.A, E: el.E,
		IDeg: el.I.Degrees(), NodeDeg: el.Node.Degrees(), PeriDeg: el.Peri.Degrees(), MDeg: el.M.Degrees(),
		H: el.H, G: el.G,
		Contents: prefix + positionFileSuffix + ": RA[rows], Dec[rows], degrees, ICRS astrometric geocentric",
	}
	if err := writeJSON(prefix+specFileSuffix, spec); err != nil {
		return err
	}
	var places []ephem.Place
	ts, err := timeIt(reps, func() error {
		places = nil
		var err error
		places, err = table(ephem.TableTarget{Elements: &el}, rows, elementsStepDays)
		return err
	})
	if err != nil {
		return err
	}
	ra, dec := make([]float64, rows), make([]float64, rows)
	for i, p := range places {
		ra[i], dec[i] = p.RA.Degrees(), p.Dec.Degrees()
	}
	if err := writeFloats(prefix+positionFileSuffix, ra, dec); err != nil {
		return err
	}
	return finish(result{Case: "elements-table", N: rows, Workers: workers(),
		Note: "ephem.EphemerisTable(element set, geocentre): astrometric and apparent place, elongation, phase, Moon separation, magnitude per row"}, ts)
}

// benchSunMoon times ephem.EphemerisTable for the Sun and for the Moon,
// geocentric, and writes both the astrometric place and the apparent
// direction in GCRS axes (aberration applied, the bias-precession-nutation
// of date undone), which is what astropy's get_body returns.
func benchSunMoon(rows, reps int, prefix string) error {
	spec := tableSpec{
		FromJDUTC: tableStartJD, StepDays: sunMoonStepDays, Rows: rows, Bodies: []string{"sun", "moon"},
		Contents: prefix + positionFileSuffix + ": for the Sun then the Moon: RA, Dec (ICRS astrometric), RA, Dec (GCRS, aberration applied), each [rows], degrees",
	}
	if err := writeJSON(prefix+specFileSuffix, spec); err != nil {
		return err
	}
	var sun, moon []ephem.Place
	ts, err := timeIt(reps, func() error {
		sun, moon = nil, nil
		var err error
		if sun, err = table(ephem.TableTarget{Body: ephem.Sun}, rows, sunMoonStepDays); err != nil {
			return err
		}
		moon, err = table(ephem.TableTarget{Body: ephem.Moon}, rows, sunMoonStepDays)
		return err
	})
	if err != nil {
		return err
	}
	var out [][]float64
	for _, places := range [][]ephem.Place{sun, moon} {
		ra, dec, gra, gdec := make([]float64, rows), make([]float64, rows), make([]float64, rows), make([]float64, rows)
		for i, p := range places {
			ra[i], dec[i] = p.RA.Degrees(), p.Dec.Degrees()
			// the apparent direction of date back in GCRS axes (outside
			// the timing)
			v := astro.BiasPrecessionNutationMatrix(p.TT).T().MulVec(astro.UnitVector(p.RAApp, p.DecApp))
			a, d, _ := astro.Spherical(v)
			gra[i], gdec[i] = a.Normalized().Degrees(), d.Degrees()
		}
		out = append(out, ra, dec, gra, gdec)
	}
	if err := writeFloats(prefix+positionFileSuffix, out...); err != nil {
		return err
	}
	return finish(result{Case: "sun-moon-tables", N: rows, Workers: workers(),
		Note: "two ephem.EphemerisTable calls (Sun, Moon), geocentric, full place per row"}, ts)
}

// workers is the number of goroutines the library's table uses.
func workers() int { return runtime.GOMAXPROCS(0) }
