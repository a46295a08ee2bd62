package obs

import (
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"

	"arcfit/astro"
)

// The sites CSV of design.md: a header naming name, lat_deg, lon_deg and
// height_m (case-insensitive, any order), then one site per row: geodetic
// WGS84 latitude and east longitude in decimal degrees, height above the
// ellipsoid in metres. Names may contain spaces (and, quoted, commas).

// Height limits for a site, metres. They are sanity bounds chosen for arcfit:
// the lowest land is about −430 m and the highest observing platforms
// (aircraft, balloons) fly below 20 km.
const (
	minHeightM = -1000.0
	maxHeightM = 20000.0
)

// parseLatitude reads a geodetic latitude in decimal degrees within ±90.
func parseLatitude(s string) (astro.Angle, *fieldTrouble) {
	v, t := parseDecimal(s)
	const want = "a latitude in degrees within ±90"
	if t != nil {
		t.want = want
		return 0, t
	}
	if v < -90 || v > 90 {
		return 0, &fieldTrouble{want: want, got: s, err: ErrRange}
	}
	return astro.AngleFromDegrees(v), nil
}

// parseLongitude reads an east longitude in decimal degrees, −180…360,
// and returns it normalised to (−180°, 180°].
func parseLongitude(s string) (astro.Angle, *fieldTrouble) {
	v, t := parseDecimal(s)
	const want = "an east longitude in degrees from −180 to 360"
	if t != nil {
		t.want = want
		return 0, t
	}
	if v < -180 || v > 360 {
		return 0, &fieldTrouble{want: want, got: s, err: ErrRange}
	}
	if v > 180 {
		v -= 360
	}
	if v == -180 {
		v = 180
	}
	return astro.AngleFromDegrees(v), nil
}

// parseHeight reads a height above the ellipsoid in metres.
func parseHeight(s string) (float64, *fieldTrouble) {
	v, t := parseDecimal(s)
	const want = "a height in metres from −1000 to 20000"
	if t != nil {
		t.want = want
		return 0, t
	}
	if v < minHeightM || v > maxHeightM {
		return 0, &fieldTrouble{want: want, got: s, err: ErrRange}
	}
	return v, nil
}

// ParseSiteSpec reads a site given inline as "lat_deg,lon_deg,height_m",
// such as "44.52,-72.80,410": geodetic WGS84 latitude and east longitude in
// decimal degrees and the height above the ellipsoid in metres, spaces
// allowed around each. The longitude may be given from −180 to 360 and is
// normalised to (−180°, 180°]. The site's Name is the spec as given,
// trimmed. Errors are *[ParseError] with Field the part at fault.
func ParseSiteSpec(s string) (astro.Site, error) {
	spec := strings.TrimSpace(s)
	parts, serr := splitFields(nil, spec, ',')
	if serr != nil || len(parts) != 3 {
		e := &ParseError{Field: "site", Want: "lat_deg,lon_deg,height_m, such as 44.52,-72.80,410", Got: spec, Err: ErrSyntax}
		if len(parts) > 3 {
			e.Hint = "a decimal comma? write 44.52, not 44,52"
		}
		return astro.Site{}, e
	}
	site := astro.Site{Name: spec}
	var t *fieldTrouble
	if site.Lat, t = parseLatitude(parts[0].s); t != nil {
		return astro.Site{}, specError("lat_deg", spec, parts[0], t)
	}
	if site.Lon, t = parseLongitude(parts[1].s); t != nil {
		return astro.Site{}, specError("lon_deg", spec, parts[1], t)
	}
	if site.HeightM, t = parseHeight(parts[2].s); t != nil {
		return astro.Site{}, specError("height_m", spec, parts[2], t)
	}
	return site, nil
}

func specError(name, spec string, f field, t *fieldTrouble) *ParseError {
	got := t.got
	if got == "" {
		got = f.s
	}
	return &ParseError{Column: columnOf(spec, f.off+t.off), Field: "site " + name, Want: t.want, Got: got, Hint: t.hint, Err: t.err}
}

// ReadSites reads a sites CSV from r (name is used in messages) and returns
// the sites by name. It is [ReadSitesWarnings] without the warnings.
func ReadSites(r io.Reader, name string) (map[string]astro.Site, error) {
	m, _, err := ReadSitesWarnings(r, name)
	return m, err
}

// ReadSitesFile reads the sites CSV at path with [ReadSites].
func ReadSitesFile(path string) (map[string]astro.Site, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("obs: %w", err)
	}
	defer f.Close()
	return ReadSites(f, path)
}

// siteColumns are the columns of a sites CSV.
var siteColumns = []string{"name", "lat_deg", "lon_deg", "height_m"}

// ReadSitesWarnings reads a sites CSV from r: a header naming the columns
// name, lat_deg, lon_deg and height_m (case-insensitive, any order; '#' lines
// are comments; BOM, CRLF, quotes, tabs and blank lines are fine), then one
// site per row. A column it does not use gets a warning; a name defined twice
// with different values is an error wrapping [ErrDuplicateSite] (twice with
// the same values, a warning). Errors are *[ParseError].
func ReadSitesWarnings(r io.Reader, name string) (map[string]astro.Site, []Warning, error) {
	data, err := readAll(r)
	if err != nil {
		return nil, nil, fmt.Errorf("obs: reading %s: %w", name, err)
	}
	var warns []Warning
	warn := func(line, col int, format string, args ...any) {
		warns = append(warns, Warning{File: name, Line: line, Column: col, Msg: fmt.Sprintf(format, args...)})
	}
	sites := make(map[string]astro.Site)
	defined := make(map[string]int)
	ls := lineScanner{data: data}
	var idx [4]int // 1-based field index of each site column
	var ncols, headerLine int
	var delim byte
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
		if off, what := checkText(line); off >= 0 {
			return nil, nil, textError(name, line, ls.n, off, what)
		}
		if headerLine == 0 {
			delim = ','
			if strings.IndexByte(line, ',') < 0 && strings.IndexByte(strings.Trim(line, " \t"), '\t') >= 0 {
				delim = '\t' // tab-separated, as a spreadsheet copies a table
			}
		}
		var serr *splitError
		fields, serr = splitFields(fields[:0], line, delim)
		if serr != nil {
			return nil, nil, &ParseError{File: name, Line: ls.n, Column: columnOf(line, serr.off), Want: serr.want, Err: ErrSyntax}
		}
		if headerLine == 0 {
			if i := strings.IndexByte(line, ';'); i >= 0 {
				return nil, nil, &ParseError{File: name, Line: ls.n, Column: columnOf(line, i), Want: "fields separated by ','", Got: line,
					Hint: "';'-separated files are not read: separate fields by ',' and write decimals with '.'", Err: ErrFormat}
			}
			headerLine, ncols = ls.n, len(fields)
			for i, f := range fields {
				n := lowerASCII(f.s)
				k := -1
				for j, c := range siteColumns {
					if n == c {
						k = j
					}
				}
				col := columnOf(line, f.off)
				if k < 0 {
					warn(ls.n, col, "column %q is not used", f.s)
					continue
				}
				if idx[k] != 0 {
					return nil, nil, &ParseError{File: name, Line: ls.n, Column: col, Field: f.s,
						Want: "one " + siteColumns[k] + " column, but column " + strconv.Itoa(idx[k]) + " gives it too", Err: ErrDuplicateColumn}
				}
				idx[k] = i + 1
			}
			for k, c := range siteColumns {
				if idx[k] == 0 {
					return nil, nil, &ParseError{File: name, Line: ls.n, Column: 1, Want: "a header naming name,lat_deg,lon_deg,height_m; " + c + " is missing",
						Got: line, Err: ErrHeader}
				}
			}
			continue
		}
		if len(fields) != ncols {
			e := &ParseError{File: name, Line: ls.n, Column: columnOf(line, len(line)),
				Want: strconv.Itoa(ncols) + " fields as in the header on line " + strconv.Itoa(headerLine) + ", found " + strconv.Itoa(len(fields)),
				Err:  ErrFieldCount}
			if len(fields) > ncols {
				e.Column = columnOf(line, fields[ncols].off)
				e.Hint = "a decimal comma? write 44.52, not 44,52; quote a name that holds a comma"
			}
			return nil, nil, e
		}
		nf := fields[idx[0]-1]
		if nf.s == "" {
			return nil, nil, &ParseError{File: name, Line: ls.n, Column: columnOf(line, nf.off), Field: "name", Want: "a site name, got an empty field", Err: ErrSyntax}
		}
		site := astro.Site{Name: strings.Clone(nf.s)}
		var ft *fieldTrouble
		var bad field
		var badName string
		if site.Lat, ft = parseLatitude(fields[idx[1]-1].s); ft != nil {
			bad, badName = fields[idx[1]-1], "lat_deg"
		} else if site.Lon, ft = parseLongitude(fields[idx[2]-1].s); ft != nil {
			bad, badName = fields[idx[2]-1], "lon_deg"
		} else if site.HeightM, ft = parseHeight(fields[idx[3]-1].s); ft != nil {
			bad, badName = fields[idx[3]-1], "height_m"
		}
		if ft != nil {
			rd := reader{file: name}
			return nil, nil, rd.fieldError(line, ls.n, bad, badName, ft)
		}
		if old, ok := sites[site.Name]; ok {
			if old != site {
				return nil, nil, &ParseError{File: name, Line: ls.n, Column: columnOf(line, nf.off), Field: "name",
					Want: "each site defined once, but line " + strconv.Itoa(defined[site.Name]) + " defines it differently",
					Got:  site.Name, Err: ErrDuplicateSite}
			}
			warn(ls.n, columnOf(line, nf.off), "site %q repeats line %d", site.Name, defined[site.Name])
			continue
		}
		sites[site.Name] = site
		defined[site.Name] = ls.n
	}
	if headerLine == 0 {
		return nil, nil, &ParseError{File: name, Line: ls.n, Want: "a header naming name,lat_deg,lon_deg,height_m", Err: ErrHeader,
			Hint: "the file holds no header and no sites"}
	}
	return sites, warns, nil
}
