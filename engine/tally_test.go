package engine_test

import (
	"math"
	"strings"
	"testing"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/units"
)

const tallySheet = `
focus = "loss"
f     = "868 MHz"
d     = "2 km"
d0    = "100 m"
n     = 3.0
loss  = "= logdist(d, f, d0, n)"
`

// TestScenarioTallies runs a scenario at distances on both sides of the reference distance
// d0: logdist warns below d0 (its documented range, Rappaport's log-distance model is
// anchored at d0), so exactly the points below 100 m are counted, as one warning whose
// message is the first such point's, whatever the distance reads there.
func TestScenarioTallies(t *testing.T) {
	r := evalSrc(t, tallySheet)
	sh := r.Sheet()
	d, _ := sh.Quantity("d")
	loss, _ := sh.Quantity("loss")
	sc := r.Scenario()
	cone := sh.Cone(d)
	metres := []float64{2000, 50, 80, 300, 20, 99.9, 100}
	for i, m := range metres {
		sc.Point(i)
		sc.Set(d, units.Lin(m, units.Length))
		sc.Run(cone)
	}
	ts := sc.Tallies()
	if len(ts) != 1 {
		t.Fatalf("tallies = %+v, want one", ts)
	}
	got := ts[0]
	if got.Quantity != loss || got.Points != 4 || got.First != 1 || got.Last != 5 {
		t.Errorf("tally = %s %d points, first %d, last %d; want loss, 4 points (50, 80, 20, 99.9 m), first 1, last 5", got.Quantity.Name, got.Points, got.First, got.Last)
	}
	if !strings.Contains(got.Message, "distance 50 m is shorter than the reference distance") {
		t.Errorf("message %q, want the first point's (50 m)", got.Message)
	}
	// Running the same point again does not count it twice; a negative point stops counting.
	sc.Run(cone)
	sc.Point(-1)
	sc.Set(d, units.Lin(10, units.Length))
	sc.Run(cone)
	if ts := sc.Tallies(); ts[0].Points != 4 {
		t.Errorf("after a repeated and an uncounted run: %d points, want 4", ts[0].Points)
	}
	// The nominal result has no warning and is not changed by the scenario.
	if w := r.Warnings(loss); len(w) != 0 {
		t.Errorf("nominal warnings %q", w)
	}
}

// TestMergeTallies adds two workers' counts of one warning: the sum, and the message of the
// earlier point, whichever worker comes first.
func TestMergeTallies(t *testing.T) {
	r := evalSrc(t, tallySheet)
	sh := r.Sheet()
	d, _ := sh.Quantity("d")
	cone := sh.Cone(d)
	run := func(points []int, metres []float64) []engine.Tally {
		sc := r.Scenario()
		for i, p := range points {
			sc.Point(p)
			sc.Set(d, units.Lin(metres[i], units.Length))
			sc.Run(cone)
		}
		return sc.Tallies()
	}
	a := run([]int{5, 7}, []float64{60, 70})
	b := run([]int{2, 9}, []float64{30, 2000})
	for _, m := range [][]engine.Tally{engine.MergeTallies(a, b), engine.MergeTallies(b, a)} {
		if len(m) != 1 || m[0].Points != 3 || m[0].First != 2 || m[0].Last != 7 || !strings.Contains(m[0].Message, "distance 30 m") {
			t.Errorf("merged = %+v, want 3 points, first 2 (30 m), last 7", m)
		}
	}
}

// TestTallyNoAllocs: a counted point that raises no warning allocates nothing (the Monte
// Carlo run's budget is zero allocations per trial), and counting a warning already seen adds
// no allocation.
func TestTallyNoAllocs(t *testing.T) {
	r := evalSrc(t, tallySheet)
	sh := r.Sheet()
	d, _ := sh.Quantity("d")
	cone := sh.Cone(d)
	sc := r.Scenario()
	i := 0
	clean := testing.AllocsPerRun(200, func() {
		i++
		sc.Point(i)
		sc.Set(d, units.Lin(1000+float64(i), units.Length))
		sc.Run(cone)
	})
	if clean != 0 {
		t.Errorf("%v allocations per clean point, want 0", clean)
	}
	// A point below d0 raises the warning again: counting it costs nothing beyond what the
	// function's own call allocates for its message's arguments, the same as an uncounted run.
	warned := testing.AllocsPerRun(200, func() {
		i++
		sc.Point(i)
		sc.Set(d, units.Lin(50, units.Length))
		sc.Run(cone)
	})
	quiet := r.Scenario()
	uncounted := testing.AllocsPerRun(200, func() {
		quiet.Set(d, units.Lin(50, units.Length))
		quiet.Run(cone)
	})
	if warned != uncounted {
		t.Errorf("a counted warned point allocates %v times, an uncounted one %v", warned, uncounted)
	}
	if ts := sc.Tallies(); len(ts) != 1 || ts[0].Points < 200 {
		t.Errorf("tallies %+v, want the warning counted at every warned point", ts)
	}
}

// TestConeFor: the part of an input's cone that a quantity reads is all a scenario computes
// for it: with d moved below the reference distance, the loss that the margin reads is
// recomputed (and its logdist warning counted, as in TestScenarioTallies), while a second
// loss that nothing asked for keeps its nominal value and raises no warning.
func TestConeFor(t *testing.T) {
	r := evalSrc(t, tallySheet+`other = "= logdist(d, f, d0, 2.0)"
margin = "= 140 dB - loss"
`)
	sh := r.Sheet()
	d, _ := sh.Quantity("d")
	loss, _ := sh.Quantity("loss")
	other, _ := sh.Quantity("other")
	margin, _ := sh.Quantity("margin")
	if all := sh.Cone(d); all.Len() != 3 {
		t.Fatalf("d's cone holds %d quantities, want 3 (loss, other, margin)", all.Len())
	}
	cone := sh.ConeFor([]*engine.Quantity{margin}, d)
	if cone.Len() != 2 {
		t.Fatalf("the part of d's cone that margin reads holds %d quantities, want 2 (loss, margin)", cone.Len())
	}
	sc := r.Scenario()
	sc.Point(0)
	sc.Set(d, units.Lin(50, units.Length))
	sc.Run(cone)
	// Rappaport's log-distance model: L(d) = L(d0) + 10·n·log10(d/d0), so moving d from 2 km
	// to 50 m at n = 3 changes the loss by 30·log10(50/2000) = −48.06 dB (the model is then
	// outside its range, below d0: hence the warning).
	lv, _ := sc.Value(loss)
	ln, _ := r.Value(loss)
	near(t, "loss at 50 m less the nominal one at 2 km", lv.V-ln.V, 30*math.Log10(50.0/2000), 1e-9)
	if ov, _ := sc.Value(other); ov != func() units.Q { v, _ := r.Value(other); return v }() {
		t.Errorf("other was recomputed: %v", ov)
	}
	ts := sc.Tallies()
	if len(ts) != 1 || ts[0].Quantity != loss {
		t.Errorf("tallies %+v, want loss's warning alone", ts)
	}
}
