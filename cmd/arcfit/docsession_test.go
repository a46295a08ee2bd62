package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// sessionCommand is one command block of docs/session.md: the command line
// and the output printed under it.
type sessionCommand struct {
	args   []string
	output []string
}

// splitCommandLine splits a command line of docs/session.md into words:
// blanks separate words, double quotes group them.
func splitCommandLine(s string) []string {
	var words []string
	var b strings.Builder
	inWord, quoted := false, false
	for _, r := range s {
		switch {
		case r == '"':
			quoted = !quoted
			inWord = true
		case (r == ' ' || r == '\t') && !quoted:
			if inWord {
				words = append(words, b.String())
				b.Reset()
				inWord = false
			}
		default:
			b.WriteRune(r)
			inWord = true
		}
	}
	if inWord {
		words = append(words, b.String())
	}
	return words
}

// readSession returns the command blocks of the markdown file at path: the
// fenced blocks whose first line starts with "$ ".
func readSession(t *testing.T, path string) []sessionCommand {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var cmds []sessionCommand
	var cur *sessionCommand
	inFence := false
	for _, line := range strings.Split(string(data), "\n") {
		if strings.HasPrefix(line, "```") {
			if inFence && cur != nil {
				cmds = append(cmds, *cur)
			}
			inFence, cur = !inFence, nil
			continue
		}
		if !inFence {
			continue
		}
		if cur == nil {
			if !strings.HasPrefix(line, "$ ") {
				inFence = false // an example block, not a command
				continue
			}
			cur = &sessionCommand{args: splitCommandLine(strings.TrimPrefix(line, "$ "))}
			continue
		}
		cur.output = append(cur.output, line)
	}
	return cmds
}

// TestDocsSession runs every command of the user guide's worked session
// (docs/session.md, made by docs/gen/session.sh) on the demo data and checks
// that it still succeeds and still begins its output as the guide shows. A
// failure here means the guide no longer tells the truth: regenerate it with
// docs/gen/session.sh and read the difference.
func TestDocsSession(t *testing.T) {
	if testing.Short() {
		t.Skip("the worked session runs every command (-short)")
	}
	doc, err := filepath.Abs("../../docs/session.md")
	if err != nil {
		t.Fatal(err)
	}
	cmds := readSession(t, doc)
	if len(cmds) < 8 {
		t.Fatalf("docs/session.md: %d command blocks, want at least 8", len(cmds))
	}
	t.Chdir(t.TempDir())
	t.Setenv("TZ", "UTC")
	if code, _, stderr := runArgs(t, "demo", "--out", "demo"); code != 0 {
		t.Fatalf("arcfit demo --out demo: exit %d: %s", code, stderr)
	}
	seen := map[string]bool{}
	for _, c := range cmds {
		line := strings.Join(c.args, " ")
		switch c.args[0] {
		case "ls":
			continue
		case "cat":
			// An input the guide shows is written from the guide; an output
			// of an earlier command is already there.
			name := c.args[1]
			if _, err := os.Stat(name); err != nil {
				if err := os.WriteFile(name, []byte(strings.Join(c.output, "\n")), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			continue
		case "arcfit":
		default:
			t.Errorf("docs/session.md: unexpected command %q", line)
			continue
		}
		seen[c.args[1]] = true
		code, stdout, stderr := runArgs(t, c.args[1:]...)
		if code != 0 {
			t.Errorf("%s: exit %d: %s", line, code, stderr)
			continue
		}
		got := firstLine(stderr + stdout)
		if len(c.output) == 0 || got != c.output[0] {
			want := ""
			if len(c.output) > 0 {
				want = c.output[0]
			}
			t.Errorf("%s: output begins\n\t%q\nthe guide shows\n\t%q\n(regenerate docs/session.md with docs/gen/session.sh)", line, got, want)
		}
	}
	for _, name := range []string{"inspect", "fit", "predict", "night", "ephem", "plan", "simulate"} {
		if !seen[name] {
			t.Errorf("docs/session.md has no worked example of %q", name)
		}
	}
}

// firstLine returns the first line of s.
func firstLine(s string) string {
	line, _, _ := strings.Cut(s, "\n")
	return line
}
