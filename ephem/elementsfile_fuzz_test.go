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
	"unicode/utf8"

	"arcfit/astro"
	"arcfit/astro/obs"

	"gonum.org/v1/gonum/spatial/r3"
)

// writeElementsCSV writes element sets as an orbital-elements CSV holding
// both forms, each row filling the pair of its set, in full precision:
// dates as TT ISO 8601 to 1 ns, angles as exact decimals of degrees.
func writeElementsCSV(sets []Elements) []byte {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	_ = w.Write([]string{"name", "epoch_tt", "a_au", "e", "i_deg", "node_deg", "peri_deg", "m_deg", "q_au", "tp_tt", "h", "g"})
	ff := func(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }
	opt := func(v float64) string {
		if math.IsNaN(v) {
			return ""
		}
		return ff(v)
	}
	for _, el := range sets {
		row := []string{el.Name, "", "", ff(el.E), ff(el.I.Degrees()), ff(el.Node.Degrees()), ff(el.Peri.Degrees()), "", "", "", opt(el.H), opt(el.G)}
		if el.A != 0 {
			row[1], row[2], row[7] = astro.FormatISO8601(el.Epoch, 9), ff(el.A), ff(el.M.Degrees())
		} else {
			row[8], row[9] = ff(el.Q), astro.FormatISO8601(el.Tp, 9)
			if el.Epoch.Day != 0 {
				row[1] = astro.FormatISO8601(el.Epoch, 9)
			}
		}
		_ = w.Write(row)
	}
	w.Flush()
	return b.Bytes()
}

// finiteVec reports whether every component of v is finite.
func finiteVec(v r3.Vec) bool {
	for _, x := range []float64{v.X, v.Y, v.Z} {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}

// FuzzReadElementsRewrite reads arbitrary bytes as an orbital-elements CSV.
// An error is a one-line *obs.ParseError naming the file, with a line
// within the input and a column within that line. An accepted set's state at
// its epoch (or perihelion time) and 100 days later is finite or refused
// with an error, never NaN; the sets written back by writeElementsCSV read
// back to the same elements (angles within a few ulp of the degree decimal,
// dates within 1 ns).
func FuzzReadElementsRewrite(f *testing.F) {
	files, _ := filepath.Glob(filepath.Join(elementsDir, "*.csv"))
	for _, p := range files {
		if b, err := os.ReadFile(p); err == nil {
			f.Add(b)
		}
	}
	f.Add([]byte("name,q_au,e,i_deg,node_deg,peri_deg,tp_tt\nParabola,1,1,90,0,0,2027-01-01T00:00:00\nHyper,0.5,1e300,180,-360,360,2200-12-31T23:59:59.999999999\n"))
	f.Add([]byte("name,epoch_tt,a_au,e,i_deg,node_deg,peri_deg,m_deg\nCircle,2461406.5,1e-300,0,0,0,0,0\nAlmost,2461406.5,1e300,0.999999999,0,0,0,359.999999\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		sets, _, err := ReadElements(bytes.NewReader(data), "fuzz.csv")
		if err != nil {
			var pe *obs.ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %T %v, want *obs.ParseError", err, err)
			}
			msg := err.Error()
			if strings.ContainsAny(msg, "\n\r") || !strings.HasPrefix(msg, "fuzz.csv:") {
				t.Fatalf("error not one line naming the file: %q", msg)
			}
			lines := strings.Split(string(data), "\n")
			if pe.Line < 0 || pe.Line > len(lines) {
				t.Fatalf("error line %d outside the %d lines: %q", pe.Line, len(lines), msg)
			}
			if pe.Line > 0 && pe.Column > 0 {
				if !strings.HasPrefix(msg, "fuzz.csv:"+strconv.Itoa(pe.Line)+":"+strconv.Itoa(pe.Column)+":") {
					t.Fatalf("message %q does not start with its place", msg)
				}
				l := strings.TrimPrefix(strings.TrimSuffix(lines[pe.Line-1], "\r"), bomUTF8)
				if n := utf8.RuneCountInString(l); pe.Column > n+1 {
					t.Fatalf("error column %d outside line %d (%d characters): %q", pe.Column, pe.Line, n, msg)
				}
			}
			return
		}
		for _, el := range sets {
			at := el.Tp
			if el.A != 0 {
				at = el.Epoch
			}
			for _, dt := range []float64{0, 100} {
				p, v, err := el.StateAt(astro.JD{Day: at.Day + dt, Frac: at.Frac, Scale: at.Scale})
				if err == nil && (!finiteVec(p) || !finiteVec(v)) {
					t.Fatalf("set %+v: state at %v + %v d is %v %v", el, at, dt, p, v)
				}
				if err != nil && strings.ContainsAny(err.Error(), "\n\r") {
					t.Fatalf("set %q: error not one line: %q", el.Name, err)
				}
			}
		}
		text := writeElementsCSV(sets)
		back, _, err := ReadElements(bytes.NewReader(text), "again.csv")
		if err != nil {
			t.Fatalf("sets written back do not read: %v\n%s", err, text)
		}
		if len(back) != len(sets) {
			t.Fatalf("%d sets read back, want %d\n%s", len(back), len(sets), text)
		}
		for i, a := range sets {
			b := back[i]
			ang := func(x, y astro.Angle) bool { return math.Abs(math.Remainder(float64(x-y), 2*math.Pi)) <= 1e-13 }
			day := func(x, y astro.JD) bool { return x.Scale == y.Scale && math.Abs(y.Sub(x))*astro.SecondsPerDay <= 1e-9 }
			same := func(x, y float64) bool { return x == y || (math.IsNaN(x) && math.IsNaN(y)) }
			ok := a.Name == b.Name && a.E == b.E && a.A == b.A && a.Q == b.Q && same(a.H, b.H) && same(a.G, b.G) &&
				math.Abs(float64(a.I-b.I)) <= 1e-13 && ang(a.Node, b.Node) && ang(a.Peri, b.Peri) && ang(a.M, b.M)
			if a.A != 0 {
				ok = ok && day(a.Epoch, b.Epoch)
			} else {
				ok = ok && day(a.Tp, b.Tp)
			}
			if !ok {
				t.Fatalf("set %d %+v read back as %+v\n%s", i, a, b, text)
			}
		}
	})
}
