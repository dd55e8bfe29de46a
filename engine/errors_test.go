package engine_test

import (
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/rfledger/rfledger/engine"
)

// Expected errors are written into the broken sheets themselves, as go/parser's tests do:
//
//	x = "= gian + 3 dB" # ERROR col=8 "unknown name \"gian\""
//
// puts an expected error on that line, starting at that column (characters from 1, a tab
// counting one), whose rendered diagnostic (FILE:LINE:COL: NAME: message; hint) matches the
// regexp. Every ERROR gives its column. "# SET name=value" lines pass overrides to Load, and
// "# ERROR-SET "rx"" expects an error about an override (those have no line in the file).
// The harness fails on every expected error that is missing and every error that was not
// expected.

var (
	errorRx    = regexp.MustCompile(`#\s*ERROR\s+(?:col=(\d+)\s+)?"(.*)"\s*$`)
	errorSetRx = regexp.MustCompile(`^#\s*ERROR-SET\s+"(.*)"\s*$`)
	setRx      = regexp.MustCompile(`^#\s*SET\s+([^=\s]+)\s*=\s*(.*?)\s*$`)
)

type expectation struct {
	file      string // "" for an override error
	line, col int
	rx        *regexp.Regexp
	seen      bool
}

// expectations reads the ERROR comments of one file and its SET overrides.
func expectations(t *testing.T, name, text string) ([]*expectation, []engine.Override) {
	var exps []*expectation
	var set []engine.Override
	for i, line := range strings.Split(text, "\n") {
		if m := setRx.FindStringSubmatch(line); m != nil {
			set = append(set, engine.Override{Name: m[1], Value: m[2]})
			continue
		}
		e := &expectation{file: name, line: i + 1}
		var text string
		if m := errorSetRx.FindStringSubmatch(line); m != nil {
			e.file, text = "", m[1]
		} else if m := errorRx.FindStringSubmatch(line); m != nil {
			if m[1] == "" {
				t.Fatalf("%s:%d: ERROR without col=N: say where on the line the error starts", name, i+1)
			}
			e.col, _ = strconv.Atoi(m[1])
			text = m[2]
		} else {
			continue
		}
		rx, err := regexp.Compile(text)
		if err != nil {
			t.Fatalf("%s:%d: bad ERROR regexp: %v", name, i+1, err)
		}
		e.rx = rx
		exps = append(exps, e)
	}
	return exps, set
}

// checkDiagnostics matches diagnostics against expectations, by file, line, column and regexp.
func checkDiagnostics(t *testing.T, exps []*expectation, diags engine.Diagnostics) {
	t.Helper()
	for _, d := range diags {
		s := d.String()
		if d.Range.File == "" {
			t.Errorf("diagnostic without a file: %s", s)
		}
		setErr := d.Range.File == "--set"
		if !setErr && d.Range.Start.Line < 1 {
			t.Errorf("diagnostic without a line: %s", s)
		}
		found := false
		for _, e := range exps {
			if e.seen {
				continue
			}
			sameFile := e.file == "" && setErr || e.file != "" && filepath.ToSlash(d.Range.File) == e.file
			if sameFile && (setErr || d.Range.Start.Line == e.line && d.Range.Start.Col == e.col) && e.rx.MatchString(s) {
				e.seen, found = true, true
				break
			}
		}
		if !found {
			t.Errorf("unexpected: %s", s)
		}
	}
	for _, e := range exps {
		if !e.seen {
			where := "--set"
			if e.file != "" {
				where = e.file + ":" + strconv.Itoa(e.line) + ":" + strconv.Itoa(e.col)
			}
			t.Errorf("%s: missing error matching %q", where, e.rx)
		}
	}
}

// loadAndEval loads a sheet and, when loading left something to evaluate, evaluates it too.
func loadAndEval(path string, opt engine.Options, set ...engine.Override) (*engine.Result, engine.Diagnostics) {
	sh, diags := engine.Load(path, opt)
	r, ediags := sh.Eval(set...)
	all := append(append(engine.Diagnostics(nil), diags...), ediags...)
	return r, all.Sorted()
}

func TestInvalidSheets(t *testing.T) {
	files, err := filepath.Glob("../testdata/invalid/*.toml")
	if err != nil || len(files) < 15 {
		t.Fatalf("want at least 15 invalid sheets, found %d (%v)", len(files), err)
	}
	for _, path := range files {
		t.Run(filepath.Base(path), func(t *testing.T) {
			text, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			exps, set := expectations(t, filepath.ToSlash(path), string(text))
			if len(exps) == 0 {
				t.Fatal("no # ERROR comment: an invalid sheet must say what is wrong with it")
			}
			_, diags := loadAndEval(path, engine.Options{Library: lib}, set...)
			checkDiagnostics(t, exps, diags)
			checkPositions(t, string(text), diags)
		})
	}
}

// checkPositions checks that each range's line, column and byte offset name the same place in
// the file, and that it ends where it starts or after.
func checkPositions(t *testing.T, src string, diags engine.Diagnostics) {
	t.Helper()
	at := func(off int) engine.Pos {
		p := engine.Pos{Line: 1, Col: 1}
		for _, r := range src[:min(off, len(src))] {
			if r == '\n' {
				p.Line, p.Col = p.Line+1, 1
			} else {
				p.Col++
			}
		}
		p.Byte = off
		return p
	}
	for _, d := range diags {
		r := d.Range
		if r.File == "--set" {
			continue
		}
		if at(r.Start.Byte) != r.Start || at(r.End.Byte) != r.End {
			t.Errorf("%s: range %+v..%+v: line, column and byte disagree", d, r.Start, r.End)
		}
		if r.End.Byte < r.Start.Byte {
			t.Errorf("%s: range ends before it starts", d)
		}
	}
}

// checkFS runs the harness over an in-memory folder of sheets: expectations are read from
// every file, the sheet is loaded from main.
func checkFS(t *testing.T, files map[string]string, main string) {
	t.Helper()
	var exps []*expectation
	var set []engine.Override
	for name, text := range files {
		e, s := expectations(t, name, text)
		exps = append(exps, e...)
		set = append(set, s...)
	}
	_, all := evalFS(files, main, set...)
	checkDiagnostics(t, exps, all)
}

func TestPartLoop(t *testing.T) {
	checkFS(t, map[string]string{
		"main.toml":    "use = { a = \"parts/a.toml\" }\n[top]\nx = \"1 dB\"\n",
		"parts/a.toml": "use = { b = \"b.toml\" }\ny = \"2 dB\"\n",
		"parts/b.toml": "use = { a = \"a.toml\" } # ERROR col=13 \"parts form a loop: main\\.toml -> parts/a\\.toml -> parts/b\\.toml -> parts/a\\.toml\"\nz = \"3 dB\"\n",
	}, "main.toml")
}

func TestPartsTooDeep(t *testing.T) {
	// SPEC §2: parts nest at most 8 deep. p0 is the sheet; p1 … p8 are 8 levels of parts,
	// and the 9th level is refused where p8 asks for it.
	files := map[string]string{}
	for i := 0; i <= 9; i++ {
		text := "v = \"1 dB\"\n"
		if i < 9 {
			text = "use = { n = \"p" + strconv.Itoa(i+1) + ".toml\" }" + "\n" + text
		}
		if i == 8 {
			text = strings.Replace(text, "}\n", "} # ERROR col=13 \"parts nest more than 8 deep\"\n", 1)
		}
		files["p"+strconv.Itoa(i)+".toml"] = text
	}
	checkFS(t, files, "p0.toml")

	delete(files, "p9.toml")
	files["p8.toml"] = "v = \"1 dB\"\n" // exactly 8 levels load
	sh, diags := loadFS(files, "p0.toml")
	if err := diags.Err(); err != nil {
		t.Fatalf("8 levels of parts: %v", err)
	}
	if _, ok := sh.Quantity("n.n.n.n.n.n.n.n.v"); !ok {
		t.Errorf("the 8th-level part's quantity is missing")
	}
}

func TestOneTypoOneError(t *testing.T) {
	// STYLE point 3: a quantity that depends on a failed one is skipped quietly.
	src := `[rx]
gain   = "17 dB"
snr    = "= gian + 3 dB"
margin = "= snr - 10 dB"
extra  = "= margin + 1 dB"

[link]
total = "= rx.extra + rx.margin"

[[require]]
that = "= link.total >= 0 dB"
`
	sh, all := evalFS(map[string]string{"s.toml": src}, "s.toml")
	if n := len(all); n != 1 {
		t.Fatalf("want exactly 1 diagnostic, got %d:\n%v", n, all)
	}
	for _, name := range []string{"rx.snr", "rx.margin", "rx.extra", "link.total"} {
		if q, _ := sh.Sheet().Quantity(name); q == nil || sh.Known(q) {
			t.Errorf("%s should be unknown", name)
		}
	}
	if q, _ := sh.Sheet().Quantity("rx.gain"); q == nil || !sh.Known(q) {
		t.Errorf("rx.gain should be known")
	}
	if _, known := sh.Pass(sh.Sheet().Requires[0]); known {
		t.Errorf("the requirement on a failed quantity should be unknown")
	}
}

func TestOverrideErrors(t *testing.T) {
	src := "[tx]\npower = \"14 dBm\"\neirp = \"= power + 2 dBi\"\n"
	for _, c := range []struct{ name, value, want string }{
		{"tx.pwr", "10 dBm", `^--set: tx\.pwr: no such quantity; did you mean "tx\.power"\?$`},
		{"zz.top", "10 dBm", `^--set: zz\.top: no such quantity; name an input by its full name, group and key, such as "tx\.power"$`},
		{"tx.eirp", "20 dBm", `^--set: tx\.eirp: derived from a formula; only inputs can be set`},
		{"tx.power", "10 km", `^--set: tx\.power: is 14 dBm; 10 km is not of the same kind; give a value of the input's kind, in a unit like "14 dBm"$`},
		{"tx.power", "10 dQ", `unknown unit "dQ"`},
	} {
		_, diags := evalFS(map[string]string{"s.toml": src}, "s.toml", engine.Override{Name: c.name, Value: c.value})
		if len(diags) != 1 || !regexp.MustCompile(c.want).MatchString(diags[0].String()) {
			t.Errorf("--set %s=%s: got %v, want one error matching %q", c.name, c.value, diags, c.want)
		}
	}
	sh := evalSrc(t, src, engine.Override{Name: "tx.power", Value: "20 dBm"})
	near(t, "tx.eirp with --set tx.power=20 dBm", value(t, sh, "tx.eirp", "dBm"), 22, 1e-12) // 20 dBm + 2 dBi, SPEC §3 table
}
