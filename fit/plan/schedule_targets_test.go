package plan_test

import (
	"errors"
	"path/filepath"
	"strings"
	"testing"

	"arcfit/astro/obs"
	"arcfit/fit/plan"
)

// TestReadTargets checks the targets file against the format of
// schedule_targets.go: the kinds, quoting, names with blanks, comments,
// paths relative to the file's directory, the duplicate warning.
func TestReadTargets(t *testing.T) {
	in := "\xef\xbb\xbf# the club's targets\r\n" +
		"obs  obs/night1.csv\r\n" +
		"\r\n" +
		"   # an indented comment\n" +
		"FIT\tfits/a.json\n" +
		"elements elements.csv Demo-1 (invented) # not a comment\n" +
		`elements "my elements.csv" "Demo 2"` + "\n" +
		"elements /abs/elements.csv\n" +
		"obs obs/night1.csv\n"
	got, warns, err := plan.ReadTargets(strings.NewReader(in), "targets.txt", "club")
	if err != nil {
		t.Fatal(err)
	}
	want := []plan.TargetLine{
		{Source: "targets.txt", Line: 2, FileColumn: 6, Kind: plan.TargetObs, File: "obs/night1.csv", Path: filepath.Join("club", "obs/night1.csv")},
		{Source: "targets.txt", Line: 5, FileColumn: 5, Kind: plan.TargetFit, File: "fits/a.json", Path: filepath.Join("club", "fits/a.json")},
		{Source: "targets.txt", Line: 6, FileColumn: 10, Kind: plan.TargetElements, File: "elements.csv", Path: filepath.Join("club", "elements.csv"), Name: "Demo-1 (invented) # not a comment"},
		{Source: "targets.txt", Line: 7, FileColumn: 10, Kind: plan.TargetElements, File: "my elements.csv", Path: filepath.Join("club", "my elements.csv"), Name: "Demo 2"},
		{Source: "targets.txt", Line: 8, FileColumn: 10, Kind: plan.TargetElements, File: "/abs/elements.csv", Path: "/abs/elements.csv"},
		{Source: "targets.txt", Line: 9, FileColumn: 5, Kind: plan.TargetObs, File: "obs/night1.csv", Path: filepath.Join("club", "obs/night1.csv")},
	}
	if len(got) != len(want) {
		t.Fatalf("%d targets, want %d: %+v", len(got), len(want), got)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("target %d: %+v, want %+v", i, got[i], want[i])
		}
	}
	if len(warns) != 1 || warns[0].Line != 9 || !strings.Contains(warns[0].String(), "line 2") {
		t.Errorf("warnings %v, want one at line 9 naming line 2", warns)
	}
	if s := got[3].String(); s != `elements "my elements.csv" "Demo 2"` {
		t.Errorf("String() = %q", s)
	}
	if w := got[0].Where(); w != "targets.txt:2" {
		t.Errorf("Where() = %q", w)
	}
}

// TestReadTargetsErrors checks that each bad line gives one error naming
// the file, line and column, with the sentinel. The § in a line marks the
// column the error should name.
func TestReadTargetsErrors(t *testing.T) {
	cases := []struct {
		in       string
		line     int
		sentinel error
		want     string
	}{
		{"obs a.csv\n§observations b.csv\n", 2, obs.ErrSyntax, "kind"},
		{"fit§\n", 1, obs.ErrFieldCount, "a file after fit"},
		{"fit a.json §b.json\n", 1, obs.ErrFieldCount, "one file"},
		{"obs §\"a.csv\n", 1, obs.ErrSyntax, "closing"},
		{"obs \"a.csv\"§x\n", 1, obs.ErrSyntax, "blank after"},
		{"elements e.csv \"Demo\" §extra\n", 1, obs.ErrFieldCount, "nothing after the quoted name"},
		{"obs a§\x01.csv\n", 1, obs.ErrSyntax, "printable"},
		{"obs a§\xff.csv\n", 1, obs.ErrSyntax, "UTF-8"},
		{"elements §\"\"\n", 1, obs.ErrFieldCount, "a file after elements"},
	}
	for _, c := range cases {
		mark := strings.Index(c.in, "§")
		lineStart := strings.LastIndex(c.in[:mark], "\n") + 1
		col := len([]rune(c.in[lineStart:mark])) + 1
		in := strings.Replace(c.in, "§", "", 1)
		_, _, err := plan.ReadTargets(strings.NewReader(in), "targets.txt", ".")
		var pe *obs.ParseError
		if !errors.As(err, &pe) || pe.Line != c.line || pe.Column != col || !errors.Is(err, c.sentinel) ||
			!strings.Contains(err.Error(), c.want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%q: %v; want targets.txt:%d:%d with %q", c.in, err, c.line, col, c.want)
			continue
		}
		if !strings.HasPrefix(err.Error(), "targets.txt:") {
			t.Errorf("%q: %v does not start with the file's name", c.in, err)
		}
	}
	_, _, err := plan.ReadTargets(strings.NewReader("# nothing\n\n"), "targets.txt", ".")
	if !errors.Is(err, plan.ErrNoTargets) {
		t.Errorf("empty file: %v, want ErrNoTargets", err)
	}
	_, _, err = plan.ReadTargetsFile(filepath.Join(t.TempDir(), "none.txt"))
	if err == nil || !strings.Contains(err.Error(), "none.txt") {
		t.Errorf("missing file: %v", err)
	}
}
