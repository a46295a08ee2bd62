package chart

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"
)

// TestFormatOf checks the formats the extensions name, in any case, and
// the one-line errors of the others.
func TestFormatOf(t *testing.T) {
	for _, c := range []struct {
		path string
		want Format
	}{
		{"tonight.png", PNG}, {"a/b/TONIGHT.PNG", PNG}, {"x.svg", SVG}, {"x.Svg", SVG},
	} {
		if got, err := FormatOf(c.path); err != nil || got != c.want {
			t.Errorf("FormatOf(%q) = %v, %v; want %v", c.path, got, err, c.want)
		}
	}
	for _, path := range []string{"x.jpg", "x.pdf", "x", "x.png.tmp", "dir.png/x"} {
		_, err := FormatOf(path)
		if !errors.Is(err, ErrFormat) || strings.Contains(err.Error(), "\n") || !strings.Contains(err.Error(), ".png or .svg") {
			t.Errorf("FormatOf(%q): error %v, want one line wrapping ErrFormat that says .png or .svg", path, err)
		}
	}
}

// smallFigure is a one-panel figure of an invented region.
func smallFigure(t *testing.T) *Figure {
	t.Helper()
	pn, err := SkyRegion(invented(), nil, SkyOptions{FOVArcmin: 10})
	if err != nil {
		t.Fatal(err)
	}
	return &Figure{Width: 6 * vg.Inch, Height: 4 * vg.Inch, Panels: []Panel{pn}}
}

// TestSave writes a PNG and an SVG and checks them, then checks that a
// failed save leaves no file, no temporary file, and an existing file as it
// was.
func TestSave(t *testing.T) {
	dir := t.TempDir()
	fg := smallFigure(t)
	pngPath := filepath.Join(dir, "region.png")
	if err := Save(pngPath, fg); err != nil {
		t.Fatal(err)
	}
	data, err := os.ReadFile(pngPath)
	if err != nil {
		t.Fatal(err)
	}
	checkPNG(t, data, 576, 384) // 6 × 4 inches at 96 dpi
	svgPath := filepath.Join(dir, "region.svg")
	if err := Save(svgPath, fg); err != nil {
		t.Fatal(err)
	}
	if data, err = os.ReadFile(svgPath); err != nil {
		t.Fatal(err)
	}
	checkSVG(t, data, 10, 5)

	// An unknown extension, a missing directory, a directory that is a
	// file, nothing to draw.
	notDir := filepath.Join(dir, "plain")
	if err := os.WriteFile(notDir, []byte("keep"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		path string
		fg   *Figure
	}{
		{filepath.Join(dir, "region.gif"), fg},
		{filepath.Join(dir, "missing", "region.png"), fg},
		{filepath.Join(notDir, "region.png"), fg},
		{filepath.Join(dir, "empty.png"), &Figure{Width: 100, Height: 100}},
		{filepath.Join(dir, "zero.png"), &Figure{Panels: fg.Panels}},
	} {
		err := Save(c.path, c.fg)
		if err == nil {
			t.Errorf("Save(%s): no error", c.path)
			continue
		}
		if strings.Contains(err.Error(), "\n") {
			t.Errorf("Save(%s): error on several lines: %q", c.path, err)
		}
		if _, err := os.Stat(c.path); err == nil {
			t.Errorf("Save(%s) failed but left the file", c.path)
		}
	}
	// A failed save over an existing file leaves it as it was.
	before, err := os.ReadFile(pngPath)
	if err != nil {
		t.Fatal(err)
	}
	if err := Save(pngPath, &Figure{}); err == nil {
		t.Error("Save of an empty figure: no error")
	}
	if after, _ := os.ReadFile(pngPath); string(after) != string(before) {
		t.Error("a failed save changed the existing file")
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		if strings.HasSuffix(e.Name(), ".tmp") {
			t.Errorf("temporary file left behind: %s", e.Name())
		}
	}
	if os.Geteuid() != 0 { // root writes anywhere
		ro := filepath.Join(dir, "read-only")
		if err := os.Mkdir(ro, 0o555); err != nil {
			t.Fatal(err)
		}
		if err := Save(filepath.Join(ro, "x.png"), fg); err == nil {
			t.Error("Save into a read-only directory: no error")
		}
	}
}
