package plan

import (
	"errors"
	"fmt"
	"math"
	"runtime"
	"sort"
	"sync"
	"time"

	"arcfit/astro"
	"arcfit/ephem"
)

// ScheduleItem is one target of a night's schedule as listed: its name and
// place in the list for messages, and how to obtain it. Loading runs on the
// schedule's workers, so a slow load (fitting an observation file) is
// shared out like the nights themselves.
type ScheduleItem struct {
	// Name names the target when Load fails or gives no name.
	Name string
	// Source says where the target was listed, such as "targets.txt:4".
	Source string
	// Load returns the target. Its error makes the item a failed entry of
	// the schedule; the others are scheduled all the same. Load must be safe
	// to call from a goroutine of its own.
	Load func() (LoadedTarget, error)
}

// LoadedTarget is what [ScheduleItem.Load] returns.
type LoadedTarget struct {
	Target Target
	// Name names the target in the schedule ("" keeps the item's Name);
	// Model names its model ("elements", "poly2", …) for the output.
	Name, Model string
	// Warnings are remarks on the target's input (the reader's, the fit's).
	Warnings []string
}

// EntryStatus says what became of a target in a schedule.
type EntryStatus int

// The statuses, in the order a schedule lists its entries.
const (
	// Scheduled: observable on the night; the entry has a slot.
	Scheduled EntryStatus = iota + 1
	// NotObservable: read and predicted, but not observable on the night;
	// Plan.Reason and Plan.Why say why.
	NotObservable
	// Failed: the target could not be read or predicted; Err says why.
	Failed
)

var entryStatusCodes = [...]string{Scheduled: "scheduled", NotObservable: "not_observable", Failed: "failed"}

// String returns the status's code: "scheduled", "not_observable" or
// "failed" (the JSON of plan uses them).
func (s EntryStatus) String() string {
	if s > 0 && int(s) < len(entryStatusCodes) {
		return entryStatusCodes[s]
	}
	return fmt.Sprintf("EntryStatus(%d)", int(s))
}

// ScheduleEntry is one target of a [Schedule].
type ScheduleEntry struct {
	// Index is the target's place in the list given to [ScheduleNight]
	// (0-based); Name and Source are those of its item (Name as loaded).
	Index        int
	Name, Source string
	Model        string
	Status       EntryStatus
	// Err is why a Failed target could not be read or predicted.
	Err error
	// Plan is the target's night plan (nil when Failed).
	Plan *NightPlan
	// Slot is the stretch the schedule gives a Scheduled target: a span of
	// ScheduleOptions.Slot centred on the best time, moved to lie within the
	// window holding it, and the whole window when that is shorter.
	Slot Window
	// MagKnown reports a predicted magnitude at the best time; Fainter that
	// it is fainter than ScheduleOptions.LimitMag (when one is set).
	MagKnown, Fainter bool
	// Conflicts are the Index values of the Scheduled entries whose slots
	// overlap this one's, in increasing order.
	Conflicts []int
	// Warnings are the load's warnings and the plan's.
	Warnings []string
}

// Conflict is a pair of Scheduled targets whose slots overlap: one telescope
// cannot take both at their best. A and B are Index values, A's entry before
// B's in the schedule; the overlap is Start to End.
type Conflict struct {
	A, B       int
	Start, End astro.JD
}

// Schedule is a night's observing schedule for many targets at one site.
type Schedule struct {
	Date    Date
	Site    astro.Site
	Sky     ephem.NightSky
	Options ScheduleOptions
	// Entries are all the targets: the Scheduled ones by their best time
	// (ties in list order), then the NotObservable ones, then the Failed
	// ones, each of these in list order.
	Entries []ScheduleEntry
	// Conflicts are the overlapping slots, ordered by A's place in Entries,
	// then by B's.
	Conflicts []Conflict
	// Warnings are conditions of the night that do not stop the schedule (a
	// stale leap-second table).
	Warnings []string
}

// Counts returns how many entries are Scheduled, NotObservable and Failed.
func (s *Schedule) Counts() (scheduled, notObservable, failed int) {
	for _, e := range s.Entries {
		switch e.Status {
		case Scheduled:
			scheduled++
		case NotObservable:
			notObservable++
		case Failed:
			failed++
		}
	}
	return
}

// Entry returns the entry whose Index is i, or nil.
func (s *Schedule) Entry(i int) *ScheduleEntry {
	for k := range s.Entries {
		if s.Entries[k].Index == i {
			return &s.Entries[k]
		}
	}
	return nil
}

// Defaults and limits of [ScheduleOptions].
const (
	// DefaultSlot is the telescope time a schedule gives each target: one
	// hour, time for a few exposures spaced to show the motion (common
	// practice of follow-up astrometry, not a published figure).
	DefaultSlot = time.Hour
	// MinSlot and MaxSlot bound ScheduleOptions.Slot.
	MinSlot = time.Minute
	MaxSlot = 24 * time.Hour
	// MaxLimitMag bounds ScheduleOptions.LimitMag from above: 35, beyond the
	// deepest images taken.
	MaxLimitMag = 35.0
)

// ScheduleOptions control [ScheduleNight].
type ScheduleOptions struct {
	// Night are the options of each target's night plan ([Night]); Name is
	// set per target. The schedule uses no rows: DefaultScheduleOptions sets
	// Step to MaxStep, so that each plan computes one row at most, and
	// NextNights to 0.
	Night Options
	// Slot is the telescope time given to each target, MinSlot to MaxSlot;
	// two targets conflict when their slots overlap.
	Slot time.Duration
	// LimitMag is the faintest magnitude the telescope reaches; a target
	// predicted fainter at its best time is flagged Fainter (and still
	// scheduled). 0 sets no limit.
	LimitMag float64
	// Workers is the number of targets planned at once; 0 means
	// runtime.GOMAXPROCS(0), a worker per core the Go runtime uses.
	Workers int
}

// DefaultScheduleOptions returns DefaultOptions for the nights (with Step
// MaxStep and NextNights 0), a one-hour slot, no magnitude limit and a worker
// per core.
func DefaultScheduleOptions() ScheduleOptions {
	n := DefaultOptions()
	n.Step, n.NextNights = MaxStep, 0
	return ScheduleOptions{Night: n, Slot: DefaultSlot}
}

// Validate reports the first option out of its range.
func (o ScheduleOptions) Validate() error {
	if err := o.Night.Validate(); err != nil {
		return err
	}
	switch {
	case o.Slot < MinSlot || o.Slot > MaxSlot:
		return fmt.Errorf("plan: slot %v: want %v to %v", o.Slot, MinSlot, MaxSlot)
	case math.IsNaN(o.LimitMag) || o.LimitMag < 0 || o.LimitMag > MaxLimitMag:
		return fmt.Errorf("plan: limiting magnitude %v: want 0 (none) or a magnitude up to %g", o.LimitMag, MaxLimitMag)
	case o.Workers < 0:
		return fmt.Errorf("plan: %d workers: want 0 (one per core) or more", o.Workers)
	}
	return nil
}

// ScheduleNight plans the night of date at site for every item and orders
// them into a schedule.
//
// Each item is loaded and planned with [Night] (opts.Night, with the item's
// name), on opts.Workers goroutines; the results are gathered by the item's
// place in the list, so the schedule does not depend on the number of
// workers or the order in which they finish. A target that cannot be loaded,
// or whose plan fails, is a Failed entry; one that is not observable (near
// the Sun, no darkness, below the limit, its prediction failing) is
// NotObservable with the plan's reason; the others are Scheduled.
//
// The schedule orders the Scheduled entries by their best time (the
// highest altitude within the window, [NightPlan].Best), and gives each a
// slot of opts.Slot: centred on the best time, moved to lie within the
// window holding the best time, the whole window when it is shorter. Two
// Scheduled targets conflict when their slots overlap by more than an
// instant: with one telescope, at least one of them must be taken away from
// its best time. A target whose predicted magnitude at the best time is
// fainter than opts.LimitMag (when set) is flagged Fainter.
//
// Errors (no schedule): options out of range, a date that is not one or lies
// outside 1800–2200, a site or night ephem.NightAt rejects. The sky of the
// night is computed once here and is the Sky of the schedule; a stale
// leap-second table goes to Warnings.
//
// Reference: the windows and best times are [Night]'s (see the package
// documentation).
func ScheduleNight(items []ScheduleItem, date Date, site astro.Site, opts ScheduleOptions) (*Schedule, error) {
	if err := opts.Validate(); err != nil {
		return nil, err
	}
	if _, err := NewDate(date.Year, date.Month, date.Day); err != nil {
		return nil, err
	}
	sky, err := ephem.NightAt(date.Year, int(date.Month), date.Day, site, opts.Night.Location)
	s := &Schedule{Date: date, Site: site, Sky: sky, Options: opts}
	if err != nil {
		if !errors.Is(err, astro.ErrStaleTable) {
			return nil, fmt.Errorf("plan: the night of %v: %w", date, err)
		}
		s.Warnings = append(s.Warnings, err.Error())
	}
	workers := opts.Workers
	if workers == 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = max(1, min(workers, len(items)))
	entries := make([]ScheduleEntry, len(items))
	next := make(chan int)
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				entries[i] = planItem(i, items[i], date, site, opts)
			}
		}()
	}
	for i := range items {
		next <- i
	}
	close(next)
	wg.Wait()

	s.Entries = orderEntries(entries)
	s.Conflicts = findConflicts(s.Entries)
	for _, c := range s.Conflicts {
		a, b := s.Entry(c.A), s.Entry(c.B)
		a.Conflicts = append(a.Conflicts, c.B)
		b.Conflicts = append(b.Conflicts, c.A)
	}
	for k := range s.Entries {
		sort.Ints(s.Entries[k].Conflicts)
	}
	return s, nil
}

// planItem loads item i and plans its night.
func planItem(i int, it ScheduleItem, date Date, site astro.Site, opts ScheduleOptions) ScheduleEntry {
	e := ScheduleEntry{Index: i, Name: it.Name, Source: it.Source, Status: Failed}
	if it.Load == nil {
		e.Err = errors.New("plan: no way to load the target")
		return e
	}
	lt, err := it.Load()
	if err == nil && lt.Target == nil {
		err = errors.New("plan: no target")
	}
	if lt.Name != "" {
		e.Name = lt.Name
	}
	e.Model = lt.Model
	e.Warnings = append(e.Warnings, lt.Warnings...)
	if err != nil {
		e.Err = err
		return e
	}
	no := opts.Night
	no.Name = e.Name
	p, err := Night(lt.Target, date, site, no)
	if err != nil {
		e.Err = err
		return e
	}
	e.Plan = p
	e.Warnings = append(e.Warnings, p.Warnings...)
	if !p.Observable {
		e.Status = NotObservable
		return e
	}
	e.Status = Scheduled
	e.Slot = slotOf(p.Best.UTC, p.Window, opts.Slot)
	if m := p.Best.Prediction.Mag; !math.IsNaN(m) && !math.IsInf(m, 0) {
		e.MagKnown = true
		e.Fainter = opts.LimitMag > 0 && m > opts.LimitMag
	}
	return e
}

// slotOf returns the span of length d centred on best, moved to lie within
// w; w itself when it is shorter than d.
func slotOf(best astro.JD, w Window, d time.Duration) Window {
	days := d.Seconds() / 86400
	if w.End.Sub(w.Start) <= days {
		return Window{Start: w.Start, End: w.End, StartsAtDark: w.StartsAtDark, EndsAtDark: w.EndsAtDark}
	}
	start := best.AddDays(-days / 2)
	if start.Before(w.Start) {
		start = w.Start
	}
	if end := start.AddDays(days); w.End.Before(end) {
		start = w.End.AddDays(-days)
	}
	return Window{Start: start, End: start.AddDays(days)}
}

// orderEntries returns the entries in schedule order (see Schedule.Entries).
func orderEntries(in []ScheduleEntry) []ScheduleEntry {
	out := append([]ScheduleEntry(nil), in...)
	sort.SliceStable(out, func(i, j int) bool {
		a, b := &out[i], &out[j]
		if a.Status != b.Status {
			return a.Status < b.Status
		}
		if a.Status == Scheduled {
			if d := a.Plan.Best.UTC.Sub(b.Plan.Best.UTC); d != 0 {
				return d < 0
			}
		}
		return a.Index < b.Index
	})
	return out
}

// findConflicts returns the pairs of Scheduled entries (in schedule order)
// whose slots overlap, by a sweep over the slots in order of their start.
func findConflicts(entries []ScheduleEntry) []Conflict {
	var sched []int // positions in entries
	pos := map[int]int{}
	for k, e := range entries {
		if e.Status == Scheduled {
			sched = append(sched, k)
			pos[e.Index] = k
		}
	}
	byStart := append([]int(nil), sched...)
	sort.SliceStable(byStart, func(i, j int) bool {
		return entries[byStart[i]].Slot.Start.Before(entries[byStart[j]].Slot.Start)
	})
	var out []Conflict
	for i, ki := range byStart {
		a := entries[ki].Slot
		for _, kj := range byStart[i+1:] {
			b := entries[kj].Slot
			if !b.Start.Before(a.End) {
				break
			}
			if !a.Start.Before(b.End) {
				continue
			}
			x, y := entries[ki].Index, entries[kj].Index
			if pos[x] > pos[y] {
				x, y = y, x
			}
			start, end := a.Start, a.End
			if start.Before(b.Start) {
				start = b.Start
			}
			if b.End.Before(end) {
				end = b.End
			}
			out = append(out, Conflict{A: x, B: y, Start: start, End: end})
		}
	}
	sort.SliceStable(out, func(i, j int) bool {
		if pa, pb := pos[out[i].A], pos[out[j].A]; pa != pb {
			return pa < pb
		}
		return pos[out[i].B] < pos[out[j].B]
	})
	return out
}
