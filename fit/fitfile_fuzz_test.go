package fit

import (
	"bytes"
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"

	"arcfit/astro"
	"arcfit/astro/obs"
)

// fitFileSeeds returns fit files of both schemas: the demo's sky-plane fit
// (schema arcfit-fit/2), the same file under schema arcfit-fit/1 (which has
// no orbit), and the demo's two-body orbit with its best sky-plane model.
func fitFileSeeds(f *testing.F) [][]byte {
	f.Helper()
	tr, _ := demoTrack(f)
	c, err := Compare(tr, CandidateModels(tr), Settings{}, nil, nil)
	if err != nil {
		f.Fatal(err)
	}
	sky := NewSavedFit(c)
	sky.Orbit = nil
	skyData, err := MarshalFitFile(sky)
	if err != nil {
		f.Fatal(err)
	}
	v1 := bytes.Replace(skyData, []byte(`"`+FitFileSchema+`"`), []byte(`"`+fitFileSchemaV1+`"`), 1)
	of, err := FitOrbit(tr, Settings{})
	if err != nil {
		f.Fatal(err)
	}
	withOrbit := &SavedFit{Solution: c.Solution, Orbit: of, Reason: "orbit", HorizonDays: math.NaN(), HorizonBeforeDays: math.NaN(), HorizonAfterDays: math.NaN()}
	orbitData, err := MarshalFitFile(withOrbit)
	if err != nil {
		f.Fatal(err)
	}
	return [][]byte{skyData, v1, orbitData}
}

// finitePrediction reports whether a prediction's place, covariance and rate
// are finite.
func finitePrediction(p Prediction) bool {
	for _, x := range []float64{float64(p.RA), float64(p.Dec), p.CovArcsec2[0][0], p.CovArcsec2[0][1], p.CovArcsec2[1][0], p.CovArcsec2[1][1], p.RateArcsecPerMin} {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return p.RA >= 0 && p.RA < 2*math.Pi && math.Abs(float64(p.Dec)) <= math.Pi/2
}

// FuzzParseFitFile feeds arbitrary bytes to the fit-file reader, seeded
// with files of both schemas (arcfit-fit/1, and arcfit-fit/2 with and
// without an orbit). An error is a one-line *obs.ParseError naming the file
// (and the line and column of the fault when it has one) and wrapping
// ErrFitFile or ErrFitSchema. An accepted file saves again; the saved file
// reads, and saved once more gives the same bytes; its prediction at the
// fit's epoch is either an error or a finite place and covariance.
func FuzzParseFitFile(f *testing.F) {
	for _, s := range fitFileSeeds(f) {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		sf, err := ParseFitFile(data, "fuzz.json")
		if err != nil {
			var pe *obs.ParseError
			if !errors.As(err, &pe) || !(errors.Is(err, ErrFitFile) || errors.Is(err, ErrFitSchema)) {
				t.Fatalf("error %T %v, want a *obs.ParseError wrapping ErrFitFile or ErrFitSchema", err, err)
			}
			msg := err.Error()
			if strings.ContainsAny(msg, "\n\r") || !strings.HasPrefix(msg, "fuzz.json:") {
				t.Fatalf("error not one line naming the file: %q", msg)
			}
			if pe.Line > 0 {
				if n := bytes.Count(data, []byte("\n")) + 1; pe.Line > n {
					t.Fatalf("error line %d beyond the %d lines: %q", pe.Line, n, msg)
				}
				if !strings.HasPrefix(msg, "fuzz.json:"+strconv.Itoa(pe.Line)+":") || pe.Column < 1 {
					t.Fatalf("message %q does not start with its place (line %d col %d)", msg, pe.Line, pe.Column)
				}
			}
			return
		}
		again, err := MarshalFitFile(sf)
		if err != nil {
			t.Fatalf("an accepted file does not save: %v", err)
		}
		back, err := ParseFitFile(again, "again.json")
		if err != nil {
			t.Fatalf("the saved file does not read: %v", err)
		}
		third, err := MarshalFitFile(back)
		if err != nil || !bytes.Equal(third, again) {
			t.Fatalf("saving the reloaded file changes it (%v):\n%s\n----\n%s", err, again, third)
		}
		utc := sf.Solution.Track.EpochTT
		utc.Scale = astro.UTC
		for _, site := range []*astro.Site{nil, {Lat: astro.AngleFromDegrees(89), Lon: astro.AngleFromDegrees(180)}} {
			p, err := sf.Predict(utc, site)
			if err == nil && !finitePrediction(p) {
				t.Fatalf("prediction at the epoch is not finite: %+v", p)
			}
		}
	})
}
