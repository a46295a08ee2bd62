package obs

import (
	"math"
	"strconv"
	"strings"
)

// The observation CSV of design.md ("Input formats"): a header row names the
// columns (case-insensitive, any order), '#' starts a comment line, fields are
// separated by ',' (or by tabs, when the header has tabs and no comma, as a
// spreadsheet copies them).

// column is what a CSV column holds.
type column int

const (
	colUnused column = iota
	colTime
	colRA       // sexagesimal hours (or decimal hours)
	colRADeg    // decimal degrees
	colDec      // sexagesimal degrees (or decimal degrees)
	colDecDeg   // decimal degrees
	colSigma    // arcsec, both coordinates
	colSigmaRA  // arcsec, RA on the sky
	colSigmaDec // arcsec
	colCorr     // RA/Dec correlation
	colSite
	colMag
	colBand
)

// csvColumns maps the lower-case column names to what they hold.
var csvColumns = map[string]column{
	"time": colTime, "ra": colRA, "ra_deg": colRADeg, "dec": colDec, "dec_deg": colDecDeg,
	"sigma": colSigma, "sigma_ra": colSigmaRA, "sigma_dec": colSigmaDec, "corr": colCorr,
	"site": colSite, "mag": colMag, "band": colBand,
}

// quantity groups the columns that give one quantity: two columns of one
// quantity are an error.
func (c column) quantity() string {
	switch c {
	case colRA, colRADeg:
		return "ra"
	case colDec, colDecDeg:
		return "dec"
	case colSigma:
		return "sigma"
	case colSigmaRA:
		return "sigma_ra"
	case colSigmaDec:
		return "sigma_dec"
	}
	return ""
}

// csvHeader is the parsed header of an observation CSV.
type csvHeader struct {
	delim byte
	line  int
	cols  []column
	names []string
	has   [colBand + 1]int // 1-based index of each column kind, 0 if absent
}

// readCSV reads the observation CSV in r.data.
func (r *reader) readCSV() error {
	ls := lineScanner{data: r.data}
	var h *csvHeader
	var fields []field
	for {
		line, ok := ls.next()
		if !ok {
			break
		}
		t := firstNonBlank(line)
		if t == "" || t[0] == '#' {
			continue
		}
		if err := r.checkLine(line, ls.n); err != nil {
			return err
		}
		if h == nil {
			var err error
			if h, err = r.csvHeader(line, ls.n); err != nil {
				return err
			}
			continue
		}
		var serr *splitError
		fields, serr = splitFields(fields[:0], line, h.delim)
		if serr != nil {
			return &ParseError{File: r.file, Line: ls.n, Column: columnOf(line, serr.off), Want: serr.want, Err: ErrSyntax}
		}
		if err := r.csvRow(h, line, ls.n, fields); err != nil {
			return err
		}
	}
	if h == nil {
		return &ParseError{File: r.file, Line: ls.n, Want: "a header line naming the columns, such as time,ra,dec,sigma,site", Got: "", Err: ErrHeader,
			Hint: "the file holds no header and no observations"}
	}
	return nil
}

// csvHeader reads the header line.
func (r *reader) csvHeader(line string, lineNo int) (*csvHeader, error) {
	h := &csvHeader{line: lineNo}
	h.delim = ','
	if strings.IndexByte(line, ',') < 0 && strings.IndexByte(strings.Trim(line, " \t"), '\t') >= 0 {
		h.delim = '\t' // tab-separated, as a spreadsheet copies a table
	}
	if i := strings.IndexByte(line, ';'); i >= 0 {
		return nil, &ParseError{File: r.file, Line: lineNo, Column: columnOf(line, i), Want: "fields separated by ','", Got: line,
			Hint: "';'-separated files are not read: separate fields by ',' and write decimals with '.'", Err: ErrFormat}
	}
	fields, serr := splitFields(nil, line, h.delim)
	if serr != nil {
		return nil, &ParseError{File: r.file, Line: lineNo, Column: columnOf(line, serr.off), Want: serr.want, Err: ErrHeader}
	}
	known := 0
	seen := map[string]int{} // quantity → index of the first column giving it
	for i, f := range fields {
		name := lowerASCII(f.s)
		c, ok := csvColumns[name]
		h.cols = append(h.cols, c)
		h.names = append(h.names, f.s)
		col := columnOf(line, f.off)
		switch {
		case !ok && name == "":
			r.warn(lineNo, col, "column %d has no name; it is not read", i+1)
			continue
		case !ok:
			r.warn(lineNo, col, "column %q is not used", f.s)
			continue
		}
		known++
		q := c.quantity()
		if q == "" {
			q = name
		}
		if j, dup := seen[q]; dup {
			return nil, &ParseError{File: r.file, Line: lineNo, Column: col, Field: f.s,
				Want: "one column for " + q + ", but column " + strconv.Itoa(j+1) + " (" + strconv.Quote(fields[j].s) + ") gives it too",
				Err:  ErrDuplicateColumn}
		}
		seen[q] = i
		h.has[c] = i + 1
	}
	if known == 0 {
		return nil, &ParseError{File: r.file, Line: lineNo, Column: 1, Want: "a header line naming the columns, such as time,ra,dec,sigma,site",
			Got: line, Hint: "the first line that is not a comment must name the columns", Err: ErrHeader}
	}
	if h.has[colSigma] != 0 && (h.has[colSigmaRA] != 0 || h.has[colSigmaDec] != 0) {
		i := max(h.has[colSigmaRA], h.has[colSigmaDec]) - 1
		return nil, &ParseError{File: r.file, Line: lineNo, Column: columnOf(line, fields[i].off), Field: fields[i].s,
			Want: "either sigma or sigma_ra and sigma_dec, not both", Err: ErrDuplicateColumn}
	}
	if (h.has[colSigmaRA] == 0) != (h.has[colSigmaDec] == 0) {
		i := max(h.has[colSigmaRA], h.has[colSigmaDec]) - 1
		return nil, &ParseError{File: r.file, Line: lineNo, Column: columnOf(line, fields[i].off), Field: fields[i].s,
			Want: "sigma_ra and sigma_dec together", Err: ErrHeader}
	}
	missing := ""
	switch {
	case h.has[colTime] == 0:
		missing = "a time column"
	case h.has[colRA] == 0 && h.has[colRADeg] == 0:
		missing = "an ra or ra_deg column"
	case h.has[colDec] == 0 && h.has[colDecDeg] == 0:
		missing = "a dec or dec_deg column"
	}
	if missing != "" {
		return nil, &ParseError{File: r.file, Line: lineNo, Column: 1, Want: missing + " in the header", Got: line,
			Hint: "the header must name time, ra (or ra_deg) and dec (or dec_deg)", Err: ErrHeader}
	}
	r.noSigma = h.has[colSigma] == 0 && h.has[colSigmaRA] == 0
	return h, nil
}

// csvRow reads one data row.
func (r *reader) csvRow(h *csvHeader, line string, lineNo int, fields []field) error {
	if len(fields) != len(h.cols) {
		e := &ParseError{File: r.file, Line: lineNo, Column: columnOf(line, len(line)),
			Want: strconv.Itoa(len(h.cols)) + " fields as in the header on line " + strconv.Itoa(h.line) + ", found " + strconv.Itoa(len(fields)),
			Err:  ErrFieldCount}
		if len(fields) > len(h.cols) {
			e.Column = columnOf(line, fields[len(h.cols)].off)
			if h.delim == ',' {
				e.Hint = "a decimal comma? write 12.5, not 12,5; quote a field that holds a comma"
			}
		}
		return e
	}
	o := Observation{Line: lineNo, Mag: math.NaN(), Used: true, SigmaRA: r.sigma, SigmaDec: r.sigma}
	sigmaEmpty := false
	for i, c := range h.cols {
		f := fields[i]
		var t *fieldTrouble
		switch c {
		case colUnused:
			continue
		case colTime:
			var pre bool
			o.Time, pre, t = parseTime(f.s, true)
			if t == nil && pre {
				r.notePre1972(lineNo, columnOf(line, f.off))
			}
		case colRA:
			o.RA, t = parseRAHours(f.s)
		case colRADeg:
			o.RA, t = parseRADegrees(f.s)
		case colDec:
			o.Dec, t = parseDecDegrees(f.s)
		case colDecDeg:
			o.Dec, t = parseDecDecimal(f.s)
		case colSigma:
			if f.s == "" {
				sigmaEmpty = true
				continue
			}
			o.SigmaRA, t = parseSigma(f.s)
			o.SigmaDec = o.SigmaRA
		case colSigmaRA:
			if f.s == "" {
				sigmaEmpty = true
				continue
			}
			o.SigmaRA, t = parseSigma(f.s)
		case colSigmaDec:
			if f.s == "" {
				sigmaEmpty = true
				continue
			}
			o.SigmaDec, t = parseSigma(f.s)
		case colCorr:
			if f.s != "" {
				o.Corr, t = parseCorr(f.s)
			}
		case colSite:
			if f.s != "" {
				o.Site = r.internString(f.s)
				o.siteCol = columnOf(line, f.off)
			}
		case colMag:
			if f.s != "" {
				o.Mag, t = parseMag(f.s)
			}
		case colBand:
			if f.s != "" {
				o.Band = r.internString(f.s)
			}
		}
		if t != nil {
			return r.fieldError(line, lineNo, f, h.names[i], t)
		}
	}
	if sigmaEmpty {
		r.noteEmptySigma(lineNo)
	}
	if o.Site == "" {
		o.Site = r.opts.DefaultSite
	}
	r.set.Obs = append(r.set.Obs, o)
	return nil
}
