package plan_test

import (
	"errors"
	"math"
	"strings"
	"testing"
	"time"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit"
	"arcfit/fit/plan"
)

// A saved fit is a target.
var _ plan.Target = (*fit.SavedFit)(nil)

// predictOnly hides a target's Positioner, so that Night samples the
// altitude through Predict, and can mark every prediction beyond the
// validity horizon.
type predictOnly struct {
	t            plan.Target
	beyond       bool
	horizonDays  float64
	failAfterUTC float64 // JD; 0 = never fails
}

func (p predictOnly) Predict(utc astro.JD, site *astro.Site) (fit.Prediction, error) {
	if p.failAfterUTC != 0 && utc.Float() > p.failAfterUTC {
		return fit.Prediction{}, errors.New("invented failure: beyond the target's span")
	}
	pr, err := p.t.Predict(utc, site)
	if p.beyond {
		pr.BeyondHorizon, pr.HorizonDays = true, p.horizonDays
	}
	return pr, err
}

// elementsTarget returns an invented element set of night_targets.csv as a
// target.
func elementsTarget(t *testing.T, name string) plan.ElementsTarget {
	t.Helper()
	el, ok := refTargets(t)[name]
	if !ok {
		t.Fatalf("no %s in %s", name, refTargetsFile)
	}
	return plan.ElementsTarget{Elements: el}
}

// alderRidge is the invented site of night_windows.txt.
var alderRidge = astro.Site{Name: "Alder Ridge", Lat: astro.AngleFromDegrees(44.52), Lon: astro.AngleFromDegrees(-72.80), HeightM: 410}

func quietOptions() plan.Options {
	o := plan.DefaultOptions()
	o.NextNights = 0
	return o
}

// TestNightNearSun checks the near-Sun refusal on the night of 2026-04-28 at
// Alder Ridge, where night_windows.txt puts Invented-N1 9.26° from the Sun:
// no rows, the reason and the caution; with AllowNearSun the rows, each
// flagged near the Sun, and the caution still.
func TestNightNearSun(t *testing.T) {
	tg := elementsTarget(t, "Invented-N1")
	d := parseDate(t, "2026-04-28")
	opts := quietOptions()
	opts.Name = "Invented-N1"
	p, err := plan.Night(tg, d, alderRidge, opts)
	if err != nil {
		t.Fatal(err)
	}
	if p.Reason != plan.ReasonNearSun || !p.NearSun || p.Observable || !p.RowsWithheld || p.Rows != nil || p.Best != nil {
		t.Fatalf("reason %v near %v observable %v withheld %v, %d rows; want near_sun, no rows", p.Reason, p.NearSun, p.Observable, p.RowsWithheld, len(p.Rows))
	}
	if !strings.Contains(p.Why, "from the Sun") || len(p.Cautions) != 1 ||
		!strings.Contains(p.Cautions[0], "CAUTION") || !strings.Contains(p.Cautions[0], "blind") || !strings.Contains(p.Cautions[0], "No pointing table") {
		t.Errorf("why %q, cautions %q", p.Why, p.Cautions)
	}
	opts.AllowNearSun = true
	p, err = plan.Night(tg, d, alderRidge, opts)
	if err != nil {
		t.Fatal(err)
	}
	if p.Reason != plan.ReasonNearSun || p.RowsWithheld || len(p.Rows) == 0 || len(p.Cautions) != 1 || !strings.Contains(p.Cautions[0], "CAUTION") {
		t.Fatalf("allowed: reason %v withheld %v, %d rows, cautions %q; want near_sun with rows and the caution", p.Reason, p.RowsWithheld, len(p.Rows), p.Cautions)
	}
	for _, r := range p.Rows {
		if !r.Pointing.NearSun || r.InWindow {
			t.Errorf("row %v: near Sun %v, in window %v; want true, false", timeOf(r.UTC), r.Pointing.NearSun, r.InWindow)
		}
	}
}

// TestNightRows checks the rows of an observable night (Invented-N1 at Alder
// Ridge, 2026-12-11, a window of night_windows.txt): on multiples of the step
// from local midnight in the night's zone, within the dark window, as many as
// fit, marked in the window as the windows say, none higher than the best
// time; the region's size from the ellipse.
func TestNightRows(t *testing.T) {
	tg := elementsTarget(t, "Invented-N1")
	d := parseDate(t, "2026-12-11")
	ny, err := time.LoadLocation("America/New_York")
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		loc  *time.Location
		step time.Duration
	}{{nil, 30 * time.Minute}, {ny, time.Hour}, {ny, 20 * time.Minute}} {
		opts := quietOptions()
		opts.Location, opts.Step = c.loc, c.step
		p, err := plan.Night(tg, d, alderRidge, opts)
		if err != nil {
			t.Fatal(err)
		}
		if !p.Observable || p.Best == nil {
			t.Fatalf("not observable: %s", p.Why)
		}
		loc := p.Sky.Location
		start, end := timeOf(p.Sky.DarkStart).In(loc), timeOf(p.Sky.DarkEnd).In(loc)
		// The rows expected: every multiple of the step after local
		// midnight that falls within the dark window.
		mid := time.Date(start.Year(), start.Month(), start.Day(), 0, 0, 0, 0, loc)
		var want []time.Time
		for tm := mid; !tm.After(end); tm = tm.Add(c.step) {
			if !tm.Before(start) {
				want = append(want, tm)
			}
		}
		if len(p.Rows) != len(want) {
			t.Fatalf("loc %v step %v: %d rows, want %d", loc, c.step, len(p.Rows), len(want))
		}
		for i, r := range p.Rows {
			got := timeOf(r.UTC)
			if d := got.Sub(want[i]); d.Abs() > time.Millisecond {
				t.Errorf("row %d at %v, want %v", i, got.In(loc), want[i])
			}
			in := false
			for _, w := range p.Windows {
				in = in || w.Contains(r.UTC)
			}
			if r.InWindow != in || r.InWindow != (r.Pointing.Alt >= opts.MinAlt) {
				t.Errorf("row %v: in window %v, alt %.2f°; windows %v", got, r.InWindow, r.Pointing.Alt.Degrees(), p.Windows)
			}
			if r.InWindow && r.Pointing.Alt > p.Best.Pointing.Alt {
				t.Errorf("row %v: alt %.4f° above the best's %.4f°", got, r.Pointing.Alt.Degrees(), p.Best.Pointing.Alt.Degrees())
			}
			if r.RegionArcmin != 2*r.Ellipse.SemiMajorArcsec/60 || r.RegionFields != r.RegionArcmin/opts.FOVArcmin {
				t.Errorf("row %v: region %v′, %v fields; ellipse %v", got, r.RegionArcmin, r.RegionFields, r.Ellipse)
			}
		}
	}
}

// TestNightBestPoint checks the numbers at the best time against values
// computed another way: the Moon's separation against ephem.PlaceOfElements
// (its own light-time Moon), the airmass at the altitude, the illuminated
// fraction between that of local midnights either side.
func TestNightBestPoint(t *testing.T) {
	tg := elementsTarget(t, "Invented-N1")
	p, err := plan.Night(tg, parseDate(t, "2026-12-11"), alderRidge, quietOptions())
	if err != nil {
		t.Fatal(err)
	}
	b := p.Best
	site := p.Sky.Site
	pl, err := ephem.PlaceOfElements(tg.Elements, b.UTC, ephem.Observer{Site: &site})
	if err != nil {
		t.Fatal(err)
	}
	// Both from Meeus ch. 47; the two light-time treatments agree to an
	// arcsecond or so (our tolerance, 5″).
	if d := (b.MoonSeparation - pl.MoonSeparation).Arcseconds(); math.Abs(d) > 5 {
		t.Errorf("Moon separation %.4f°, ephem.PlaceOfElements %.4f° (Δ %.1f″)", b.MoonSeparation.Degrees(), pl.MoonSeparation.Degrees(), d)
	}
	// The apparent place: a place of date differs from the ICRS one by the
	// precession since J2000 (50.3″ a year in longitude, common practice),
	// 0.37° in 2026 — more than 0.3°, less than 0.5°.
	if s := astro.Separation(b.RAApp, b.DecApp, b.Prediction.RA, b.Prediction.Dec).Degrees(); s < 0.3 || s > 0.5 {
		t.Errorf("apparent place %.3f° from the astrometric one, want 0.3°–0.5°", s)
	}
	if b.Airmass != astro.AirmassKastenYoung(b.Pointing.Alt) {
		t.Errorf("airmass %v at alt %v", b.Airmass, b.Pointing.Alt.Degrees())
	}
	n2, err := ephem.NightAt(2026, 12, 10, p.Sky.Site, p.Sky.Location) // the midnight before the best time
	if err != nil {
		t.Fatal(err)
	}
	lo, hi := math.Min(p.Sky.MoonIllumination, n2.MoonIllumination), math.Max(p.Sky.MoonIllumination, n2.MoonIllumination)
	if b.MoonIllumination < lo || b.MoonIllumination > hi {
		t.Errorf("Moon illumination %.4f at the best time, outside %.4f–%.4f (the midnights either side; it is waxing)", b.MoonIllumination, lo, hi)
	}
	if !strings.Contains(astro.FormatISO8601(b.UTC, 0), "2026-12-12T04:") {
		t.Errorf("best %s, want about 04:01 UTC (night_windows.txt)", astro.FormatISO8601(b.UTC, 0))
	}
}

// TestNightPredictThroughPredict checks that a target without a Positioner
// (its altitude from Predict) gives the same windows and best time as the
// element set itself (from Position): the place is the same.
func TestNightPredictThroughPredict(t *testing.T) {
	tg := elementsTarget(t, "Invented-H3")
	d := parseDate(t, "2026-12-11")
	a, err := plan.Night(tg, d, alderRidge, quietOptions())
	if err != nil {
		t.Fatal(err)
	}
	b, err := plan.Night(predictOnly{t: tg}, d, alderRidge, quietOptions())
	if err != nil {
		t.Fatal(err)
	}
	if len(a.Windows) != 2 || len(b.Windows) != len(a.Windows) {
		t.Fatalf("windows %v and %v, want two each (night_windows.txt)", a.Windows, b.Windows)
	}
	for i := range a.Windows {
		if d := a.Windows[i].Start.Sub(b.Windows[i].Start) * 86400; math.Abs(d) > 1 {
			t.Errorf("window %d starts %.2f s apart", i, d)
		}
		if d := a.Windows[i].End.Sub(b.Windows[i].End) * 86400; math.Abs(d) > 1 {
			t.Errorf("window %d ends %.2f s apart", i, d)
		}
	}
	if !a.Windows[0].StartsAtDark || a.Windows[0].EndsAtDark || a.Windows[1].StartsAtDark || !a.Windows[1].EndsAtDark {
		t.Errorf("windows %+v: want the first from dusk and the second to dawn", a.Windows)
	}
}

// TestNightCautions checks the validity-horizon caution and the note on a
// region wider than the field, with an invented σ on Invented-N1 and a
// target that says every prediction lies beyond its horizon.
func TestNightCautions(t *testing.T) {
	el := elementsTarget(t, "Invented-N1").Elements
	el.Sigma = &ephem.ElementSigma{A: 0.002, E: 0.0005, I: astro.AngleFromDegrees(0.01), Node: astro.AngleFromDegrees(0.02),
		Peri: astro.AngleFromDegrees(0.05), M: astro.AngleFromDegrees(0.2)}
	tg := predictOnly{t: plan.ElementsTarget{Elements: el}, beyond: true, horizonDays: 1.5}
	opts := quietOptions()
	opts.FOVArcmin = 1
	opts.Step = 2 * time.Hour
	p, err := plan.Night(tg, parseDate(t, "2026-12-11"), alderRidge, opts)
	if err != nil {
		t.Fatal(err)
	}
	if !p.Observable || p.Best.RegionFields <= 1 {
		t.Fatalf("observable %v, region %v fields; want observable, more than one field", p.Observable, p.Best.RegionFields)
	}
	all := strings.Join(p.Cautions, "\n")
	for _, want := range []string{"beyond the fit's validity horizon (1.50 d beyond the arc)", "fields wide", "plan a mosaic"} {
		if !strings.Contains(all, want) {
			t.Errorf("cautions lack %q:\n%s", want, all)
		}
	}
	if strings.Contains(all, "CAUTION") {
		t.Errorf("a near-Sun caution for a target at opposition:\n%s", all)
	}
}

// TestNightPredictionFails checks the reason when the target cannot be
// predicted: no window, no rows, the error in the reason, and the search
// tried and found nothing.
func TestNightPredictionFails(t *testing.T) {
	tg := predictOnly{t: elementsTarget(t, "Invented-N1"), failAfterUTC: 2461380.5}
	opts := plan.DefaultOptions()
	opts.NextNights, opts.SearchNights = 2, 3
	p, err := plan.Night(tg, parseDate(t, "2026-12-11"), alderRidge, opts)
	if err != nil {
		t.Fatal(err)
	}
	if p.Reason != plan.ReasonPredictionFailed || p.Observable || p.Rows != nil || len(p.Windows) != 0 ||
		!strings.Contains(p.Why, "invented failure") || p.SearchedNights != 3 || len(p.NextNights) != 0 {
		t.Errorf("reason %v (%s), %d rows, %d windows, searched %d found %d; want prediction_failed, nothing, 3 and 0",
			p.Reason, p.Why, len(p.Rows), len(p.Windows), p.SearchedNights, len(p.NextNights))
	}
}

// TestOptionsAndDates checks that options out of range and impossible dates
// are refused with a message naming them.
func TestOptionsAndDates(t *testing.T) {
	if err := plan.DefaultOptions().Validate(); err != nil {
		t.Fatalf("defaults: %v", err)
	}
	for _, c := range []struct {
		set  func(*plan.Options)
		want string
	}{
		{func(o *plan.Options) { o.MinAlt = -1 * astro.Degree }, "minimum altitude"},
		{func(o *plan.Options) { o.MinAlt = 90 * astro.Degree }, "minimum altitude"},
		{func(o *plan.Options) { o.MinAlt = astro.Angle(math.NaN()) }, "minimum altitude"},
		{func(o *plan.Options) { o.Step = 0 }, "step"},
		{func(o *plan.Options) { o.Step = 25 * time.Hour }, "step"},
		{func(o *plan.Options) { o.Sigma = 0 }, "σ level"},
		{func(o *plan.Options) { o.FOVArcmin = 0 }, "field of view"},
		{func(o *plan.Options) { o.FOVArcmin = math.Inf(1) }, "field of view"},
		{func(o *plan.Options) { o.NextNights = -1 }, "next nights"},
		{func(o *plan.Options) { o.SearchNights = 61 }, "search over 61 nights"},
	} {
		o := plan.DefaultOptions()
		c.set(&o)
		err := o.Validate()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("Validate() = %v, want an error naming %q", err, c.want)
		}
		if _, err := plan.Night(elementsTarget(t, "Invented-N1"), parseDate(t, "2026-12-11"), alderRidge, o); err == nil {
			t.Errorf("Night with bad options (%s): no error", c.want)
		}
	}
	for _, c := range []struct {
		y, m, d int
		want    string
	}{{2027, 2, 30, "not a date"}, {2027, 13, 1, "not a date"}, {1799, 12, 31, "outside 1800–2200"}, {2201, 1, 1, "outside"}} {
		if _, err := plan.NewDate(c.y, time.Month(c.m), c.d); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("NewDate(%d, %d, %d) = %v, want %q", c.y, c.m, c.d, err, c.want)
		}
	}
	if got := parseDate(t, "2026-12-30").AddDays(3).String(); got != "2027-01-02" {
		t.Errorf("2026-12-30 + 3 d = %s, want 2027-01-02", got)
	}
	bad := alderRidge
	bad.Lat = astro.AngleFromDegrees(95)
	if _, err := plan.Night(elementsTarget(t, "Invented-N1"), parseDate(t, "2026-12-11"), bad, plan.DefaultOptions()); err == nil {
		t.Error("a site at latitude 95°: no error")
	}
	if s := plan.ReasonBelowLimit.String(); s != "below_limit" {
		t.Errorf("ReasonBelowLimit = %q", s)
	}
}
