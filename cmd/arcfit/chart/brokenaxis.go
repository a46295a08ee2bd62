package chart

import (
	"fmt"
	"math"
	"sort"

	"arcfit/astro"

	"gonum.org/v1/plot"
)

// brokenTime is a time axis broken between nights: the observations of a
// few nights spread over days would sit in narrow clumps on a continuous
// axis, so each run of instants without a gap longer than breakHours gets
// its own stretch of the axis, in hours, and the stretches follow each
// other with a fixed gap between them. Within a stretch time runs at the
// same rate as in every other, so slopes compare between nights.
type brokenTime struct {
	segs []timeSeg
	gap  float64 // hours of axis between stretches
}

// timeSeg is one stretch: UTC instants from (seconds since 1970) to to,
// drawn from axis value at on.
type timeSeg struct {
	from, to float64
	at       float64
}

// breakHours is the gap between instants that breaks the axis.
const breakHours = 6

// newBrokenTime returns the axis of the instants ts (any order), each
// stretch padded by a tenth of its length, at least 10 minutes, each side.
func newBrokenTime(ts []astro.JD) brokenTime {
	s := make([]float64, 0, len(ts))
	for _, t := range ts {
		if v := axisSeconds(t); finite(v) {
			s = append(s, v)
		}
	}
	sort.Float64s(s)
	var b brokenTime
	if len(s) == 0 {
		return b
	}
	start := s[0]
	for i := 1; i <= len(s); i++ {
		if i < len(s) && s[i]-s[i-1] <= breakHours*3600 {
			continue
		}
		end := s[i-1]
		pad := math.Max(0.1*(end-start), 600)
		b.segs = append(b.segs, timeSeg{from: start - pad, to: end + pad})
		if i < len(s) {
			start = s[i]
		}
	}
	var total float64
	for _, g := range b.segs {
		total += (g.to - g.from) / 3600
	}
	b.gap = math.Max(0.08*total, 0.25)
	at := 0.0
	for i := range b.segs {
		b.segs[i].at = at
		at += (b.segs[i].to-b.segs[i].from)/3600 + b.gap
	}
	return b
}

// x returns the axis value of the UTC instant t (NaN outside every
// stretch).
func (b brokenTime) x(t astro.JD) float64 {
	v := axisSeconds(t)
	for _, g := range b.segs {
		if v >= g.from && v <= g.to {
			return g.at + (v-g.from)/3600
		}
	}
	return math.NaN()
}

// span returns the axis's range.
func (b brokenTime) span() (lo, hi float64) {
	if len(b.segs) == 0 {
		return 0, 1
	}
	g := b.segs[len(b.segs)-1]
	return 0, g.at + (g.to-g.from)/3600
}

// breaks returns the axis values at the middle of each gap and the time
// that passes across it, in days.
func (b brokenTime) breaks() (at, days []float64) {
	for i := 1; i < len(b.segs); i++ {
		p, q := b.segs[i-1], b.segs[i]
		at = append(at, p.at+(p.to-p.from)/3600+b.gap/2)
		days = append(days, (q.from-p.to)/86400)
	}
	return at, days
}

// Ticks implements plot.Ticker: in each stretch, ticks at round UTC times
// (every 10 min to 6 h, the step that gives two to four labels in the
// shortest stretch), the first labelled with its date below the time.
func (b brokenTime) Ticks(_, _ float64) []plot.Tick {
	if len(b.segs) == 0 {
		return nil
	}
	shortest := math.Inf(1)
	for _, g := range b.segs {
		shortest = math.Min(shortest, g.to-g.from)
	}
	steps := []float64{600, 900, 1800, 3600, 7200, 10800, 21600}
	step := steps[len(steps)-1]
	for _, s := range steps {
		if shortest/s <= 4 {
			step = s
			break
		}
	}
	minor := step / 2
	var ticks []plot.Tick
	for _, g := range b.segs {
		first := true
		for v := math.Ceil(g.from/minor) * minor; v <= g.to; v += minor {
			x := g.at + (v-g.from)/3600
			q := v / step
			if math.Abs(q-math.Round(q)) > 1e-9 {
				ticks = append(ticks, plot.Tick{Value: x})
				continue
			}
			t := axisTime(v)
			lab := t.Format("15:04")
			if first {
				lab += "\n" + t.Format("Jan 2")
				first = false
			} else {
				lab += "\n "
			}
			ticks = append(ticks, plot.Tick{Value: x, Label: lab})
		}
	}
	return ticks
}

// gapLabel says how much time a break hides: "1.6 d later", "14 h later".
func gapLabel(days float64) string {
	if days < 1 {
		return fmt.Sprintf("%.0f h later", days*24)
	}
	return fmt.Sprintf("%.1f d later", days)
}
