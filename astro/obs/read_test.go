package obs

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"arcfit/astro"
)

const dataDir = "../../testdata/obs/"

// testSites are the invented sites of testdata/obs/sites.csv plus the invented
// ADES station code QQ1.
func testSites(t *testing.T) map[string]astro.Site {
	t.Helper()
	s, err := ReadSitesFile(dataDir + "sites.csv")
	if err != nil {
		t.Fatal(err)
	}
	s["QQ1"] = astro.Site{Name: "QQ1", Lat: 40 * astro.Degree, Lon: -75 * astro.Degree, HeightM: 100}
	return s
}

// TestRejects checks every reject path of design.md ("Input formats", the
// reader decisions) on the sample files in testdata/obs: the position
// file:line:col (counted by hand in each file), the sentinel, one line.
func TestRejects(t *testing.T) {
	tests := []struct {
		file string
		pos  string // file:line:col
		err  error
		src  string
	}{
		{"bad_ra_minutes.csv", "2:28", ErrRange, "design.md: minutes ≥ 60 are errors; col 28 is the '6' of 10:61"},
		{"bad_dec_range.csv", "2:39", ErrRange, "design.md: Dec beyond ±90° is an error"},
		{"bad_negative_sigma.csv", "2:51", ErrRange, "design.md: σ ≤ 0 is an error"},
		{"bad_zero_sigma.csv", "2:51", ErrRange, "design.md: σ ≤ 0 is an error"},
		{"bad_no_zone.csv", "2:23", ErrSyntax, "design.md: a time with no zone is an error; col 23 is just past the field"},
		{"bad_duplicate_column.csv", "1:13", ErrDuplicateColumn, "design.md: ra and ra_deg are two columns for one quantity"},
		{"bad_dec_twice.csv", "1:13", ErrDuplicateColumn, "design.md: dec twice (names are case-insensitive)"},
		{"bad_no_header.csv", "2:1", ErrHeader, "design.md: a header row names the columns"},
		{"bad_unknown_site.csv", "3:55", ErrUnknownSite, "issue: a site missing from the sites file"},
		{"bad_nan.csv", "2:38", ErrSyntax, "design.md: NaN is an error"},
		{"bad_inf.csv", "2:25", ErrSyntax, "design.md: Inf is an error"},
		{"bad_absurd_mag.csv", "2:55", ErrRange, "design.md: absurd magnitudes (1e308) are errors"},
		{"bad_binary.csv", "2:1", ErrFormat, "issue: binary garbage"},
		{"bad_not_utf8.csv", "2:45", ErrFormat, "byte 0xff is not UTF-8 (RFC 3629)"},
		{"bad_semicolon.csv", "1:5", ErrFormat, "design.md: ';'-separated files are errors, with a hint"},
		{"bad_decimal_comma.csv", "2:42", ErrFieldCount, "design.md: decimal commas are errors, with a hint"},
		{"bad_decimal_comma.tsv", "2:28", ErrSyntax, "design.md: decimal commas are errors, with a hint"},
		{"bad_bare_jd.csv", "2:1", ErrSyntax, "design.md: JD needs its prefix"},
		{"bad_leap_second.csv", "2:18", ErrRange, "no leap second at the end of 2017 (IERS Bulletin C 55, from memory: none after 2016-12-31)"},
		{"bad_before_1800.csv", "2:1", ErrRange, "design.md: the supported span is 1800–2200"},
		{"bad_ra_degrees_in_hours.csv", "2:25", ErrRange, "design.md: a number in the ra column that cannot be hours"},
		{"bad_field_count.csv", "2:50", ErrFieldCount, "row shorter than its header"},
		{"bad_open_quote.csv", "2:55", ErrSyntax, "RFC 4180 §2: a quoted field ends with a quote"},
		{"bad_dec_range.psv", "3:42", ErrRange, "ADES dec beyond ±90"},
		{"bad_no_zone.psv", "3:28", ErrSyntax, "ADES obsTime without Z"},
		{"bad_negative_sigma.psv", "3:54", ErrRange, "ADES rmsRA ≤ 0"},
		{"bad_sys.psv", "3:6", ErrFormat, "only WGS84 positions are read"},
		{"bad_two_objects.psv", "4:1", ErrFormat, "one object per file"},
		{"bad_no_header.psv", "2:1", ErrHeader, "ADES PSV: a field line follows the header block"},
		{"bad_duplicate_column.psv", "2:42", ErrDuplicateColumn, "ra twice"},
	}
	sites := testSites(t)
	for _, tt := range tests {
		path := dataDir + tt.file
		_, err := ReadFile(path, ReadOptions{Sites: sites})
		if err == nil {
			t.Errorf("%s: no error, want %s:%s (%s)", tt.file, tt.file, tt.pos, tt.src)
			continue
		}
		msg := err.Error()
		if want := path + ":" + tt.pos + ": "; !strings.HasPrefix(msg, want) {
			t.Errorf("%s: error %q, want it to start %q (%s)", tt.file, msg, want, tt.src)
		}
		if !errors.Is(err, tt.err) {
			t.Errorf("%s: error %q does not wrap %v (%s)", tt.file, msg, tt.err, tt.src)
		}
		var pe *ParseError
		if !errors.As(err, &pe) {
			t.Errorf("%s: error %T, want *ParseError", tt.file, err)
		}
		if strings.ContainsAny(msg, "\n\r") {
			t.Errorf("%s: error %q is not one line", tt.file, msg)
		}
	}
}

// TestHints checks that the rejects design.md wants hinted carry their hint.
func TestHints(t *testing.T) {
	for file, hint := range map[string]string{
		"bad_semicolon.csv":     "';'-separated",
		"bad_decimal_comma.csv": "decimal comma",
		"bad_decimal_comma.tsv": "decimal comma",
		"bad_bare_jd.csv":       "JD 2461440.38478",
		"bad_no_zone.csv":       "add Z",
	} {
		_, err := ReadFile(dataDir+file, ReadOptions{})
		if err == nil || !strings.Contains(err.Error(), hint) {
			t.Errorf("%s: error %v, want a hint containing %q", file, err, hint)
		}
	}
}

// TestReadTrack reads the invented track and checks values against their
// definitions: sexagesimal (common practice: h + m/60 + s/3600, 15° an hour)
// and the UTC Julian date from python3-erfa 2.0.0.1.
func TestReadTrack(t *testing.T) {
	s, err := ReadFile(dataDir+"track.csv", ReadOptions{Sites: testSites(t)})
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Warnings) != 0 {
		t.Errorf("warnings %v, want none", s.Warnings)
	}
	lines := []int{5, 6, 7, 4, 8} // file lines in time order
	if len(s.Obs) != len(lines) {
		t.Fatalf("%d observations, want %d", len(s.Obs), len(lines))
	}
	for i, o := range s.Obs {
		if o.Line != lines[i] {
			t.Errorf("obs %d: line %d, want %d (sorted by time)", i, o.Line, lines[i])
		}
	}
	o := s.Obs[0]
	tests := []struct {
		name      string
		got, want float64
		tol       float64
		unit, src string
	}{
		{"ra", o.RA.Hours(), 10 + 21.0/60 + 33.512/3600, 1e-13, "h", "sexagesimal definition (common practice)"},
		{"dec", o.Dec.Degrees(), 12 + 45.0/60 + 10.21/3600, 1e-12, "°", "sexagesimal definition (common practice)"},
		{"sigma", o.SigmaRA.Arcseconds(), 0.5, 1e-12, "″", "the file"},
		{"jd.day+frac-2461439.5", (o.Time.Day - 2461439.5) + o.Time.Frac, 0.8847824074074073, 1e-11, "d",
			"python3-erfa 2.0.0.1: erfa.dtf2d('UTC',2027,2,3,21,14,5.20) = (2461439.5, 0.8847824074074073)"},
		{"mag", o.Mag, 18.4, 0, "mag", "the file"},
	}
	for _, tt := range tests {
		if d := math.Abs(tt.got - tt.want); !(d <= tt.tol) {
			t.Errorf("track.csv line 5: %s = %.15g %s, want %.15g (Δ %.3g; %s)", tt.name, tt.got, tt.unit, tt.want, d, tt.src)
		}
	}
	if l := s.Obs[2]; !math.IsNaN(l.Mag) || l.Band != "" || l.Site != "Lakeside Club" {
		t.Errorf("line 7: mag %v band %q site %q, want NaN, \"\", Lakeside Club", l.Mag, l.Band, l.Site)
	}
}

// TestPasteTolerance reads CRLF, a BOM, tabs, quotes, stray spaces, blank
// lines, comments, a JD-prefixed time, decimal degree columns and a
// tab-separated file: all accepted (design.md, "Input formats").
func TestPasteTolerance(t *testing.T) {
	in := bom + "# pasted\r\n\r\n Time ,\tRA_DEG , \"dec_deg\",SIGMA_RA,sigma_dec , Site\r\n" +
		"  2027-02-03T21:14:05.20Z ,\t155.3896333, \"12.7528361\" ,0.45,0.40, \"Hill \"\"Top\"\"\"\r\n" +
		"\t\r\n" +
		"JD 2461441.38478,155.2421,−0.5,0.6,0.6,Lakeside Club\r\n"
	s, err := Read(strings.NewReader(in), "paste.csv", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Obs) != 2 || len(s.Warnings) != 0 {
		t.Fatalf("%d obs, warnings %v; want 2 obs and no warnings", len(s.Obs), s.Warnings)
	}
	if got := s.Obs[0].Site; got != `Hill "Top"` {
		t.Errorf("site %q, want %q (RFC 4180 §2.7 doubled quote)", got, `Hill "Top"`)
	}
	if d := s.Obs[1].Dec.Degrees(); d != -0.5 {
		t.Errorf("dec %v, want -0.5 (Unicode minus U+2212 is a minus)", d)
	}
	if j := s.Obs[1].Time; math.Abs((j.Day-2461441.5)+j.Frac-(-0.11522)) > 1e-9 {
		t.Errorf("JD %v, want 2461441.38478", j)
	}
	if got := s.Obs[0].SigmaDec.Arcseconds(); math.Abs(got-0.40) > 1e-12 {
		t.Errorf("sigma_dec %v, want 0.40", got)
	}
	tsv := "time\tra\tdec\tsigma\n2027-02-03T21:14:05.20Z\t10 21 33.512\t+12 45 10.21\t0.5\n2027-02-03T22:14:05.20Z\t10 21 32.010\t+12 45 41.62\t0.5\n"
	s, err = Read(strings.NewReader(tsv), "paste.tsv", ReadOptions{})
	if err != nil || len(s.Obs) != 2 {
		t.Fatalf("tab-separated: %v, %d obs", err, len(s.Obs))
	}
}

// TestWarnings checks the warnings design.md asks for: an unused column, an
// exact duplicate counted once, the default σ, a date before 1972.
func TestWarnings(t *testing.T) {
	in := "time,ra,dec,notes\n" +
		"2027-02-03T21:14:05Z,10:21:33.512,+12:45:10.21,a\n" +
		"2027-02-03T22:14:05Z,10:21:32.010,+12:45:41.62,b\n" +
		"2027-02-03T21:14:05Z,10:21:33.512,+12:45:10.21,c\n" +
		"1969-07-20T20:17:40Z,10:21:33.512,+12:45:10.21,d\n"
	s, err := Read(strings.NewReader(in), "w.csv", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want := []string{
		"w.csv: warning: no uncertainty given",
		`w.csv:1:13: warning: column "notes" is not used`,
		"w.csv:4: warning: repeats line 2 exactly; counted once",
		"w.csv:5:1: warning: 1 row(s) before 1972",
	}
	if len(s.Warnings) != len(want) {
		t.Fatalf("warnings %v, want %d", s.Warnings, len(want))
	}
	for i, w := range s.Warnings {
		if !strings.HasPrefix(w.String(), want[i]) {
			t.Errorf("warning %d = %q, want prefix %q", i, w, want[i])
		}
	}
	if s.Used() != 3 || s.Obs[2].Line != 4 || s.Obs[2].Used {
		t.Errorf("used %d, obs[2] line %d used %v; want 3 used and line 4 dropped", s.Used(), s.Obs[2].Line, s.Obs[2].Used)
	}
	if s.Obs[0].Line != 5 {
		t.Errorf("first obs line %d, want 5 (1969 sorts first)", s.Obs[0].Line)
	}
	if got := s.Obs[1].SigmaRA.Arcseconds(); math.Abs(got-DefaultSigmaArcsec) > 1e-12 {
		t.Errorf("default sigma %v″, want %v″", got, DefaultSigmaArcsec)
	}
}

// TestSeveralSitesOneInstant: two sites at one instant are two observations.
func TestSeveralSitesOneInstant(t *testing.T) {
	in := "time,ra,dec,sigma,site\n" +
		"2027-02-03T21:14:05Z,10:21:33.512,+12:45:10.21,0.5,Hill Top\n" +
		"2027-02-03T21:14:05Z,10:21:33.520,+12:45:10.01,0.5,Lakeside Club\n" +
		"2027-02-03T23:14:05Z,10:21:30.512,+12:46:10.21,0.5,Hill Top\n"
	s, err := Read(strings.NewReader(in), "s.csv", ReadOptions{Sites: testSites(t)})
	if err != nil || s.Used() != 3 || len(s.Warnings) != 0 {
		t.Fatalf("err %v, used %d, warnings %v; want 3 used, no warnings", err, s.Used(), s.Warnings)
	}
	if s.Obs[0].Line != 2 || s.Obs[1].Line != 3 {
		t.Errorf("lines %d, %d: want 2, 3 (stable sort)", s.Obs[0].Line, s.Obs[1].Line)
	}
}

// TestLeapSecond: 2016-12-31T23:59:60Z is valid, a leap second was inserted
// then (IERS Bulletin C 52, July 2016; from memory).
func TestLeapSecond(t *testing.T) {
	in := "time,ra,dec\n2016-12-31T23:59:60.5Z,10:21:33.512,+12:45:10.21\n2017-01-01T00:00:00Z,10:21:33.000,+12:45:10.21\n"
	s, err := Read(strings.NewReader(in), "l.csv", ReadOptions{DefaultSigmaArcsec: 0.5})
	if err != nil {
		t.Fatal(err)
	}
	// python3-erfa 2.0.0.1: erfa.dtf2d('UTC',2016,12,31,23,59,60.5) = (2457753.5, 0.9999942130299417).
	if j := s.Obs[0].Time; j.Day != 2457753.5 || math.Abs(j.Frac-0.9999942130299417) > 1e-12 {
		t.Errorf("23:59:60.5 = %v, want 2457753.5 + 0.9999942130299417", j)
	}
	if len(s.Warnings) != 0 {
		t.Errorf("warnings %v with an explicit default σ, want none", s.Warnings)
	}
}

// TestLongLine reads a line longer than 64 KiB whole: an unused column of
// 100000 characters, then the site after it.
func TestLongLine(t *testing.T) {
	long := strings.Repeat("x", 100000)
	in := "time,ra,dec,notes,site\n2027-02-03T21:14:05Z,10:21:33.512,+12:45:10.21," + long + ",Far End\n"
	s, err := Read(strings.NewReader(in), "long.csv", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Obs) != 1 || s.Obs[0].Site != "Far End" {
		t.Fatalf("got %+v, want one observation at site Far End", s.Obs)
	}
	in = "time,ra,dec\n2027-02-03T21:14:05Z,10:21:33.512,+12:45:10.21" + long + "\n"
	_, err = Read(strings.NewReader(in), "long.csv", ReadOptions{})
	if err == nil || len(err.Error()) > 300 {
		t.Errorf("error %v: want one short line", err)
	}
}

// TestNoMotion: positions that coincide within their σ give a warning from
// Read and ErrNoMotion from CheckMotion; a moving track passes.
func TestNoMotion(t *testing.T) {
	in := "time,ra,dec,sigma\n2027-02-03T21:14:05Z,10:21:33.512,+12:45:10.21,1\n2027-02-04T21:14:05Z,10:21:33.520,+12:45:10.50,1\n"
	s, err := Read(strings.NewReader(in), "n.csv", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if err := s.CheckMotion(); !errors.Is(err, ErrNoMotion) {
		t.Errorf("CheckMotion = %v, want ErrNoMotion (0.3″ apart, σ 1″)", err)
	}
	if len(s.Warnings) != 1 || !strings.Contains(s.Warnings[0].Msg, "no detectable motion") {
		t.Errorf("warnings %v, want the no-motion warning", s.Warnings)
	}
	m, err := ReadFile(dataDir+"track.csv", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if err := m.CheckMotion(); err != nil {
		t.Errorf("track.csv: CheckMotion = %v, want nil", err)
	}
}

// TestResolveSites: without a sites file names are kept; ResolveSites later
// applies the default and finds the unknown one at its line and column.
func TestResolveSites(t *testing.T) {
	in := "time,ra,dec,sigma,site\n2027-02-03T21:14:05Z,10:21:33.512,+12:45:10.21,1,\n2027-02-04T21:14:05Z,10:20:33.520,+12:55:10.50,1,Elsewhere\n"
	s, err := Read(strings.NewReader(in), "r.csv", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if s.Obs[0].Site != "" {
		t.Errorf("site %q, want \"\" (no default, no guess)", s.Obs[0].Site)
	}
	err = s.ResolveSites(testSites(t), "Hill Top")
	if !errors.Is(err, ErrUnknownSite) || !strings.HasPrefix(err.Error(), "r.csv:3:50: site:") {
		t.Errorf("ResolveSites = %v, want r.csv:3:50: site: … ErrUnknownSite", err)
	}
	if s.Obs[0].Site != "Hill Top" {
		t.Errorf("site %q, want the default Hill Top", s.Obs[0].Site)
	}
	_, err = Read(strings.NewReader(in), "r.csv", ReadOptions{Sites: testSites(t), DefaultSite: "Nowhere"})
	if !errors.Is(err, ErrUnknownSite) || !strings.HasPrefix(err.Error(), "r.csv:2: site:") {
		t.Errorf("unknown default: %v, want r.csv:2: site: …", err)
	}
}

// TestADES reads the invented ADES PSV sample.
func TestADES(t *testing.T) {
	s, err := ReadFile(dataDir+"track.psv", ReadOptions{Sites: testSites(t)})
	if err != nil {
		t.Fatal(err)
	}
	if s.Format != FormatADESPSV || s.Object != "QF7Z2A" || len(s.Obs) != 3 {
		t.Fatalf("format %q object %q %d obs, want ades-psv, QF7Z2A, 3", s.Format, s.Object, len(s.Obs))
	}
	if len(s.Meta) != 11 || s.Meta[0] != "# version=2017" {
		t.Errorf("meta %q, want 11 header lines from # version=2017", s.Meta)
	}
	o := s.Obs[0]
	if math.Abs(o.RA.Degrees()-155.3896333) > 1e-12 || math.Abs(o.SigmaRA.Arcseconds()-0.45) > 1e-12 ||
		math.Abs(o.SigmaDec.Arcseconds()-0.40) > 1e-12 || o.Corr != 0.05 || o.Site != "QQ1" || o.Band != "G" {
		t.Errorf("line 11: %+v, want ra 155.3896333°, rmsRA 0.45″, rmsDec 0.40″, corr 0.05, QQ1, G", o)
	}
	r := s.Obs[2]
	site, ok := s.Sites[r.Site]
	if !ok || r.Site != "QQ2@44.52000,-72.80000,410" {
		t.Fatalf("roving site %q not among %v", r.Site, s.Sites)
	}
	if math.Abs(site.Lat.Degrees()-44.52) > 1e-12 || math.Abs(site.Lon.Degrees()+72.80) > 1e-12 || site.HeightM != 410 {
		t.Errorf("site %+v, want pos2 44.52° lat, pos1 −72.80° lon, pos3 410 m", site)
	}
	var unusedWarn bool
	for _, w := range s.Warnings {
		if strings.Contains(w.Msg, "ADES fields not used: trkSub") {
			t.Errorf("trkSub is used, but warned: %v", w)
		}
		if strings.Contains(w.Msg, "mode, astCat, remarks") {
			unusedWarn = true
		}
	}
	if !unusedWarn {
		t.Errorf("warnings %v, want one naming mode, astCat, remarks", s.Warnings)
	}
}

// TestDetect checks recognition of the format from the content.
func TestDetect(t *testing.T) {
	for name, want := range map[string]string{
		"track.csv": FormatCSV, "track.psv": FormatADESPSV, "bad_no_header.psv": FormatADESPSV,
	} {
		b, err := os.ReadFile(filepath.Join(dataDir, name))
		if err != nil {
			t.Fatal(err)
		}
		if got, _ := detectFormat(string(b), name); got != want {
			t.Errorf("detectFormat(%s) = %q, want %q", name, got, want)
		}
	}
	_, err := Read(strings.NewReader("<?xml version=\"1.0\"?>\n<ades/>\n"), "x.xml", ReadOptions{})
	if !errors.Is(err, ErrFormat) || !strings.Contains(err.Error(), "XML") {
		t.Errorf("XML: %v, want ErrFormat naming XML", err)
	}
}

// TestParseErrorText checks the one-line form and the cut of a long Got.
func TestParseErrorText(t *testing.T) {
	e := &ParseError{File: "obs.csv", Line: 12, Column: 34, Field: "dec", Want: decWant, Got: "+91:00", Err: ErrRange}
	if got, want := e.Error(), `obs.csv:12:34: dec: want ±DD:MM:SS or degrees within ±90, got "+91:00"`; got != want {
		t.Errorf("Error() = %q, want %q (the form in the issue)", got, want)
	}
	e.Got = strings.Repeat("é", 100) + "\x00"
	if got := e.Error(); strings.Count(got, "é") != maxGot || !strings.HasSuffix(got, "…") {
		t.Errorf("long Got not cut at %d characters: %q", maxGot, got)
	}
}
