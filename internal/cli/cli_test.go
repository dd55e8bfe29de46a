package cli

import (
	"bytes"
	"encoding/json"
	"flag"
	"os"
	"path/filepath"
	"regexp"
	"runtime"
	"strings"
	"testing"
	"testing/fstest"
	"time"

	"github.com/rfledger/rfledger/engine"
	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/extension"
)

var update = flag.Bool("update", false, "rewrite the golden pages in worksheets/ from the current output")

// run calls Main and returns the exit code and the two streams.
func run(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := Main(args, &Env{Stdout: &out, Stderr: &errb})
	return code, out.String(), errb.String()
}

func worksheets(t *testing.T) []string {
	t.Helper()
	ws, err := filepath.Glob("../../worksheets/*.toml")
	if err != nil || len(ws) < 3 {
		t.Fatalf("want the three demo worksheets, found %v (%v)", ws, err)
	}
	return ws
}

// render renders a worksheet into dir and returns the page and the files written beside it.
func render(t *testing.T, sheet, dir string) ([]byte, map[string][]byte) {
	t.Helper()
	name := strings.TrimSuffix(filepath.Base(sheet), ".toml")
	out := filepath.Join(dir, name+".md")
	if code, _, stderr := run(t, "render", sheet, "-o", out); code != ExitOK {
		t.Fatalf("render %s: exit %d\n%s", sheet, code, stderr)
	}
	page, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	files := map[string][]byte{}
	svgs, _ := filepath.Glob(filepath.Join(dir, name+".*.svg"))
	for _, s := range svgs {
		b, _ := os.ReadFile(s)
		files[filepath.Base(s)] = b
	}
	return page, files
}

// TestWorksheetsGolden renders every demo worksheet and compares the page and its charts with
// the committed ones (go test ./internal/cli -update rewrites them).
func TestWorksheetsGolden(t *testing.T) {
	for _, sheet := range worksheets(t) {
		t.Run(filepath.Base(sheet), func(t *testing.T) {
			page, files := render(t, sheet, t.TempDir())
			base := strings.TrimSuffix(sheet, ".toml")
			if *update {
				old, _ := filepath.Glob(base + ".*.svg")
				for _, f := range old {
					os.Remove(f)
				}
				os.WriteFile(base+".md", page, 0o644)
				for name, b := range files {
					os.WriteFile(filepath.Join(filepath.Dir(sheet), name), b, 0o644)
				}
				return
			}
			want, err := os.ReadFile(base + ".md")
			if err != nil {
				t.Fatalf("no committed page: %v (run go test ./internal/cli -update)", err)
			}
			if !bytes.Equal(page, want) {
				t.Errorf("%s.md is out of date; run go test ./internal/cli -update and review the diff", base)
			}
			committed, _ := filepath.Glob(base + ".*.svg")
			if len(committed) != len(files) {
				t.Errorf("committed charts %v, rendered %d", committed, len(files))
			}
			for name, b := range files {
				w, err := os.ReadFile(filepath.Join(filepath.Dir(sheet), name))
				if err != nil || !bytes.Equal(w, b) {
					t.Errorf("chart %s is out of date or missing", name)
				}
			}
		})
	}
}

// TestPagesRenderAsGFM parses every page with a GFM renderer: each block of table rows must
// come out as an HTML table, and every image must point to a file written beside the page.
func TestPagesRenderAsGFM(t *testing.T) {
	md := goldmark.New(goldmark.WithExtensions(extension.GFM))
	for _, sheet := range worksheets(t) {
		dir := t.TempDir()
		page, files := render(t, sheet, dir)
		var html bytes.Buffer
		if err := md.Convert(page, &html); err != nil {
			t.Fatal(err)
		}
		// Count Markdown tables: a header row followed by a delimiter row.
		delim := regexp.MustCompile(`(?m)^\|( ?-{3,}:? ?\|| ?-{3}:? \|| ---: \|)+\s*$`)
		tables := len(delim.FindAllIndex(page, -1))
		got := strings.Count(html.String(), "<table>")
		if tables == 0 || got != tables {
			t.Errorf("%s: %d Markdown tables, %d HTML tables", sheet, tables, got)
		}
		imgs := regexp.MustCompile(`<img src="([^"]+)"`).FindAllStringSubmatch(html.String(), -1)
		if len(imgs) == 0 {
			t.Errorf("%s: no charts linked", sheet)
		}
		for _, m := range imgs {
			if _, ok := files[m[1]]; !ok {
				t.Errorf("%s: image %s does not exist beside the page", sheet, m[1])
			}
		}
		for _, want := range []string{"<h2>Verdict</h2>", "<h2>Where the budget goes</h2>", "<h2>Sensitivity</h2>", "<h2>Tolerance</h2>", "<h2>Cautions</h2>"} {
			if !strings.Contains(html.String(), want) {
				t.Errorf("%s: page lacks %s", sheet, want)
			}
		}
	}
}

// TestDeterministic renders the same worksheet with 1 and 2 Go processors: the bytes must match.
func TestDeterministic(t *testing.T) {
	sheet := "../../worksheets/field-probe-uplink.toml"
	prev := runtime.GOMAXPROCS(1)
	a, fa := render(t, sheet, t.TempDir())
	runtime.GOMAXPROCS(max(2, prev))
	b, fb := render(t, sheet, t.TempDir())
	runtime.GOMAXPROCS(prev)
	if !bytes.Equal(a, b) {
		t.Error("the page differs between GOMAXPROCS 1 and 2")
	}
	for name := range fa {
		if !bytes.Equal(fa[name], fb[name]) {
			t.Errorf("chart %s differs between runs", name)
		}
	}
	_, j1, _ := run(t, "render", sheet, "--json")
	_, j2, _ := run(t, "render", sheet, "--json")
	if j1 != j2 {
		t.Error("the JSON differs between runs")
	}
}

// TestBrokenSheetWritesNothing: exit 3, errors positioned FILE:LINE:COL, no file written.
func TestBrokenSheetWritesNothing(t *testing.T) {
	dir := t.TempDir()
	sheet := filepath.Join(dir, "bad.toml")
	os.WriteFile(sheet, []byte("[tx]\npower = \"14 dBm\"\neirp = \"= powr + 2 dB\"\nsum = \"= power + power\"\n"), 0o644)
	out := filepath.Join(dir, "bad.md")
	code, _, stderr := run(t, "render", sheet, "-o", out)
	if code != ExitBadSheet {
		t.Errorf("exit %d, want %d", code, ExitBadSheet)
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("a broken sheet must not write -o")
	}
	// Each error: its FILE:LINE:COL line, then the source line and carets under the offending
	// text (the name "powr", the "+" that cannot add), each indented by four spaces.
	want := sheet + `:3:11: tx.eirp: unknown name "powr"; did you mean "power"?
    eirp = "= powr + 2 dB"
              ^^^^
` + sheet + `:4:16: tx.sum: cannot add dBm and dBm: adding levels multiplies the values they stand for; psum(a, b) adds powers
    sum = "= power + power"
                   ^
rfledger: ` + sheet + ` cannot be evaluated; nothing written
`
	if stderr != want {
		t.Errorf("stderr:\n%s\nwant:\n%s", stderr, want)
	}
}

// TestErrorExcerpt: the caret line sits under the offending text as the file writes it (tabs
// kept, escapes counted as written), and no excerpt is shown when the file no longer holds the
// text the position was taken from.
func TestErrorExcerpt(t *testing.T) {
	dir := t.TempDir()
	sheet := filepath.Join(dir, "tab.toml")
	src := "[m]\na = \"1 dB\"\n\tx = \"= a +\\tfoo\" # a tab before x, and \\t written out\n"
	os.WriteFile(sheet, []byte(src), 0o644)
	code, _, stderr := run(t, "check", sheet)
	if code != ExitBadSheet {
		t.Fatalf("exit %d, want %d", code, ExitBadSheet)
	}
	want := sheet + `:3:14: m.x: unknown name "foo"
    	x = "= a +\tfoo" # a tab before x, and \t written out
    	            ^^^
`
	if stderr != want {
		t.Errorf("stderr:\n%q\nwant:\n%q", stderr, want)
	}

	// The same diagnostics against a file that has changed since (its line 3 no longer starts
	// where it did): the first lines stay, the excerpts go.
	diags := evaluate(sheet, nil, nil, nil).diags
	if got := formatDiags(diags, nil); got != want {
		t.Fatalf("formatDiags: %q", got)
	}
	os.WriteFile(sheet, []byte("# a line added above\n[m]\na = \"1 dB\"\nx = \"= a + foo\"\n"), 0o644)
	if got, first := formatDiags(diags, nil), sheet+":3:14: m.x: unknown name \"foo\"\n"; got != first {
		t.Errorf("stale file: %q, want only %q", got, first)
	}
}

func TestExcerptRanges(t *testing.T) {
	src := []byte("ab\ncd = \"= x +\n  y\"\n" + strings.Repeat("z", 300) + "\n")
	pos := func(line, col, byt int) engine.Pos { return engine.Pos{Line: line, Col: col, Byte: byt} }
	for _, c := range []struct {
		name        string
		r           engine.Range
		line, caret string
	}{
		{"point", engine.Range{Start: pos(2, 1, 3)}, `cd = "= x +`, "^"},
		{"a key", engine.Range{Start: pos(2, 1, 3), End: pos(2, 3, 5)}, `cd = "= x +`, "^^"},
		{"on to the next line", engine.Range{Start: pos(2, 6, 8), End: pos(3, 5, 19)}, `cd = "= x +`, "     ^^^^^^"},
		{"a long line is cut around the start", engine.Range{Start: pos(4, 201, 220), End: pos(4, 204, 223)},
			"…" + strings.Repeat("z", 120) + "…", strings.Repeat(" ", 31) + "^^^"},
	} {
		line, caret, ok := newSource(src).excerpt(c.r)
		if !ok || line != c.line || caret != c.caret {
			t.Errorf("%s: %q / %q (%v), want %q / %q", c.name, line, caret, ok, c.line, c.caret)
		}
	}
	for _, r := range []engine.Range{
		{File: "--set"},         // no position
		{Start: pos(2, 2, 3)},   // column and byte offset disagree
		{Start: pos(9, 1, 0)},   // no such line
		{Start: pos(2, 40, 42)}, // past the end of the line
	} {
		if line, caret, ok := newSource(src).excerpt(r); ok {
			t.Errorf("%+v: excerpt %q / %q, want none", r, line, caret)
		}
	}
}

func TestExitCodes(t *testing.T) {
	dir := t.TempDir()
	failing := filepath.Join(dir, "f.toml")
	os.WriteFile(failing, []byte("x = \"3 dB\"\n[[require]]\nthat = \"= x >= 6 dB\"\n"), 0o644)
	for _, c := range []struct {
		args []string
		want int
	}{
		{[]string{"check", "../../worksheets/field-probe-uplink.toml"}, ExitOK},
		{[]string{"check", failing}, ExitFail},
		{[]string{"render"}, ExitUsage},
		{[]string{"bogus"}, ExitUsage},
		{[]string{"render", failing, "--set", "nonsense"}, ExitUsage},
		{[]string{"render", filepath.Join(dir, "missing.toml")}, ExitBadSheet},
		{[]string{"render", failing, "--set", "y=1 dB"}, ExitBadSheet},
		{[]string{"check", failing, "--set", "x=7 dB"}, ExitOK},
	} {
		if code, _, stderr := run(t, c.args...); code != c.want {
			t.Errorf("%v: exit %d, want %d\n%s", c.args, code, c.want, stderr)
		}
	}
}

// TestJSONContract checks the field names SPEC §6 fixes for scripts, as format 2 shapes them.
func TestJSONContract(t *testing.T) {
	code, out, stderr := run(t, "render", "../../worksheets/field-probe-uplink.toml", "--json", "--trials", "2000")
	if code != ExitOK {
		t.Fatal(stderr)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	get := func(v any, path ...any) any {
		for _, p := range path {
			switch k := p.(type) {
			case string:
				m, _ := v.(map[string]any)
				v = m[k]
			case int:
				a, _ := v.([]any)
				if k >= len(a) {
					return nil
				}
				v = a[k]
			}
		}
		return v
	}
	for _, path := range [][]any{
		{"format"}, {"title"}, {"focus"},
		{"quantities", "tx.power", "value"}, {"quantities", "tx.power", "unit"}, {"quantities", "tx.power", "kind"}, {"quantities", "tx.power", "tol"}, {"quantities", "tx.power", "note"},
		{"quantities", "rx.floor", "formula"},
		{"requirements", 0, "that"}, {"requirements", 0, "pass"}, {"requirements", 0, "note"},
		{"chains", "rx.chain", "stages", 1, "stage"}, {"chains", "rx.chain", "stages", 1, "gain_db"}, {"chains", "rx.chain", "stages", 1, "nf_db"},
		{"chains", "rx.chain", "stages", 1, "cum_gain_db"}, {"chains", "rx.chain", "stages", 1, "cum_nf_db"}, {"chains", "rx.chain", "stages", 1, "cum_iip3_dbm"}, {"chains", "rx.chain", "stages", 1, "noise_share"},
		{"chains", "rx.chain", "gain_db"}, {"chains", "rx.chain", "nf_db"}, {"chains", "rx.chain", "iip3_dbm"},
		{"sensitivity", 0, "input"}, {"sensitivity", 0, "per"}, {"sensitivity", 0, "change"}, {"sensitivity", 0, "unit"},
		{"tolerance", "worst_low"}, {"tolerance", "worst_high"}, {"tolerance", "rss_sigma"}, {"tolerance", "unit"},
		{"tolerance", "monte_carlo", "trials"}, {"tolerance", "monte_carlo", "seed"}, {"tolerance", "monte_carlo", "p_pass"},
		{"tolerance", "monte_carlo", "p01"}, {"tolerance", "monte_carlo", "p50"}, {"tolerance", "monte_carlo", "p99"},
		{"sweeps", 0, "vary"}, {"sweeps", 0, "unit"}, {"sweeps", 0, "points", 0, "x"}, {"sweeps", 0, "points", 0, "values", "link.margin"}, {"sweeps", 0, "points", 0, "values_si", "link.margin"},
		{"quantities", "tx.power", "si"}, {"quantities", "tx.power", "si_unit"}, {"solves", 0, "si"}, {"solves", 0, "si_unit"},
		{"solves", 0, "name"}, {"solves", 0, "value"}, {"solves", 0, "unit"}, {"solves", 0, "found"},
		{"warnings"},
	} {
		if get(doc, path...) == nil {
			t.Errorf("JSON lacks %v", path)
		}
	}
	if get(doc, "format") != 2.0 || get(doc, "quantities", "tx.power", "value") != 14.0 || get(doc, "quantities", "tx.power", "unit") != "dBm" {
		t.Errorf("format/tx.power wrong: %v %v %v", get(doc, "format"), get(doc, "quantities", "tx.power", "value"), get(doc, "quantities", "tx.power", "unit"))
	}
	if get(doc, "tolerance", "monte_carlo", "trials") != 2000.0 {
		t.Errorf("--trials not honoured")
	}
}

func TestCHeader(t *testing.T) {
	code, out, stderr := run(t, "export", "../../worksheets/field-probe-uplink.toml", "--c-header")
	if code != ExitOK {
		t.Fatal(stderr)
	}
	if !regexp.MustCompile(`(?m)^#define FIELD_PROBE_UPLINK_RX_SENSITIVITY_DBM \(-1[0-9][0-9]\.[0-9]+f\)$`).MatchString(out) {
		t.Errorf("no RX_SENSITIVITY_DBM define:\n%s", out)
	}
	if !strings.Contains(out, "#ifndef RFLEDGER_FIELD_PROBE_UPLINK_H") {
		t.Errorf("no include guard:\n%s", out)
	}
}

// TestNewTemplates: every starting worksheet evaluates without an error, and new refuses to overwrite.
func TestNewTemplates(t *testing.T) {
	dir := t.TempDir()
	for _, kind := range []string{"link", "receiver", "satellite"} {
		f := filepath.Join(dir, kind+".toml")
		if code, _, stderr := run(t, "new", f, "--kind", kind); code != ExitOK {
			t.Fatalf("new %s: %s", kind, stderr)
		}
		if code, _, stderr := run(t, "render", f); code != ExitOK {
			t.Errorf("template %s does not evaluate: %s", kind, stderr)
		}
		if code, _, _ := run(t, "new", f); code != ExitUsage {
			t.Errorf("new overwrote %s", f)
		}
	}
	if code, _, _ := run(t, "new", filepath.Join(dir, "x.toml"), "--kind", "nope"); code != ExitUsage {
		t.Error("unknown kind accepted")
	}
}

func TestDiff(t *testing.T) {
	dir := t.TempDir()
	a := filepath.Join(dir, "a.toml")
	b := filepath.Join(dir, "b.toml")
	os.WriteFile(a, []byte("focus = \"m\"\np = \"10 dBm\"\nm = \"= p - 3 dB\"\n[[require]]\nthat = \"= m >= 5 dBm\"\n"), 0o644)
	os.WriteFile(b, []byte("focus = \"m\"\np = \"7 dBm\"\nm = \"= p - 3 dB\"\nextra = \"1 m\"\n[[require]]\nthat = \"= m >= 5 dBm\"\n"), 0o644)
	code, out, stderr := run(t, "diff", a, b)
	if code != ExitOK {
		t.Fatal(stderr)
	}
	for _, want := range []string{"| focus `m` | 7.00 dBm | 4.00 dBm (-3.00 dB) |", "| `m >= 5 dBm` | PASS | **FAIL** |", "| `p` | 10.00 dBm | 7.00 dBm | -3.00 dB |", "| `extra` | (new) | 1 m | |"} {
		if !strings.Contains(out, want) {
			t.Errorf("diff lacks %q:\n%s", want, out)
		}
	}
}

func TestFuncsAndUnits(t *testing.T) {
	_, out, _ := run(t, "funcs")
	for _, name := range []string{"fspl(d: length, f: frequency) -> dB", "cascade_nf(chain: chain)", "ebn0_for(", "hata(", "rain(", "cn0("} {
		if !strings.Contains(out, name) {
			t.Errorf("funcs lacks %q", name)
		}
	}
	_, out, _ = run(t, "units")
	// The weather units, and how a temperature in degC is read (SI Brochure, 9th ed., 2.3.1:
	// t/°C = T/K − 273.15); the phase-noise rules of the decibel algebra.
	for _, s := range []string{"dBm/Hz", "dB/km", "psum", "dBW/K/Hz", "hPa (= 100 Pa)", "g/m^3", "15 degC is read as 288.15 K", "dBc/Hz + dBHz -> dBc", "dBm + dBc -> dBm"} {
		if !strings.Contains(out, s) {
			t.Errorf("units lacks %q", s)
		}
	}
	// The README's decibel algebra table has the phase-noise rows too (units/algebra_test.go
	// checks that the algebra gives them).
	readme, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	for _, row := range []string{"| dBc/Hz + dBHz (phase noise over a channel) | dBc |", "| dBm + dBc, dBc + dB | dBm, dBc |"} {
		if !strings.Contains(string(readme), row) {
			t.Errorf("README lacks the row %q", row)
		}
	}
}

// TestReadmeWorksheet keeps the README's example worksheet working.
func TestReadmeWorksheet(t *testing.T) {
	readme, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	m := regexp.MustCompile("(?s)```toml\n(.*?)```").FindSubmatch(readme)
	if m == nil {
		t.Fatal("README has no toml example")
	}
	f := filepath.Join(t.TempDir(), "readme.toml")
	os.WriteFile(f, m[1], 0o644)
	if code, out, stderr := run(t, "check", f); code != ExitOK {
		t.Errorf("README example: exit %d\n%s%s", code, out, stderr)
	}
}

// TestDiffRev compares a worksheet as committed with the working file.
func TestDiffRev(t *testing.T) {
	dir, git := gitRepo(t)
	sheet := filepath.Join(dir, "s.toml")
	os.WriteFile(sheet, []byte("focus = \"m\"\np = \"10 dBm\"\nm = \"= p - 3 dB\"\n"), 0o644)
	git("init", "-q")
	git("add", "s.toml")
	git("commit", "-q", "-m", "first")
	os.WriteFile(sheet, []byte("focus = \"m\"\np = \"12 dBm\"\nm = \"= p - 3 dB\"\n"), 0o644)
	code, out, stderr := run(t, "diff", sheet, "--rev", "HEAD")
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if !strings.Contains(out, "| focus `m` | 7.00 dBm | 9.00 dBm (+2.00 dB) |") {
		t.Errorf("diff --rev:\n%s", out)
	}
	if code, _, _ := run(t, "diff", sheet, "--rev", "nosuchrev"); code != ExitBadSheet {
		t.Errorf("unknown revision: exit %d, want %d", code, ExitBadSheet)
	}
}

// Many diagnostics in one large file are formatted in time linear in the file: each file is
// split into lines once, and columns on one long line are counted on from the last. A sheet
// of 99,500 stages with neither gain nor loss took ten minutes when every excerpt searched
// the file from its start. Here 100,000 diagnostics, one per line of a 1.3 MB file, and
// 20,000 on one line of 140 KB: the quadratic search takes minutes, the linear one well
// under a second; the deadline is only against a hang.
func TestManyExcerptsInLinearTime(t *testing.T) {
	const n = 100_000
	var b strings.Builder
	var ds engine.Diagnostics
	for i := range n {
		at := b.Len()
		b.WriteString("[[g.c]]\n")
		ds = append(ds, engine.Diagnostic{Summary: "s", Range: engine.Range{File: "f",
			Start: engine.Pos{Line: i + 1, Col: 1, Byte: at}, End: engine.Pos{Line: i + 1, Col: 8, Byte: at + 7}}})
	}
	line := strings.Repeat("a = 1, ", 20_000)
	at := b.Len()
	b.WriteString(line + "\n")
	for i := range 20_000 {
		ds = append(ds, engine.Diagnostic{Summary: "s", Range: engine.Range{File: "f",
			Start: engine.Pos{Line: n + 1, Col: 7*i + 1, Byte: at + 7*i}}})
	}
	fsys := fstest.MapFS{"f": {Data: []byte(b.String())}}
	start := time.Now()
	out := formatDiags(ds, fsys)
	if d := time.Since(start); d > 20*time.Second {
		t.Errorf("formatting %d diagnostics took %v", len(ds), d)
	}
	if got := strings.Count(out, "\n    [[g.c]]\n    ^^^^^^^\n"); got != n {
		t.Errorf("%d excerpts of the stage lines, want %d", got, n)
	}
	// the 10,001st on the long line: cut to 120 characters from 30 before it
	if want := "\n    …" + line[7*10_000-30:7*10_000+90] + "…\n    " + strings.Repeat(" ", 31) + "^\n"; !strings.Contains(out, want) {
		t.Errorf("no excerpt %q", want)
	}
}
