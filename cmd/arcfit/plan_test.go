package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"arcfit/fit/demo"
)

// planDir writes the invented element sets of fit/plan (night_targets.csv)
// and a TARGETS file with the given lines into a temporary directory and
// returns the TARGETS path.
func planDir(t *testing.T, lines ...string) string {
	t.Helper()
	dir := t.TempDir()
	data, err := os.ReadFile(nightTargets)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "night_targets.csv"), data, 0o644); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "targets.txt")
	if err := os.WriteFile(path, []byte(strings.Join(lines, "\n")+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// planJSONOf runs plan --json and decodes the object.
func planJSONOf(t *testing.T, wantCode int, args ...string) (map[string]any, []map[string]any, string) {
	t.Helper()
	code, out, errs := runArgs(t, append(append([]string{"plan"}, args...), "--json")...)
	if code != wantCode {
		t.Fatalf("arcfit plan %q: code %d, want %d; stderr %q", args, code, wantCode, errs)
	}
	var got map[string]any
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	var rows []map[string]any
	list, _ := got["rows"].([]any)
	for _, r := range list {
		rows = append(rows, r.(map[string]any))
	}
	return got, rows, errs
}

// TestPlanOneBadTarget schedules the three invented targets at Alder Ridge
// on 2026-10-15 from a TARGETS file that also names a missing file: the
// others are scheduled in the order of the astropy reference's best times
// (night_windows.txt), with their best times within the 2 minutes;
// the missing one is reported on one line naming the TARGETS file, line and
// column, and in the output; the exit status is 2; the conflicts are
// consistent between the rows and the list.
func TestPlanOneBadTarget(t *testing.T) {
	path := planDir(t,
		"# club targets (invented)",
		"elements night_targets.csv Invented-H3",
		"elements night_targets.csv Invented-N1",
		"obs missing.csv",
		"elements night_targets.csv Invented-P2")
	got, rows, errs := planJSONOf(t, exitUsage, path, "--date", "2026-10-15", "--site", "44.52,-72.80,410")
	if len(rows) != 4 || got["scheduled"] != 3.0 || got["failed"] != 1.0 {
		t.Fatalf("%d rows, %v scheduled, %v failed; want 4, 3, 1", len(rows), got["scheduled"], got["failed"])
	}
	order := []string{"Invented-P2", "Invented-N1", "Invented-H3"} // by the reference's best times
	for k, name := range order {
		r := rows[k]
		if r["target"] != name || r["status"] != "scheduled" || r["order"] != float64(k+1) {
			t.Fatalf("row %d: %v %v (order %v), want %s scheduled", k, r["target"], r["status"], r["order"], name)
		}
		best := nightRefLine(t, "best", "Alder_Ridge", "2026-10-15", name, "25")
		within(t, name+" best_time_utc", r["best_time_utc"], best[5])
		for _, k := range []string{"window_start_utc", "slot_start_utc", "ra_deg", "dec_deg", "mag", "region_arcmin", "best_alt_deg"} {
			if r[k] == nil {
				t.Errorf("%s: %s is null", name, k)
			}
		}
	}
	bad := rows[3]
	msg, _ := bad["error"].(string)
	if bad["status"] != "failed" || bad["line"] != 4.0 || !strings.Contains(msg, "targets.txt:4:5: obs missing.csv") || !strings.Contains(msg, "no such file") {
		t.Errorf("failed row: status %v line %v error %q", bad["status"], bad["line"], msg)
	}
	var errLines []string
	for _, l := range strings.Split(strings.TrimSpace(errs), "\n") {
		if !strings.Contains(l, "warning:") {
			errLines = append(errLines, l)
		}
	}
	if len(errLines) != 2 || !strings.Contains(errLines[0], "targets.txt:4:5: obs missing.csv: ") ||
		!strings.Contains(errLines[1], "1 of 4 targets could not be read") {
		t.Errorf("stderr (without warnings): %q; want the missing target on one line, then the count", errLines)
	}
	// Conflicts: each listed pair appears in both rows' conflicts_with.
	conflicts, _ := got["conflicts"].([]any)
	pairs := map[[2]int]bool{}
	for _, c := range conflicts {
		m := c.(map[string]any)
		pairs[[2]int{int(m["a"].(float64)), int(m["b"].(float64))}] = true
	}
	for _, r := range rows {
		me := int(r["order"].(float64))
		with, _ := r["conflicts_with"].([]any)
		for _, x := range with {
			o := int(x.(float64))
			if !pairs[[2]int{min(me, o), max(me, o)}] {
				t.Errorf("row %d conflicts with %d, not in the conflicts list %v", me, o, pairs)
			}
		}
	}
	if len(pairs) == 0 {
		t.Errorf("no conflicts; on this night N1 and H3 are both best in the last hour of darkness (night_windows.txt)")
	}
}

// TestPlanCSVMatchesJSON checks that --csv prints the JSON rows' fields, in
// the same order, one row a target in the same order.
func TestPlanCSVMatchesJSON(t *testing.T) {
	path := planDir(t, "elements night_targets.csv Invented-N1", `elements "night_targets.csv" Invented-P2`)
	args := []string{path, "--date", "2026-12-11", "--site", "44.52,-72.80,410", "--limit-mag", "19.5"}
	_, rows, _ := planJSONOf(t, exitOK, args...)
	code, out, errs := runArgs(t, append([]string{"plan", "--csv"}, args...)...)
	if code != exitOK {
		t.Fatalf("--csv: code %d, %s", code, errs)
	}
	recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(recs) != len(rows)+1 {
		t.Fatalf("%d CSV records, want a header and %d rows", len(recs), len(rows))
	}
	raw := strings.SplitN(out, "\n", 2)[0]
	var keys []string
	code, js, _ := runArgs(t, append([]string{"plan", "--json"}, args...)...)
	if code != exitOK {
		t.Fatal("--json failed")
	}
	dec := json.NewDecoder(strings.NewReader(js))
	var obj struct {
		Rows []json.RawMessage `json:"rows"`
	}
	if err := dec.Decode(&obj); err != nil {
		t.Fatal(err)
	}
	d := json.NewDecoder(bytes.NewReader(obj.Rows[0]))
	d.Token()
	for d.More() {
		k, _ := d.Token()
		keys = append(keys, k.(string))
		var skip json.RawMessage
		d.Decode(&skip)
	}
	if raw != strings.Join(keys, ",") {
		t.Errorf("CSV header\n%s\nJSON row keys\n%s", raw, strings.Join(keys, ","))
	}
	for i, r := range rows {
		rec := map[string]string{}
		for k, h := range recs[0] {
			rec[h] = recs[i+1][k]
		}
		if rec["target"] != r["target"] || rec["status"] != r["status"] || rec["best_time_utc"] != r["best_time_utc"] ||
			rec["fainter_than_limit"] != fmt.Sprint(r["fainter_than_limit"]) {
			t.Errorf("row %d: CSV %v, JSON %v", i, rec, r)
		}
	}
	// The flag follows the magnitude, and 19.5 lies between the two
	// targets' (Invented-N1 is V 18.7 at its best on this night, as in
	// fit/plan's ExampleNight), so both outcomes are seen.
	flagged := map[bool]int{}
	for _, r := range rows {
		m, _ := r["mag"].(float64)
		if r["fainter_than_limit"] != (m > 19.5) {
			t.Errorf("%v: mag %v, fainter_than_limit %v against 19.5", r["target"], m, r["fainter_than_limit"])
		}
		flagged[m > 19.5]++
	}
	if flagged[true] != 1 || flagged[false] != 1 {
		t.Errorf("%d fainter and %d brighter than 19.5; want one of each", flagged[true], flagged[false])
	}
}

// TestPlanNotObservableText checks the text of a night on which nothing can
// be observed (Alder Ridge, 2026-04-28: Invented-N1 near the Sun, Invented-P2
// below the limit, night_windows.txt): the reasons, no pointing, the near-Sun
// caution on standard error, exit 0; and --next-nights against the
// reference's search (Wattle Rise, 2026-06-20: Invented-N1 next observable
// on 2026-07-12 and 2026-07-13).
func TestPlanNotObservableText(t *testing.T) {
	path := planDir(t, "elements night_targets.csv Invented-N1", "elements night_targets.csv Invented-P2")
	code, out, errs := runArgs(t, "plan", path, "--date", "2026-04-28", "--site", "44.52,-72.80,410")
	if code != exitOK {
		t.Fatalf("code %d, stderr %q", code, errs)
	}
	for _, want := range []string{"Schedule for the night of 2026-04-28", "0 observable, 2 not observable",
		"Not observable on this night:", "within 15°", "No pointing", "stays below 25°"} {
		if !strings.Contains(out, want) {
			t.Errorf("text lacks %q:\n%s", want, out)
		}
	}
	if strings.Contains(out, "Schedule, by best time") {
		t.Errorf("a schedule table with nothing observable:\n%s", out)
	}
	if !strings.Contains(errs, "CAUTION: Invented-N1") || !strings.Contains(errs, "blind") {
		t.Errorf("stderr lacks the near-Sun caution: %q", errs)
	}

	path = planDir(t, "elements night_targets.csv Invented-N1")
	_, rows, _ := planJSONOf(t, exitOK, path, "--date", "2026-06-20", "--site", "-34.6,138.9,350", "--next-nights", "2")
	var want []any
	for _, d := range []string{"2026-07-12", "2026-07-13"} {
		l := nightRefLine(t, "next", "Wattle_Rise", "2026-06-20", "Invented-N1", "25", d)
		want = append(want, l[5])
	}
	if rows[0]["reason"] != "below_limit" || !reflect.DeepEqual(rows[0]["next_nights"], want) {
		t.Errorf("reason %v, next nights %v; want below_limit, %v (night_windows.txt)", rows[0]["reason"], rows[0]["next_nights"], want)
	}
}

// TestPlanFitAndObsTargets schedules the demo's fit file and its
// observations (fitted here) with an element set: the fit and the fit of
// the observations give the same best time and region (as night does).
func TestPlanFitAndObsTargets(t *testing.T) {
	obsPath, sitesPath := demoFiles(t)
	dir := filepath.Dir(obsPath)
	fitPath := filepath.Join(dir, "demo-fit.json")
	if code, _, errs := runCmd(t, newFitCommand(), obsPath, "--sites", sitesPath, "--save", fitPath); code != exitOK {
		t.Fatalf("fit: %s", errs)
	}
	if err := os.WriteFile(filepath.Join(dir, "elements.csv"), demo.Elements(), 0o644); err != nil {
		t.Fatal(err)
	}
	targets := filepath.Join(dir, "targets.txt")
	text := "fit demo-fit.json\nobs " + filepath.Base(obsPath) + "\nelements elements.csv\n"
	if err := os.WriteFile(targets, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	_, rows, _ := planJSONOf(t, exitOK, targets, "--date", "2027-02-09", "--site", "Alder Ridge", "--sites", sitesPath)
	byKind := map[string]map[string]any{}
	for _, r := range rows {
		if r["status"] != "scheduled" {
			t.Fatalf("%v: %v (%v)", r["target"], r["status"], r["reason_text"])
		}
		byKind[r["kind"].(string)] = r
	}
	f, o := byKind["fit"], byKind["obs"]
	if f["best_time_utc"] != o["best_time_utc"] || f["region_arcmin"] != o["region_arcmin"] || f["model"] != o["model"] {
		t.Errorf("fit file: best %v region %v model %v; observations: %v %v %v", f["best_time_utc"], f["region_arcmin"], f["model"],
			o["best_time_utc"], o["region_arcmin"], o["model"])
	}
	if e := byKind["elements"]; e["target"] != demo.ObjectName || e["model"] != "elements" {
		t.Errorf("elements row: %v %v", e["target"], e["model"])
	}
	// Listing a fit file as obs, or observations as fit, is the target's error.
	wrong := filepath.Join(dir, "wrong.txt")
	if err := os.WriteFile(wrong, []byte("obs demo-fit.json\nfit "+filepath.Base(obsPath)+"\nelements elements.csv\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	_, rows, errs := planJSONOf(t, exitUsage, wrong, "--date", "2027-02-09", "--site", "Alder Ridge", "--sites", sitesPath)
	if !strings.Contains(errs, `wrong.txt:1:5: obs demo-fit.json: demo-fit.json is a fit file`) ||
		!strings.Contains(errs, "wrong.txt:2:5: fit observations.csv: observations.csv is not a fit file") || rows[0]["status"] != "scheduled" {
		t.Errorf("stderr %q, first row %v", errs, rows[0]["status"])
	}
}

// TestPlanBadInput checks that bad calls exit 2 with one line on stderr
// naming what is wrong, and print nothing.
func TestPlanBadInput(t *testing.T) {
	good := planDir(t, "elements night_targets.csv Invented-N1")
	dir := filepath.Dir(good)
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	syntax := write("syntax.txt", "elements night_targets.csv Invented-N1\nobservations a.csv\n")
	empty := write("empty.txt", "# nothing yet\n")
	site := []string{"--site", "44.52,-72.80,410"}
	base := func(extra ...string) []string {
		return append(append([]string{"plan", good, "--date", "2026-12-11"}, site...), extra...)
	}
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"plan", "--date", "2026-12-11", "--site", "44.52,-72.80,410"}, "no TARGETS file"},
		{[]string{"plan", "a.txt", "b.txt", "--date", "2026-12-11"}, "one TARGETS file"},
		{append([]string{"plan", filepath.Join(dir, "none.txt"), "--date", "2026-12-11"}, site...), "none.txt"},
		{append([]string{"plan", syntax, "--date", "2026-12-11"}, site...), "syntax.txt:2:1: kind"},
		{append([]string{"plan", empty, "--date", "2026-12-11"}, site...), "empty.txt: want at least one target line"},
		{[]string{"plan", good, "--site", "44.52,-72.80,410"}, "no --date"},
		{[]string{"plan", good, "--date", "2026-12-11"}, "no --site"},
		{base("--limit-mag", "-1"), "--limit-mag -1"},
		{base("--limit-mag", "0"), "--limit-mag 0"},
		{base("--slot", "0"), `--slot "0"`},
		{base("--slot", "2d"), `--slot "2d"`},
		{base("--min-alt", "95"), "--min-alt 95"},
		{base("--fov", "0"), "--fov 0"},
		{base("--sigma", "-1"), "--sigma -1"},
		{base("--next-nights", "99"), "--next-nights 99"},
		{base("--json", "--csv"), "exclude each other"},
		{base("--tz", "Atlantis/Capital"), `--tz "Atlantis/Capital"`},
		{base("--model", "poly9"), `--model "poly9"`},
		{[]string{"plan", good, "--date", "2026-12-11", "--site", "Nowhere", "--sites", filepath.Join(dir, "night_targets.csv")}, "night_targets.csv"},
	}
	for _, c := range cases {
		code, out, errs := runArgs(t, c.args...)
		if code != exitUsage || out != "" || lines(errs) != 1 || !strings.Contains(errs, c.want) {
			t.Errorf("arcfit %q: code %d, stdout %q, stderr %q; want 2, nothing, one line with %q", c.args, code, out, errs, c.want)
		}
	}
}

// TestPlanDeterministic checks that the output does not depend on the
// number of workers (the targets are planned concurrently): two runs give
// the same bytes, and the rows come in schedule order whatever the list's
// order.
func TestPlanDeterministic(t *testing.T) {
	a := planDir(t, "elements night_targets.csv Invented-N1", "elements night_targets.csv Invented-P2", "elements night_targets.csv Invented-H3")
	b := planDir(t, "elements night_targets.csv Invented-H3", "elements night_targets.csv Invented-N1", "elements night_targets.csv Invented-P2")
	args := []string{"--date", "2026-12-11", "--site", "44.52,-72.80,410", "--json"}
	_, outA1, _ := runArgs(t, append([]string{"plan", a}, args...)...)
	_, outA2, _ := runArgs(t, append([]string{"plan", a}, args...)...)
	if outA1 != outA2 {
		t.Error("two runs of one plan differ")
	}
	_, rowsA, _ := planJSONOf(t, exitOK, append([]string{a}, args[:4]...)...)
	_, rowsB, _ := planJSONOf(t, exitOK, append([]string{b}, args[:4]...)...)
	names := func(rows []map[string]any) []any {
		var out []any
		for _, r := range rows {
			out = append(out, r["target"])
		}
		return out
	}
	if !reflect.DeepEqual(names(rowsA), names(rowsB)) {
		t.Errorf("order %v for one listing, %v for another", names(rowsA), names(rowsB))
	}
}
