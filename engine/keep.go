package engine

import (
	"crypto/sha256"
	"io/fs"
	"slices"
	"strings"
	"sync/atomic"
	"unicode/utf8"

	"github.com/rfledger/rfledger/units"
)

// Most edits in watch or an editor change one input's value or one formula and leave every
// name, dependency and type as it was. Building the model again for such an edit (every
// group, quantity, position and check) is most of a reload's cost on a big sheet, and none
// of it can come out differently. keepModel makes the new sheet from the earlier one
// instead: the same nodes, names, order and graph, copied so that the earlier sheet stays as
// it was (a background analysis may still read it); the edited quantities read again from
// their new text, each with the loader's own code; positions after an edit moved by the
// bytes it added or removed. Whatever the edit touches that this cannot show to be the same
// (a key added, a type, a dependency, a diagnostic, a part) makes it return false, and Load
// builds the model as usual.
//
// The sheet made knows the earlier one by number (never by pointer, which would keep every
// earlier sheet of an editing session alive), so that EvalFrom of the earlier result
// computes only the cones of the changed quantities.

// sheetIDs numbers sheets, for EvalFrom to know a sheet kept from another.
var sheetIDs atomic.Uint64

// keptFrom says how a sheet was made by keepModel.
type keptFrom struct {
	base    uint64                   // the id of the sheet it was made from
	changed []int                    // the nodes whose definition the edit changed
	shifts  map[string]func(int) int // by file name: where a byte of the earlier text now is
}

// move returns where a range of the earlier sheet's files now is.
func (k *keptFrom) move(r Range) Range {
	shift := k.shifts[r.File]
	if shift == nil {
		return r
	}
	if r.Start.Line > 0 {
		r.Start.Byte = shift(r.Start.Byte)
	}
	if r.End.Line > 0 {
		r.End.Byte = shift(r.End.Byte)
	}
	return r
}

// keptEdit is one file of the earlier load and its edited text.
type keptEdit struct {
	was, now *sheetFile
	edits    []lineEdit
}

// keepModel returns the sheet of the worksheet at fsPath made from opt.Previous, or false
// when the files' edit is not one it can take.
func keepModel(path string, fsys fs.FS, fsPath string, opt Options) (*Sheet, bool) {
	prev := opt.Previous
	if prev == nil || prev.File != path || prev.lib != opt.Library || len(prev.files) == 0 ||
		prev.files[0].fsPath != fsPath || prev.files[0].prefix != "" || hasError(prev.diags) {
		return nil, false
	}
	files := make([]*sheetFile, len(prev.files))
	var edited []keptEdit
	var hash []byte
	total := 0
	// Only the edited values are decoded, each after the pre-scan that bounds its nesting
	// and size (the rest of the text is the earlier load's, which passed it).
	vet := func(text string) bool { return (&limits{}).prescan(text, "") == nil }
	for i, pf := range prev.files {
		data, err := readSheet(fsys, pf.fsPath, pf.prefix != "")
		if err != nil || len(data) > maxFileSize || !utf8.Valid(data) {
			return nil, false
		}
		if total += len(data); total > maxFileSize {
			return nil, false
		}
		h := sha256.Sum256(data)
		hash = append(hash, h[:]...)
		if string(data) == pf.src {
			files[i] = pf
			continue
		}
		src := string(data)
		doc, edits, ok := patchDoc(pf, src, vet)
		if !ok {
			return nil, false
		}
		ix := patchIndex(pf, src, edits)
		if ix == nil {
			return nil, false
		}
		files[i] = &sheetFile{name: pf.name, fsPath: pf.fsPath, ix: ix, prefix: pf.prefix, src: src, doc: doc, orders: pf.orders}
		edited = append(edited, keptEdit{pf, files[i], edits})
	}
	k := &keptFrom{base: prev.id, shifts: map[string]func(int) int{}}
	for _, e := range edited {
		k.shifts[e.was.name], _ = byteShift(e.was.src, e.edits)
		for _, d := range prev.diags {
			if d.Range.File == e.was.name && slices.ContainsFunc(e.edits, func(le lineEdit) bool { return le.line == d.Range.Start.Line || le.line == d.Range.End.Line }) {
				return nil, false // a diagnostic on an edited line: the edit may change it
			}
		}
	}
	s := prev.copyFor(files, k)
	s.Hash = hashHex(hash)
	for _, e := range edited {
		s.npatched++
		s.nindexPatched++
		for _, le := range e.edits {
			if !le.keyed {
				continue
			}
			if !s.keepEdit(prev, e.now, le.path) {
				return nil, false
			}
		}
	}
	return s, true
}

// copyFor returns a copy of s over the given files (the same files in the same order, some
// of them edited), every range moved as k says; it shares what no edit of keepModel's can
// change (names, evaluation order, graph, parsed and compiled formulas, tolerances).
func (s *Sheet) copyFor(files []*sheetFile, k *keptFrom) *Sheet {
	c := &Sheet{
		File: s.File, Title: s.Title, Summary: s.Summary, Focus: s.Focus, Parts: s.Parts,
		byName: s.byName, order: s.order, pos: s.pos, lib: s.lib, nchains: s.nchains, graph: s.graph,
		files: files, id: sheetIDs.Add(1), kept: k,
	}
	fileOf := make(map[*sheetFile]*sheetFile, len(files))
	for i, f := range s.files {
		fileOf[f] = files[i]
	}
	// The nodes and quantities are copied into two arrays, on every core: each node's
	// quantity has its place in the array worked out first.
	qAt := make([]int32, len(s.nodes))
	nq := 0
	for id, n := range s.nodes {
		if n.q != nil {
			qAt[id] = int32(nq)
			nq++
		}
	}
	nodes := make([]node, len(s.nodes))
	qs := make([]Quantity, nq)
	c.nodes = make([]*node, len(s.nodes))
	parallel(len(s.nodes), func(id int) {
		o, n := s.nodes[id], &nodes[id]
		*n = *o
		n.at.f = fileOf[n.at.f]
		if o.q != nil {
			q := &qs[qAt[id]]
			*q = *o.q
			q.sh, q.Range = c, k.move(q.Range)
			n.q = q
		}
		c.nodes[id] = n
	})
	q := func(o *Quantity) *Quantity {
		if o == nil {
			return nil
		}
		return c.nodes[o.node].q
	}
	for _, n := range c.nodes {
		if n.chain == nil {
			continue
		}
		ch := *n.chain
		ch.Range = k.move(ch.Range)
		ch.Input, ch.Bandwidth, ch.Backoff = q(ch.Input), q(ch.Bandwidth), q(ch.Backoff)
		ch.Stages = make([]*Stage, len(n.chain.Stages))
		for i, o := range n.chain.Stages {
			st := *o
			st.Range = k.move(st.Range)
			st.Values = make(map[string]*Quantity, len(o.Values))
			for key, v := range o.Values {
				st.Values[key] = q(v)
			}
			ch.Stages[i] = &st
		}
		n.chain = &ch
	}
	c.Groups = make([]*Group, len(s.Groups))
	for i, o := range s.Groups {
		g := &Group{Name: o.Name, Range: k.move(o.Range), Quantities: make([]*Quantity, len(o.Quantities)), Chains: make([]*Chain, len(o.Chains))}
		for j, oq := range o.Quantities {
			g.Quantities[j] = q(oq)
		}
		for j, oc := range o.Chains {
			g.Chains[j] = c.nodes[oc.node].chain
		}
		c.Groups[i] = g
	}
	for _, o := range s.Requires {
		rq := *o
		rq.Range, rq.sheet = k.move(rq.Range), c
		rq.at.f = fileOf[rq.at.f]
		c.Requires = append(c.Requires, &rq)
	}
	for _, o := range s.Sweeps {
		sw := *o
		sw.Range = k.move(sw.Range)
		c.Sweeps = append(c.Sweeps, &sw)
	}
	for _, o := range s.Solves {
		so := *o
		so.Range, so.equalsAt, so.withinAt = k.move(so.Range), k.move(so.equalsAt), k.move(so.withinAt)
		c.Solves = append(c.Solves, &so)
	}
	caseCopy := func(o *Case) *Case {
		if o == nil {
			return nil
		}
		cs := *o
		cs.Range = k.move(cs.Range)
		return &cs
	}
	c.Nominal = caseCopy(s.Nominal)
	for _, o := range s.Cases {
		c.Cases = append(c.Cases, caseCopy(o))
	}
	for _, o := range s.Spurs {
		sp := *o
		sp.Range, sp.LO = k.move(sp.Range), q(sp.LO)
		c.Spurs = append(c.Spurs, &sp)
	}
	for _, o := range s.Products {
		pr := *o
		pr.Range = k.move(pr.Range)
		c.Products = append(c.Products, &pr)
	}
	c.diags = make(Diagnostics, len(s.diags))
	for i, d := range s.diags {
		d.Range = k.move(d.Range)
		c.diags[i] = d
	}
	return c
}

// keepEdit reads again the quantity whose value at index path p of file f an edit changed,
// as the loader reads it, into s (a copy of prev), and reports whether the quantity keeps
// everything the rest of the sheet was built on: its form, type, display, dependencies,
// and having no diagnostic.
func (s *Sheet) keepEdit(prev *Sheet, f *sheetFile, p string) bool {
	id := -1
	for i, n := range s.nodes {
		if n.q != nil && n.at.f == f && (n.at.path == p || n.at.path == p+".is" || parentOf(p) != "" && n.at.path == parentOf(p)+".is") {
			id = i
			break
		}
	}
	if id < 0 {
		return false // not a quantity's value: a title, a requirement, a case, a chain's stage…
	}
	n, was := s.nodes[id], prev.nodes[id]
	old := was.q
	if !was.ok || !was.typed {
		return false // a quantity that did not load
	}
	for _, d := range prev.diags {
		if d.Quantity == old.Name {
			return false
		}
	}
	// The quantity's table (its long form) or its value alone, as member reads it.
	qpath, long := strings.CutSuffix(n.at.path, ".is")
	v, found := docAt(f.doc, qpath)
	if !found {
		return false
	}
	m, isMap := v.(map[string]any)
	if isMap {
		if _, has := m["is"]; !has || isPath(m) != n.at.path[len(qpath):] {
			return false // no longer a long form, or written in another form
		}
	} else if long {
		return false
	} else {
		m = map[string]any{"is": v}
	}
	l := &loader{sh: s}
	q := &Quantity{Name: old.Name, Group: old.Group, Range: n.q.Range, node: id}
	val, ok := l.quantityFields(f, q, qpath, m)
	if !ok || len(l.diags) > 0 || !sameUnit(q.Show, old.Show) || (q.Formula == "") != (old.Formula == "") {
		return false
	}
	q.sh = s
	if q.Formula == "" {
		ty := val
		ty.V = 0
		if was.code != nil || ty != was.ty {
			return false
		}
		n.input = val
	} else if !s.keepFormula(n, was, q.Formula) {
		return false
	}
	*n.q = *q
	s.kept.changed = append(s.kept.changed, id)
	return true
}

// keepFormula compiles a quantity's edited formula into n, and reports whether it names the
// same quantities in the same order and gives the same type as before (was).
func (s *Sheet) keepFormula(n, was *node, text string) bool {
	if was.code == nil || isTo(was.code) {
		return false
	}
	p := parseFormula(s.lib, text)
	if len(p.errs) > 0 {
		return false
	}
	s.nparsed++
	lw := &lowerer{sh: s, lib: s.lib, sc: n.at.sc, lits: p.lits, seen: map[int]bool{}}
	if lw.lib == nil {
		lw.lib = emptyLibrary
	}
	code := lw.lower(p.tree.Node, 0)
	if code == nil || len(lw.errs) > 0 || !slices.Equal(lw.deps, was.deps) {
		return false
	}
	c := &checker{sh: s}
	if !c.check(code) || code.typ != tQ || code.ty != was.ty || isTo(code) {
		return false
	}
	n.parsed, n.code = p, code
	return true
}

// isTo reports whether a formula is a call of to(), whose unit the loader shows the value in
// (convertedDisplay).
func isTo(x *inode) bool { return x.op == opCall && x.fn != nil && x.fn.Name == "to" }

func sameUnit(a, b *units.Unit) bool { return a == b || a != nil && b != nil && *a == *b }

// parentOf returns the index path of the table holding the key at path ("" at the top).
func parentOf(path string) string {
	p, _ := parentPath(path)
	return p
}

// docAt returns the value at an index path of a decoded document ("[n]" is an element of
// an array, as in a chain's stages).
func docAt(doc map[string]any, path string) (any, bool) {
	var v any = doc
	for _, k := range splitPath(path) {
		if strings.HasPrefix(k, "[") {
			switch a := v.(type) {
			case []map[string]any:
				i, ok := arrayIndex(k, len(a))
				if !ok {
					return nil, false
				}
				v = a[i]
			case []any:
				i, ok := arrayIndex(k, len(a))
				if !ok {
					return nil, false
				}
				v = a[i]
			default:
				return nil, false
			}
			continue
		}
		m, ok := v.(map[string]any)
		if !ok {
			return nil, false
		}
		if v, ok = m[k]; !ok {
			return nil, false
		}
	}
	return v, true
}
