package chart

import (
	"bytes"
	"errors"
	"math"
	"strings"
	"testing"
)

func TestFreqPlanChart(t *testing.T) {
	spec := FreqPlanSpec{Title: "plan", XLabel: "MHz", YLabel: "order",
		Spans: []Span{{"RF", 902, 928}, {"IF", 257, 283}},
		Marks: []Mark{{902, 928, 2, KindWanted}, {1442, 1468, 2, KindImage}, {1830, 1830, 2, KindHit}, {math.NaN(), 1, 3, KindOther}},
		Tones: []Tone{{"LO", 1185}}}
	var a, b bytes.Buffer
	if err := FreqPlan(&a, spec); err != nil {
		t.Fatal(err)
	}
	if err := FreqPlan(&b, spec); err != nil || !bytes.Equal(a.Bytes(), b.Bytes()) {
		t.Error("the same plan gave different bytes")
	}
	for _, want := range []string{"<svg", "wanted", "image", "product in band", "LO"} {
		if !strings.Contains(a.String(), want) {
			t.Errorf("chart lacks %q", want)
		}
	}
	if err := FreqPlan(&a, FreqPlanSpec{Title: "empty"}); !errors.Is(err, ErrEmpty) {
		t.Errorf("empty plan: %v", err)
	}
}

// Frequencies are never negative, so the axis of a plan that starts near 0 Hz starts at 0
// rather than at the padding's −440 MHz (the demo's plan spans 36.7–7393 MHz).
func TestFreqPlanAxisFromZero(t *testing.T) {
	if lo, hi := planXRange(36.7, 7393); lo != 0 || math.Abs(hi-(7393+0.06*(7393-36.7))) > 1e-9 {
		t.Errorf("axis %g to %g, want 0 to 7834.4", lo, hi)
	}
	// A plan far from 0 Hz keeps its padding on both sides.
	if lo, _ := planXRange(900, 1000); lo != 894 {
		t.Errorf("axis from %g, want 894", lo)
	}
}
