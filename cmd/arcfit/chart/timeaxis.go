package chart

import (
	"math"
	"time"

	"arcfit/astro"

	"gonum.org/v1/plot"
)

// unixEpochJD is the Julian date of 1970-01-01T00:00:00 UTC, the origin of
// the time axes (the Unix epoch; by definition).
const unixEpochJD = 2440587.5

// axisSeconds returns the UTC instant t as seconds since 1970-01-01 UTC, the
// value the time axes plot (leap seconds are not counted, as in Unix time).
func axisSeconds(t astro.JD) float64 {
	return ((t.Day - unixEpochJD) + t.Frac) * 86400
}

// axisTime returns the instant of an axis value, in UTC.
func axisTime(s float64) time.Time {
	sec := math.Floor(s)
	return time.Unix(int64(sec), int64((s-sec)*1e9)).UTC()
}

// timeSteps are the candidate intervals between labelled ticks and the
// number of minor intervals each is divided into.
var timeSteps = []struct {
	step  time.Duration
	minor int
}{
	{10 * time.Minute, 2}, {15 * time.Minute, 3}, {30 * time.Minute, 3},
	{time.Hour, 4}, {2 * time.Hour, 2}, {3 * time.Hour, 3}, {6 * time.Hour, 6},
	{12 * time.Hour, 2}, {24 * time.Hour, 4}, {48 * time.Hour, 2},
	{5 * 24 * time.Hour, 5}, {10 * 24 * time.Hour, 2}, {20 * 24 * time.Hour, 2},
	{50 * 24 * time.Hour, 5}, {100 * 24 * time.Hour, 2},
}

// timeTicks marks a UTC time axis (values from axisSeconds) at round
// intervals counted from UTC midnight: hours and minutes for steps shorter
// than a day (with the date at each UTC midnight when the span is longer
// than a day), "Jan 2" for longer steps. With Local set, each label of a
// step shorter than a day has a second line with the local time.
type timeTicks struct {
	// MaxLabels is the most labelled ticks wanted (the step is the
	// shortest that gives no more); 0 means 10.
	MaxLabels int
	Local     *time.Location
}

// Ticks returns the ticks in [min, max].
func (tt timeTicks) Ticks(min, max float64) []plot.Tick {
	if !(max > min) || math.IsInf(max-min, 0) {
		return nil
	}
	most := tt.MaxLabels
	if most <= 0 {
		most = 10
	}
	span := max - min
	k := len(timeSteps) - 1
	for i, s := range timeSteps {
		if span/s.step.Seconds() <= float64(most) {
			k = i
			break
		}
	}
	step := timeSteps[k].step.Seconds()
	minor := step / float64(timeSteps[k].minor)
	long := step >= 86400
	multiDay := span > 86400
	var ticks []plot.Tick
	for v := math.Ceil(min/minor) * minor; v <= max+1e-6; v += minor {
		// Major ticks at multiples of step counted from UTC midnight (which
		// is a multiple of every step shorter than a day).
		q := v / step
		if math.Abs(q-math.Round(q)) > 1e-6 {
			ticks = append(ticks, plot.Tick{Value: v})
			continue
		}
		t := axisTime(v)
		var label string
		switch {
		case long:
			label = t.Format("Jan 2")
		case multiDay && t.Hour() == 0 && t.Minute() == 0:
			label = t.Format("Jan 2")
		default:
			label = t.Format("15:04")
		}
		if tt.Local != nil && !long {
			label += "\n" + t.In(tt.Local).Format("15:04")
		}
		ticks = append(ticks, plot.Tick{Value: v, Label: label})
	}
	return ticks
}
