package plan

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"unicode"
	"unicode/utf8"

	"arcfit/astro/obs"
)

// The targets file of `arcfit plan TARGETS` lists the targets of a night's
// schedule, one a line:
//
//	# the club's targets
//	obs      FILE          an observation file (CSV or ADES PSV), fitted as `fit` does
//	fit      FILE          a fit file saved by `fit --save`
//	elements FILE [NAME]   an element set of an orbital-elements CSV; NAME is
//	                       the rest of the line (not needed when FILE holds one set)
//
// The kind word is case-insensitive; words are separated by blanks (spaces or
// tabs); a FILE or NAME that holds blanks is written in double quotes
// ("my obs.csv"); a path is relative to the directory of the targets file
// unless it is absolute. A line whose first non-blank character is '#' is a
// comment, and blank lines are skipped; a '#' later in a line is part of it
// (names may hold one). A byte order mark and CRLF line ends are fine.

// TargetKind says what a line of a targets file names.
type TargetKind int

// The kinds of target a targets file lists.
const (
	// TargetObs is an observation file, to be fitted.
	TargetObs TargetKind = iota + 1
	// TargetFit is a fit file saved by fit --save.
	TargetFit
	// TargetElements is an element set of an orbital-elements CSV.
	TargetElements
)

var targetKindWords = [...]string{TargetObs: "obs", TargetFit: "fit", TargetElements: "elements"}

// String returns the kind's word in a targets file: "obs", "fit" or
// "elements" ("TargetKind(n)" for a value that names none).
func (k TargetKind) String() string {
	if k > 0 && int(k) < len(targetKindWords) {
		return targetKindWords[k]
	}
	return fmt.Sprintf("TargetKind(%d)", int(k))
}

// TargetLine is one target of a targets file.
type TargetLine struct {
	// Source is the targets file's name as given; Line the 1-based line and
	// FileColumn the 1-based column (in characters) of the FILE word.
	Source           string
	Line, FileColumn int
	Kind             TargetKind
	// File is the file as written; Path is it joined to the targets file's
	// directory (unchanged when absolute).
	File, Path string
	// Name is the element set's name, "" for the only set of the file; ""
	// for the other kinds.
	Name string
}

// Where returns "FILE:LINE", the line's place for messages.
func (t TargetLine) Where() string { return fmt.Sprintf("%s:%d", t.Source, t.Line) }

// String returns the line's content in the targets file's syntax, such as
// `elements elements.csv Demo-1`.
func (t TargetLine) String() string {
	s := t.Kind.String() + " " + quoteWord(t.File)
	if t.Name != "" {
		s += " " + nameWord(t.Name)
	}
	return s
}

// nameWord writes an element set's name, the rest of its line: as
// quoteWord does, except that a name holding a '"' after its first character
// is written as it is, for it cannot be quoted (the format has no escape)
// and reads back unquoted (the only way such a name is read).
func nameWord(s string) string {
	if strings.Contains(s, `"`) && !strings.HasPrefix(s, `"`) {
		return s
	}
	return quoteWord(s)
}

// quoteWord quotes s when it holds blanks or starts with a quote.
func quoteWord(s string) string {
	if s == "" || strings.ContainsAny(s, " \t") || strings.HasPrefix(s, `"`) {
		return `"` + s + `"`
	}
	return s
}

// ErrNoTargets reports a targets file that lists no target.
var ErrNoTargets = errors.New("no targets listed")

// maxTargetsFileBytes bounds the targets file ReadTargets reads: 16 MiB, some
// hundred thousand lines, far more than a night holds.
const maxTargetsFileBytes = 16 << 20

// ReadTargetsFile reads the targets file at path with [ReadTargets]; the
// paths of its targets are relative to path's directory.
func ReadTargetsFile(path string) ([]TargetLine, []obs.Warning, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, nil, fmt.Errorf("plan: %w", err)
	}
	defer f.Close()
	return ReadTargets(f, path, filepath.Dir(path))
}

// ReadTargets reads a targets file (the format described above) from r; name
// is its name in messages and dir the directory its relative paths start
// from. The targets come back in file order. A target listed twice (the same
// kind, path and name) gets a warning and is kept both times.
//
// Errors are *obs.ParseError, one line, naming the file, the line and the
// column: an unknown kind word (ErrSyntax), a missing FILE or an extra word
// after the FILE of obs and fit (ErrFieldCount), an unclosed quote, a control
// character or invalid UTF-8 (ErrSyntax); a file listing no target wraps
// [ErrNoTargets]. Whether the files exist is not checked here: a missing file
// is the problem of its target alone.
func ReadTargets(r io.Reader, name, dir string) ([]TargetLine, []obs.Warning, error) {
	data, err := io.ReadAll(io.LimitReader(r, maxTargetsFileBytes+1))
	if err != nil {
		return nil, nil, fmt.Errorf("plan: reading %s: %w", name, err)
	}
	if len(data) > maxTargetsFileBytes {
		return nil, nil, &obs.ParseError{File: name, Want: fmt.Sprintf("a targets file of at most %d MiB", maxTargetsFileBytes>>20), Err: obs.ErrFormat}
	}
	text := strings.TrimPrefix(string(data), "\xef\xbb\xbf")
	var out []TargetLine
	var warns []obs.Warning
	seen := map[string]int{}
	for i, line := range strings.Split(text, "\n") {
		lineNo := i + 1
		line = strings.TrimSuffix(line, "\r")
		t, ok, err := parseTargetLine(line, name, lineNo, dir)
		if err != nil {
			return nil, nil, err
		}
		if !ok {
			continue
		}
		key := t.Kind.String() + "\x00" + filepath.Clean(t.Path) + "\x00" + strings.ToLower(strings.TrimSpace(t.Name))
		if first, dup := seen[key]; dup {
			warns = append(warns, obs.Warning{File: name, Line: lineNo, Msg: fmt.Sprintf("the same target as line %d; listed twice", first)})
		} else {
			seen[key] = lineNo
		}
		out = append(out, t)
	}
	if len(out) == 0 {
		return nil, nil, &obs.ParseError{File: name, Want: "at least one target line: obs FILE, fit FILE or elements FILE [NAME]", Err: ErrNoTargets}
	}
	return out, warns, nil
}

// targetWord is one word of a line: its text and byte offset.
type targetWord struct {
	s   string
	off int
}

// parseTargetLine reads one line; ok is false for a blank or comment line.
func parseTargetLine(line, file string, lineNo int, dir string) (TargetLine, bool, error) {
	col := func(off int) int { return utf8.RuneCountInString(line[:min(off, len(line))]) + 1 }
	fail := func(off int, field, want, got string, sentinel error) error {
		return &obs.ParseError{File: file, Line: lineNo, Column: col(off), Field: field, Want: want, Got: got, Err: sentinel}
	}
	if !utf8.ValidString(line) {
		off := 0
		for off < len(line) {
			r, n := utf8.DecodeRuneInString(line[off:])
			if r == utf8.RuneError && n == 1 {
				break
			}
			off += n
		}
		return TargetLine{}, false, fail(off, "", "text in UTF-8", "", obs.ErrSyntax)
	}
	for off, r := range line {
		if r != '\t' && unicode.IsControl(r) {
			return TargetLine{}, false, fail(off, "", "printable text", string(r), obs.ErrSyntax)
		}
	}
	trimmed := strings.TrimLeft(line, " \t")
	if trimmed == "" || trimmed[0] == '#' {
		return TargetLine{}, false, nil
	}
	words, err := splitTargetWords(line, fail)
	if err != nil {
		return TargetLine{}, false, err
	}
	const kinds = "obs, fit or elements"
	kw := words[0]
	t := TargetLine{Source: file, Line: lineNo}
	switch strings.ToLower(kw.s) {
	case "obs":
		t.Kind = TargetObs
	case "fit":
		t.Kind = TargetFit
	case "elements":
		t.Kind = TargetElements
	default:
		return TargetLine{}, false, fail(kw.off, "kind", kinds+" and a file, such as: fit club-fit.json", kw.s, obs.ErrSyntax)
	}
	if len(words) < 2 || words[1].s == "" {
		off := len(line)
		if len(words) >= 2 {
			off = words[1].off
		}
		return TargetLine{}, false, fail(off, t.Kind.String(), "a file after "+t.Kind.String(), "", obs.ErrFieldCount)
	}
	t.File, t.FileColumn = words[1].s, col(words[1].off)
	t.Path = t.File
	if !filepath.IsAbs(t.Path) {
		t.Path = filepath.Join(dir, t.Path)
	}
	switch {
	case t.Kind == TargetElements && len(words) > 2:
		if strings.HasPrefix(line[words[2].off:], `"`) {
			if len(words) > 3 {
				return TargetLine{}, false, fail(words[3].off, "name", "nothing after the quoted name", words[3].s, obs.ErrFieldCount)
			}
			t.Name = words[2].s
		} else {
			t.Name = strings.TrimRight(line[words[2].off:], " \t")
		}
		if strings.TrimSpace(t.Name) == "" {
			return TargetLine{}, false, fail(words[2].off, "name", "an element set's name", "", obs.ErrSyntax)
		}
	case len(words) > 2:
		return TargetLine{}, false, fail(words[2].off, t.Kind.String(), "one file and nothing after it (quote a file name that holds blanks)", words[2].s, obs.ErrFieldCount)
	}
	return t, true, nil
}

// splitTargetWords splits a line into blank-separated words; a word that
// starts with '"' runs to the next '"' and must be followed by a blank or the
// end of the line.
func splitTargetWords(line string, fail func(off int, field, want, got string, sentinel error) error) ([]targetWord, error) {
	var words []targetWord
	i := 0
	for i < len(line) {
		for i < len(line) && (line[i] == ' ' || line[i] == '\t') {
			i++
		}
		if i == len(line) {
			break
		}
		if line[i] == '"' {
			j := strings.IndexByte(line[i+1:], '"')
			if j < 0 {
				return nil, fail(i, "", "a closing '\"'", line[i:], obs.ErrSyntax)
			}
			end := i + 1 + j
			if end+1 < len(line) && line[end+1] != ' ' && line[end+1] != '\t' {
				return nil, fail(end+1, "", "a blank after the closing '\"'", line[end+1:], obs.ErrSyntax)
			}
			words = append(words, targetWord{line[i+1 : end], i})
			i = end + 1
			continue
		}
		j := i
		for j < len(line) && line[j] != ' ' && line[j] != '\t' {
			j++
		}
		words = append(words, targetWord{line[i:j], i})
		i = j
	}
	return words, nil
}
