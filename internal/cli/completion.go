package cli

import (
	"flag"
	"fmt"
	"io"
	"sort"
	"strings"
)

func cmdCompletion(e *Env, args []string) int {
	fs := newFlags(e, "completion")
	pos, err := parse(fs, args)
	if err != nil {
		return flagErr(e, fs, err)
	}
	if len(pos) != 1 {
		return usageErr(e, "completion", "want one shell: bash, zsh or fish")
	}
	specs := completionSpecs()
	switch pos[0] {
	case "bash":
		bashCompletion(e.Stdout, specs)
	case "zsh":
		zshCompletion(e.Stdout, specs)
	case "fish":
		fishCompletion(e.Stdout, specs)
	default:
		return usageErr(e, "completion", "shells are bash, zsh and fish, not %q", pos[0])
	}
	return ExitOK
}

// flagSpec is one flag as the completion scripts offer it.
type flagSpec struct {
	name    string   // without dashes
	doc     string   // the help line
	arg     string   // placeholder of its value ("FILE"), "" for a switch
	choices []string // the values it takes, when its placeholder lists them (text|json)
}

type commandSpec struct {
	command
	flags []flagSpec
	// words are the fixed positional values (the shells of completion), nil when the
	// positional arguments are files.
	words []string
}

// completionSpecs learns each command's flags by running it with -h under a probe, so the
// scripts offer exactly the flags the commands declare.
func completionSpecs() []commandSpec {
	var out []commandSpec
	for _, c := range commands {
		var fs *flag.FlagSet
		probe := &Env{Stdout: io.Discard, Stderr: io.Discard, probe: func(f *flag.FlagSet) { fs = f }}
		c.run(probe, []string{"-h"})
		cs := commandSpec{command: c}
		if c.name == "completion" {
			cs.words = []string{"bash", "zsh", "fish"}
		}
		if fs != nil {
			fs.VisitAll(func(f *flag.Flag) {
				arg, doc := flag.UnquoteUsage(f)
				sp := flagSpec{name: f.Name, doc: doc, arg: arg}
				if strings.Contains(arg, "|") {
					sp.choices = strings.Split(arg, "|")
				}
				cs.flags = append(cs.flags, sp)
			})
		}
		sort.Slice(cs.flags, func(i, j int) bool { return cs.flags[i].name < cs.flags[j].name })
		out = append(out, cs)
	}
	return out
}

// shellQuote quotes s for a POSIX shell (and zsh and fish) inside single quotes.
func shellQuote(s string) string { return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'" }

func bashCompletion(w io.Writer, specs []commandSpec) {
	fmt.Fprintf(w, "# bash completion for rfledger: source it, or save it as /etc/bash_completion.d/rfledger\n")
	fmt.Fprintf(w, "_rfledger() {\n  local cur=${COMP_WORDS[COMP_CWORD]} prev=${COMP_WORDS[COMP_CWORD-1]}\n")
	fmt.Fprintf(w, "  if [ \"$COMP_CWORD\" -eq 1 ]; then\n    COMPREPLY=($(compgen -W %s -- \"$cur\"))\n    return\n  fi\n", shellQuote(strings.Join(commandNames(), " ")+" help"))
	fmt.Fprintf(w, "  local flags='' words=''\n  case ${COMP_WORDS[1]} in\n")
	for _, c := range specs {
		var names []string
		var values []string
		for _, f := range c.flags {
			names = append(names, flagSpelling(f.name))
			switch {
			case len(f.choices) > 0:
				values = append(values, fmt.Sprintf("      %s) COMPREPLY=($(compgen -W %s -- \"$cur\")); return ;;\n", flagSpelling(f.name), shellQuote(strings.Join(f.choices, " "))))
			case f.arg != "" && f.arg != "FILE":
				values = append(values, fmt.Sprintf("      %s) return ;;\n", flagSpelling(f.name)))
			}
		}
		names = append(names, "-h", "--help")
		fmt.Fprintf(w, "    %s)\n      flags=%s\n", c.name, shellQuote(strings.Join(names, " ")))
		if c.words != nil {
			fmt.Fprintf(w, "      words=%s\n", shellQuote(strings.Join(c.words, " ")))
		}
		if len(values) > 0 {
			fmt.Fprintf(w, "      case $prev in\n%s      esac\n", strings.Join(values, ""))
		}
		fmt.Fprintf(w, "      ;;\n")
	}
	fmt.Fprintf(w, "    help) words=%s ;;\n", shellQuote(strings.Join(commandNames(), " ")))
	fmt.Fprintf(w, "  esac\n")
	fmt.Fprintf(w, "  if [[ $cur == -* ]]; then\n    COMPREPLY=($(compgen -W \"$flags\" -- \"$cur\"))\n")
	fmt.Fprintf(w, "  elif [ -n \"$words\" ]; then\n    COMPREPLY=($(compgen -W \"$words\" -- \"$cur\"))\n")
	fmt.Fprintf(w, "  else\n    COMPREPLY=($(compgen -f -- \"$cur\"))\n  fi\n}\ncomplete -o filenames -F _rfledger rfledger\n")
}

// zshEscape escapes the characters _arguments gives a meaning to inside a description.
func zshEscape(s string) string {
	return strings.NewReplacer(`\`, `\\`, "[", `\[`, "]", `\]`, ":", `\:`).Replace(s)
}

func zshCompletion(w io.Writer, specs []commandSpec) {
	fmt.Fprintf(w, "#compdef rfledger\n# zsh completion for rfledger: save it as _rfledger in a folder of $fpath, or source it\n")
	fmt.Fprintf(w, "_rfledger() {\n  if (( CURRENT == 2 )); then\n    local -a cmds\n    cmds=(\n")
	for _, c := range specs {
		fmt.Fprintf(w, "      %s\n", shellQuote(c.name+":"+strings.ReplaceAll(c.summary, ":", `\:`)))
	}
	fmt.Fprintf(w, "      'help:explain a command'\n    )\n    _describe 'command' cmds\n    return\n  fi\n")
	fmt.Fprintf(w, "  local cmd=$words[2]\n  shift words\n  (( CURRENT-- ))\n  case $cmd in\n")
	for _, c := range specs {
		var specLines []string
		for _, f := range c.flags {
			spec := flagSpelling(f.name) + "[" + zshEscape(f.doc) + "]"
			if f.name == "set" {
				spec = "*" + spec
			}
			switch {
			case len(f.choices) > 0:
				spec += ":" + f.name + ":(" + strings.Join(f.choices, " ") + ")"
			case f.arg == "FILE":
				spec += ":file:_files"
			case f.arg != "":
				spec += ":" + zshEscape(f.arg) + ": "
			}
			specLines = append(specLines, shellQuote(spec))
		}
		specLines = append(specLines, shellQuote("(- *)"+"{-h,--help}[show this help]"))
		if c.words != nil {
			specLines = append(specLines, shellQuote("1:shell:("+strings.Join(c.words, " ")+")"))
		} else if len(c.operands) > 0 {
			specLines = append(specLines, shellQuote("*:file:_files"))
		}
		fmt.Fprintf(w, "    %s)\n      _arguments \\\n        %s\n      ;;\n", c.name, strings.Join(specLines, " \\\n        "))
	}
	fmt.Fprintf(w, "    help) _values 'command' %s ;;\n  esac\n}\n", strings.Join(commandNames(), " "))
	fmt.Fprintf(w, "if [ \"$funcstack[1]\" = \"_rfledger\" ]; then\n  _rfledger \"$@\"\nelse\n  compdef _rfledger rfledger\nfi\n")
}

func fishCompletion(w io.Writer, specs []commandSpec) {
	fmt.Fprintf(w, "# fish completion for rfledger: save it as ~/.config/fish/completions/rfledger.fish\n")
	fmt.Fprintf(w, "complete -c rfledger -f\n")
	for _, c := range specs {
		fmt.Fprintf(w, "complete -c rfledger -n __fish_use_subcommand -a %s -d %s\n", c.name, shellQuote(c.summary))
	}
	fmt.Fprintf(w, "complete -c rfledger -n __fish_use_subcommand -a help -d 'explain a command'\n")
	fmt.Fprintf(w, "complete -c rfledger -n '__fish_seen_subcommand_from help' -a %s\n", shellQuote(strings.Join(commandNames(), " ")))
	for _, c := range specs {
		cond := shellQuote("__fish_seen_subcommand_from " + c.name)
		for _, f := range c.flags {
			opt := "-l " + f.name
			if len(f.name) == 1 {
				opt = "-s " + f.name
			}
			switch {
			case len(f.choices) > 0:
				opt += " -x -a " + shellQuote(strings.Join(f.choices, " "))
			case f.arg == "FILE":
				opt += " -r -F"
			case f.arg != "":
				opt += " -x"
			}
			fmt.Fprintf(w, "complete -c rfledger -n %s %s -d %s\n", cond, opt, shellQuote(f.doc))
		}
		switch {
		case c.words != nil:
			fmt.Fprintf(w, "complete -c rfledger -n %s -a %s\n", cond, shellQuote(strings.Join(c.words, " ")))
		case len(c.operands) > 0:
			fmt.Fprintf(w, "complete -c rfledger -n %s -F\n", cond)
		}
	}
}
