package engine

import (
	"fmt"
	"io/fs"
	"path/filepath"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/rfledger/rfledger/units"
)

// Options configure loading.
type Options struct {
	// Library holds the functions formulas may call.
	Library *Library
	// FS is where the worksheet and its parts are read from; nil means the operating system's
	// files, rooted at the worksheet's folder (parts may not leave it).
	FS fs.FS
	// Previous is an earlier load of the same worksheet (by watch, or an editor): formulas
	// whose text did not change reuse its parses instead of being parsed again.
	Previous *Sheet
}

// Override replaces the value of an input quantity.
type Override struct {
	Name  string // the input's full name, e.g. "path.distance"
	Value string // its new value as a worksheet writes it, e.g. "5 km"
}

// Load reads, checks and compiles a worksheet and the parts it uses. It always returns a
// sheet; the diagnostics list every problem found (errors and warnings), sorted by position,
// unit errors in every formula among them. Quantities whose formulas failed are left
// unknown, and evaluation skips what depends on them. The sheet does not change afterwards.
func Load(path string, opt Options) (*Sheet, Diagnostics) {
	fsys, fsPath := opt.FS, path
	if fsys == nil {
		var release func()
		fsys, fsPath, release = osFS(path)
		defer release()
	}
	fsPath = filepath.ToSlash(fsPath)
	if sh, ok := keepModel(path, fsys, fsPath, opt); ok {
		return sh, sh.diags
	}
	sh := &Sheet{id: sheetIDs.Add(1), File: path, byName: map[string]int{}, lib: opt.Library, graph: &graphCache{}}
	l := &loader{sh: sh, fsys: fsys, prev: opt.Previous}
	// A reload is about the size of the earlier load: sizing the name map, the node list and
	// the formula sites from it spares their growth (rehashing 10,000 names a few times
	// over); a first load sizes them from the main file's keys (see loader.load).
	if p := opt.Previous; p != nil {
		sh.byName = make(map[string]int, len(p.byName))
		sh.nodes = make([]*node, 0, len(p.nodes))
		l.formulaSites = make([]site, 0, len(p.nodes))
	}
	l.load(fsPath, path, "", Range{File: path})
	sh.Hash = hashHex(l.hash)
	l.compile(opt.Previous)
	l.checkFocus()
	l.checkStudies()
	l.checkCases()
	l.checkMistakes()
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

// formulaErrs reports formula errors at their place in the file.
func (l *loader) formulaErrs(st site, name, text string, errs []ferr) {
	for _, e := range errs {
		l.diags = append(l.diags, Diagnostic{Severity: Error, Quantity: name, Summary: e.msg, Hint: e.hint, Range: formulaSpan(st, text, e.from, e.to)})
	}
}

// formulaRange maps a character offset in a formula to a position in its file; the range
// covers the name or number that starts there (one character otherwise).
func formulaRange(st site, text string, off int) Range {
	return formulaSpan(st, text, off, tokenEnd(text, off))
}

// formulaSpan maps the characters [from, to) of a formula to their place in its file. text is
// the formula as compiled: the decoded string value after its leading "=" and blanks; offsets
// count characters (runes) of text. The scanner recorded, for the string value, the map from
// decoded to raw offsets, so escapes, line continuations and multi-line strings land where
// they are written.
func formulaSpan(st site, text string, from, to int) Range {
	kp, ok := st.f.ix.get(st.path)
	sv, isStr := st.f.ix.str(kp)
	if !ok || !isStr {
		return st.f.rangeOf(st.path)
	}
	base := formulaStart(sv.Text)
	n := utf8.RuneCountInString(text)
	from = min(max(from, 0), n)
	to = min(max(to, from), n)
	dFrom, dTo := base+runeBytes(text, from), base+runeBytes(text, to)
	r := Range{File: st.f.name}
	r.Start = advance(kp.Content, st.f.src, sv.rawStart(dFrom))
	r.End = r.Start
	if dTo > dFrom {
		r.End = advance(r.Start, st.f.src, sv.rawEnd(dTo))
	}
	return r
}

// formulaStart returns the byte offset in a decoded string value where its formula begins:
// after leading blanks, the "=" and the blanks after it, as the loader trims them (a
// requirement's that = "..." is trimmed the same way, its "=" optional).
func formulaStart(decoded string) int {
	t := strings.TrimLeftFunc(decoded, unicode.IsSpace)
	t = strings.TrimLeftFunc(strings.TrimPrefix(t, "="), unicode.IsSpace)
	return len(decoded) - len(t)
}

// runeBytes returns the byte length of the first n runes of s.
func runeBytes(s string, n int) int {
	b := 0
	for ; n > 0 && b < len(s); n-- {
		_, size := utf8.DecodeRuneInString(s[b:])
		b += size
	}
	return b
}

// tokenEnd returns the rune offset just after the name or number starting at rune offset off
// of a formula, or just after the one character there.
func tokenEnd(text string, off int) int {
	rs := []rune(text)
	if off < 0 || off >= len(rs) {
		return off
	}
	word := func(r rune) bool {
		return r == '_' || r == '@' || r == '.' || unicode.IsLetter(r) || unicode.IsDigit(r)
	}
	end := off + 1
	if word(rs[off]) {
		for end < len(rs) && word(rs[end]) {
			end++
		}
	}
	return end
}

func (l *loader) checkFocus() {
	f := l.sh.Focus
	if f == "" {
		return
	}
	id, ok := l.sh.byName[f]
	if !ok || l.sh.nodes[id].q == nil {
		l.errAt(l.focusAt, "focus", l.suggest(f, scope{}), "focus names no quantity: %q", f)
		l.sh.Focus = ""
	}
}

// checkStudies checks that sweeps and solves name inputs and quantities that exist.
func (l *loader) checkStudies() {
	inputOK := func(name string, r Range, what string) bool {
		id, ok := l.sh.byName[name]
		switch {
		case !ok || l.sh.nodes[id].q == nil:
			l.errAt(r, what, l.suggest(name, scope{}), "no quantity named %q", name)
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
				l.errAt(sw.Range, "sweep", l.suggest(p, scope{}), "plot names no quantity: %q", p)
				ok = false
			}
		}
		if ok && l.sh.nodes[l.sh.byName[sw.Vary]].ok { // an input with an error of its own has no kind to check
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
			l.errAt(so.Range, "solve "+so.Name, l.suggest(so.SoThat, scope{}), "so_that names no quantity: %q", so.SoThat)
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
	// Look "group.name" up for each enclosing group, in one buffer (a map look-up with
	// string(bytes) does not allocate).
	var buf [128]byte
	g := sc.group
	for {
		b := buf[:0]
		if g != "" {
			b = append(append(b, g...), '.')
		}
		b = append(b, name...)
		if id, ok := s.byName[string(b)]; ok {
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
