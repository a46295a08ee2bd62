package fit_test

import (
	"bytes"
	"fmt"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/fit"
	"arcfit/fit/demo"
)

// Fit the built-in invented demo scenario with a degree-2 polynomial and the
// parallax term, and predict one day after the last observation for the
// site Alder Ridge. (The demo's noise-free truth lies about 2.6″ from this
// poly2 extrapolation — the curvature poly2 cannot follow; choosing between
// models is the job of Compare.)
func ExampleFit() {
	sites, err := obs.ReadSites(bytes.NewReader(demo.Sites()), demo.SitesFile)
	if err != nil {
		fmt.Println(err)
		return
	}
	set, err := obs.Read(bytes.NewReader(demo.Observations()), demo.ObservationsFile, obs.ReadOptions{Sites: sites})
	if err != nil {
		fmt.Println(err)
		return
	}
	tr, err := fit.NewTrack(set, sites)
	if err != nil {
		fmt.Println(err)
		return
	}
	sol, err := fit.Fit(tr, fit.Poly(2), fit.Settings{})
	if err != nil {
		fmt.Println(err)
		return
	}
	site := sites["Alder Ridge"]
	at := tr.Points[len(tr.Points)-1].UTC.AddDays(1)
	pr, err := sol.Predict(at, &site)
	if err != nil {
		fmt.Println(err)
		return
	}
	e := pr.Ellipse(3)
	fmt.Printf("%s: %d of %d used, rms %.2f\", chi2/dof %.2f, 1/distance %.2f ± %.2f au^-1\n",
		sol.Model.Name(), sol.NumUsed, len(tr.Points), sol.RMSArcsec, sol.Chi2DoF, sol.InvDistance, sol.InvDistanceSigma)
	fmt.Printf("at %s: RA %s Dec %s\n", astro.FormatISO8601(at, 0), astro.FormatHMS(pr.RA, 2), astro.FormatDMS(pr.Dec, 1))
	fmt.Printf("3-sigma ellipse %.1f\" x %.1f\" at PA %.0f deg; rate %.3f\"/min towards PA %.1f deg\n",
		e.SemiMajorArcsec, e.SemiMinorArcsec, e.PA.Degrees(), pr.RateArcsecPerMin, pr.RatePA.Degrees())
	// Output:
	// poly2: 13 of 14 used, rms 0.40", chi2/dof 0.89, 1/distance 0.72 ± 0.14 au^-1
	// at 2027-02-09T05:31:51Z: RA 09:16:03.42 Dec +23:55:08.4
	// 3-sigma ellipse 1.7" x 1.7" at PA 31 deg; rate 0.634"/min towards PA 300.5 deg
}
