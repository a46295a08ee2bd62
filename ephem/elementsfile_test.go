package ephem

import (
	"bytes"
	"encoding/csv"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"arcfit/astro"
	"arcfit/astro/obs"
)

// elementsDir holds the element-set samples, all invented.
const elementsDir = "../testdata/elements"

// unixEpochJD is the Julian date of 1970-01-01T00:00:00 (common practice;
// Meeus, Astronomical Algorithms, 2nd ed., ch. 7: JD 2440587.5). The tests
// turn time.Time values into Julian dates with it, independently of astro.
const unixEpochJD = 2440587.5

// jdOf returns the Julian date of the calendar instant (hours on the same
// time scale as the date), from Go's time package.
func jdOf(year int, month time.Month, day, hour, minute int) float64 {
	t := time.Date(year, month, day, hour, minute, 0, 0, time.UTC)
	return unixEpochJD + float64(t.Unix())/86400
}

// wantParseError checks that err is a one-line *obs.ParseError at file:line:col
// with the field and sentinel given, whose text contains part.
func wantParseError(t *testing.T, name string, err error, file string, line, col int, field string, sentinel error, part string) {
	t.Helper()
	var pe *obs.ParseError
	if !errors.As(err, &pe) {
		t.Errorf("%s: error %v (%T), want *obs.ParseError", name, err, err)
		return
	}
	if pe.File != file || pe.Line != line || pe.Column != col || pe.Field != field {
		t.Errorf("%s: error at %s:%d:%d field %q, want %s:%d:%d field %q (%v)", name, pe.File, pe.Line, pe.Column, pe.Field, file, line, col, field, err)
	}
	if !errors.Is(err, sentinel) {
		t.Errorf("%s: error %v does not wrap %v", name, err, sentinel)
	}
	msg := err.Error()
	if strings.ContainsAny(msg, "\n\r") || !strings.Contains(msg, part) {
		t.Errorf("%s: message %q, want one line containing %q", name, msg, part)
	}
	prefix := file + ":"
	if line > 0 {
		prefix += strconv.Itoa(line) + ":"
	}
	if col > 0 {
		prefix += strconv.Itoa(col) + ":"
	}
	if !strings.HasPrefix(msg, prefix) {
		t.Errorf("%s: message %q, want it to start with %q", name, msg, prefix)
	}
}

// TestReadElementsBadFiles reads each bad sample of testdata/elements. The
// line and column of each want were counted by hand in the sample (columns
// count characters from 1).
func TestReadElementsBadFiles(t *testing.T) {
	cases := []struct {
		file      string
		line, col int
		field     string
		sentinel  error
		part      string
	}{
		{"bad_missing_column.csv", 1, 1, "", obs.ErrHeader, "a column m_deg: a_au goes with m_deg"},
		{"bad_a_without_m.csv", 1, 1, "", obs.ErrHeader, "a column m_deg"},
		{"bad_e_negative.csv", 2, 27, "e", obs.ErrRange, `e ≥ 0, got "-0.1"`},
		{"bad_a_zero.csv", 2, 22, "a_au", obs.ErrRange, `a > 0 au for an ellipse (e = 0.2), got "0"`},
		{"bad_a_negative.csv", 2, 22, "a_au", obs.ErrRange, `got "-2.4"`},
		{"bad_both_forms.csv", 2, 52, "q_au", obs.ErrSyntax, "one form per row"},
		{"bad_hyperbola_a_form.csv", 2, 27, "e", obs.ErrRange, "for e ≥ 1 give q_au and tp_tt"},
		{"bad_epoch_zone.csv", 2, 31, "epoch_tt", obs.ErrSyntax, "without Z"},
		{"bad_epoch_mjd.csv", 2, 12, "epoch_tt", obs.ErrRange, "1800–2200"},
		{"bad_nan.csv", 2, 27, "e", obs.ErrSyntax, `got "NaN"`},
		{"bad_inclination.csv", 2, 31, "i_deg", obs.ErrRange, "0 to 180"},
		{"bad_semicolon.csv", 1, 5, "", obs.ErrFormat, "';'-separated"},
		{"bad_decimal_comma.csv", 2, 47, "", obs.ErrFieldCount, "decimal comma"},
		{"bad_duplicate_name.csv", 3, 1, "name", ErrDuplicateElements, "line 2 gives other elements"},
	}
	for _, c := range cases {
		path := filepath.Join(elementsDir, c.file)
		sets, warns, err := ReadElementsFile(path)
		if err == nil {
			t.Errorf("%s: read %d sets, want an error", c.file, len(sets))
			continue
		}
		if sets != nil || warns != nil {
			t.Errorf("%s: returned %d sets and %d warnings with the error, want none", c.file, len(sets), len(warns))
		}
		wantParseError(t, c.file, err, path, c.line, c.col, c.field, c.sentinel, c.part)
	}
	if _, _, err := ReadElementsFile(filepath.Join(elementsDir, "no_such_file.csv")); err == nil || !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: error %v, want one wrapping os.ErrNotExist", err)
	}
}

// TestReadElementsRejects covers the other reject paths with inline text;
// positions counted by hand.
func TestReadElementsRejects(t *testing.T) {
	const hdr = "name,epoch_tt,a_au,e,i_deg,node_deg,peri_deg,m_deg\n"
	const comet = "name,q_au,e,i_deg,node_deg,peri_deg,tp_tt,h,g\n"
	cases := []struct {
		name      string
		in        string
		line, col int
		field     string
		sentinel  error
		part      string
	}{
		{"empty file", "", 0, 0, "", obs.ErrHeader, "no header"},
		{"comments only", "# nothing\n\n", 2, 0, "", obs.ErrHeader, "no header"},
		{"header only", hdr, 1, 0, "", ErrNoElements, "at least one element set"},
		{"no e column", "name,epoch_tt,a_au,i_deg,node_deg,peri_deg,m_deg\nX,2461000.5,2,7,1,2,3\n", 1, 1, "", obs.ErrHeader, "a column e"},
		{"neither form", "name,e,i_deg,node_deg,peri_deg\nX,0.1,1,2,3\n", 1, 1, "", obs.ErrHeader, "a column a_au and m_deg, or q_au and tp_tt"},
		{"q without tp", "name,q_au,e,i_deg,node_deg,peri_deg\nX,1,0.1,1,2,3\n", 1, 1, "", obs.ErrHeader, "a column tp_tt"},
		{"a form without epoch", "name,a_au,m_deg,e,i_deg,node_deg,peri_deg\nX,2,3,0.1,1,2,3\n", 1, 1, "", obs.ErrHeader, "a column epoch_tt"},
		{"duplicate column", "name,e,E,q_au,tp_tt,i_deg,node_deg,peri_deg\n", 1, 8, "E", obs.ErrDuplicateColumn, "one e column"},
		{"empty name", hdr + ",2461000.5,2.4,0.2,7,1,2,3\n", 2, 1, "name", obs.ErrSyntax, "a name"},
		{"too few fields", hdr + "X,2461000.5,2.4,0.2,7,1,2\n", 2, 26, "", obs.ErrFieldCount, "8 fields as in the header on line 1, found 7"},
		{"half a pair in a row", hdr + "X,2461000.5,2.4,0.2,7,1,2,\n", 2, 27, "m_deg", obs.ErrSyntax, "the field is empty"},
		{"both pairs empty", "name,epoch_tt,a_au,m_deg,q_au,tp_tt,e,i_deg,node_deg,peri_deg\nX,,,,,,0.5,1,2,3\n", 2, 4, "a_au", obs.ErrSyntax, "both pairs are empty"},
		{"q zero", comet + "X,0,0.97,1,2,3,2461000.5,,\n", 2, 3, "q_au", obs.ErrRange, "q > 0"},
		{"tp bad ISO", comet + "X,1,0.97,1,2,3,2027-13-01T00:00:00,,\n", 2, 21, "tp_tt", obs.ErrRange, `got "2027-13-01T00:00:00"`},
		{"tp word", comet + "X,1,0.97,1,2,3,soon,,\n", 2, 16, "tp_tt", obs.ErrSyntax, `got "soon"`},
		{"tp JD prefix junk", comet + "X,1,0.97,1,2,3,JD 24x,,\n", 2, 21, "tp_tt", obs.ErrSyntax, `got "JD 24x"`},
		{"tp after 2200", comet + "X,1,0.97,1,2,3,2524958.5,,\n", 2, 16, "tp_tt", obs.ErrRange, "1800–2200"},
		{"epoch empty", hdr + "X,,2.4,0.2,7,1,2,3\n", 2, 3, "epoch_tt", obs.ErrSyntax, "the field is empty"},
		{"node out of range", hdr + "X,2461000.5,2.4,0.2,7,400,2,3\n", 2, 23, "node_deg", obs.ErrRange, `got "400"`},
		{"inclination negative", hdr + "X,2461000.5,2.4,0.2,-1,1,2,3\n", 2, 21, "i_deg", obs.ErrRange, `got "-1"`},
		{"m infinite", hdr + "X,2461000.5,2.4,0.2,7,1,2,Inf\n", 2, 27, "m_deg", obs.ErrSyntax, "a finite number"},
		{"a overflows", hdr + "X,2461000.5,1e999,0.2,7,1,2,3\n", 2, 13, "a_au", obs.ErrSyntax, "too large"},
		{"H absurd", comet + "X,1,0.97,1,2,3,2461000.5,1e308,\n", 2, 26, "h", obs.ErrRange, "H from −10 to 40"},
		{"G NaN", comet + "X,1,0.97,1,2,3,2461000.5,15,nan\n", 2, 29, "g", obs.ErrSyntax, "a finite number"},
		{"hex number", hdr + "X,2461000.5,0x2,0.2,7,1,2,3\n", 2, 14, "a_au", obs.ErrSyntax, `got "0x2"`},
		{"unclosed quote", hdr + "\"X,2461000.5,2.4,0.2,7,1,2,3\n", 2, 1, "", obs.ErrSyntax, "closing quote"},
		{"binary", hdr + "X,2461000.5,2.4,0.2\x00,7,1,2,3\n", 2, 20, "", obs.ErrFormat, "binary data"},
		{"not UTF-8", hdr + "X\xff,2461000.5,2.4,0.2,7,1,2,3\n", 2, 2, "", obs.ErrFormat, "not UTF-8"},
		{"e as word", hdr + "X,2461000.5,2.4,high,7,1,2,3\n", 2, 17, "e", obs.ErrSyntax, `got "high"`},
	}
	for _, c := range cases {
		sets, _, err := ReadElements(strings.NewReader(c.in), "el.csv")
		if err == nil {
			t.Errorf("%s: read %d sets, want an error", c.name, len(sets))
			continue
		}
		wantParseError(t, c.name, err, "el.csv", c.line, c.col, c.field, c.sentinel, c.part)
	}
}

// TestReadElementsForms reads the good samples and checks every value
// against the text of the file; dates against Go's time package and the
// Unix-epoch Julian date.
func TestReadElementsForms(t *testing.T) {
	deg := astro.AngleFromDegrees
	const angTol = 1e-15 // rad: the only operation is one multiplication
	type want struct {
		name                   string
		a, e, q, i, node, peri float64
		m                      float64
		epoch, tp              float64 // JD TT; 0 if not given
		h, g                   float64 // NaN if not given
	}
	nan := math.NaN()
	cases := []struct {
		file string
		want []want
	}{
		{"good_asteroid.csv", []want{{"Invented-E20", 2.41, 0.2, 0, 7.3, 112.4, 205.8, 33.0, 2461000.5, 0, 14.2, 0.15}}},
		{"good_comet.csv", []want{
			{"Invented-E97", 0, 0.97, 0.88, 63.2, 18.7, 131.9, 0, 0, 2455310.25, nan, nan},
			{"Invented-E100", 0, 1.0, 1.21, 122.5, 244.0, 310.4, 0, 0, jdOf(2038, time.June, 1, 6, 0), nan, nan},
		}},
		{"good_mixed.csv", []want{
			{"Invented-A", 2.41, 0.2, 0, 7.3, 112.4, 205.8, 33.0, 2461000.5, 0, 14.2, nan},
			{"Invented C, the second", 0, 1.2, 0.5, 40, 10, 20, 0, 0, 2461100.5, nan, nan},
		}},
	}
	same := func(x, y float64) bool { return x == y || math.IsNaN(x) && math.IsNaN(y) }
	for _, c := range cases {
		sets, warns, err := ReadElementsFile(filepath.Join(elementsDir, c.file))
		if err != nil || len(warns) != 0 {
			t.Errorf("%s: error %v, warnings %v; want none", c.file, err, warns)
			continue
		}
		if len(sets) != len(c.want) {
			t.Errorf("%s: %d sets, want %d", c.file, len(sets), len(c.want))
			continue
		}
		for k, w := range c.want {
			el := sets[k]
			if el.Name != w.name || el.A != w.a || el.E != w.e || !same(el.H, w.h) || !same(el.G, w.g) {
				t.Errorf("%s: set %d = %q a %g e %g H %g G %g, want %q a %g e %g H %g G %g", c.file, k, el.Name, el.A, el.E, el.H, el.G, w.name, w.a, w.e, w.h, w.g)
			}
			if w.a == 0 && el.Q != w.q {
				t.Errorf("%s: %s q = %g, want %g", c.file, w.name, el.Q, w.q)
			}
			for _, a := range []struct {
				n         string
				got, want astro.Angle
			}{{"i", el.I, deg(w.i)}, {"node", el.Node, deg(w.node)}, {"peri", el.Peri, deg(w.peri)}, {"m", el.M, deg(w.m)}} {
				if math.Abs(float64(a.got-a.want)) > angTol {
					t.Errorf("%s: %s %s = %.15g rad, want %.15g", c.file, w.name, a.n, a.got, a.want)
				}
			}
			const dayTol = 1e-9 // days (86 µs): far below any use; the ISO form is exact to 1e-11 s
			if w.epoch != 0 && (el.Epoch.Scale != astro.TT || math.Abs(el.Epoch.Float()-w.epoch) > dayTol) {
				t.Errorf("%s: %s epoch = %v, want JD %.6f TT", c.file, w.name, el.Epoch, w.epoch)
			}
			if w.tp != 0 && (el.Tp.Scale != astro.TT || math.Abs(el.Tp.Float()-w.tp) > dayTol) {
				t.Errorf("%s: %s tp = %v, want JD %.6f TT", c.file, w.name, el.Tp, w.tp)
			}
			if err := el.Validate(); err != nil {
				t.Errorf("%s: %s: Validate: %v", c.file, w.name, err)
			}
		}
	}
}

// TestReadElementsText checks what users paste: a BOM, CRLF, tabs, quotes,
// blank and comment lines, upper-case column names in another order, the ISO
// epoch (2027-01-01T00:00:00 TT is JD 2461406.5, design.md's own pair of
// examples, and Go's time package agrees), an unused column (a warning) and
// an exact duplicate row (a warning, counted once).
func TestReadElementsText(t *testing.T) {
	in := "\xef\xbb\xbf# invented\r\n\r\n" +
		"  NAME ,\tE, A_AU, M_DEG ,I_deg,node_deg,peri_deg,epoch_tt,H,G,notes\r\n" +
		"\"Invented \"\"quoted\"\" one\" , 0.148 ,2.614,330.21,7.86,103.27,61.45,2027-01-01T00:00:00,15.5,0.15,first\r\n" +
		"   # a comment after blanks\r\n" +
		"\"Invented \"\"quoted\"\" one\" , 0.148 ,2.614,330.21,7.86,103.27,61.45,2461406.5,15.5,0.15,again\r\n"
	sets, warns, err := ReadElements(strings.NewReader(in), "paste.csv")
	if err != nil {
		t.Fatal(err)
	}
	if len(sets) != 1 || sets[0].Name != `Invented "quoted" one` || sets[0].E != 0.148 || sets[0].A != 2.614 {
		t.Fatalf("sets = %+v, want one set named %q", sets, `Invented "quoted" one`)
	}
	if want := jdOf(2027, time.January, 1, 0, 0); sets[0].Epoch.Float() != want || want != 2461406.5 {
		t.Errorf("epoch = %v, want JD %.1f TT", sets[0].Epoch, want)
	}
	if len(warns) != 2 || !strings.Contains(warns[0].Msg, `column "notes" is not used`) || warns[0].Line != 3 || warns[0].Column != 63 ||
		!strings.Contains(warns[1].Msg, "repeats line 4") || warns[1].Line != 6 {
		t.Errorf("warnings = %v, want the unused column at 3:63 and the repeat at line 6", warns)
	}

	tsv := "name\tq_au\te\ti_deg\tnode_deg\tperi_deg\ttp_tt\nInvented T\t0.5\t1.05\t10\t20\t30\tJD 2461000.5\n"
	sets, _, err = ReadElements(strings.NewReader(tsv), "t.tsv")
	if err != nil || len(sets) != 1 || sets[0].Q != 0.5 || sets[0].Tp.Float() != 2461000.5 {
		t.Errorf("tab-separated: %+v, %v; want q 0.5, tp JD 2461000.5", sets, err)
	}
}

// TestReadElementsDemo reads the demo scenario's elements file, a real sample
// of the format made by testdata/gen/demo_scenario.py, and compares each
// value with an independent reading of the file by encoding/csv and strconv.
func TestReadElementsDemo(t *testing.T) {
	path := "../fit/demo/data/elements.csv"
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	sets, warns, err := ReadElements(bytes.NewReader(b), path)
	if err != nil || len(warns) != 0 {
		t.Fatalf("ReadElements: %v, warnings %v", err, warns)
	}
	r := csv.NewReader(bytes.NewReader(b))
	r.Comment = '#'
	recs, err := r.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	hdr, rows := recs[0], recs[1:]
	if len(sets) != len(rows) {
		t.Fatalf("%d sets, want %d", len(sets), len(rows))
	}
	for k, row := range rows {
		v := map[string]float64{}
		for i, h := range hdr {
			if h != "name" {
				x, err := strconv.ParseFloat(row[i], 64)
				if err != nil {
					t.Fatal(err)
				}
				v[h] = x
			}
		}
		el := sets[k]
		d := astro.AngleFromDegrees
		if el.Name != row[0] || el.Epoch.Float() != v["epoch_tt"] || el.A != v["a_au"] || el.E != v["e"] ||
			el.I != d(v["i_deg"]) || el.Node != d(v["node_deg"]) || el.Peri != d(v["peri_deg"]) || el.M != d(v["m_deg"]) ||
			el.H != v["h"] || el.G != v["g"] {
			t.Errorf("%s row %d: read %+v, want %q %v", path, k+1, el, row[0], v)
		}
	}
}

// TestFindElements checks the lookup by name.
func TestFindElements(t *testing.T) {
	sets := []Elements{{Name: "Invented-1"}, {Name: "Invented-2"}}
	if el, err := FindElements(sets, "Invented-2"); err != nil || el.Name != "Invented-2" {
		t.Errorf("exact: %v, %v", el.Name, err)
	}
	if el, err := FindElements(sets, " invented-1 "); err != nil || el.Name != "Invented-1" {
		t.Errorf("case and blanks: %v, %v", el.Name, err)
	}
	if _, err := FindElements(sets, ""); err == nil || !strings.Contains(err.Error(), `"Invented-1", "Invented-2"`) {
		t.Errorf("no name with two sets: %v, want an error listing both", err)
	}
	if el, err := FindElements(sets[:1], ""); err != nil || el.Name != "Invented-1" {
		t.Errorf("no name with one set: %v, %v", el.Name, err)
	}
	if _, err := FindElements(sets, "Invented-3"); err == nil || !strings.Contains(err.Error(), `no element set named "Invented-3"`) {
		t.Errorf("unknown: %v", err)
	}
}

// FuzzReadElements holds the reader to its promises on any input: no panic;
// either a one-line *obs.ParseError, or element sets that each pass
// Validate, have a name, and whose state at their own epoch or perihelion
// time can be asked for without a panic. Seeds: the samples of
// testdata/elements and the corpus in testdata/fuzz/FuzzReadElements.
func FuzzReadElements(f *testing.F) {
	files, _ := filepath.Glob(filepath.Join(elementsDir, "*.csv"))
	for _, p := range files {
		if b, err := os.ReadFile(p); err == nil {
			f.Add(b)
		}
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		sets, warns, err := ReadElements(bytes.NewReader(data), "fuzz.csv")
		if err != nil {
			var pe *obs.ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %T %v, want *obs.ParseError", err, err)
			}
			if msg := err.Error(); strings.ContainsAny(msg, "\n\r") || !strings.HasPrefix(msg, "fuzz.csv:") {
				t.Fatalf("error not one line naming the file: %q", msg)
			}
			if sets != nil || warns != nil {
				t.Fatalf("%d sets and %d warnings returned with an error", len(sets), len(warns))
			}
			return
		}
		if len(sets) == 0 {
			t.Fatal("no sets and no error")
		}
		for _, w := range warns {
			if strings.ContainsAny(w.String(), "\n\r") {
				t.Fatalf("warning not one line: %q", w)
			}
		}
		for _, el := range sets {
			if el.Name == "" {
				t.Fatalf("set without a name: %+v", el)
			}
			if err := el.Validate(); err != nil {
				t.Fatalf("set %+v fails Validate: %v", el, err)
			}
			at := el.Tp
			if el.A != 0 {
				at = el.Epoch
			}
			_, _, _ = el.StateAt(at)
		}
	})
}
