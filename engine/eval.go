package engine

import (
	"sort"
	"strings"
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
