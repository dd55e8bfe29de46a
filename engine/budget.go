package engine

import (
	"math"
	"sort"
	"strings"

	"github.com/rfledger/rfledger/units"
)

// budget breaks a decibel focus into its signed line items: the focus's formula is followed
// through the quantities it names for as long as each is a sum and difference of decibel
// terms. It returns nil when the focus is not such a sum.
func (s *Sheet) budget(r *Result, focus int) []Contribution {
	n := s.nodes[focus]
	if n.code == nil || n.ty.K != units.Level {
		return nil
	}
	b := &budgeter{sh: s, r: r}
	if !isSum(n.code) {
		return nil
	}
	b.walk(n, n.code, 1, 0)
	if b.failed || len(b.items) < 2 {
		return nil
	}
	// The items are in their own units (dBm, dB, dBi); when those references do not cancel
	// against the focus's unit, one line makes up the difference so the total is exact.
	total := 0.0
	for _, it := range b.items {
		total += it.Value
	}
	fv, _ := r.Value(n.q)
	if d := Number(n.q, fv) - total; math.Abs(d) > 1e-9 {
		b.items = append(b.items, Contribution{Item: "reference level conversion", Value: d, Unit: "dB"})
	}
	sort.SliceStable(b.items, func(i, j int) bool { return math.Abs(b.items[i].Value) > math.Abs(b.items[j].Value) })
	return b.items
}

type budgeter struct {
	sh     *Sheet
	r      *Result
	items  []Contribution
	failed bool
}

// isSum reports whether a formula's top is an addition, subtraction or negation.
func isSum(x *inode) bool { return x.op == opAdd || x.op == opSub || x.op == opNeg }

func (b *budgeter) walk(owner *node, t *inode, sign, depth int) {
	if depth > 256 || b.failed {
		b.failed = true
		return
	}
	switch t.op {
	case opAdd:
		b.walk(owner, t.kids[0], sign, depth+1)
		b.walk(owner, t.kids[1], sign, depth+1)
		return
	case opSub:
		b.walk(owner, t.kids[0], sign, depth+1)
		b.walk(owner, t.kids[1], -sign, depth+1)
		return
	case opNeg:
		b.walk(owner, t.kids[0], -sign, depth+1)
		return
	case opSlot:
		rn := b.sh.nodes[t.id]
		if rn.q != nil && rn.code != nil && isSum(rn.code) {
			b.walk(rn, rn.code, sign, depth+1)
			return
		}
		v, ok := b.r.Value(rn.q)
		if !ok || v.K != units.Level {
			b.failed = true
			return
		}
		b.items = append(b.items, Contribution{Item: rn.name, Quantity: rn.name, Value: float64(sign) * Number(rn.q, v), Unit: unitName(rn.q)})
		return
	}
	// Any other term is evaluated on the nominal values, from its own closure.
	if t.typ != tQ || t.ty.K != units.Level || t.eval == nil {
		b.failed = true
		return
	}
	x, err := t.eval(b.r)
	if err != nil {
		b.failed = true
		return
	}
	v := t.ty
	v.V = x
	if u, _ := units.ParseUnit(v.UnitName()); u != nil {
		x, _ = v.In(u)
	}
	label := owner.name + ": " + printTerm(b.sh, t, owner.name)
	b.items = append(b.items, Contribution{Item: label, Quantity: owner.name, Value: float64(sign) * x, Unit: v.UnitName()})
}

// printTerm writes a term of a formula back in worksheet syntax, with names shortened
// relative to the owner's group.
func printTerm(s *Sheet, t *inode, owner string) string {
	group := ""
	if i := strings.LastIndex(owner, "."); i >= 0 {
		group = owner[:i+1]
	}
	var p func(*inode) string
	p = func(x *inode) string {
		switch x.op {
		case opConst:
			return x.q.String()
		case opSlot, opChain:
			return strings.TrimPrefix(s.nodes[x.id].name, group)
		case opStr:
			return "'" + x.text + "'"
		case opBool:
			if x.b {
				return "true"
			}
			return "false"
		case opNeg, opNot:
			return opSym[x.op] + p(x.kids[0])
		case opCall:
			var args []string
			for _, a := range x.kids {
				args = append(args, p(a))
			}
			return x.fn.Name + "(" + strings.Join(args, ", ") + ")"
		case opCond:
			return "(" + p(x.kids[0]) + " ? " + p(x.kids[1]) + " : " + p(x.kids[2]) + ")"
		}
		if len(x.kids) == 2 && int(x.op) < len(opSym) && opSym[x.op] != "" {
			return "(" + p(x.kids[0]) + " " + opSym[x.op] + " " + p(x.kids[1]) + ")"
		}
		return "…"
	}
	return p(t)
}
