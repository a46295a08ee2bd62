package astro

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

func hms(h, m, s float64) Angle { return AngleFromHours(h + m/60 + s/3600) }

// θ Persei as in Meeus, Astronomical Algorithms, 2nd ed., Example 21.b
// (p. 135): α2000 = 2h44m11.986s, δ2000 = +49°13′42.48″, proper motion
// +0.03425 s/yr and −0.0895″/yr, to 2028 Nov 13.19 TD = JDE 2462088.69.
var (
	thetaPerTT    = NewJD(2462088.69, TT)
	thetaPerYears = (2462088.69 - J2000) / 365.25
	thetaPerRA    = hms(2, 44, 11.986) + Angle(0.03425*thetaPerYears)*TimeSecond
	thetaPerDec   = dms(49, 13, 42.48) - Angle(0.0895*thetaPerYears)*Arcsecond
)

// raDiff returns a − b in right ascension, wrapped to (−π, π].
func raDiff(a, b Angle) Angle { return (a - b).Wrapped() }

func TestPrecessionMeeus21b(t *testing.T) {
	dir := UnitVector(thetaPerRA, thetaPerDec)
	ra76, dec76, _ := Spherical(PrecessionMatrix1976(thetaPerTT).MulVec(dir))
	ra06, dec06, _ := Spherical(PrecessionMatrix2006(thetaPerTT).MulVec(dir))
	wantRA, wantDec := hms(2, 46, 11.331), dms(49, 20, 54.54)
	// The IAU 2006 angles differ from the IAU 1976 ones (both published
	// polynomials, Meeus 21.2–21.4 and IERS 2010 eq. 5.40); a rotation by
	// R3(−z)R2(θ)R3(−ζ) moves δ by at most |Δθ| and α by at most
	// |Δζ| + |Δz| + |Δθ|·tan δ. That bound, plus the book's printed precision,
	// is the tolerance of the IAU 2006 check.
	z1, zz1, th1 := PrecessionAngles1976(thetaPerTT)
	z2, zz2, th2 := PrecessionAngles2006(thetaPerTT)
	abs := func(a Angle) Angle { return Angle(math.Abs(float64(a))) }
	tolDec06 := abs(th2-th1) + 0.01*Arcsecond
	tolRA06 := abs(z2-z1) + abs(zz2-zz1) + abs(th2-th1)*Angle(math.Tan(float64(wantDec))) + 1e-3*TimeSecond
	tests := []struct {
		name          string
		ra, dec       Angle
		tolRA, tolDec Angle
		src           string
	}{
		// The book's own (IAU 1976) method, printed to 1 ms and 0.01″.
		{"IAU 1976", ra76, dec76, 1e-3 * TimeSecond, 0.01 * Arcsecond, "Meeus 21.b: α = 2h46m11.331s, δ = +49°20′54.54″"},
		{"IAU 2006", ra06, dec06, tolRA06, tolDec06, "Meeus 21.b with the IAU 1976/2006 angle differences"},
	}
	for _, c := range tests {
		dra, ddec := raDiff(c.ra, wantRA), c.dec-wantDec
		if math.Abs(float64(dra)) > float64(c.tolRA) || math.Abs(float64(ddec)) > float64(c.tolDec) {
			t.Errorf("%s precession of θ Per to %v: α off by %.4f s, δ by %.4f″ (tol %.4f s, %.4f″) [%s]",
				c.name, thetaPerTT, float64(dra/TimeSecond), ddec.Arcseconds(), float64(c.tolRA/TimeSecond), c.tolDec.Arcseconds(), c.src)
		}
	}
}

// Meeus Example 23.a (p. 152): θ Per on 2028 Nov 13.19 TD, continuing 21.b.
func TestApparentMeeus23a(t *testing.T) {
	tt := thetaPerTT
	dir := UnitVector(thetaPerRA, thetaPerDec)
	p76 := PrecessionMatrix1976(tt)
	mean := p76.MulVec(dir)
	raM, decM, _ := Spherical(mean)

	// Nutation part. The book prints 0.001″; its eq. 23.1 is first order in Δψ,
	// Δε, which leaves second-order terms of about (7e-5 rad)²·(tan δ)… ≈ 0.001″:
	// tolerance 0.002″.
	raN, decN, _ := Spherical(NutationMatrix(tt).MulVec(mean))
	dRA1, dDec1 := raDiff(raN, raM), decN-decM
	check := func(name string, got, want, tol Angle, src string) {
		t.Helper()
		if d := got - want; math.Abs(float64(d)) > float64(tol) {
			t.Errorf("Meeus 23.a %s = %.4f″, want %.4f″ (Δ %.3g mas, tol %.3g) [%s]", name, got.Arcseconds(), want.Arcseconds(), d.Milliarcseconds(), tol.Milliarcseconds(), src)
		}
	}
	check("Δα1 (nutation)", dRA1, 15.843*Arcsecond, 0.002*Arcsecond, "Meeus 23.a: Δα1 = +15.843″")
	check("Δδ1 (nutation)", dDec1, 6.217*Arcsecond, 0.002*Arcsecond, "Meeus 23.a: Δδ1 = +6.217″")

	// Aberration part, in the mean frame of date. The book's classical
	// formula (23.3) gives +30.045″, +6.697″; the relativistic law with ERFA's
	// epv00 velocity gives +30.065″, +6.693″ (shared/checks/meeus.md, ERFA
	// column). arcfit's approximate Earth velocity is documented to 0.016″ of
	// the latter; in α (RA units) at δ = 49.3° that is 0.016″/cos δ = 0.025″.
	v := PrecessionMatrix1976(tt).MulVec(EarthVelocityApprox(JD{Day: tt.Day, Frac: tt.Frac, Scale: TDB}))
	raA, decA, _ := Spherical(Aberration(mean, v))
	dRA2, dDec2 := raDiff(raA, raM), decA-decM
	check("Δα2 (aberration)", dRA2, 30.065*Arcsecond, 0.025*Arcsecond, "meeus.md 23.a ERFA ab + epv00: +30.065″")
	check("Δδ2 (aberration)", dDec2, 6.693*Arcsecond, 0.016*Arcsecond, "meeus.md 23.a ERFA ab + epv00: +6.693″")
	check("Δα2 vs book", dRA2, 30.045*Arcsecond, 0.05*Arcsecond, "Meeus 23.a: Δα2 = +30.045″ (book method 0.05″)")
	check("Δδ2 vs book", dDec2, 6.697*Arcsecond, 0.05*Arcsecond, "Meeus 23.a: Δδ2 = +6.697″ (book method 0.05″)")

	// Final apparent place with the book's chain (IAU 1976 precession, IAU 1980
	// nutation, aberration). Book: 2h46m14.390s, +49°21′07.45″ (5 ms / 0.05″);
	// ERFA pnm80 + ab: 2h46m14.3916s, +49°21′07.445″ (meeus.md), to which the
	// velocity bound above applies (0.025″ = 1.7 ms in α).
	vJ := EarthVelocityApprox(JD{Day: tt.Day, Frac: tt.Frac, Scale: TDB})
	ra, dec, _ := Spherical(NutationMatrix(tt).Mul(p76).MulVec(Aberration(dir, vJ)))
	for _, c := range []struct {
		name          string
		ra, dec       Angle
		tolRA, tolDec Angle
		src           string
	}{
		{"book", hms(2, 46, 14.390), dms(49, 21, 7.45), 5e-3 * TimeSecond, 0.05 * Arcsecond, "Meeus 23.a"},
		{"ERFA", hms(2, 46, 14.3916), dms(49, 21, 7.445), 1.7e-3 * TimeSecond, 0.016 * Arcsecond, "meeus.md 23.a ERFA pnm80 + ab"},
	} {
		dra, ddec := raDiff(ra, c.ra), dec-c.dec
		if math.Abs(float64(dra)) > float64(c.tolRA) || math.Abs(float64(ddec)) > float64(c.tolDec) {
			t.Errorf("apparent θ Per (%s): α off by %.4f s, δ by %.4f″ [%s]", c.name, float64(dra/TimeSecond), ddec.Arcseconds(), c.src)
		}
	}
}

// Meeus Example 23.b (p. 156): aberration of θ Per, J2000 place moved by its
// proper motion to 2028 Nov 13.19 TD: α = 2h44m12.9747s, δ = +49°13′39.896″.
// Ron–Vondrák (book): Δα = +0.000145252, Δδ = +0.000032723 rad; ERFA ab with
// the epv00 velocity (meeus.md): +0.000145257, +0.000032718 rad. arcfit's
// approximate velocity is documented to 0.016″ = 7.8e-8 rad on the sky
// (1.2e-7 rad in α at this δ).
func TestAberrationMeeus23b(t *testing.T) {
	ra, dec := hms(2, 44, 12.9747), dms(49, 13, 39.896)
	v := EarthVelocityApprox(JD{Day: thetaPerTT.Day, Frac: thetaPerTT.Frac, Scale: TDB})
	raA, decA, _ := Spherical(Aberration(UnitVector(ra, dec), v))
	dRA, dDec := raDiff(raA, ra), decA-dec
	for _, c := range []struct {
		name      string
		got, want float64
		tol       float64
		src       string
	}{
		{"Δα", float64(dRA), 0.000145257, 1.2e-7, "meeus.md 23.b ERFA ab"},
		{"Δδ", float64(dDec), 0.000032718, 7.8e-8, "meeus.md 23.b ERFA ab"},
		{"Δα", float64(dRA), 0.000145252, 1.2e-7, "Meeus 23.b Ron–Vondrák"},
		{"Δδ", float64(dDec), 0.000032723, 7.8e-8, "Meeus 23.b Ron–Vondrák"},
	} {
		if d := c.got - c.want; math.Abs(d) > c.tol {
			t.Errorf("Aberration θ Per: %s = %.9f rad, want %.9f (Δ %.3g rad) [%s]", c.name, c.got, c.want, d, c.src)
		}
	}
}

func TestAberrationLimits(t *testing.T) {
	// The zero direction gives the zero vector, not NaN.
	if got := Aberration(r3.Vec{}, r3.Vec{X: 0.017}); got != (r3.Vec{}) {
		t.Errorf("Aberration(0, v) = %v, want 0", got)
	}
	// A source straight ahead (apex) does not move; one at 90° moves by
	// arcsin(v/c)-like amounts: atan(V/β⁻¹)… For V ⊥ p the law gives
	// p′ = β⁻¹ p + V, so the angle is atan(V/β⁻¹) = asin(V) (Explanatory
	// Supplement 1992, eq. 3.252-3 evaluated by hand).
	v := r3.Vec{X: 0.0172}
	if got := Aberration(r3.Vec{X: 2}, v); separation(got, r3.Vec{X: 1}) > 1e-15 {
		t.Errorf("Aberration at the apex moved the direction to %v", got)
	}
	got := Aberration(r3.Vec{Y: 1}, v)
	want := Angle(math.Asin(0.0172 / SpeedOfLightAUDay))
	if d := separation(got, r3.Vec{Y: 1}) - want; math.Abs(float64(d)) > 1e-15 {
		t.Errorf("Aberration at 90°: %.6f″, want %.6f″", separation(got, r3.Vec{Y: 1}).Arcseconds(), want.Arcseconds())
	}
}
