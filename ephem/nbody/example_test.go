package nbody_test

import (
	"fmt"
	"math"

	"arcfit/astro"
	"arcfit/ephem"
	"arcfit/ephem/nbody"
)

// An invented main-belt asteroid, integrated 100 days and one year with the
// planets and, for comparison, without them.
func ExamplePropagate() {
	epoch := astro.NewJD(2461400.5, astro.TDB)
	el := ephem.Elements{Name: "Invented-7", Epoch: epoch, A: 2.71, E: 0.12,
		I: 9.2 * astro.Degree, Node: 131 * astro.Degree, Peri: 48 * astro.Degree, M: 17 * astro.Degree}
	p, v, err := el.StateAt(epoch)
	if err != nil {
		panic(err)
	}
	p, v = ephem.EclipticJ2000ToICRS.MulVec(p), ephem.EclipticJ2000ToICRS.MulVec(v)
	x := [6]float64{p.X, p.Y, p.Z, v.X, v.Y, v.Z}
	ts := []astro.JD{epoch.AddDays(100), epoch.AddDays(365.25)}

	full, err := nbody.Propagate(epoch, x, ts, nbody.Options{})
	if err != nil {
		panic(err)
	}
	kepler, err := nbody.Propagate(epoch, x, ts, nbody.Options{Omit: nbody.Perturbers()})
	if err != nil {
		panic(err)
	}
	for i, t := range ts {
		s, k := full.States[i], kepler.States[i]
		r := math.Sqrt(s[0]*s[0] + s[1]*s[1] + s[2]*s[2])
		d := math.Sqrt((s[0]-k[0])*(s[0]-k[0]) + (s[1]-k[1])*(s[1]-k[1]) + (s[2]-k[2])*(s[2]-k[2]))
		fmt.Printf("+%3.0f d: r = %.4f au, the planets moved it %.0f thousand km\n", t.Sub(epoch), r, d*astro.AUKm/1000)
	}
	fmt.Println("close approaches:", len(full.Encounters))
	// Output:
	// +100 d: r = 2.4755 au, the planets moved it 5 thousand km
	// +365 d: r = 2.7904 au, the planets moved it 62 thousand km
	// close approaches: 0
}
