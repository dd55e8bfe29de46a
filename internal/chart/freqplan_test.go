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
