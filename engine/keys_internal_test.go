package engine

import "testing"

// TestStageKeyIndex: the switch of stageKeyIndex gives each stage key its place in stageKeys
// (the order StageValue stores them in), and -1 for anything else.
func TestStageKeyIndex(t *testing.T) {
	for i, k := range stageKeys {
		if got := stageKeyIndex(k); got != i {
			t.Errorf("stageKeyIndex(%q) = %d, want %d", k, got, i)
		}
	}
	if len(stageKeys) != 10 {
		t.Errorf("%d stage keys; StageValue holds 10 and stageKeyIndex knows 10", len(stageKeys))
	}
	for _, k := range []string{"", "stage", "note", "Gain", "nf "} {
		if got := stageKeyIndex(k); got != -1 {
			t.Errorf("stageKeyIndex(%q) = %d, want -1", k, got)
		}
	}
}
