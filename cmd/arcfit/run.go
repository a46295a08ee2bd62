package main

import (
	"errors"
	"fmt"
	"io"
	"runtime"
	"strings"

	"github.com/spf13/pflag"
)

// version is arcfit's version, printed by --version.
const version = "0.1.0-dev"

// Exit codes: 0 success, 1 failure, 2 usage or input error (as the standard
// flag package's ExitOnError).
const (
	exitOK      = 0
	exitFailure = 1
	exitUsage   = 2
)

// streams are the standard streams a command reads and writes: data on Out,
// diagnostics on Err.
type streams struct {
	In  io.Reader
	Out io.Writer
	Err io.Writer
}

// command is one subcommand: its name, a one-line summary, its help text and
// the function that parses its arguments and runs it. A command not built
// yet has run == nil.
type command struct {
	name    string
	summary string
	usage   string // "arcfit inspect OBS [flags]"
	about   string // what it does, a paragraph
	example string // one or more example lines
	// flags returns the command's flag set with the options bound, for the
	// help text; nil for commands not built yet.
	flags func() *pflag.FlagSet
	run   func(args []string, io streams) error
}

// commands returns the command table in the order of the help text. The
// names are design.md's.
func commands() []*command {
	return []*command{
		inspectCommand(),
		newFitCommand(),
		newPredictCommand(),
		nightCommand(),
		planCommand(),
		ephemCommand(),
		simulateCommand(),
		demoCommand(),
	}
}

// run is arcfit's entry point: it runs the command named by args[0] and
// returns the process exit code.
func run(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	io := streams{In: stdin, Out: stdout, Err: stderr}
	cmds := commands()
	if len(args) == 0 {
		fmt.Fprintln(stderr, "arcfit: no command given (run \"arcfit --help\" for the list)")
		return exitUsage
	}
	switch args[0] {
	case "-h", "--help", "help":
		if args[0] == "help" && len(args) > 1 {
			c := find(cmds, args[1])
			if c == nil {
				fmt.Fprintf(stderr, "arcfit: unknown command %q (run \"arcfit --help\" for the list)\n", args[1])
				return exitUsage
			}
			writeCommandHelp(stdout, c)
			return exitOK
		}
		writeMainHelp(stdout, cmds)
		return exitOK
	case "--version":
		fmt.Fprintf(stdout, "arcfit %s (%s)\n", version, runtime.Version())
		return exitOK
	}
	if strings.HasPrefix(args[0], "-") {
		fmt.Fprintf(stderr, "arcfit: unknown flag %q before the command (run \"arcfit --help\")\n", args[0])
		return exitUsage
	}
	c := find(cmds, args[0])
	if c == nil {
		fmt.Fprintf(stderr, "arcfit: unknown command %q (run \"arcfit --help\" for the list)\n", args[0])
		return exitUsage
	}
	if wantsHelp(args[1:]) {
		writeCommandHelp(stdout, c)
		return exitOK
	}
	if c.run == nil {
		fmt.Fprintf(stderr, "arcfit %s: not built yet in this version of arcfit (%s); these work now: %s\n", c.name, version, builtNames(cmds))
		return exitUsage
	}
	err := c.run(args[1:], io)
	if err == nil {
		return exitOK
	}
	fmt.Fprintf(stderr, "arcfit %s: %s\n", c.name, oneLine(err.Error()))
	var ue *usageError
	if errors.As(err, &ue) {
		return exitUsage
	}
	return exitFailure
}

// find returns the command named name, or nil.
func find(cmds []*command, name string) *command {
	for _, c := range cmds {
		if c.name == name {
			return c
		}
	}
	return nil
}

// wantsHelp reports whether args ask for help (-h or --help before any "--").
func wantsHelp(args []string) bool {
	for _, a := range args {
		if a == "--" {
			return false
		}
		if a == "-h" || a == "--help" {
			return true
		}
	}
	return false
}

// oneLine keeps an error message on one line.
func oneLine(s string) string {
	return strings.Join(strings.Fields(strings.ReplaceAll(s, "\n", " ")), " ")
}

// usageError is an error in how arcfit was called or in its input (a bad
// flag, a missing file, a malformed row): exit code 2.
type usageError struct{ err error }

func (e *usageError) Error() string { return e.err.Error() }
func (e *usageError) Unwrap() error { return e.err }

// usagef returns a usage error with the formatted message.
func usagef(format string, a ...any) error {
	return &usageError{fmt.Errorf(format, a...)}
}

// inputError marks err, a problem with the user's input, as exit code 2.
func inputError(err error) error {
	if err == nil {
		return nil
	}
	return &usageError{err}
}

// newFlagSet returns a flag set for the command name that reports its errors
// to the caller, never exits and never prints on its own; flags and file
// arguments may be interspersed. It defines -h/--help, which run handles
// before the command's own code sees the arguments.
func newFlagSet(name string, stderr io.Writer) *pflag.FlagSet {
	fs := pflag.NewFlagSet(name, pflag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.Usage = func() {}
	fs.SetInterspersed(true)
	fs.SortFlags = false
	fs.BoolP("help", "h", false, "show this help")
	return fs
}

// parseFlags parses args into fs, turning flag errors into usage errors.
func parseFlags(fs *pflag.FlagSet, args []string) error {
	if err := fs.Parse(args); err != nil {
		return usagef("%v (run \"arcfit %s --help\")", err, fs.Name())
	}
	return nil
}

// writeMainHelp writes the top-level help.
func writeMainHelp(w io.Writer, cmds []*command) {
	fmt.Fprintf(w, "arcfit %s: fit the motion of a moving object to timed RA/Dec measurements\nand say where to point, how large a field to search, and whether it can be seen.\n\n", version)
	fmt.Fprintln(w, "Usage:")
	fmt.Fprintln(w, "  arcfit COMMAND [ARGUMENTS] [FLAGS]")
	fmt.Fprintln(w, "  arcfit COMMAND --help")
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Commands:")
	for _, c := range cmds {
		note := ""
		if c.run == nil {
			note = "  (not built yet)"
		}
		fmt.Fprintf(w, "  %-9s %s%s\n", c.name, c.summary, note)
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Flags:")
	fmt.Fprintln(w, "  -h, --help      show this help")
	fmt.Fprintln(w, "      --version   print the version")
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Data go to standard output, messages to standard error. Exit status:")
	fmt.Fprintln(w, "0 success, 1 failure, 2 a usage or input error.")
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Example:")
	fmt.Fprintln(w, "  arcfit demo --out ./arcfit-demo")
	fmt.Fprintln(w, "  arcfit inspect ./arcfit-demo/observations.csv --sites ./arcfit-demo/sites.csv")
}

// writeCommandHelp writes the help of one command.
func writeCommandHelp(w io.Writer, c *command) {
	fmt.Fprintf(w, "arcfit %s: %s", c.name, c.summary)
	if c.run == nil {
		fmt.Fprint(w, " (not built yet in this version)")
	}
	fmt.Fprintf(w, "\n\nUsage:\n  %s\n\n", c.usage)
	fmt.Fprintln(w, wrap(c.about, 78))
	if c.flags != nil {
		fmt.Fprintf(w, "\nFlags:\n%s", flagHelp(c.flags()))
	} else {
		fmt.Fprintln(w, "\nThis command is planned and not built yet; running it exits with status 2.")
	}
	fmt.Fprintf(w, "\nExample:\n")
	for _, e := range strings.Split(c.example, "\n") {
		fmt.Fprintf(w, "  %s\n", e)
	}
}

// wrap breaks s into lines of at most width characters at spaces.
func wrap(s string, width int) string {
	var b strings.Builder
	n := 0
	for _, word := range strings.Fields(s) {
		l := len([]rune(word))
		if n > 0 && n+1+l > width {
			b.WriteByte('\n')
			n = 0
		} else if n > 0 {
			b.WriteByte(' ')
			n++
		}
		b.WriteString(word)
		n += l
	}
	return b.String()
}

// flagHelp lists the flags of fs, one a line: "-s, --name VALUE  usage
// (default …)". The VALUE word is the back-quoted word of the usage text, as
// pflag's UnquoteUsage finds it, or the flag's type; bool flags take none.
func flagHelp(fs *pflag.FlagSet) string {
	type line struct{ left, right string }
	var ls []line
	width := 0
	fs.VisitAll(func(f *pflag.Flag) {
		left := "    "
		if f.Shorthand != "" {
			left = "-" + f.Shorthand + ", "
		}
		left += "--" + f.Name
		varname, usage := pflag.UnquoteUsage(f)
		if f.Value.Type() != "bool" {
			left += " " + strings.ToUpper(varname)
			if f.DefValue != "" && f.DefValue != "0" && f.DefValue != "[]" {
				usage += fmt.Sprintf(" (default %s)", f.DefValue)
			}
		}
		ls = append(ls, line{left, usage})
		width = max(width, len(left))
	})
	var b strings.Builder
	for _, l := range ls {
		fmt.Fprintf(&b, "  %-*s  %s\n", width, l.left, l.right)
	}
	return b.String()
}

// builtNames lists the commands that are built, in table order, for the
// message of a command that is not.
func builtNames(cmds []*command) string {
	var names []string
	for _, c := range cmds {
		if c.run != nil {
			names = append(names, c.name)
		}
	}
	return strings.Join(names, ", ")
}
