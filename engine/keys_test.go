package engine_test

import (
	"regexp"
	"slices"
	"testing"

	"github.com/rfledger/rfledger/engine"
)

// TestWorksheetKeys: every key is described and listed once in its table, the patterns
// compile, and the lists handed out are the caller's own (changing them changes no load).
func TestWorksheetKeys(t *testing.T) {
	ks := engine.WorksheetKeys()
	tables := map[string][]engine.Key{
		"top": ks.Top, "quantity": ks.Quantity, "stage": append(slices.Clone(ks.StageText), ks.StageValue...),
		"require": ks.Require, "sweep": ks.Sweep, "solve": ks.Solve, "spurs": ks.Spurs, "products": ks.Products,
	}
	for name, keys := range tables {
		seen := map[string]bool{}
		for _, k := range keys {
			if seen[k.Name] {
				t.Errorf("%s: %q listed twice", name, k.Name)
			}
			seen[k.Name] = true
			if len(k.Doc) < 10 {
				t.Errorf("%s: %q has no description", name, k.Name)
			}
		}
		if len(keys) == 0 {
			t.Errorf("%s: no keys", name)
		}
	}
	for _, p := range []string{ks.NamePattern, ks.RejectPattern, ks.MacroPattern} {
		if _, err := regexp.Compile(p); err != nil {
			t.Errorf("pattern %q: %v", p, err)
		}
	}
	if !slices.IsSorted(ks.Builtins) || !slices.Contains(ks.Builtins, "pi") {
		t.Errorf("builtins %v", ks.Builtins)
	}
	ks.Quantity[0].Name = "changed"
	if engine.WorksheetKeys().Quantity[0].Name != "is" {
		t.Error("WorksheetKeys hands out the loader's own list")
	}
}
