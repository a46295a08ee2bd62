package ephem

import (
	"errors"
	"fmt"
	"math"
	"testing"

	"arcfit/astro"
)

// TestCrossingsAnalytic checks the root finder on functions whose crossings
// are known exactly (mathematics, not a model): a sine, with its crossings
// of 0.3 A at t0 + P/2π·asin(0.3) and t0 + P/2 − P/2π·asin(0.3) in each
// period; and a parabola that rises above the threshold for only 4 minutes
// between two 10-minute samples, with crossings at tm ± 2 min.
func TestCrossingsAnalytic(t *testing.T) {
	from := astro.NewJD(2461400.5, astro.UTC)
	const period, amp = 0.9, 0.4 // days, radians
	t0 := 0.1234
	sine := func(utc astro.JD) (astro.Angle, error) {
		return astro.Angle(amp * math.Sin(2*math.Pi*(utc.Sub(from)-t0)/period)), nil
	}
	ev, err := Crossings(sine, from, from.AddDays(2), 0.3*amp, DefaultEventStepDays)
	if err != nil {
		t.Fatal(err)
	}
	var want []Event
	d := period / (2 * math.Pi) * math.Asin(0.3)
	for k := -1; k < 3; k++ {
		for _, e := range []Event{{Kind: Rise, Time: from.AddDays(t0 + d + float64(k)*period)}, {Kind: Set, Time: from.AddDays(t0 + period/2 - d + float64(k)*period)}} {
			if x := e.Time.Sub(from); x >= 0 && x <= 2 {
				want = append(want, e)
			}
		}
	}
	sortEvents(want)
	compareEvents(t, "sine", ev, want, 0.05)

	tm := 35.0 / 1440 // between the samples at 30 and 40 minutes
	graze := func(utc astro.JD) (astro.Angle, error) {
		x := (utc.Sub(from) - tm) * 1440          // minutes from the vertex
		return astro.Angle(1e-3 * (4 - x*x)), nil // 0 at ±2 min
	}
	ev, err = Crossings(graze, from, from.AddDays(0.25), 0, DefaultEventStepDays)
	if err != nil {
		t.Fatal(err)
	}
	compareEvents(t, "graze", ev, []Event{
		{Kind: Rise, Time: from.AddDays(tm - 2.0/1440)},
		{Kind: Set, Time: from.AddDays(tm + 2.0/1440)},
	}, 0.05)
}

func compareEvents(t *testing.T, name string, got, want []Event, tolSec float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("Crossings(%s): %d events %v, want %d %v", name, len(got), got, len(want), want)
	}
	for i := range want {
		d := got[i].Time.Sub(want[i].Time) * 86400
		if got[i].Kind != want[i].Kind || math.Abs(d) > tolSec {
			t.Errorf("Crossings(%s)[%d]: %v at %v, want %v at %v (Δ %.3g s; exact root)", name, i, got[i].Kind, got[i].Time, want[i].Kind, want[i].Time, d)
		}
	}
}

// TestCrossingsErrors checks the refusals and that a warning of f comes back
// with the events while an error stops the search.
func TestCrossingsErrors(t *testing.T) {
	from := astro.NewJD(2461400.5, astro.UTC)
	flat := func(astro.JD) (astro.Angle, error) { return 0, nil }
	if _, err := Crossings(flat, from, from.AddDays(-1), 0, 0.01); err == nil {
		t.Error("Crossings with the end before the start: no error")
	}
	tt := astro.NewJD(2461400.5, astro.TT)
	if _, err := Crossings(flat, tt, tt.AddDays(1), 0, 0.01); err == nil {
		t.Error("Crossings on TT dates: no error")
	}
	for _, step := range []float64{0, -1, math.NaN(), math.Inf(1), 1e-9} {
		if _, err := Crossings(flat, from, from.AddDays(1), 0, step); err == nil {
			t.Errorf("Crossings with step %g: no error", step)
		}
	}
	warn := fmt.Errorf("test: %w", astro.ErrStaleTable)
	ramp := func(utc astro.JD) (astro.Angle, error) { return astro.Angle(utc.Sub(from) - 0.5), warn }
	ev, err := Crossings(ramp, from, from.AddDays(1), 0, 0.01)
	if !errors.Is(err, astro.ErrStaleTable) || len(ev) != 1 || math.Abs(ev[0].Time.Sub(from)-0.5)*86400 > 0.05 {
		t.Errorf("Crossings with a warning: %v, %v; want one rise at 0.5 d and the warning", ev, err)
	}
	bad := errors.New("test: broken")
	if _, err := Crossings(func(astro.JD) (astro.Angle, error) { return 0, bad }, from, from.AddDays(1), 0, 0.01); !errors.Is(err, bad) {
		t.Errorf("Crossings with a failing f: %v, want %v", err, bad)
	}
	nanf := func(astro.JD) (astro.Angle, error) { return astro.Angle(math.NaN()), nil }
	if _, err := Crossings(nanf, from, from.AddDays(1), 0, 0.01); err == nil {
		t.Error("Crossings with a NaN f: no error")
	}
	site := astro.Site{Lat: 0.5}
	if _, _, err := RiseSet(Earth, from, from.AddDays(1), Observer{Site: &site}, 0); err == nil {
		t.Error("RiseSet(Earth): no error")
	}
	if _, _, err := RiseSet(Sun, from, from.AddDays(1), Observer{}, 0); err == nil {
		t.Error("RiseSet from the geocentre: no error")
	}
	if _, _, err := Twilights(Twilight(7), from, from.AddDays(1), Observer{Site: &site}); err == nil {
		t.Error("Twilights(7): no error")
	}
	if _, err := Transits(Body(0), from, from.AddDays(1), Observer{Site: &site}); err == nil {
		t.Error("Transits(Body(0)): no error")
	}
}

func BenchmarkCrossingsSun(b *testing.B) {
	b.ReportAllocs()
	site := astro.Site{Lat: astro.AngleFromDegrees(51.72), Lon: astro.AngleFromDegrees(-2.35), HeightM: 180}
	from := astro.NewJD(2461400.5, astro.UTC)
	var sink int
	for b.Loop() {
		ev, _, _ := SunRiseSet(from, from.AddDays(1), Observer{Site: &site})
		sink += len(ev)
	}
	_ = sink
}
