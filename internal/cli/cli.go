// Package cli is rfledger's command line: it parses arguments and wires the engine, the
// function library and the report writers together. Main never exits the process itself;
// it returns the exit code, so the commands can be tested in-process.
package cli

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"strings"
)

// Exit codes.
const (
	ExitOK       = 0 // success
	ExitFail     = 1 // a requirement failed (check)
	ExitUsage    = 2 // the command line is wrong
	ExitBadSheet = 3 // the worksheet cannot be evaluated
)

// Env is what a command may touch: its arguments, streams and working directory.
type Env struct {
	Stdin          io.Reader
	Stdout, Stderr io.Writer
	// Terminal reports whether Stderr is a terminal (progress lines are shown only then).
	Terminal bool
}

type command struct {
	name, usage, help string
	run               func(e *Env, args []string) int
}

var commands []command

func init() {
	commands = []command{
		{"render", "render SHEET [-o FILE] [--json] [--set name=value]... [--trials N] [--seed N]", "evaluate a worksheet and write its budget page (Markdown, charts beside -o) or its JSON", cmdRender},
		{"check", "check SHEET...", "evaluate worksheets and print a short verdict; exit 1 when a requirement fails", cmdCheck},
		{"watch", "watch SHEET -o FILE [--serve ADDR] [--set name=value]...", "re-render on every save of the worksheet or a part it uses; --serve shows the page live on loopback", cmdWatch},
		{"diff", "diff OLD NEW | diff SHEET --rev REV", "what changed in the results between two worksheets, or a git revision and the working file", cmdDiff},
		{"export", "export SHEET --c-header [-o FILE]", "write #define lines for quantities marked export = true", cmdExport},
		{"new", "new FILE [--kind link|receiver|satellite]", "write a commented starting worksheet", cmdNew},
		{"funcs", "funcs", "list the built-in functions with their units, docs and sources", cmdFuncs},
		{"units", "units", "list the units and the decibel rules", cmdUnits},
	}
}

// Main runs the command line and returns the exit code.
func Main(args []string, e *Env) int {
	if len(args) == 0 || args[0] == "help" || args[0] == "-h" || args[0] == "--help" {
		usage(e.Stdout)
		if len(args) == 0 {
			return ExitUsage
		}
		return ExitOK
	}
	for _, c := range commands {
		if c.name == args[0] {
			return c.run(e, args[1:])
		}
	}
	fmt.Fprintf(e.Stderr, "rfledger: unknown command %q\n\n", args[0])
	usage(e.Stderr)
	return ExitUsage
}

func usage(w io.Writer) {
	fmt.Fprintf(w, "rfledger keeps an RF link budget as a TOML worksheet and renders it as a budget page.\n\nUsage:\n")
	for _, c := range commands {
		fmt.Fprintf(w, "  rfledger %s\n      %s\n", c.usage, c.help)
	}
	fmt.Fprintf(w, "\nExit codes: 0 success, 1 a requirement failed (check), 2 usage error, 3 the worksheet cannot be evaluated.\n")
}

// setFlag collects repeated --set name=value.
type setFlag []string

func (s *setFlag) String() string     { return strings.Join(*s, ",") }
func (s *setFlag) Set(v string) error { *s = append(*s, v); return nil }

// parse parses flags that may come before, between or after the positional arguments.
func parse(fs *flag.FlagSet, args []string) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, err
		}
		args = fs.Args()
		if len(args) == 0 {
			return pos, nil
		}
		if args[0] == "--" {
			return append(pos, args[1:]...), nil
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
}

func newFlags(e *Env, name string) *flag.FlagSet {
	fs := flag.NewFlagSet("rfledger "+name, flag.ContinueOnError)
	fs.SetOutput(e.Stderr)
	return fs
}

// usageErr prints a usage problem and returns ExitUsage.
func usageErr(e *Env, name, format string, args ...any) int {
	fmt.Fprintf(e.Stderr, "rfledger %s: %s\n", name, fmt.Sprintf(format, args...))
	for _, c := range commands {
		if c.name == name {
			fmt.Fprintf(e.Stderr, "usage: rfledger %s\n", c.usage)
		}
	}
	return ExitUsage
}

func flagErr(err error) int {
	if errors.Is(err, flag.ErrHelp) {
		return ExitOK
	}
	return ExitUsage
}

// IsTerminal reports whether f is a terminal (a character device).
func IsTerminal(f *os.File) bool {
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}
