package obs

import (
	"math"
	"strconv"
	"strings"

	"arcfit/astro"
)

// The PSV (pipe-separated value) form of the IAU Astrometry Data Exchange
// Standard (ADES). As read here — the layout is stated from memory of the ADES
// description, not from its text:
//
//   - lines starting with '#' open a header block ("# version=2017",
//     "# observatory", "# telescope"), lines starting with '!' give its
//     keywords ("! mpcCode …", "! name …"); both are kept in Set.Meta;
//   - the first other line after them names the fields, separated by '|' and
//     padded with spaces; the lines after it are observations with the same
//     fields; a new header block may follow, with a new field line;
//   - obsTime is ISO 8601 UTC ending in Z; ra and dec are decimal degrees;
//     rmsRA (already multiplied by cos dec) and rmsDec are 1-σ arcseconds;
//     rmsCorr is their correlation; stn is the station code; mag and band the
//     photometry; permID, provID and trkSub identify the object;
//   - a station given by its position has sys = WGS84 and ctr = 399 (the
//     Earth), pos1 = east longitude in degrees, pos2 = geodetic latitude in
//     degrees, pos3 = height above the ellipsoid in metres.

// adesColumn is what an ADES field holds for this reader.
type adesColumn int

const (
	adesUnused adesColumn = iota
	adesObsTime
	adesRA
	adesDec
	adesRMSRA
	adesRMSDec
	adesRMSCorr
	adesStn
	adesMag
	adesBand
	adesSys
	adesCtr
	adesPos1
	adesPos2
	adesPos3
	adesPermID
	adesProvID
	adesTrkSub
	adesKnown // an ADES field this reader does not use
)

// adesUsed maps the fields the reader uses to what they hold.
var adesUsed = map[string]adesColumn{
	"obsTime": adesObsTime, "ra": adesRA, "dec": adesDec, "rmsRA": adesRMSRA, "rmsDec": adesRMSDec,
	"rmsCorr": adesRMSCorr, "stn": adesStn, "mag": adesMag, "band": adesBand, "sys": adesSys,
	"ctr": adesCtr, "pos1": adesPos1, "pos2": adesPos2, "pos3": adesPos3,
	"permID": adesPermID, "provID": adesProvID, "trkSub": adesTrkSub,
}

// adesOther lists the other observation fields of ADES (from memory of the
// standard's field list), read past with one warning naming them.
var adesOther = []string{
	"artSat", "obsID", "trkID", "trkMPC", "mode", "vel1", "vel2", "vel3",
	"poscov11", "poscov12", "poscov13", "poscov22", "poscov23", "poscov33",
	"prog", "rmsTime", "raStar", "decStar", "obsCenter", "deltaRA", "deltaDec",
	"dist", "pa", "rmsDist", "rmsPA", "delay", "rmsDelay", "doppler", "rmsDoppler",
	"astCat", "rmsMag", "photCat", "photAp", "nucMag", "logSNR", "seeing", "exp",
	"rmsFit", "com", "frq", "nStars", "ref", "disc", "subFmt", "subFrm",
	"precTime", "precRA", "precDec", "uncTime", "notes", "remarks", "deprecated",
	"localUse", "orbProd", "orbID", "resRA", "resDec", "selAst", "sigRA", "sigDec",
	"sigCorr", "sigTime", "biasRA", "biasDec", "biasTime", "photProd", "resMag",
	"selPhot", "sigMag", "biasMag", "photMod", "resDelay", "selDelay", "sigDelay",
	"resDoppler", "selDoppler", "sigDoppler", "shapeOCRA", "shapeOCDec",
}

// adesNames maps lower-case field names to their ADES spelling and use.
var adesNames = func() map[string]struct {
	name string
	col  adesColumn
} {
	m := make(map[string]struct {
		name string
		col  adesColumn
	})
	for n, c := range adesUsed {
		m[strings.ToLower(n)] = struct {
			name string
			col  adesColumn
		}{n, c}
	}
	for _, n := range adesOther {
		m[strings.ToLower(n)] = struct {
			name string
			col  adesColumn
		}{n, adesKnown}
	}
	return m
}()

// adesHeader is one field-name line of a PSV file.
type adesHeader struct {
	line  int
	cols  []adesColumn
	names []string
	has   [adesKnown + 1]int // 1-based index of each field, 0 if absent
}

// adesObject remembers the object identifiers seen, to refuse a second object.
type adesObject struct {
	value [3]string // permID, provID, trkSub
	line  [3]int
}

// readADES reads the ADES PSV text in r.data.
func (r *reader) readADES() error {
	ls := lineScanner{data: r.data}
	var h *adesHeader
	var fields []field
	var obj adesObject
	expectHeader := true
	for {
		line, ok := ls.next()
		if !ok {
			break
		}
		t := firstNonBlank(line)
		if t == "" {
			continue
		}
		if err := r.checkLine(line, ls.n); err != nil {
			return err
		}
		if t[0] == '#' || t[0] == '!' {
			r.set.Meta = append(r.set.Meta, strings.TrimRight(t, " \t"))
			if t[0] == '#' {
				expectHeader = true
			}
			continue
		}
		var serr *splitError
		fields, serr = splitFields(fields[:0], line, '|')
		if serr != nil {
			return &ParseError{File: r.file, Line: ls.n, Column: columnOf(line, serr.off), Want: serr.want, Err: ErrSyntax}
		}
		if expectHeader || h == nil {
			var err error
			if h, err = r.adesHeader(line, ls.n, fields); err != nil {
				return err
			}
			expectHeader = false
			continue
		}
		if err := r.adesRow(h, line, ls.n, fields, &obj); err != nil {
			return err
		}
	}
	if h == nil {
		return &ParseError{File: r.file, Line: ls.n, Want: "an ADES PSV field line such as obsTime|ra|dec|stn", Err: ErrHeader,
			Hint: "the file holds no field line and no observations"}
	}
	for k := range obj.value {
		if obj.value[k] != "" {
			r.set.Object = obj.value[k]
			break
		}
	}
	return nil
}

// adesHeader reads a field-name line.
func (r *reader) adesHeader(line string, lineNo int, fields []field) (*adesHeader, error) {
	h := &adesHeader{line: lineNo}
	known := 0
	var unused []string
	for i, f := range fields {
		col := columnOf(line, f.off)
		e, ok := adesNames[strings.ToLower(f.s)]
		h.names = append(h.names, f.s)
		if !ok {
			h.cols = append(h.cols, adesUnused)
			if f.s == "" {
				r.warn(lineNo, col, "field %d has no name; it is not read", i+1)
			} else {
				r.warn(lineNo, col, "field %q is not an ADES field; it is not read", f.s)
			}
			continue
		}
		known++
		if h.has[e.col] != 0 && e.col != adesKnown {
			return nil, &ParseError{File: r.file, Line: lineNo, Column: col, Field: f.s,
				Want: "one " + e.name + " field, but field " + strconv.Itoa(h.has[e.col]) + " gives it too", Err: ErrDuplicateColumn}
		}
		h.has[e.col] = i + 1
		h.cols = append(h.cols, e.col)
		if e.col == adesKnown {
			unused = append(unused, e.name)
		}
	}
	if known == 0 {
		return nil, &ParseError{File: r.file, Line: lineNo, Column: 1, Want: "an ADES PSV field line such as obsTime|ra|dec|stn",
			Got: line, Hint: "after the '#' header lines, the first line must name the fields", Err: ErrHeader}
	}
	for _, req := range []struct {
		c    adesColumn
		name string
	}{{adesObsTime, "obsTime"}, {adesRA, "ra"}, {adesDec, "dec"}} {
		if h.has[req.c] == 0 {
			return nil, &ParseError{File: r.file, Line: lineNo, Column: 1, Want: "an " + req.name + " field in the field line", Got: line,
				Hint: "this reader needs obsTime, ra and dec (offsets from a star are not read)", Err: ErrHeader}
		}
	}
	if (h.has[adesRMSRA] == 0) != (h.has[adesRMSDec] == 0) {
		i := max(h.has[adesRMSRA], h.has[adesRMSDec]) - 1
		return nil, &ParseError{File: r.file, Line: lineNo, Column: columnOf(line, fields[i].off), Field: fields[i].s,
			Want: "rmsRA and rmsDec together", Err: ErrHeader}
	}
	pos := 0
	for _, c := range []adesColumn{adesSys, adesPos1, adesPos2, adesPos3} {
		if h.has[c] != 0 {
			pos++
		}
	}
	if pos != 0 && pos != 4 {
		return nil, &ParseError{File: r.file, Line: lineNo, Column: 1, Want: "all of sys, pos1, pos2 and pos3 for a station position, or none",
			Got: line, Err: ErrHeader}
	}
	if h.has[adesRMSRA] == 0 {
		r.noSigma = true
	}
	if len(unused) > 0 {
		r.warn(lineNo, 0, "ADES fields not used: %s", strings.Join(unused, ", "))
	}
	return h, nil
}

// adesRow reads one observation line.
func (r *reader) adesRow(h *adesHeader, line string, lineNo int, fields []field, obj *adesObject) error {
	if len(fields) != len(h.cols) {
		e := &ParseError{File: r.file, Line: lineNo, Column: columnOf(line, len(line)),
			Want: strconv.Itoa(len(h.cols)) + " fields as in the field line " + strconv.Itoa(h.line) + ", found " + strconv.Itoa(len(fields)),
			Err:  ErrFieldCount}
		if len(fields) > len(h.cols) {
			e.Column = columnOf(line, fields[len(h.cols)].off)
		}
		return e
	}
	o := Observation{Line: lineNo, Mag: math.NaN(), Used: true, SigmaRA: r.sigma, SigmaDec: r.sigma}
	var stn, sys, ctr field
	var pos [3]field
	sigmaEmpty := false
	for i, c := range h.cols {
		f := fields[i]
		var t *fieldTrouble
		switch c {
		case adesObsTime:
			var pre bool
			o.Time, pre, t = parseTime(f.s, false)
			if t == nil && pre {
				r.notePre1972(lineNo, columnOf(line, f.off))
			}
		case adesRA:
			o.RA, t = parseRADegrees(f.s)
		case adesDec:
			o.Dec, t = parseDecDecimal(f.s)
		case adesRMSRA:
			if f.s == "" {
				sigmaEmpty = true
				continue
			}
			o.SigmaRA, t = parseSigma(f.s)
		case adesRMSDec:
			if f.s == "" {
				sigmaEmpty = true
				continue
			}
			o.SigmaDec, t = parseSigma(f.s)
		case adesRMSCorr:
			if f.s != "" {
				o.Corr, t = parseCorr(f.s)
			}
		case adesStn:
			stn = f
		case adesMag:
			if f.s != "" {
				o.Mag, t = parseMag(f.s)
			}
		case adesBand:
			if f.s != "" {
				o.Band = r.internString(f.s)
			}
		case adesSys:
			sys = f
		case adesCtr:
			ctr = f
		case adesPos1, adesPos2, adesPos3:
			pos[c-adesPos1] = f
		case adesPermID, adesProvID, adesTrkSub:
			k := int(c - adesPermID)
			if f.s == "" {
				continue
			}
			if obj.value[k] == "" {
				obj.value[k], obj.line[k] = r.internString(f.s), lineNo
			} else if obj.value[k] != f.s {
				return &ParseError{File: r.file, Line: lineNo, Column: columnOf(line, f.off), Field: h.names[i],
					Want: "one object per file, " + strconv.Quote(obj.value[k]) + " as on line " + strconv.Itoa(obj.line[k]),
					Got:  f.s, Hint: "split the file by object", Err: ErrFormat}
			}
		}
		if t != nil {
			return r.fieldError(line, lineNo, f, h.names[i], t)
		}
	}
	if sigmaEmpty {
		r.noteEmptySigma(lineNo)
	}
	if stn.s != "" {
		o.Site = r.internString(stn.s)
		o.siteCol = columnOf(line, stn.off)
	}
	if sys.s != "" || pos[0].s != "" || pos[1].s != "" || pos[2].s != "" {
		if err := r.adesSite(&o, line, lineNo, stn, sys, ctr, pos); err != nil {
			return err
		}
	}
	if o.Site == "" {
		o.Site = r.opts.DefaultSite
	}
	r.set.Obs = append(r.set.Obs, o)
	return nil
}

// adesSite reads a station position (sys, ctr, pos1–3) into a site of the
// file, named "stn@lat,lon,height" as written, and gives it to o.
func (r *reader) adesSite(o *Observation, line string, lineNo int, stn, sys, ctr field, pos [3]field) error {
	if !strings.EqualFold(sys.s, "WGS84") {
		t := &fieldTrouble{want: "WGS84 (the only station position system read)", got: sys.s, err: ErrFormat}
		return r.fieldError(line, lineNo, sys, "sys", t)
	}
	if ctr.s != "" && ctr.s != "399" {
		t := &fieldTrouble{want: "399 (the Earth) for a WGS84 position", got: ctr.s, err: ErrRange}
		return r.fieldError(line, lineNo, ctr, "ctr", t)
	}
	lon, t := parseLongitude(pos[0].s)
	if t != nil {
		return r.fieldError(line, lineNo, pos[0], "pos1", t)
	}
	lat, t := parseLatitude(pos[1].s)
	if t != nil {
		return r.fieldError(line, lineNo, pos[1], "pos2", t)
	}
	hm, t := parseHeight(pos[2].s)
	if t != nil {
		return r.fieldError(line, lineNo, pos[2], "pos3", t)
	}
	name := stn.s + "@" + pos[1].s + "," + pos[0].s + "," + pos[2].s
	if r.set.Sites == nil {
		r.set.Sites = make(map[string]astro.Site)
	}
	name = r.internString(name)
	r.set.Sites[name] = astro.Site{Name: name, Lat: lat, Lon: lon, HeightM: hm}
	o.Site = name
	o.siteCol = columnOf(line, pos[0].off)
	return nil
}
