package analysis

import (
	"math"
	"sort"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/units"
)

// budget breaks a decibel focus into its signed line items: the focus's formula is followed
// through the quantities it names for as long as each is a sum and difference of decibel
// terms. It returns nil when the focus is not such a sum.
func budget(sc *engine.Scenario, focus *engine.Quantity) []Contribution {
	s := focus.Sheet()
	fv, ok := sc.Value(focus)
	if !ok || fv.K != units.Level {
		return nil
	}
	b := &budgeter{sh: s, sc: sc}
	if !b.walk(focus, 1, 0) || len(b.items) < 2 {
		return nil
	}
	// The items are in their own units (dBm, dB, dBi); when those references do not cancel
	// against the focus's unit, one line makes up the difference so the total is exact.
	total := 0.0
	for _, it := range b.items {
		total += it.Value
	}
	if d := engine.Number(focus, fv) - total; math.Abs(d) > 1e-9 {
		b.items = append(b.items, Contribution{Item: "reference level conversion", Value: d, Unit: "dB", ref: units.DB(d), Sign: 1})
	}
	// Terms with a reference (dBW, dB/K, dBHz) come first in the order the formula writes
	// them, so that the running total passes through units that mean something (dBW, dBW/K,
	// dBHz); then the gains and losses in dB, largest first.
	sort.SliceStable(b.items, func(i, j int) bool {
		ri, rj := !b.items[i].ref.D.IsNone(), !b.items[j].ref.D.IsNone()
		if ri || rj {
			return ri && !rj
		}
		return math.Abs(b.items[i].Value) > math.Abs(b.items[j].Value)
	})
	runningTotals(b.items)
	return b.items
}

// runningTotals sets each item's running total and the unit the references of the items so
// far leave it in: 78.61 dBHz after a C/N0, 15.60 dB once a dBHz is taken off it.
func runningTotals(items []Contribution) {
	acc, run := units.DB(0), 0.0
	for i := range items {
		it := &items[i]
		run += it.Value
		next, err := units.Add(acc, it.ref)
		if it.Sign < 0 {
			next, err = units.Sub(acc, it.ref)
		}
		if err != nil {
			// A reference with no decibel unit of its own (the inverse of a power, say):
			// keep the dimension, which the unit name then spells out.
			next = units.Q{V: acc.V + float64(it.Sign)*it.ref.V, D: acc.D.Mul(it.ref.D), K: units.Level}
			if it.Sign < 0 {
				next.D = acc.D.Div(it.ref.D)
			}
		}
		acc = next
		it.Total, it.TotalUnit = run, acc.UnitName()
	}
}

type budgeter struct {
	sh    *engine.Sheet
	sc    *engine.Scenario
	items []Contribution
}

// walk adds the terms of q's formula with the given sign; it reports false when a term is
// not a decibel value (the focus is then not a sum of decibel terms).
func (b *budgeter) walk(q *engine.Quantity, sign, depth int) bool {
	terms, ok := b.sh.Terms(q)
	if !ok || depth > 64 {
		return false
	}
	for _, t := range terms {
		s := sign * t.Sign
		if t.Quantity != nil {
			if _, isSum := b.sh.Terms(t.Quantity); isSum {
				if !b.walk(t.Quantity, s, depth+1) {
					return false
				}
				continue
			}
			v, ok := b.sc.Value(t.Quantity)
			if !ok || v.K != units.Level {
				return false
			}
			b.items = append(b.items, Contribution{Item: t.Quantity.Name, Quantity: t.Quantity.Name, Value: float64(s) * engine.Number(t.Quantity, v), Unit: engine.UnitName(t.Quantity), ref: v, Sign: s})
			continue
		}
		v, ok := b.sc.Term(t)
		if !ok || v.K != units.Level {
			return false
		}
		x := v.V
		if u, _ := units.ParseUnit(v.UnitName()); u != nil {
			x, _ = v.In(u)
		}
		b.items = append(b.items, Contribution{Item: q.Name + ": " + t.Text, Quantity: q.Name, Value: float64(s) * x, Unit: v.UnitName(), ref: v, Sign: s})
	}
	return true
}
