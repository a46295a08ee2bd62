package ephem

import (
	"bufio"
	"os"
	"strconv"
	"strings"
	"testing"
)

// readTwoBodyTable reads one of the CSV tables written by
// testdata/gen/twobody_reference.py: '#' lines are the provenance header, then
// a header row and rows of fields. It returns the rows as maps from column name
// to text.
func readTwoBodyTable(t *testing.T, name string) []map[string]string {
	t.Helper()
	path := "../testdata/" + name
	f, err := os.Open(path)
	if err != nil {
		t.Fatalf("reference table: %v (regenerate with /usr/bin/python3 testdata/gen/twobody_reference.py)", err)
	}
	defer f.Close()
	var cols []string
	var rows []map[string]string
	sc := bufio.NewScanner(f)
	for line := 1; sc.Scan(); line++ {
		text := sc.Text()
		if text == "" || strings.HasPrefix(text, "#") {
			continue
		}
		fields := strings.Split(text, ",")
		if cols == nil {
			cols = fields
			continue
		}
		if len(fields) != len(cols) {
			t.Fatalf("%s:%d: %d fields, want %d", path, line, len(fields), len(cols))
		}
		row := map[string]string{"line": strconv.Itoa(line)}
		for i, c := range cols {
			row[c] = fields[i]
		}
		rows = append(rows, row)
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	if len(rows) == 0 {
		t.Fatalf("%s: no rows", path)
	}
	return rows
}

// num returns the float64 in column c of row, failing the test if it is not one.
func num(t *testing.T, row map[string]string, c string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(row[c], 64)
	if err != nil {
		t.Fatalf("line %s: column %s: %v", row["line"], c, err)
	}
	return v
}
