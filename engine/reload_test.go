package engine_test

import (
	"os"
	"strings"
	"testing"

	"github.com/rfledger/rfledger/engine"
)

// reload loads text as the demo's edited version, reusing prev's sheet, and evaluates it
// from prev; it also evaluates the edited text from scratch for comparison.
func reload(t *testing.T, prev *engine.Result, text string) (inc, fresh *engine.Result, sh *engine.Sheet) {
	t.Helper()
	files := map[string]string{"s.toml": text}
	sh, diags := sheetFromFiles(files, prev.Sheet())
	if err := diags.Err(); err != nil {
		t.Fatal(err)
	}
	inc, _ = sh.EvalFrom(prev)
	fresh, _ = evalFS(files, "s.toml")
	return inc, fresh, sh
}

func sameValues(t *testing.T, what string, a, b *engine.Result) {
	t.Helper()
	for _, q := range b.Sheet().Quantities() {
		qa, ok := a.Sheet().Quantity(q.Name)
		if !ok {
			t.Fatalf("%s: %s missing", what, q.Name)
		}
		va, ka := a.Value(qa)
		vb, kb := b.Value(q)
		if ka != kb || va != vb {
			t.Errorf("%s: %s = %v (%v) incrementally, %v (%v) from scratch", what, q.Name, va, ka, vb, kb)
		}
	}
	for i, rq := range b.Sheet().Requires {
		pa, ka := a.Pass(a.Sheet().Requires[i])
		pb, kb := b.Pass(rq)
		if pa != pb || ka != kb {
			t.Errorf("%s: requirement %s differs", what, rq.That)
		}
	}
}

// TestEditRecomputesOnlyTheCone: after a one-input edit nothing is parsed again and only the
// input and what depends on it is evaluated; after a one-formula edit, one formula is parsed.
// Either way the values equal a fresh evaluation of the edited sheet.
func TestEditRecomputesOnlyTheCone(t *testing.T) {
	src, err := os.ReadFile(demo)
	if err != nil {
		t.Fatal(err)
	}
	base, _ := sheetFromFiles(map[string]string{"s.toml": string(src)}, nil)
	prev, diags := base.Eval()
	if diags.HasErrors() {
		t.Fatal(diags)
	}
	// One input: the clutter allowance feeds path.loss, rx.level and link.margin.
	text := strings.Replace(string(src), `clutter   = { is = "6 dB"`, `clutter   = { is = "7 dB"`, 1)
	if text == string(src) {
		t.Fatal("the demo's clutter line changed; update the test")
	}
	inc, fresh, sh := reload(t, prev, text)
	sameValues(t, "input edit", inc, fresh)
	if kept, n := engine.Kept(sh); !kept || n != 1 {
		t.Errorf("input edit: model kept %v with %d quantities read again, want true and 1", kept, n)
	}
	if n := engine.Parsed(sh); n != 0 {
		t.Errorf("input edit: %d formulas parsed again, want 0", n)
	}
	if n := engine.Evaluated(inc); n != 5 { // path.clutter, path.loss, rx.level, rx.chain_input, link.margin
		t.Errorf("input edit: %d nodes evaluated, want 5", n)
	}
	// One formula: rx.level gains a term; rx.level, rx.chain_input and link.margin are
	// evaluated again.
	text2 := strings.Replace(text, `"= tx.eirp - path.loss + antenna - cable"`, `"= tx.eirp - path.loss + antenna - cable - 0.5 dB"`, 1)
	inc2, fresh2, sh2 := reload(t, inc, text2)
	sameValues(t, "formula edit", inc2, fresh2)
	if kept, n := engine.Kept(sh2); !kept || n != 1 {
		t.Errorf("formula edit: model kept %v with %d quantities read again, want true and 1", kept, n)
	}
	if n := engine.Parsed(sh2); n != 1 {
		t.Errorf("formula edit: %d formulas parsed, want 1", n)
	}
	if n := engine.Evaluated(inc2); n != 3 {
		t.Errorf("formula edit: %d nodes evaluated, want 3", n)
	}
}
