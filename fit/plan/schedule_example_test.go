package plan_test

import (
	"fmt"
	"strings"
	"time"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit/plan"
)

// A night's schedule for three invented targets (the element sets of
// testdata/night_targets.csv; not real objects) at an invented site, with one
// target whose file is missing: the targets in the order of their best
// times, each with a one-hour slot, the conflicts, and the missing one.
func ExampleScheduleNight() {
	deg := astro.AngleFromDegrees
	ep := astro.NewJD(2461300.5, astro.TT)
	sets := []ephem.Elements{
		{Name: "Invented-N1", Epoch: ep, A: 2.55, E: 0.12, I: deg(11), Node: deg(80), Peri: deg(140), M: deg(200), H: 14.8, G: 0.15},
		{Name: "Invented-P2", Epoch: ep, A: 2.2, E: 0.25, I: deg(48), Node: deg(300), Peri: deg(60), M: deg(330), H: 16.1, G: 0.15},
		{Name: "Invented-H3", Epoch: astro.NewJD(2461385.5, astro.TT), A: 1.57, E: 0.1, I: deg(112.4), Node: deg(116.1), Peri: deg(56.7), M: 0, H: 18.5, G: 0.15},
	}
	var items []plan.ScheduleItem
	for i, el := range sets {
		el.Q = el.A * (1 - el.E)
		items = append(items, plan.ScheduleItem{Name: el.Name, Source: fmt.Sprintf("targets.txt:%d", i+1),
			Load: func() (plan.LoadedTarget, error) {
				return plan.LoadedTarget{Target: plan.ElementsTarget{Elements: el}, Model: "elements"}, nil
			}})
	}
	items = append(items, plan.ScheduleItem{Name: "club.csv", Source: "targets.txt:4",
		Load: func() (plan.LoadedTarget, error) {
			return plan.LoadedTarget{}, fmt.Errorf("open club.csv: no such file or directory")
		}})

	site := astro.Site{Name: "Alder Ridge", Lat: deg(44.52), Lon: deg(-72.80), HeightM: 410}
	date, _ := plan.NewDate(2026, time.October, 15)
	opts := plan.DefaultScheduleOptions()
	opts.LimitMag = 20
	s, err := plan.ScheduleNight(items, date, site, opts)
	if err != nil {
		fmt.Println(err)
		return
	}
	hm := func(t astro.JD) string { return s.Sky.Local(t).Format("15:04") }
	for _, e := range s.Entries {
		switch e.Status {
		case plan.Scheduled:
			b := e.Plan.Best
			faint := ""
			if e.Fainter {
				faint = ", fainter than the limit"
			}
			with := []string{}
			for _, i := range e.Conflicts {
				with = append(with, s.Entry(i).Name)
			}
			list := "none"
			if len(with) > 0 {
				list = strings.Join(with, ", ")
			}
			fmt.Printf("%s best %s at %.0f°, slot %s–%s, V %.1f%s; conflicts: %s\n", e.Name, hm(b.UTC), b.Pointing.Alt.Degrees(),
				hm(e.Slot.Start), hm(e.Slot.End), b.Prediction.Mag, faint, list)
		case plan.NotObservable:
			fmt.Printf("%s not observable: %s\n", e.Name, e.Plan.Why)
		case plan.Failed:
			fmt.Printf("%s (%s) failed: %v\n", e.Name, e.Source, e.Err)
		}
	}
	// Output:
	// Invented-P2 best 18:52 at 36°, slot 18:52–19:52, V 19.7; conflicts: none
	// Invented-N1 best 03:35 at 64°, slot 03:05–04:05, V 19.6; conflicts: Invented-H3
	// Invented-H3 best 04:39 at 41°, slot 03:39–04:39, V 21.9, fainter than the limit; conflicts: Invented-N1
	// club.csv (targets.txt:4) failed: open club.csv: no such file or directory
}

// A club's targets file, read: one target a line, paths relative to the
// file's directory (the file names are invented).
func ExampleReadTargets() {
	text := `# targets for the club night (invented)
obs      tonight/club-7.csv
fit      fits/club-3.json
elements elements.csv Demo-1 (invented)
elements "shared/comet elements.csv"
`
	lines, _, err := plan.ReadTargets(strings.NewReader(text), "targets.txt", "club")
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, l := range lines {
		fmt.Printf("%s: %-8s %s %q\n", l.Where(), l.Kind, l.Path, l.Name)
	}
	_, _, err = plan.ReadTargets(strings.NewReader("observe club-7.csv\n"), "targets.txt", "club")
	fmt.Println(err)
	// Output:
	// targets.txt:2: obs      club/tonight/club-7.csv ""
	// targets.txt:3: fit      club/fits/club-3.json ""
	// targets.txt:4: elements club/elements.csv "Demo-1 (invented)"
	// targets.txt:5: elements club/shared/comet elements.csv ""
	// targets.txt:1:1: kind: want obs, fit or elements and a file, such as: fit club-fit.json, got "observe"
}
