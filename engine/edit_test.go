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
	patched := 0
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
			patched += engine.Patched(inc)
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
