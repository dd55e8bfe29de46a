package engine

import (
	"fmt"
	"runtime"
	"sync"
)

// compile parses and lowers every formula (in parallel: each formula's result is stored at
// its own index, so the outcome does not depend on the number of workers), orders the graph,
// then checks every formula's units in evaluation order.
func (l *loader) compile(prev *Sheet) {
	sh := l.sh
	sites := append(append([]site(nil), l.formulaSites...), l.reqSites...)
	texts := make([]string, len(sites))
	todo := make([]bool, len(sites))
	for i, st := range sites {
		if st.req != nil {
			texts[i], todo[i] = st.req.That, true
			continue
		}
		n := sh.nodes[st.node]
		texts[i], todo[i] = n.q.Formula, n.ok && n.q.Formula != ""
	}
	reuse := prev.parses()
	// A formula text written many times (the same line in every group) is parsed once.
	first := make(map[string]int, len(sites))
	unique := make([]int, 0, len(sites))
	for i := range sites {
		if !todo[i] {
			continue
		}
		if _, seen := first[texts[i]]; !seen {
			first[texts[i]] = i
			unique = append(unique, i)
		}
	}
	parses := make([]*parsed, len(sites))
	parallel(len(unique), func(j int) {
		i := unique[j]
		if p, ok := reuse[texts[i]]; ok {
			parses[i] = p
		} else {
			parses[i] = parseFormula(sh.lib, texts[i])
		}
	})
	type lowered struct {
		p    *parsed
		code *inode
		deps []int
		errs []ferr
	}
	out := make([]lowered, len(sites))
	work := func(i int) {
		if !todo[i] {
			return
		}
		p := parses[first[texts[i]]]
		o := &out[i]
		o.p = p
		if len(p.errs) > 0 {
			o.errs = p.errs
			return
		}
		lw := &lowerer{sh: sh, lib: sh.lib, sc: sites[i].sc, lits: p.lits, seen: map[int]bool{}}
		if lw.lib == nil {
			lw.lib = emptyLibrary
		}
		o.code = lw.lower(p.tree.Node, 0)
		o.deps, o.errs = lw.deps, lw.errs
	}
	parallel(len(sites), work)
	for i, st := range sites {
		if st.req == nil {
			sh.nodes[st.node].at = st // where every quantity stands, for a reload that keeps the model (keep.go)
		}
		if !todo[i] {
			continue
		}
		o := out[i]
		for k := range o.errs {
			if o.errs[k].unknown != "" {
				o.errs[k].hint = l.suggest(o.errs[k].unknown, st.sc)
			}
		}
		if _, ok := reuse[texts[i]]; !ok && first[texts[i]] == i {
			sh.nparsed++
		}
		if st.req != nil {
			st.req.parsed = o.p
			if len(o.errs) > 0 || o.code == nil {
				l.formulaErrs(st, "require", texts[i], o.errs)
				continue
			}
			st.req.code, st.req.deps, st.req.at = o.code, o.deps, st
			continue
		}
		n := sh.nodes[st.node]
		n.parsed = o.p
		if len(o.errs) > 0 || o.code == nil {
			n.ok = false
			l.formulaErrs(st, n.q.Name, texts[i], o.errs)
			continue
		}
		n.code, n.deps = o.code, o.deps
	}
	sh.order = l.sortGraph()
	sh.pos = make([]int, len(sh.nodes))
	for i := range sh.pos {
		sh.pos[i] = -1
	}
	for i, id := range sh.order {
		sh.pos[id] = i
	}
	l.checkAll()
}

// parses returns the parsed formulas of a sheet by text, for a reload to reuse.
func (s *Sheet) parses() map[string]*parsed {
	if s == nil {
		return nil
	}
	m := make(map[string]*parsed, len(s.nodes))
	for _, n := range s.nodes {
		if n.parsed != nil && n.q != nil {
			m[n.q.Formula] = n.parsed
		}
	}
	for _, rq := range s.Requires {
		if rq.parsed != nil {
			m[rq.That] = rq.parsed
		}
	}
	return m
}

// parallel runs work(0) … work(n-1) on up to GOMAXPROCS goroutines.
func parallel(n int, work func(i int)) {
	workers := min(runtime.GOMAXPROCS(0), max(1, n/64))
	if workers <= 1 {
		for i := range n {
			work(i)
		}
		return
	}
	var wg sync.WaitGroup
	const batch = 64
	next := make(chan int, workers)
	go func() {
		for i := 0; i < n; i += batch {
			next <- i
		}
		close(next)
	}()
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for start := range next {
				for i := start; i < min(n, start+batch); i++ {
					work(i)
				}
			}
		}()
	}
	wg.Wait()
}

// checkAll gives every node its type, in evaluation order, and checks the requirements.
func (l *loader) checkAll() {
	sh := l.sh
	for _, n := range sh.nodes {
		if n.chain != nil {
			n.chainIdx = sh.nchains
			sh.nchains++
		}
	}
	for _, id := range sh.order {
		n := sh.nodes[id]
		switch {
		case n.chain != nil:
			n.typed = true
		case !n.ok:
		case n.code == nil:
			n.ty, n.typed = n.input, true
			n.ty.V = 0
		default:
			c := &checker{sh: sh}
			if !c.check(n.code) {
				l.formulaErrs(n.at, n.q.Name, n.q.Formula, c.errs)
				continue
			}
			if n.code.typ != tQ {
				l.formulaErrs(n.at, n.q.Name, n.q.Formula, []ferr{{from: n.code.from, to: n.code.to, msg: fmt.Sprintf("formula gives %s, want a quantity", n.code.typ), hint: wantHint(tQ)}})
				continue
			}
			n.ty, n.typed = n.code.ty, true
		}
	}
	for i, rq := range sh.Requires {
		rq.index, rq.sheet = i, sh
		if rq.code == nil {
			continue
		}
		c := &checker{sh: sh}
		ok := c.check(rq.code)
		switch {
		case !ok:
			l.formulaErrs(rq.at, "require", rq.That, c.errs)
		case rq.code.typ != tBool:
			l.formulaErrs(rq.at, "require", rq.That, []ferr{{from: rq.code.from, to: rq.code.to, msg: fmt.Sprintf("formula gives %s, want %s", rq.code.typ, tBool), hint: wantHint(tBool)}})
			ok = false
		}
		if !ok {
			rq.code = nil
			continue
		}
		sh.bound(rq)
	}
}

func wantHint(t typ) string {
	if t == tBool {
		return "a requirement is a comparison, e.g. \"= link.margin >= 6 dB\""
	}
	return "a quantity's formula must give a number with a unit"
}

var flippedOp = map[op]op{opGE: opLE, opGT: opLT, opLE: opGE, opLT: opGT, opEQ: opEQ, opNE: opNE}

// bound recognises a requirement of the form "quantity OP constant" (either way round).
func (s *Sheet) bound(rq *Require) {
	c := rq.code
	if _, ok := flippedOp[c.op]; !ok || len(c.kids) != 2 {
		return
	}
	a, b, o := c.kids[0], c.kids[1], c.op
	if a.isConst && b.op == opSlot {
		a, b, o = b, a, flippedOp[o]
	}
	if a.op != opSlot || !b.isConst {
		return
	}
	bound := b.ty
	bound.V = b.cval
	rq.Subject, rq.Op, rq.Bound = s.nodes[a.id].name, opSym[o], bound
}
