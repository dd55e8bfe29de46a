package engine

import (
	"math"
	"sort"
	"strings"

	"github.com/expr-lang/expr/ast"
	"github.com/expr-lang/expr/checker"
	"github.com/expr-lang/expr/compiler"
	"github.com/expr-lang/expr/parser"

	"github.com/rfledger/rfledger/units"
)

// budget breaks a decibel focus into its signed line items: the focus's formula is followed
// through the quantities it names for as long as each is a sum and difference of decibel
// terms. It returns nil when the focus is not such a sum.
func (s *Sheet) budget(focus int) []Contribution {
	n := s.nodes[focus]
	if n.code == nil || n.q.Value.K != units.Level {
		return nil
	}
	b := &budgeter{sh: s, e: s.values}
	if !b.isSum(n.code.tree) {
		return nil
	}
	b.expand(focus, 1, 0)
	if b.failed || len(b.items) < 2 {
		return nil
	}
	// The items are in their own units (dBm, dB, dBi); when those references do not cancel
	// against the focus's unit, one line makes up the difference so the total is exact.
	total := 0.0
	for _, it := range b.items {
		total += it.Value
	}
	if d := Number(n.q, n.q.Value) - total; math.Abs(d) > 1e-9 {
		b.items = append(b.items, Contribution{Item: "reference level conversion", Value: d, Unit: "dB"})
	}
	sort.SliceStable(b.items, func(i, j int) bool { return math.Abs(b.items[i].Value) > math.Abs(b.items[j].Value) })
	return b.items
}

type budgeter struct {
	sh     *Sheet
	e      *evaluator
	items  []Contribution
	failed bool
}

func callName(n ast.Node) string {
	c, ok := n.(*ast.CallNode)
	if !ok {
		return ""
	}
	id, _ := c.Callee.(*ast.IdentifierNode)
	if id == nil {
		return ""
	}
	return id.Value
}

// isSum reports whether a formula's top is an addition, subtraction or negation.
func (b *budgeter) isSum(n ast.Node) bool {
	switch callName(n) {
	case "_add", "_sub", "_neg":
		return true
	}
	return false
}

// expand adds the terms of node id's formula with the given sign.
func (b *budgeter) expand(id, sign, depth int) {
	n := b.sh.nodes[id]
	b.walk(n, n.code.tree, sign, depth)
}

func (b *budgeter) walk(owner *node, t ast.Node, sign, depth int) {
	if depth > 64 || b.failed {
		b.failed = true
		return
	}
	if c, ok := t.(*ast.CallNode); ok {
		switch callName(t) {
		case "_add":
			b.walk(owner, c.Arguments[0], sign, depth+1)
			b.walk(owner, c.Arguments[1], sign, depth+1)
			return
		case "_sub":
			b.walk(owner, c.Arguments[0], sign, depth+1)
			b.walk(owner, c.Arguments[1], -sign, depth+1)
			return
		case "_neg":
			b.walk(owner, c.Arguments[0], -sign, depth+1)
			return
		}
	}
	if id, ok := t.(*ast.IdentifierNode); ok && strings.HasPrefix(id.Value, "@") {
		ref := b.sh.byName[id.Value[1:]]
		rn := b.sh.nodes[ref]
		if rn.q != nil && rn.code != nil && b.isSum(rn.code.tree) {
			b.expand(ref, sign, depth+1)
			return
		}
		if rn.q == nil || !rn.q.Known || rn.q.Value.K != units.Level {
			b.failed = true
			return
		}
		b.items = append(b.items, Contribution{Item: rn.name, Quantity: rn.name, Value: float64(sign) * Number(rn.q, rn.q.Value), Unit: unitName(rn.q)})
		return
	}
	v, ok := b.term(t)
	if !ok || v.K != units.Level {
		b.failed = true
		return
	}
	u, _ := units.ParseUnit(v.UnitName())
	x := v.V
	if u != nil {
		x, _ = v.In(u)
	}
	label := owner.name + ": " + printTerm(t, owner.name)
	b.items = append(b.items, Contribution{Item: label, Quantity: owner.name, Value: float64(sign) * x, Unit: v.UnitName()})
}

// term evaluates a sub-expression of a formula on the nominal values.
func (b *budgeter) term(t ast.Node) (units.Q, bool) {
	if c, ok := t.(*ast.ConstantNode); ok {
		q, isQ := c.Value.(units.Q)
		return q, isQ
	}
	env := map[string]any{ctxName: (*Call)(nil)}
	ast.Walk(&t, visitor(func(n *ast.Node) {
		if id, ok := (*n).(*ast.IdentifierNode); ok && strings.HasPrefix(id.Value, "@") {
			if nid, found := b.sh.byName[id.Value[1:]]; found && b.sh.nodes[nid].chain != nil {
				env[id.Value] = (*ChainValue)(nil)
			} else {
				env[id.Value] = units.Q{}
			}
		}
	}))
	tree := &parser.Tree{Node: t}
	cfg := b.sh.fc.config(env)
	if _, err := checker.Check(tree, cfg); err != nil {
		return units.Q{}, false
	}
	prog, err := compiler.Compile(tree, cfg)
	if err != nil {
		return units.Q{}, false
	}
	out, err := b.e.vm.Run(prog, b.e.env)
	q, ok := out.(units.Q)
	return q, ok && err == nil
}

type visitor func(*ast.Node)

func (v visitor) Visit(n *ast.Node) { v(n) }

// printTerm writes a rewritten sub-expression back in worksheet syntax, with names shortened
// relative to the owner's group.
func printTerm(t ast.Node, owner string) string {
	group := ""
	if i := strings.LastIndex(owner, "."); i >= 0 {
		group = owner[:i+1]
	}
	var p func(ast.Node) string
	p = func(n ast.Node) string {
		switch n := n.(type) {
		case *ast.ConstantNode:
			if q, ok := n.Value.(units.Q); ok {
				return q.String()
			}
		case *ast.IdentifierNode:
			return strings.TrimPrefix(strings.TrimPrefix(n.Value, "@"), group)
		case *ast.StringNode:
			return "'" + n.Value + "'"
		case *ast.BoolNode:
			if n.Value {
				return "true"
			}
			return "false"
		case *ast.CallNode:
			name := callName(n)
			if op, ok := opSyms[name]; ok {
				if name == "_neg" {
					return "-" + p(n.Arguments[0])
				}
				return "(" + p(n.Arguments[0]) + " " + op + " " + p(n.Arguments[1]) + ")"
			}
			var args []string
			for _, a := range n.Arguments {
				if id, ok := a.(*ast.IdentifierNode); ok && id.Value == ctxName {
					continue
				}
				args = append(args, p(a))
			}
			return name + "(" + strings.Join(args, ", ") + ")"
		}
		return "…"
	}
	return p(t)
}

var opSyms = map[string]string{"_add": "+", "_sub": "-", "_mul": "*", "_div": "/", "_pow": "^", "_neg": "-",
	"_lt": "<", "_le": "<=", "_gt": ">", "_ge": ">=", "_eq": "==", "_ne": "!="}
