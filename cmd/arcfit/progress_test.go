package main

import (
	"bytes"
	"strings"
	"testing"
)

// The bar ends at 100 % with a newline; a pipe or buffer is no terminal.
func TestProgressBar(t *testing.T) {
	var b bytes.Buffer
	f := progressBar(&b, "sampling orbits")
	for i := 0; i <= 1000; i++ {
		f(i, 1000)
	}
	out := b.String()
	if !strings.HasSuffix(out, "100%\n") || strings.Count(out, "\n") != 1 {
		t.Errorf("bar output %q", out)
	}
	if isTerminal(&b) {
		t.Error("a buffer taken for a terminal")
	}
}
