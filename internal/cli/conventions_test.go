package cli

import (
	"flag"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"runtime/debug"
	"strconv"
	"strings"
	"testing"
)

// TestHelpEveryCommand: -h, --help and help CMD print the command's page on stdout and exit
// 0; the page has the synopsis, the one-line description, each positional argument, every
// flag the command declares, and an example that names the command.
func TestHelpEveryCommand(t *testing.T) {
	for _, c := range commands {
		var fs *flag.FlagSet
		c.run(&Env{Stdout: io.Discard, Stderr: io.Discard, probe: func(f *flag.FlagSet) { fs = f }}, []string{"-h"})
		if fs == nil {
			t.Errorf("%s declares no flag set: -h cannot work", c.name)
			continue
		}
		for _, args := range [][]string{{c.name, "-h"}, {c.name, "--help"}, {"help", c.name}} {
			code, out, stderr := run(t, args...)
			if code != ExitOK || stderr != "" {
				t.Errorf("%v: exit %d, stderr %q", args, code, stderr)
			}
			want := []string{"Usage: rfledger " + c.name, upperFirst(c.summary) + ".", "Example:\n  rfledger " + c.name, "-h, --help"}
			for _, o := range c.operands {
				want = append(want, o[0]+"  ")
			}
			fs.VisitAll(func(f *flag.Flag) { want = append(want, flagSpelling(f.Name)) })
			for _, w := range want {
				if !strings.Contains(out, w) {
					t.Errorf("%v: help lacks %q:\n%s", args, w, out)
				}
			}
		}
		// Every example line runs the command whose page it is on.
		for _, ex := range strings.Split(c.example, "\n") {
			words := strings.Fields(strings.SplitN(ex, ">", 2)[0])
			if len(words) < 2 || words[0] != "rfledger" || words[1] != c.name {
				t.Errorf("%s: example %q does not run rfledger %s", c.name, ex, c.name)
			}
		}
	}
	if code, out, _ := run(t, "--help"); code != ExitOK || !strings.Contains(out, "rfledger help COMMAND") {
		t.Errorf("--help: exit %d\n%s", code, out)
	}
	if code, _, stderr := run(t); code != ExitUsage || !strings.Contains(stderr, "Usage:") {
		t.Errorf("no arguments: exit %d, %s", code, stderr)
	}
}

func TestDidYouMean(t *testing.T) {
	code, out, stderr := run(t, "rendr", "x.toml")
	if code != ExitUsage || out != "" || !strings.Contains(stderr, `unknown command "rendr"; did you mean "render"?`) {
		t.Errorf("exit %d, stderr %q", code, stderr)
	}
	if _, _, stderr := run(t, "help", "chekc"); !strings.Contains(stderr, `did you mean "check"?`) {
		t.Errorf("help chekc: %q", stderr)
	}
	code, _, stderr = run(t, "render", "--jsn", "x.toml")
	if code != ExitUsage || !strings.Contains(stderr, "did you mean --json?") || !strings.Contains(stderr, "rfledger render -h") {
		t.Errorf("--jsn: exit %d, %q", code, stderr)
	}
}

// TestBashCompletion sources the script in bash and asks it for completions as bash would.
func TestBashCompletion(t *testing.T) {
	bash, err := exec.LookPath("bash")
	if err != nil {
		t.Skip("bash not installed")
	}
	_, script, _ := run(t, "completion", "bash")
	f := filepath.Join(t.TempDir(), "rfledger.bash")
	os.WriteFile(f, []byte(script), 0o644)
	complete := func(words ...string) string {
		t.Helper()
		prog := "source " + f + "; COMP_WORDS=(" + strings.Join(words, " ") + "); COMP_CWORD=" + strconv.Itoa(len(words)-1) + "; _rfledger; echo \"${COMPREPLY[*]}\""
		out, err := exec.Command(bash, "-c", prog).CombinedOutput()
		if err != nil {
			t.Fatalf("%v: %v\n%s", words, err, out)
		}
		return strings.TrimSpace(string(out))
	}
	for _, c := range []struct {
		words []string
		want  string
	}{
		{[]string{"rfledger", "ch"}, "check"},
		{[]string{"rfledger", "co"}, "completion"},
		{[]string{"rfledger", "check", "--fo"}, "--format"},
		{[]string{"rfledger", "check", "--format", "j"}, "json junit"},
		{[]string{"rfledger", "export", "--ty"}, "--type"},
		{[]string{"rfledger", "export", "--type", "d"}, "double"},
		{[]string{"rfledger", "completion", "z"}, "zsh"},
		{[]string{"rfledger", "diff", "--exit"}, "--exit-code"},
	} {
		if got := complete(c.words...); got != c.want {
			t.Errorf("%v: %q, want %q", c.words, got, c.want)
		}
	}
}

// TestCompletionScripts: every script names every command; zsh and fish check the syntax of
// theirs where they are installed.
func TestCompletionScripts(t *testing.T) {
	for _, shell := range []string{"bash", "zsh", "fish"} {
		code, out, stderr := run(t, "completion", shell)
		if code != ExitOK {
			t.Fatalf("%s: %s", shell, stderr)
		}
		for _, c := range commands {
			if !strings.Contains(out, c.name) {
				t.Errorf("%s script lacks %s", shell, c.name)
			}
		}
		bin, err := exec.LookPath(shell)
		if err != nil {
			t.Logf("%s not installed: syntax not checked", shell)
			continue
		}
		f := filepath.Join(t.TempDir(), "script")
		os.WriteFile(f, []byte(out), 0o644)
		if msg, err := exec.Command(bin, "-n", f).CombinedOutput(); err != nil {
			t.Errorf("%s -n: %v\n%s", shell, err, msg)
		}
	}
	if code, _, _ := run(t, "completion", "tcsh"); code != ExitUsage {
		t.Error("an unknown shell was accepted")
	}
}

// TestUnitsListing: every symbol once (the micro sign and Greek mu, the ohm sign and Greek
// omega are one symbol each in Unicode NFKC), prefixed forms only under their own heading.
func TestUnitsListing(t *testing.T) {
	_, out, _ := run(t, "units")
	_, after, ok := strings.Cut(out, "Unit symbols (as written, without a prefix):\n")
	if !ok {
		t.Fatalf("no unit symbol heading:\n%s", out)
	}
	plainLine, rest, _ := strings.Cut(after, "\n")
	_, prefixedLine, ok := strings.Cut(rest, "Common prefixed forms")
	if !ok {
		t.Fatalf("no prefixed heading:\n%s", out)
	}
	_, prefixedLine, _ = strings.Cut(prefixedLine, "\n")
	prefixedLine, _, _ = strings.Cut(prefixedLine, "\n")
	plain, prefixed := strings.Fields(plainLine), strings.Fields(prefixedLine)
	seen := map[string]bool{}
	for _, s := range append(append([]string{}, plain...), prefixed...) {
		if seen[s] {
			t.Errorf("%s listed twice", s)
		}
		seen[s] = true
	}
	for _, s := range []string{"\u03bcV", "dB\u03bcV", "\u2126"} {
		if seen[s] {
			t.Errorf("%q is listed besides its NFKC form", s)
		}
	}
	// km, MHz, kbit/s are SI prefixes on m, Hz, bit/s; min, mi, nmi, ppm, m are units of their own.
	for _, s := range []string{"km", "MHz", "kbit/s", "mW"} {
		if !contains(prefixed, s) {
			t.Errorf("%s not under the prefixed heading", s)
		}
	}
	for _, s := range []string{"min", "mi", "nmi", "ppm", "m", "Hz", "dBm", "Ω"} {
		if !contains(plain, s) {
			t.Errorf("%s not under the plain heading", s)
		}
	}
}

func TestVersion(t *testing.T) {
	bi := &debug.BuildInfo{GoVersion: "go1.26.8", Main: debug.Module{Path: "github.com/rfledger/rfledger", Version: "v1.2.0"},
		Settings: []debug.BuildSetting{{Key: "vcs.revision", Value: "0123456789abcdef0123"}, {Key: "vcs.time", Value: "2026-01-02T03:04:05Z"}, {Key: "vcs.modified", Value: "true"}}}
	if got, want := versionLine(bi), "rfledger v1.2.0, revision 0123456789ab of 2026-01-02T03:04:05Z, with uncommitted changes, go1.26.8"; got != want {
		t.Errorf("got  %q\nwant %q", got, want)
	}
	bi = &debug.BuildInfo{Main: debug.Module{Version: "(devel)"}}
	if got := versionLine(bi); got != "rfledger devel, revision unknown (built without version control information)" {
		t.Errorf("devel build: %q", got)
	}
	for _, args := range [][]string{{"version"}, {"--version"}} {
		if code, out, _ := run(t, args...); code != ExitOK || !strings.HasPrefix(out, "rfledger ") {
			t.Errorf("%v: exit %d, %q", args, code, out)
		}
	}
}

// TestDevNullIsNoTerminal: /dev/null is a character device but not a terminal.
func TestDevNullIsNoTerminal(t *testing.T) {
	f, err := os.Open(os.DevNull)
	if err != nil {
		t.Skip(err)
	}
	defer f.Close()
	if IsTerminal(f) {
		t.Error("/dev/null counted as a terminal")
	}
}
