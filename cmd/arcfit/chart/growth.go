package chart

import (
	"errors"
	"fmt"
	"math"

	"arcfit/astro"
	"arcfit/fit"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Predictor is a fitted model that predicts a place with its covariance:
// *fit.Solution, *fit.OrbitFit, *fit.SavedFit and plan.ElementsTarget are.
type Predictor interface {
	Predict(utc astro.JD, site *astro.Site) (fit.Prediction, error)
}

// Candidate is one model of a comparison, for [GrowthFigure].
type Candidate struct {
	Name   string
	Chosen bool
	Model  Predictor
}

// ComparisonCandidates returns the comparison's fitted models in its order
// (rows that could not be fitted are left out), and its two-body orbit as
// "kepler" when it has one.
func ComparisonCandidates(c *fit.Comparison) []Candidate {
	if c == nil {
		return nil
	}
	var out []Candidate
	for _, r := range c.Rows {
		if r.Solution == nil {
			continue
		}
		name := r.Model
		if len(r.Spec.Knots) > 0 {
			name = r.Spec.String()
		}
		out = append(out, Candidate{Name: name, Chosen: r.Chosen, Model: r.Solution})
	}
	if c.Orbit != nil {
		out = append(out, Candidate{Name: c.Orbit.ModelName(), Chosen: c.Chosen == c.Orbit.ModelName(), Model: c.Orbit})
	}
	return out
}

// GrowthOptions control [GrowthFigure].
type GrowthOptions struct {
	// Site is where the predictions are for (nil: the geocentre).
	Site *astro.Site
	// FromDays and ToDays bound the days after the last observation drawn
	// (log scale); 0 gives 0.05 d (72 min) and 30 d.
	FromDays, ToDays float64
	// HorizonDays, when positive and finite, is the chosen model's validity
	// horizon after the arc, marked; ArcDays, when positive, the arc's
	// length, marked too.
	HorizonDays, ArcDays float64
}

// growthSamples is the number of log-spaced instants of the growth chart.
const growthSamples = 61

// GrowthFigure returns the teaching chart of how the models' predictions
// part beyond the arc: in the upper panel the 3-σ semi-major axis of each
// model's search region against the days after the last observation (last,
// UTC), one line per model, log scales on both axes; in the lower panel the
// distance of each other model's predicted place from the chosen model's,
// with the chosen model's own 3-σ semi-major axis dashed — where a line
// rises above it, the models disagree by more than the chosen one admits.
// Reference lines mark 1′ and 1°, the validity horizon and one arc length.
//
// A model whose prediction fails at an instant has a gap there.
//
// Errors: no candidate; no chosen candidate (the lower panel's reference);
// a bad range of days; no candidate that predicts at all.
func GrowthFigure(models []Candidate, last astro.JD, opts GrowthOptions) (*Figure, error) {
	if len(models) == 0 {
		return nil, errors.New("chart: no models to compare")
	}
	from, to := opts.FromDays, opts.ToDays
	if from == 0 {
		from = 0.05
	}
	if to == 0 {
		to = 30
	}
	if !(from > 0 && to > from) || math.IsInf(to, 0) {
		return nil, fmt.Errorf("chart: days %g to %g after the arc: want 0 < from < to", from, to)
	}
	chosen := -1
	for i, m := range models {
		if m.Chosen {
			chosen = i
		}
	}
	if chosen < 0 {
		return nil, errors.New("chart: no chosen model to compare the others with")
	}
	days := make([]float64, growthSamples)
	for i := range days {
		days[i] = from * math.Pow(to/from, float64(i)/float64(growthSamples-1))
	}
	// preds[m][i] is model m's prediction at days[i]; ok[m][i] whether it
	// succeeded with a finite place and region.
	preds := make([][]fit.Prediction, len(models))
	ok := make([][]bool, len(models))
	any := false
	for m, c := range models {
		preds[m] = make([]fit.Prediction, len(days))
		ok[m] = make([]bool, len(days))
		for i, d := range days {
			p, err := c.Model.Predict(last.AddDays(d), opts.Site)
			a := p.Ellipse(3).SemiMajorArcsec
			ok[m][i] = err == nil && finite(float64(p.RA)) && finite(float64(p.Dec)) && finite(a) && a > 0
			preds[m][i] = p
			any = any || ok[m][i]
		}
	}
	if !any {
		return nil, errors.New("chart: no model predicts beyond the arc")
	}

	top := newPlot("the 3σ search region of each model beyond the arc", "", "3σ semi-major axis (arcsec)")
	bottom := newPlot("how far each model's predicted place lies from "+models[chosen].Name+"'s", "days after the last observation", "offset from "+models[chosen].Name+" (arcsec)")
	// Both axes are logarithmic: the plots hold log10 of the values, on
	// linear axes labelled with the values (gonum/plot's LogScale misplaces
	// the padding of a vertical axis label).
	for _, p := range []*plot.Plot{top, bottom} {
		p.X.Tick.Marker, p.Y.Tick.Marker = logTicks{}, logTicks{}
		// Bottom right: the regions and offsets grow with time, so that
		// corner stays empty.
		p.Legend.Top, p.Legend.Left = false, false
		p.Legend.XOffs, p.Legend.YOffs = -6, 6
	}
	yLo, yHi := math.Inf(1), math.Inf(-1)
	seen := func(v float64) {
		if v > 0 && finite(v) {
			yLo, yHi = math.Min(yLo, v), math.Max(yHi, v)
		}
	}
	oLo, oHi := math.Inf(1), math.Inf(-1)
	for m, c := range models {
		width := vg.Length(1.8)
		if c.Chosen {
			width = 3.2
		}
		ls := lineStyle(modelColour(m), width)
		name := c.Name
		if c.Chosen {
			name += " (chosen)"
		}
		var sig, off []plotter.XYs
		var runS, runO plotter.XYs
		for i, d := range days {
			if !ok[m][i] {
				sig, runS = appendRun(sig, runS), nil
				off, runO = appendRun(off, runO), nil
				continue
			}
			a := preds[m][i].Ellipse(3).SemiMajorArcsec
			runS = append(runS, plotter.XY{X: math.Log10(d), Y: math.Log10(a)})
			seen(a)
			if m != chosen && ok[chosen][i] {
				sep := astro.Separation(preds[m][i].RA, preds[m][i].Dec, preds[chosen][i].RA, preds[chosen][i].Dec).Arcseconds()
				if sep > 0 && finite(sep) {
					runO = append(runO, plotter.XY{X: math.Log10(d), Y: math.Log10(sep)})
					oLo, oHi = math.Min(oLo, sep), math.Max(oHi, sep)
				}
			}
		}
		sig, off = appendRun(sig, runS), appendRun(off, runO)
		lines, err := newLines(sig, ls)
		if err != nil {
			return nil, err
		}
		for _, l := range lines {
			top.Add(l)
		}
		if len(lines) > 0 {
			top.Legend.Add(name, lines[0])
		}
		if m == chosen {
			ref := lineStyle(modelColour(m), 2, 6, 4)
			refs, err := newLines(sig, ref)
			if err != nil {
				return nil, err
			}
			for _, l := range refs {
				bottom.Add(l)
			}
			if len(refs) > 0 {
				bottom.Legend.Add(name+": its own 3σ", refs[0])
			}
			continue
		}
		olines, err := newLines(off, ls)
		if err != nil {
			return nil, err
		}
		for _, l := range olines {
			bottom.Add(l)
		}
		if len(olines) > 0 {
			bottom.Legend.Add(c.Name, olines[0])
		}
	}
	// Both panels share the days; each has its own arcseconds, wide enough
	// for the reference lines near the data.
	yLo, yHi = logRange(yLo, yHi)
	oLo, oHi = logRange(math.Min(oLo, yLo), math.Max(oHi, yHi))
	top.Y.Min, top.Y.Max = math.Log10(yLo), math.Log10(yHi)
	bottom.Y.Min, bottom.Y.Max = math.Log10(oLo), math.Log10(oHi)
	for _, p := range []*plot.Plot{top, bottom} {
		p.X.Min, p.X.Max = math.Log10(from), math.Log10(to)
		for _, ref := range []struct {
			arcsec float64
			label  string
		}{{60, "1′"}, {3600, "1°"}} {
			p.Add(rule{At: math.Log10(ref.arcsec), Style: lineStyle(lightGrey, 1), Label: ref.label, Text: textStyle(noteSize, darkGrey), LabelAtStart: true})
		}
		if h := opts.HorizonDays; h > 0 && finite(h) {
			p.Add(rule{At: math.Log10(h), Vertical: true, Style: lineStyle(black, 1.2, 2, 3),
				Label: fmt.Sprintf("validity horizon %s", dayText(h)), Text: textStyle(noteSize, black)})
		}
		if a := opts.ArcDays; a > 0 && finite(a) {
			p.Add(rule{At: math.Log10(a), Vertical: true, Style: lineStyle(midGrey, 1, 6, 3),
				Label: fmt.Sprintf("one arc length, %s", dayText(a)), Text: textStyle(noteSize, darkGrey), LabelDY: 18})
		}
	}
	return &Figure{Width: 11 * vg.Inch, Height: 8 * vg.Inch, Stacked: true,
		Panels: []Panel{{Plot: top}, {Plot: bottom}}}, nil
}

// ComparisonGrowth returns [GrowthFigure] for the comparison's models after
// its last used observation, with its validity horizon after the arc and
// the arc's length marked, for the site (nil: the geocentre), over 0.05 to
// toDays days (0: 30).
func ComparisonGrowth(c *fit.Comparison, site *astro.Site, toDays float64) (*Figure, error) {
	if c == nil || c.Solution == nil || c.Solution.Track == nil {
		return nil, errors.New("chart: no comparison to draw")
	}
	tr := c.Solution.Track
	var last astro.JD
	var have bool
	for _, p := range tr.Points {
		if p.Used && (!have || last.Before(p.UTC)) {
			last, have = p.UTC, true
		}
	}
	if !have {
		return nil, errors.New("chart: the track has no used observation")
	}
	first, lastT := tr.ArcTT()
	return GrowthFigure(ComparisonCandidates(c), last, GrowthOptions{Site: site, ToDays: toDays,
		HorizonDays: c.HorizonAfterDays, ArcDays: lastT - first})
}

// appendRun adds a run of points to the runs when it can make a line.
func appendRun(runs []plotter.XYs, run plotter.XYs) []plotter.XYs {
	if len(run) >= 2 {
		runs = append(runs, run)
	}
	return runs
}

// newLines returns one line of style ls for each run.
func newLines(runs []plotter.XYs, ls draw.LineStyle) ([]*plotter.Line, error) {
	var out []*plotter.Line
	for _, r := range runs {
		l, err := plotter.NewLine(r)
		if err != nil {
			return nil, err
		}
		l.LineStyle = ls
		out = append(out, l)
	}
	return out, nil
}

// logRange widens [lo, hi] to whole decades, at least two, about the data
// (1″ to 100″ when there are none).
func logRange(lo, hi float64) (float64, float64) {
	if !(lo > 0) || !(hi >= lo) || math.IsInf(hi, 0) {
		return 1, 100
	}
	l, h := math.Floor(math.Log10(lo)), math.Ceil(math.Log10(hi))
	if h-l < 2 {
		h = l + 2
	}
	return math.Pow(10, l), math.Pow(10, h)
}

// dayText formats days for a label: "5.2 h" below a day, "3.1 d" beyond.
func dayText(d float64) string {
	if d < 1 {
		return fmt.Sprintf("%.2g h", d*24)
	}
	return fmt.Sprintf("%.3g d", d)
}

// logTicks marks an axis that holds log10 of its values: labels at each
// power of ten, and at 2 and 5 times it when the range spans fewer than
// three decades, with minor ticks at the other integers times it.
type logTicks struct{}

// Ticks implements plot.Ticker; min and max are log10 of the values.
func (logTicks) Ticks(min, max float64) []plot.Tick {
	if !(max > min) || math.IsInf(max-min, 0) {
		return nil
	}
	few := max-min < 3
	var out []plot.Tick
	for e := math.Floor(min); e <= math.Ceil(max); e++ {
		for m := 1; m < 10; m++ {
			x := e + math.Log10(float64(m))
			if x < min-1e-9 || x > max+1e-9 {
				continue
			}
			t := plot.Tick{Value: x}
			if m == 1 || (few && (m == 2 || m == 5)) {
				t.Label = logLabel(float64(m) * math.Pow(10, e))
			}
			out = append(out, t)
		}
	}
	return out
}

// logLabel formats a tick of a log axis: 0.01, 0.5, 1, 20, 1000, 1e+05.
func logLabel(v float64) string {
	if v >= 1e5 || v < 1e-3 {
		return fmt.Sprintf("%.0e", v)
	}
	return fmt.Sprintf("%g", v)
}
