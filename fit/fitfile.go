package fit

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"unicode/utf8"

	"gonum.org/v1/gonum/mat"

	"arcfit/astro"
	"arcfit/astro/obs"
)

// FitFileSchema is the schema of the fit files this version writes and
// reads: the value of the file's "schema" key. A file of another schema is
// refused with ErrFitSchema.
const FitFileSchema = "arcfit-fit/2"

// fitFileSchemaV1 is the schema of the first fit files (sky-plane models
// only, no "orbit" object); this version still reads them.
const fitFileSchemaV1 = "arcfit-fit/1"

// fitFileSchemaPrefix starts the schema key of every arcfit fit file, of any
// version.
const fitFileSchemaPrefix = "arcfit-fit/"

// MaxFitFileBytes is the largest fit file LoadFile reads (256 MiB: a fit of a
// few hundred thousand observations).
const MaxFitFileBytes = 256 << 20

// Sentinel errors of the fit-file reader, wrapped by the *obs.ParseError it
// returns; test for them with errors.Is.
var (
	// ErrFitFile reports a fit file that cannot be read: not JSON, cut short,
	// a field of the wrong type, a value out of range or inconsistent with
	// the others.
	ErrFitFile = errors.New("fit: not a usable fit file")
	// ErrFitSchema reports a fit file of a schema this version does not read.
	ErrFitSchema = errors.New("fit: unsupported fit-file schema")
)

// SavedFit is the content of a fit file: the chosen model's solution with its
// track, and what the model comparison said about it.
type SavedFit struct {
	// Solution is the fitted model: parameters, covariance, tangent plane,
	// epoch, settings and the track it was fitted to. Solution.Predict of a
	// loaded file gives the same numbers as that of the solution saved.
	Solution *Solution
	// Reason says in plain words why the model was chosen.
	Reason string
	// HorizonDays, HorizonBeforeDays and HorizonAfterDays are the validity
	// horizons of Comparison (days beyond the arc; NaN when unknown) and
	// HorizonRule says how they were found.
	HorizonDays, HorizonBeforeDays, HorizonAfterDays float64
	HorizonRule                                      string
	// Rows are the comparison rows of the fit, without their solutions,
	// cross-validation details and predictions.
	Rows []ModelRow
	// Notes are the comparison's remarks.
	Notes []string
	// Orbit is the two-body orbit when it is the chosen model (then
	// Predict uses it, and Solution is the best sky-plane model, kept for
	// the track, the sites and the comparison); nil otherwise.
	Orbit *OrbitFit
}

// NewSavedFit returns the SavedFit of a comparison: its chosen solution,
// reason, horizons, rows (without their solutions and predictions) and notes.
func NewSavedFit(c *Comparison) *SavedFit {
	f := &SavedFit{Solution: c.Solution, Reason: c.Reason, HorizonDays: c.HorizonDays,
		HorizonBeforeDays: c.HorizonBeforeDays, HorizonAfterDays: c.HorizonAfterDays,
		HorizonRule: c.HorizonRule, Notes: append([]string{}, c.Notes...), Orbit: c.Orbit}
	for _, r := range c.Rows {
		f.Rows = append(f.Rows, ModelRow{Model: r.Model, Spec: r.Spec, NumParams: r.NumParams,
			RMSArcsec: r.RMSArcsec, Chi2DoF: r.Chi2DoF, BIC: r.BIC, CVErrorArcsec: r.CVErrorArcsec,
			CVSEArcsec: r.CVSEArcsec, CVNormRMS: r.CVNormRMS, Err: r.Err, Chosen: r.Chosen})
	}
	return f
}

// Predict returns the solution's prediction at the UTC instant utc for the
// site (nil: the geocentre), with HorizonDays and BeyondHorizon set by the
// saved horizons exactly as Compare sets them: the horizon on the side of
// the arc where utc lies (the smaller one inside the arc), and beyond it when
// utc lies farther than that from the arc's nearer end.
func (f *SavedFit) Predict(utc astro.JD, site *astro.Site) (Prediction, error) {
	if f.Orbit != nil {
		return f.Orbit.Predict(utc, site)
	}
	p, err := f.Solution.Predict(utc, site)
	if err != nil {
		return p, err
	}
	tr := f.Solution.Track
	first, last := tr.ArcTT()
	markHorizon(&p, tr, first, last, horizonResult{days: f.HorizonDays,
		before: f.HorizonBeforeDays, after: f.HorizonAfterDays, rule: f.HorizonRule})
	return p, nil
}

// Position returns the astrometric ICRS place of the fit at the UTC instant
// utc for the site (nil: the geocentre), without the search region: for an
// orbit the fitted orbit's place ([OrbitFit.PredictLinear]; where
// Predict's region is sampled its centre may differ from it by a fraction
// of the region), for a sky-plane model the model's place, which is
// Predict's. It makes a fit file a cheap plan.Positioner: a night's
// altitudes, sampled every few minutes over many nights, need the place and
// not the region.
func (f *SavedFit) Position(utc astro.JD, site *astro.Site) (ra, dec astro.Angle, err error) {
	var p Prediction
	if f.Orbit != nil {
		p, err = f.Orbit.PredictLinear(utc, site)
	} else {
		p, err = f.Solution.Predict(utc, site)
	}
	if err != nil {
		return 0, 0, err
	}
	return p.RA, p.Dec, nil
}

// SaveFile writes the comparison's chosen solution, its reason, horizon and
// comparison rows to the fit file path (schema FitFileSchema, JSON) — see
// SaveFitFile.
func SaveFile(path string, c *Comparison) error {
	if c == nil || c.Solution == nil {
		return errors.New("fit: SaveFile: no solution to save")
	}
	return SaveFitFile(path, NewSavedFit(c))
}

// SaveFitFile writes f to the fit file path, atomically: the JSON goes to a
// temporary file in path's directory, is synced, and is renamed over path
// only when complete, so that path holds either its old content or the whole
// new file, never a part; on any error the temporary file is removed. The file
// holds the model, parameters and covariance, the tangent plane, the epoch
// (TT, two parts), the time scale, the settings, the inverse distance,
// χ²/dof, the source file's name and SHA-256, the sites used, the horizon,
// the track's points and the residuals.
func SaveFitFile(path string, f *SavedFit) error {
	data, err := MarshalFitFile(f)
	if err != nil {
		return err
	}
	return writeFileAtomically(path, data)
}

// LoadFile reads the fit file path and returns its solution; see
// ReadFitFile.
func LoadFile(path string) (*Solution, error) {
	f, err := ReadFitFile(path)
	if err != nil {
		return nil, err
	}
	return f.Solution, nil
}

// ReadFitFile reads the fit file path. Every problem with its content is an
// *obs.ParseError naming the file, line and column and the field (wrapping
// ErrFitFile or ErrFitSchema): not JSON, cut short, an unknown schema, a
// field of the wrong type or an unknown one, a value out of range, a
// covariance that is not square, symmetric and finite, a parameter count that
// does not match the model.
func ReadFitFile(path string) (*SavedFit, error) {
	fh, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer fh.Close()
	data, err := io.ReadAll(io.LimitReader(fh, MaxFitFileBytes+1))
	if err != nil {
		return nil, err
	}
	if len(data) > MaxFitFileBytes {
		return nil, &obs.ParseError{File: path, Want: fmt.Sprintf("a fit file of at most %d MiB", MaxFitFileBytes>>20), Err: ErrFitFile}
	}
	return ParseFitFile(data, path)
}

// IsFitFile reports whether data look like an arcfit fit file of any schema
// version: a JSON object (after blanks and a byte order mark) whose "schema"
// key holds a string starting "arcfit-fit/". It reads only as far as that
// key, so a fit file cut short after it still counts (and ParseFitFile then
// says what is wrong); observation files (CSV, ADES PSV) never do.
func IsFitFile(data []byte) bool {
	data = bytes.TrimPrefix(data, []byte("\ufeff"))
	dec := json.NewDecoder(bytes.NewReader(data))
	if t, err := dec.Token(); err != nil || t != json.Delim('{') {
		return false
	}
	for dec.More() {
		k, err := dec.Token()
		if err != nil {
			return false
		}
		if k == "schema" {
			v, err := dec.Token()
			s, ok := v.(string)
			return err == nil && ok && strings.HasPrefix(s, fitFileSchemaPrefix)
		}
		var skip json.RawMessage
		if err := dec.Decode(&skip); err != nil {
			return false
		}
	}
	return false
}

// fitFile is the JSON form of a fit file. Values that may be unknown (NaN)
// are pointers, written as null.
type fitFile struct {
	Schema        string        `json:"schema"`
	About         string        `json:"about"`
	Source        sourceJSON    `json:"source"`
	Model         modelJSON     `json:"model"`
	Reason        string        `json:"reason"`
	Settings      settingsJSON  `json:"settings"`
	Plane         planeJSON     `json:"plane"`
	EpochTT       jdJSON        `json:"epoch_tt"`
	TimeScaleDays float64       `json:"time_scale_days"`
	NumNights     int           `json:"n_nights"`
	ParamNames    []string      `json:"param_names"`
	Params        []float64     `json:"params"`
	Covariance    [][]float64   `json:"covariance"`
	Chi2          float64       `json:"chi2"`
	DoF           int           `json:"dof"`
	Chi2DoF       *float64      `json:"chi2_dof"`
	Scaled        bool          `json:"scaled"`
	ModelError    float64       `json:"model_error_arcsec"`
	Cond          *float64      `json:"cond"`
	NumObs        int           `json:"n_obs"`
	NumUsed       int           `json:"n_used"`
	RMSArcsec     *float64      `json:"rms_arcsec"`
	InvDistance   *float64      `json:"inverse_distance_per_au"`
	InvDistSigma  *float64      `json:"inverse_distance_sigma_per_au"`
	HorizonDays   *float64      `json:"horizon_days"`
	HorizonBefore *float64      `json:"horizon_before_days"`
	HorizonAfter  *float64      `json:"horizon_after_days"`
	HorizonRule   string        `json:"horizon_rule"`
	Notes         []string      `json:"notes"`
	ModelNotes    []string      `json:"comparison_notes"`
	Warnings      []string      `json:"warnings"`
	Sites         []siteJSON    `json:"sites"`
	Models        []rowJSON     `json:"models"`
	Points        []pointJSON   `json:"points"`
	Residuals     []residualRec `json:"residuals"`
	Orbit         *orbitJSON    `json:"orbit,omitempty"`
}

type sourceJSON struct {
	File   string `json:"file"`
	SHA256 string `json:"sha256"`
}

type modelJSON struct {
	Name      string    `json:"name"`
	Degree    int       `json:"degree"`
	KnotsDays []float64 `json:"knots_days"`
}

type settingsJSON struct {
	Parallax    string   `json:"parallax"` // "fit", "fixed" or "off"
	InvDistance *float64 `json:"inverse_distance_per_au"`
	KeepAll     bool     `json:"keep_all"`
	RejectChi2  float64  `json:"reject_chi2"`
}

type planeJSON struct {
	RA0Deg  float64 `json:"ra0_deg"`
	Dec0Deg float64 `json:"dec0_deg"`
	RA0Rad  float64 `json:"ra0_rad"`
	Dec0Rad float64 `json:"dec0_rad"`
}

// jdJSON is a two-part Julian date; ISO is the same instant as text, for
// people (it is not read back).
type jdJSON struct {
	Day  float64 `json:"day"`
	Frac float64 `json:"frac"`
	ISO  string  `json:"iso"`
}

type siteJSON struct {
	Name    string  `json:"name"`
	LatDeg  float64 `json:"lat_deg"`
	LonDeg  float64 `json:"lon_deg"`
	HeightM float64 `json:"height_m"`
	LatRad  float64 `json:"lat_rad"`
	LonRad  float64 `json:"lon_rad"`
}

type rowJSON struct {
	Model         string   `json:"model"`
	NumParams     int      `json:"n_params"`
	RMSArcsec     *float64 `json:"rms_arcsec"`
	Chi2DoF       *float64 `json:"chi2_dof"`
	BIC           *float64 `json:"bic"`
	CVErrorArcsec *float64 `json:"cv_error_arcsec"`
	CVSEArcsec    *float64 `json:"cv_se_arcsec"`
	Err           string   `json:"error"`
	Chosen        bool     `json:"chosen"`
}

type pointJSON struct {
	ObsIndex int     `json:"obs_index"`
	Line     int     `json:"line"`
	UTC      jdJSON  `json:"utc"`
	TDays    float64 `json:"t_days"`
	Xi       float64 `json:"xi"`
	Eta      float64 `json:"eta"`
	SigmaXi  float64 `json:"sigma_xi"`
	SigmaEta float64 `json:"sigma_eta"`
	Corr     float64 `json:"corr"`
	SiteXi   float64 `json:"site_xi_au"`
	SiteEta  float64 `json:"site_eta_au"`
	Site     string  `json:"site"`
	Night    int     `json:"night"`
	Used     bool    `json:"used"`
}

type residualRec struct {
	ObsIndex   int     `json:"obs_index"`
	Line       int     `json:"line"`
	UTC        jdJSON  `json:"utc"`
	DRAArcsec  float64 `json:"dra_arcsec"`
	DDecArcsec float64 `json:"ddec_arcsec"`
	Chi2       float64 `json:"chi2"`
	Flagged    bool    `json:"flagged"`
	Used       bool    `json:"used"`
}

// optional returns a pointer to v, or nil when v is NaN or infinite.
func optional(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

// valueOr returns *p, or NaN when p is nil.
func valueOr(p *float64) float64 {
	if p == nil {
		return math.NaN()
	}
	return *p
}

func toJD(j astro.JD) jdJSON {
	return jdJSON{Day: j.Day, Frac: j.Frac, ISO: astro.FormatISO8601(j, 3)}
}

// parallaxNames are the settings.parallax words of the fit file.
var parallaxNames = map[ParallaxMode]string{ParallaxFit: "fit", ParallaxFixed: "fixed", ParallaxOff: "off"}

// ParamNames returns the names of the parameters of model m in the order of
// the parameter vector, as the fit file lists them: for each coordinate
// ("xi", then "eta") the polynomial coefficients in scaled time ("xi_c0",
// "xi_c1", …) and for a piecewise model the hinge slopes ("xi_hinge1", …),
// then "u_per_au" (the inverse distance) when withU.
func ParamNames(m Model, withU bool) []string {
	per := m.NumMotionParams() / 2
	nc := per
	if m.Kind == KindPiecewise {
		nc = per - len(m.Knots)
	}
	var names []string
	for _, c := range []string{"xi", "eta"} {
		for i := 0; i < per; i++ {
			if i < nc {
				names = append(names, fmt.Sprintf("%s_c%d", c, i))
			} else {
				names = append(names, fmt.Sprintf("%s_hinge%d", c, i-nc+1))
			}
		}
	}
	if withU {
		names = append(names, "u_per_au")
	}
	return names
}

// MarshalFitFile returns the fit file of f as indented JSON (schema
// FitFileSchema). Non-finite parameters or covariance elements are an error:
// they cannot be written as JSON and would not predict.
func MarshalFitFile(f *SavedFit) ([]byte, error) {
	if f == nil || f.Solution == nil || f.Solution.Track == nil {
		return nil, errors.New("fit: no solution to save")
	}
	s := f.Solution
	tr := s.Track
	mode, ok := parallaxNames[s.Settings.Parallax]
	if !ok {
		return nil, fmt.Errorf("fit: unknown parallax mode %d", s.Settings.Parallax)
	}
	n := len(s.Params)
	if s.Cov == nil || s.Cov.SymmetricDim() != n {
		return nil, fmt.Errorf("fit: covariance does not match the %d parameters", n)
	}
	withU := n == s.Model.NumMotionParams()+1
	ff := fitFile{
		Schema:        FitFileSchema,
		About:         "arcfit fit file: a sky-plane motion model fitted to the observations in source.file; read by arcfit predict and arcfit night",
		Source:        sourceJSON{File: tr.Source, SHA256: tr.SourceSHA256},
		Model:         modelJSON{Name: s.Model.Name(), Degree: s.Model.Degree, KnotsDays: append([]float64{}, s.Model.Knots...)},
		Reason:        f.Reason,
		Settings:      settingsJSON{Parallax: mode, KeepAll: s.Settings.KeepAll, RejectChi2: s.Settings.RejectChi2},
		Plane:         planeJSON{RA0Deg: tr.Plane.RA0.Degrees(), Dec0Deg: tr.Plane.Dec0.Degrees(), RA0Rad: float64(tr.Plane.RA0), Dec0Rad: float64(tr.Plane.Dec0)},
		EpochTT:       toJD(tr.EpochTT),
		TimeScaleDays: tr.TimeScaleDays,
		NumNights:     tr.NumNights,
		ParamNames:    ParamNames(s.Model, withU),
		Params:        append([]float64{}, s.Params...),
		Chi2:          s.Chi2,
		DoF:           s.DoF,
		Chi2DoF:       optional(s.Chi2DoF),
		Scaled:        s.Scaled,
		ModelError:    s.ModelErrorArcsec,
		Cond:          optional(s.Cond),
		NumObs:        len(tr.Points),
		NumUsed:       s.NumUsed,
		RMSArcsec:     optional(s.RMSArcsec),
		InvDistance:   optional(s.InvDistance),
		InvDistSigma:  optional(s.InvDistanceSigma),
		HorizonDays:   optional(f.HorizonDays),
		HorizonBefore: optional(f.HorizonBeforeDays),
		HorizonAfter:  optional(f.HorizonAfterDays),
		HorizonRule:   f.HorizonRule,
		ModelNotes:    append([]string{}, f.Notes...),
		Notes:         append([]string{}, s.Notes...),
		Warnings:      append([]string{}, tr.Warnings...),
		Sites:         []siteJSON{},
		Models:        []rowJSON{},
		Points:        make([]pointJSON, 0, len(tr.Points)),
		Residuals:     make([]residualRec, 0, len(s.Residuals)),
	}
	if s.Settings.Parallax == ParallaxFixed {
		ff.Settings.InvDistance = optional(s.Settings.InvDistance)
	}
	if f.Orbit != nil {
		o, err := marshalOrbit(f.Orbit)
		if err != nil {
			return nil, err
		}
		ff.Orbit = o
		ff.About = orbitAbout(f.Orbit)
	}
	if math.IsNaN(s.Chi2) || math.IsInf(s.Chi2, 0) {
		return nil, errors.New("fit: χ² is not finite")
	}
	for _, p := range s.Params {
		if math.IsNaN(p) || math.IsInf(p, 0) {
			return nil, errors.New("fit: a parameter is not finite")
		}
	}
	ff.Covariance = make([][]float64, n)
	for i := range n {
		ff.Covariance[i] = make([]float64, n)
		for j := range n {
			v := s.Cov.At(i, j)
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, errors.New("fit: a covariance element is not finite")
			}
			ff.Covariance[i][j] = v
		}
	}
	for _, name := range sortedSiteNames(tr.Sites) {
		st := tr.Sites[name]
		ff.Sites = append(ff.Sites, siteJSON{Name: name, LatDeg: st.Lat.Degrees(), LonDeg: st.Lon.Degrees(),
			HeightM: st.HeightM, LatRad: float64(st.Lat), LonRad: float64(st.Lon)})
	}
	for _, r := range f.Rows {
		ff.Models = append(ff.Models, rowJSON{Model: r.Model, NumParams: r.NumParams, RMSArcsec: optional(r.RMSArcsec),
			Chi2DoF: optional(r.Chi2DoF), BIC: optional(r.BIC), CVErrorArcsec: optional(r.CVErrorArcsec), CVSEArcsec: optional(r.CVSEArcsec), Err: r.Err, Chosen: r.Chosen})
	}
	for _, p := range tr.Points {
		ff.Points = append(ff.Points, pointJSON{ObsIndex: p.ObsIndex, Line: p.Line, UTC: toJD(p.UTC), TDays: p.T,
			Xi: p.Xi, Eta: p.Eta, SigmaXi: p.SigmaXi, SigmaEta: p.SigmaEta, Corr: p.Corr,
			SiteXi: p.SiteXi, SiteEta: p.SiteEta, Site: p.Site, Night: p.Night, Used: p.Used})
	}
	for _, r := range s.Residuals {
		ff.Residuals = append(ff.Residuals, residualRec{ObsIndex: r.ObsIndex, Line: r.Line, UTC: toJD(r.UTC),
			DRAArcsec: r.DRAArcsec, DDecArcsec: r.DDecArcsec, Chi2: r.Chi2, Flagged: r.Flagged, Used: r.Used})
	}
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetIndent("", "  ")
	if err := enc.Encode(ff); err != nil {
		return nil, fmt.Errorf("fit: encoding the fit file: %v", err)
	}
	return buf.Bytes(), nil
}

func sortedSiteNames(m map[string]astro.Site) []string {
	names := make([]string, 0, len(m))
	for k := range m {
		names = append(names, k)
	}
	for i := 1; i < len(names); i++ { // insertion sort: a handful of sites
		for j := i; j > 0 && names[j] < names[j-1]; j-- {
			names[j], names[j-1] = names[j-1], names[j]
		}
	}
	return names
}

// writeFileAtomically writes data to path through a temporary file in the
// same directory, synced and then renamed over path; on error the temporary
// file is removed and path is untouched.
func writeFileAtomically(path string, data []byte) (err error) {
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		return fmt.Errorf("fit: writing %s: %w", path, err)
	}
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(tmp.Name())
			err = fmt.Errorf("fit: writing %s: %w", path, err)
		}
	}()
	if _, err = tmp.Write(data); err != nil {
		return err
	}
	if err = tmp.Sync(); err != nil {
		return err
	}
	if err = tmp.Close(); err != nil {
		return err
	}
	if err = os.Chmod(tmp.Name(), 0o644); err != nil {
		return err
	}
	return os.Rename(tmp.Name(), path)
}

// fitFileReader checks a decoded fit file and reports problems at the
// position of the offending value.
type fitFileReader struct {
	name string
	data []byte // the file's bytes, byte order mark removed
	bom  bool
}

// fail returns the *obs.ParseError for the value at the JSON path field
// ("model.name", "points[3].xi"): its line and column are those of the value
// when the path can be found in the file, else of the file's start.
func (r *fitFileReader) fail(field, want, got string, sentinel error) error {
	line, col := 0, 0
	if off, ok := findPath(r.data, field); ok {
		line, col = r.lineCol(off)
	}
	return &obs.ParseError{File: r.name, Line: line, Column: col, Field: field, Want: want, Got: got, Err: sentinel}
}

// lineCol turns a byte offset of r.data into a 1-based line and a 1-based
// column in characters.
func (r *fitFileReader) lineCol(off int64) (line, col int) {
	if off < 0 {
		off = 0
	}
	if off > int64(len(r.data)) {
		off = int64(len(r.data))
	}
	before := r.data[:off]
	line = 1 + bytes.Count(before, []byte("\n"))
	start := bytes.LastIndexByte(before, '\n') + 1
	col = 1 + utf8.RuneCount(before[start:])
	return line, col
}

// ParseFitFile reads a fit file's bytes; name is the file's name for
// messages. See ReadFitFile for the errors. User data never make it panic.
func ParseFitFile(data []byte, name string) (*SavedFit, error) {
	r := &fitFileReader{name: name, data: data}
	if b := bytes.TrimPrefix(data, []byte("\ufeff")); len(b) != len(data) {
		r.data, r.bom = b, true
	}
	if !IsFitFile(r.data) {
		if s, ok := schemaValue(r.data); ok {
			return nil, r.fail("schema", "schema "+strconv.Quote(FitFileSchema), s, ErrFitSchema)
		}
		if len(bytes.TrimSpace(r.data)) == 0 {
			return nil, &obs.ParseError{File: name, Line: 1, Column: 1, Want: "an arcfit fit file (JSON with \"schema\": \"" + FitFileSchema + "\")", Got: "an empty file", Err: ErrFitFile}
		}
	}
	var ff fitFile
	dec := json.NewDecoder(bytes.NewReader(r.data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&ff); err != nil {
		return nil, r.jsonError(err, dec)
	}
	if _, err := dec.Token(); err != io.EOF {
		line, col := r.lineCol(dec.InputOffset())
		return nil, &obs.ParseError{File: name, Line: line, Column: col, Want: "the end of the file after the fit object", Err: ErrFitFile}
	}
	if ff.Schema == fitFileSchemaV1 && ff.Orbit != nil {
		return nil, r.fail("orbit", "no orbit in a file of schema "+strconv.Quote(fitFileSchemaV1), "an orbit", ErrFitFile)
	}
	if ff.Schema != FitFileSchema && ff.Schema != fitFileSchemaV1 {
		if strings.HasPrefix(ff.Schema, fitFileSchemaPrefix) {
			return nil, r.fail("schema", "schema "+strconv.Quote(FitFileSchema)+" (a newer or older arcfit wrote this file)", ff.Schema, ErrFitSchema)
		}
		return nil, r.fail("schema", "an arcfit fit file (\"schema\": \""+FitFileSchema+"\")", ff.Schema, ErrFitSchema)
	}
	return r.build(&ff)
}

// schemaValue returns the string value of a top-level "schema" key.
func schemaValue(data []byte) (string, bool) {
	dec := json.NewDecoder(bytes.NewReader(data))
	if t, err := dec.Token(); err != nil || t != json.Delim('{') {
		return "", false
	}
	for dec.More() {
		k, err := dec.Token()
		if err != nil {
			return "", false
		}
		var v json.RawMessage
		if err := dec.Decode(&v); err != nil {
			return "", false
		}
		if k == "schema" {
			var s string
			if json.Unmarshal(v, &s) != nil {
				return string(v), true
			}
			return s, true
		}
	}
	return "", false
}

// jsonError turns an error of encoding/json into a positioned ParseError.
func (r *fitFileReader) jsonError(err error, dec *json.Decoder) error {
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	switch {
	case errors.As(err, &se):
		line, col := r.lineCol(se.Offset)
		return &obs.ParseError{File: r.name, Line: line, Column: col, Want: "JSON (" + se.Error() + ")", Err: ErrFitFile}
	case errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, io.EOF):
		line, col := r.lineCol(int64(len(r.data)))
		return &obs.ParseError{File: r.name, Line: line, Column: col, Want: "the rest of the fit file", Got: "the end of the file", Hint: "the file is cut short", Err: ErrFitFile}
	case errors.As(err, &te):
		line, col := r.lineCol(te.Offset)
		return &obs.ParseError{File: r.name, Line: line, Column: col, Field: te.Field, Want: jsonKind(te.Type), Got: "a JSON " + te.Value, Err: ErrFitFile}
	}
	if msg := err.Error(); strings.HasPrefix(msg, "json: unknown field ") {
		key, _ := strconv.Unquote(strings.TrimPrefix(msg, "json: unknown field "))
		line, col := 0, 0
		if i := bytes.Index(r.data, []byte(strconv.Quote(key))); i >= 0 {
			line, col = r.lineCol(int64(i))
		}
		return &obs.ParseError{File: r.name, Line: line, Column: col, Field: key, Want: "a field of schema " + FitFileSchema, Got: "an unknown field", Err: ErrFitFile}
	}
	line, col := r.lineCol(dec.InputOffset())
	return &obs.ParseError{File: r.name, Line: line, Column: col, Want: "a fit file (" + err.Error() + ")", Err: ErrFitFile}
}

// jsonKind says in words what JSON value a Go type takes.
func jsonKind(t reflect.Type) string {
	switch t.Kind() {
	case reflect.Float64, reflect.Float32:
		return "a number"
	case reflect.Int, reflect.Int64, reflect.Int32:
		return "an integer"
	case reflect.String:
		return "a string"
	case reflect.Bool:
		return "true or false"
	case reflect.Slice, reflect.Array:
		return "an array"
	case reflect.Struct, reflect.Map:
		return "an object"
	case reflect.Pointer:
		return jsonKind(t.Elem()) + " or null"
	}
	return "a value of type " + t.String()
}

// Ranges the reader accepts. Julian dates: 1800–2200, the span the time
// scales support (design.md), from 1800 January 1 0h to the end of 2200 (2201
// January 1 0h), the span the observation reader (astro/obs) and the
// ephemerides (ephem.TableLastJD) take, so that a fit of any observations
// that read is saved and read back.
const (
	fitFileMinJD = 2378496.5 // 1800-01-01 0h
	fitFileMaxJD = 2524958.5 // 2201-01-01 0h
)

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// jdFrom checks a two-part date and returns it on scale sc.
func (r *fitFileReader) jdFrom(j jdJSON, field string, sc astro.Scale) (astro.JD, error) {
	if !finite(j.Day) || !finite(j.Frac) || j.Day+j.Frac < fitFileMinJD || j.Day+j.Frac > fitFileMaxJD {
		return astro.JD{}, r.fail(field, "a two-part Julian date between 1800 and 2200", strconv.FormatFloat(j.Day, 'f', -1, 64)+" + "+strconv.FormatFloat(j.Frac, 'f', -1, 64), ErrFitFile)
	}
	return astro.JD{Day: j.Day, Frac: j.Frac, Scale: sc}, nil
}

// build checks the decoded file and makes the SavedFit.
func (r *fitFileReader) build(ff *fitFile) (*SavedFit, error) {
	num := func(field string, v float64) error {
		if !finite(v) {
			return r.fail(field, "a finite number", fmt.Sprint(v), ErrFitFile)
		}
		return nil
	}

	// The model.
	var m Model
	switch ff.Model.Name {
	case "poly1", "poly2", "poly3":
		d := int(ff.Model.Name[4] - '0')
		if ff.Model.Degree != d {
			return nil, r.fail("model.degree", fmt.Sprintf("%d for %s", d, ff.Model.Name), strconv.Itoa(ff.Model.Degree), ErrFitFile)
		}
		if len(ff.Model.KnotsDays) != 0 {
			return nil, r.fail("model.knots_days", "no knots for "+ff.Model.Name, fmt.Sprint(len(ff.Model.KnotsDays)), ErrFitFile)
		}
		m = Poly(d)
	case "piecewise":
		if ff.Model.Degree != 1 {
			return nil, r.fail("model.degree", "1 for piecewise", strconv.Itoa(ff.Model.Degree), ErrFitFile)
		}
		for i, k := range ff.Model.KnotsDays {
			f := fmt.Sprintf("model.knots_days[%d]", i)
			if err := num(f, k); err != nil {
				return nil, err
			}
			if i > 0 && k <= ff.Model.KnotsDays[i-1] {
				return nil, r.fail(f, "knots in increasing order", fmt.Sprint(k), ErrFitFile)
			}
		}
		m = Piecewise(append([]float64{}, ff.Model.KnotsDays...))
	default:
		return nil, r.fail("model.name", "poly1, poly2, poly3 or piecewise", ff.Model.Name, ErrFitFile)
	}
	if err := m.validate(); err != nil {
		return nil, r.fail("model", "a model that can be fitted", err.Error(), ErrFitFile)
	}

	// The settings.
	var st Settings
	switch ff.Settings.Parallax {
	case "fit":
		st.Parallax = ParallaxFit
	case "fixed":
		st.Parallax = ParallaxFixed
		if ff.Settings.InvDistance == nil || !finite(*ff.Settings.InvDistance) || *ff.Settings.InvDistance < 0 {
			return nil, r.fail("settings.inverse_distance_per_au", "the fixed inverse distance, a number ≥ 0 (au⁻¹)", "", ErrFitFile)
		}
		st.InvDistance = *ff.Settings.InvDistance
	case "off":
		st.Parallax = ParallaxOff
	default:
		return nil, r.fail("settings.parallax", "fit, fixed or off", ff.Settings.Parallax, ErrFitFile)
	}
	if st.Parallax != ParallaxFixed && ff.Settings.InvDistance != nil {
		return nil, r.fail("settings.inverse_distance_per_au", "null unless settings.parallax is fixed", fmt.Sprint(*ff.Settings.InvDistance), ErrFitFile)
	}
	st.KeepAll = ff.Settings.KeepAll
	if !finite(ff.Settings.RejectChi2) || ff.Settings.RejectChi2 < 0 {
		return nil, r.fail("settings.reject_chi2", "a number ≥ 0", fmt.Sprint(ff.Settings.RejectChi2), ErrFitFile)
	}
	st.RejectChi2 = ff.Settings.RejectChi2

	// The plane, epoch and time scale.
	pl := ff.Plane
	if !finite(pl.RA0Rad) || pl.RA0Rad < 0 || pl.RA0Rad >= 2*math.Pi {
		return nil, r.fail("plane.ra0_rad", "radians in [0, 2π)", fmt.Sprint(pl.RA0Rad), ErrFitFile)
	}
	if !finite(pl.Dec0Rad) || math.Abs(pl.Dec0Rad) > math.Pi/2 {
		return nil, r.fail("plane.dec0_rad", "radians within ±π/2", fmt.Sprint(pl.Dec0Rad), ErrFitFile)
	}
	// The degrees are for people; they must agree with the radians (1e-9°,
	// far above the rounding of the conversion).
	if !finite(pl.RA0Deg) || math.Abs(pl.RA0Deg-astro.Angle(pl.RA0Rad).Degrees()) > 1e-9 {
		return nil, r.fail("plane.ra0_deg", fmt.Sprintf("%.12g, the degrees of ra0_rad", astro.Angle(pl.RA0Rad).Degrees()), fmt.Sprint(pl.RA0Deg), ErrFitFile)
	}
	if !finite(pl.Dec0Deg) || math.Abs(pl.Dec0Deg-astro.Angle(pl.Dec0Rad).Degrees()) > 1e-9 {
		return nil, r.fail("plane.dec0_deg", fmt.Sprintf("%.12g, the degrees of dec0_rad", astro.Angle(pl.Dec0Rad).Degrees()), fmt.Sprint(pl.Dec0Deg), ErrFitFile)
	}
	epoch, err := r.jdFrom(ff.EpochTT, "epoch_tt", astro.TT)
	if err != nil {
		return nil, err
	}
	if !finite(ff.TimeScaleDays) || ff.TimeScaleDays <= 0 || ff.TimeScaleDays > 1e5 {
		return nil, r.fail("time_scale_days", "a positive number of days", fmt.Sprint(ff.TimeScaleDays), ErrFitFile)
	}

	// The sites.
	sites := make(map[string]astro.Site, len(ff.Sites))
	for i, s := range ff.Sites {
		f := fmt.Sprintf("sites[%d]", i)
		switch {
		case s.Name == "":
			return nil, r.fail(f+".name", "a site name", "", ErrFitFile)
		case sites[s.Name] != (astro.Site{}):
			return nil, r.fail(f+".name", "each site once", s.Name, ErrFitFile)
		case !finite(s.LatRad) || math.Abs(s.LatRad) > math.Pi/2:
			return nil, r.fail(f+".lat_rad", "radians within ±π/2", fmt.Sprint(s.LatRad), ErrFitFile)
		case !finite(s.LonRad) || s.LonRad <= -math.Pi || s.LonRad > math.Pi:
			return nil, r.fail(f+".lon_rad", "radians in (−π, π]", fmt.Sprint(s.LonRad), ErrFitFile)
		case !finite(s.HeightM) || s.HeightM < -1000 || s.HeightM > 20000:
			return nil, r.fail(f+".height_m", "metres between −1000 and 20000", fmt.Sprint(s.HeightM), ErrFitFile)
		case !finite(s.LatDeg) || math.Abs(s.LatDeg-astro.Angle(s.LatRad).Degrees()) > 1e-9:
			return nil, r.fail(f+".lat_deg", "the degrees of lat_rad", fmt.Sprint(s.LatDeg), ErrFitFile)
		case !finite(s.LonDeg) || math.Abs(s.LonDeg-astro.Angle(s.LonRad).Degrees()) > 1e-9:
			return nil, r.fail(f+".lon_deg", "the degrees of lon_rad", fmt.Sprint(s.LonDeg), ErrFitFile)
		}
		sites[s.Name] = astro.Site{Name: s.Name, Lat: astro.Angle(s.LatRad), Lon: astro.Angle(s.LonRad), HeightM: s.HeightM}
	}

	// The points of the track.
	tr := &Track{
		Plane:         astro.TangentPlane{RA0: astro.Angle(pl.RA0Rad), Dec0: astro.Angle(pl.Dec0Rad)},
		EpochTT:       epoch,
		TimeScaleDays: ff.TimeScaleDays,
		NumNights:     ff.NumNights,
		Sites:         sites,
		Source:        ff.Source.File,
		SourceSHA256:  ff.Source.SHA256,
		Warnings:      ff.Warnings,
		Points:        make([]Point, 0, len(ff.Points)),
	}
	if ff.Source.SHA256 != "" && !isHexSHA256(ff.Source.SHA256) {
		return nil, r.fail("source.sha256", "64 hexadecimal digits", ff.Source.SHA256, ErrFitFile)
	}
	if ff.NumNights < 0 {
		return nil, r.fail("n_nights", "a count ≥ 0", strconv.Itoa(ff.NumNights), ErrFitFile)
	}
	used := 0
	for i, p := range ff.Points {
		f := fmt.Sprintf("points[%d]", i)
		utc, err := r.jdFrom(p.UTC, f+".utc", astro.UTC)
		if err != nil {
			return nil, err
		}
		for _, v := range []struct {
			name string
			v    float64
		}{{"t_days", p.TDays}, {"xi", p.Xi}, {"eta", p.Eta}, {"site_xi_au", p.SiteXi}, {"site_eta_au", p.SiteEta}} {
			if err := num(f+"."+v.name, v.v); err != nil {
				return nil, err
			}
		}
		switch {
		case !finite(p.SigmaXi) || p.SigmaXi <= 0:
			return nil, r.fail(f+".sigma_xi", "a positive number (radians)", fmt.Sprint(p.SigmaXi), ErrFitFile)
		case !finite(p.SigmaEta) || p.SigmaEta <= 0:
			return nil, r.fail(f+".sigma_eta", "a positive number (radians)", fmt.Sprint(p.SigmaEta), ErrFitFile)
		case !(p.Corr > -1 && p.Corr < 1):
			return nil, r.fail(f+".corr", "a correlation in (−1, 1)", fmt.Sprint(p.Corr), ErrFitFile)
		case p.Site != "" && sites[p.Site] == (astro.Site{}):
			return nil, r.fail(f+".site", "a name listed in sites", p.Site, ErrFitFile)
		case p.Night < -1 || p.Night >= ff.NumNights || p.Used && p.Night < 0:
			return nil, r.fail(f+".night", fmt.Sprintf("a night index from 0 to n_nights − 1 (%d), or −1 for a point not in use", ff.NumNights-1), strconv.Itoa(p.Night), ErrFitFile)
		case p.Line < 0 || p.ObsIndex < 0:
			return nil, r.fail(f+".line", "a line number ≥ 0", strconv.Itoa(p.Line), ErrFitFile)
		}
		if p.Used {
			used++
		}
		tr.Points = append(tr.Points, Point{ObsIndex: p.ObsIndex, Line: p.Line, UTC: utc, T: p.TDays,
			Xi: p.Xi, Eta: p.Eta, SigmaXi: p.SigmaXi, SigmaEta: p.SigmaEta, Corr: p.Corr,
			SiteXi: p.SiteXi, SiteEta: p.SiteEta, Site: p.Site, Night: p.Night, Used: p.Used})
	}
	if ff.NumObs != len(ff.Points) {
		return nil, r.fail("n_obs", fmt.Sprintf("%d, the number of points", len(ff.Points)), strconv.Itoa(ff.NumObs), ErrFitFile)
	}
	if ff.NumUsed < 0 || ff.NumUsed > used {
		return nil, r.fail("n_used", fmt.Sprintf("a count from 0 to %d, the points in use", used), strconv.Itoa(ff.NumUsed), ErrFitFile)
	}

	// Parameters and covariance.
	nm := m.NumMotionParams()
	n := len(ff.Params)
	withU := n == nm+1
	switch {
	case n != nm && !withU:
		return nil, r.fail("params", fmt.Sprintf("%d or %d values for %s (with the inverse distance)", nm, nm+1, m.Name()), strconv.Itoa(n), ErrFitFile)
	case withU && st.Parallax != ParallaxFit:
		return nil, r.fail("params", fmt.Sprintf("%d values: the inverse distance is fitted only with settings.parallax fit", nm), strconv.Itoa(n), ErrFitFile)
	}
	if ff.ParamNames != nil {
		want := ParamNames(m, withU)
		if strings.Join(ff.ParamNames, ",") != strings.Join(want, ",") {
			return nil, r.fail("param_names", strings.Join(want, ", "), strings.Join(ff.ParamNames, ", "), ErrFitFile)
		}
	}
	for i, v := range ff.Params {
		if err := num(fmt.Sprintf("params[%d]", i), v); err != nil {
			return nil, err
		}
	}
	if len(ff.Covariance) != n {
		return nil, r.fail("covariance", fmt.Sprintf("%d rows, one per parameter", n), strconv.Itoa(len(ff.Covariance)), ErrFitFile)
	}
	cov := mat.NewSymDense(max(n, 1), nil)
	if n == 0 {
		return nil, r.fail("params", "the model's parameters", "none", ErrFitFile)
	}
	for i, row := range ff.Covariance {
		if len(row) != n {
			return nil, r.fail(fmt.Sprintf("covariance[%d]", i), fmt.Sprintf("%d values", n), strconv.Itoa(len(row)), ErrFitFile)
		}
		for j, v := range row {
			f := fmt.Sprintf("covariance[%d][%d]", i, j)
			if err := num(f, v); err != nil {
				return nil, err
			}
			if j < i && v != ff.Covariance[j][i] {
				return nil, r.fail(f, fmt.Sprintf("%v, equal to covariance[%d][%d] (the matrix is symmetric)", ff.Covariance[j][i], j, i), fmt.Sprint(v), ErrFitFile)
			}
			if i == j && v < 0 {
				return nil, r.fail(f, "a variance ≥ 0", fmt.Sprint(v), ErrFitFile)
			}
		}
	}
	for i := range n {
		for j := i; j < n; j++ {
			cov.SetSym(i, j, ff.Covariance[i][j])
		}
	}

	// Statistics.
	if !finite(ff.Chi2) || ff.Chi2 < 0 {
		return nil, r.fail("chi2", "a number ≥ 0", fmt.Sprint(ff.Chi2), ErrFitFile)
	}
	if ff.DoF < 0 {
		return nil, r.fail("dof", "a count ≥ 0", strconv.Itoa(ff.DoF), ErrFitFile)
	}
	for _, v := range []struct {
		name string
		p    *float64
	}{{"chi2_dof", ff.Chi2DoF}, {"cond", ff.Cond}, {"rms_arcsec", ff.RMSArcsec}, {"inverse_distance_sigma_per_au", ff.InvDistSigma}, {"horizon_days", ff.HorizonDays},
		{"horizon_before_days", ff.HorizonBefore}, {"horizon_after_days", ff.HorizonAfter}} {
		if v.p != nil && (!finite(*v.p) || *v.p < 0) {
			return nil, r.fail(v.name, "a number ≥ 0 or null", fmt.Sprint(*v.p), ErrFitFile)
		}
	}
	if ff.InvDistance != nil && !finite(*ff.InvDistance) {
		return nil, r.fail("inverse_distance_per_au", "a number or null", fmt.Sprint(*ff.InvDistance), ErrFitFile)
	}

	if !(ff.ModelError >= 0) || math.IsInf(ff.ModelError, 0) {
		return nil, r.fail("model_error_arcsec", "a number ≥ 0", fmt.Sprint(ff.ModelError), ErrFitFile)
	}
	sol := &Solution{
		Model:            m,
		Settings:         st,
		Track:            tr,
		Params:           append([]float64{}, ff.Params...),
		Cov:              cov,
		Chi2:             ff.Chi2,
		DoF:              ff.DoF,
		Chi2DoF:          valueOr(ff.Chi2DoF),
		Scaled:           ff.Scaled,
		ModelErrorArcsec: ff.ModelError,
		Cond:             valueOr(ff.Cond),
		NumUsed:          ff.NumUsed,
		RMSArcsec:        valueOr(ff.RMSArcsec),
		InvDistance:      valueOr(ff.InvDistance),
		InvDistanceSigma: valueOr(ff.InvDistSigma),
		Notes:            ff.Notes,
	}
	for i, rr := range ff.Residuals {
		f := fmt.Sprintf("residuals[%d]", i)
		utc, err := r.jdFrom(rr.UTC, f+".utc", astro.UTC)
		if err != nil {
			return nil, err
		}
		for _, v := range []struct {
			name string
			v    float64
		}{{"dra_arcsec", rr.DRAArcsec}, {"ddec_arcsec", rr.DDecArcsec}, {"chi2", rr.Chi2}} {
			if err := num(f+"."+v.name, v.v); err != nil {
				return nil, err
			}
		}
		sol.Residuals = append(sol.Residuals, Residual{ObsIndex: rr.ObsIndex, Line: rr.Line, UTC: utc,
			DRAArcsec: rr.DRAArcsec, DDecArcsec: rr.DDecArcsec, Chi2: rr.Chi2, Flagged: rr.Flagged, Used: rr.Used})
	}
	// The model must pass near its own used points: parameters far out of
	// range (a damaged file) would otherwise predict a finite but meaningless
	// place. 0.1 rad (5.7°) lies far above any residual and any diurnal
	// parallax (an Earth radius, 4.26e-5 au, seen from the Moon's 0.0026 au
	// is 0.017 rad).
	for i, p := range tr.Points {
		if !p.Used {
			continue
		}
		xi, eta := sol.geocentric(p.T)
		if d := math.Hypot(xi-p.Xi, eta-p.Eta); !(d <= 0.1) {
			return nil, r.fail("params", "parameters whose model passes within 0.1 rad of the used points",
				fmt.Sprintf("%.3g rad from points[%d]", d, i), ErrFitFile)
		}
	}
	out := &SavedFit{Solution: sol, Reason: ff.Reason, HorizonDays: valueOr(ff.HorizonDays),
		HorizonBeforeDays: valueOr(ff.HorizonBefore), HorizonAfterDays: valueOr(ff.HorizonAfter),
		HorizonRule: ff.HorizonRule, Notes: ff.ModelNotes}
	if ff.Orbit != nil {
		of, err := r.buildOrbit(ff.Orbit)
		if err != nil {
			return nil, err
		}
		out.Orbit = of
	}
	for _, row := range ff.Models {
		out.Rows = append(out.Rows, ModelRow{Model: row.Model, NumParams: row.NumParams, RMSArcsec: valueOr(row.RMSArcsec),
			Chi2DoF: valueOr(row.Chi2DoF), BIC: valueOr(row.BIC), CVErrorArcsec: valueOr(row.CVErrorArcsec), CVSEArcsec: valueOr(row.CVSEArcsec), CVNormRMS: math.NaN(), Err: row.Err, Chosen: row.Chosen})
	}
	return out, nil
}

func isHexSHA256(s string) bool {
	if len(s) != 64 {
		return false
	}
	for _, c := range s {
		if !('0' <= c && c <= '9' || 'a' <= c && c <= 'f' || 'A' <= c && c <= 'F') {
			return false
		}
	}
	return true
}

// findPath returns the byte offset of the value at the JSON path (keys
// joined by ".", array indices as "[i]") in data, walking the token stream.
func findPath(data []byte, path string) (int64, bool) {
	dec := json.NewDecoder(bytes.NewReader(data))
	var walk func(prefix string) (bool, error)
	var found int64
	// walk reads one value whose path is prefix; it reports whether the
	// wanted path was found at or below it.
	walk = func(prefix string) (bool, error) {
		start := dec.InputOffset()
		if prefix == path {
			found = start
			return true, nil
		}
		if prefix != "" && !strings.HasPrefix(path, prefix) {
			var skip json.RawMessage
			return false, dec.Decode(&skip)
		}
		t, err := dec.Token()
		if err != nil {
			return false, err
		}
		switch t {
		case json.Delim('{'):
			for dec.More() {
				k, err := dec.Token()
				if err != nil {
					return false, err
				}
				key, _ := k.(string)
				p := key
				if prefix != "" {
					p = prefix + "." + key
				}
				if ok, err := walk(p); ok || err != nil {
					return ok, err
				}
			}
			_, err = dec.Token()
			return false, err
		case json.Delim('['):
			for i := 0; dec.More(); i++ {
				if ok, err := walk(fmt.Sprintf("%s[%d]", prefix, i)); ok || err != nil {
					return ok, err
				}
			}
			_, err = dec.Token()
			return false, err
		}
		return false, nil
	}
	ok, _ := walk("")
	if !ok {
		return 0, false
	}
	// InputOffset is the end of the previous token: step over the blanks,
	// the ':' or ',' before the value.
	for found < int64(len(data)) && strings.IndexByte(" \t\r\n:,", data[found]) >= 0 {
		found++
	}
	return found, true
}
