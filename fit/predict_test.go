package fit

import (
	"bufio"
	"bytes"
	"math"
	"strconv"
	"strings"
	"testing"

	"arcfit/astro"
	"arcfit/fit/demo"
)

// TestEllipse: hand-worked ellipses.
func TestEllipse(t *testing.T) {
	s3 := math.Sqrt(3)
	tests := []struct {
		name         string
		cov          [2][2]float64
		n            float64
		major, minor float64
		paDeg        float64
		src          string
	}{
		// diag(4, 1) arcsec²: eigenvalues 4 and 1, major axis along RA (east),
		// PA 90°; at 3σ the semi-axes are 3·2 and 3·1.
		{"diagonal east", [2][2]float64{{4, 0}, {0, 1}}, 3, 6, 3, 90, "hand-worked"},
		// diag(1, 9): major along Dec, PA 0°, semi-axes 3 and 1 at 1σ.
		{"diagonal north", [2][2]float64{{1, 0}, {0, 9}}, 1, 3, 1, 0, "hand-worked"},
		// λ₁ = 4 along PA 30° (unit vector (E, N) = (sin 30°, cos 30°) =
		// (1/2, √3/2)), λ₂ = 1 across: C = 4 v vᵀ + w wᵀ gives
		// a = 4/4 + 3/4 = 1.75, c = 4·3/4 + 1/4 = 3.25, b = (4 − 1)·√3/4.
		{"rotated 30°", [2][2]float64{{1.75, 3 * s3 / 4}, {3 * s3 / 4, 3.25}}, 1, 2, 1, 30, "hand-worked"},
		// the same at PA 150° (b changes sign).
		{"rotated 150°", [2][2]float64{{1.75, -3 * s3 / 4}, {-3 * s3 / 4, 3.25}}, 2, 4, 2, 150, "hand-worked"},
		// a circle: both semi-axes √2, PA 0 by convention.
		{"circle", [2][2]float64{{2, 0}, {0, 2}}, 1, math.Sqrt2, math.Sqrt2, 0, "hand-worked"},
	}
	for _, tc := range tests {
		e := Prediction{CovArcsec2: tc.cov}.Ellipse(tc.n)
		if math.Abs(e.SemiMajorArcsec-tc.major) > 1e-12 || math.Abs(e.SemiMinorArcsec-tc.minor) > 1e-12 ||
			math.Abs(e.PA.Degrees()-tc.paDeg) > 1e-9 || e.Sigma != tc.n {
			t.Errorf("Ellipse(%s): %.12g × %.12g″ at PA %.9g°, want %.12g × %.12g″ at %.9g° (%s)",
				tc.name, e.SemiMajorArcsec, e.SemiMinorArcsec, e.PA.Degrees(), tc.major, tc.minor, tc.paDeg, tc.src)
		}
	}
}

// TestPredictAtObservations: the prediction at each observation's time and
// site equals the fitted position. The fit projects the site vector at the
// observed direction, the prediction at the modelled one; they differ by the
// residual r (~0.5″ = 2.4e-6 rad), which changes the projected parallax p
// (~5″) by ~r·p ≈ 12 µas — hence the 0.1 mas tolerance (8×).
func TestPredictAtObservations(t *testing.T) {
	tr, sites := demoTrack(t)
	sol, err := Fit(tr, Poly(2), Settings{})
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range tr.Points {
		st := sites[p.Site]
		pr, err := sol.Predict(p.UTC, &st)
		if err != nil {
			t.Fatal(err)
		}
		xi, eta, _ := tr.Plane.Project(pr.RA, pr.Dec)
		cx, ce := sol.computed(p)
		if d := math.Hypot(xi-cx, eta-ce); d > 0.1*mas {
			t.Errorf("line %d: Predict differs from the fitted position by %.3g µas, want < 100 µas", p.Line, d/mas*1e3)
		}
	}
}

// truthRow is a row of the demo's noise-free truth table.
type truthRow struct {
	utc     astro.JD
	site    string
	ra, dec float64 // degrees
	delta   float64 // au
}

// demoTruth reads the hourly rows of fit/demo's truth.csv (made by
// testdata/gen/demo_scenario.py with python3-erfa 2.0.0.1).
func demoTruth(t *testing.T) []truthRow { return demoTruthKind(t, "hourly") }

// demoTruthObs reads the rows at the observation times.
func demoTruthObs(t *testing.T) []truthRow { return demoTruthKind(t, "obs") }

func demoTruthKind(t *testing.T, kind string) []truthRow {
	t.Helper()
	var rows []truthRow
	sc := bufio.NewScanner(bytes.NewReader(demo.Truth()))
	for sc.Scan() {
		line := sc.Text()
		if strings.HasPrefix(line, "#") || strings.HasPrefix(line, "time_utc") {
			continue
		}
		f := strings.Split(line, ",")
		if len(f) < 6 || f[2] != kind {
			continue
		}
		utc, err := astro.ParseISO8601(f[0])
		if err != nil {
			t.Fatal(err)
		}
		ra, _ := strconv.ParseFloat(f[3], 64)
		dec, _ := strconv.ParseFloat(f[4], 64)
		delta, _ := strconv.ParseFloat(f[5], 64)
		rows = append(rows, truthRow{utc, f[1], ra, dec, delta})
	}
	return rows
}

// TestPredictDemoTruth checks the parallax-aware model against the demo's
// noise-free ERFA truth (fit/demo truth.csv, made by
// testdata/gen/demo_scenario.py with python3-erfa 2.0.0.1). Fitted to the
// noise-free positions at the observation times, poly3 with the parallax term
// must (a) find u within 0.5 % of 1/Δ (truth.csv delta_au is topocentric;
// the geocentric Δ differs by ≤ an Earth radius, 3e-5 relative), and (b)
// predict the next night's hourly truth (within 1.5 d of the last
// observation) within 0.05″ — the size of the neglected quartic term
// (tolerance from the run-out of the cubic: the noise-free poly3 RMS at the
// observations is below 0.001″). The rate is within 1 % of the truth's hourly
// difference. poly2's bias is logged (it is the model's, not the code's).
func TestPredictDemoTruth(t *testing.T) {
	tr, sites := demoTrack(t)
	obsRows := demoTruthObs(t)
	if len(obsRows) != len(tr.Points) {
		t.Fatalf("truth.csv has %d obs rows, want %d", len(obsRows), len(tr.Points))
	}
	var deltaMid float64
	for i := range tr.Points {
		tr.Points[i].Xi, tr.Points[i].Eta, _ = tr.Plane.Project(astro.AngleFromDegrees(obsRows[i].ra), astro.AngleFromDegrees(obsRows[i].dec))
		deltaMid += obsRows[i].delta / float64(len(tr.Points))
	}
	sol, err := Fit(tr, Poly(3), Settings{KeepAll: true})
	if err != nil {
		t.Fatal(err)
	}
	if d := math.Abs(sol.InvDistance*deltaMid - 1); d > 5e-3 {
		t.Errorf("poly3 on noise-free truth: u = %.5f au⁻¹, want 1/Δ = %.5f within 0.5 %% (truth.csv delta_au)", sol.InvDistance, 1/deltaMid)
	}
	bias2, err := Fit(tr, Poly(2), Settings{KeepAll: true})
	if err != nil {
		t.Fatal(err)
	}
	lastUTC := tr.Points[len(tr.Points)-1].UTC
	rows := demoTruth(t)
	n := 0
	for i, r := range rows {
		if r.utc.Sub(lastUTC) > 1.5 {
			break
		}
		st := sites[r.site]
		pr, err := sol.Predict(r.utc, &st)
		if err != nil {
			t.Fatal(err)
		}
		tp := astro.TangentPlane{RA0: pr.RA, Dec0: pr.Dec}
		dE, dN, _ := tp.Project(astro.AngleFromDegrees(r.ra), astro.AngleFromDegrees(r.dec))
		if miss := astro.Angle(math.Hypot(dE, dN)).Arcseconds(); miss > 0.05 {
			t.Errorf("%s %s: poly3 misses the truth by %.3f″, want ≤ 0.05″ (fit/demo truth.csv)", astro.FormatISO8601(r.utc, 0), r.site, miss)
		}
		if n == 0 {
			p2, _ := bias2.Predict(r.utc, &st)
			tp2 := astro.TangentPlane{RA0: p2.RA, Dec0: p2.Dec}
			e2, n2, _ := tp2.Project(astro.AngleFromDegrees(r.ra), astro.AngleFromDegrees(r.dec))
			t.Logf("%s: poly2 (noise-free) misses by %.2f″ E, %.2f″ N: its model bias %.2f d after the arc",
				astro.FormatISO8601(r.utc, 0), astro.Angle(e2).Arcseconds(), astro.Angle(n2).Arcseconds(), r.utc.Sub(lastUTC))
		}
		if i+1 < len(rows) && rows[i+1].site == r.site && math.Abs(rows[i+1].utc.Sub(r.utc)-1.0/24) < 1e-6 {
			// central hourly difference at the half hour vs the rate at the
			// hour: the rate changes by < 0.1 % in 30 min here.
			nx := rows[i+1]
			mid, err := sol.Predict(r.utc.AddDays(1.0/48), &st)
			if err != nil {
				t.Fatal(err)
			}
			dra := (nx.ra - r.ra) * math.Cos((nx.dec+r.dec)/2*math.Pi/180) * 3600 / 60
			ddec := (nx.dec - r.dec) * 3600 / 60
			rate := math.Hypot(dra, ddec)
			if math.Abs(mid.RateArcsecPerMin/rate-1) > 0.01 {
				t.Errorf("%s: rate %.4f″/min, want %.4f within 1 %% (truth.csv hourly difference)", astro.FormatISO8601(r.utc, 0), mid.RateArcsecPerMin, rate)
			}
		}
		n++
	}
	if n == 0 {
		t.Fatal("no truth rows within 1.5 d of the last observation")
	}
}

// TestPredictErrors: bad times get errors, not panics.
func TestPredictErrors(t *testing.T) {
	tr, _ := demoTrack(t)
	sol, err := Fit(tr, Poly(1), Settings{})
	if err != nil {
		t.Fatal(err)
	}
	for _, j := range []astro.JD{
		{Day: math.NaN(), Scale: astro.UTC},
		{Day: 2461440.5, Scale: astro.TT},
		{Day: math.Inf(1), Scale: astro.UTC},
	} {
		if _, err := sol.Predict(j, nil); err == nil {
			t.Errorf("Predict(%v): no error", j)
		}
	}
}
