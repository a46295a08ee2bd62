package main

import (
	"bytes"
	"encoding/xml"
	"image/png"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// nightChartArgs is a night with an invented element set as the target.
var nightChartArgs = []string{"night", "--elements", nightTargets, "--name", "Invented-N1", "--date", "2026-12-11", "--site", "44.52,-72.80,410"}

// TestNightChart runs night --chart with a target (PNG and SVG) and
// without one, and checks that the files are whole images, that stdout is
// what it is without --chart, and that stderr names the file.
func TestNightChart(t *testing.T) {
	dir := t.TempDir()
	_, plain, _ := runArgs(t, nightChartArgs...)

	pngPath := filepath.Join(dir, "tonight.png")
	code, out, errs := runArgs(t, append(nightChartArgs, "--chart", pngPath)...)
	if code != exitOK {
		t.Fatalf("code %d: %s", code, errs)
	}
	if out != plain {
		t.Errorf("stdout with --chart differs from stdout without it")
	}
	if !strings.Contains(errs, "wrote "+pngPath) {
		t.Errorf("stderr %q does not name the chart", errs)
	}
	data, err := os.ReadFile(pngPath)
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(data))
	if err != nil {
		t.Fatalf("%s is not a PNG: %v", pngPath, err)
	}
	// 16 × 7 inches at 96 dots per inch (chart.PNGDPI).
	if b := img.Bounds(); b.Dx() != 1536 || b.Dy() != 672 {
		t.Errorf("PNG %d × %d, want 1536 × 672", b.Dx(), b.Dy())
	}

	svgPath := filepath.Join(dir, "tonight.SVG") // the extension in any case
	if code, _, errs := runArgs(t, append(nightChartArgs, "--chart", svgPath, "--json")...); code != exitOK {
		t.Fatalf("--chart .SVG: code %d: %s", code, errs)
	}
	texts := svgTexts(t, svgPath)
	for _, want := range []string{"Invented-N1: where to point", "Invented-N1: altitude", "limit 25°", "N", "E"} {
		if !strings.Contains(texts, want) {
			t.Errorf("SVG has no text %q", want)
		}
	}

	skyPath := filepath.Join(dir, "sky.svg")
	if code, _, errs := runArgs(t, "night", "--date", "2027-02-20", "--site", "44.52,-72.80,410", "--chart", skyPath); code != exitOK {
		t.Fatalf("night without a target --chart: code %d: %s", code, errs)
	}
	if texts := svgTexts(t, skyPath); !strings.Contains(texts, "altitude through the night of 2027-02-20") || !strings.Contains(texts, "Moon") {
		t.Errorf("the sky chart lacks its title or the Moon: %q", texts)
	}
}

// svgTexts parses the SVG file and returns its text elements' content.
func svgTexts(t *testing.T, path string) string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	d := xml.NewDecoder(f)
	var b strings.Builder
	paths, in := 0, false
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("%s is not well-formed XML: %v", path, err)
		}
		switch e := tok.(type) {
		case xml.StartElement:
			in = e.Name.Local == "text"
			if e.Name.Local == "path" {
				paths++
			}
		case xml.CharData:
			if in {
				b.Write(e)
				b.WriteByte('\n')
			}
		case xml.EndElement:
			in = false
		}
	}
	if paths < 20 {
		t.Errorf("%s has %d paths, want a drawing", path, paths)
	}
	return b.String()
}

// TestNightChartBadFile checks that a chart file with an unknown extension
// or in a directory that cannot hold it exits 2 with one line, prints
// nothing on stdout and leaves no file (and no temporary file) behind.
func TestNightChartBadFile(t *testing.T) {
	dir := t.TempDir()
	notDir := filepath.Join(dir, "plain-file")
	if err := os.WriteFile(notDir, []byte("x"), 0o644); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		path, want string
	}{
		{filepath.Join(dir, "tonight.jpg"), "want a file name ending in .png or .svg"},
		{filepath.Join(dir, "tonight"), "want a file name ending in .png or .svg"},
		{filepath.Join(dir, "no-such-dir", "tonight.png"), "no-such-dir"},
		{filepath.Join(notDir, "tonight.png"), "plain-file"},
	}
	for _, c := range cases {
		code, out, errs := runArgs(t, append(nightChartArgs, "--chart", c.path)...)
		if code != exitUsage || out != "" || lines(errs) != 1 || !strings.Contains(errs, c.want) {
			t.Errorf("--chart %s: code %d, stdout %q, stderr %q; want 2, nothing, one line with %q", c.path, code, out, errs, c.want)
		}
		if _, err := os.Stat(c.path); err == nil {
			t.Errorf("--chart %s: the file exists after the error", c.path)
		}
	}
	if os.Geteuid() != 0 { // root writes anywhere
		ro := filepath.Join(dir, "read-only")
		if err := os.Mkdir(ro, 0o555); err != nil {
			t.Fatal(err)
		}
		path := filepath.Join(ro, "tonight.png")
		code, out, errs := runArgs(t, append(nightChartArgs, "--chart", path)...)
		if code != exitUsage || out != "" || lines(errs) != 1 {
			t.Errorf("--chart in a read-only directory: code %d, stdout %q, stderr %q; want 2, nothing, one line", code, out, errs)
		}
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		if e.Name() != "plain-file" && e.Name() != "read-only" {
			t.Errorf("left behind: %s", e.Name())
		}
	}
}
