package engine

import (
	"github.com/rfledger/rfledger/units"
)

// Scenario is a private copy of a result whose inputs can be changed, so that what depends
// on them is computed again: the building block of the analyses (sensitivity, worst case,
// Monte Carlo trials, sweeps and solves). Only the quantities of a [Cone] are recomputed.
// A Scenario is not safe for concurrent use; each goroutine takes its own from the result.
type Scenario struct {
	nom *Result
	r   *Result
}

// Scenario returns a new scenario starting from r's values. r is not changed.
func (r *Result) Scenario() *Scenario { return &Scenario{nom: r, r: r.clone()} }

// Cone is what depends on some inputs, in evaluation order: the part of a sheet to compute
// again when they change.
type Cone struct {
	from []int
	ids  []int32
}

// Len returns the number of quantities (and chains) in the cone.
func (c *Cone) Len() int { return len(c.ids) }

// Cone returns what depends on the given inputs. A single input's cone is computed once per
// sheet and kept; its cost is the size of the cone, not of the sheet.
func (s *Sheet) Cone(inputs ...*Quantity) *Cone {
	from := make([]int, len(inputs))
	for i, q := range inputs {
		from[i] = q.node
	}
	if len(from) == 1 {
		return &Cone{from: from, ids: s.cone(from[0])}
	}
	return &Cone{from: from, ids: s.coneOf(from)}
}

// ConeFor returns the part of the inputs' cone that the quantities of depend on: what a
// scenario must compute again to know them after the inputs change, and nothing that only
// other quantities read (an analysis of a focus and its requirements recomputes no more).
func (s *Sheet) ConeFor(of []*Quantity, inputs ...*Quantity) *Cone {
	c := s.Cone(inputs...)
	sinks := make([]int, len(of))
	for i, q := range of {
		sinks[i] = q.node
	}
	need := s.upstream(sinks...)
	ids := make([]int32, 0, len(c.ids))
	for _, id := range c.ids {
		if need[id] {
			ids = append(ids, id)
		}
	}
	return &Cone{from: c.from, ids: ids}
}

// Inputs returns the input quantities the given quantities depend on, in file order.
func (s *Sheet) Inputs(of ...*Quantity) []*Quantity {
	ids := make([]int, len(of))
	for i, q := range of {
		ids[i] = q.node
	}
	var out []*Quantity
	for _, id := range s.upstreamInputs(ids...) {
		out = append(out, s.nodes[id].q)
	}
	return out
}

// Quantities returns the quantities a requirement's formula names.
func (rq *Require) Quantities() []*Quantity {
	var out []*Quantity
	if rq.code == nil {
		return nil
	}
	for _, d := range rq.deps {
		if q := rq.sheet.nodes[d].q; q != nil {
			out = append(out, q)
		}
	}
	return out
}

// Set gives input q the value v, which must be of q's type (its dimension and decibel form,
// as Quantity.Nominal and Result.Value give it). It reports false, changing nothing, for a
// quantity that is not a usable input or a value of another type. Run the input's cone to
// see the effect.
func (sc *Scenario) Set(q *Quantity, v units.Q) bool {
	n := sc.r.sh.nodes[q.node]
	if n.q != q || q.Formula != "" || !n.ok || v.D != n.ty.D || v.K != n.ty.K {
		return false
	}
	sc.r.vals[q.node], sc.r.known[q.node] = v.V, true
	return true
}

// Run computes the cone's quantities again from the inputs as they are set, quietly (no
// warnings are recorded).
func (sc *Scenario) Run(c *Cone) { sc.r.runCone(c.ids) }

// Reset puts the nominal values back on the cone and on the inputs it starts from.
func (sc *Scenario) Reset(c *Cone) {
	for _, id := range c.from {
		sc.r.vals[id], sc.r.known[id] = sc.nom.vals[id], sc.nom.known[id]
	}
	sc.r.restore(sc.nom, c.ids)
}

// Pass returns whether a requirement holds in the scenario as Holds last evaluated it.
func (sc *Scenario) Pass(rq *Require) (pass, known bool) { return sc.r.Pass(rq) }

// Value returns a quantity's value in the scenario.
func (sc *Scenario) Value(q *Quantity) (units.Q, bool) { return sc.r.Value(q) }

// Holds evaluates every requirement in the scenario and reports whether all of them hold.
func (sc *Scenario) Holds() bool {
	if t := sc.r.call.tally; t != nil {
		t.node = -1 // a requirement's own formula belongs to no quantity
	}
	sc.r.requirements()
	return sc.r.allPass()
}

// Term is one signed term of a formula that is a sum and difference of terms: either a
// quantity the formula names (Quantity is set), or another expression, shown as Text and
// computed by Scenario.Term.
type Term struct {
	Sign     int       // +1 or −1
	Quantity *Quantity // the quantity the term names, nil for another expression
	Text     string    // the term in worksheet syntax, names relative to the formula's group
	x        *inode
}

// Terms returns the signed terms of q's formula when its top is an addition, subtraction or
// negation; ok is false otherwise.
func (s *Sheet) Terms(q *Quantity) (terms []Term, ok bool) {
	n := s.nodes[q.node]
	if n.code == nil || !n.typed || !isSum(n.code) {
		return nil, false
	}
	var walk func(x *inode, sign int)
	walk = func(x *inode, sign int) {
		switch x.op {
		case opAdd:
			walk(x.kids[0], sign)
			walk(x.kids[1], sign)
			return
		case opSub:
			walk(x.kids[0], sign)
			walk(x.kids[1], -sign)
			return
		case opNeg:
			walk(x.kids[0], -sign)
			return
		}
		t := Term{Sign: sign, Text: printTerm(s, x, n.name), x: x}
		if x.op == opSlot {
			t.Quantity = s.nodes[x.id].q
		}
		terms = append(terms, t)
	}
	walk(n.code, 1)
	return terms, true
}

// Term computes a term's value in the scenario.
func (sc *Scenario) Term(t Term) (units.Q, bool) {
	if t.Quantity != nil {
		return sc.Value(t.Quantity)
	}
	if t.x == nil || t.x.typ != tQ || t.x.eval == nil {
		return units.Q{}, false
	}
	v, err := t.x.eval(sc.r)
	if err != nil {
		return units.Q{}, false
	}
	q := t.x.ty
	q.V = v
	return q, true
}
