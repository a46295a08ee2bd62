package obs_test

import (
	"encoding/json"
	"fmt"
	"math"
	"strings"
	"testing"

	"arcfit/astro"
	"arcfit/astro/obs"
)

// feb4 is the Julian date of 2027 February 4, 0h UTC: 2461440.5, by the
// algorithm of Meeus, Astronomical Algorithms, 2nd ed., ch. 7 worked by hand
// (Y = 2026, M = 14, A = 20, B = −13: ⌊365.25·6742⌋ + ⌊30.6001·15⌋ + 4 − 13
// − 1524.5 = 2462515 + 459 + 4 − 13 − 1524.5). design.md's example
// "2027-02-03T21:14:05Z" ↔ "JD 2461440.38478" agrees (2461440.5 − 0.11522 d).
const feb4 = 2461440.5

// at returns the UTC date feb4 + hours.
func at(hours float64) astro.JD {
	return astro.JD{Day: feb4, Frac: hours / 24, Scale: astro.UTC}
}

// ob returns a used observation at feb4 + hours, at (raArcsec, decArcsec)
// from RA 0, Dec 0, with σ 0.5″ per coordinate.
func ob(line int, hours, raArcsec, decArcsec float64, site string) obs.Observation {
	return obs.Observation{
		Line: line, Time: at(hours),
		RA:      astro.AngleFromArcseconds(raArcsec).Normalized(),
		Dec:     astro.AngleFromArcseconds(decArcsec),
		SigmaRA: 0.5 * astro.Arcsecond, SigmaDec: 0.5 * astro.Arcsecond,
		Site: site, Mag: math.NaN(), Used: true,
	}
}

// Invented sites: longitudes chosen so that local and UTC nights differ.
var (
	east = astro.Site{Name: "East Knoll", Lat: 35 * astro.Degree, Lon: 150 * astro.Degree, HeightM: 200}
	west = astro.Site{Name: "West Flat", Lat: 40 * astro.Degree, Lon: -120 * astro.Degree, HeightM: 1200}
)

func sitesMap() map[string]astro.Site {
	return map[string]astro.Site{east.Name: east, west.Name: west}
}

// TestSummarizeRate checks the rate and position angle on a night worked out
// by hand: three observations 10 min apart at Dec 0 moving +10″ in RA (east,
// cos δ = 1) and +10″ in Dec (north) every 10 min, so 1″/min east and 1″/min
// north: rate √2 = 1.414214″/min, PA atan2(1, 1) = 45°, travelled √2·20 =
// 28.28427″ over 20 min. Formal σ of each slope: t̄ = 10 min, Σ w (t − t̄)² =
// (100 + 0 + 100)/0.25 = 800 min²/arcsec², σ_b = 1/√800 = 0.0353553″/min, and
// the rate's σ equals σ_b when both slopes are equal. The gnomonic projection
// distorts 20″ by a relative ρ²/3 ≈ 3e-9 of ρ, far below the tolerances.
func TestSummarizeRate(t *testing.T) {
	set := &obs.Set{File: "hand.csv", Format: "csv", Obs: []obs.Observation{
		ob(2, 3.0, 0, 0, east.Name),
		ob(3, 3.0+10.0/60, 10, 10, east.Name),
		ob(4, 3.0+20.0/60, 20, 20, east.Name),
	}}
	s := obs.Summarize(set, sitesMap())
	if len(s.Nights) != 1 {
		t.Fatalf("Summarize: %d nights, want 1", len(s.Nights))
	}
	n := s.Nights[0]
	for _, c := range []struct {
		name      string
		got, want float64
		tol       float64
		src       string
	}{
		{"rate_arcsec_per_min", n.RateArcsecPerMin, math.Sqrt2, 1e-6, "hand: √(1² + 1²)"},
		{"pa_deg", n.PADeg, 45, 1e-6, "hand: atan2(1, 1)"},
		{"travelled_arcsec", n.TravelledArcsec, 20 * math.Sqrt2, 1e-5, "hand: √2 × 20 min"},
		{"rate_sigma_arcsec_per_min", n.RateSigmaArcsecPerMin, 1 / math.Sqrt(800), 1e-9, "hand: 1/√800"},
		{"span_min", n.SpanMin, 20, 1e-6, "hand: 3h20m − 3h00m"},
		{"arc_hours", s.ArcHours, 20.0 / 60, 1e-8, "hand: 20 min"},
		{"mean_sigma_arcsec", s.MeanSigmaArcsec, 0.5, 1e-12, "input: 0.5″ each"},
	} {
		if math.Abs(c.got-c.want) > c.tol {
			t.Errorf("Summarize: %s = %.9g, want %.9g (Δ %.3g; %s)", c.name, c.got, c.want, c.got-c.want, c.src)
		}
	}
	// feb4 + 3 h and + 3 h 20 min, written by astro.FormatISO8601
	if s.FirstUTC != "2027-02-04T03:00:00.00Z" || n.LastUTC != "2027-02-04T03:20:00.00Z" {
		t.Errorf("Summarize: first_utc %q, night last_utc %q; want 2027-02-04T03:00:00.00Z, 2027-02-04T03:20:00.00Z", s.FirstUTC, n.LastUTC)
	}
	if !n.HasRate || !n.Moving {
		t.Errorf("Summarize: has_rate %v moving %v, want both true (χ² = 2·(1/0.03536)² = 1600)", n.HasRate, n.Moving)
	}
	// Three observations, one night: the single-night warning, and no other.
	codes := noteCodes(s)
	if codes != "single-night" {
		t.Errorf("Summarize: warnings %q, want single-night only", codes)
	}
}

// TestSummarizePositionAngles checks the four quadrants of the position angle
// (north through east) and a rate at high declination, where RA motion must
// be scaled by cos δ: at Dec 60° a change of 20″ in RA is 10″ on the sky
// (cos 60° = 1/2, exact).
func TestSummarizePositionAngles(t *testing.T) {
	cases := []struct {
		name          string
		dra, ddec     float64 // ″ in RA (not on the sky) and Dec over 10 min
		dec0Deg       float64
		wantRate, wPA float64
		src           string
	}{
		{"north", 0, 10, 0, 1, 0, "hand: due north"},
		{"east", 10, 0, 0, 1, 90, "hand: due east"},
		{"south", 0, -10, 0, 1, 180, "hand: due south"},
		{"west", -10, 0, 0, 1, 270, "hand: due west"},
		{"south-west", -10, -10, 0, math.Sqrt2, 225, "hand: atan2(−1, −1) + 360°"},
		{"east at dec 60", 20, 0, 60, 1, 90, "hand: 20″ × cos 60° = 10″ on the sky"},
	}
	for _, c := range cases {
		d0 := c.dec0Deg * 3600
		set := &obs.Set{Obs: []obs.Observation{
			ob(2, 3.0, 0, d0, east.Name),
			ob(3, 3.0+10.0/60, c.dra, d0+c.ddec, east.Name),
		}}
		n := obs.Summarize(set, sitesMap()).Nights[0]
		// Tolerance: the hand values are flat-sky; on the sphere the track
		// between two points of one parallel leaves at PA 90° − Δα sin δ/2
		// (Smart 1977, ch. I, for small Δα), 20″ × 0.866/2 = 8.7″ = 0.0024° at
		// Dec 60°, and the rate differs by a relative 1e-9. 0.01° and
		// 1e-5″/min cover that and catch a missing cos δ (a factor 2).
		if math.Abs(n.RateArcsecPerMin-c.wantRate) > 1e-5 {
			t.Errorf("%s: rate = %.9g ″/min, want %.9g (%s)", c.name, n.RateArcsecPerMin, c.wantRate, c.src)
		}
		if d := math.Remainder(n.PADeg-c.wPA, 360); math.Abs(d) > 0.01 {
			t.Errorf("%s: pa = %.6g°, want %.6g (Δ %.3g°; %s)", c.name, n.PADeg, c.wPA, d, c.src)
		}
	}
}

// TestSummarizeNights checks the grouping into local nights (noon to noon in
// the site's local mean time, UTC + longitude/15° h):
//   - East Knoll, 150° E = UTC + 10 h: 4 Feb 09:00 UTC is 19:00 local on the
//     4th, night of 2027-02-04 (noon-to-noon UTC would give the 3rd);
//   - West Flat, 120° W = UTC − 8 h: 4 Feb 19:00 UTC is 11:00 local on the
//     4th, before local noon, so night of 2027-02-03 (UTC would give the 4th);
//     4 Feb 21:00 UTC is 13:00 local, night of 2027-02-04;
//   - an unknown site falls back to noon-to-noon UTC: 4 Feb 09:00 UTC, night of
//     2027-02-03, with a night-utc warning.
func TestSummarizeNights(t *testing.T) {
	set := &obs.Set{Obs: []obs.Observation{
		ob(2, 9.0, 0, 0, east.Name),
		ob(3, 9.5, 10, 10, east.Name),
		ob(4, 9.0, 0, 0, "Nowhere Known"),
		ob(5, 19.0, 100, 100, west.Name),
		ob(6, 21.0, 200, 200, west.Name),
	}}
	s := obs.Summarize(set, sitesMap())
	type nk struct {
		date, site string
		local      bool
		count      int
	}
	var got []nk
	for _, n := range s.Nights {
		got = append(got, nk{n.Date, n.Site, n.LocalTime, n.Count})
	}
	want := []nk{
		{"2027-02-04", east.Name, true, 2},
		{"2027-02-03", "Nowhere Known", false, 1},
		{"2027-02-03", west.Name, true, 1},
		{"2027-02-04", west.Name, true, 1},
	}
	if fmt.Sprint(got) != fmt.Sprint(want) {
		t.Errorf("Summarize: nights\n got %v\nwant %v", got, want)
	}
	if s.NightCount != 2 {
		t.Errorf("Summarize: night_count = %d, want 2 (dates 02-03 and 02-04)", s.NightCount)
	}
	if len(s.Sites) != 3 || s.Sites[0].Name != east.Name || s.Sites[0].Count != 2 || !s.Sites[0].Known ||
		s.Sites[1].Known || math.Abs(s.Sites[2].LonDeg+120) > 1e-9 {
		t.Errorf("Summarize: sites %+v", s.Sites)
	}
	if !strings.Contains(noteCodes(s), "night-utc") {
		t.Errorf("Summarize: warnings %q, want night-utc for the unknown site", noteCodes(s))
	}
	if math.Abs(s.ArcHours-12) > 1e-8 {
		t.Errorf("Summarize: arc = %.9g h, want 12 (09:00 to 21:00 UTC)", s.ArcHours)
	}
}

// TestSummarizeWarnings checks each warning on a set made to trigger it.
func TestSummarizeWarnings(t *testing.T) {
	dup := ob(4, 3.0, 0, 0, east.Name)
	dup.Used = false
	still := []obs.Observation{
		// 0.1″ in 10 min with σ 0.5″: slope 0.01″/min, σ_b = 0.5/√50 = 0.0707″/min
		// (Σ (t − t̄)² = 2 × 5² = 50 min²), χ² = 0.02: no motion.
		ob(2, 3.0, 0, 0, east.Name),
		ob(3, 3.0+10.0/60, 0.1, 0, east.Name),
		dup,
	}
	s := obs.Summarize(&obs.Set{Obs: still}, sitesMap())
	if got, want := noteCodes(s), "few-observations single-night duplicate no-motion no-motion-arc"; got != want {
		t.Errorf("Summarize(still pair): warnings %q, want %q", got, want)
	}
	if s.Count != 3 || s.Used != 2 {
		t.Errorf("Summarize(still pair): count %d used %d, want 3 and 2", s.Count, s.Used)
	}
	if s.Nights[0].Moving {
		t.Errorf("Summarize(still pair): moving, want not (χ² = (0.01/0.0707)² = 0.02)")
	}
	for _, w := range s.Warnings {
		if w.Code == "duplicate" && w.Line != 4 {
			t.Errorf("duplicate note on line %d, want 4", w.Line)
		}
	}

	// Two nights, 3 observations, moving: no warnings at all.
	moving := []obs.Observation{
		ob(2, 9.0, 0, 0, east.Name),
		ob(3, 9.5, 30, 0, east.Name),
		ob(4, 24+9.0, 1440, 0, east.Name),
	}
	s = obs.Summarize(&obs.Set{Obs: moving}, sitesMap())
	if got := noteCodes(s); got != "" {
		t.Errorf("Summarize(moving, two nights): warnings %q, want none", got)
	}
	if s.NightCount != 2 || math.Abs(s.ArcDays-1) > 1e-9 {
		t.Errorf("Summarize(moving): nights %d arc %.9g d, want 2 and 1", s.NightCount, s.ArcDays)
	}
	// A night of one observation has no rate: NaN in Go, null in JSON.
	n := s.Nights[1]
	if n.HasRate || !math.IsNaN(n.RateArcsecPerMin) {
		t.Errorf("one-observation night: has_rate %v rate %v, want false and NaN", n.HasRate, n.RateArcsecPerMin)
	}
	b, err := json.Marshal(s)
	if err != nil {
		t.Fatalf("json.Marshal(Summary): %v", err)
	}
	var back map[string]any
	if err := json.Unmarshal(b, &back); err != nil {
		t.Fatalf("json.Unmarshal: %v", err)
	}
	nights := back["nights"].([]any)
	if v, ok := nights[1].(map[string]any)["rate_arcsec_per_min"]; !ok || v != nil {
		t.Errorf("JSON night 2 rate_arcsec_per_min = %v (present %v), want null", v, ok)
	}
	if v := nights[0].(map[string]any)["rate_arcsec_per_min"].(float64); math.Abs(v-1) > 1e-5 {
		t.Errorf("JSON night 1 rate = %v, want 1 (30″ in 30 min)", v)
	}
}

func TestSummarizeMeanSigma(t *testing.T) {
	a := ob(2, 3, 0, 0, east.Name)
	a.SigmaRA, a.SigmaDec = 0.4*astro.Arcsecond, 0.6*astro.Arcsecond
	b := ob(3, 4, 60, 0, east.Name)
	b.SigmaRA, b.SigmaDec = 2*astro.Arcsecond, 1*astro.Arcsecond
	s := obs.Summarize(&obs.Set{Obs: []obs.Observation{a, b}}, nil)
	// hand: ((0.4 + 0.6)/2 + (2 + 1)/2)/2 = (0.5 + 1.5)/2 = 1.0
	if math.Abs(s.MeanSigmaArcsec-1) > 1e-12 {
		t.Errorf("Summarize: mean_sigma_arcsec = %.12g, want 1 (hand)", s.MeanSigmaArcsec)
	}
}

func noteCodes(s obs.Summary) string {
	var c []string
	for _, w := range s.Warnings {
		c = append(c, w.Code)
	}
	return strings.Join(c, " ")
}

func ExampleSummarize() {
	site := astro.Site{Name: "Example Hill", Lat: 45 * astro.Degree, Lon: 10 * astro.Degree, HeightM: 300}
	set := &obs.Set{File: "example.csv", Format: "csv"}
	// An invented track: 12″ west and 5″ north every 10 minutes, at Dec +20°:
	// by hand √(12² + 5²) = 13″ per 10 min, PA atan2(−12, 5) + 360° = 292.62°.
	for i := range 4 {
		cosDec := math.Cos(20 * math.Pi / 180)
		set.Obs = append(set.Obs, obs.Observation{
			Line: i + 2, Time: astro.JD{Day: 2461440.5, Frac: (20*60 + 10*float64(i)) / 1440, Scale: astro.UTC},
			RA:      (150*astro.Degree - astro.AngleFromArcseconds(12*float64(i)/cosDec)),
			Dec:     20*astro.Degree + astro.AngleFromArcseconds(5*float64(i)),
			SigmaRA: 0.5 * astro.Arcsecond, SigmaDec: 0.5 * astro.Arcsecond,
			Site: site.Name, Mag: math.NaN(), Used: true,
		})
	}
	s := obs.Summarize(set, map[string]astro.Site{site.Name: site})
	n := s.Nights[0]
	fmt.Printf("%d observations, %d night(s)\n", s.Used, s.NightCount)
	fmt.Printf("night of %s: %.2f\"/min at PA %.1f°\n", n.Date, n.RateArcsecPerMin, n.PADeg)
	// Output:
	// 4 observations, 1 night(s)
	// night of 2027-02-04: 1.30"/min at PA 292.6°
}
