package main

import (
	"bytes"
	"regexp"
	"runtime"
	"strings"
	"testing"
)

// runArgs runs arcfit with args and returns the exit code and both streams.
func runArgs(t *testing.T, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var out, errb bytes.Buffer
	code = run(args, strings.NewReader(""), &out, &errb)
	return code, out.String(), errb.String()
}

// lines counts the lines of s.
func lines(s string) int { return strings.Count(strings.TrimSuffix(s, "\n"), "\n") + 1 }

func TestVersion(t *testing.T) {
	code, out, errs := runArgs(t, "--version")
	want := "arcfit " + version + " (" + runtime.Version() + ")\n"
	if code != exitOK || out != want || errs != "" {
		t.Errorf("arcfit --version: code %d, stdout %q, stderr %q; want 0, %q, \"\"", code, out, errs, want)
	}
}

// TestHelp checks that the help goes to stdout with exit 0, lists every
// command of design.md, and that each command's help has a usage line and an
// example, and says so when the command is not built yet.
func TestHelp(t *testing.T) {
	designCommands := []string{"inspect", "fit", "predict", "night", "plan", "ephem", "simulate", "demo"} // design.md, "Commands (first set)"
	for _, args := range [][]string{{"--help"}, {"-h"}, {"help"}} {
		code, out, errs := runArgs(t, args...)
		if code != exitOK || errs != "" {
			t.Errorf("arcfit %v: code %d stderr %q, want 0 and nothing", args, code, errs)
		}
		for _, c := range designCommands {
			if !regexp.MustCompile(`(?m)^  ` + c + ` `).MatchString(out) {
				t.Errorf("arcfit %v: command %s not listed:\n%s", args, c, out)
			}
		}
	}
	built := map[string]bool{"inspect": true, "demo": true, "ephem": true, "night": true, "fit": true, "predict": true,
		"plan": true, "simulate": true}
	for _, c := range designCommands {
		for _, args := range [][]string{{c, "--help"}, {c, "-h"}, {"help", c}, {c, "some-file.csv", "--help"}} {
			code, out, errs := runArgs(t, args...)
			if code != exitOK || errs != "" {
				t.Errorf("arcfit %v: code %d stderr %q, want 0 and nothing", args, code, errs)
				continue
			}
			if !strings.Contains(out, "Usage:\n  arcfit "+c) || !strings.Contains(out, "Example:\n  arcfit "+c) {
				t.Errorf("arcfit %v: help lacks a usage line or an example:\n%s", args, out)
			}
			if got := strings.Contains(out, "not built yet"); got == built[c] {
				t.Errorf("arcfit %v: help says not built yet = %v, want %v", args, got, !built[c])
			}
		}
	}
	_, out, _ := runArgs(t, "inspect", "--help")
	for _, f := range []string{"--sites", "--site", "--json", "--csv", "--format", "--sigma"} {
		if !strings.Contains(out, f) {
			t.Errorf("arcfit inspect --help: flag %s not described", f)
		}
	}
}

// TestUsageErrors checks that bad calls give exit 2, nothing on stdout and a
// one-line message on stderr that says what was wrong.
func TestUsageErrors(t *testing.T) {
	cases := []struct {
		args []string
		want string // a part of the message
	}{
		{nil, "no command given"},
		{[]string{"orbitize"}, `unknown command "orbitize"`},
		{[]string{"help", "orbitize"}, `unknown command "orbitize"`},
		{[]string{"--verbose"}, `unknown flag "--verbose"`},
		{[]string{"inspect", "--no-such-flag", "x.csv"}, "unknown flag: --no-such-flag"},
		{[]string{"inspect", "x.csv", "--sigma", "abc"}, `invalid argument "abc"`},
		{[]string{"inspect"}, "no observation file given"},
		{[]string{"inspect", "a.csv", "b.csv"}, "one observation file at a time"},
		{[]string{"inspect", "a.csv", "--json", "--csv"}, "--json and --csv exclude each other"},
		{[]string{"inspect", "a.csv", "--format", "xml"}, `--format "xml"`},
		{[]string{"demo", "extra"}, "takes no file arguments"},
	}
	for _, c := range cases {
		code, out, errs := runArgs(t, c.args...)
		if code != exitUsage || out != "" || lines(errs) != 1 || !strings.Contains(errs, c.want) {
			t.Errorf("arcfit %q: code %d, stdout %q, stderr %q; want 2, nothing, one line with %q",
				c.args, code, out, errs, c.want)
		}
	}
}
