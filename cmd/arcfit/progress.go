package main

import (
	"fmt"
	"io"
	"os"
	"strings"
	"sync"
	"time"
)

// isTerminal reports whether w is a terminal (a character device), where a
// progress bar may be drawn; never for pipes and files.
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	fi, err := f.Stat()
	return err == nil && fi.Mode()&os.ModeCharDevice != 0
}

// progressBar returns a progress callback that draws a one-line bar on w,
// redrawn at most ten times a second and ended with a newline when done
// reaches total.
func progressBar(w io.Writer, what string) func(done, total int) {
	var mu sync.Mutex
	var last time.Time
	return func(done, total int) {
		mu.Lock()
		defer mu.Unlock()
		if total <= 0 {
			return
		}
		now := time.Now()
		finished := done >= total
		if !finished && now.Sub(last) < 100*time.Millisecond {
			return
		}
		last = now
		const width = 30
		n := min(width, done*width/total)
		fmt.Fprintf(w, "\r%s [%s%s] %3d%%", what, strings.Repeat("#", n), strings.Repeat(" ", width-n), min(100, done*100/total))
		if finished {
			fmt.Fprintln(w)
		}
	}
}
