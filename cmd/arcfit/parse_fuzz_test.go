package main

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
	"time"

	"arcfit/astro"
	"arcfit/fit/simulate"
)

// The fuzzers of this file hold the option readers of the commands to their
// promises: an error is a usage error (exit code 2) on one line; an accepted
// value is in range, finite, and written back in the option's own syntax it
// reads back the same.

// checkUsage checks that err is a *usageError with a message: run prints
// it on one line (oneLine folds any line break the user's text brought in,
// as a step of "\n1ms" does), and that line must say something.
func checkUsage(t *testing.T, what string, err error) {
	t.Helper()
	var ue *usageError
	if !errors.As(err, &ue) {
		t.Fatalf("%s: error %T %v is not a usage error", what, err, err)
	}
	if msg := oneLine(err.Error()); msg == "" || strings.ContainsAny(msg, "\n\r") {
		t.Fatalf("%s: error %q prints as %q", what, err.Error(), msg)
	}
}

// FuzzParseStep reads --step and --cadence values: an accepted step is
// positive and its Go duration text (time.Duration.String) reads back as
// the same step.
func FuzzParseStep(f *testing.F) {
	for _, s := range []string{"30m", "1d", "0.5d", "2d12h", "90s", "500ms", "1h30m", "0", "-1h", "1e5d", "99999.9d", "d", "1dd", "0x1p3d", "NaNd", " 6h ", "1d-25h"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		d, err := parseStep(s)
		if err != nil {
			checkUsage(t, fmt.Sprintf("parseStep(%q)", s), err)
			return
		}
		if d <= 0 {
			t.Fatalf("parseStep(%q) = %v, want > 0", s, d)
		}
		again, err := parseStep(d.String())
		if err != nil || again != d {
			t.Fatalf("parseStep(%q) = %v, but parseStep(%q) = %v, %v", s, d, d.String(), again, err)
		}
	})
}

// instantInRange reports whether j is a UTC instant of 1800–2200 with its
// fraction in [0, 1).
func instantInRange(j astro.JD) bool {
	f := j.Float()
	return j.Scale == astro.UTC && f >= minInstantJD && f < maxInstantJD && j.Frac >= 0 && j.Frac < 1 && !math.IsNaN(j.Day)
}

// FuzzParseInstant reads --at and --to values: an accepted instant is UTC
// within 1800–2200, and written back in ISO 8601 (to 1 ns) reads back within
// 1 ns; a Julian date written back with its JD prefix reads back within the
// resolution of the decimal (1e-9 d).
func FuzzParseInstant(f *testing.F) {
	for _, s := range []string{"2027-02-09T04:00:00Z", "JD 2461445.66667", "jd2461445.5", "2461445.5", "2016-12-31T23:59:60Z", "1800-01-01T00:00:00Z",
		"2200-01-01T00:00:00Z", "2199-12-31T23:59:59.999999999Z", "JD 1e7", "JD NaN", "JD -0", " 2027-02-09T04:00:00+01:00 ", "2027-02-09T04:00:00"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		j, err := parseInstant("--at", s)
		if err != nil {
			checkUsage(t, fmt.Sprintf("parseInstant(%q)", s), err)
			return
		}
		if !instantInRange(j) {
			t.Fatalf("parseInstant(%q) = %+v outside 1800–2200 UTC", s, j)
		}
		text := astro.FormatISO8601(j, 9)
		back, err := parseInstant("--at", text)
		if err != nil {
			// Rounding to 1 ns may carry the last nanosecond of 2199 into 2200.
			if strings.HasPrefix(text, "2200-01-01T00:00:00") {
				return
			}
			t.Fatalf("parseInstant(%q) = %+v, written back as %q: %v", s, j, text, err)
		}
		if d := back.Sub(j) * astro.SecondsPerDay; math.Abs(d) > 0.5e-9+1e-10 {
			t.Fatalf("parseInstant(%q) = %+v, written back as %q: Δ %.3g s", s, j, text, d)
		}
		jd := fmt.Sprintf("JD %.9f", j.Float())
		if back, err = parseInstant("--to", jd); err != nil {
			if strings.HasPrefix(jd, fmt.Sprintf("JD %.9f", maxInstantJD)) {
				return
			}
			t.Fatalf("parseInstant(%q) = %+v, written back as %q: %v", s, j, jd, err)
		}
		if d := math.Abs(back.Sub(j)); d > 1e-9 {
			t.Fatalf("parseInstant(%q) = %+v, written back as %q: Δ %.3g d", s, j, jd, d)
		}
	})
}

// FuzzParseTimeFlag reads ephem's --from and --to: an accepted time is UTC,
// and written back in ISO 8601 reads back within 1 ns.
func FuzzParseTimeFlag(f *testing.F) {
	for _, s := range []string{"2027-02-01T00:00:00Z", "2027-02-01T00:00:00", "2016-12-31T23:59:60Z", "JD 2461445.5", " 2027-02-01T00:00Z "} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		j, err := parseTimeFlag("--from", s)
		if err != nil {
			checkUsage(t, fmt.Sprintf("parseTimeFlag(%q)", s), err)
			return
		}
		if j.Scale != astro.UTC || !(j.Frac >= 0 && j.Frac < 1) {
			t.Fatalf("parseTimeFlag(%q) = %+v", s, j)
		}
		text := astro.FormatISO8601(j, 9)
		if text[0] == '+' || text[0] == '-' {
			return // outside years 0000–9999 after rounding
		}
		back, err := parseTimeFlag("--from", text)
		if err != nil {
			t.Fatalf("parseTimeFlag(%q) = %+v, written back as %q: %v", s, j, text, err)
		}
		if d := back.Sub(j) * astro.SecondsPerDay; math.Abs(d) > 0.5e-9+1e-10 {
			t.Fatalf("parseTimeFlag(%q) written back as %q: Δ %.3g s", s, text, d)
		}
	})
}

// FuzzParseNightDate reads --date, and simulate's --nights list: an accepted
// date lies in 1800–2200 and written back as YYYY-MM-DD reads back the
// same; the nights of a list are distinct, at most simulate.MaxNights.
func FuzzParseNightDate(f *testing.F) {
	for _, s := range []string{"2027-02-20", " 2027-02-20 ", "1800-01-01", "2200-12-31", "2201-01-01", "1799-12-31", "2027-02-29", "2027-2-3", "2027-02-20,2027-02-21", "2027-02-20,2027-02-20", ",", ""} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		d, err := parseNightDate(s)
		if err != nil {
			checkUsage(t, fmt.Sprintf("parseNightDate(%q)", s), err)
		} else {
			if d.Year < 1800 || d.Year > 2200 || d.Month < 1 || d.Month > 12 || d.Day < 1 || d.Day > 31 {
				t.Fatalf("parseNightDate(%q) = %+v", s, d)
			}
			text := fmt.Sprintf("%04d-%02d-%02d", d.Year, int(d.Month), d.Day)
			if back, err := parseNightDate(text); err != nil || back != d {
				t.Fatalf("parseNightDate(%q) = %+v, written back as %q: %+v, %v", s, d, text, back, err)
			}
		}
		nights, err := simulateNights(simulateOptions{nights: s, changed: map[string]bool{}})
		if err != nil {
			checkUsage(t, fmt.Sprintf("simulateNights(%q)", s), err)
			return
		}
		if len(nights) == 0 || len(nights) > simulate.MaxNights {
			t.Fatalf("simulateNights(%q): %d nights", s, len(nights))
		}
		seen := map[string]bool{}
		for _, n := range nights {
			k := fmt.Sprint(n)
			if seen[k] || n.Year < 1800 || n.Year > 2200 {
				t.Fatalf("simulateNights(%q): night %v repeated or out of range", s, n)
			}
			seen[k] = true
		}
	})
}

// FuzzNightLocation reads --tz: an accepted zone is a location, an error a
// one-line usage error. The zone database is the system's (time.LoadLocation
// refuses names that climb out of it).
func FuzzNightLocation(f *testing.F) {
	for _, s := range []string{"", "UTC", "Europe/Paris", "America/Denver", "Local", "Nowhere/Atlantis", "../etc/passwd", "/etc/localtime", "Etc/GMT+12", "Pacific/Kiritimati", " UTC "} {
		f.Add(s)
	}
	site := astro.Site{Lat: astro.AngleFromDegrees(44.5), Lon: astro.AngleFromDegrees(-179.99)}
	f.Fuzz(func(t *testing.T, s string) {
		loc, err := nightLocation(s, &site)
		if err != nil {
			checkUsage(t, fmt.Sprintf("nightLocation(%q)", s), err)
			return
		}
		if loc == nil {
			t.Fatalf("nightLocation(%q): no location and no error", s)
		}
		_, off := time.Date(2027, 2, 20, 12, 0, 0, 0, loc).Zone()
		if off < -15*3600 || off > 15*3600 {
			t.Fatalf("nightLocation(%q): offset %d s", s, off)
		}
	})
}

// FuzzPredictTimes reads predict's --at list, or --at, --to and --step: the
// instants asked for are in range, at most maxPredictRows, and a range runs
// forward from --at by the step.
func FuzzPredictTimes(f *testing.F) {
	for _, c := range [][3]string{
		{"2027-02-09T04:00:00Z", "", ""}, {"2027-02-09T04:00:00Z,JD 2461445.5", "", ""}, {"2027-02-09T00:00:00Z", "2027-02-10T00:00:00Z", "1h"},
		{"2027-02-09T00:00:00Z", "2027-02-09T00:00:00Z", "1s"}, {"2016-12-31T23:59:00Z", "2017-01-01T00:01:00Z", "30s"}, {"2027-02-09T00:00:00Z", "2028-02-09T00:00:00Z", "1ms"},
		{"2027-02-10T00:00:00Z", "2027-02-09T00:00:00Z", "1h"}, {"a,b", "", ""}, {"", "", ""}, {"2027-02-09T00:00:00Z", "", "1h"},
	} {
		f.Add(c[0], c[1], c[2])
	}
	f.Fuzz(func(t *testing.T, at, to, step string) {
		ts, err := predictTimes(predictOptions{at: at, to: to, step: step})
		if err != nil {
			checkUsage(t, fmt.Sprintf("predictTimes(%q, %q, %q)", at, to, step), err)
			return
		}
		if len(ts) == 0 || len(ts) > maxPredictRows {
			t.Fatalf("predictTimes(%q, %q, %q): %d instants", at, to, step, len(ts))
		}
		for i, j := range ts {
			if !instantInRange(j) {
				t.Fatalf("predictTimes(%q, %q, %q): instant %d %+v out of range", at, to, step, i, j)
			}
			if to != "" && i > 0 && !(j.Sub(ts[i-1]) > 0) {
				t.Fatalf("predictTimes(%q, %q, %q): instant %d %+v not after %+v", at, to, step, i, j, ts[i-1])
			}
		}
	})
}
