package simulate_test

import (
	"fmt"
	"os"
	"time"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/fit/plan"
	"arcfit/fit/simulate"
)

// Four synthetic observations, 20 minutes apart with 0.5″ of noise, of an
// invented main-belt target (the element set Invented-N1 of fit/plan's
// testdata/night_targets.csv; not a real object) from an invented site on the
// night of 2026 December 11, written as an observation CSV.
func ExampleConfig_Run() {
	deg := astro.AngleFromDegrees
	el := ephem.Elements{Name: "Invented-N1", Epoch: astro.NewJD(2461300.5, astro.TT), A: 2.55, E: 0.12,
		I: deg(11), Node: deg(80), Peri: deg(140), M: deg(200), H: 14.8, G: 0.15}
	el.Q = el.A * (1 - el.E)
	d, _ := plan.NewDate(2026, time.December, 11)

	cfg := simulate.DefaultConfig()
	cfg.Target = plan.ElementsTarget{Elements: el}
	cfg.Source = `element set "Invented-N1" (invented)`
	cfg.Sites = []astro.Site{{Name: "Alder Ridge", Lat: deg(44.52), Lon: deg(-72.80), HeightM: 410}}
	cfg.Nights = []plan.Date{d}
	cfg.SigmaArcsec, cfg.Seed = 0.5, 42
	res, err := cfg.Run()
	if err != nil {
		fmt.Println(err)
		return
	}
	r := res.Runs[0]
	fmt.Printf("%s, night of %v: %d observations, best at %s UTC (%.1f°)\n", r.Site, r.Night, r.Made,
		astro.FormatISO8601(r.Best, 0)[11:19], r.BestAlt.Degrees())
	for _, s := range res.Samples {
		fmt.Printf("%s  noise %+.2f″ %+.2f″  altitude %.1f°\n", astro.FormatISO8601(s.UTC, 0), s.NoiseEastArcsec, s.NoiseNorthArcsec, s.Alt.Degrees())
	}
	if err := res.WriteCSV(os.Stdout); err != nil {
		fmt.Println(err)
	}
	// Output:
	// Alder Ridge, night of 2026-12-11: 4 observations, best at 04:00:56 UTC (65.3°)
	// 2026-12-12T03:30:57Z  noise +0.88″ -0.19″  altitude 64.5°
	// 2026-12-12T03:50:57Z  noise -0.71″ -0.09″  altitude 65.2°
	// 2026-12-12T04:10:57Z  noise +0.42″ -0.18″  altitude 65.2°
	// 2026-12-12T04:30:57Z  noise -0.97″ +0.49″  altitude 64.5°
	// # SYNTHETIC observations made by arcfit simulate: not measurements of the real sky.
	// # object: element set "Invented-N1" (invented)
	// # sites (lat_deg, lon_deg, height_m; WGS84, east positive): Alder Ridge (44.520000, -72.800000, 410 m)
	// # nights (local date of the evening, the site's local mean solar time): 2026-12-11
	// # per night and site: 4 observations every 20m, centred on the best time, only with the Sun's centre below -18 deg and the object at least 25 deg high (refracted, 10 C, 1010 hPa)
	// # positions: astrometric ICRS, topocentric, two-body motion with light time (ephem.PlaceOfElements)
	// # noise: Gaussian, sigma 0.5 arcsec per coordinate (RA on the sky), seed 42 (PCG, Box-Muller); magnitudes: the object's predicted V, without noise
	// # columns: time UTC; ra_deg, dec_deg astrometric ICRS, degrees; sigma the noise's sigma, arcsec
	// time,ra_deg,dec_deg,sigma,site,mag,band
	// 2026-12-12T03:30:57Z,67.909484925,19.761122887,0.5,Alder Ridge,18.69,V
	// 2026-12-12T03:50:57Z,67.905283158,19.761490096,0.5,Alder Ridge,18.69,V
	// 2026-12-12T04:10:57Z,67.901885112,19.761801456,0.5,Alder Ridge,18.69,V
	// 2026-12-12T04:30:57Z,67.897746057,19.762322175,0.5,Alder Ridge,18.69,V
}
