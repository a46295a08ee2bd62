package obs

import (
	"io"
	"strings"
	"unicode/utf8"
)

// bom is the UTF-8 byte order mark that some editors put at the start of a file.
const bom = "\xef\xbb\xbf"

// readAll reads r whole into one string. The readers slice lines and fields
// out of it without copying, so a row costs no allocation; a line of any
// length (well beyond 64 KiB) is read whole.
func readAll(r io.Reader) (string, error) {
	var b strings.Builder
	if _, err := io.Copy(&b, r); err != nil {
		return "", err
	}
	return strings.TrimPrefix(b.String(), bom), nil
}

// lineScanner hands out the lines of a text one by one, without their line
// endings (LF or CRLF), counting them from 1.
type lineScanner struct {
	data string
	pos  int
	n    int // 1-based number of the line last returned
}

// next returns the next line and true, or "" and false at the end.
func (l *lineScanner) next() (string, bool) {
	if l.pos >= len(l.data) {
		return "", false
	}
	rest := l.data[l.pos:]
	var line string
	if i := strings.IndexByte(rest, '\n'); i >= 0 {
		line = rest[:i]
		l.pos += i + 1
	} else {
		line = rest
		l.pos = len(l.data)
	}
	if n := len(line); n > 0 && line[n-1] == '\r' {
		line = line[:n-1]
	}
	l.n++
	return line, true
}

// checkText reports the byte offset of the first character in line that has
// no place in a text file — a control character other than tab, or bytes
// that are not UTF-8 — and what was found; -1 if the line is clean.
//
// Every byte is looked at: a control character after a non-ASCII one is
// found as well as one before it.
func checkText(line string) (int, string) {
	for i := 0; i < len(line); {
		c := line[i]
		switch {
		case c == '\t':
		case c < 0x20 || c == 0x7f:
			if c == '\r' {
				return i, "a carriage return inside the line"
			}
			return i, "binary data"
		case c >= utf8.RuneSelf:
			r, size := utf8.DecodeRuneInString(line[i:])
			if r == utf8.RuneError && size == 1 {
				return i, "bytes that are not UTF-8 text"
			}
			i += size
			continue
		}
		i++
	}
	return -1, ""
}

// isBlankLine reports whether line holds nothing but spaces and tabs.
func isBlankLine(line string) bool {
	for i := 0; i < len(line); i++ {
		if line[i] != ' ' && line[i] != '\t' {
			return false
		}
	}
	return true
}

// firstNonBlank returns line without its leading spaces and tabs.
func firstNonBlank(line string) string {
	i := 0
	for i < len(line) && (line[i] == ' ' || line[i] == '\t') {
		i++
	}
	return line[i:]
}

// field is one field of a line: its text (unquoted and trimmed of blanks)
// and the byte offset in the line where that text starts.
type field struct {
	s   string
	off int
}

// splitError says where and why a line could not be split into fields.
type splitError struct {
	off  int
	want string
}

// splitFields appends the fields of line, separated by delim, to dst. A field
// may be quoted with '"' (a doubled quote inside stands for one, RFC 4180
// §2); blanks around a field are dropped (spaces and tabs, or spaces alone
// when tab is the separator). A quoted field must end on its line.
func splitFields(dst []field, line string, delim byte) ([]field, *splitError) {
	start := 0
	for {
		i := start
		for i < len(line) && isPad(line[i], delim) {
			i++
		}
		var f field
		var end int // offset of the delimiter after the field, or len(line)
		if i < len(line) && line[i] == '"' {
			s, j, ok := unquote(line, i)
			if !ok {
				return dst, &splitError{off: i, want: "a closing quote '\"' on the same line"}
			}
			k := j
			for k < len(line) && isPad(line[k], delim) {
				k++
			}
			if k < len(line) && line[k] != delim {
				return dst, &splitError{off: k, want: "a separator after the closing quote"}
			}
			lead := len(s) - len(trimLeftPad(s, delim))
			f = field{s: trimPad(s, delim), off: i + 1 + lead}
			end = k
		} else {
			end = len(line)
			if k := strings.IndexByte(line[i:], delim); k >= 0 {
				end = i + k
			}
			f = field{s: trimRightPad(line[i:end], delim), off: i}
		}
		dst = append(dst, f)
		if end >= len(line) {
			return dst, nil
		}
		start = end + 1
	}
}

// unquote reads the quoted field that starts at line[i] == '"'. It returns
// the text between the quotes (with "" made ") and the offset just past the
// closing quote; ok is false when the closing quote is missing.
func unquote(line string, i int) (s string, next int, ok bool) {
	j := i + 1
	var b []byte // only for a field with a doubled quote
	seg := j
	for {
		k := strings.IndexByte(line[j:], '"')
		if k < 0 {
			return "", 0, false
		}
		j += k
		if j+1 < len(line) && line[j+1] == '"' {
			b = append(b, line[seg:j+1]...)
			j += 2
			seg = j
			continue
		}
		if b == nil {
			return line[i+1 : j], j + 1, true
		}
		b = append(b, line[seg:j]...)
		return string(b), j + 1, true
	}
}

// isPad reports whether c is padding around a field separated by delim.
func isPad(c, delim byte) bool {
	return c == ' ' || (c == '\t' && delim != '\t')
}

func trimRightPad(s string, delim byte) string {
	n := len(s)
	for n > 0 && isPad(s[n-1], delim) {
		n--
	}
	return s[:n]
}

func trimLeftPad(s string, delim byte) string {
	i := 0
	for i < len(s) && isPad(s[i], delim) {
		i++
	}
	return s[i:]
}

func trimPad(s string, delim byte) string { return trimRightPad(trimLeftPad(s, delim), delim) }

// lowerASCII returns s with ASCII letters in lower case (column names).
func lowerASCII(s string) string {
	for i := 0; i < len(s); i++ {
		if c := s[i]; c >= 'A' && c <= 'Z' {
			b := []byte(s)
			for j := i; j < len(b); j++ {
				if c := b[j]; c >= 'A' && c <= 'Z' {
					b[j] = c + 'a' - 'A'
				}
			}
			return string(b)
		}
	}
	return s
}
