package engine

import (
	"fmt"
	"sort"
	"strings"

	"github.com/expr-lang/expr/vm"

	"github.com/rfledger/rfledger/units"
)

func sortStrings(s []string) { sort.Strings(s) }

// sortGraph returns the nodes in evaluation order and reports every cycle once, spelled out.
// Nodes on a cycle (and what depends on them) are left out of the order.
func (l *loader) sortGraph() []int {
	nodes := l.sh.nodes
	const (
		white = iota
		grey
		black
	)
	color := make([]uint8, len(nodes))
	order := make([]int, 0, len(nodes))
	onCycle := make([]bool, len(nodes))
	// Iterative depth-first search, so a long chain of references cannot overflow the stack.
	type frame struct{ id, next int }
	var stack []frame
	var path []int
	for root := range nodes {
		if color[root] != white {
			continue
		}
		stack = append(stack[:0], frame{root, 0})
		path = append(path[:0], root)
		color[root] = grey
		for len(stack) > 0 {
			top := &stack[len(stack)-1]
			deps := nodes[top.id].deps
			if top.next < len(deps) {
				d := deps[top.next]
				top.next++
				switch color[d] {
				case white:
					color[d] = grey
					stack = append(stack, frame{d, 0})
					path = append(path, d)
				case grey:
					l.cycle(path, d, onCycle)
				}
				continue
			}
			color[top.id] = black
			order = append(order, top.id)
			stack = stack[:len(stack)-1]
			path = path[:len(path)-1]
		}
	}
	// Drop what sits on or depends on a cycle; the cycle was reported.
	bad := onCycle
	out := order[:0]
	for _, id := range order {
		for _, d := range nodes[id].deps {
			if bad[d] {
				bad[id] = true
			}
		}
		if !bad[id] {
			out = append(out, id)
		} else {
			nodes[id].ok = false
		}
	}
	return out
}

// cycle reports the loop that closes at node d.
func (l *loader) cycle(path []int, d int, onCycle []bool) {
	start := 0
	for i, id := range path {
		if id == d {
			start = i
		}
	}
	loop := path[start:]
	// Report once, at the first member in file order, starting the loop there.
	first := 0
	for i, id := range loop {
		if onCycle[id] {
			return // already reported through another entry
		}
		if id < loop[first] {
			first = i
		}
	}
	var names []string
	for i := range loop {
		names = append(names, l.sh.nodes[loop[(first+i)%len(loop)]].name)
	}
	names = append(names, names[0])
	head := l.sh.nodes[loop[first]]
	r := Range{File: l.sh.File}
	switch {
	case head.q != nil:
		r = head.q.Range
	case head.chain != nil:
		r = head.chain.Range
	}
	l.errAt(r, head.name, "break the loop: one of these must be an input", "circular definition: %s", strings.Join(names, " -> "))
	for _, id := range loop {
		onCycle[id] = true
	}
}

// buildChain gathers a chain's stage values.
func buildChain(c *Chain, get func(*Quantity) (units.Q, bool)) *ChainValue {
	cv := &ChainValue{Name: c.Name, Stages: make([]StageValue, len(c.Stages))}
	for i, st := range c.Stages {
		cv.Stages[i].Label = st.Label
		for _, k := range st.Keys {
			if v, ok := get(st.Values[k]); ok {
				cv.Stages[i].set(k, v)
			}
		}
	}
	return cv
}

// evaluator evaluates a sheet's graph over one value store. It is not safe for concurrent
// use; analyses give each goroutine its own.
type evaluator struct {
	sh     *Sheet
	env    map[string]any
	failed []bool
	vm     vm.VM
	call   Call
}

func (s *Sheet) newEvaluator(quiet bool) *evaluator {
	e := &evaluator{sh: s, env: make(map[string]any, len(s.nodes)+1), failed: make([]bool, len(s.nodes))}
	e.call.quiet = quiet
	e.env[ctxName] = &e.call
	for id, n := range s.nodes {
		if !n.ok {
			e.failed[id] = true
		}
	}
	return e
}

// evalNode computes one node from the values of its dependencies.
func (e *evaluator) evalNode(id int) error {
	n := e.sh.nodes[id]
	if !n.ok {
		e.failed[id] = true
		return nil
	}
	for _, d := range n.deps {
		if e.failed[d] {
			e.failed[id] = true
			return nil
		}
	}
	switch {
	case n.chain != nil:
		e.env[n.env] = buildChain(n.chain, func(q *Quantity) (units.Q, bool) {
			v, ok := e.env["@"+q.Name].(units.Q)
			return v, ok && !e.failed[q.node]
		})
	case n.code == nil:
		e.env[n.env] = n.input
	default:
		out, err := e.vm.Run(n.code.prog, e.env)
		if err != nil {
			e.failed[id] = true
			return err
		}
		q, ok := out.(units.Q)
		if !ok {
			e.failed[id] = true
			return fmt.Errorf("formula did not give a quantity")
		}
		if !finite(q) {
			e.failed[id] = true
			return fmt.Errorf("result is %s", units.FormatNum(q.V))
		}
		e.env[n.env] = out
	}
	e.failed[id] = false
	return nil
}

// Eval evaluates every quantity and requirement. Values land in the sheet's quantities;
// the diagnostics are the run-time errors and the validity warnings, positioned at the
// quantity concerned. A failed quantity is unknown and what depends on it is skipped quietly.
func (s *Sheet) Eval() Diagnostics {
	e := s.newEvaluator(false)
	var diags Diagnostics
	for _, id := range s.order {
		n := s.nodes[id]
		e.call.warnings = e.call.warnings[:0]
		err := e.evalNode(id)
		if n.q == nil {
			continue
		}
		for _, w := range e.call.warnings {
			n.q.Warnings = append(n.q.Warnings, w)
			diags = append(diags, Diagnostic{Severity: Warning, Quantity: n.q.Name, Summary: w, Range: n.q.Range})
		}
		if err != nil {
			msg, hint, from := runtimeErr(err)
			r := n.q.Range
			if n.at.f != nil {
				r = formulaRange(n.at, n.q.Formula, from)
			}
			diags = append(diags, Diagnostic{Severity: Error, Quantity: n.q.Name, Summary: msg, Hint: hint, Range: r})
		}
		if v, ok := e.env[n.env].(units.Q); ok && !e.failed[id] {
			n.q.Value, n.q.Known = v, true
		} else {
			n.q.Known = false
		}
	}
	for _, rq := range s.Requires {
		rq.Known = false
		if rq.prog == nil {
			continue
		}
		skip := false
		for _, d := range rq.prog.deps {
			skip = skip || e.failed[d]
		}
		if skip {
			continue
		}
		out, err := e.vm.Run(rq.prog.prog, e.env)
		if err != nil {
			msg, hint, from := runtimeErr(err)
			r := rq.Range
			if rq.at.f != nil {
				r = formulaRange(rq.at, rq.That, from)
			}
			diags = append(diags, Diagnostic{Severity: Error, Quantity: "require", Summary: msg, Hint: hint, Range: r})
			continue
		}
		rq.Pass, rq.Known = out.(bool), true
	}
	s.values = e
	return sortDiags(diags)
}
