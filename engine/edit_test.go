package engine_test

import (
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/rfledger/rfledger/engine"
)

// describe writes everything a load found that a reader can see: every quantity's fields
// and range, the groups, requirements and studies, and the diagnostics.
func describe(sh *engine.Sheet, diags engine.Diagnostics) string {
	var b strings.Builder
	for _, g := range sh.Groups {
		fmt.Fprintf(&b, "group %s %v\n", g.Name, g.Range)
	}
	for _, q := range sh.Quantities() {
		t, ok := q.Type()
		v, _ := q.Nominal()
		fmt.Fprintf(&b, "%s %q %q %v %v %v %v %q %q %+v\n", q.Name, q.Formula, q.Text, t, ok, v, q.Range, q.Note, q.Source, q.Tol)
	}
	for _, rq := range sh.Requires {
		fmt.Fprintf(&b, "require %q %v %s %s %v\n", rq.That, rq.Range, rq.Subject, rq.Op, rq.Bound)
	}
	for _, d := range diags {
		fmt.Fprintf(&b, "diag %s %v %v\n", d, d.Range.Start, d.Range.End)
	}
	return b.String()
}

var number = regexp.MustCompile(`[0-9]+(\.[0-9]+)?`)

// TestPatchedReloadEqualsFullLoad: a reload after edits that change values on their lines
// (numbers in values and formulas, comments) is taken from the earlier load's decoded text,
// and gives exactly what a load from scratch gives — values, types, positions to the byte,
// diagnostics; an edit that adds a line is decoded in full.
func TestPatchedReloadEqualsFullLoad(t *testing.T) {
	files, _ := filepath.Glob("../worksheets/*.toml")
	valid, _ := filepath.Glob("../testdata/valid/*.toml")
	files = append(files, valid...)
	rng := rand.New(rand.NewPCG(1, 2))
	patched, indexPatched := 0, 0
	for _, path := range files {
		src, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		dir := t.TempDir()
		sheet := filepath.Join(dir, "s.toml")
		if err := os.CopyFS(dir, os.DirFS(filepath.Dir(path))); err != nil {
			t.Fatal(err)
		}
		write := func(text string) {
			if err := os.WriteFile(sheet, []byte(text), 0o644); err != nil {
				t.Fatal(err)
			}
		}
		write(string(src))
		prev, _ := engine.Load(sheet, engine.Options{Library: lib})
		lines := strings.Split(string(src), "\n")
		for trial := range 12 {
			i := rng.IntN(len(lines))
			line := lines[i]
			switch {
			case trial == 11:
				line += "\n# a line more"
			case strings.HasPrefix(strings.TrimSpace(line), "#"):
				line += " edited"
			default:
				locs := number.FindAllStringIndex(line, -1)
				if len(locs) == 0 {
					continue
				}
				l := locs[rng.IntN(len(locs))]
				line = line[:l[0]] + fmt.Sprint(rng.IntN(2000)) + "." + fmt.Sprint(rng.IntN(100)) + line[l[1]:]
			}
			edited := append([]string(nil), lines...)
			edited[i] = line
			text := strings.Join(edited, "\n")
			write(text)
			inc, incDiags := engine.Load(sheet, engine.Options{Library: lib, Previous: prev})
			full, fullDiags := engine.Load(sheet, engine.Options{Library: lib})
			if a, b := describe(inc, incDiags), describe(full, fullDiags); a != b {
				t.Fatalf("%s, line %d edited to %q: the reload differs from a full load:\n%s", path, i+1, line, firstDiff(a, b))
			}
			if d := engine.IndexDiff(inc); d != "" {
				t.Fatalf("%s, line %d edited to %q: the position index differs from one built in full: %s", path, i+1, line, d)
			}
			patched += engine.Patched(inc)
			indexPatched += engine.IndexPatched(inc)
			if trial == 11 && engine.Patched(inc) != 0 {
				t.Errorf("%s: an added line was patched", path)
			}
			prev = inc
			lines = strings.Split(text, "\n")
		}
	}
	if patched < 20 {
		t.Errorf("only %d reloads were patched; the edits do not exercise the patch", patched)
	}
	t.Logf("%d reloads patched, %d with the index patched too", patched, indexPatched)
	if indexPatched < patched*3/4 {
		t.Errorf("the position index was patched in only %d of %d patched reloads", indexPatched, patched)
	}
}

func firstDiff(a, b string) string {
	la, lb := strings.Split(a, "\n"), strings.Split(b, "\n")
	for i := range min(len(la), len(lb)) {
		if la[i] != lb[i] {
			return "reload: " + la[i] + "\nfull:   " + lb[i]
		}
	}
	return fmt.Sprintf("%d lines against %d", len(la), len(lb))
}

// TestPatchedIndexEdits: edits of the kinds a patched reload takes — a value with escapes,
// a quoted key, an inline table, an array element on its own line, a line of non-ASCII
// text, a comment — give the position index a full scan gives and the sheet a full load
// gives, each one after the other; a line inside a multi-line string that reads like a
// comment is not taken for one.
func TestPatchedIndexEdits(t *testing.T) {
	base := `title = "edits"
focus = "g.m"
[g]
p = { is = "14 dBm", tol = "1 dB", note = "tab\there" }
"odd" = "3 dB"
loss = "= 2 dB + 1 dB"  # a comment
band = "868 MHz"
long = { is = "1 dB", note = """
first line
# not a comment
""" }
m = "= p - loss - odd"
[[sweep]]
vary = "g.p"
from = "0 dBm"
to = "20 dBm"
plot = [
  "g.m",
]
`
	edits := []struct {
		line int
		text string
	}{
		{4, `p = { is = "15 dBm", tol = "1 dB", note = "tab\there, é" }`},
		{5, `"odd" = "3.5 dB"`},
		{6, `loss = "= 2 dB + 1.25 dB"  # a longer comment than before`},
		{7, `band = "915 MHz" # ümlaut in a comment`},
		{10, `# still not a comment, longer`},
		{1, `title = "edits, with a longer title"`},
		{18, `  "g.p",`},
		{2, `focus = "g.p"`},
	}
	dir := t.TempDir()
	sheet := filepath.Join(dir, "s.toml")
	write := func(text string) {
		if err := os.WriteFile(sheet, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write(base)
	prev, diags := engine.Load(sheet, engine.Options{Library: lib})
	if diags.HasErrors() {
		t.Fatal(diags)
	}
	lines := strings.Split(base, "\n")
	for _, e := range edits {
		lines[e.line-1] = e.text
		text := strings.Join(lines, "\n")
		write(text)
		inc, incDiags := engine.Load(sheet, engine.Options{Library: lib, Previous: prev})
		full, fullDiags := engine.Load(sheet, engine.Options{Library: lib})
		if a, b := describe(inc, incDiags), describe(full, fullDiags); a != b {
			t.Fatalf("line %d edited to %q: the reload differs from a full load:\n%s", e.line, e.text, firstDiff(a, b))
		}
		if d := engine.IndexDiff(inc); d != "" {
			t.Fatalf("line %d edited to %q: %s", e.line, e.text, d)
		}
		// The line inside the multi-line string must be read again in full, and so is the
		// array element (its line is not a value alone: the comma); every other edit is
		// patched, index included.
		wantPatched := 1
		if e.line == 10 || e.line == 18 {
			wantPatched = 0
		}
		if engine.Patched(inc) != wantPatched || engine.IndexPatched(inc) != wantPatched {
			t.Errorf("line %d edited to %q: %d patched, %d with the index; want %d", e.line, e.text, engine.Patched(inc), engine.IndexPatched(inc), wantPatched)
		}
		if e.line == 10 {
			g, _ := inc.Quantity("g.long")
			if !strings.Contains(g.Note, "still not a comment") {
				t.Errorf("the note inside the multi-line string is %q after the edit", g.Note)
			}
		}
		prev = inc
	}
}
