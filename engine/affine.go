package engine

import "slices"

// Linear is the affine form of some quantities in some inputs around a result: when every
// formula on the way from the inputs to the quantities is a sum, difference or negation of
// its terms, or a product or quotient by something the inputs do not change, each quantity
// is its value in the result plus a fixed multiple of each input's change. A sum of decibel
// terms along a feeder is the common case. Analyses use it to get every input's effect from
// one backward pass over the formulas (reverse-mode differentiation), instead of computing
// each input's cone again: the cost is the size of the formulas once, not inputs × cone.
// The values agree with those a recomputation gives to within rounding.
type Linear struct {
	ins  []int     // the inputs' nodes
	x0   []float64 // the inputs' values in the result
	of   []int     // the quantities' nodes: those asked for, then requirement subjects
	v0   []float64 // their values in the result
	coef []float64 // d of[k] / d ins[i] at coef[k*len(ins)+i], in the numbers of their types
}

// Linear returns the affine form of the given quantities in the given inputs around r's
// values; ok is false when one of them is not affine in the inputs (a function of one of
// them, a condition, a chain, a product of two of them) or could not be evaluated in r.
// With trials set, as for Monte Carlo trials, the form covers every node a requirement
// reads as well, so that Scenario.Holds can follow RunLinear, and ok is also false when
// anything the inputs reach calls a function: recomputing it would count the function's
// validity warnings at each point (Scenario.Point), which RunLinear does not.
func (r *Result) Linear(inputs, of []*Quantity, trials bool) (*Linear, bool) {
	s := r.sh
	l := &Linear{}
	varying := make([]bool, len(s.nodes))
	from := make([]int, 0, len(inputs))
	for _, q := range inputs {
		n := s.nodes[q.node]
		if n.q != q || q.Formula != "" || !r.known[q.node] || varying[q.node] {
			return nil, false
		}
		varying[q.node] = true
		from = append(from, q.node)
		l.ins = append(l.ins, q.node)
		l.x0 = append(l.x0, r.vals[q.node])
	}
	for _, id := range s.coneOf(from) {
		varying[id] = true
		if n := s.nodes[id]; trials && (n.chain != nil || hasCall(n.code)) {
			return nil, false
		}
	}
	sinks := make([]int, 0, len(of))
	seen := map[int]bool{}
	add := func(id int) {
		if !seen[id] {
			seen[id] = true
			sinks = append(sinks, id)
		}
	}
	for _, q := range of {
		add(q.node)
	}
	if trials {
		for _, rq := range s.Requires {
			for _, d := range rq.deps {
				add(d)
			}
		}
	}
	lin := linearizer{r: r, varying: varying, adj: make([]float64, len(s.nodes))}
	for _, id := range sinks {
		if !r.known[id] {
			return nil, false
		}
		row, ok := lin.gradient(id, l.ins)
		if !ok {
			return nil, false
		}
		l.of = append(l.of, id)
		l.v0 = append(l.v0, r.vals[id])
		l.coef = append(l.coef, row...)
	}
	return l, true
}

// Coef returns d(quantity k)/d(input i): k indexes the quantities Linear was given, i its
// inputs.
func (l *Linear) Coef(k, i int) float64 { return l.coef[k*len(l.ins)+i] }

// At returns the value quantity k takes when input i alone moves from its value in the
// result to x; ok is false when that is not a finite number.
func (l *Linear) At(k, i int, x float64) (float64, bool) {
	v := l.v0[k] + l.Coef(k, i)*(x-l.x0[i])
	return v, !isBad(v)
}

func isBad(v float64) bool { return v-v != 0 } // NaN or ±Inf

// linearizer finds the derivatives of one quantity with respect to the varying nodes.
type linearizer struct {
	r       *Result
	varying []bool    // the inputs and what depends on them
	adj     []float64 // d sink / d node, zero between calls
	nodes   []int     // the varying ancestors of the sink, scratch
	mark    []bool
}

// gradient returns d(sink)/d(input) for each of the inputs, by one backward pass over the
// varying formulas the sink depends on, in reverse evaluation order so that every node's
// derivative is complete before it is passed on to the node's own terms.
func (lz *linearizer) gradient(sink int, inputs []int) ([]float64, bool) {
	s := lz.r.sh
	out := make([]float64, len(inputs))
	if !lz.varying[sink] {
		return out, true // the inputs do not reach it
	}
	if lz.mark == nil {
		lz.mark = make([]bool, len(s.nodes))
	}
	lz.nodes = lz.nodes[:0]
	stack := []int{sink}
	lz.mark[sink] = true
	for len(stack) > 0 {
		id := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		lz.nodes = append(lz.nodes, id)
		for _, d := range s.nodes[id].deps {
			if lz.varying[d] && !lz.mark[d] {
				lz.mark[d] = true
				stack = append(stack, d)
			}
		}
	}
	defer func() {
		for _, id := range lz.nodes {
			lz.mark[id], lz.adj[id] = false, 0
		}
	}()
	slices.SortFunc(lz.nodes, func(a, b int) int { return s.pos[b] - s.pos[a] })
	lz.adj[sink] = 1
	for _, id := range lz.nodes {
		n := s.nodes[id]
		if n.code == nil {
			if n.chain != nil || n.q == nil {
				return nil, false
			}
			continue // an input: a leaf
		}
		if !n.ok || !n.typed || !lz.terms(n.code, lz.adj[id]) {
			return nil, false
		}
	}
	for i, id := range inputs {
		out[i] = lz.adj[id]
	}
	return out, true
}

// terms passes the derivative m of a formula's value on to the varying quantities of
// subtree x; it reports false when x is not affine in them.
func (lz *linearizer) terms(x *inode, m float64) bool {
	if !lz.varies(x) {
		return true
	}
	switch x.op {
	case opSlot:
		lz.adj[x.id] += m
		return true
	case opAdd:
		return lz.terms(x.kids[0], m) && lz.terms(x.kids[1], m)
	case opSub:
		return lz.terms(x.kids[0], m) && lz.terms(x.kids[1], -m)
	case opNeg:
		return lz.terms(x.kids[0], -m)
	case opMul:
		a, b := x.kids[0], x.kids[1]
		if !lz.varies(a) {
			c, ok := lz.value(a)
			return ok && lz.terms(b, m*c)
		}
		if !lz.varies(b) {
			c, ok := lz.value(b)
			return ok && lz.terms(a, m*c)
		}
	case opDiv:
		if b := x.kids[1]; !lz.varies(b) {
			c, ok := lz.value(b)
			return ok && c != 0 && lz.terms(x.kids[0], m/c)
		}
	}
	return false
}

// hasCall reports whether subtree x calls a function.
func hasCall(x *inode) bool {
	if x == nil {
		return false
	}
	if x.op == opCall {
		return true
	}
	for _, k := range x.kids {
		if hasCall(k) {
			return true
		}
	}
	return false
}

// varies reports whether subtree x names a varying node.
func (lz *linearizer) varies(x *inode) bool {
	if x == nil {
		return false
	}
	if (x.op == opSlot || x.op == opChain) && lz.varying[x.id] {
		return true
	}
	for _, k := range x.kids {
		if lz.varies(k) {
			return true
		}
	}
	return false
}

// value computes a subtree that the inputs do not change, as its closure would; ok is
// false for anything but arithmetic on constants and quantities.
func (lz *linearizer) value(x *inode) (float64, bool) {
	if x.typ != tQ {
		return 0, false
	}
	if x.isConst {
		return x.cval, true
	}
	switch x.op {
	case opSlot:
		return lz.r.vals[x.id], lz.r.known[x.id]
	case opNeg:
		v, ok := lz.value(x.kids[0])
		return -v, ok
	case opAdd, opSub, opMul, opDiv:
		a, oka := lz.value(x.kids[0])
		b, okb := lz.value(x.kids[1])
		if !oka || !okb {
			return 0, false
		}
		switch x.op {
		case opAdd:
			return a + b, true
		case opSub:
			return a - b, true
		case opMul:
			return a * b, true
		}
		return a / b, true
	}
	return 0, false
}

// RunLinear sets the inputs of l to x (in l's input order, in the numbers of their types)
// and computes l's quantities from their affine form; what else depends on the inputs is
// not computed. Value and Holds then see the new values of l's quantities; Reset with the
// inputs' cone puts the nominal values back.
func (sc *Scenario) RunLinear(l *Linear, x []float64) {
	r := sc.r
	n := len(l.ins)
	for k, id := range l.of {
		v := l.v0[k]
		row := l.coef[k*n : (k+1)*n]
		for i, c := range row {
			v += c * (x[i] - l.x0[i])
		}
		r.vals[id], r.known[id] = v, !isBad(v)
	}
}
