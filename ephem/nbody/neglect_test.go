package nbody

import (
	"math"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// TestNeglectSizes measures, for the invented test orbits over one year,
// how far the position moves when a force the model leaves out is added
// (the figures quoted in doc.go; each check holds the measured size under
// the figure stated there):
//
//   - relativity: the Sun's Schwarzschild perihelion advance, applied as the
//     velocity-independent radial force −3 GM h²/(c² r⁵) r (h the specific
//     angular momentum at the epoch), which gives the orbit equation
//     u″ + u = GM/h² + 3GM u²/c² of the Schwarzschild geodesic and so the
//     same secular advance (Weinberg, Gravitation and Cosmology (1972),
//     §8.6, eq. 8.6.7; from memory);
//   - Pluto (DE405 GM9) and the asteroids (1) Ceres, (2) Pallas, (4) Vesta
//     (DE405 MA0001, MA0002, MA0004) as point masses on two-body orbits
//     with their approximate elements (from memory, rounded; the phases do
//     not matter for an order of magnitude, as none of the test orbits
//     passes near them), direct and indirect terms.
func TestNeglectSizes(t *testing.T) {
	type perturber struct {
		name string
		gm   float64
		el   ephem.Elements
	}
	j2000 := astro.NewJD(astro.J2000, astro.TDB)
	extraBodies := []perturber{
		{"Pluto", gmPluto, ephem.Elements{Epoch: j2000, A: 39.48, E: 0.249, I: deg(17.1), Node: deg(110.3), Peri: deg(113.8), M: deg(14.9)}},
		{"Ceres", gmCeres, ephem.Elements{Epoch: j2000, A: 2.767, E: 0.079, I: deg(10.6), Node: deg(80.5), Peri: deg(73.9), M: deg(6.0)}},
		{"Pallas", gmPallas, ephem.Elements{Epoch: j2000, A: 2.773, E: 0.230, I: deg(34.8), Node: deg(173.1), Peri: deg(310.0), M: deg(352.0)}},
		{"Vesta", gmVesta, ephem.Elements{Epoch: j2000, A: 2.362, E: 0.089, I: deg(7.1), Node: deg(103.9), Peri: deg(150.0), M: deg(341.0)}},
	}
	e97 := elementState(t, ephem.Elements{Q: 0.09, E: 0.97, I: deg(40), Node: deg(10), Peri: deg(250), Tp: testEpoch.AddDays(20)})
	orbits := []struct {
		name string
		x    [6]float64
		// stated sizes (au after a year) in doc.go: relativity, Pluto, asteroids
		rel, pluto, ast float64
	}{
		{"main belt", mainBelt(t), 1e-7, 1e-10, 1e-8},
		{"JFC", jfc(t), 5e-7, 1e-10, 1e-8},
		{"NEO 0.01 au", neo(t), 1e-6, 1e-10, 1e-8},
		{"e=0.97, q=0.09 au", e97, 1e-5, 1e-10, 1e-8},
	}
	end := days(365.25)
	c2 := astro.SpeedOfLightAUDay * astro.SpeedOfLightAUDay
	for _, o := range orbits {
		base, err := Propagate(testEpoch, o.x, end, Options{})
		if err != nil {
			t.Fatal(err)
		}
		h2 := r3.Norm2(r3.Cross(r3.Vec{X: o.x[0], Y: o.x[1], Z: o.x[2]}, r3.Vec{X: o.x[3], Y: o.x[4], Z: o.x[5]}))
		gr := func(_ float64, r [3]float64) [3]float64 {
			rr := math.Sqrt(r[0]*r[0] + r[1]*r[1] + r[2]*r[2])
			k := -3 * ephem.GMSun * h2 / (c2 * math.Pow(rr, 5))
			return [3]float64{k * r[0], k * r[1], k * r[2]}
		}
		point := func(ps []perturber) func(float64, [3]float64) [3]float64 {
			return func(tau float64, r [3]float64) [3]float64 {
				var a [3]float64
				for _, p := range ps {
					pos, _, err := p.el.StateAt(astro.JD{Day: astro.J2000, Frac: tau, Scale: astro.TDB})
					if err != nil {
						continue
					}
					pb := ephem.EclipticJ2000ToICRS.MulVec(pos)
					q := [3]float64{pb.X, pb.Y, pb.Z}
					d := math.Sqrt((r[0]-q[0])*(r[0]-q[0]) + (r[1]-q[1])*(r[1]-q[1]) + (r[2]-q[2])*(r[2]-q[2]))
					rq := math.Sqrt(q[0]*q[0] + q[1]*q[1] + q[2]*q[2])
					for k := range 3 {
						a[k] -= p.gm * ((r[k]-q[k])/(d*d*d) + q[k]/(rq*rq*rq))
					}
				}
				return a
			}
		}
		for _, c := range []struct {
			name  string
			f     func(float64, [3]float64) [3]float64
			limit float64
		}{
			{"relativity", gr, o.rel},
			{"Pluto", point(extraBodies[:1]), o.pluto},
			{"Ceres+Pallas+Vesta", point(extraBodies[1:]), o.ast},
		} {
			res, err := Propagate(testEpoch, o.x, end, Options{extra: c.f})
			if err != nil {
				t.Fatal(err)
			}
			d := posDiff(res.States[0], base.States[0])
			t.Logf("%-18s %-19s moves the position by %.2e au (%.0f m) in a year", o.name, c.name, d, d*astro.AUKm*1000)
			if d > c.limit {
				t.Errorf("%s: %s: %.3g au, above the %.3g au stated in doc.go", o.name, c.name, d, c.limit)
			}
		}
	}
}
