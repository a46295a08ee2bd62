//go:build ignore

// Command vsop87 converts the VSOP87B series (Bretagnon & Francou 1988:
// heliocentric ecliptic spherical coordinates L, B, R referred to the ecliptic
// and equinox J2000) from the data modules of the npm package astronomia 4.2.0
// (MIT licence) into the little-endian binary files that package ephem embeds,
// ephem/data/vsop87b_<body>.bin, and writes ephem/data/PROVENANCE.md.
//
// Usage, from the repository root:
//
//	cd /tmp && npm pack astronomia@4.2.0 && tar xzf astronomia-4.2.0.tgz
//	go run ./testdata/gen/vsop87.go -src /tmp/package/data -out ephem/data
//
// Only the numbers are taken from the package (its files
// data/vsop87B<body>.js); none of its code is used. Each file is a JavaScript
// object literal with keys L, B and R, each holding the series for the powers
// τ^0, τ^1, … of the time as arrays of [A, B, C] triples, one triple per line.
// The reader below accepts exactly that layout and stops on any other line, so a
// changed layout cannot be converted silently.
//
// Output format (all little-endian):
//
//	magic      4 bytes "V87B"
//	version    uint32 = 1
//	then for each coordinate in the order L, B, R:
//	  nPowers  uint32
//	  for each power α = 0 … nPowers−1:
//	    nTerms uint32
//	    nTerms × (A, B, C float64)
//
// A term contributes τ^α · A · cos(B + C·τ), τ in Julian millennia (TDB) from
// J2000; A in radians for L and B, in au for R; B in radians; C in radians per
// millennium. The decimal strings of the source are parsed with
// strconv.ParseFloat, which yields the nearest float64, so the conversion is
// exact to the precision of the source text.
package main

import (
	"bufio"
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"flag"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
)

var bodies = []string{"mercury", "venus", "earth", "mars", "jupiter", "saturn", "uranus", "neptune"}

const (
	pkgName    = "astronomia"
	pkgVersion = "4.2.0"
	pkgLicence = "MIT (Copyright (c) 2013 Sonia Keys, (c) 2016 Commenthol)"
)

type term struct{ a, b, c float64 }

// series[coord][power] lists the terms; coord 0, 1, 2 = L, B, R.
type body struct {
	name   string
	series [3][][]term
}

var (
	reCoord  = regexp.MustCompile(`^\s*([LBR]):\s*\{$`)
	rePower  = regexp.MustCompile(`^\s*"(\d+)":\s*\[$`)
	reTerm   = regexp.MustCompile(`^\s*\[([-+0-9.eE]+),\s*([-+0-9.eE]+),\s*([-+0-9.eE]+)\],?$`)
	reName   = regexp.MustCompile(`^\s*name:\s*"([a-z]+)",?$`)
	reType   = regexp.MustCompile(`^\s*type:\s*"([A-Z])",?$`)
	reIgnore = regexp.MustCompile(`^\s*(const m = \{|export default m;|\];?|\],|\},?|\};)?\s*$`)
)

func parse(path, want string) (*body, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	bd := &body{name: want}
	coord, power := -1, -1
	var gotName, gotType string
	sc := bufio.NewScanner(f)
	sc.Buffer(make([]byte, 1<<20), 1<<20)
	line := 0
	for sc.Scan() {
		line++
		s := sc.Text()
		switch {
		case reTerm.MatchString(s):
			if coord < 0 || power < 0 {
				return nil, fmt.Errorf("%s:%d: term outside a series", path, line)
			}
			m := reTerm.FindStringSubmatch(s)
			var v [3]float64
			for i := range 3 {
				x, err := strconv.ParseFloat(m[i+1], 64)
				if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
					return nil, fmt.Errorf("%s:%d: bad number %q", path, line, m[i+1])
				}
				v[i] = x
			}
			bd.series[coord][power] = append(bd.series[coord][power], term{v[0], v[1], v[2]})
		case reCoord.MatchString(s):
			c := strings.Index("LBR", reCoord.FindStringSubmatch(s)[1])
			if bd.series[c] != nil {
				return nil, fmt.Errorf("%s:%d: coordinate given twice", path, line)
			}
			coord, power = c, -1
			bd.series[c] = [][]term{}
		case rePower.MatchString(s):
			p, _ := strconv.Atoi(rePower.FindStringSubmatch(s)[1])
			if coord < 0 || p != len(bd.series[coord]) {
				return nil, fmt.Errorf("%s:%d: power %d out of order", path, line, p)
			}
			power = p
			bd.series[coord] = append(bd.series[coord], nil)
		case reName.MatchString(s):
			gotName = reName.FindStringSubmatch(s)[1]
		case reType.MatchString(s):
			gotType = reType.FindStringSubmatch(s)[1]
		case reIgnore.MatchString(s):
		default:
			return nil, fmt.Errorf("%s:%d: unexpected line %q", path, line, s)
		}
	}
	if err := sc.Err(); err != nil {
		return nil, err
	}
	if gotName != want || gotType != "B" {
		return nil, fmt.Errorf("%s: file says body %q version %q, want %q version B", path, gotName, gotType, want)
	}
	for c := range 3 {
		if len(bd.series[c]) == 0 {
			return nil, fmt.Errorf("%s: coordinate %c missing", path, "LBR"[c])
		}
		for p, ts := range bd.series[c] {
			if len(ts) == 0 {
				return nil, fmt.Errorf("%s: series %c%d empty", path, "LBR"[c], p)
			}
		}
	}
	return bd, nil
}

func encode(bd *body) []byte {
	var buf bytes.Buffer
	buf.WriteString("V87B")
	put := func(v any) { binary.Write(&buf, binary.LittleEndian, v) }
	put(uint32(1))
	for c := range 3 {
		put(uint32(len(bd.series[c])))
		for _, ts := range bd.series[c] {
			put(uint32(len(ts)))
			for _, t := range ts {
				put(t.a)
				put(t.b)
				put(t.c)
			}
		}
	}
	return buf.Bytes()
}

func sum(b []byte) string {
	h := sha256.Sum256(b)
	return hex.EncodeToString(h[:])
}

func main() {
	src := flag.String("src", "/tmp/package/data", "directory holding astronomia's data/vsop87B<body>.js")
	out := flag.String("out", "ephem/data", "output directory")
	flag.Parse()

	var prov strings.Builder
	prov.WriteString(`# ephem/data: provenance of the VSOP87B coefficient files

Written by testdata/gen/vsop87.go; do not edit by hand.

- Theory: VSOP87, version B — heliocentric ecliptic spherical coordinates L, B, R,
  ecliptic and equinox J2000 (Bretagnon, P., Francou, G., "Planetary theories in
  rectangular and spherical variables. VSOP87 solutions", Astron. Astrophys. 202,
  309–315 (1988)).
- Source of the numbers: npm package ` + "`" + pkgName + "@" + pkgVersion + "`" + `, files
  ` + "`data/vsop87B<body>.js`" + `, licence ` + pkgLicence + `.
  Only its data are used, none of its code.
- Commands, from the repository root:

      cd /tmp && npm pack astronomia@4.2.0 && tar xzf astronomia-4.2.0.tgz
      go run ./testdata/gen/vsop87.go -src /tmp/package/data -out ephem/data

- Format of vsop87b_<body>.bin (little-endian): "V87B", uint32 version = 1; then for
  L, B, R in turn: uint32 number of powers; per power α: uint32 number of terms,
  then that many (A, B, C) float64 triples. A term is τ^α·A·cos(B + C·τ), τ in
  Julian millennia TDB from J2000 (JD 2451545.0); A in rad (L, B) or au (R).
- Completeness: the files hold every power the VSOP87B files have (τ^0 to τ^5, fewer
  for Uranus and Neptune) and their smallest amplitudes are 1e-11 to 2e-11 for
  Mercury to Mars and 7e-10 for Jupiter to Neptune (rad or au), the levels at
  which the published VSOP87 files stop (from memory). The term counts below
  agree with those we remember for the complete VSOP87B files (for example the
  Earth's L0 with 623 terms) — from memory, not checked against the original
  files, which are not available offline. We treat them as the complete series;
  package ephem truncates them at load time (see ephem/vsop87.go).

| body | series: terms per power τ^0, τ^1, … | smallest amplitude | source SHA-256 | output SHA-256 |
|---|---|---|---|---|
`)
	for _, name := range bodies {
		in := filepath.Join(*src, "vsop87B"+name+".js")
		raw, err := os.ReadFile(in)
		if err != nil {
			fmt.Fprintln(os.Stderr, "vsop87:", err)
			os.Exit(1)
		}
		bd, err := parse(in, name)
		if err != nil {
			fmt.Fprintln(os.Stderr, "vsop87:", err)
			os.Exit(1)
		}
		enc := encode(bd)
		outPath := filepath.Join(*out, "vsop87b_"+name+".bin")
		tmp := outPath + ".tmp"
		if err := os.WriteFile(tmp, enc, 0o644); err != nil {
			fmt.Fprintln(os.Stderr, "vsop87:", err)
			os.Exit(1)
		}
		if err := os.Rename(tmp, outPath); err != nil {
			fmt.Fprintln(os.Stderr, "vsop87:", err)
			os.Exit(1)
		}
		var parts []string
		minA := math.Inf(1)
		for c := range 3 {
			var n []string
			for _, ts := range bd.series[c] {
				n = append(n, strconv.Itoa(len(ts)))
				for _, t := range ts {
					if a := math.Abs(t.a); a > 0 && a < minA {
						minA = a
					}
				}
			}
			parts = append(parts, fmt.Sprintf("%c %s", "LBR"[c], strings.Join(n, " ")))
		}
		fmt.Fprintf(&prov, "| %s | %s | %.0e | %s | %s |\n", name, strings.Join(parts, "; "), minA, sum(raw), sum(enc))
		fmt.Fprintf(os.Stderr, "vsop87: %s: %d bytes\n", outPath, len(enc))
	}
	if err := os.WriteFile(filepath.Join(*out, "PROVENANCE.md"), []byte(prov.String()), 0o644); err != nil {
		fmt.Fprintln(os.Stderr, "vsop87:", err)
		os.Exit(1)
	}
}
