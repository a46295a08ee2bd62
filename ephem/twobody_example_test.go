package ephem_test

import (
	"fmt"
	"math"

	"arcfit/astro"
	"arcfit/ephem"
)

// Meeus' hard case, e = 0.99 and M = 0.2 rad (Astronomical Algorithms, 2nd ed., p. 205).
func ExampleSolveKepler() {
	E, err := ephem.SolveKepler(0.99, 0.2)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("E = %.12f rad\n", float64(E))
	// Output: E = 1.066997365282 rad
}

// An invented comet on a parabolic orbit, 30 days after perihelion.
func ExampleParabolicMotion() {
	nu, r, err := ephem.ParabolicMotion(0.75, 30)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("ν = %.4f°, r = %.6f au\n", nu.Degrees(), r)
	// Output: ν = 54.5891°, r = 0.949706 au
}

// An invented main-belt asteroid, 100 days after the epoch of its elements.
func ExampleElements_StateAt() {
	el := ephem.Elements{
		Name:  "Invented-2027 AB",
		Epoch: astro.NewJD(2461400.5, astro.TT),
		A:     2.64, E: 0.12,
		I:    astro.AngleFromDegrees(7.3),
		Node: astro.AngleFromDegrees(110.2),
		Peri: astro.AngleFromDegrees(48.9),
		M:    astro.AngleFromDegrees(201.5),
		H:    15.2, G: 0.15,
	}
	pos, vel, err := el.StateAt(el.Epoch.AddDays(100))
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("pos = (%.6f, %.6f, %.6f) au\n", pos.X, pos.Y, pos.Z)
	fmt.Printf("|vel| = %.6f au/day\n", math.Hypot(math.Hypot(vel.X, vel.Y), vel.Z))
	// Output:
	// pos = (2.763609, 0.733643, -0.364703) au
	// |vel| = 0.009656 au/day
}

// A bad element set gets a one-line error.
func ExampleElements_Validate() {
	el := ephem.Elements{Name: "Invented-X", A: -1.5, E: 0.3, Epoch: astro.NewJD(2461400.5, astro.TT)}
	fmt.Println(el.Validate())
	// Output: ephem: element set "Invented-X": a = -1.5 au, want a > 0 au for an ellipse (e = 0.3)
}

// Propagating the state of an invented object 1000 days and back.
func ExamplePropagateUniversal() {
	el := ephem.Elements{E: 1.2, Q: 1.4, Tp: astro.NewJD(2461500.5, astro.TT), I: 0.5, Node: 2, Peri: 1}
	p0, v0, _ := el.StateAt(el.Tp)
	p1, v1, _ := ephem.PropagateUniversal(p0, v0, 1000, ephem.GMSun)
	p2, _, _ := ephem.PropagateUniversal(p1, v1, -1000, ephem.GMSun)
	fmt.Printf("r after 1000 d = %.6f au; back within 1e-12 au: %v\n",
		math.Hypot(math.Hypot(p1.X, p1.Y), p1.Z), math.Hypot(math.Hypot(p2.X-p0.X, p2.Y-p0.Y), p2.Z-p0.Z) < 1e-12)
	// Output: r after 1000 d = 11.507422 au; back within 1e-12 au: true
}
