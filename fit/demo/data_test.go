package demo

import (
	"bytes"
	"encoding/csv"
	"math"
	"strconv"
	"strings"
	"testing"
)

// readCSV parses one of the scenario's files, dropping the '#' comment lines,
// and returns the header and the rows.
func readCSV(t *testing.T, name string, b []byte) ([]string, [][]string) {
	t.Helper()
	r := csv.NewReader(bytes.NewReader(b))
	r.Comment = '#'
	recs, err := r.ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	if len(recs) < 2 {
		t.Fatalf("%s: %d records, want a header and rows", name, len(recs))
	}
	return recs[0], recs[1:]
}

// sexagesimal reads "hh:mm:ss.sss" or "±dd:mm:ss.ss" into hours or degrees.
func sexagesimal(t *testing.T, s string) float64 {
	t.Helper()
	sign := 1.0
	if strings.HasPrefix(s, "-") {
		sign, s = -1, s[1:]
	}
	s = strings.TrimPrefix(s, "+")
	p := strings.Split(s, ":")
	if len(p) != 3 {
		t.Fatalf("sexagesimal %q: want three fields", s)
	}
	var v [3]float64
	for i := range p {
		f, err := strconv.ParseFloat(p[i], 64)
		if err != nil {
			t.Fatalf("sexagesimal %q: %v", s, err)
		}
		v[i] = f
	}
	return sign * (v[0] + v[1]/60 + v[2]/3600)
}

func TestFilesHaveProvenance(t *testing.T) {
	for _, name := range FileNames() {
		b := Files()[name]
		if !bytes.Contains(b, []byte("INVENTED")) {
			t.Errorf("%s: header does not say the data are invented", name)
		}
		if !bytes.Contains(b, []byte("testdata/gen/demo_scenario.py")) {
			t.Errorf("%s: header does not name its generator", name)
		}
	}
}

// TestNoiseMatchesStatedSigma checks the observations against the generator's
// noise-free positions (truth.csv, computed with python3-erfa 2.0.0.1, see its
// header): the differences must be noise of the stated σ = 0.5″ per
// coordinate. For 28 residuals of a true 0.5″ Gaussian the sample RMS lies in
// 0.3″–0.7″ with probability 99.7 % (χ² with 28 degrees of freedom between
// 10.1 and 54.9: P = 0.00075 below, 0.0018 above, scipy.stats.chi2 1.10 of
// Debian). The data are seeded, so the check is fixed; what it catches is a
// wrong σ, a wrong frame or a wrong site, which move positions by arcseconds.
// Magnitudes: the stated 0.1 mag noise gives an RMS over 14 values within
// 0.03–0.2 mag with probability above 99.99 % (same χ² tables, 14 degrees).
func TestNoiseMatchesStatedSigma(t *testing.T) {
	oh, obs := readCSV(t, ObservationsFile, Observations())
	th, truth := readCSV(t, TruthFile, Truth())
	if strings.Join(oh, ",") != "time,ra,dec,sigma,site,mag,band" {
		t.Fatalf("observations header %v", oh)
	}
	if th[0] != "time_utc" || th[3] != "ra_deg" || th[4] != "dec_deg" || th[11] != "v_mag" {
		t.Fatalf("truth header %v", th)
	}
	type key struct{ time, site string }
	ref := map[key][]string{}
	for _, r := range truth {
		if r[2] == "obs" {
			ref[key{r[0], r[1]}] = r
		}
	}
	if len(obs) != 14 || len(ref) != 14 {
		t.Fatalf("%d observations, %d truth rows of kind obs; the scenario has 14", len(obs), len(ref))
	}
	// The scenario's one outlier (the generator's OUTLIER_INDEX: +3.5″ east,
	// −2.0″ north on top of the noise, 8 σ) is left out of the noise check
	// and must be the only residual beyond 5 σ.
	var sum2, msum2 float64
	nOut := 0
	for _, o := range obs {
		r, ok := ref[key{o[0], o[4]}]
		if !ok {
			t.Fatalf("observation %s at %s has no truth row", o[0], o[4])
		}
		raDeg := 15 * sexagesimal(t, o[1])
		decDeg := sexagesimal(t, o[2])
		raT, _ := strconv.ParseFloat(r[3], 64)
		decT, _ := strconv.ParseFloat(r[4], 64)
		dra := math.Remainder(raDeg-raT, 360) * math.Cos(decT*math.Pi/180) * 3600
		ddec := (decDeg - decT) * 3600
		if math.Hypot(dra, ddec) > 5*0.5 {
			nOut++
			if math.Abs(dra-3.5) > 2 || math.Abs(ddec+2) > 2 {
				t.Errorf("%s: residual (%.2f, %.2f)″, not the scenario's outlier (+3.5, −2.0)″ plus noise", o[0], dra, ddec)
			}
		} else {
			sum2 += dra*dra + ddec*ddec
		}
		m, _ := strconv.ParseFloat(o[5], 64)
		mt, _ := strconv.ParseFloat(r[11], 64)
		msum2 += (m - mt) * (m - mt)
		if o[3] != "0.5" || o[6] != "V" {
			t.Errorf("%s: sigma %q band %q, want 0.5 and V", o[0], o[3], o[6])
		}
	}
	if nOut != 1 {
		t.Errorf("%d residuals beyond 5σ, want the scenario's one outlier", nOut)
	}
	rms := math.Sqrt(sum2 / 26)
	if rms < 0.3 || rms > 0.7 {
		t.Errorf("observed − truth RMS = %.3f″ per coordinate, want 0.5″ (0.3–0.7)", rms)
	}
	mrms := math.Sqrt(msum2 / 14)
	if mrms < 0.03 || mrms > 0.2 {
		t.Errorf("magnitude noise RMS = %.3f mag, want 0.1 (0.03–0.2)", mrms)
	}
}

// TestTruthIsNightAndOpposition checks the scenario's claims in doc.go against
// the generator's own columns: every observation at elongation > 120°, altitude
// > 30°, Sun below −18°; every hourly row with the Sun below −6°.
func TestTruthIsNightAndOpposition(t *testing.T) {
	_, truth := readCSV(t, TruthFile, Truth())
	hourly := 0
	for _, r := range truth {
		elong, _ := strconv.ParseFloat(r[7], 64)
		alt, _ := strconv.ParseFloat(r[8], 64)
		sun, _ := strconv.ParseFloat(r[10], 64)
		switch r[2] {
		case "obs":
			if elong <= 120 || alt <= 30 || sun >= -18 {
				t.Errorf("%s %s: elongation %.1f°, altitude %.1f°, Sun %.1f°", r[0], r[1], elong, alt, sun)
			}
		case "hourly":
			hourly++
			if sun >= -6 {
				t.Errorf("%s %s: hourly row with the Sun at %.1f°", r[0], r[1], sun)
			}
		default:
			t.Errorf("%s: kind %q", r[0], r[2])
		}
	}
	if hourly < 60*2*8 { // 60 nights × 2 sites × at least 8 dark hours in Feb–Apr at 42°–44° N
		t.Errorf("%d hourly rows, want at least %d", hourly, 60*2*8)
	}
}
