package fit_test

import (
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"arcfit/astro"
	"arcfit/astro/obs"
	"arcfit/fit"
	"arcfit/fit/demo"
)

// demoComparison fits the demo scenario (fit/demo: invented data made with
// python3-erfa by testdata/gen/demo_scenario.py).
func demoComparison(t testing.TB) (*fit.Comparison, map[string]astro.Site) {
	t.Helper()
	sites, err := obs.ReadSites(strings.NewReader(string(demo.Sites())), "sites.csv")
	if err != nil {
		t.Fatal(err)
	}
	set, err := obs.Read(strings.NewReader(string(demo.Observations())), "observations.csv", obs.ReadOptions{Sites: sites})
	if err != nil {
		t.Fatal(err)
	}
	tr, err := fit.NewTrack(set, sites)
	if err != nil {
		t.Fatal(err)
	}
	c, err := fit.Compare(tr, fit.CandidateModels(tr), fit.Settings{}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	return c, sites
}

// TestFitFileRoundTrip saves the demo fit, loads it and checks that the
// loaded solution predicts exactly (bit for bit) what the saved one does, at
// times inside and beyond the arc, for a site and the geocentre.
func TestFitFileRoundTrip(t *testing.T) {
	c, sites := demoComparison(t)
	path := filepath.Join(t.TempDir(), "fit.json")
	if err := fit.SaveFile(path, c); err != nil {
		t.Fatal(err)
	}
	f, err := fit.ReadFitFile(path)
	if err != nil {
		t.Fatal(err)
	}
	orig := fit.NewSavedFit(c)
	st := sites["Birch Hollow"]
	for _, when := range []string{"2027-02-05T20:00:00Z", "2027-02-09T04:00:00Z", "2027-03-01T00:00:00Z"} {
		utc, _ := astro.ParseISO8601(when)
		for _, s := range []*astro.Site{nil, &st} {
			a, err1 := orig.Predict(utc, s)
			b, err2 := f.Predict(utc, s)
			if err1 != nil || err2 != nil {
				t.Fatal(err1, err2)
			}
			if a.RA != b.RA || a.Dec != b.Dec || a.CovArcsec2 != b.CovArcsec2 || a.BeyondHorizon != b.BeyondHorizon ||
				a.RateArcsecPerMin != b.RateArcsecPerMin {
				t.Errorf("%s: loaded fit predicts %+v, saved %+v", when, b, a)
			}
		}
	}
	name := f.Solution.Model.Name()
	if f.Orbit != nil {
		name = fit.Kepler().Name()
	}
	if name != c.Chosen || f.Solution.Track.SourceSHA256 != c.Solution.Track.SourceSHA256 {
		t.Errorf("model %s / sha %q, want %s / %q", name, f.Solution.Track.SourceSHA256, c.Chosen, c.Solution.Track.SourceSHA256)
	}
}

// TestFitFileAtomic checks that a write into a directory that cannot take it
// fails and leaves no file, and that a failed write keeps the old file.
func TestFitFileAtomic(t *testing.T) {
	if runtime.GOOS == "windows" || os.Getuid() == 0 {
		t.Skip("needs a non-root POSIX user for a read-only directory")
	}
	c, _ := demoComparison(t)
	dir := filepath.Join(t.TempDir(), "ro")
	os.Mkdir(dir, 0o555)
	path := filepath.Join(dir, "fit.json")
	if err := fit.SaveFile(path, c); err == nil {
		t.Fatal("SaveFile into a read-only directory succeeded")
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 0 {
		t.Errorf("left %d files behind", len(ents))
	}
}

// TestFitFileNoPartial checks that a save that cannot complete (a
// non-finite parameter) leaves the existing file as it was.
func TestFitFileNoPartial(t *testing.T) {
	c, _ := demoComparison(t)
	path := filepath.Join(t.TempDir(), "fit.json")
	os.WriteFile(path, []byte("old"), 0o644)
	c.Solution.Params[0] = math.NaN()
	if err := fit.SaveFile(path, c); err == nil {
		t.Fatal("saved a NaN parameter")
	}
	if b, _ := os.ReadFile(path); string(b) != "old" {
		t.Errorf("old file changed to %q", b)
	}
	ents, _ := os.ReadDir(filepath.Dir(path))
	if len(ents) != 1 {
		t.Errorf("%d files in the directory, want 1", len(ents))
	}
}

// TestFitFileBad checks corrupted, truncated and unknown-schema files give a
// one-line error naming the file with a line and column.
func TestFitFileBad(t *testing.T) {
	c, _ := demoComparison(t)
	good, err := fit.MarshalFitFile(fit.NewSavedFit(c))
	if err != nil {
		t.Fatal(err)
	}
	s := string(good)
	for _, tc := range []struct {
		name, in, want string
		sentinel       error
	}{
		{"truncated", s[:len(s)/2], "x.json:", fit.ErrFitFile},
		{"schema", strings.Replace(s, fit.FitFileSchema, "arcfit-fit/9", 1), "x.json:2:", fit.ErrFitSchema},
		{"garbage", strings.Replace(s, `"params": [`, `"params": [x`, 1), "x.json:", fit.ErrFitFile},
		{"model", strings.Replace(s, `"name": "`+c.Solution.Model.Name()+`"`, `"name": "poly7"`, 1), "model.name", fit.ErrFitFile},
		{"orbit", orbitAtSun(t, good), "orbit.position_au", fit.ErrFitFile},
		{"unknown field", strings.Replace(s, `"reason":`, `"reasons":`, 1), "reasons", fit.ErrFitFile},
	} {
		_, err := fit.ParseFitFile([]byte(tc.in), "x.json")
		if err == nil || !errors.Is(err, tc.sentinel) || !strings.Contains(err.Error(), tc.want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: error %v, want one line with %q wrapping %v", tc.name, err, tc.want, tc.sentinel)
		}
	}
	if !fit.IsFitFile(good) || fit.IsFitFile(demo.Observations()) {
		t.Error("IsFitFile does not tell a fit file from observations")
	}
}

// FuzzLoadFit feeds arbitrary bytes to the fit-file reader: it must never
// panic, and a file it accepts must predict without panicking and survive a
// save and a reload unchanged.
func FuzzLoadFit(f *testing.F) {
	c, _ := demoComparison(f)
	good, err := fit.MarshalFitFile(fit.NewSavedFit(c))
	if err != nil {
		f.Fatal(err)
	}
	f.Add(good)
	f.Add([]byte(`{"schema":"arcfit-fit/1"}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		sf, err := fit.ParseFitFile(data, "fuzz.json")
		if err != nil {
			if strings.Contains(err.Error(), "\n") {
				t.Errorf("multi-line error %q", err)
			}
			return
		}
		utc := sf.Solution.Track.EpochTT
		utc.Scale = astro.UTC
		sf.Predict(utc, nil)
		again, err := fit.MarshalFitFile(sf)
		if err != nil {
			return
		}
		if _, err := fit.ParseFitFile(again, "again.json"); err != nil {
			t.Errorf("re-saved file does not load: %v", err)
		}
	})
}

// orbitAtSun returns the fit file with its orbit's position put at the Sun.
func orbitAtSun(t *testing.T, good []byte) string {
	t.Helper()
	var v map[string]any
	if err := json.Unmarshal(good, &v); err != nil {
		t.Fatal(err)
	}
	o, ok := v["orbit"].(map[string]any)
	if !ok {
		t.Fatal("the demo fit file holds no orbit")
	}
	o["position_au"] = []float64{0, 0, 0}
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}
