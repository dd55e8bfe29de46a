package engine

import (
	"math"

	"github.com/rfledger/rfledger/units"
)

// unitOf returns the unit a quantity's numbers are reported in: its display unit, else the
// unit its type gives.
func unitOf(q *Quantity) *units.Unit {
	if u := q.DisplayUnit(); u != nil && u.Sym != "" {
		return u
	}
	t, _ := q.Type()
	u, err := units.ParseUnit(t.UnitName())
	if err != nil {
		return nil
	}
	return u
}

func unitName(q *Quantity) string {
	if u := unitOf(q); u != nil {
		return u.Sym
	}
	return ""
}

// UnitName returns the symbol of the unit the quantity's numbers are reported in: its display
// unit, else the unit its type gives ("" for a plain number).
func (q *Quantity) UnitName() string { return unitName(q) }

// Number returns a value of the quantity as a number in the unit UnitName reports.
func (q *Quantity) Number(v units.Q) float64 {
	u := unitOf(q)
	if u == nil {
		return v.V
	}
	x, err := v.In(u)
	if err != nil {
		return math.NaN()
	}
	return x
}

// runCone evaluates the nodes of a cone, quietly.
func (r *Result) runCone(cone []int32) {
	r.quiet, r.call.quiet = true, true
	for _, id := range cone {
		r.evalNode(int(id))
	}
}

// restore copies the nominal values of a cone back.
func (r *Result) restore(nom *Result, cone []int32) {
	for _, id := range cone {
		r.vals[id], r.known[id] = nom.vals[id], nom.known[id]
		if n := r.sh.nodes[id]; n.chain != nil {
			copy(r.chains[n.chainIdx].Stages, nom.chains[n.chainIdx].Stages)
			r.chains[n.chainIdx].Memo.Valid = false
		}
	}
}
