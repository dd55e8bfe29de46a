package engine_test

import (
	"fmt"
	"reflect"
	"runtime"
	"strings"
	"testing"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/internal/gen"
)

// TestBuildAheadIsFileOrder checks that a large worksheet whose groups are built ahead on
// several cores gives the sheet that building it key by key on one core gives: the same
// quantities, groups and chains in the same order and places, the same diagnostics (some of
// them raised inside groups built ahead), and the same values on evaluation.
func TestBuildAheadIsFileOrder(t *testing.T) {
	src, err := gen.Budget(10_000, 1)
	if err != nil {
		t.Fatal(err)
	}
	// A region of our own with mistakes in its fields, so that groups built ahead report.
	var b strings.Builder
	b.Write(src)
	for i := 1; i <= 6; i++ {
		fmt.Fprintf(&b, "\n[zz.f%d]\nok = \"%d dB\"\nbad-name = \"1 dB\"\nlength = \"3 furlongs\"\nsum = \"= ok + nosuch\"\n", i, i)
		fmt.Fprintf(&b, "[[zz.f%d.chain]]\nstage = \"LNA\"\ngain = \"12 dB\"\nnf = \"1 dB\"\nwhat = 1\n", i)
	}
	files := map[string]string{"sheet.toml": b.String()}

	load := func(procs int) (*engine.Sheet, engine.Diagnostics) {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
		return loadFS(files, "sheet.toml")
	}
	one, oneDiags := load(1)
	many, manyDiags := load(4)
	if n := engine.BuiltAhead(one); n != 0 {
		t.Errorf("on one core %d groups were built ahead, want none", n)
	}
	if n := engine.BuiltAhead(many); n < 8 {
		t.Errorf("on four cores %d groups were built ahead, want the fields of each region", n)
	}
	if len(oneDiags) < 6*4 {
		t.Errorf("%d diagnostics, want the ones planted in zz (the test tests little)", len(oneDiags))
	}
	if !reflect.DeepEqual(oneDiags, manyDiags) {
		t.Errorf("diagnostics differ: %d on one core, %d on four", len(oneDiags), len(manyDiags))
		for i := range min(len(oneDiags), len(manyDiags)) {
			if !reflect.DeepEqual(oneDiags[i], manyDiags[i]) {
				t.Errorf("first difference:\none core:   %#v\nfour cores: %#v", oneDiags[i], manyDiags[i])
				break
			}
		}
	}
	describe := func(sh *engine.Sheet) []string {
		var out []string
		for _, g := range sh.Groups {
			names := []string{}
			for _, q := range g.Quantities {
				names = append(names, q.Name)
			}
			for _, c := range g.Chains {
				names = append(names, c.Name)
			}
			out = append(out, fmt.Sprintf("group %q at %v: %v", g.Name, g.Range, names))
		}
		r, _ := sh.Eval()
		for _, q := range sh.Quantities() {
			v, ok := r.Value(q)
			ty, typed := q.Type() // read through the quantity's own sheet
			out = append(out, fmt.Sprintf("%s at %v in %q: %v %v, type %v %v", q.Name, q.Range, q.Group, v, ok, ty, typed))
		}
		for _, c := range sh.Chains() {
			out = append(out, fmt.Sprintf("chain %s at %v: %d stages", c.Name, c.Range, len(c.Stages)))
		}
		return out
	}
	a, z := describe(one), describe(many)
	if len(a) != len(z) {
		t.Fatalf("one core gives %d lines, four cores %d", len(a), len(z))
	}
	for i := range a {
		if a[i] != z[i] {
			t.Fatalf("first difference at line %d:\none core:   %s\nfour cores: %s", i, a[i], z[i])
		}
	}
}
