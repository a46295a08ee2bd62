package astro

import (
	"math"
	"testing"
)

// rotHMS returns the angle of h hours, m minutes and s seconds of time.
func rotHMS(h, m, s float64) Angle { return AngleFromHours(h + m/60 + s/3600) }

// TestSiderealMeeus checks the sidereal times against Meeus, Astronomical
// Algorithms, 2nd ed., examples 12.a and 12.b (values as collected in
// shared/checks/meeus.md). Tolerances are that note's: 1e-4 s for Meeus' own
// algorithm (the book prints 0.0001 s), 5 ms for the IAU 2006 GMST, which is a
// different model (the note's ERFA gmst06 recomputation gives 46.3701 s).
// Meeus takes the nutation of 12.a at 0h TD (example 22.a), so tt below is
// the same Julian date on TT; the equation of the equinoxes changes by less
// than 1 µs over a ΔT of a minute.
func TestSiderealMeeus(t *testing.T) {
	ut1a := NewJD(2446895.5, UT1) // 1987 Apr 10 0h UT
	tta := NewJD(2446895.5, TT)
	ut1b := JD{Day: 2446895.5, Frac: 0.80625, Scale: UT1} // 1987 Apr 10 19h21m00s UT
	const ms = 1e-3 * float64(TimeSecond)
	tests := []struct {
		name string
		got  Angle
		want Angle
		tol  float64 // rad
		src  string
	}{
		{"mean 1982", GreenwichMeanSiderealTime1982(ut1a), rotHMS(13, 10, 46.3668), 0.1 * ms,
			"Meeus ex. 12.a: θ0 = 13h10m46.3668s"},
		{"mean 1982 degrees", GreenwichMeanSiderealTime1982(ut1a), AngleFromDegrees(197.693195), 1e-6 * float64(Degree),
			"Meeus ex. 12.a: θ0 = 197.693195°"},
		{"apparent 1982", GreenwichMeanSiderealTime1982(ut1a) + EquationOfEquinoxes(tta), rotHMS(13, 10, 46.1351), 0.1 * ms,
			"Meeus ex. 12.a: apparent θ0 = 13h10m46.1351s"},
		{"mean 1982 at 19h21m", GreenwichMeanSiderealTime1982(ut1b), AngleFromDegrees(128.7378734), 0.1 * ms,
			"Meeus ex. 12.b: θ0 = 128.7378734° = 8h34m57.0896s"},
		{"mean 2006", GreenwichMeanSiderealTime(ut1a, tta), rotHMS(13, 10, 46.3668), 5 * ms,
			"Meeus ex. 12.a, other-model tolerance [5 ms]"},
		{"apparent 2006", GreenwichApparentSiderealTime(ut1a, tta), rotHMS(13, 10, 46.1351), 5 * ms,
			"Meeus ex. 12.a, other-model tolerance [5 ms]"},
	}
	for _, tc := range tests {
		d := math.Abs(rotAngleDiff(tc.got, tc.want))
		if d > tc.tol {
			t.Errorf("%s: θ0 = %.9f h, want %.9f h (Δ %.3g ms) [%s]",
				tc.name, tc.got.Hours(), tc.want.Hours(), d/ms, tc.src)
		}
	}
}

// TestEquationOfEquinoxesMeeus checks the equation of the equinoxes of
// Meeus ex. 12.a: Δψ cos ε with Δψ = −3.788″, ε = 23°26′36.85″ is −0.2317 s
// (13h10m46.3668s − 13h10m46.1351s); tolerance 1e-4 s, the book's last digit.
func TestEquationOfEquinoxesMeeus(t *testing.T) {
	got := EquationOfEquinoxes(NewJD(2446895.5, TT))
	want := rotHMS(0, 0, 46.1351-46.3668) // Meeus ex. 12.a
	const tol = 1e-4 * float64(TimeSecond)
	if d := math.Abs(float64(got - want)); d > tol {
		t.Errorf("EquationOfEquinoxes(1987 Apr 10 0h TT) = %.5f s, want %.5f s (Δ %.3g ms) [Meeus 12.a]",
			float64(got/TimeSecond), float64(want/TimeSecond), d/float64(TimeSecond)*1e3)
	}
}

// TestSiderealERFA checks the sidereal times over 1900–2100 against
// python3-erfa 2.0.0.1 (testdata/erfa_sidereal.txt, made by
// testdata/gen/erfa_rotation.py):
//   - GreenwichMeanSiderealTime vs erfa.gmst06: the issue asks for 1 ms; the
//     two evaluate the same IERS 2010 eq. 5.32, so the check here is 1 µs.
//   - GreenwichMeanSiderealTime1982 vs erfa.gmst82: Meeus' eq. 12.4 rounds the
//     rate to 360.98564736629°/day; a unit in its last digit grows to 0.1 ms
//     over a century from J2000, the tolerance.
//   - EquationOfEquinoxes vs erfa.eqeq94: same IAU 1980 series and terms;
//     ERFA takes the 1980 obliquity (a 1e-6″ effect); tolerance 10 µas.
//   - GreenwichApparentSiderealTime vs erfa.gst06a (IAU 2006/2000A) corrected
//     by the difference of the two equations of the equinoxes, erfa.eqeq94 −
//     erfa.ee06a (the IAU 1980 nutation departs from 2000A by up to 16 mas in
//     Δψ cos ε over 1900–2100, in that table): tolerance 10 µas. The raw
//     difference from gst06a is logged.
func TestSiderealERFA(t *testing.T) {
	const us = 1e-6 * float64(TimeSecond)
	const uas = 1e-3 * float64(Milliarcsecond)
	type check struct {
		name string
		col  int
		f    func(ut1, tt JD) Angle
		tol  float64
		src  string
	}
	checks := []check{
		{"GreenwichMeanSiderealTime", sidGMST06, GreenwichMeanSiderealTime, 1 * us, "erfa.gmst06"},
		{"GreenwichMeanSiderealTime1982", sidGMST82, func(u, _ JD) Angle { return GreenwichMeanSiderealTime1982(u) }, 100 * us, "erfa.gmst82"},
		{"EquationOfEquinoxes", sidEqEq94, func(_, tt JD) Angle { return EquationOfEquinoxes(tt) }, 10 * uas, "erfa.eqeq94"},
		{"GreenwichApparentSiderealTime", -1, GreenwichApparentSiderealTime, 10 * uas, "erfa.gst06a + eqeq94 − ee06a"},
	}
	rows := rotTable(t, "erfa_sidereal.txt", sidNCols)
	for _, c := range checks {
		worst, worstAt := 0.0, JD{}
		for _, r := range rows {
			ut1, tt := sidDates(r)
			got := c.f(ut1, tt)
			var want Angle
			if c.col >= 0 {
				want = Angle(r[c.col])
			} else {
				want = Angle(r[sidGST06A] + r[sidEqEq94] - r[sidEE06A])
			}
			d := math.Abs(rotAngleDiff(got, want))
			if d > worst {
				worst, worstAt = d, ut1
			}
			if d > c.tol {
				t.Errorf("%s(%v): %.15g rad, want %.15g (Δ %.3g µs) [%s]",
					c.name, ut1, float64(got), float64(want), d/us, c.src)
			}
		}
		t.Logf("%s vs %s, %d instants 1900–2100: worst %.3g µs (%.3g µas) at %v",
			c.name, c.src, len(rows), worst/us, worst/uas, worstAt)
	}
	// The measured model difference GAST(IAU 1980 nutation) − gst06a, for the
	// report; it is what the correction above removes.
	raw := 0.0
	for _, r := range rows {
		ut1, tt := sidDates(r)
		raw = math.Max(raw, math.Abs(rotAngleDiff(GreenwichApparentSiderealTime(ut1, tt), Angle(r[sidGST06A]))))
	}
	t.Logf("GreenwichApparentSiderealTime − erfa.gst06a (the 1980 − 2000A nutation difference): worst %.3g ms (%.3g mas)",
		raw/us/1000, raw/uas/1000)
}

// TestLocalHourAngleMeeus checks the local hour angle of Meeus ex. 13.b:
// Venus at α = 23h09m16.641s seen from longitude 77°03′56″ W at apparent
// θ0 = 8h34m56.853s has H ≈ 64.352° (Meeus ex. 13.b; shared/checks/meeus.md,
// ERFA recomputation 64.3520°); tolerance 5e-4°, the printed precision.
func TestLocalHourAngleMeeus(t *testing.T) {
	gast := rotHMS(8, 34, 56.853)
	lon := -AngleFromDegrees(77 + 3.0/60 + 56.0/3600) // east positive
	ra := rotHMS(23, 9, 16.641)
	lst := LocalSiderealTime(gast, lon)
	h := LocalHourAngle(lst, ra)
	if d := math.Abs(h.Degrees() - 64.352); d > 5e-4 {
		t.Errorf("LocalHourAngle = %.6f°, want 64.352° (Meeus 13.b)", h.Degrees())
	}
	if lst < 0 || lst >= 2*math.Pi {
		t.Errorf("LocalSiderealTime = %v rad, want in [0, 2π)", float64(lst))
	}
}

// TestLocalHourAngleRange checks the sign convention stated in the issue
// (west positive, (−π, π]; common practice, Meeus ch. 13): an object 1h of
// right ascension east of the meridian has H = −1h; 1h west, +1h; on the
// lower meridian, +12h, never −12h.
func TestLocalHourAngleRange(t *testing.T) {
	tests := []struct {
		name     string
		lst, ra  Angle
		wantHour float64
	}{
		{"east of meridian", AngleFromHours(0.5), AngleFromHours(1.5), -1},
		{"west of meridian", AngleFromHours(23.5), AngleFromHours(22.5), 1},
		{"across 0h", AngleFromHours(0.25), AngleFromHours(23.25), 1},
		{"lower meridian", AngleFromHours(6), AngleFromHours(18), 12},
		{"lower meridian reversed", AngleFromHours(18), AngleFromHours(6), 12},
	}
	for _, tc := range tests {
		got := LocalHourAngle(tc.lst, tc.ra).Hours()
		if math.Abs(got-tc.wantHour) > 1e-12 {
			t.Errorf("%s: LocalHourAngle = %.15f h, want %g h", tc.name, got, tc.wantHour)
		}
	}
}

func BenchmarkGreenwichApparentSiderealTime(b *testing.B) {
	b.ReportAllocs()
	ut1 := JD{Day: 2461440.5, Frac: 0.38478, Scale: UT1}
	tt := JD{Day: 2461440.5, Frac: 0.38558, Scale: TT}
	var sink Angle
	for i := 0; i < b.N; i++ {
		sink += GreenwichApparentSiderealTime(ut1, tt)
	}
	_ = sink
}
