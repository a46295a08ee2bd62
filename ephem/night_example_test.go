package ephem_test

import (
	"errors"
	"fmt"

	"arcfit/astro"
	"arcfit/ephem"
)

// The night of 2027 February 3 at an invented site, in its local mean time.
func ExampleNightAt() {
	site := astro.Site{Name: "Mirefield", Lat: astro.AngleFromDegrees(47.5), Lon: astro.AngleFromDegrees(8.3), HeightM: 450}
	n, err := ephem.NightAt(2027, 2, 3, site, nil)
	if err != nil && !errors.Is(err, astro.ErrStaleTable) {
		fmt.Println(err)
		return
	}
	hm := func(t astro.JD) string {
		if !ephem.Happens(t) {
			return "--:--"
		}
		return n.Local(t).Format("15:04")
	}
	fmt.Println("zone", n.Location)
	fmt.Println("sunset", hm(n.Sunset), "civil", hm(n.CivilDusk), "nautical", hm(n.NauticalDusk), "astro", hm(n.AstroDusk))
	fmt.Println("astro", hm(n.AstroDawn), "nautical", hm(n.NauticalDawn), "civil", hm(n.CivilDawn), "sunrise", hm(n.Sunrise))
	fmt.Printf("dark %s–%s (%.1f h)\n", hm(n.DarkStart), hm(n.DarkEnd), n.DarkHours())
	for _, t := range n.Moonrise {
		fmt.Println("moonrise", hm(t))
	}
	for _, t := range n.Moonset {
		fmt.Println("moonset", hm(t))
	}
	fmt.Printf("moon at midnight: %s, %.0f%% lit\n", n.MoonPhaseName, 100*n.MoonIllumination)
	// Output:
	// zone LMT+00:33
	// sunset 17:03 civil 17:36 nautical 18:13 astro 18:49
	// astro 05:37 nautical 06:13 civil 06:50 sunrise 07:22
	// dark 18:49–05:37 (10.8 h)
	// moonrise 06:28
	// moonset 13:41
	// moon at midnight: waning crescent, 6% lit
}

// Polar summer: no astronomical darkness at an invented site at 69.3° N.
func ExampleNightAt_polarSummer() {
	site := astro.Site{Name: "Vardhaug", Lat: astro.AngleFromDegrees(69.3), Lon: astro.AngleFromDegrees(18.7), HeightM: 50}
	n, err := ephem.NightAt(2026, 6, 21, site, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("polar day:", n.PolarDay)
	fmt.Println("dark window:", ephem.Happens(n.DarkStart))
	fmt.Println(n.DarkReason)
	// Output:
	// polar day: true
	// dark window: false
	// no astronomical darkness: the Sun stays above −18° (lowest 2.7°)
}

// Meeus' example 15.a: Venus at Boston on 1988 March 20.
func ExampleRiseTransitSetMeeus() {
	deg := func(d, m, s float64) astro.Angle { return astro.AngleFromDegrees(d + m/60 + s/3600) }
	hr := func(h, m, s float64) astro.Angle { return astro.AngleFromHours(h + m/60 + s/3600) }
	r, err := ephem.RiseTransitSetMeeus(deg(42, 20, 0), -deg(71, 5, 0), hr(11, 50, 58.10),
		[3]astro.Angle{hr(2, 42, 43.25), hr(2, 46, 55.51), hr(2, 51, 7.69)},
		[3]astro.Angle{deg(18, 2, 51.4), deg(18, 26, 27.3), deg(18, 49, 38.7)},
		ephem.StarRiseAltitude, 56)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("rise %.5f  transit %.5f  set %.5f\n", r.Rise, r.Transit, r.Set)
	// Output:
	// rise 0.51766  transit 0.81980  set 0.12130
}
