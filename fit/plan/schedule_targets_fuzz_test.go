package plan

import (
	"bytes"
	"errors"
	"strconv"
	"strings"
	"testing"
	"unicode/utf8"

	"arcfit/astro/obs"
)

// FuzzReadTargets reads arbitrary bytes as a targets file. An error is a
// one-line *obs.ParseError naming the file, and a line within the input and
// a column within that line (a file listing no target is a whole-file
// error wrapping ErrNoTargets). Accepted targets are in file order, each
// with its line and the column of its FILE word; the lines written back with
// TargetLine.String read back to the same kinds, files and names.
func FuzzReadTargets(f *testing.F) {
	for _, s := range []string{
		"# the club's targets\nobs obs.csv\nfit club-fit.json\nelements elements.csv Demo-1 (invented)\n",
		"\ufeffOBS \"my obs.csv\"\r\nelements\t\"e s.csv\"\t\"Demo 2\"\r\n",
		"elements e.csv\nelements e.csv\n", "fit", "obs a b", "comet x", "obs \"unclosed", "obs \"a\"b", "\n\n#\n", "obs \x00",
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		ts, warns, err := ReadTargets(bytes.NewReader(data), "fuzz.txt", "/club")
		if err != nil {
			var pe *obs.ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %T %v, want *obs.ParseError", err, err)
			}
			msg := err.Error()
			if strings.ContainsAny(msg, "\n\r") || !strings.HasPrefix(msg, "fuzz.txt:") {
				t.Fatalf("error not one line naming the file: %q", msg)
			}
			if ts != nil || warns != nil {
				t.Fatalf("targets or warnings returned with the error %v", err)
			}
			if errors.Is(err, ErrNoTargets) {
				return
			}
			lines := strings.Split(string(data), "\n")
			if pe.Line < 1 || pe.Line > len(lines) {
				t.Fatalf("error line %d outside the %d lines: %q", pe.Line, len(lines), msg)
			}
			if !strings.HasPrefix(msg, "fuzz.txt:"+strconv.Itoa(pe.Line)+":"+strconv.Itoa(pe.Column)+":") {
				t.Fatalf("message %q does not start with its place", msg)
			}
			if n := utf8.RuneCountInString(lines[pe.Line-1]); pe.Column < 1 || pe.Column > n+1 {
				t.Fatalf("error column %d outside line %d (%d characters): %q", pe.Column, pe.Line, n, msg)
			}
			return
		}
		if len(ts) == 0 {
			t.Fatal("no targets and no error")
		}
		var again []string
		for i, tl := range ts {
			if i > 0 && tl.Line <= ts[i-1].Line {
				t.Fatalf("target %d on line %d after line %d", i, tl.Line, ts[i-1].Line)
			}
			if tl.File == "" || tl.FileColumn < 1 || tl.Path == "" || tl.Source != "fuzz.txt" {
				t.Fatalf("target %d: %+v", i, tl)
			}
			if tl.Kind != TargetElements && tl.Name != "" {
				t.Fatalf("target %d of kind %v with a name: %+v", i, tl.Kind, tl)
			}
			again = append(again, tl.String())
		}
		for _, w := range warns {
			if strings.ContainsAny(w.String(), "\n\r") {
				t.Fatalf("warning not one line: %q", w)
			}
		}
		text := strings.Join(again, "\n") + "\n"
		back, _, err := ReadTargets(strings.NewReader(text), "again.txt", "/club")
		if err != nil {
			t.Fatalf("targets written back do not read: %v\n%s", err, text)
		}
		if len(back) != len(ts) {
			t.Fatalf("%d targets read back, want %d\n%s", len(back), len(ts), text)
		}
		for i := range ts {
			a, b := ts[i], back[i]
			if a.Kind != b.Kind || a.File != b.File || a.Path != b.Path || a.Name != b.Name {
				t.Fatalf("target %d: %+v written as %q read back as %+v", i, a, again[i], b)
			}
		}
	})
}
