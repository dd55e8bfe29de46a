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
	"github.com/rfledger/rfledger/units"
)

// describe writes everything a load found that a reader can see: the sheet's fields, every
// group, quantity (its fields, type, nominal value, dependencies and range to the byte),
// chain and stage, the requirements, studies, cases and frequency plan, and the
// diagnostics. A quantity or requirement that does not belong to sh is marked.
func describe(sh *engine.Sheet, diags engine.Diagnostics) string {
	var b strings.Builder
	at := func(r engine.Range) string { return fmt.Sprintf("%s %+v %+v", r.File, r.Start, r.End) }
	unit := func(u *units.Unit) string {
		if u == nil {
			return "-"
		}
		return fmt.Sprintf("%+v", *u)
	}
	fmt.Fprintf(&b, "sheet %q %q %q %q %q %v\n", sh.File, sh.Title, sh.Summary, sh.Focus, sh.Hash, sh.Parts)
	for _, g := range sh.Groups {
		fmt.Fprintf(&b, "group %s %s", g.Name, at(g.Range))
		for _, q := range g.Quantities {
			fmt.Fprintf(&b, " %s", q.Name)
		}
		for _, c := range g.Chains {
			fmt.Fprintf(&b, " chain %s", c.Name)
		}
		b.WriteString("\n")
	}
	for _, q := range sh.Quantities() {
		t, ok := q.Type()
		v, _ := q.Nominal()
		fmt.Fprintf(&b, "%s %s %q %q %v %v %v %s %q %q %+v %s %s %v %q %v %v\n", q.Name, q.Group, q.Formula, q.Text, t, ok, v, at(q.Range), q.Note, q.Source, q.Tol,
			unit(q.Unit), unit(q.Show), q.Export, q.ExportName, sh.Dependencies(q), q.Sheet() == sh)
	}
	for _, c := range sh.Chains() {
		fmt.Fprintf(&b, "chain %s %s", c.Name, at(c.Range))
		for _, q := range []*engine.Quantity{c.Input, c.Bandwidth, c.Backoff} {
			if q != nil {
				fmt.Fprintf(&b, " %s(%v)", q.Name, q.Sheet() == sh)
			}
		}
		for _, st := range c.Stages {
			fmt.Fprintf(&b, " [%q %q %s", st.Label, st.Note, at(st.Range))
			for _, k := range st.Keys {
				fmt.Fprintf(&b, " %s=%s(%v)", k, st.Values[k].Name, st.Values[k].Sheet() == sh)
			}
			b.WriteString("]")
		}
		b.WriteString("\n")
	}
	for _, rq := range sh.Requires {
		fmt.Fprintf(&b, "require %q %q %s %s %s %v\n", rq.That, rq.Note, at(rq.Range), rq.Subject, rq.Op, rq.Bound)
	}
	for _, sw := range sh.Sweeps {
		fmt.Fprintf(&b, "sweep %+v\n", *sw)
	}
	for _, so := range sh.Solves {
		fmt.Fprintf(&b, "solve %+v\n", *so)
	}
	for _, c := range append([]*engine.Case{sh.Nominal}, sh.Cases...) {
		if c != nil {
			fmt.Fprintf(&b, "case %+v\n", *c)
		}
	}
	for _, sp := range sh.Spurs {
		fmt.Fprintf(&b, "spurs %q %q %s(%v) %v %v %d %v %s %s\n", sp.Name, sp.Note, sp.LO.Name, sp.LO.Sheet() == sh, sp.IF, sp.RF, sp.Order, sp.Reject, unit(sp.Unit), at(sp.Range))
	}
	for _, pr := range sh.Products {
		fmt.Fprintf(&b, "products %q %q %v %v %d %s %s\n", pr.Name, pr.Note, pr.Tones, pr.Protect, pr.Order, unit(pr.Unit), at(pr.Range))
	}
	for _, d := range diags {
		fmt.Fprintf(&b, "diag %s %v %v\n", d, d.Range.Start, d.Range.End)
	}
	return b.String()
}

// describeResult writes what an evaluation gives: every quantity's value (or unknown), every
// requirement's outcome, and the diagnostics with their ranges to the byte.
func describeResult(r *engine.Result, diags engine.Diagnostics) string {
	var b strings.Builder
	for _, q := range r.Sheet().Quantities() {
		v, ok := r.Value(q)
		fmt.Fprintf(&b, "%s %v %v\n", q.Name, v, ok)
	}
	for _, rq := range r.Sheet().Requires {
		p, ok := r.Pass(rq)
		fmt.Fprintf(&b, "require %q %v %v\n", rq.That, p, ok)
	}
	for _, d := range diags {
		fmt.Fprintf(&b, "diag %s %+v %+v\n", d, d.Range.Start, d.Range.End)
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
	patched, indexPatched, kept := 0, 0, 0
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
		prevR, _ := prev.Eval()
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
			incR, incRDiags := inc.EvalFrom(prevR)
			fullR, fullRDiags := full.Eval()
			if a, b := describeResult(incR, incRDiags), describeResult(fullR, fullRDiags); a != b {
				t.Fatalf("%s, line %d edited to %q: the evaluation from the earlier one differs from a full one:\n%s", path, i+1, line, firstDiff(a, b))
			}
			if k, _ := engine.Kept(inc); k {
				kept++
			}
			patched += engine.Patched(inc)
			indexPatched += engine.IndexPatched(inc)
			if trial == 11 && engine.Patched(inc) != 0 {
				t.Errorf("%s: an added line was patched", path)
			}
			prev, prevR = inc, incR
			lines = strings.Split(text, "\n")
		}
	}
	if patched < 20 {
		t.Errorf("only %d reloads were patched; the edits do not exercise the patch", patched)
	}
	t.Logf("%d reloads patched, %d with the index patched too, %d with the model kept", patched, indexPatched, kept)
	if kept < patched/2 {
		t.Errorf("the model was kept in only %d of %d patched reloads", kept, patched)
	}
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
	prevR, _ := prev.Eval()
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
		incR, incRDiags := inc.EvalFrom(prevR)
		fullR, fullRDiags := full.Eval()
		if a, b := describeResult(incR, incRDiags), describeResult(fullR, fullRDiags); a != b {
			t.Fatalf("line %d edited to %q: the evaluation differs from a full one:\n%s", e.line, e.text, firstDiff(a, b))
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
		prev, prevR = inc, incR
	}
}
