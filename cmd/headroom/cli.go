package main

import (
	"errors"
	"fmt"
	"strings"

	"github.com/spf13/pflag"
)

// Flag groups, in the order every --help shows them.
const (
	groupInputs     = "inputs"
	groupEstimation = "estimation"
	groupDecisions  = "decisions"
	groupOutputs    = "outputs"
	groupGates      = "gates"
	groupRun        = "run"
)

var groupOrder = []string{groupInputs, groupEstimation, groupDecisions, groupOutputs, groupGates, groupRun}

// exitCodes are the exit statuses of the command line (DESIGN.md), the one
// place they are stated: main usage and every --help print them from here.
var exitCodes = []struct {
	code    int
	meaning string
	gated   bool // only for commands with gates
}{
	{exitOK, "success (whatever the verdicts, unless --strict)", false},
	{exitInput, "bad input or failed run", false},
	{exitUsage, "usage error", false},
	{exitStrict, "a gate failed under --strict", true},
}

// exitHelp renders the exit-status section; gated includes exit 3.
func exitHelp(gated bool) string {
	var b strings.Builder
	b.WriteString("exit status:\n")
	for _, e := range exitCodes {
		if e.gated && !gated {
			continue
		}
		fmt.Fprintf(&b, "  %d  %s\n", e.code, e.meaning)
	}
	return b.String()
}

// command is one subcommand's flags and help, built the same way for every
// verb: flags are declared in groups, parsed once by parse, and --help is
// rendered by help with the same sections in the same order.
type command struct {
	name     string
	synopsis string // e.g. "headroom reads [flags] FILE..."
	about    string // what it does, paragraphs
	examples []string
	gated    bool // has gates and --strict (exit 3)
	fs       *pflag.FlagSet
	groups   map[string]*pflag.FlagSet
	showHelp bool
}

// newCommand starts a subcommand's command line.
func newCommand(name, synopsis, about string, examples ...string) *command {
	c := &command{name: name, synopsis: synopsis, about: strings.TrimSpace(about), examples: examples,
		fs: pflag.NewFlagSet(name, pflag.ContinueOnError), groups: map[string]*pflag.FlagSet{}}
	c.fs.SortFlags = false
	c.fs.Usage = func() {}
	c.flags(groupRun).BoolVarP(&c.showHelp, "help", "h", false, "show this help")
	return c
}

// flags returns the flag set of one group; flags declared on it belong to
// the command.
func (c *command) flags(group string) *pflag.FlagSet {
	g, ok := c.groups[group]
	if !ok {
		g = pflag.NewFlagSet(group, pflag.ContinueOnError)
		g.SortFlags = false
		c.groups[group] = g
	}
	return g
}

// usageErr is a usage error (exit 2) of this command, followed on stderr by
// the short usage line.
func (c *command) usageErr(format string, args ...any) error {
	return &exitError{code: exitUsage, msg: c.name + ": " + fmt.Sprintf(format, args...),
		usage: fmt.Sprintf("usage: %s (see headroom %s --help)", c.synopsis, c.name)}
}

// parse parses args. It returns help true when --help was asked (the help
// is then already written to w). A flag that takes one value may be given
// once: a second value would silently replace the first. List flags
// (declared as slices) may be repeated and add up.
func (c *command) parse(a *app, args []string) (help bool, err error) {
	for _, g := range groupOrder {
		if fs, ok := c.groups[g]; ok {
			c.fs.AddFlagSet(fs)
		}
	}
	seen := map[string]bool{}
	err = c.fs.ParseAll(args, func(f *pflag.Flag, value string) error {
		if seen[f.Name] && !strings.HasSuffix(f.Value.Type(), "Slice") {
			return fmt.Errorf("--%s given twice; give it once", f.Name)
		}
		seen[f.Name] = true
		return c.fs.Set(f.Name, value)
	})
	if err != nil {
		if errors.Is(err, pflag.ErrHelp) {
			c.showHelp = true
		} else {
			return false, c.usageErr("%v", err)
		}
	}
	if c.showHelp {
		fmt.Fprint(a.stdout, c.help())
		return true, nil
	}
	return false, nil
}

// args are the positional arguments after parse.
func (c *command) args() []string { return c.fs.Args() }

// changed reports whether the flag was given on the command line.
func (c *command) changed(name string) bool { return c.fs.Changed(name) }

// help renders --help: usage, description, flags by group, exit status,
// examples.
func (c *command) help() string {
	var b strings.Builder
	fmt.Fprintf(&b, "usage: %s\n\n%s\n", c.synopsis, c.about)
	// One column width for every group, so the sections line up.
	type line struct{ name, usage string }
	lines := map[string][]line{}
	width := 0
	for _, g := range groupOrder {
		fs, ok := c.groups[g]
		if !ok {
			continue
		}
		fs.VisitAll(func(f *pflag.Flag) {
			l := flagLine(f)
			width = max(width, len(l.name))
			lines[g] = append(lines[g], line(l))
		})
	}
	for _, g := range groupOrder {
		if len(lines[g]) == 0 {
			continue
		}
		fmt.Fprintf(&b, "\n%s:\n", g)
		for _, l := range lines[g] {
			fmt.Fprintf(&b, "  %-*s  %s\n", width, l.name, l.usage)
		}
	}
	b.WriteString("\n")
	b.WriteString(exitHelp(c.gated))
	if len(c.examples) > 0 {
		b.WriteString("\nexamples:\n")
		for _, e := range c.examples {
			b.WriteString("  " + e + "\n")
		}
	}
	return b.String()
}

// flagLine renders one flag for --help: "-o, --output FILE" and its
// usage with the default, if any. Booleans show no value.
func flagLine(f *pflag.Flag) struct{ name, usage string } {
	name := "    --" + f.Name
	if f.Shorthand != "" {
		name = "-" + f.Shorthand + ", --" + f.Name
	}
	varname, usage := pflag.UnquoteUsage(f)
	if f.Value.Type() == "bool" {
		varname = ""
	}
	if varname != "" {
		name += " " + varname
	}
	switch def := f.DefValue; {
	case f.Value.Type() == "bool" || def == "" || def == "[]" || def == "0" && f.Value.Type() != "int":
	case f.Value.Type() == "string":
		usage += fmt.Sprintf(" (default %q)", def)
	default:
		usage += fmt.Sprintf(" (default %s)", strings.Trim(def, "[]"))
	}
	return struct{ name, usage string }{name, usage}
}
