package orbit

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"arcfit/astro"
	"arcfit/ephem"

	"gonum.org/v1/gonum/spatial/r3"
)

// Curtis, Orbital Mechanics for Engineering Students (2005), Examples 5.11
// (Gauss's method) and 5.12 (its iterative improvement), geocentric, km and
// s, μ = 398600 km³/s². Every value of the example below is from memory.
//
// The example's observations were made from the orbit that Example 5.12
// prints as its answer: a = 10000 km, e = 0.1, i = 30°, Ω = 270°, ω = 90°,
// true anomaly θ = 45° at the middle observation (h = 62818 km²/s). The
// tracking station is at latitude 40°, height 1 km on Curtis's Earth
// (Re = 6378 km, f = 0.003353, his eq. 5.56 for the station vector), with
// local sidereal time 44.506°, 45.000°, 45.499° at t = 0, 118.10, 237.58 s;
// the printed observations are
//
//	α = 43.537°, 54.420°, 64.318°;  δ = −8.7833°, −12.074°, −15.105°.
//
// The book's printed first approximation is reproduced from the unrounded
// observations of that orbit (its intermediate results are those of the
// orbit's exact directions, not of the rounded table), so the test makes the
// observations from the orbit, checks that they round to the printed table,
// and then checks Gauss's method against the printed results:
//
//	Example 5.11: root r2 = 9241.8 km; ρ1 = 3639.1, ρ2 = 3864.8, ρ3 = 4172.8 km;
//	              r2 = 5659.1 î + 6533.8 ĵ + 3270.1 k̂ km.
//	Example 5.12: r2 = 5662.1 î + 6538.0 ĵ + 3269.0 k̂ km, and the elements above.
const (
	curtisMu       = 398600.0 // km³/s²
	curtisRe       = 6378.0   // km
	curtisF        = 0.003353
	curtisLatDeg   = 40.0
	curtisHeightKm = 1.0
	// curtisOmegaE is the Earth's rotation rate, rad/s (Curtis eq. 2.67;
	// from memory), which links the sidereal times to the observation times.
	curtisOmegaE = 72.9217e-6
)

// curtisStation returns the station vector of Curtis's eq. 5.56 (from
// memory) at local sidereal time lstDeg.
func curtisStation(lstDeg float64) r3.Vec {
	phi := curtisLatDeg * math.Pi / 180
	th := lstDeg * math.Pi / 180
	k := math.Sqrt(1 - (2*curtisF-curtisF*curtisF)*math.Sin(phi)*math.Sin(phi))
	rc := (curtisRe/k + curtisHeightKm) * math.Cos(phi)
	rz := (curtisRe*(1-curtisF)*(1-curtisF)/k + curtisHeightKm) * math.Sin(phi)
	return r3.Vec{X: rc * math.Cos(th), Y: rc * math.Sin(th), Z: rz}
}

// curtisOrbitState returns the position and velocity at the middle
// observation of the example's orbit (perifocal position and velocity,
// r = h²/μ/(1 + e cos θ)·(cos θ, sin θ), v = μ/h·(−sin θ, e + cos θ),
// turned by the 3-1-3 rotation of Ω, i, ω: Curtis ch. 4, common practice).
func curtisOrbitState() (r, v r3.Vec) {
	d := math.Pi / 180
	a, e, inc, node, w, th := 10000.0, 0.1, 30*d, 270*d, 90*d, 45*d
	h := math.Sqrt(curtisMu * a * (1 - e*e))
	rr := h * h / curtisMu / (1 + e*math.Cos(th))
	sO, cO := math.Sincos(node)
	sw, cw := math.Sincos(w)
	si, ci := math.Sincos(inc)
	P := r3.Vec{X: cO*cw - sO*sw*ci, Y: sO*cw + cO*sw*ci, Z: sw * si}
	Q := r3.Vec{X: -cO*sw - sO*cw*ci, Y: -sO*sw + cO*cw*ci, Z: cw * si}
	r = r3.Add(r3.Scale(rr*math.Cos(th), P), r3.Scale(rr*math.Sin(th), Q))
	v = r3.Add(r3.Scale(-curtisMu/h*math.Sin(th), P), r3.Scale(curtisMu/h*(e+math.Cos(th)), Q))
	return r, v
}

// curtisInput returns the example's three observations made from its orbit
// (two-body motion by [ephem.PropagateUniversal]), with the directions'
// right ascensions and declinations in degrees.
func curtisInput(t *testing.T) (in GaussInput, raDeg, decDeg [3]float64) {
	t.Helper()
	r2, v2 := curtisOrbitState()
	times := [3]float64{0, 118.10, 237.58} // s, Curtis Ex. 5.11 (from memory)
	for i := range 3 {
		dt := times[i] - times[1]
		lst := 45.0 + dt*curtisOmegaE*180/math.Pi
		pos, _, err := ephem.PropagateUniversal(r2, v2, dt, curtisMu)
		if err != nil {
			t.Fatal(err)
		}
		R := curtisStation(lst)
		d := r3.Sub(pos, R)
		in.T[i] = times[i]
		in.L[i] = r3.Scale(1/r3.Norm(d), d)
		in.R[i] = R
		ra, dec, _ := astro.Spherical(d)
		raDeg[i], decDeg[i] = ra.Degrees(), dec.Degrees()
	}
	in.Mu = curtisMu
	in.MinRadius = curtisRe
	return in, raDeg, decDeg
}

func TestGaussCurtisExample(t *testing.T) {
	in, ra, dec := curtisInput(t)

	// The observations round to the printed table (Curtis Ex. 5.11, from
	// memory): α to 0.001°, δ to 0.001° (0.0001° for δ1). Tolerance: half a
	// unit of the printed digit, plus the rounding of the printed sidereal
	// times (±0.0005° moves the station 0.04 km, up to 0.0007° at 3640 km).
	wantRA := [3]float64{43.537, 54.420, 64.318}
	wantDec := [3]float64{-8.7833, -12.074, -15.105}
	for i := range 3 {
		if math.Abs(ra[i]-wantRA[i]) > 0.0012 || math.Abs(dec[i]-wantDec[i]) > 0.0012 {
			t.Errorf("observation %d: α = %.5f°, δ = %.5f°; printed %.3f°, %.4f° (Curtis Ex. 5.11)", i+1, ra[i], dec[i], wantRA[i], wantDec[i])
		}
	}
	// Station vectors: R1 = 3489.8 î + 3430.2 ĵ + 4078.5 k̂ km, R2 = 3460.1 î
	// + 3460.1 ĵ + 4078.5 k̂ (Curtis Ex. 5.11, from memory; printed to 0.1 km).
	for i, want := range []r3.Vec{{X: 3489.8, Y: 3430.2, Z: 4078.5}, {X: 3460.1, Y: 3460.1, Z: 4078.5}} {
		R := curtisStation([]float64{44.506, 45.000}[i])
		if d := r3.Sub(R, want); math.Max(math.Abs(d.X), math.Max(math.Abs(d.Y), math.Abs(d.Z))) > 0.05 {
			t.Errorf("station vector R%d = %v, printed %v (Curtis Ex. 5.11)", i+1, R, want)
		}
	}

	// Example 5.11: the first approximation (truncated f and g series).
	first := in
	first.NoRefinement = true
	sols, err := Gauss(first)
	if err != nil {
		t.Fatal(err)
	}
	if len(sols) != 1 {
		t.Fatalf("%d admissible solutions, want 1 (Curtis Ex. 5.11: one positive root)", len(sols))
	}
	s := sols[0]
	// Printed to 0.1 km: tolerance half a unit.
	if math.Abs(s.Root-9241.8) > 0.05 {
		t.Errorf("root r2 = %.3f km, want 9241.8 (Curtis Ex. 5.11)", s.Root)
	}
	for i, want := range [3]float64{3639.1, 3864.8, 4172.8} {
		if math.Abs(s.Range[i]-want) > 0.05 {
			t.Errorf("ρ%d = %.3f km, want %.1f (Curtis Ex. 5.11)", i+1, s.Range[i], want)
		}
	}
	checkVec(t, "Ex. 5.11 r2", s.Pos, r3.Vec{X: 5659.1, Y: 6533.8, Z: 3270.1}, 0.05)

	// Example 5.12: the refinement with exact f and g recovers the orbit.
	sols, err = Gauss(in)
	if err != nil {
		t.Fatal(err)
	}
	if len(sols) != 1 || !sols[0].Converged {
		t.Fatalf("refined: %+v, want one converged solution", sols)
	}
	s = sols[0]
	checkVec(t, "Ex. 5.12 r2", s.Pos, r3.Vec{X: 5662.1, Y: 6538.0, Z: 3269.0}, 0.05)
	el, err := ephem.ElementsFromState(s.Pos, s.Vel, astro.JD{Day: 2451545, Scale: astro.TT}, curtisMu)
	if err != nil {
		t.Fatal(err)
	}
	// Curtis Ex. 5.12 prints a = 10000 km, e = 0.1000, i = 30°, Ω = 270°,
	// ω = 90° (from memory; the orbit the observations were made from).
	// The observations here are exact, so the method must give them to the
	// precision of the iteration: 1e-6 km, 1e-9 in e, 1e-7°.
	deg := func(a astro.Angle) float64 { return a.Degrees() }
	if math.Abs(el.A-10000) > 1e-6 || math.Abs(el.E-0.1) > 1e-9 || math.Abs(deg(el.I)-30) > 1e-7 ||
		math.Abs(deg(el.Node)-270) > 1e-7 || math.Abs(deg(el.Peri)-90) > 1e-7 {
		t.Errorf("elements a = %.9f km, e = %.12f, i = %.9f°, Ω = %.9f°, ω = %.9f°; want 10000, 0.1, 30, 270, 90 (Curtis Ex. 5.12)",
			el.A, el.E, deg(el.I), deg(el.Node), deg(el.Peri))
	}
	rTrue, vTrue := curtisOrbitState()
	if d := r3.Norm(r3.Sub(s.Pos, rTrue)) / r3.Norm(rTrue); d > 1e-10 {
		t.Errorf("refined position off the example's orbit by %g relative", d)
	}
	if d := r3.Norm(r3.Sub(s.Vel, vTrue)) / r3.Norm(vTrue); d > 1e-10 {
		t.Errorf("refined velocity off the example's orbit by %g relative", d)
	}
}

// Gauss's method on the printed (rounded) table of Curtis Ex. 5.11 (from
// memory): the refinement converges, and its distances differ from those of
// the exact observations by no more than the printed precision allows. The
// bound is first order. Each direction is known to δθ = √2·0.0005° (α and δ
// printed to 0.001°), each station to ±0.043 km (the sidereal time printed
// to 0.001°: 4893 km·8.7e-6). With ρ_k = N_k/(c_k·D0), D0 = L1·(L2×L3),
// N_k = w·p_k and w = −(c1R1 − R2 + c3R3) = c1ρ1L1 − ρ2L2 + c3ρ3L3:
//
//	|δD0| ≤ δθ·(|p1| + |p2| + |p3|),  |δN_k| ≤ |δw|·|p_k| + 2δθ·|w|,
//	|δw| ≤ (|c1| + 1 + |c3|)·0.043 km,  |Δρ_k/ρ_k| ≤ |δD0/D0| + |δN_k/N_k|,
//
// with c1 ≈ τ3/τ, c3 ≈ −τ1/τ (their μ terms are 5e-6 here).
func TestGaussCurtisPrintedTable(t *testing.T) {
	exact, _, _ := curtisInput(t)
	exactSols, err := Gauss(exact)
	if err != nil {
		t.Fatal(err)
	}
	d := math.Pi / 180
	rounded := exact
	ra := [3]float64{43.537, 54.420, 64.318}
	dec := [3]float64{-8.7833, -12.074, -15.105}
	lst := [3]float64{44.506, 45.000, 45.499}
	for i := range 3 {
		rounded.L[i] = astro.UnitVector(astro.Angle(ra[i]*d), astro.Angle(dec[i]*d))
		rounded.R[i] = curtisStation(lst[i])
	}
	sols, err := Gauss(rounded)
	if err != nil {
		t.Fatal(err)
	}
	if len(sols) != 1 || !sols[0].Converged {
		t.Fatalf("printed table: %+v, want one converged solution", sols)
	}
	L, rho := exact.L, exactSols[0].Range
	tau1, tau3 := exact.T[0]-exact.T[1], exact.T[2]-exact.T[1]
	c1, c3 := tau3/(tau3-tau1), -tau1/(tau3-tau1)
	p := [3]r3.Vec{r3.Cross(L[1], L[2]), r3.Cross(L[0], L[2]), r3.Cross(L[0], L[1])}
	d0 := r3.Dot(L[0], p[0])
	w := r3.Add(r3.Sub(r3.Scale(c1*rho[0], L[0]), r3.Scale(rho[1], L[1])), r3.Scale(c3*rho[2], L[2]))
	dth := math.Sqrt2 * 0.0005 * d
	dd0 := dth * (r3.Norm(p[0]) + r3.Norm(p[1]) + r3.Norm(p[2]))
	dw := (math.Abs(c1) + 1 + math.Abs(c3)) * 0.043
	for k := range 3 {
		nk := r3.Dot(w, p[k])
		dn := dw*r3.Norm(p[k]) + 2*dth*r3.Norm(w)
		bound := math.Abs(dd0/d0) + math.Abs(dn/nk)
		if rel := math.Abs(sols[0].Range[k]-rho[k]) / rho[k]; rel > bound {
			t.Errorf("ρ%d from the printed table = %.3f km, exact %.3f km: %.2g relative, bound %.2g", k+1, sols[0].Range[k], rho[k], rel, bound)
		} else {
			t.Logf("ρ%d from the printed table = %.3f km, exact %.3f km: %.2g relative, bound %.2g", k+1, sols[0].Range[k], rho[k], rel, bound)
		}
	}
}

func checkVec(t *testing.T, what string, got, want r3.Vec, tol float64) {
	t.Helper()
	d := r3.Sub(got, want)
	if math.Abs(d.X) > tol || math.Abs(d.Y) > tol || math.Abs(d.Z) > tol {
		t.Errorf("%s = (%.4f, %.4f, %.4f), want (%v, %v, %v) ± %g", what, got.X, got.Y, got.Z, want.X, want.Y, want.Z, tol)
	}
}

// The core's input checks and its degenerate cases give errors, not NaN.
func TestGaussInvalidInput(t *testing.T) {
	good, _, _ := curtisInput(t)
	cases := []struct {
		name string
		mod  func(*GaussInput)
	}{
		{"mu zero", func(in *GaussInput) { in.Mu = 0 }},
		{"mu NaN", func(in *GaussInput) { in.Mu = math.NaN() }},
		{"times not increasing", func(in *GaussInput) { in.T[2] = in.T[1] }},
		{"time NaN", func(in *GaussInput) { in.T[0] = math.NaN() }},
		{"line of sight not unit", func(in *GaussInput) { in.L[1] = r3.Scale(2, in.L[1]) }},
		{"observer Inf", func(in *GaussInput) { in.R[0].X = math.Inf(1) }},
		{"negative light speed", func(in *GaussInput) { in.C = -1 }},
		{"negative MinRange", func(in *GaussInput) { in.MinRange = -1 }},
	}
	for _, c := range cases {
		in := good
		c.mod(&in)
		sols, err := Gauss(in)
		if err == nil || sols != nil {
			t.Errorf("%s: got %v, %v; want an error", c.name, sols, err)
		}
	}
	// Three lines of sight in one plane: D0 = 0.
	in := good
	in.L[1] = r3.Unit(r3.Add(in.L[0], in.L[2]))
	_, err := Gauss(in)
	var de *DegenerateError
	if !errors.As(err, &de) || de.Case != DegenerateGreatCircle {
		t.Errorf("coplanar lines of sight: err = %v, want a DegenerateGreatCircle error", err)
	}
	// The middle line of sight mirrored through the plane of the outer two:
	// the track curves the wrong way for any orbit seen from this station,
	// and every root gives a negative distance.
	in = good
	n := r3.Unit(r3.Cross(in.L[0], in.L[2]))
	in.L[1] = r3.Sub(in.L[1], r3.Scale(2*r3.Dot(in.L[1], n), n))
	sols, err := Gauss(in)
	if !errors.As(err, &de) || de.Case != DegenerateNoSolution {
		t.Errorf("mirrored curvature: sols %+v, err = %v, want a DegenerateNoSolution error", sols, err)
	}
}

// Random geometry, admissible or not, never gives NaN or a panic: either an
// error or solutions with finite, admissible values.
func TestGaussRandomGeometryNoNaN(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	unit := func() r3.Vec {
		for {
			v := r3.Vec{X: 2*rng.Float64() - 1, Y: 2*rng.Float64() - 1, Z: 2*rng.Float64() - 1}
			if n := r3.Norm(v); n > 0.1 && n <= 1 {
				return r3.Scale(1/n, v)
			}
		}
	}
	n := 3000
	if testing.Short() {
		n = 300
	}
	nSol := 0
	for k := range n {
		var in GaussInput
		in.Mu = ephem.GMSun
		if k%3 == 0 {
			in.C = astro.SpeedOfLightAUDay
		}
		t0 := 20 * rng.Float64()
		in.T = [3]float64{0, t0 * rng.Float64(), t0}
		if !(in.T[1] > 0 && in.T[1] < in.T[2]) {
			continue
		}
		// Either fully random lines of sight, or a smooth track: a direction
		// moving along a small circle.
		base, rate := unit(), 0.02*rng.Float64()
		axis := r3.Unit(r3.Cross(base, unit()))
		for i := range 3 {
			in.R[i] = r3.Scale(0.5+rng.Float64(), unit())
			in.CentreVel[i] = r3.Scale(1e-5, unit())
			if k%2 == 0 {
				in.L[i] = unit()
			} else {
				ang := rate * in.T[i]
				l := r3.Add(r3.Scale(math.Cos(ang), base), r3.Scale(math.Sin(ang), r3.Cross(axis, base)))
				l = r3.Add(l, r3.Scale(1e-3*rng.NormFloat64()*ang, axis))
				in.L[i] = r3.Unit(l)
			}
		}
		sols, err := Gauss(in)
		if err != nil {
			if sols != nil {
				t.Fatalf("case %d: solutions with an error", k)
			}
			continue
		}
		for _, s := range sols {
			nSol++
			vals := []float64{s.Pos.X, s.Pos.Y, s.Pos.Z, s.Vel.X, s.Vel.Y, s.Vel.Z, s.Epoch, s.Root, s.Range[0], s.Range[1], s.Range[2]}
			for _, v := range vals {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					t.Fatalf("case %d: non-finite solution %+v", k, s)
				}
			}
			for _, rho := range s.Range {
				if !(rho > 0) {
					t.Fatalf("case %d: solution with ρ = %g", k, rho)
				}
			}
		}
	}
	if nSol == 0 {
		t.Errorf("no random geometry gave a solution: the property was not exercised")
	}
}
