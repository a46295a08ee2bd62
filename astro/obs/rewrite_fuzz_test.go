package obs

import (
	"bytes"
	"encoding/csv"
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"
	"unicode/utf8"

	"arcfit/astro"
)

// The fuzzers of this file hold the readers to more than "no panic": an
// error names the file, and the line and column where the format has lines,
// inside the input; an accepted file holds only finite values in range, and
// what was read, written back in the same format, reads back the same.

// checkErrorPlace checks that err is a one-line *ParseError naming file
// whose line lies within data (0 for a whole-file error, or one past the
// last line for "the file ends here") and whose column lies within that line
// (at most one past its last character).
func checkErrorPlace(t *testing.T, err error, data []byte, file string) {
	t.Helper()
	var pe *ParseError
	if !errors.As(err, &pe) {
		t.Fatalf("error %T %v, want *ParseError", err, err)
	}
	msg := err.Error()
	if strings.ContainsAny(msg, "\n\r") || !strings.HasPrefix(msg, file+":") {
		t.Fatalf("error not one line naming %s: %q", file, msg)
	}
	lines := strings.Split(string(data), "\n")
	if pe.Line < 0 || pe.Line > len(lines)+1 {
		t.Fatalf("error line %d outside the %d lines of the input: %q", pe.Line, len(lines), msg)
	}
	if pe.Line == 0 {
		if pe.Column != 0 {
			t.Fatalf("column %d without a line: %q", pe.Column, msg)
		}
		return
	}
	if !strings.HasPrefix(msg, file+":"+strconv.Itoa(pe.Line)+":") {
		t.Fatalf("message %q does not start with the place %s:%d", msg, file, pe.Line)
	}
	if pe.Line <= len(lines) {
		n := utf8.RuneCountInString(strings.TrimPrefix(strings.TrimSuffix(lines[pe.Line-1], "\r"), "\ufeff"))
		if pe.Column < 0 || pe.Column > n+2 { // +2: one past the end, and a CR counted as a character
			t.Fatalf("error column %d outside line %d (%d characters): %q", pe.Column, pe.Line, n, msg)
		}
	}
}

// writeObsCSV writes the used observations of s as an observation CSV with
// every column, in full precision: the time to 1 ns, angles as exact
// decimals of degrees, σ as exact decimals of arcseconds.
func writeObsCSV(t *testing.T, s *Set) []byte {
	t.Helper()
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	_ = w.Write([]string{"time", "ra_deg", "dec_deg", "sigma_ra", "sigma_dec", "corr", "site", "mag", "band"})
	ff := func(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }
	for _, o := range s.Obs {
		if !o.Used {
			continue
		}
		mag := ""
		if !math.IsNaN(o.Mag) {
			mag = ff(o.Mag)
		}
		_ = w.Write([]string{astro.FormatISO8601(o.Time, 9), ff(o.RA.Degrees()), ff(o.Dec.Degrees()),
			ff(o.SigmaRA.Arcseconds()), ff(o.SigmaDec.Arcseconds()), ff(o.Corr), o.Site, mag, o.Band})
	}
	w.Flush()
	return b.Bytes()
}

// FuzzReadCSVRewrite reads arbitrary bytes as an observation CSV. An error
// is a positioned one-line *ParseError; an accepted file passes
// checkReadResult, and its observations written back by writeObsCSV read
// back to the same observations: times within 1 ns (the writer's
// precision), angles and σ within a few units in the last place of the
// degree or arcsecond decimal, correlation, site, magnitude and band equal.
func FuzzReadCSVRewrite(f *testing.F) {
	addSamples(f, "*.csv")
	addSamples(f, "*.tsv")
	f.Add([]byte("time,ra,dec,sigma,site,mag,band\n2016-12-31T23:59:60.5Z,00:00:00.1,-89:59:59,0.5,\"A, B\",17.2,V\n2016-12-31T23:59:59Z,23:59:59.99,+89:59:59,0.5,A,,\n"))
	f.Add([]byte("time,ra_deg,dec_deg,sigma_ra,sigma_dec,corr\nJD 2378496.5,359.9999999,0,1,2,-0.5\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := Read(bytes.NewReader(data), "fuzz.csv", ReadOptions{Format: FormatCSV})
		if err != nil {
			checkErrorPlace(t, err, data, "fuzz.csv")
			return
		}
		checkReadResult(t, s, err)
		var used []Observation
		for _, o := range s.Obs {
			if o.Used {
				used = append(used, o)
			}
		}
		text := writeObsCSV(t, s)
		back, err := Read(bytes.NewReader(text), "again.csv", ReadOptions{Format: FormatCSV})
		if err != nil {
			t.Fatalf("the observations written back do not read: %v\n%s", err, text)
		}
		if len(back.Obs) != len(used) {
			t.Fatalf("%d observations read back, want %d\n%s", len(back.Obs), len(used), text)
		}
		for i, o := range used {
			g := back.Obs[i]
			if d := g.Time.Sub(o.Time) * astro.SecondsPerDay; math.Abs(d) > 1e-9 || g.Time.Scale != o.Time.Scale {
				t.Fatalf("obs %d: time %v read back as %v (Δ %.3g s)", i, o.Time, g.Time, d)
			}
			const angTol = 1e-13 // rad: a few ulp of 2π through the degree decimal
			dra := math.Abs(math.Remainder(float64(g.RA-o.RA), 2*math.Pi))
			if dra > angTol || math.Abs(float64(g.Dec-o.Dec)) > angTol {
				t.Fatalf("obs %d: RA/Dec %v %v read back as %v %v", i, o.RA, o.Dec, g.RA, g.Dec)
			}
			if rel(g.SigmaRA, o.SigmaRA) > 1e-14 || rel(g.SigmaDec, o.SigmaDec) > 1e-14 {
				t.Fatalf("obs %d: σ %v %v read back as %v %v", i, o.SigmaRA, o.SigmaDec, g.SigmaRA, g.SigmaDec)
			}
			sameMag := g.Mag == o.Mag || (math.IsNaN(g.Mag) && math.IsNaN(o.Mag))
			if g.Corr != o.Corr || g.Site != o.Site || !sameMag || g.Band != o.Band {
				t.Fatalf("obs %d: %+v read back as %+v\n%s", i, o, g, text)
			}
		}
	})
}

// rel returns |a−b|/|b|.
func rel(a, b astro.Angle) float64 { return math.Abs(float64(a-b)) / math.Abs(float64(b)) }

// FuzzReadADESPlaces reads arbitrary bytes as ADES PSV and holds the errors
// to their place: a one-line *ParseError naming the file, a line within
// the input and a column within that line.
func FuzzReadADESPlaces(f *testing.F) {
	addSamples(f, "*.psv")
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := Read(bytes.NewReader(data), "fuzz.psv", ReadOptions{Format: FormatADESPSV})
		if err != nil {
			checkErrorPlace(t, err, data, "fuzz.psv")
			return
		}
		checkReadResult(t, s, err)
		for name, st := range s.Sites {
			if !finiteSite(st) {
				t.Fatalf("station %q: %+v", name, st)
			}
		}
	})
}

// finiteSite reports whether the site's values are finite and in range.
func finiteSite(s astro.Site) bool {
	return math.Abs(s.Lat.Degrees()) <= 90 && s.Lon.Degrees() > -180 && s.Lon.Degrees() <= 180 &&
		s.HeightM >= minHeightM && s.HeightM <= maxHeightM
}

// writeSitesCSV writes sites as a sites CSV in full precision.
func writeSitesCSV(m map[string]astro.Site) []byte {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	_ = w.Write([]string{"name", "lat_deg", "lon_deg", "height_m"})
	ff := func(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }
	for n, s := range m {
		_ = w.Write([]string{n, ff(s.Lat.Degrees()), ff(s.Lon.Degrees()), ff(s.HeightM)})
	}
	w.Flush()
	return b.Bytes()
}

// FuzzReadSitesRewrite reads arbitrary bytes as a sites CSV: an error is a
// positioned one-line *ParseError; accepted sites are in range and, written
// back, read back to the same sites (angles within a few ulp of the degree
// decimal, heights exactly).
func FuzzReadSitesRewrite(f *testing.F) {
	addSamples(f, "sites*.csv")
	f.Add([]byte("name,lat_deg,lon_deg,height_m\n\"Pole, North\",89.9999,-180,0\nDate Line,-89,180,3000\nEast,0,359.5,-10\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		m, _, err := ReadSitesWarnings(bytes.NewReader(data), "fuzz.csv")
		if err != nil {
			checkErrorPlace(t, err, data, "fuzz.csv")
			return
		}
		for n, s := range m {
			if n == "" || !finiteSite(s) {
				t.Fatalf("site %q out of range: %+v", n, s)
			}
		}
		text := writeSitesCSV(m)
		back, _, err := ReadSitesWarnings(bytes.NewReader(text), "again.csv")
		if err != nil {
			t.Fatalf("sites written back do not read: %v\n%s", err, text)
		}
		if len(back) != len(m) {
			t.Fatalf("%d sites read back, want %d\n%s", len(back), len(m), text)
		}
		for n, s := range m {
			g, ok := back[n]
			if !ok || math.Abs(float64(g.Lat-s.Lat)) > 1e-14 || math.Abs(math.Remainder(float64(g.Lon-s.Lon), 2*math.Pi)) > 1e-14 || g.HeightM != s.HeightM {
				t.Fatalf("site %q %+v read back as %+v (found %v)", n, s, g, ok)
			}
		}
	})
}

// FuzzParseSiteSpecRewrite checks --site lat,lon,height: an error is one
// line naming the option's text; an accepted site is in range and its
// values, written back as lat,lon,height, parse to the same site.
func FuzzParseSiteSpecRewrite(f *testing.F) {
	for _, s := range []string{"44.52,-72.80,410", "89,180,0", "-89,-180,0", "90,0,0", " 1 , 2 , 3 ", "1,2", "1,2,3,4", "NaN,0,0", "0,1e400,0"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, spec string) {
		s, err := ParseSiteSpec(spec)
		if err != nil {
			if strings.ContainsAny(err.Error(), "\n\r") || err.Error() == "" {
				t.Fatalf("error not one line: %q", err)
			}
			return
		}
		if !finiteSite(s) {
			t.Fatalf("ParseSiteSpec(%q) out of range: %+v", spec, s)
		}
		ff := func(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }
		again := ff(s.Lat.Degrees()) + "," + ff(s.Lon.Degrees()) + "," + ff(s.HeightM)
		g, err := ParseSiteSpec(again)
		if err != nil {
			t.Fatalf("ParseSiteSpec(%q) = %+v, written back as %q: %v", spec, s, again, err)
		}
		if math.Abs(float64(g.Lat-s.Lat)) > 1e-14 || math.Abs(math.Remainder(float64(g.Lon-s.Lon), 2*math.Pi)) > 1e-14 || g.HeightM != s.HeightM {
			t.Fatalf("ParseSiteSpec(%q) = %+v, written back as %q: %+v", spec, s, again, g)
		}
	})
}
