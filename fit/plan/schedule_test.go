package plan_test

import (
	"errors"
	"math"
	"reflect"
	"sort"
	"strings"
	"testing"
	"time"

	"arcfit/astro"
	"arcfit/fit"
	"arcfit/fit/plan"
)

// item returns a schedule item that loads target tg under name.
func item(name string, tg plan.Target) plan.ScheduleItem {
	return plan.ScheduleItem{Name: name, Source: "targets.txt:" + name,
		Load: func() (plan.LoadedTarget, error) { return plan.LoadedTarget{Target: tg, Model: "elements"}, nil }}
}

// failing returns a schedule item whose load fails.
func failing(name string) plan.ScheduleItem {
	return plan.ScheduleItem{Name: name, Source: "targets.txt:9",
		Load: func() (plan.LoadedTarget, error) {
			return plan.LoadedTarget{}, errors.New("open missing.csv: no such file or directory")
		}}
}

// refSlot is the slot rule of ScheduleNight applied to the reference: a span
// of d centred on best, moved into the window holding best, the whole window
// when shorter.
func refSlot(best time.Time, windows [][2]time.Time, d time.Duration) [2]time.Time {
	for _, w := range windows {
		if best.Before(w[0]) || best.After(w[1]) {
			continue
		}
		if w[1].Sub(w[0]) <= d {
			return w
		}
		s := best.Add(-d / 2)
		if s.Before(w[0]) {
			s = w[0]
		}
		if s.Add(d).After(w[1]) {
			s = w[1].Add(-d)
		}
		return [2]time.Time{s, s.Add(d)}
	}
	return [2]time.Time{}
}

// TestScheduleAgainstAstropy schedules the three invented targets at Alder
// Ridge on 2026-10-15, listed out of order and with a target whose file is
// missing, and checks against the astropy reference (night_windows.txt):
// the order by best time, the best times within the 2 minutes, the
// slots (the rule of ScheduleNight applied to the reference's windows and
// best times) within agreeTol, and the conflicts: exactly the pairs whose
// reference slots overlap. The missing target is reported, the others
// scheduled all the same.
func TestScheduleAgainstAstropy(t *testing.T) {
	ref := readReference(t)
	names := []string{"Invented-H3", "Invented-N1", "Invented-P2"}
	items := []plan.ScheduleItem{item(names[0], elementsTarget(t, names[0])), failing("missing.csv"),
		item(names[1], elementsTarget(t, names[1])), item(names[2], elementsTarget(t, names[2]))}
	opts := plan.DefaultScheduleOptions()
	s, err := plan.ScheduleNight(items, parseDate(t, "2026-10-15"), alderRidge, opts)
	if err != nil {
		t.Fatal(err)
	}
	type want struct {
		name string
		best time.Time
		slot [2]time.Time
	}
	var wants []want
	for _, c := range ref.cases {
		if c.site == "Alder_Ridge" && c.date == "2026-10-15" && c.minAlt == 25 {
			if c.state != "observable" {
				t.Fatalf("reference: %s is %s", c.target, c.state)
			}
			wants = append(wants, want{c.target, c.best, refSlot(c.best, c.windows, opts.Slot)})
		}
	}
	sort.Slice(wants, func(i, j int) bool { return wants[i].best.Before(wants[j].best) })
	if len(wants) != 3 {
		t.Fatalf("reference: %d cases, want 3", len(wants))
	}
	sc, no, failed := s.Counts()
	if sc != 3 || no != 0 || failed != 1 || len(s.Entries) != 4 {
		t.Fatalf("counts %d scheduled, %d not observable, %d failed of %d; want 3, 0, 1 of 4", sc, no, failed, len(s.Entries))
	}
	for k, w := range wants {
		e := s.Entries[k]
		if e.Name != w.name || e.Status != plan.Scheduled {
			t.Fatalf("entry %d: %s (%v), want %s scheduled (by the reference's best times)", k, e.Name, e.Status, w.name)
		}
		if d := timeOf(e.Plan.Best.UTC).Sub(w.best); d.Abs() > windowTol {
			t.Errorf("%s: best %v, reference %v (Δ %v)", w.name, timeOf(e.Plan.Best.UTC), w.best, d)
		}
		for i, end := range []astro.JD{e.Slot.Start, e.Slot.End} {
			if d := timeOf(end).Sub(w.slot[i]); d.Abs() > agreeTol {
				t.Errorf("%s: slot end %d at %v, from the reference %v (Δ %v)", w.name, i, timeOf(end), w.slot[i], d)
			}
		}
		if got := e.Slot.End.Sub(e.Slot.Start) * 86400; got > opts.Slot.Seconds()+1e-3 {
			t.Errorf("%s: slot of %.0f s, longer than %v", w.name, got, opts.Slot)
		}
	}
	// The conflicts of the reference slots; each a clear overlap or a clear
	// gap (more than agreeTol), so the comparison is not a matter of seconds.
	wantPairs := map[[2]string]bool{}
	for i := range wants {
		for j := i + 1; j < len(wants); j++ {
			a, b := wants[i].slot, wants[j].slot
			end, start := a[1], a[0]
			if b[1].Before(end) {
				end = b[1]
			}
			if b[0].After(start) {
				start = b[0]
			}
			overlap := end.Sub(start)
			if overlap.Abs() < agreeTol {
				t.Fatalf("reference slots of %s and %s touch within %v: not a test", wants[i].name, wants[j].name, agreeTol)
			}
			if overlap > 0 {
				wantPairs[[2]string{wants[i].name, wants[j].name}] = true
			}
		}
	}
	if len(wantPairs) == 0 {
		t.Fatal("the reference gives no conflict on this night: not a test of conflicts")
	}
	gotPairs := map[[2]string]bool{}
	for _, c := range s.Conflicts {
		a, b := s.Entry(c.A), s.Entry(c.B)
		gotPairs[[2]string{a.Name, b.Name}] = true
		if !containsInt(a.Conflicts, c.B) || !containsInt(b.Conflicts, c.A) {
			t.Errorf("conflict %s–%s not listed on both entries", a.Name, b.Name)
		}
		if !c.Start.Before(c.End) || c.Start.Before(a.Slot.Start) || c.Start.Before(b.Slot.Start) || a.Slot.End.Before(c.End) || b.Slot.End.Before(c.End) {
			t.Errorf("conflict %s–%s: overlap %v–%v not within both slots", a.Name, b.Name, timeOf(c.Start), timeOf(c.End))
		}
	}
	if !reflect.DeepEqual(gotPairs, wantPairs) {
		t.Errorf("conflicts %v, from the reference %v", gotPairs, wantPairs)
	}
	f := s.Entries[3]
	if f.Status != plan.Failed || f.Index != 1 || f.Name != "missing.csv" || f.Plan != nil || f.Err == nil ||
		!strings.Contains(f.Err.Error(), "missing.csv") || f.Source != "targets.txt:9" {
		t.Errorf("failed entry %+v", f)
	}
}

func containsInt(xs []int, x int) bool {
	for _, v := range xs {
		if v == x {
			return true
		}
	}
	return false
}

// TestScheduleNotObservable checks a night on which no target can be
// observed (Alder Ridge, 2026-04-28): each entry NotObservable with the
// reference's state as its reason, in list order, the near-Sun target with
// the caution and no pointing, no conflicts.
func TestScheduleNotObservable(t *testing.T) {
	ref := readReference(t)
	states := map[string]string{}
	for _, c := range ref.cases {
		if c.site == "Alder_Ridge" && c.date == "2026-04-28" && c.minAlt == 25 {
			states[c.target] = c.state
		}
	}
	names := []string{"Invented-P2", "Invented-N1", "Invented-H3"}
	var items []plan.ScheduleItem
	for _, n := range names {
		items = append(items, item(n, elementsTarget(t, n)))
	}
	s, err := plan.ScheduleNight(items, parseDate(t, "2026-04-28"), alderRidge, plan.DefaultScheduleOptions())
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Conflicts) != 0 {
		t.Errorf("conflicts %v, want none", s.Conflicts)
	}
	for k, e := range s.Entries {
		if e.Name != names[k] || e.Status != plan.NotObservable || e.Plan.Reason.String() != states[e.Name] || e.Plan.Why == "" {
			t.Errorf("entry %d: %s %v %v (%q); want %s not observable, %s", k, e.Name, e.Status, e.Plan.Reason, e.Plan.Why, names[k], states[names[k]])
		}
		nearSun := states[e.Name] == "near_sun"
		caution := len(e.Plan.Cautions) > 0 && strings.HasPrefix(e.Plan.Cautions[0], "CAUTION") && strings.Contains(e.Plan.Cautions[0], "blind")
		if nearSun != caution || (nearSun && (e.Plan.Best != nil || len(e.Plan.Rows) != 0)) {
			t.Errorf("%s (%s): caution %v, best %v, %d rows", e.Name, states[e.Name], e.Plan.Cautions, e.Plan.Best, len(e.Plan.Rows))
		}
	}
}

// noMag hides a target's magnitude.
type noMag struct{ t plan.Target }

func (n noMag) Predict(utc astro.JD, site *astro.Site) (fit.Prediction, error) {
	p, err := n.t.Predict(utc, site)
	p.Mag = math.NaN()
	return p, err
}

// TestScheduleLimitMagAndWorkers checks the magnitude flag (an entry is
// Fainter exactly when its magnitude at the best time is known and above the
// limit; one without a magnitude is never flagged) with a limit between the
// targets' magnitudes, so that both outcomes occur; and that the schedule is
// the same with one worker and with four.
func TestScheduleLimitMagAndWorkers(t *testing.T) {
	var items []plan.ScheduleItem
	for _, n := range []string{"Invented-N1", "Invented-P2", "Invented-H3"} {
		items = append(items, item(n, elementsTarget(t, n)))
	}
	items = append(items, item("no-mag", noMag{elementsTarget(t, "Invented-N1")}))
	d := parseDate(t, "2026-12-11")
	opts := plan.DefaultScheduleOptions()
	opts.Workers = 1
	one, err := plan.ScheduleNight(items, d, alderRidge, opts)
	if err != nil {
		t.Fatal(err)
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, e := range one.Entries {
		if e.Status == plan.Scheduled && e.MagKnown {
			lo, hi = math.Min(lo, e.Plan.Best.Prediction.Mag), math.Max(hi, e.Plan.Best.Prediction.Mag)
		}
	}
	if !(hi-lo > 0.2) {
		t.Fatalf("magnitudes %v to %v: want a spread to put the limit in", lo, hi)
	}
	opts.LimitMag, opts.Workers = (lo+hi)/2, 4
	four, err := plan.ScheduleNight(items, d, alderRidge, opts)
	if err != nil {
		t.Fatal(err)
	}
	var fainter, brighter int
	for _, e := range four.Entries {
		if e.Status != plan.Scheduled {
			t.Fatalf("%s: %v, want scheduled (all four are observable on this night)", e.Name, e.Status)
		}
		m := e.Plan.Best.Prediction.Mag
		want := !math.IsNaN(m) && m > opts.LimitMag
		if e.Fainter != want || e.MagKnown == math.IsNaN(m) {
			t.Errorf("%s: mag %.2f against %.2f: Fainter %v, MagKnown %v", e.Name, m, opts.LimitMag, e.Fainter, e.MagKnown)
		}
		if e.Fainter {
			fainter++
		} else if e.MagKnown {
			brighter++
		}
	}
	if fainter == 0 || brighter == 0 {
		t.Errorf("%d fainter, %d brighter: want both", fainter, brighter)
	}
	if len(one.Entries) != len(four.Entries) || !reflect.DeepEqual(one.Conflicts, four.Conflicts) {
		t.Fatalf("one worker: %d entries, conflicts %v; four: %d, %v", len(one.Entries), one.Conflicts, len(four.Entries), four.Conflicts)
	}
	for k := range one.Entries {
		a, b := one.Entries[k], four.Entries[k]
		if a.Index != b.Index || a.Name != b.Name || a.Slot != b.Slot || a.Plan.Best.UTC != b.Plan.Best.UTC || !reflect.DeepEqual(a.Conflicts, b.Conflicts) {
			t.Errorf("entry %d: one worker %s %v %v, four %s %v %v", k, a.Name, a.Slot, a.Conflicts, b.Name, b.Slot, b.Conflicts)
		}
	}
	// The same target listed twice conflicts with itself over its whole slot.
	if c := one.Conflicts; len(c) == 0 {
		t.Errorf("Invented-N1 and its copy without magnitude: no conflict")
	}
}

// TestScheduleOptions checks the options' ranges.
func TestScheduleOptions(t *testing.T) {
	if err := plan.DefaultScheduleOptions().Validate(); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		edit func(o *plan.ScheduleOptions)
		want string
	}{
		{func(o *plan.ScheduleOptions) { o.Slot = 30 * time.Second }, "slot"},
		{func(o *plan.ScheduleOptions) { o.Slot = 25 * time.Hour }, "slot"},
		{func(o *plan.ScheduleOptions) { o.LimitMag = -1 }, "limiting magnitude"},
		{func(o *plan.ScheduleOptions) { o.LimitMag = math.NaN() }, "limiting magnitude"},
		{func(o *plan.ScheduleOptions) { o.LimitMag = 36 }, "limiting magnitude"},
		{func(o *plan.ScheduleOptions) { o.Workers = -2 }, "workers"},
		{func(o *plan.ScheduleOptions) { o.Night.MinAlt = -astro.Degree }, "minimum altitude"},
	}
	for _, c := range cases {
		o := plan.DefaultScheduleOptions()
		c.edit(&o)
		err := o.Validate()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%+v: %v, want an error with %q", o, err, c.want)
		}
		if _, err := plan.ScheduleNight(nil, parseDate(t, "2026-10-15"), alderRidge, o); err == nil {
			t.Errorf("ScheduleNight with %+v: no error", o)
		}
	}
	if _, err := plan.ScheduleNight(nil, plan.Date{Year: 2026, Month: 2, Day: 30}, alderRidge, plan.DefaultScheduleOptions()); err == nil {
		t.Error("2026-02-30: no error")
	}
	s, err := plan.ScheduleNight(nil, parseDate(t, "2026-10-15"), alderRidge, plan.DefaultScheduleOptions())
	if err != nil || len(s.Entries) != 0 {
		t.Errorf("no items: %v, %v; want an empty schedule", s, err)
	}
}
