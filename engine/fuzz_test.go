package engine_test

import (
	"bufio"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"testing/fstest"
	"time"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
)

// checkRanges fails when an error diagnostic has no file.
func checkRanges(t *testing.T, diags engine.Diagnostics) {
	t.Helper()
	for _, d := range diags {
		if d.Severity == engine.Error && d.Range.File == "" {
			t.Errorf("error without a file: %s", d)
		}
	}
}

// FuzzLoad: a worksheet's bytes must never panic Load, Eval or Analyze, and every error has a
// range with its file set.
func FuzzLoad(f *testing.F) {
	for _, dir := range []string{"../testdata/valid", "../testdata/invalid"} {
		files, _ := filepath.Glob(filepath.Join(dir, "*.toml"))
		for _, p := range files {
			if b, err := os.ReadFile(p); err == nil {
				f.Add(b)
			}
		}
	}
	part := []byte("gain = \"17 dB\"\nnf = \"1 dB\"\nx = \"= gain * 2\"\n")
	f.Fuzz(func(t *testing.T, data []byte) {
		fsys := fstest.MapFS{
			"sheet.toml":         {Data: data},
			"parts/lna.toml":     {Data: part},
			"parts/antenna.toml": {Data: []byte("gain = \"5 dBi\"\n")},
		}
		sh, diags := engine.Load("sheet.toml", engine.Options{Library: lib, FS: fsys})
		checkRanges(t, diags)
		r, ed := sh.Eval()
		checkRanges(t, ed)
		_, ad := analysis.Analyze(r, analysis.Options{Trials: 20, Seed: 1, Workers: 1})
		checkRanges(t, ad)
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

// FuzzFormula: any formula text must not panic or hang Load, Eval or Analyze.
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
		done := make(chan struct{})
		go func() {
			defer close(done)
			sh, diags := loadFS(map[string]string{"sheet.toml": src}, "sheet.toml")
			checkRanges(t, diags)
			r, ed := sh.Eval()
			checkRanges(t, ed)
			_, ad := analysis.Analyze(r, analysis.Options{Trials: 20, Seed: 1, Workers: 1})
			checkRanges(t, ad)
		}()
		select {
		case <-done:
		case <-time.After(10 * time.Second):
			t.Fatalf("formula %q: no answer in 10 s", formula)
		}
	})
}
