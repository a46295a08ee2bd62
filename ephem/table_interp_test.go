package ephem

import (
	"errors"
	"math"
	"runtime"
	"testing"

	"arcfit/astro"

	"gonum.org/v1/gonum/spatial/r3"
)

// TestChebSkyAgainstSeries samples an interpolated span of 8 days (the
// longest a table uses) between its nodes and compares every quantity with
// its series. Chebyshev interpolation of degree 16 of functions whose fastest
// terms turn by about 1 rad/day (the Moon) has a truncation error below 1e-16
// of their size over 8 days (Press et al., Numerical Recipes, 3rd ed. (2007),
// §5.8); what remains is the rounding noise of the series themselves, which
// the interpolant smooths: a VSOP87 term's argument B + Cτ reaches 1e2–1e4
// rad and is rounded to parts in 1e16, some 1e-13 au in the Earth's position
// (the measured difference does not shrink with shorter spans or more nodes,
// which a truncation error would). The tolerances: 1e-12 au (0.15 m) for the
// Earth, 1e-14 au for the Sun's offset and for the Moon, 1e-14 for the matrix
// and 1e-16 rad for the equation of the equinoxes — all far below every
// accuracy the package states (milliarcseconds and above).
func TestChebSkyAgainstSeries(t *testing.T) {
	ref := astro.NewJD(2461446.5, astro.TT)
	cs, err := newChebSky(ref, -tableSkyMarginDays, tableSkyDays)
	if err != nil {
		t.Fatal(err)
	}
	var worst [5]float64
	for k := 0; k <= 997; k++ {
		d := -tableSkyMarginDays + (tableSkyDays+tableSkyMarginDays)*float64(k)/997
		tt := ref.AddDays(d)
		tdb := tt
		tdb.Scale = astro.TDB
		ep, ev, _ := cs.earth(tdb)
		wp, wv, _ := HeliocentricICRS(Earth, tdb)
		sp, sv := cs.sun(tdb)
		wsp, wsv := SunBarycentricICRS(tdb)
		worst[0] = max(worst[0], r3.Norm(r3.Sub(ep, wp)), r3.Norm(r3.Sub(ev, wv)))
		worst[1] = max(worst[1], r3.Norm(r3.Sub(sp, wsp)), r3.Norm(r3.Sub(sv, wsv)))
		worst[2] = max(worst[2], r3.Norm(r3.Sub(cs.moon(tt), MoonGeocentricICRS(tt))))
		m, wm := cs.npb(tt), astro.BiasPrecessionNutationMatrix(tt)
		for i := range 3 {
			for j := range 3 {
				worst[3] = max(worst[3], math.Abs(m[i][j]-wm[i][j]))
			}
		}
		worst[4] = max(worst[4], math.Abs(cs.value(skyEqEq, basisAt(t, cs, tt))-float64(astro.EquationOfEquinoxes(tt))))
	}
	for i, c := range []struct {
		what string
		tol  float64
	}{{"Earth (au, au/day)", 1e-12}, {"Sun offset (au, au/day)", 1e-14}, {"Moon (au)", 1e-14}, {"NPB matrix", 1e-14}, {"equation of the equinoxes (rad)", 1e-16}} {
		if !(worst[i] <= c.tol) {
			t.Errorf("%s: interpolation departs from the series by %.3g, tol %.3g", c.what, worst[i], c.tol)
		}
		t.Logf("%s: worst %.3g", c.what, worst[i])
	}
	// Outside the span the series answer.
	out := ref.AddDays(tableSkyDays + 1)
	if got, want := cs.moon(out), MoonGeocentricICRS(out); got != want {
		t.Errorf("outside the span: Moon %v, want the series' %v", got, want)
	}
}

func basisAt(t *testing.T, cs *chebSky, j astro.JD) *[tableSkyNodes]float64 {
	t.Helper()
	var b [tableSkyNodes]float64
	if !cs.basis(j, &b) {
		t.Fatalf("%v outside the span", j)
	}
	return &b
}

// TestEphemerisTableInterpolated makes dense tables (10-minute rows over 20
// days, so that every run is interpolated) of an element set, the Sun, the
// Moon and Mars, from the geocentre and from a site, and compares every
// seventh row with the place computed from the series
// ([TableTarget.PlaceAt]). The tolerance on every angle is the Earth's
// 1e-12 au of TestChebSkyAgainstSeries seen from the body's distance Δ
// (1e-12/Δ rad: 0.08 mas for the Moon, 0.2 µas at 1 au) plus 1e-6″, and 1e-11
// au on the distances: far below the 1 mas at which the package states any
// accuracy. The table must be the same with one worker as with several.
func TestEphemerisTableInterpolated(t *testing.T) {
	from := astro.NewJD(2461440.5, astro.UTC)
	to := from.AddDays(20)
	site := &astro.Site{Name: "Invented Hill", Lat: astro.AngleFromDegrees(42.3), Lon: astro.AngleFromDegrees(-101.5), HeightM: 930}
	el := benchElements
	const auTol = 1e-11
	for _, o := range []Observer{{}, {Site: site, DUT1Sec: 0.2}} {
		for _, tg := range []TableTarget{{Elements: &el}, {Body: Sun}, {Body: Moon}, {Body: Mars}} {
			places, err := EphemerisTable(tg, from, to, 10.0/1440, o)
			if err != nil && !errors.Is(err, astro.ErrStaleTable) {
				t.Fatal(err)
			}
			var worst float64
			for k := 0; k < len(places); k += 7 {
				p := places[k]
				want, _ := tg.PlaceAt(p.UTC, o)
				angTol := 1e-6 + astro.Angle(1e-12/want.DeltaAU).Arcseconds()
				rowWorst := 0.0
				for _, d := range []astro.Angle{
					p.RA - want.RA, p.Dec - want.Dec, p.RAApp - want.RAApp, p.DecApp - want.DecApp,
					p.Alt - want.Alt, p.Az - want.Az, p.Elongation - want.Elongation,
					p.PhaseAngle - want.PhaseAngle, p.MoonSeparation - want.MoonSeparation,
				} {
					a := math.Abs(astro.Angle(math.Remainder(float64(d), 2*math.Pi)).Arcseconds())
					rowWorst = max(rowWorst, a)
				}
				worst = max(worst, rowWorst)
				if !(rowWorst <= angTol) || math.Abs(p.DeltaAU-want.DeltaAU) > auTol || math.Abs(p.RAU-want.RAU) > auTol ||
					p.UTC != want.UTC || p.TT != want.TT || p.Topocentric != want.Topocentric {
					t.Fatalf("%s site %v row %d: %+v, want %+v (angle Δ %.3g″, tol %.3g″)", tg.Name(), o.Site != nil, k, p, want, rowWorst, angTol)
				}
			}
			t.Logf("%s site %v: %d rows, worst angle difference %.3g″", tg.Name(), o.Site != nil, len(places), worst)
		}
	}
	prev := runtime.GOMAXPROCS(1)
	one, _ := EphemerisTable(TableTarget{Elements: &el}, from, to, 10.0/1440, Observer{Site: site})
	runtime.GOMAXPROCS(max(prev, 2))
	many, _ := EphemerisTable(TableTarget{Elements: &el}, from, to, 10.0/1440, Observer{Site: site})
	runtime.GOMAXPROCS(prev)
	for k := range one {
		if one[k] != many[k] {
			t.Fatalf("row %d differs between one worker and several", k)
		}
	}
}
