package nbody

import (
	"math"
	"sync"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// The invented test orbits. Their epoch is JD 2461400.5 TDB (2026 Dec 4).
var testEpoch = astro.NewJD(2461400.5, astro.TDB)

// elementState returns the heliocentric ICRS state at testEpoch of an
// invented ecliptic element set (two-body, GM = ephem.GMSun).
func elementState(t testing.TB, el ephem.Elements) [6]float64 {
	t.Helper()
	if el.Epoch == (astro.JD{}) {
		el.Epoch = testEpoch
	}
	p, v, err := el.StateAt(testEpoch)
	if err != nil {
		t.Fatal(err)
	}
	p = ephem.EclipticJ2000ToICRS.MulVec(p)
	v = ephem.EclipticJ2000ToICRS.MulVec(v)
	return [6]float64{p.X, p.Y, p.Z, v.X, v.Y, v.Z}
}

func deg(x float64) astro.Angle { return astro.Angle(x * math.Pi / 180) }

// mainBelt is an invented main-belt orbit (a = 2.71 au, e = 0.12, i = 9°).
func mainBelt(t testing.TB) [6]float64 {
	return elementState(t, ephem.Elements{Name: "Invented MB", A: 2.71, E: 0.12,
		I: deg(9.2), Node: deg(131), Peri: deg(48), M: deg(17)})
}

// jfc is an invented Jupiter-family-comet-like orbit (q = 1.35 au, e = 0.62,
// a = 3.55 au, i = 11°), one month before perihelion.
func jfc(t testing.TB) [6]float64 {
	return elementState(t, ephem.Elements{Name: "Invented JFC", A: 3.55, E: 0.62,
		I: deg(11.4), Node: deg(62), Peri: deg(201), M: deg(-4.5)})
}

// neoCloseApproach returns an invented near-Earth object that passes the
// Earth at 0.010 au at testEpoch + 120 days (TCA): its state there is put
// at the Earth's position plus 0.010 au along a direction normal to the
// Earth's orbit, moving 8 km/s relative to the Earth at right angles to the
// offset (so TCA is the geocentric perigee to within the solar tide), and
// integrated back to testEpoch with the full model at a tight tolerance.
var neoOnce = sync.OnceValues(func() ([6]float64, error) {
	tca := testEpoch.AddDays(120)
	ep, ev, err := ephem.HeliocentricICRS(ephem.Earth, tca)
	if err != nil {
		return [6]float64{}, err
	}
	n := r3.Unit(r3.Cross(ep, ev)) // normal to the Earth's orbit
	u := r3.Unit(ev)
	off := r3.Scale(neoMissAU, r3.Unit(r3.Add(n, r3.Scale(0.3, r3.Unit(ep)))))
	// relative velocity: 8 km/s, at right angles to the offset
	w := r3.Unit(r3.Sub(u, r3.Scale(r3.Dot(u, r3.Unit(off)), r3.Unit(off))))
	vrel := r3.Scale(8*astro.SecondsPerDay/astro.AUKm, w)
	p := r3.Add(ep, off)
	v := r3.Add(ev, vrel)
	x := [6]float64{p.X, p.Y, p.Z, v.X, v.Y, v.Z}
	res, err := Propagate(tca, x, []astro.JD{testEpoch}, Options{Tolerance: 1e-14})
	if err != nil {
		return [6]float64{}, err
	}
	return res.States[0], nil
})

const neoMissAU = 0.010

func neo(t testing.TB) [6]float64 {
	t.Helper()
	x, err := neoOnce()
	if err != nil {
		t.Fatal(err)
	}
	return x
}

func posDiff(a, b [6]float64) float64 {
	return math.Sqrt((a[0]-b[0])*(a[0]-b[0]) + (a[1]-b[1])*(a[1]-b[1]) + (a[2]-b[2])*(a[2]-b[2]))
}

func velDiff(a, b [6]float64) float64 {
	return math.Sqrt((a[3]-b[3])*(a[3]-b[3]) + (a[4]-b[4])*(a[4]-b[4]) + (a[5]-b[5])*(a[5]-b[5]))
}

// days returns the instants testEpoch + d for each d.
func days(ds ...float64) []astro.JD {
	out := make([]astro.JD, len(ds))
	for i, d := range ds {
		out[i] = testEpoch.AddDays(d)
	}
	return out
}
