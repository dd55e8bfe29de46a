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

	"golang.org/x/term"

	"github.com/rfledger/rfledger/units"
)

// Exit codes.
const (
	ExitOK       = 0 // success
	ExitFail     = 1 // a requirement failed (check), or results got worse (diff --exit-code)
	ExitUsage    = 2 // the command line is wrong
	ExitBadSheet = 3 // the worksheet cannot be evaluated
)

// Env is what a command may touch: its arguments, streams and working directory.
type Env struct {
	Stdin          io.Reader
	Stdout, Stderr io.Writer
	// Terminal reports whether Stderr is a terminal (progress lines are shown only then).
	Terminal bool

	// probe, when set, receives every flag set a command declares; completion uses it to
	// learn a command's flags by running the command with -h.
	probe func(*flag.FlagSet)
}

// command is one subcommand: what its help page says and the function that runs it.
type command struct {
	name     string
	args     string      // the synopsis after the name: positional arguments and main flags
	summary  string      // one line: what the command does
	operands [][2]string // each positional argument and what it is
	example  string      // one or more example command lines
	run      func(e *Env, args []string) int
}

var commands []command

func init() {
	sheet := [2]string{"SHEET", "a worksheet file (.toml)"}
	commands = []command{
		{"render", "SHEET [-o FILE] [--json] [--set name=value]... [--case NAME]... [--all-cases] [--trials N] [--seed N]",
			"evaluate a worksheet and write its budget page (Markdown, charts beside -o) or its JSON",
			[][2]string{sheet}, "rfledger render worksheets/field-probe-uplink.toml -o budget.md", cmdRender},
		{"check", "SHEET... [--format text|json|junit|github] [--set name=value]... [--case NAME]... [--all-cases] [--trials N] [--seed N]",
			"evaluate worksheets and print a verdict for people or CI (at risk when a nominal pass holds in fewer than 90 % of the Monte Carlo trials); exit 1 when a requirement fails in any case",
			[][2]string{{"SHEET...", "one or more worksheet files"}},
			"rfledger check worksheets/*.toml\nrfledger check --format junit worksheets/*.toml > budget-junit.xml", cmdCheck},
		{"watch", "SHEET -o FILE [--serve ADDR] [--set name=value]... [--case NAME]... [--all-cases]",
			"re-render on every save of the worksheet or a part it uses; --serve shows the page live on loopback",
			[][2]string{sheet}, "rfledger watch field.toml -o field.md --serve :8080", cmdWatch},
		{"diff", "OLD NEW | SHEET --rev REV [--format markdown|json] [--exit-code [--tolerance X]] [--trials N] [--seed N]",
			"what changed in the results between two worksheets, or a git revision and the working file",
			[][2]string{{"OLD NEW", "two worksheet files, old first"}, {"SHEET", "with --rev: the working file, compared with itself at REV"}},
			"rfledger diff field.toml --rev HEAD\nrfledger diff --exit-code --tolerance 0.5dB old.toml new.toml", cmdDiff},
		{"export", "SHEET --c-header [--case NAME] [--prefix NAME] [--type float|double|int] [-o FILE]",
			"write a C header of the quantities marked export, for firmware",
			[][2]string{sheet}, "rfledger export field.toml --c-header --prefix FIELD -o field_budget.h", cmdExport},
		{"new", "FILE [--kind link|receiver|satellite]", "write a commented starting worksheet",
			[][2]string{{"FILE", "the worksheet to create (never overwritten)"}}, "rfledger new field.toml --kind receiver", cmdNew},
		{"lsp", "[--debounce TIME]",
			"run the language server on standard input and output: values beside every line, diagnostics, hover, completion and definitions in any editor",
			nil, "rfledger lsp\nrfledger lsp --debounce 30ms", cmdLsp},
		{"funcs", "", "list the built-in functions with their units, docs and sources", nil, "rfledger funcs", cmdFuncs},
		{"units", "", "list the units and the decibel rules", nil, "rfledger units", cmdUnits},
		{"schema", "[--check-output | --render-output]",
			"print the JSON Schema of the worksheet format (for editors), or of check --format json or render --json", nil,
			"rfledger schema > rfledger.schema.json\nrfledger schema --render-output > render.schema.json", cmdSchema},
		{"completion", "bash|zsh|fish", "print a shell completion script",
			[][2]string{{"SHELL", "bash, zsh or fish"}},
			"rfledger completion bash > /etc/bash_completion.d/rfledger\nrfledger completion fish > ~/.config/fish/completions/rfledger.fish", cmdCompletion},
		{"version", "", "print the version, the source revision and whether the tree was modified", nil, "rfledger version", cmdVersion},
	}
}

// Main runs the command line and returns the exit code.
func Main(args []string, e *Env) int {
	if len(args) == 0 {
		usage(e.Stderr)
		return ExitUsage
	}
	switch args[0] {
	case "-h", "-help", "--help":
		usage(e.Stdout)
		return ExitOK
	case "--version", "-version":
		return cmdVersion(e, args[1:])
	case "help":
		if len(args) == 1 {
			usage(e.Stdout)
			return ExitOK
		}
		if c, ok := lookup(args[1]); ok {
			return c.run(e, []string{"-h"})
		}
		return unknownCommand(e, args[1])
	}
	if c, ok := lookup(args[0]); ok {
		return c.run(e, args[1:])
	}
	return unknownCommand(e, args[0])
}

func lookup(name string) (command, bool) {
	for _, c := range commands {
		if c.name == name {
			return c, true
		}
	}
	return command{}, false
}

func unknownCommand(e *Env, name string) int {
	fmt.Fprintf(e.Stderr, "rfledger: unknown command %q", name)
	if s := units.Nearest(name, commandNames()); s != "" {
		fmt.Fprintf(e.Stderr, "; did you mean %q?", s)
	}
	fmt.Fprintf(e.Stderr, "\nrun 'rfledger help' for the list of commands\n")
	return ExitUsage
}

func commandNames() []string {
	var out []string
	for _, c := range commands {
		out = append(out, c.name)
	}
	return out
}

func usage(w io.Writer) {
	fmt.Fprintf(w, "rfledger keeps an RF link budget as a TOML worksheet and renders it as a budget page.\n\nUsage:\n")
	for _, c := range commands {
		fmt.Fprintf(w, "  rfledger %s\n      %s\n", strings.TrimSpace(c.name+" "+c.args), c.summary)
	}
	fmt.Fprintf(w, "\nrfledger help COMMAND (or rfledger COMMAND -h) explains one command; rfledger --version prints the version.\n")
	fmt.Fprintf(w, "Exit codes: 0 success, 1 a requirement failed (check) or the results got worse (diff --exit-code), 2 usage error, 3 the worksheet cannot be evaluated.\n")
}

// help writes a command's help page: synopsis, what it does, its arguments, its flags and an example.
func help(w io.Writer, c command, fs *flag.FlagSet) {
	fmt.Fprintf(w, "Usage: rfledger %s\n\n%s.\n", strings.TrimSpace(c.name+" "+c.args), upperFirst(c.summary))
	if len(c.operands) > 0 {
		fmt.Fprintf(w, "\nArguments:\n")
		width := 0
		for _, o := range c.operands {
			width = max(width, len(o[0]))
		}
		for _, o := range c.operands {
			fmt.Fprintf(w, "  %-*s  %s\n", width, o[0], o[1])
		}
	}
	fmt.Fprintf(w, "\nFlags:\n")
	var names, docs []string
	fs.VisitAll(func(f *flag.Flag) {
		name, doc := flag.UnquoteUsage(f)
		spell := "--" + f.Name
		if len(f.Name) == 1 {
			spell = "-" + f.Name
		}
		if name != "" {
			spell += " " + name
		}
		if f.DefValue != "" && f.DefValue != "false" && f.DefValue != "[]" && f.DefValue != "0" {
			doc += fmt.Sprintf(" (default %s)", f.DefValue)
		}
		names, docs = append(names, spell), append(docs, doc)
	})
	names, docs = append(names, "-h, --help"), append(docs, "show this help")
	width := 0
	for _, n := range names {
		width = max(width, len(n))
	}
	for i := range names {
		fmt.Fprintf(w, "  %-*s  %s\n", width, names[i], docs[i])
	}
	fmt.Fprintf(w, "\nExample:\n")
	for _, line := range strings.Split(c.example, "\n") {
		fmt.Fprintf(w, "  %s\n", line)
	}
}

func upperFirst(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
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

// newFlags returns the flag set of a command. The flag package's own usage text is not used:
// flagErr prints the command's help page, on standard output, when asked for with -h.
func newFlags(e *Env, name string) *flag.FlagSet {
	fs := flag.NewFlagSet("rfledger "+name, flag.ContinueOnError)
	fs.SetOutput(e.Stderr)
	fs.Usage = func() {}
	if e.probe != nil {
		e.probe(fs)
	}
	return fs
}

// usageErr prints a usage problem and returns ExitUsage.
func usageErr(e *Env, name, format string, args ...any) int {
	fmt.Fprintf(e.Stderr, "rfledger %s: %s\n", name, fmt.Sprintf(format, args...))
	if c, ok := lookup(name); ok {
		fmt.Fprintf(e.Stderr, "usage: rfledger %s\nrun 'rfledger %s -h' for help\n", strings.TrimSpace(c.name+" "+c.args), c.name)
	}
	return ExitUsage
}

// flagErr handles an error from parse: -h prints the help page and succeeds; anything else
// (the flag package has already said what) gets a suggestion and the synopsis.
func flagErr(e *Env, fs *flag.FlagSet, err error) int {
	name := strings.TrimPrefix(fs.Name(), "rfledger ")
	c, _ := lookup(name)
	if errors.Is(err, flag.ErrHelp) {
		help(e.Stdout, c, fs)
		return ExitOK
	}
	const undefined = "flag provided but not defined: "
	if msg := err.Error(); strings.HasPrefix(msg, undefined) {
		given := strings.TrimLeft(strings.TrimPrefix(msg, undefined), "-")
		var names []string
		fs.VisitAll(func(f *flag.Flag) { names = append(names, f.Name) })
		if s := units.Nearest(given, names); s != "" {
			fmt.Fprintf(e.Stderr, "did you mean %s?\n", flagSpelling(s))
		}
	}
	fmt.Fprintf(e.Stderr, "usage: rfledger %s\nrun 'rfledger %s -h' for help\n", strings.TrimSpace(c.name+" "+c.args), c.name)
	return ExitUsage
}

// flagSpelling writes a flag as the help page does: -o, --json.
func flagSpelling(name string) string {
	if len(name) == 1 {
		return "-" + name
	}
	return "--" + name
}

// IsTerminal reports whether f is a terminal. A character device that is not a terminal
// (/dev/null) is not one.
func IsTerminal(f *os.File) bool {
	return term.IsTerminal(int(f.Fd()))
}
