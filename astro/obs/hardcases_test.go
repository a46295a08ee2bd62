package obs

import (
	"errors"
	"math"
	"strings"
	"testing"

	"arcfit/astro"
)

// TestReaderSpanAndLeapSecond reads observation times at the edges of the
// supported span (1800-01-01 to the end of 2200, design.md "Input formats")
// and through the leap second at the end of 2016: the span's ends are read,
// the instant just outside each end is refused with a one-line error naming
// file:line:col and the span; 23:59:60 is read on 2016-12-31 (IERS Bulletin
// C 52 inserted a leap second then) and sorts between 23:59:59 and
// 00:00:00, and is refused on 2016-12-30.
func TestReaderSpanAndLeapSecond(t *testing.T) {
	const head = "time,ra,dec,sigma\n"
	row := func(tm string) string { return tm + ",00:00:00.5,+89:30:00,0.5\n" }
	for _, c := range []struct {
		time string
		ok   bool
	}{
		{"1800-01-01T00:00:00Z", true}, {"JD 2378496.5", true}, {"2200-12-31T23:59:59.999Z", true},
		{"1799-12-31T23:59:59.999Z", false}, {"JD 2378496.4999", false}, {"2201-01-01T00:00:00Z", false}, {"JD 2524958.5", false},
	} {
		data := head + row(c.time) + row("2027-02-03T21:14:05Z")
		_, err := Read(strings.NewReader(data), "span.csv", ReadOptions{Format: FormatCSV})
		if c.ok {
			if err != nil {
				t.Errorf("%s: %v", c.time, err)
			}
			continue
		}
		var pe *ParseError
		if !errors.As(err, &pe) || !errors.Is(err, ErrRange) || !strings.HasPrefix(err.Error(), "span.csv:2:1: time: ") ||
			!strings.Contains(err.Error(), "1800–2200") || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: error %v, want a range error at span.csv:2:1 naming 1800–2200", c.time, err)
		}
	}

	data := head + row("2017-01-01T00:00:00Z") + row("2016-12-31T23:59:60.5Z") + row("2016-12-31T23:59:59Z")
	s, err := Read(strings.NewReader(data), "leap.csv", ReadOptions{Format: FormatCSV})
	if err != nil {
		t.Fatal(err)
	}
	if lines := [3]int{s.Obs[0].Line, s.Obs[1].Line, s.Obs[2].Line}; lines != [3]int{4, 3, 2} {
		t.Errorf("leap-second rows sorted as lines %v, want 4, 3, 2", lines)
	}
	for i := 1; i < 3; i++ {
		a, _ := astro.UTCToTT(s.Obs[i-1].Time)
		b, _ := astro.UTCToTT(s.Obs[i].Time)
		if d := b.Sub(a) * astro.SecondsPerDay; math.Abs(d-[3]float64{0, 1.5, 0.5}[i]) > 1e-6 {
			t.Errorf("TT from line %d to line %d: %.9f s", s.Obs[i-1].Line, s.Obs[i].Line, d)
		}
	}
	_, err = Read(strings.NewReader(head+row("2016-12-30T23:59:60Z")+row("2016-12-31T00:00:00Z")), "noleap.csv", ReadOptions{Format: FormatCSV})
	if err == nil || !strings.HasPrefix(err.Error(), "noleap.csv:2:") || !strings.Contains(err.Error(), "leap second") {
		t.Errorf("23:59:60 on a day without a leap second: %v", err)
	}
}

// TestReaderRAWrapAndPoles reads positions at the RA 0h/24h seam and within
// 1° of the poles: 24:00:00 is 0h, 23:59:59.999 stays just below 24h, RA in
// degrees reads 360 as an error or 0 but never as 2π, and declinations of
// ±89:59:59.9 and ±90 are read, beyond ±90 refused.
func TestReaderRAWrapAndPoles(t *testing.T) {
	data := "time,ra,dec,sigma\n" +
		"2027-02-03T21:00:00Z,23:59:59.999,+89:59:59.9,0.5\n" +
		"2027-02-03T21:10:00Z,24:00:00,+90:00:00,0.5\n" +
		"2027-02-03T21:20:00Z,00:00:00.001,-89:59:59.9,0.5\n" +
		"2027-02-03T21:30:00Z,0,-90,0.5\n"
	s, err := Read(strings.NewReader(data), "seam.csv", ReadOptions{Format: FormatCSV})
	if err != nil {
		t.Fatal(err)
	}
	want := []struct{ raH, decDeg float64 }{{24 - 0.001/3600, 90 - 0.1/3600}, {0, 90}, {0.001 / 3600, -(90 - 0.1/3600)}, {0, -90}}
	for i, o := range s.Obs {
		if math.Abs(o.RA.Hours()-want[i].raH) > 1e-12 || math.Abs(o.Dec.Degrees()-want[i].decDeg) > 1e-12 || !(o.RA >= 0 && o.RA < 2*math.Pi) {
			t.Errorf("line %d: RA %.12f h, Dec %.12f°; want %.12f h, %.12f°", o.Line, o.RA.Hours(), o.Dec.Degrees(), want[i].raH, want[i].decDeg)
		}
	}
	for _, bad := range []string{"+90:00:00.1", "-90:00:01", "90.0000001"} {
		_, err := Read(strings.NewReader("time,ra,dec,sigma\n2027-02-03T21:00:00Z,1:00:00,"+bad+",0.5\n"), "pole.csv", ReadOptions{Format: FormatCSV})
		if err == nil || !strings.HasPrefix(err.Error(), "pole.csv:2:") || !strings.Contains(err.Error(), "dec") {
			t.Errorf("dec %s: %v, want a positioned dec error", bad, err)
		}
	}
	s, err = Read(strings.NewReader("time,ra_deg,dec_deg,sigma\n2027-02-03T21:00:00Z,359.9999999999,0,0.5\n2027-02-03T22:00:00Z,360,0,0.5\n"), "deg.csv", ReadOptions{Format: FormatCSV})
	if err == nil {
		for _, o := range s.Obs {
			if !(o.RA >= 0 && o.RA < 2*math.Pi) {
				t.Errorf("ra_deg read as %v rad, outside [0, 2π)", o.RA)
			}
		}
	} else if !strings.HasPrefix(err.Error(), "deg.csv:3:") {
		t.Errorf("ra_deg 360: %v", err)
	}
}
