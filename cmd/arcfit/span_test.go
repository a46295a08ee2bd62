package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"arcfit/fit/demo"
)

// TestSpanRefusals gives every command a date just outside the supported
// span, 1800 to 2200 (design.md, "Input formats"): each refuses it with exit
// code 2 and one line that names the span (its end as 2200, or as
// 2201-01-01 0h UTC), never a value computed with an extrapolated ΔT or
// ephemeris.
func TestSpanRefusals(t *testing.T) {
	el := filepath.Join(t.TempDir(), "elements.csv")
	if err := os.WriteFile(el, demo.Elements(), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, args := range [][]string{
		{"predict", "--elements", el, "--at", "1799-12-31T23:59:59Z"},
		{"predict", "--elements", el, "--at", "JD 2378496.4"},
		{"night", "--elements", el, "--site", "44.52,-72.80,410", "--date", "1799-12-31"},
		{"night", "--elements", el, "--site", "44.52,-72.80,410", "--date", "2201-01-01"},
		{"night", "--site", "44.52,-72.80,410", "--date", "2201-01-01"},
		{"ephem", "sun", "--from", "1799-12-31T00:00:00Z", "--to", "1800-01-02T00:00:00Z", "--step", "1d"},
		{"ephem", "sun", "--from", "2200-12-30T00:00:00Z", "--to", "2201-01-02T00:00:00Z", "--step", "1d"},
		{"simulate", el, "--site", "44.52,-72.80,410", "--nights", "2027-02-20,2201-01-01"},
		{"simulate", el, "--site", "44.52,-72.80,410", "--from", "1799-12-30", "--night-count", "3"},
		{"simulate", el, "--site", "44.52,-72.80,410", "--from", "2200-12-30", "--night-count", "3"},
	} {
		code, stdout, stderr := runArgs(t, args...)
		msg := strings.TrimSuffix(stderr, "\n")
		namesSpan := (strings.Contains(msg, "1800") || strings.Contains(msg, "past 2200")) && (strings.Contains(msg, "2200") || strings.Contains(msg, "2201-01-01"))
		if code != exitUsage || stdout != "" || strings.Contains(msg, "\n") || !namesSpan {
			t.Errorf("arcfit %s: code %d, stdout %d bytes, stderr %q; want 2 and one line naming the span 1800–2200", strings.Join(args, " "), code, len(stdout), stderr)
		}
	}
}
