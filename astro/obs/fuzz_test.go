package obs

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// addSamples seeds a fuzz target with the sample files of testdata/obs that
// match pattern (the seed corpora in testdata/fuzz/<Name> add more).
func addSamples(f *testing.F, pattern string) {
	files, _ := filepath.Glob(filepath.Join(dataDir, pattern))
	for _, p := range files {
		if b, err := os.ReadFile(p); err == nil {
			f.Add(b)
		}
	}
}

// checkReadResult holds every reader to its promises: no panic (the fuzzer
// catches that), a *ParseError on one line, or a set sorted by time with
// finite values in range.
func checkReadResult(t *testing.T, s *Set, err error) {
	if err != nil {
		var pe *ParseError
		if !errors.As(err, &pe) {
			t.Fatalf("error %T %v, want *ParseError", err, err)
		}
		if msg := err.Error(); strings.ContainsAny(msg, "\n\r") {
			t.Fatalf("error not one line: %q", msg)
		}
		return
	}
	for i, o := range s.Obs {
		if i > 0 && compareTime(s.Obs[i-1], o) > 0 {
			t.Fatalf("obs %d out of time order", i)
		}
		if !(o.RA >= 0 && o.RA < 7) || !(math.Abs(float64(o.Dec)) <= math.Pi/2) || !(o.SigmaRA > 0) || !(o.SigmaDec > 0) ||
			math.IsInf(o.Mag, 0) || !(math.Abs(o.Corr) < 1) || o.Line < 1 {
			t.Fatalf("obs %d out of range: %+v", i, o)
		}
	}
	for _, w := range s.Warnings {
		if strings.ContainsAny(w.String(), "\n\r") {
			t.Fatalf("warning not one line: %q", w)
		}
	}
}

func FuzzReadCSV(f *testing.F) {
	addSamples(f, "*.csv")
	addSamples(f, "*.tsv")
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := Read(bytes.NewReader(data), "fuzz.csv", ReadOptions{Format: FormatCSV})
		checkReadResult(t, s, err)
	})
}

func FuzzReadADES(f *testing.F) {
	addSamples(f, "*.psv")
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := Read(bytes.NewReader(data), "fuzz.psv", ReadOptions{Format: FormatADESPSV})
		checkReadResult(t, s, err)
		s, err = Read(bytes.NewReader(data), "fuzz", ReadOptions{})
		checkReadResult(t, s, err)
	})
}

func FuzzReadSites(f *testing.F) {
	addSamples(f, "sites*.csv")
	f.Fuzz(func(t *testing.T, data []byte) {
		m, _, err := ReadSitesWarnings(bytes.NewReader(data), "fuzz.csv")
		if err != nil {
			if strings.ContainsAny(err.Error(), "\n\r") {
				t.Fatalf("error not one line: %q", err)
			}
			return
		}
		for n, s := range m {
			if n == "" || math.Abs(s.Lat.Degrees()) > 90 || !(s.Lon.Degrees() > -180 && s.Lon.Degrees() <= 180) {
				t.Fatalf("site %q out of range: %+v", n, s)
			}
		}
	})
}

func FuzzParseSiteSpec(f *testing.F) {
	for _, s := range []string{"44.52,-72.80,410", "0,360,0", "-90,-180,-1000", "44,52,-72,80,410", "\"1\",2,3"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, spec string) {
		s, err := ParseSiteSpec(spec)
		if err != nil {
			if strings.ContainsAny(err.Error(), "\n\r") {
				t.Fatalf("error not one line: %q", err)
			}
			return
		}
		if math.Abs(s.Lat.Degrees()) > 90 || !(s.Lon.Degrees() > -180 && s.Lon.Degrees() <= 180) || s.HeightM < minHeightM || s.HeightM > maxHeightM {
			t.Fatalf("ParseSiteSpec(%q) out of range: %+v", spec, s)
		}
	})
}
