package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"runtime/debug"
	"sort"
	"strings"

	"headroom/internal/inerr"
)

// Exit statuses: the contract pipelines rely on (DESIGN.md).
const (
	exitOK     = 0 // success, whatever the verdicts (unless --strict)
	exitInput  = 1 // bad input or failed run
	exitUsage  = 2 // usage error
	exitStrict = 3 // a gate failed under --strict
)

// version is set at build time with -ldflags "-X main.version=..."; the
// module version is used otherwise.
var version = ""

func toolVersion() string {
	if version != "" {
		return version
	}
	if bi, ok := debug.ReadBuildInfo(); ok && bi.Main.Version != "" && bi.Main.Version != "(devel)" {
		return bi.Main.Version
	}
	return "0.1.0-dev"
}

// app carries the standard streams so the whole CLI runs in-process in tests.
type app struct {
	stdin  io.Reader
	stdout io.Writer
	stderr io.Writer
	// stderrTTY reports whether stderr is a terminal (for --progress auto).
	stderrTTY bool
	// stdoutTTY reports whether stdout is a terminal (for the text view).
	stdoutTTY bool
}

// subcommand is one verb of the command line.
type subcommand struct {
	name    string
	summary string
	run     func(a *app, args []string) error
}

// subcommands is filled by the init functions of the files cmd_*.go.
var subcommands = map[string]subcommand{}

func register(s subcommand) { subcommands[s.name] = s }

func init() {
	register(subcommand{name: "version", summary: "print the version", run: func(a *app, args []string) error {
		c := newCommand("version", "headroom version", "Prints the version of headroom.")
		if help, err := c.parse(a, args); help || err != nil {
			return err
		}
		if len(c.args()) > 0 {
			return c.usageErr("takes no arguments")
		}
		fmt.Fprintf(a.stdout, "headroom %s\n", toolVersion())
		return nil
	}})
}

// exitError is an error with the exit status it calls for.
type exitError struct {
	code  int
	msg   string
	usage string // usage line printed after a usage error
}

func (e *exitError) Error() string { return e.msg }

// usagef reports a command-line mistake (exit 2).
func usagef(format string, args ...any) error {
	return &exitError{code: exitUsage, msg: fmt.Sprintf(format, args...)}
}

// inputf reports bad input at file:line (line 0: no line) (exit 1).
func inputf(file string, line int64, format string, args ...any) error {
	where := file
	if line > 0 {
		where = fmt.Sprintf("%s:%d", file, line)
	}
	msg := fmt.Sprintf(format, args...)
	if where != "" {
		msg = where + ": " + msg
	}
	return &exitError{code: exitInput, msg: msg}
}

// errStrict is returned when --strict is set and a gate failed.
var errStrict = &exitError{code: exitStrict}

func mainUsage() string {
	var b strings.Builder
	b.WriteString("usage: headroom COMMAND [flags] FILE...\n\ncommands:\n")
	names := make([]string, 0, len(subcommands))
	for n := range subcommands {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		fmt.Fprintf(&b, "  %-8s %s\n", n, subcommands[n].summary)
	}
	b.WriteString("\n'headroom COMMAND --help' describes a command's flags.\n\n")
	b.WriteString(exitHelp(true))
	return b.String()
}

// run is the whole command line: it returns the exit status.
func run(args []string, stdin io.Reader, stdout, stderr io.Writer) (code int) {
	a := &app{stdin: stdin, stdout: stdout, stderr: stderr}
	if f, ok := stderr.(*os.File); ok {
		if st, err := f.Stat(); err == nil && st.Mode()&os.ModeCharDevice != 0 {
			a.stderrTTY = true
		}
	}
	if f, ok := stdout.(*os.File); ok {
		if st, err := f.Stat(); err == nil && st.Mode()&os.ModeCharDevice != 0 {
			a.stdoutTTY = true
		}
	}
	defer func() {
		// A panic is a bug of ours; say so in one line rather than a trace.
		if r := recover(); r != nil {
			fmt.Fprintf(stderr, "headroom: internal error: %v (please report this with the command that caused it)\n", r)
			code = exitInput
		}
	}()
	if len(args) == 0 {
		fmt.Fprint(stderr, mainUsage())
		return exitUsage
	}
	switch args[0] {
	case "-h", "--help", "help":
		fmt.Fprint(stdout, mainUsage())
		return exitOK
	case "--version", "-version":
		args = []string{"version"}
	}
	sc, ok := subcommands[args[0]]
	if !ok {
		fmt.Fprintf(stderr, "headroom: unknown command %q\n%s", args[0], mainUsage())
		return exitUsage
	}
	err := sc.run(a, args[1:])
	if err == nil {
		return exitOK
	}
	var ee *exitError
	if !errors.As(err, &ee) {
		fmt.Fprintf(stderr, "headroom: %s\n", oneLine(err.Error()))
		return exitInput
	}
	if ee.msg != "" {
		fmt.Fprintf(stderr, "headroom: %s\n", oneLine(ee.msg))
	}
	if ee.code == exitUsage && ee.usage != "" {
		fmt.Fprintln(stderr, ee.usage)
	}
	return ee.code
}

// oneLine keeps an error message on one line.
func oneLine(s string) string {
	return strings.Join(strings.Fields(s), " ")
}

// displayName is how an input is named in messages: its path, or
// "<stdin>" for standard input.
func displayName(f string) string {
	if f == "-" {
		return "<stdin>"
	}
	return f
}

// inputError turns a reader's error about file into the one-line message
// "FILE:LINE: column C: what is wrong" (or "FILE: record N: ..."). Every
// reader reports positions with inerr.ParseError; the package prefix of
// the underlying message ("freqtable: ") is dropped, the file name says
// where it is.
func inputError(file string, err error) error {
	var ee *exitError
	if errors.As(err, &ee) {
		return err
	}
	name := displayName(file)
	var line int64
	var where []string
	var pe *inerr.ParseError
	if errors.As(err, &pe) {
		line = pe.Line
		if pe.Column > 0 {
			where = append(where, fmt.Sprintf("column %d", pe.Column))
		}
		if pe.Record > 0 && pe.Line == 0 {
			where = append(where, fmt.Sprintf("record %d", pe.Record))
		}
		err = pe.Err
	} else if pathErr := (*os.PathError)(nil); errors.As(err, &pathErr) || errors.Is(err, io.ErrUnexpectedEOF) {
		// An I/O error, not a reader's finding: say what failed.
		return inputf(name, 0, "cannot read: %v", unwrapPath(err))
	}
	msg := stripPackage(err.Error())
	if len(where) > 0 {
		msg = strings.Join(where, ", ") + ": " + msg
	}
	return inputf(name, line, "%s", msg)
}

// stripPackage drops a leading "pkg: " of headroom's own packages.
func stripPackage(msg string) string {
	for _, p := range []string{"freqtable: ", "reads: ", "amplicon: ", "dedup: ", "complexity: ", "hdf5: "} {
		msg = strings.ReplaceAll(msg, p, "")
	}
	return msg
}
