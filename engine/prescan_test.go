package engine_test

import (
	"io/fs"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"syscall"
	"testing"
	"testing/fstest"

	"github.com/rfledger/rfledger/engine"
)

// deepSheets are hostile files 10,000 levels deep (issue 8, finding 1): each took seconds to
// minutes and hundreds of megabytes before the pre-scan. Each must be refused with an error at
// the line and column where the nesting passes the limit of 32.
var deepSheets = []struct {
	name, src string
	line, col int
}{
	{"arrays", "[deep]\nx = " + strings.Repeat("[", 10_000) + strings.Repeat("]", 10_000) + "\n", 2, 4 + 31 + 1}, // [deep] is the first level, the 32nd "[" the 33rd
	{"inline tables", "[deep]\nx = " + strings.Repeat("{a=", 10_000) + "1" + strings.Repeat("}", 10_000) + "\n", 2, 4 + 3*31 + 1},
	{"table headers", "title = \"t\"\n[" + strings.Repeat("a.", 9_999) + "a]\nx = \"1 dB\"\n", 2, 1},
	{"dotted keys", strings.Repeat("a.", 9_999) + "a = \"1 dB\"\n", 1, 1},
	{"arrays of tables", "[[" + strings.Repeat("a.", 40) + "a]]\n", 1, 1},
	{"mixed", "[" + strings.Repeat("a.", 20) + "a]\nx = { y = " + strings.Repeat("[", 20) + strings.Repeat("]", 20) + " }\n", 2, 0},
}

func TestDeepNestingRefused(t *testing.T) {
	for _, c := range deepSheets {
		t.Run(c.name, func(t *testing.T) {
			_, diags := loadFS(map[string]string{"deep.toml": c.src}, "deep.toml")
			d := onlyError(t, diags)
			if !strings.Contains(d.Summary, "nest more than 32 deep") {
				t.Fatalf("got %s, want the nesting limit", d)
			}
			if d.Range.Start.Line != c.line || c.col != 0 && d.Range.Start.Col != c.col {
				t.Errorf("at %d:%d, want %d:%d", d.Range.Start.Line, d.Range.Start.Col, c.line, c.col)
			}
		})
	}
}

// The limit is 32 containers: a value inside 31 arrays in a top-level table passes the
// pre-scan (it is then refused as "not a quantity", which is the loader's business).
func TestNestingAtTheLimit(t *testing.T) {
	src := "[g]\nx = " + strings.Repeat("[", 31) + strings.Repeat("]", 31) + "\n"
	_, diags := loadFS(map[string]string{"s.toml": src}, "s.toml")
	for _, d := range diags {
		if strings.Contains(d.Summary, "nest more than") {
			t.Errorf("32 levels refused: %s", d)
		}
	}
	src = "[g]\nx = " + strings.Repeat("[", 32) + strings.Repeat("]", 32) + "\n"
	_, diags = loadFS(map[string]string{"s.toml": src}, "s.toml")
	if d := onlyError(t, diags); !strings.Contains(d.Summary, "nest more than 32") {
		t.Errorf("33 levels: got %s", d)
	}
}

// Text that only looks like nesting (brackets in strings and comments, multi-line strings,
// dates with a space) is not counted: these valid sheets load without a limit error.
func TestPrescanReadsStringsAndComments(t *testing.T) {
	deep := strings.Repeat("[", 100)
	srcs := []string{
		"[g]\na = { is = \"1 dB\", note = \"" + deep + "\" }\n",
		"[g]\na = { is = \"1 dB\", note = '" + deep + "' }\n",
		"[g]\na = { is = \"1 dB\", note = \"\"\"\n" + deep + "\n\\\"\"\"\" }\n",
		"[g]\na = { is = \"1 dB\", note = '''\n" + deep + "\n'''' }\n",
		"[g]\na = \"1 dB\" # " + deep + "\n",
		"[g]\na = { is = \"1 dB\", note = \"\\\"" + deep + "\\\"\" }\n",
		"[\"g\"]\n\"a\" = \"1 dB\"\n[g.h]\nb = \"2 dB\" # [[x]]\n",
	}
	for _, src := range srcs {
		if _, diags := loadFS(map[string]string{"s.toml": src}, "s.toml"); diags.HasErrors() {
			t.Errorf("%q:\n%v", src, diags)
		}
	}
}

// Finding 2: size bounds time and memory. A 50 MB sheet is refused from its first 16 MiB
// (the reader stops there), with the limit and its reason in the message; the time and memory
// this takes are measured by BenchmarkRefuseLarge.
func TestLargeSheetRefused(t *testing.T) {
	fsys := fstest.MapFS{"big.toml": {Data: largeSheet(50 << 20)}}
	_, diags := engine.Load("big.toml", engine.Options{Library: lib, FS: fsys})
	d := onlyError(t, diags)
	if !strings.Contains(d.Summary, "larger than 16 MiB, the room 100,000 quantities need") {
		t.Errorf("got %s", d)
	}
}

// largeSheet is n bytes of groups of short quantities, the shape that passed 3.7 GB.
func largeSheet(n int) []byte {
	var b strings.Builder
	for i := 0; b.Len() < n; i++ {
		b.WriteString("[g")
		b.WriteString(strings.Repeat("x", i%7))
		b.WriteString(string(rune('a' + i%26)))
		b.WriteString("]\nv = \"1 dB\"\n")
	}
	return []byte(b.String()[:n])
}

// Many small keys inside the size limit are counted by the pre-scan and stopped at the
// limit, before the decoder builds a table for each.
func TestCountsStopped(t *testing.T) {
	var b strings.Builder
	for i := range engine.MaxQuantities + 10 {
		b.WriteString("[g")
		b.WriteString(strings.Repeat("a", i%3))
		b.WriteString("]\n")
	}
	_, diags := loadFS(map[string]string{"t.toml": b.String()}, "t.toml")
	if d := onlyError(t, diags); !strings.Contains(d.Summary, "more than 100000 tables") {
		t.Errorf("tables: got %s", d)
	}
	b.Reset()
	b.WriteString("[g]\n")
	for i := range engine.MaxQuantities + 10 {
		b.WriteString("q")
		b.WriteString(strings.Repeat("z", i%5))
		b.WriteString("=1\n")
	}
	_, diags = loadFS(map[string]string{"q.toml": b.String()}, "q.toml")
	if d := onlyError(t, diags); !strings.Contains(d.Summary, "more than 200000 quantities") || d.Range.Start.Line != engine.MaxQuantities+2 {
		t.Errorf("quantities: got %s", d)
	}
	src := "[g]\nx = [" + strings.Repeat("1,", 1_000_001) + "]\n"
	_, diags = loadFS(map[string]string{"a.toml": src}, "a.toml")
	if d := onlyError(t, diags); !strings.Contains(d.Summary, "more than 1000000 keys, tables and array entries") {
		t.Errorf("array entries: got %s", d)
	}
	src = "[g]\nx = \"= " + strings.Repeat("1+", 20_000) + "1\"\n"
	_, diags = loadFS(map[string]string{"f.toml": src}, "f.toml")
	if d := onlyError(t, diags); !strings.Contains(d.Summary, "formula is 40001 characters long; the limit is 20000") {
		t.Errorf("formula: got %s", d)
	}
}

// The same part used many times counts each time: the files of one load share the limit.
func TestPartsShareTheLimit(t *testing.T) {
	part := largeSheet(9 << 20)
	_, diags := engine.Load("s.toml", engine.Options{Library: lib, FS: fstest.MapFS{
		"s.toml": {Data: []byte("use = { a = \"p.toml\", b = \"p.toml\" }\n")},
		"p.toml": {Data: part},
	}})
	found := false
	for _, d := range diags {
		found = found || strings.Contains(d.Summary, "the worksheet and its parts together are larger than 16 MiB")
	}
	if !found {
		t.Errorf("two 9 MiB parts: %v", diags)
	}
}

func onlyError(t *testing.T, diags engine.Diagnostics) engine.Diagnostic {
	t.Helper()
	if len(diags) != 1 || diags[0].Severity != engine.Error {
		t.Fatalf("want one error, got %d:\n%v", len(diags), diags)
	}
	return diags[0]
}

// Findings 3 and 4: parts on disk are opened through the worksheet's folder, so a symbolic
// link out of it (to a file, to a folder, to /dev/zero) is refused, and a part that is not a
// regular file (a named pipe) is refused without opening it.
func TestPartsStayInside(t *testing.T) {
	tmp := t.TempDir()
	dir := filepath.Join(tmp, "sheet")
	must(t, os.MkdirAll(filepath.Join(dir, "parts", "real"), 0o755))
	must(t, os.MkdirAll(filepath.Join(tmp, "outside"), 0o755))
	must(t, os.WriteFile(filepath.Join(tmp, "outside", "secret.toml"), []byte("secret = \"42 dB\"\n"), 0o644))
	must(t, os.WriteFile(filepath.Join(dir, "parts", "real", "ok.toml"), []byte("g = \"3 dB\"\n"), 0o644))
	must(t, os.Symlink("../../outside/secret.toml", filepath.Join(dir, "parts", "evil.toml")))
	must(t, os.Symlink("../../outside", filepath.Join(dir, "parts", "outdir")))
	must(t, os.Symlink("real", filepath.Join(dir, "parts", "inside")))
	must(t, os.Symlink("/dev/zero", filepath.Join(dir, "parts", "zero.toml")))
	must(t, os.Symlink("loop2.toml", filepath.Join(dir, "parts", "loop1.toml")))
	must(t, os.Symlink("loop1.toml", filepath.Join(dir, "parts", "loop2.toml")))
	fifo := filepath.Join(dir, "parts", "fifo.toml")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Logf("no named pipe (%v); that case is skipped", err)
		fifo = ""
	}
	cases := []struct{ part, want string }{
		{"parts/evil.toml", "leads outside the worksheet's folder"},
		{"parts/outdir/secret.toml", "leads outside the worksheet's folder"},
		{"parts/zero.toml", "leads outside the worksheet's folder"},
		{"parts/loop1.toml", "cannot read"},
		{"parts/inside/ok.toml", ""}, // a link that stays inside is followed
		{"../outside/secret.toml", "leaves the worksheet's folder"},
		{"/etc/passwd", "absolute paths are not allowed"},
		{`\etc\passwd`, "absolute paths are not allowed"},
		{"C:/x.toml", "absolute paths are not allowed"},
	}
	if fifo != "" {
		cases = append(cases, struct{ part, want string }{"parts/fifo.toml", "not a regular file"})
	}
	for _, c := range cases {
		sheet := filepath.Join(dir, "s.toml")
		must(t, os.WriteFile(sheet, []byte("use = { p = '"+c.part+"' }\n"), 0o644))
		sh, diags := engine.Load(sheet, engine.Options{Library: lib})
		if c.want == "" {
			if diags.HasErrors() {
				t.Errorf("%s: %v", c.part, diags)
			} else if _, ok := sh.Quantity("p.g"); !ok {
				t.Errorf("%s: p.g not loaded", c.part)
			}
			continue
		}
		if d := onlyError(t, diags); !regexp.MustCompile(regexp.QuoteMeta(c.want)).MatchString(d.Summary) || d.Range.Start.Line != 1 {
			t.Errorf("%s: got %s, want %q", c.part, d, c.want)
		}
		if _, ok := sh.Quantity("p.secret"); ok {
			t.Errorf("%s: the outside file was read", c.part)
		}
	}
}

// The worksheet named on the command line may itself be a link to elsewhere; only its parts
// are held to its folder.
func TestSheetMayBeALink(t *testing.T) {
	tmp := t.TempDir()
	must(t, os.WriteFile(filepath.Join(tmp, "real.toml"), []byte("a = \"1 dB\"\n"), 0o644))
	must(t, os.Mkdir(filepath.Join(tmp, "w"), 0o755))
	must(t, os.Symlink("../real.toml", filepath.Join(tmp, "w", "s.toml")))
	if _, diags := engine.Load(filepath.Join(tmp, "w", "s.toml"), engine.Options{Library: lib}); diags.HasErrors() {
		t.Error(diags)
	}
}

// In-memory parts that are not regular files are refused too (the fuzzers use such a folder).
func TestSpecialPartsInMemory(t *testing.T) {
	for _, mode := range []fs.FileMode{fs.ModeNamedPipe, fs.ModeDevice | fs.ModeCharDevice, fs.ModeSocket, fs.ModeDir} {
		fsys := fstest.MapFS{"s.toml": {Data: []byte("use = { p = \"p.toml\" }\n")}, "p.toml": {Mode: mode}}
		_, diags := engine.Load("s.toml", engine.Options{Library: lib, FS: fsys})
		if d := onlyError(t, diags); !strings.Contains(d.Summary, "not a regular file") {
			t.Errorf("mode %v: got %s", mode, d)
		}
	}
}

func must(t *testing.T, err error) {
	t.Helper()
	if err != nil {
		t.Fatal(err)
	}
}

// BenchmarkRefuseDeep measures the refusal of each 10,000-level file (finding 1: under 1 s);
// run with -benchmem to see the memory.
func BenchmarkRefuseDeep(b *testing.B) {
	for _, c := range deepSheets {
		b.Run(c.name, func(b *testing.B) {
			fsys := fstest.MapFS{"deep.toml": {Data: []byte(c.src)}}
			for b.Loop() {
				engine.Load("deep.toml", engine.Options{Library: lib, FS: fsys})
			}
		})
	}
}

// BenchmarkRefuseLarge measures the refusal of a 50 MB sheet on disk (finding 2: under 2 s
// and 200 MB); -benchmem reports the bytes allocated per refusal.
func BenchmarkRefuseLarge(b *testing.B) {
	p := filepath.Join(b.TempDir(), "big.toml")
	if err := os.WriteFile(p, largeSheet(50<<20), 0o644); err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		engine.Load(p, engine.Options{Library: lib})
	}
}
