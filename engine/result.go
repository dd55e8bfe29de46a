package engine

import (
	"fmt"
	"math"
	"slices"
	"strings"
	"unsafe"

	"github.com/rfledger/rfledger/units"
)

// Result is one evaluation of a sheet: every quantity's value (or that it is unknown), the
// validity warnings its functions raised, every requirement's outcome, and the diagnostics
// of the evaluation. The sheet itself is not changed; a Result is not safe for concurrent
// changes, but any number of goroutines may read one.
type Result struct {
	sh     *Sheet
	vals   []float64 // per node, in the node's type
	known  []bool
	warn   [][]string // per node
	pass   []int8     // per requirement: 1 holds, 0 fails, -1 unknown
	chains []ChainValue
	diags  Diagnostics
	set    []Override

	call      Call
	args      []Value // argument stack of function calls
	quiet     bool
	evaluated int // nodes EvalFrom computed (the rest it took from the earlier result)

	warnShared bool // warn is an earlier result's, to be copied before it changes (see near)
}

// Sheet returns the sheet the result belongs to.
func (r *Result) Sheet() *Sheet { return r.sh }

// Diagnostics returns the evaluation's errors and warnings, positioned at the quantity
// concerned (overrides that could not be applied among them).
func (r *Result) Diagnostics() Diagnostics { return r.diags }

// Overrides returns the overrides the result was evaluated with.
func (r *Result) Overrides() []Override { return r.set }

// Value returns a quantity's value; ok is false when it could not be evaluated.
func (r *Result) Value(q *Quantity) (units.Q, bool) {
	if !r.known[q.node] {
		return units.Q{}, false
	}
	v := r.sh.nodes[q.node].ty
	v.V = r.vals[q.node]
	return v, true
}

// Known reports whether a quantity could be evaluated.
func (r *Result) Known(q *Quantity) bool { return r.known[q.node] }

// Display formats a quantity's value in its display unit ("14.00 dBm", "2.4 km"), or
// "unknown".
func (r *Result) Display(q *Quantity) string {
	v, ok := r.Value(q)
	if !ok {
		return "unknown"
	}
	return v.Format(q.DisplayUnit())
}

// Number returns a quantity's value as a number in the unit the report uses for it (its
// display unit, else the unit its type gives), and that unit's symbol.
func (r *Result) Number(q *Quantity) (float64, string) {
	v, ok := r.Value(q)
	if !ok {
		return math.NaN(), unitName(q)
	}
	return q.Number(v), unitName(q)
}

// Warnings returns the validity warnings a quantity's functions raised.
func (r *Result) Warnings(q *Quantity) []string { return r.warn[q.node] }

// Pass returns whether a requirement holds; known is false when it could not be evaluated.
func (r *Result) Pass(rq *Require) (pass, known bool) {
	p := r.pass[rq.index]
	return p == 1, p >= 0
}

// Chain returns a chain's evaluated stages.
func (r *Result) Chain(c *Chain) *ChainValue {
	cv := r.chains[r.sh.nodes[c.node].chainIdx]
	cv.Stages = append([]StageValue(nil), cv.Stages...)
	cv.Memo = nil
	return &cv
}

// Eval evaluates every quantity and requirement, with the given inputs replaced. Override
// problems (no such input, a derived quantity, a value of another kind) come back among the
// diagnostics and leave the input as written. A quantity that fails is unknown, and what
// depends on it is skipped quietly.
func (s *Sheet) Eval(set ...Override) (*Result, Diagnostics) {
	r := s.newResult()
	r.set = set
	r.diags = append(r.diags, r.applyAll(set)...)
	r.run(false)
	r.diags = sortDiags(r.diags)
	return r, r.diags
}

// newResult returns a result holding the inputs' nominal values, nothing evaluated yet.
func (s *Sheet) newResult() *Result {
	r := &Result{
		sh:     s,
		vals:   make([]float64, len(s.nodes)),
		known:  make([]bool, len(s.nodes)),
		warn:   make([][]string, len(s.nodes)),
		pass:   make([]int8, len(s.Requires)),
		chains: make([]ChainValue, s.nchains),
	}
	for id, n := range s.nodes {
		if n.q != nil && n.code == nil && n.ok && n.q.Formula == "" {
			r.vals[id], r.known[id] = n.input.V, true
		}
		if n.chain != nil {
			cv := &r.chains[n.chainIdx]
			cv.Name = n.chain.Name
			cv.Memo = &chainMemo{}
			cv.Stages = make([]StageValue, len(n.chain.Stages))
			for i, st := range n.chain.Stages {
				cv.Stages[i].Label = st.Label
			}
		}
	}
	return r
}

// clone returns a copy of r that can be changed on its own (for an analysis scenario).
// Scenarios are made one after another and then written by different goroutines on every
// trial; what a scenario writes (the result itself, its values, flags, outcomes and chain
// stages) is kept a cache line's room away from its neighbours (see apart), or the two
// cores pass the shared lines back and forth on every node and the second core gains
// little.
func (r *Result) clone() *Result {
	box := &struct {
		_ [cacheRoom]byte
		r Result
		_ [cacheRoom]byte
	}{}
	c := &box.r
	*c = Result{
		sh:     r.sh,
		vals:   apart[float64](len(r.vals)),
		known:  apart[bool](len(r.known)),
		warn:   make([][]string, len(r.warn)),
		pass:   apart[int8](len(r.pass)),
		chains: apart[ChainValue](len(r.chains)),
		set:    r.set,
		quiet:  true,
	}
	copy(c.vals, r.vals)
	copy(c.known, r.known)
	copy(c.pass, r.pass)
	for i, cv := range r.chains {
		st := apart[StageValue](len(cv.Stages))
		copy(st, cv.Stages)
		c.chains[i] = ChainValue{Name: cv.Name, Stages: st, Memo: &apart[chainMemo](1)[0]}
	}
	c.call.quiet = true
	return c
}

// cacheRoom is the room kept around what one goroutine writes: two cache lines, since
// processors fetch lines in pairs.
const cacheRoom = 128

// apart returns a slice of n elements with cacheRoom bytes of unused room on either side,
// so that writes to it never share a cache line with another allocation's.
func apart[T any](n int) []T {
	var z T
	pad := cacheRoom/max(int(unsafe.Sizeof(z)), 1) + 1
	s := make([]T, n+2*pad)
	return s[pad : pad+n : pad+n]
}

// applyAll replaces inputs by overrides; it returns what could not be applied.
func (r *Result) applyAll(set []Override) Diagnostics {
	var diags Diagnostics
	for _, o := range set {
		id, v, d := r.sh.override(o)
		if d != nil {
			diags = append(diags, *d)
			continue
		}
		r.vals[id], r.known[id] = v.V, true
	}
	return diags
}

// setHint keeps a unit error's hint for --set, without the worksheet's "= formula", which
// --set does not take.
func setHint(h string) string {
	return strings.TrimSuffix(strings.TrimSuffix(h, ` or "= formula"`), ", or \"= formula\"")
}

// override checks one override given on the command line and returns the input's node and
// the value in its type.
func (s *Sheet) override(o Override) (int, units.Q, *Diagnostic) {
	r := Range{File: "--set"}
	return s.checkOverride(o, r, r, s.suggest)
}

// checkOverride checks one override (from --set or a case's set) and returns the input's
// node and the value in its type; a problem with the name is positioned at keyAt, one with
// the value at valAt. suggest gives the hint for a name that is no quantity (a load's
// cases use the loader's, which bounds how many it looks for).
func (s *Sheet) checkOverride(o Override, keyAt, valAt Range, suggest func(string, scope) string) (int, units.Q, *Diagnostic) {
	r := keyAt
	bad := func(hint, format string, args ...any) (int, units.Q, *Diagnostic) {
		return 0, units.Q{}, &Diagnostic{Severity: Error, Quantity: o.Name, Summary: fmt.Sprintf(format, args...), Hint: hint, Range: r}
	}
	id, ok := s.byName[o.Name]
	if !ok || s.nodes[id].q == nil {
		hint := suggest(o.Name, scope{})
		if hint == "" {
			hint = s.anInput()
		}
		return bad(hint, "no such quantity")
	}
	n := s.nodes[id]
	if n.q.Formula != "" {
		return bad("only inputs can be set; it is \"= "+n.q.Formula+"\"", "derived from a formula")
	}
	if rest, isFormula := strings.CutPrefix(strings.TrimSpace(o.Value), "="); isFormula {
		if keyAt.File != "--set" {
			// a case's set, in the worksheet: the command line's spelling would mislead
			return bad(fmt.Sprintf("write a value like the input's own, e.g. %q = %q", o.Name, n.q.Text), "a case's set takes a value, not a formula")
		}
		return bad(fmt.Sprintf("write --set '%s=%s'", o.Name, strings.TrimSpace(rest)), "--set takes a value, not a formula")
	}
	if !n.ok {
		return bad("", "cannot be set: it has an error of its own")
	}
	r = valAt
	v, _, err := units.Parse(o.Value)
	if err != nil {
		return bad(setHint(unitHint(err)), "%s", unitMsg(err))
	}
	if v.D != n.ty.D || (v.K == units.Rate) != (n.ty.K == units.Rate) {
		return bad(fmt.Sprintf("give a value of the input's kind, in a unit like %q", n.q.Text), "is %s; %s is not of the same kind", n.q.Text, o.Value)
	}
	if !finite(v) {
		return bad("", "%s is not a finite number", o.Value)
	}
	// Held in the input's own form: a linear value for a level input becomes its level.
	switch {
	case n.ty.K == units.Level && v.K == units.Linear:
		l, err := v.ToLevel()
		if err != nil {
			return bad(unitHint(err), "%s", unitMsg(err))
		}
		v = l
	case n.ty.K == units.Linear && v.K == units.Level:
		v = v.Linear()
	}
	return id, v, nil
}

// anInput is the hint for an override that names nothing near any quantity: inputs go by
// their full name, with the sheet's first input as the example ("" for a sheet without one).
func (s *Sheet) anInput() string {
	for _, n := range s.nodes {
		if n.q != nil && n.q.Formula == "" && n.ok {
			return fmt.Sprintf("name an input by its full name, group and key, such as %q", n.q.Name)
		}
	}
	return ""
}

// run evaluates every node in order and then the requirements. With quiet set, warnings and
// errors are not recorded (analyses re-evaluate many times).
func (r *Result) run(quiet bool) {
	r.quiet, r.call.quiet = quiet, quiet
	for _, id := range r.sh.order {
		r.evalNode(id)
	}
	r.requirements()
}

// evalNode computes one node from its dependencies' values, recording warnings and errors
// unless the result is quiet.
func (r *Result) evalNode(id int) {
	n := r.sh.nodes[id]
	if !n.ok || !n.typed {
		r.known[id] = false
		return
	}
	for _, d := range n.deps {
		if !r.known[d] {
			r.known[id] = false
			return
		}
	}
	switch {
	case n.chain != nil:
		if !r.fillChain(n) {
			r.known[id] = false
			return
		}
	case n.code == nil:
		// an input: its value is in place
	default:
		if !r.quiet {
			r.call.warnings = r.call.warnings[:0]
		}
		if r.call.tally != nil {
			r.call.tally.node = id
		}
		v, err := n.code.eval(r)
		if err == nil && (math.IsNaN(v) || math.IsInf(v, 0)) {
			err = fmt.Errorf("result is %s", units.FormatNum(v))
		}
		if !r.quiet {
			r.record(n, err)
		}
		if err != nil {
			r.known[id] = false
			return
		}
		r.vals[id] = v
	}
	r.known[id] = true
}

// record keeps a node's warnings and error as diagnostics.
func (r *Result) record(n *node, err error) {
	q := n.q
	if len(r.call.warnings) > 0 {
		r.setWarn(q.node, append([]string(nil), r.call.warnings...))
		for _, w := range r.call.warnings {
			r.diags = append(r.diags, Diagnostic{Severity: Warning, Quantity: q.Name, Summary: w, Range: q.Range})
		}
	} else {
		r.setWarn(q.node, nil)
	}
	if err != nil {
		r.diags = append(r.diags, runtimeDiag(err, q.Name, q.Formula, q.Range, n.at))
	}
}

// runtimeDiag positions an evaluation error in its formula.
func runtimeDiag(err error, name, formula string, rng Range, st site) Diagnostic {
	msg, hint := splitErr(err)
	from := 0
	if ce, ok := err.(*callError); ok {
		msg, hint, from = ce.msg, ce.hint, ce.from
	}
	if st.f != nil {
		rng = formulaRange(st, formula, from)
	}
	return Diagnostic{Severity: Error, Quantity: name, Summary: msg, Hint: hint, Range: rng}
}

// fillChain gathers a chain's stage values from its stage quantities, and reports whether
// every stage is one a physical part can be (each problem is an error at the stage's key,
// unless the result is quiet).
func (r *Result) fillChain(n *node) bool {
	cv := &r.chains[n.chainIdx]
	cv.Memo.Valid = false
	sound := true
	for i, st := range n.chain.Stages {
		sv := &cv.Stages[i]
		sv.has = 0
		for _, sl := range st.slots {
			if !r.known[sl.node] {
				continue
			}
			v := r.sh.nodes[sl.node].ty
			v.V = r.vals[sl.node]
			sv.vals[sl.idx] = v
			sv.has |= 1 << sl.idx
		}
		for _, p := range stageProblems(st, sv) {
			sound = false
			if !r.quiet {
				q := st.Values[p.key]
				r.diags = append(r.diags, Diagnostic{Severity: Error, Quantity: q.Name, Summary: p.msg, Hint: p.hint, Range: q.Range})
			}
		}
	}
	return sound && !n.chain.broken
}

// requirements evaluates every requirement (and, unless quiet, checks the frequency plans'
// LOs, which only a nominal or case evaluation reports).
func (r *Result) requirements() {
	if !r.quiet && len(r.sh.Spurs) > 0 {
		r.checkPlanLOs()
	}
	for _, rq := range r.sh.Requires {
		r.pass[rq.index] = -1
		if rq.code == nil {
			continue
		}
		skip := false
		for _, d := range rq.deps {
			skip = skip || !r.known[d]
		}
		if skip {
			continue
		}
		ok, err := rq.code.test(r)
		if err != nil {
			if !r.quiet {
				r.diags = append(r.diags, runtimeDiag(err, "require", rq.That, rq.Range, rq.at))
			}
			continue
		}
		r.pass[rq.index] = 0
		if ok {
			r.pass[rq.index] = 1
		}
	}
}

// allPass reports whether every requirement holds.
func (r *Result) allPass() bool {
	for _, p := range r.pass {
		if p != 1 {
			return false
		}
	}
	return true
}

// EvalFrom evaluates the sheet as Eval does, reusing prev, an evaluation of an earlier load
// of the same worksheet (watch, an editor): a quantity whose definition, dependencies and
// overrides did not change, and none of whose dependencies changed, keeps its value from
// prev; only the cones of what changed are computed again. The result is the same as Eval's.
func (s *Sheet) EvalFrom(prev *Result, set ...Override) (*Result, Diagnostics) {
	if prev == nil {
		return s.Eval(set...)
	}
	var r *Result
	// A sheet keepModel made from prev's has prev's nodes: prev's storage serves as it is.
	kept := s.kept != nil && s.kept.base == prev.sh.id
	if prev.sh == s || kept {
		r = prev.near()
		r.sh = s
	} else {
		r = s.newResult()
	}
	r.set = set
	old := prev.sh
	if old == s || kept {
		// Inputs prev overrode go back to their nominal value before the new overrides apply.
		for _, o := range prev.set {
			if id, ok := s.byName[o.Name]; ok {
				n := s.nodes[id]
				r.vals[id], r.known[id] = n.input.V, n.q != nil && n.code == nil && n.ok && n.q.Formula == ""
			}
		}
	}
	if kept {
		for _, id := range s.kept.changed {
			if n := s.nodes[id]; n.code == nil {
				r.vals[id], r.known[id] = n.input.V, true
				r.evaluated++
			}
		}
	}
	r.diags = append(r.diags, r.applyAll(set)...)
	overridden := map[string]string{}
	for _, o := range prev.set {
		overridden[o.Name] = o.Value
	}
	for _, o := range set {
		if v, ok := overridden[o.Name]; ok && v == o.Value {
			delete(overridden, o.Name)
		} else {
			overridden[o.Name] = "changed"
		}
	}
	if old == s || kept {
		if kept {
			for _, id := range s.kept.changed {
				overridden[s.nodes[id].name] = "changed"
			}
		}
		s.evalNear(r, prev, overridden, kept)
		r.diags = sortDiags(r.diags)
		return r, r.diags
	}
	dirty, from := s.dirtySince(prev, overridden)
	r.quiet, r.call.quiet = false, false
	for _, id := range s.order {
		if dirty[id] {
			r.evalNode(id)
			r.evaluated++
			continue
		}
		oid := id
		if from != nil {
			oid = from[id]
		}
		r.vals[id], r.known[id] = prev.vals[oid], prev.known[oid]
		n := s.nodes[id]
		if n.chain != nil {
			copy(r.chains[n.chainIdx].Stages, prev.chains[old.nodes[oid].chainIdx].Stages)
			continue
		}
		if w := prev.warn[oid]; len(w) > 0 {
			r.warn[id] = w
			for _, msg := range w {
				r.diags = append(r.diags, Diagnostic{Severity: Warning, Quantity: n.q.Name, Summary: msg, Range: n.q.Range})
			}
		}
	}
	r.requirements()
	r.diags = sortDiags(r.diags)
	return r, r.diags
}

// near returns a copy of r, an evaluation of its own sheet, to evaluate again with other
// overrides: values, outcomes and stage values as r has them, no diagnostics.
func (r *Result) near() *Result {
	c := &Result{
		sh:     r.sh,
		vals:   append([]float64(nil), r.vals...),
		known:  append([]bool(nil), r.known...),
		warn:   r.warn,
		pass:   append([]int8(nil), r.pass...),
		chains: make([]ChainValue, len(r.chains)),

		warnShared: true,
	}
	for i, cv := range r.chains {
		c.chains[i] = ChainValue{Name: cv.Name, Stages: append([]StageValue(nil), cv.Stages...), Memo: &chainMemo{}}
	}
	return c
}

// setWarn keeps a node's warnings, copying a shared warn list first.
func (r *Result) setWarn(id int, w []string) {
	if len(w) == 0 && len(r.warn[id]) == 0 {
		return
	}
	if r.warnShared {
		r.warn, r.warnShared = append([][]string(nil), r.warn...), false
	}
	r.warn[id] = w
}

// evalNear finishes EvalFrom for prev of a sheet with the same nodes: prev's own (the cases
// of one load), or one that keepModel made from prev's (kept). r holds prev's values with the
// new overrides, and a kept sheet's edited inputs, applied. Computed again are the cones of
// the inputs whose value changed and, on a kept sheet, the edited formulas themselves and
// every formula prev could not evaluate (so that its error is reported again, as a full
// evaluation reports it); the rest keeps prev's values and warnings (on a kept sheet at their
// moved places). Among the cases, a node prev could not evaluate and that depends on none of
// the changed inputs stays unknown, as a full evaluation would leave it.
func (s *Sheet) evalNear(r, prev *Result, overridden map[string]string, kept bool) {
	roots := make([]int, 0, len(overridden))
	for name := range overridden {
		if id, ok := s.byName[name]; ok {
			roots = append(roots, id)
		}
	}
	slices.Sort(roots)
	again := make(map[int32]bool)
	var todo []int32
	add := func(id int32) {
		if !again[id] && s.pos[id] >= 0 {
			again[id] = true
			todo = append(todo, id)
		}
	}
	if len(roots) > 0 {
		for _, id := range s.coneOf(roots) {
			add(id)
		}
	}
	if kept {
		for _, id := range roots {
			if s.nodes[id].code != nil {
				add(int32(id))
			}
		}
		for id, n := range s.nodes {
			if !prev.known[id] && (n.code != nil || n.chain != nil) {
				add(int32(id))
			}
		}
		slices.SortFunc(todo, func(a, b int32) int { return s.pos[a] - s.pos[b] })
	}
	r.quiet, r.call.quiet = false, false
	for _, id := range todo {
		r.evalNode(int(id))
		r.evaluated++
	}
	for _, d := range prev.diags {
		if id, ok := s.byName[d.Quantity]; ok && d.Severity == Warning && !again[int32(id)] {
			if kept {
				d.Range = s.kept.move(d.Range)
			}
			r.diags = append(r.diags, d)
		}
	}
	r.requirements()
}

// dirtySince marks the nodes that must be computed again after prev, an evaluation of an
// earlier load, and for each node the node of prev's sheet it corresponds to.
func (s *Sheet) dirtySince(prev *Result, overridden map[string]string) (dirty []bool, from []int) {
	old := prev.sh
	dirty = make([]bool, len(s.nodes))
	from = make([]int, len(s.nodes))
	for _, id := range s.order {
		n := s.nodes[id]
		// After most edits a node keeps its number: try that before the map.
		oid, ok := id, id < len(old.nodes) && old.nodes[id].name == n.name
		if !ok {
			oid, ok = old.byName[n.name]
		}
		from[id] = oid
		if !ok || !sameNode(n, old.nodes[oid], s, old) || !prev.known[oid] {
			dirty[id] = true
		} else if _, ch := overridden[n.name]; ch {
			dirty[id] = true
		} else {
			for _, d := range n.deps {
				dirty[id] = dirty[id] || dirty[d]
			}
		}
	}
	return dirty, from
}

// sameNode reports whether a node is defined as it was in an earlier load: the same formula
// or input value, the same type, and dependencies of the same names.
func sameNode(n, o *node, s, old *Sheet) bool {
	if (n.q == nil) != (o.q == nil) || (n.chain == nil) != (o.chain == nil) || n.ok != o.ok || n.typed != o.typed || n.ty != o.ty || len(n.deps) != len(o.deps) {
		return false
	}
	if n.q != nil && (n.q.Formula != o.q.Formula || n.input != o.input) {
		return false
	}
	if n.chain != nil {
		if len(n.chain.Stages) != len(o.chain.Stages) {
			return false
		}
		for i, st := range n.chain.Stages {
			if st.Label != o.chain.Stages[i].Label || !slices.Equal(st.Keys, o.chain.Stages[i].Keys) {
				return false
			}
		}
	}
	for i, d := range n.deps {
		if s.nodes[d].name != old.nodes[o.deps[i]].name {
			return false
		}
	}
	return true
}
