package main

import (
	"bytes"
	"encoding/json"
	"encoding/xml"
	"errors"
	"image/png"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// runCmd runs a command built by newCmd with args and returns its exit code
// and both streams, as run would (the lead registers the commands in run.go).
func runCmd(t *testing.T, c *command, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := exitOK
	if err := c.run(args, streams{Out: &out, Err: &errb}); err != nil {
		errb.WriteString("arcfit " + c.name + ": " + oneLine(err.Error()) + "\n")
		code = exitFailure
		var ue *usageError
		if asUsage(err, &ue) {
			code = exitUsage
		}
	}
	return code, out.String(), errb.String()
}

// TestFitDemoJSON fits the demo scenario (fit/demo, invented data made with
// python3-erfa by testdata/gen/demo_scenario.py) and checks the JSON fields
// against the input: every observation has a residual, the counts agree with
// the file, the residuals of an adequate fit stay within a few stated σ
// (0.5″, the generator's noise).
func TestFitDemoJSON(t *testing.T) {
	obsPath, sitesPath := demoFiles(t)
	save := filepath.Join(t.TempDir(), "fit.json")
	code, out, errs := runCmd(t, newFitCommand(), obsPath, "--sites", sitesPath, "--json", "--save", save)
	if code != exitOK {
		t.Fatalf("exit %d, stderr %s", code, errs)
	}
	var j struct {
		Model     string   `json:"model"`
		NObs      int      `json:"n_obs"`
		NUsed     int      `json:"n_used"`
		RMS       *float64 `json:"rms_arcsec"`
		Chi2DoF   *float64 `json:"chi2_dof"`
		Cond      *float64 `json:"cond"`
		Scaled    *bool    `json:"scaled"`
		Residuals []struct {
			Line    int     `json:"line"`
			TimeUTC string  `json:"time_utc"`
			DRA     float64 `json:"dra_arcsec"`
			DDec    float64 `json:"ddec_arcsec"`
			Flagged bool    `json:"flagged"`
		} `json:"residuals"`
		Models []struct {
			Model  string `json:"model"`
			Chosen bool   `json:"chosen"`
		} `json:"models"`
		InverseDistance map[string]any `json:"inverse_distance"`
	}
	if err := json.Unmarshal([]byte(out), &j); err != nil {
		t.Fatalf("fit --json: %v\n%s", err, out)
	}
	e := expectDemo(t)
	if j.NObs != e.count || len(j.Residuals) != e.count {
		t.Errorf("n_obs %d, residuals %d, want %d (rows of the demo file)", j.NObs, len(j.Residuals), e.count)
	}
	if j.RMS == nil || *j.RMS > 1.5 || j.Chi2DoF == nil || j.Cond == nil || j.Scaled == nil || j.InverseDistance == nil {
		t.Errorf("rms %v chi2_dof %v cond %v scaled %v inverse_distance %v: want all present, rms within 3×0.5″", j.RMS, j.Chi2DoF, j.Cond, j.Scaled, j.InverseDistance)
	}
	chosen := 0
	for _, m := range j.Models {
		if m.Chosen {
			chosen++
			if m.Model != j.Model {
				t.Errorf("chosen row %s, model %s", m.Model, j.Model)
			}
		}
	}
	if chosen != 1 {
		t.Errorf("%d chosen rows, want 1", chosen)
	}
	for _, r := range j.Residuals {
		if !r.Flagged && (r.DRA*r.DRA+r.DDec*r.DDec) > 25*0.25*2 {
			t.Errorf("line %d: residual (%.3f, %.3f)″ beyond 5σ of the 0.5″ noise", r.Line, r.DRA, r.DDec)
		}
	}
	if _, err := os.Stat(save); err != nil {
		t.Errorf("--save: %v", err)
	}
	if !strings.Contains(errs, "wrote "+save) {
		t.Errorf("stderr does not say the fit file was written: %q", errs)
	}
}

// TestFitDemoText checks the human output names its sections and every
// observation line of the demo file.
func TestFitDemoText(t *testing.T) {
	obsPath, sitesPath := demoFiles(t)
	code, out, errs := runCmd(t, newFitCommand(), obsPath, "--sites", sitesPath, "--at", "2027-02-09T04:00:00Z", "--site", "Alder Ridge")
	if code != exitOK {
		t.Fatalf("exit %d, stderr %s", code, errs)
	}
	for _, want := range []string{"chosen model: kepler", "models compared", "residuals, observed − computed", "flagged observations",
		"motion on each night", "condition number", "orbit: osculating heliocentric elements", "class: main belt", "H = "} {
		if !strings.Contains(out, want) {
			t.Errorf("fit text lacks %q:\n%s", want, out)
		}
	}
	t.Log("\n" + out)
	// A sky-plane model named by the user prints its parallax term and
	// horizon instead.
	code, out, errs = runCmd(t, newFitCommand(), obsPath, "--sites", sitesPath, "--model", "poly2")
	if code != exitOK {
		t.Fatalf("exit %d, stderr %s", code, errs)
	}
	for _, want := range []string{"chosen model: poly2", "parallax:", "validity horizon:"} {
		if !strings.Contains(out, want) {
			t.Errorf("fit --model poly2 text lacks %q:\n%s", want, out)
		}
	}
}

func asUsage(err error, ue **usageError) bool { return errors.As(err, ue) }

// fit --chart and --compare-chart write a well-formed SVG and a PNG; an
// unknown extension is refused before anything is written.
func TestFitCharts(t *testing.T) {
	obsPath, sitesPath := demoFiles(t)
	dir := t.TempDir()
	svgPath, pngPath := filepath.Join(dir, "res.svg"), filepath.Join(dir, "models.png")
	code, _, errs := runCmd(t, newFitCommand(), obsPath, "--sites", sitesPath, "--chart", svgPath, "--compare-chart", pngPath)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	data, err := os.ReadFile(svgPath)
	if err != nil {
		t.Fatal(err)
	}
	dec := xml.NewDecoder(bytes.NewReader(data))
	nText := 0
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("residual chart is not well-formed XML: %v", err)
		}
		if se, ok := tok.(xml.StartElement); ok && se.Name.Local == "text" {
			nText++
		}
	}
	if nText < 5 {
		t.Errorf("residual chart has %d text elements; want labelled axes", nText)
	}
	f, err := os.Open(pngPath)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if _, err := png.Decode(f); err != nil {
		t.Errorf("comparison chart: %v", err)
	}
	bad := filepath.Join(dir, "res.gif")
	code, out, errs := runCmd(t, newFitCommand(), obsPath, "--sites", sitesPath, "--chart", bad)
	if _, err := os.Stat(bad); code != exitUsage || out != "" || lines(errs) != 1 || err == nil {
		t.Errorf("--chart .gif: exit %d, stdout %q, stderr %q, file written %v; want 2, nothing, one line, no file", code, out, errs, err == nil)
	}
}
