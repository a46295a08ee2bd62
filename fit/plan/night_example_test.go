package plan_test

import (
	"fmt"
	"time"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit/plan"
)

// Where to point at an invented main-belt target (the element set
// Invented-N1 of testdata/night_targets.csv; not a real object) from an
// invented site on the night of 2026 December 11, in the site's local mean
// time; and a night when it cannot be observed.
func ExampleNight() {
	deg := astro.AngleFromDegrees
	el := ephem.Elements{Name: "Invented-N1", Epoch: astro.NewJD(2461300.5, astro.TT), A: 2.55, E: 0.12,
		I: deg(11), Node: deg(80), Peri: deg(140), M: deg(200), H: 14.8, G: 0.15}
	el.Q = el.A * (1 - el.E)
	site := astro.Site{Name: "Alder Ridge", Lat: deg(44.52), Lon: deg(-72.80), HeightM: 410}
	opts := plan.DefaultOptions()
	opts.Name = el.Name
	opts.NextNights = 0

	date, _ := plan.NewDate(2026, time.December, 11)
	p, err := plan.Night(plan.ElementsTarget{Elements: el}, date, site, opts)
	if err != nil {
		fmt.Println(err)
		return
	}
	hm := func(t astro.JD) string { return p.Sky.Local(t).Format("15:04") }
	fmt.Println("observable:", p.Observable)
	fmt.Printf("window %s–%s local (%s), %.1f h\n", hm(p.Window.Start), hm(p.Window.End), p.Sky.Location, p.Window.Hours())
	b := p.Best
	fmt.Printf("best %s, altitude %.1f°, azimuth %.0f°\n", hm(b.UTC), b.Pointing.Alt.Degrees(), b.Pointing.Az.Degrees())
	fmt.Printf("point at %s %s (ICRS)\n", astro.FormatHMS(b.Prediction.RA, 0), astro.FormatDMS(b.Prediction.Dec, 0))
	fmt.Printf("moving %.2f″/min, magnitude %.1f, Moon %.0f%% lit\n", b.Prediction.RateArcsecPerMin, b.Prediction.Mag, 100*b.MoonIllumination)
	fmt.Println("rows:", len(p.Rows))

	date, _ = plan.NewDate(2026, time.April, 28)
	p, err = plan.Night(plan.ElementsTarget{Elements: el}, date, site, opts)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(p.Reason, "—", p.Why)
	fmt.Println("rows withheld:", p.RowsWithheld)
	// Output:
	// observable: true
	// window 18:14–04:04 local (LMT-04:51), 9.8 h
	// best 23:09, altitude 65.3°, azimuth 180°
	// point at 04:31:37 +19:45:42 (ICRS)
	// moving 0.63″/min, magnitude 18.7, Moon 9% lit
	// rows: 23
	// near_sun — Invented-N1 is 9.3° from the Sun, within 15°: it is lost in the Sun's glare and stays below the horizon while the sky is dark
	// rows withheld: true
}
