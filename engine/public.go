package engine

import (
	"errors"
	"fmt"
	"io/fs"
	"path/filepath"
	"strings"
	"unicode/utf8"

	"github.com/expr-lang/expr/ast"
	"github.com/expr-lang/expr/file"

	"github.com/rfledger/rfledger/units"
)

// Options configure loading.
type Options struct {
	// Library holds the functions formulas may call.
	Library *Library
	// Set replaces inputs, in order, as `--set name=value` does.
	Set []Override
	// FS is where the worksheet and its parts are read from; nil means the operating system's
	// files, rooted at the worksheet's folder (parts may not leave it).
	FS fs.FS
}

// Override replaces the value of an input quantity.
type Override struct {
	Name, Value string
}

// Load reads, checks and compiles a worksheet and the parts it uses. It always returns a
// sheet; the diagnostics list every problem found (errors and warnings), sorted by position.
// Quantities whose formulas failed are left unknown, and Eval skips what depends on them.
func Load(path string, opt Options) (*Sheet, Diagnostics) {
	fsys, fsPath := opt.FS, path
	if fsys == nil {
		var release func()
		fsys, fsPath, release = osFS(path)
		defer release()
	}
	fsPath = filepath.ToSlash(fsPath)
	sh := &Sheet{File: path, byName: map[string]int{}}
	l := &loader{sh: sh, fsys: fsys}
	l.load(fsPath, path, "", Range{File: path})
	sh.Hash = hashHex(l.hash)
	l.overrides(opt.Set)
	sh.fc = newFormulaCompiler(sh, opt.Library)
	l.compile()
	l.checkFocus()
	sh.order = l.sortGraph()
	l.checkStudies()
	sh.diags = sortDiags(l.diags)
	return sh, sh.diags
}

// Diagnostics returns what Load found.
func (s *Sheet) Diagnostics() Diagnostics { return s.diags }

// Quantity returns the quantity with the given full name.
func (s *Sheet) Quantity(name string) (*Quantity, bool) {
	id, ok := s.byName[name]
	if !ok || s.nodes[id].q == nil {
		return nil, false
	}
	return s.nodes[id].q, true
}

// Quantities returns every quantity in file order (chain stage values included).
func (s *Sheet) Quantities() []*Quantity {
	var out []*Quantity
	for _, n := range s.nodes {
		if n.q != nil {
			out = append(out, n.q)
		}
	}
	return out
}

// Chains returns every chain in file order.
func (s *Sheet) Chains() []*Chain {
	var out []*Chain
	for _, n := range s.nodes {
		if n.chain != nil {
			out = append(out, n.chain)
		}
	}
	return out
}

// ChainValue returns the evaluated stages of a chain (after Eval).
func (s *Sheet) ChainValue(c *Chain) *ChainValue {
	return buildChain(c, func(q *Quantity) (units.Q, bool) { return q.Value, q.Known })
}

func (l *loader) overrides(set []Override) {
	for _, o := range set {
		r := Range{File: "--set"}
		id, ok := l.sh.byName[o.Name]
		if !ok || l.sh.nodes[id].q == nil {
			l.errAt(r, o.Name, l.sh.suggest(o.Name, scope{}), "no such quantity")
			continue
		}
		n := l.sh.nodes[id]
		if n.q.Formula != "" {
			l.errAt(r, o.Name, "only inputs can be set; it is \"= "+n.q.Formula+"\"", "derived from a formula")
			continue
		}
		v, u, err := units.Parse(o.Value)
		if err != nil {
			l.errAt(r, o.Name, unitHint(err), "%s", unitMsg(err))
			continue
		}
		if n.ok && (v.D != n.input.D || (v.K == units.Rate) != (n.input.K == units.Rate)) {
			l.errAt(r, o.Name, "", "is %s; %s is not of the same kind", n.q.Text, o.Value)
			continue
		}
		n.q.Text, n.q.Unit, n.q.Value, n.q.Known = strings.TrimSpace(o.Value), u, v, true
		n.input, n.ok = v, true
	}
}

// compile compiles every formula once all names are known.
func (l *loader) compile() {
	for _, st := range l.formulaSites {
		n := l.sh.nodes[st.node]
		if !n.ok || n.q.Formula == "" {
			continue
		}
		code, errs := l.sh.fc.compile(n.q.Formula, st.sc, tQ)
		if len(errs) > 0 {
			n.ok = false
			l.formulaErrs(st, n.q.Name, n.q.Formula, errs)
			continue
		}
		n.code, n.deps, n.at = code, code.deps, st
	}
	for _, st := range l.reqSites {
		code, errs := l.sh.fc.compile(st.req.That, scope{}, tBool)
		if len(errs) > 0 {
			l.formulaErrs(st, "require", st.req.That, errs)
			continue
		}
		st.req.prog, st.req.at = code, st
		l.sh.bound(st.req)
	}
}

// formulaErrs reports formula errors at their place in the file.
func (l *loader) formulaErrs(st site, name, text string, errs []ferr) {
	for _, e := range errs {
		l.diags = append(l.diags, Diagnostic{Severity: Error, Quantity: name, Summary: e.msg, Hint: e.hint, Range: formulaRange(st, text, e.from)})
	}
}

// formulaRange maps a character offset in a formula to a position in its file.
func formulaRange(st site, text string, off int) Range {
	kp, ok := st.f.ix.get(st.path)
	r := Range{File: st.f.name}
	if !ok {
		return st.f.rangeOf(st.path)
	}
	// Find the formula inside the raw string value (after "=" and spaces).
	line := kp.Content
	raw := rawString(st.f.src, kp)
	start := strings.Index(raw, text)
	if start < 0 {
		start = 0
	}
	prefix := raw[:start] + string([]rune(text)[:min(off, utf8.RuneCountInString(text))])
	pos := line
	for _, c := range prefix {
		if c == '\n' {
			pos.Line++
			pos.Col = 1
		} else {
			pos.Col++
		}
	}
	r.Start, r.End = pos, pos
	return r
}

// rawString returns the text of the string value starting at kp.Content, up to its closing quote.
func rawString(src string, kp keyPos) string {
	// Walk to the content start.
	line, col, i := 1, 1, 0
	for i < len(src) && (line < kp.Content.Line || line == kp.Content.Line && col < kp.Content.Col) {
		r, n := utf8.DecodeRuneInString(src[i:])
		if r == '\n' {
			line, col = line+1, 1
		} else {
			col++
		}
		i += n
	}
	rest := src[i:]
	end := len(rest)
	if !kp.Multi {
		if j := strings.IndexAny(rest, "\"'\n"); j >= 0 {
			end = j
		}
	} else if j := strings.Index(rest, `"""`); j >= 0 {
		end = j
	}
	return rest[:end]
}

func (l *loader) checkFocus() {
	f := l.sh.Focus
	if f == "" {
		return
	}
	id, ok := l.sh.byName[f]
	if !ok || l.sh.nodes[id].q == nil {
		l.errAt(l.focusAt, "focus", l.sh.suggest(f, scope{}), "focus names no quantity: %q", f)
		l.sh.Focus = ""
	}
}

// checkStudies checks that sweeps and solves name inputs and quantities that exist.
func (l *loader) checkStudies() {
	inputOK := func(name string, r Range, what string) bool {
		id, ok := l.sh.byName[name]
		switch {
		case !ok || l.sh.nodes[id].q == nil:
			l.errAt(r, what, l.sh.suggest(name, scope{}), "no quantity named %q", name)
			return false
		case l.sh.nodes[id].q.Formula != "":
			l.errAt(r, what, "vary an input; this one is derived", "%s is derived from a formula", name)
			return false
		}
		return true
	}
	var sweeps []*Sweep
	for _, sw := range l.sh.Sweeps {
		ok := inputOK(sw.Vary, sw.Range, "sweep")
		for _, p := range sw.Plot {
			if _, found := l.sh.Quantity(p); !found {
				l.errAt(sw.Range, "sweep", l.sh.suggest(p, scope{}), "plot names no quantity: %q", p)
				ok = false
			}
		}
		if ok {
			in := l.sh.nodes[l.sh.byName[sw.Vary]].input
			if in.D != sw.From.D || in.D != sw.To.D || in.K != sw.From.K || in.K != sw.To.K {
				l.errAt(sw.Range, "sweep", "write from and to in a unit like the input's", "from and to must be of the same kind as %s (%s)", sw.Vary, l.sh.nodes[l.sh.byName[sw.Vary]].q.Text)
				ok = false
			}
		}
		if ok {
			sweeps = append(sweeps, sw)
		}
	}
	l.sh.Sweeps = sweeps
	var solves []*Solve
	for _, so := range l.sh.Solves {
		ok := inputOK(so.Vary, so.Range, "solve "+so.Name)
		if _, found := l.sh.Quantity(so.SoThat); !found {
			l.errAt(so.Range, "solve "+so.Name, l.sh.suggest(so.SoThat, scope{}), "so_that names no quantity: %q", so.SoThat)
			ok = false
		}
		if ok {
			solves = append(solves, so)
		}
	}
	l.sh.Solves = solves
}

// resolve finds the graph node a name in a formula refers to: a dotted name is absolute
// (within its part); a bare name is looked up in the formula's group, then each enclosing
// group out to the top.
func (s *Sheet) resolve(name string, sc scope) (int, bool) {
	if strings.Contains(name, ".") {
		id, ok := s.byName[join(sc.part, name)]
		return id, ok
	}
	g := sc.group
	for {
		if id, ok := s.byName[join(g, name)]; ok {
			return id, true
		}
		if g == sc.part {
			return 0, false
		}
		i := strings.LastIndex(g, ".")
		if i < 0 {
			g = ""
		} else {
			g = g[:i]
		}
	}
}

// suggest offers the closest name for a typo, as a hint.
func (s *Sheet) suggest(name string, sc scope) string {
	var cands []string
	for _, n := range s.nodes {
		if strings.Contains(n.name, "[") {
			continue
		}
		cands = append(cands, strings.TrimPrefix(n.name, sc.part+"."))
		if g := sc.group; g != "" && strings.HasPrefix(n.name, g+".") {
			cands = append(cands, strings.TrimPrefix(n.name, g+"."))
		}
	}
	for c := range predeclared {
		cands = append(cands, c)
	}
	sortStrings(cands)
	if n := units.Nearest(name, cands); n != "" {
		return fmt.Sprintf("did you mean %q?", n)
	}
	// A bare name that exists in another group.
	for _, n := range s.nodes {
		if strings.HasSuffix(n.name, "."+name) && !strings.Contains(n.name, "[") {
			return fmt.Sprintf("did you mean %q?", n.name)
		}
	}
	return ""
}

// runtimeErr splits an evaluation error into message and hint.
func runtimeErr(err error) (msg, hint string, from int) {
	var fe *file.Error
	if errors.As(err, &fe) {
		from = fe.From
	}
	var ue *units.Error
	if errors.As(err, &ue) {
		msg, hint = ue.Msg, ue.Hint
		// keep the function name prefix, if any ("fspl: distance: ...")
		if fe != nil && fe.Prev != nil {
			if full := fe.Prev.Error(); strings.HasSuffix(full, ue.Error()) {
				msg = strings.TrimSuffix(full, ue.Error()) + ue.Msg
			}
		}
		return msg, hint, from
	}
	if fe != nil {
		if fe.Prev != nil {
			return cleanExprMsg(fe.Prev.Error()), "", from
		}
		return cleanExprMsg(fe.Message), "", from
	}
	return err.Error(), "", from
}

var flipped = map[string]string{"_ge": "<=", "_gt": "<", "_le": ">=", "_lt": ">", "_eq": "==", "_ne": "!="}
var direct = map[string]string{"_ge": ">=", "_gt": ">", "_le": "<=", "_lt": "<", "_eq": "==", "_ne": "!="}

// bound recognises a requirement of the form "quantity OP constant" (either way round).
func (s *Sheet) bound(rq *Require) {
	c, ok := rq.prog.tree.(*ast.CallNode)
	if !ok || len(c.Arguments) != 2 {
		return
	}
	fn := c.Callee.(*ast.IdentifierNode).Value
	if _, ok := direct[fn]; !ok {
		return
	}
	a, b := c.Arguments[0], c.Arguments[1]
	op := direct[fn]
	if _, isConst := a.(*ast.ConstantNode); isConst {
		a, b, op = b, a, flipped[fn]
	}
	id, ok1 := a.(*ast.IdentifierNode)
	k, ok2 := b.(*ast.ConstantNode)
	if !ok1 || !ok2 {
		return
	}
	q, isQ := k.Value.(units.Q)
	if !isQ || !strings.HasPrefix(id.Value, "@") {
		return
	}
	rq.Subject, rq.Op, rq.Bound = strings.TrimPrefix(id.Value, "@"), op, q
}
