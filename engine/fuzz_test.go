package engine_test

import (
	"bufio"
	"io/fs"
	"maps"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"testing/fstest"
	"time"
	"unicode/utf8"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
)

// checkRanges fails when an error diagnostic has no file, or when a diagnostic's position
// in one of the files given is not on a line of that file, or past the end of its line, or
// its line, column and byte offset name different places (checkPositions).
func checkRanges(t *testing.T, diags engine.Diagnostics, files ...map[string]string) {
	t.Helper()
	texts := map[string]string{}
	for _, m := range files {
		maps.Copy(texts, m)
	}
	for _, d := range diags {
		if d.Severity == engine.Error && d.Range.File == "" {
			t.Errorf("error without a file: %s", d)
		}
		src, ok := texts[d.Range.File]
		if !ok || d.Range.Start.Line == 0 {
			continue
		}
		checkPositions(t, src, engine.Diagnostics{d})
		lines := strings.Split(src, "\n")
		for _, p := range []engine.Pos{d.Range.Start, d.Range.End} {
			if p.Line == 0 && p == d.Range.End {
				continue
			}
			if p.Line < 1 || p.Line > len(lines) {
				t.Errorf("%s: line %d is outside the file's %d lines", d, p.Line, len(lines))
				continue
			}
			if n := utf8.RuneCountInString(lines[p.Line-1]); p.Col < 1 || p.Col > n+1 {
				t.Errorf("%s: column %d is outside line %d (%d characters)", d, p.Col, p.Line, n)
			}
		}
	}
}

// fuzzLimit is the time one fuzz input may take to load, evaluate and analyse: a slow input
// is a failure (issue 8: a 21 KB file once ran for minutes).
const fuzzLimit = 2 * time.Second

// inTime runs f and fails the test when it does not return within fuzzLimit.
func inTime(t *testing.T, what string, f func()) {
	t.Helper()
	done := make(chan struct{})
	go func() {
		defer close(done)
		f()
	}()
	select {
	case <-done:
	case <-time.After(fuzzLimit):
		t.Fatalf("%s: no answer in %v", what, fuzzLimit)
	}
}

// fuzzParts is the folder a fuzzed worksheet sits in: ordinary parts, and parts that are
// links (inside, outside; testing/fstest recurses without end on a link loop, so loops are
// tested on disk in TestPartsStayInside) or not regular files (a pipe, a device, a folder).
func fuzzParts(sheet []byte) fstest.MapFS {
	return fstest.MapFS{
		"sheet.toml":         {Data: sheet},
		"parts/lna.toml":     {Data: []byte(fuzzPart)},
		"parts/antenna.toml": {Data: []byte("gain = \"5 dBi\"\n")},
		"parts/link.toml":    {Data: []byte("lna.toml"), Mode: fs.ModeSymlink},
		"parts/out.toml":     {Data: []byte("../../secret.toml"), Mode: fs.ModeSymlink},
		"parts/dir":          {Data: []byte("."), Mode: fs.ModeSymlink},
		"parts/fifo.toml":    {Mode: fs.ModeNamedPipe},
		"parts/zero.toml":    {Mode: fs.ModeDevice | fs.ModeCharDevice},
		"parts/sub.toml":     {Mode: fs.ModeDir},
		"parts/self.toml":    {Data: []byte("use = { me = \"self.toml\" }\n")},
	}
}

const fuzzPart = "gain = \"17 dB\"\nnf = \"1 dB\"\nx = \"= gain * 2\"\n"

// FuzzLoad: a worksheet's bytes must never panic or hang Load, Eval or Analyze (each input
// within fuzzLimit), every error has a file, and every position lies inside its file.
func FuzzLoad(f *testing.F) {
	for _, dir := range []string{"../testdata/valid", "../testdata/invalid"} {
		files, _ := filepath.Glob(filepath.Join(dir, "*.toml"))
		for _, p := range files {
			if b, err := os.ReadFile(p); err == nil {
				f.Add(b)
			}
		}
	}
	for _, c := range deepSheets {
		f.Add([]byte(c.src))
	}
	for _, p := range []string{"link", "out", "dir/lna", "fifo", "zero", "sub", "self"} {
		f.Add([]byte("use = { p = \"parts/" + p + ".toml\" }\ny = \"= p.gain\"\n"))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		fsys := fuzzParts(data)
		texts := map[string]string{"sheet.toml": string(data), "parts/lna.toml": fuzzPart}
		inTime(t, "load", func() {
			sh, diags := engine.Load("sheet.toml", engine.Options{Library: lib, FS: fsys})
			checkRanges(t, diags, texts)
			r, ed := sh.Eval()
			checkRanges(t, ed, texts)
			_, ad := analysis.Analyze(r, analysis.Options{Trials: 20, Seed: 1, Workers: 1})
			checkRanges(t, ad, texts)
		})
	})
}

// formulaSheet is the sheet a fuzzed formula is placed in, as y = "= <formula>".
const formulaSheet = `focus = "g.y"
[g]
a  = "3 dB"
b  = "2 dB"
p  = "14 dBm"
w  = "25 mW"
d  = { is = "2 km", tol = "10 %%" }
f  = "868 MHz"
bw = "100 kHz"
x  = 0
[[g.chain]]
gain = "15 dB"
nf   = "1 dB"
[g.sub]
y  = "= %s"
[[require]]
that = "= g.sub.y == g.sub.y"
`

// FuzzFormula: any formula text must not panic or hang Load, Eval or Analyze (each within
// fuzzLimit), and every position lies inside the sheet.
func FuzzFormula(f *testing.F) {
	fh, err := os.Open("../testdata/fuzz/formulas.txt")
	if err != nil {
		f.Fatal(err)
	}
	sc := bufio.NewScanner(fh)
	for sc.Scan() {
		f.Add(sc.Text())
	}
	fh.Close()
	f.Fuzz(func(t *testing.T, formula string) {
		// A TOML basic string cannot hold raw quotes, backslashes or newlines; escape them so
		// the formula, not the TOML, is what is fuzzed.
		esc := strings.NewReplacer(`\`, `\\`, `"`, `\"`, "\n", `\n`, "\r", `\r`, "\t", `\t`).Replace(formula)
		for _, r := range esc {
			if r < 0x20 || r == 0x7f {
				return // control characters are TOML errors, covered by FuzzLoad
			}
		}
		src := strings.Replace(formulaSheet, "%s", esc, 1)
		src = strings.ReplaceAll(src, "%%", "%")
		inTime(t, "formula "+strconv.Quote(formula), func() {
			files := map[string]string{"sheet.toml": src}
			sh, diags := loadFS(files, "sheet.toml")
			checkRanges(t, diags, files)
			r, ed := sh.Eval()
			checkRanges(t, ed, files)
			_, ad := analysis.Analyze(r, analysis.Options{Trials: 20, Seed: 1, Workers: 1})
			checkRanges(t, ad, files)
		})
	})
}
