package engine

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"path"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/BurntSushi/toml"

	"github.com/rfledger/rfledger/units"
)

// Limits on a worksheet, each with its own error.
const (
	MaxQuantities = 200_000 // twice the 100,000 that must work; the pre-scan counts them before decoding
	MaxPartsDepth = 8
	MaxSweepSteps = 10_000
	MaxCases      = 64 // [[case]] entries
)

var (
	validName = regexp.MustCompile(`^[A-Za-z][A-Za-z0-9_]*$`)
	dupKey    = regexp.MustCompile(`^Key '(.*)' has already been defined\.$`)
)

// loader builds a Sheet from a worksheet file and its parts.
type loader struct {
	sh    *Sheet
	prev  *Sheet         // an earlier load of the same worksheet, or nil
	short map[string]any // the long form of a quantity written as its value alone (member)
	fsys  fs.FS
	diags Diagnostics
	hash  []byte
	stack []string // part files being loaded, for loops
	nq    int
	lim   limits

	// suggested holds the "did you mean" hint of each unknown name by scope; at most
	// maxSuggestions are searched for (each reads every name of the sheet).
	suggested map[string]string

	formulaSites []site
	reqSites     []site
	caseSites    []*caseSite
	focusAt      Range
	shows        []shownAt // where each `show` is written, checked against the type once known
}

// maxSuggestions bounds how many distinct unknown names one load looks for a "did you mean"
// for: each search reads and sorts every name of the sheet, so a sheet of 50,000 formulas
// naming 50,000 unknown names took hours. Later unknown names are errors without the hint.
const maxSuggestions = 20

// suggest is Sheet.suggest for the load's diagnostics, once per name and scope and at most
// maxSuggestions times, in the order of the sheet (the same hints for every run).
func (l *loader) suggest(name string, sc scope) string {
	key := sc.part + "\x00" + sc.group + "\x00" + name
	if h, ok := l.suggested[key]; ok {
		return h
	}
	if l.suggested == nil {
		l.suggested = map[string]string{}
	}
	if len(l.suggested) >= maxSuggestions {
		return ""
	}
	h := l.sh.suggest(name, sc)
	l.suggested[key] = h
	return h
}

// site is where a formula stands, to compile it once every name is known.
type site struct {
	f    *sheetFile
	path string
	node int
	sc   scope
	req  *Require
}

// sheetFile is one file being loaded (the worksheet or a part).
type sheetFile struct {
	name   string // path shown in diagnostics
	fsPath string // path inside the loader's fs
	ix     *posIndex
	prefix string // part prefix, "" for the worksheet
	src    string
	doc    map[string]any // the decoded text (shared with later loads, never changed)
	// values is the number of doc's values that are not tables or arrays (the most quantities
	// it can hold), when counted is set (decodeTOML counts them when quickDecode read the text).
	values  int
	counted bool
	// orders holds each table's keys in file order as this load found them (ordered);
	// prevOrders is the earlier load's, for an edit that kept every key on its line.
	orders, prevOrders map[string][]string
}

// rangeOf returns where the key at an index path (see keyJoin) is written, or its nearest
// enclosing key's place when it is not written (a table only implied by [a.b]).
func (f *sheetFile) rangeOf(path string) Range {
	r := Range{File: f.name}
	if p, ok := f.ix.get(path); ok {
		r.Start = p.Key
		r.End = p.KeyEnd
	} else if parent, ok := parentPath(path); ok {
		return f.rangeOf(parent)
	}
	return r
}

// valueRange returns where the value at an index path is written.
func (f *sheetFile) valueRange(path string) Range {
	r := f.rangeOf(path)
	if p, ok := f.ix.get(path); ok {
		r.Start, r.End = p.Val, p.ValEnd
	}
	return r
}

func (l *loader) errAt(r Range, name, hint, format string, args ...any) {
	l.diags = append(l.diags, Diagnostic{Severity: Error, Quantity: name, Summary: fmt.Sprintf(format, args...), Hint: hint, Range: r})
}

// load reads one file (the worksheet when prefix is "") into the sheet.
func (l *loader) load(fsPath, display, prefix string, at Range) {
	for _, s := range l.stack {
		if s == fsPath {
			l.errAt(at, "", "", "parts form a loop: %s -> %s", strings.Join(l.stack, " -> "), fsPath)
			return
		}
	}
	if len(l.stack) > MaxPartsDepth {
		l.errAt(at, "", "flatten the parts", "parts nest more than %d deep", MaxPartsDepth)
		return
	}
	data, err := readSheet(l.fsys, fsPath, prefix != "")
	if err != nil {
		l.errAt(at, "", "", "cannot read %s: %v", display, err)
		return
	}
	if len(data) > maxFileSize {
		l.errAt(at, "", "split the worksheet into parts", "%s is larger than %d MiB, the room 100,000 quantities need", display, maxFileSize>>20)
		return
	}
	h := sha256.Sum256(data)
	l.hash = append(l.hash, h[:]...)
	if !utf8.Valid(data) {
		l.errAt(Range{File: display}, "", "save the file as UTF-8", "the file is not valid UTF-8 text")
		return
	}
	l.stack = append(l.stack, fsPath)
	defer func() { l.stack = l.stack[:len(l.stack)-1] }()

	src := string(data)
	if d := l.lim.prescan(src, display); d != nil {
		l.diags = append(l.diags, *d)
		return
	}
	// A file as the earlier load read it is taken as it was decoded and indexed; a file whose
	// edit only changed values is patched (patchDoc); any other is decoded in full, beside
	// the position index.
	prevFile := l.sh.prevFile(l.prev, fsPath, prefix)
	if prevFile != nil && prevFile.src == src {
		f := &sheetFile{name: display, fsPath: fsPath, ix: prevFile.ix, prefix: prefix, src: src, doc: prevFile.doc, prevOrders: prevFile.orders, values: prevFile.values, counted: prevFile.counted}
		l.sh.files = append(l.sh.files, f)
		l.document(f, f.doc)
		return
	}
	// A patched document usually comes with a patched index (patchIndex): only the edited
	// lines are scanned again. Otherwise the index is built beside the decoding.
	doc, edits, patched := patchDoc(prevFile, src, nil)
	values := -1
	var ix *posIndex
	if patched {
		l.sh.npatched++
		if ix = patchIndex(prevFile, src, edits); ix != nil {
			l.sh.nindexPatched++
		} else {
			ix = indexTOML(src)
		}
	} else {
		ixc := make(chan *posIndex, 1)
		go func() { ixc <- indexTOML(src) }()
		doc, values, err = decodeTOML(src)
		ix = <-ixc
	}
	f := &sheetFile{name: display, fsPath: fsPath, ix: ix, prefix: prefix, src: src, doc: doc, values: values, counted: values >= 0}
	if patched {
		f.prevOrders = prevFile.orders // every key is on the line it was on
	}
	if len(l.sh.byName) == 0 && len(l.sh.nodes) == 0 && cap(l.sh.nodes) == 0 {
		// nothing loaded yet: every quantity has a key in the file
		l.sh.byName = make(map[string]int, len(f.ix.pos))
		l.sh.nodes = make([]*node, 0, len(f.ix.pos))
		l.formulaSites = make([]site, 0, len(f.ix.pos))
	}
	if err == nil {
		l.sh.files = append(l.sh.files, f)
	}
	if err != nil {
		var pe toml.ParseError
		r := Range{File: display}
		msg := err.Error()
		hint := "see https://toml.io for the syntax"
		if errors.As(err, &pe) {
			r.Start, r.End = tomlErrorPos(src, pe.Position.Line, pe.Position.Start, pe.Position.Len)
			msg = "TOML syntax: " + pe.Message
			if m := dupKey.FindStringSubmatch(pe.Message); m != nil {
				msg, hint = fmt.Sprintf("%s is defined twice", m[1]), ""
				if p, ok := f.ix.get(keyPathOf(m[1])); ok && p.Key.Line != r.Start.Line {
					hint = fmt.Sprintf("already defined at %s", Range{File: display, Start: p.Key})
				}
			}
		}
		l.errAt(r, "", hint, "%s", msg)
		return
	}
	l.document(f, doc)
}

func (l *loader) document(f *sheetFile, doc map[string]any) {
	top := &Group{Name: f.prefix, Range: Range{File: f.name, Start: Pos{Line: 1, Col: 1}}}
	l.sh.Groups = append(l.sh.Groups, top)
	main := f.prefix == ""
	keys := l.ordered(f, "", doc)
	a := l.buildAhead(f, doc, keys)
	for _, key := range keys {
		v := doc[key]
		r := f.rangeOf(escapeKey(key))
		switch key {
		case "title", "summary", "focus":
			s, ok := v.(string)
			if !ok {
				l.errAt(r, "", "", "%s must be a text in quotes", key)
				continue
			}
			if !main {
				continue // a part's title and focus belong to the part's own page
			}
			switch key {
			case "title":
				l.sh.Title = s
			case "summary":
				l.sh.Summary = s
			case "focus":
				l.sh.Focus, l.focusAt = s, f.valueRange("focus")
			}
		case "use":
			l.parts(f, v, r)
		case "require":
			if main {
				l.requires(f, v)
			}
		case "sweep":
			if main {
				l.sweeps(f, v)
			}
		case "solve":
			if main {
				l.solves(f, v)
			}
		case "spurs", "products":
			l.freqPlan(f, key, v, main)
		case "case":
			if main {
				l.cases(f, v)
			}
		default:
			if n := units.Nearest(key, topKeys); n != "" {
				if text, isText := v.(string); isText && !looksLikeQuantity(text) {
					l.errAt(r, "", fmt.Sprintf("did you mean %q?", n), "unknown key %q", key)
					continue
				}
			}
			l.memberAhead(f, top, escapeKey(key), key, v, a)
		}
	}
}

// ordered returns the keys of table m (at path) in file order. After an edit that kept
// every key on its line, the earlier load's order of a table with the same keys is still
// the order.
func (l *loader) ordered(f *sheetFile, path string, m map[string]any) []string {
	if f.orders == nil {
		f.orders = map[string][]string{}
	}
	if po, ok := f.prevOrders[path]; ok && len(po) == len(m) {
		same := true
		for _, k := range po {
			if _, has := m[k]; !has {
				same = false
				break
			}
		}
		if same {
			f.orders[path] = po
			return po
		}
	}
	out := l.sortedKeys(f, path, m)
	f.orders[path] = out
	return out
}

// sortedKeys sorts the keys of table m (at path) by where the index has them.
func (l *loader) sortedKeys(f *sheetFile, path string, m map[string]any) []string {
	type keyAt struct {
		key       string
		line, col int
	}
	keys := make([]keyAt, 0, len(m))
	for k := range m {
		full := keyJoin(path, k)
		line, col := 1<<30, 0
		if p, ok := f.ix.get(full); ok {
			line, col = p.Key.Line, p.Key.Col
		} else if p, ok := f.ix.get(full + "[0]"); ok {
			line, col = p.Key.Line, p.Key.Col
		} else if p, ok := f.ix.first[full]; ok { // a table only implied by [k.sub] or [[k.chain]]
			line, col = p.Line, p.Col
		}
		keys = append(keys, keyAt{k, line, col})
	}
	slices.SortFunc(keys, func(a, b keyAt) int {
		if a.line != b.line {
			return a.line - b.line
		}
		if a.col != b.col {
			return a.col - b.col
		}
		return strings.Compare(a.key, b.key)
	})
	out := make([]string, len(keys))
	for i, k := range keys {
		out[i] = k.key
	}
	return out
}

// member adds one key of a group: a quantity, a nested group or a chain.
func (l *loader) member(f *sheetFile, g *Group, path, key string, v any) {
	r := f.rangeOf(path)
	full := join(g.Name, key)
	if !isName(key) {
		l.errAt(r, full, "names start with a letter and hold letters, digits and _", "%q is not a valid name", key)
		return
	}
	if _, ok := predeclared[key]; ok && g.Name == "" {
		l.errAt(r, full, "pi, c0, kB and T0 are built in; choose another name", "%q cannot be redefined", key)
		return
	}
	switch v := v.(type) {
	case map[string]any:
		if l.longForm(f, path, v) {
			l.quantity(f, g, path, key, v)
			return
		}
		sub := &Group{Name: full, Range: r}
		l.sh.Groups = append(l.sh.Groups, sub)
		for _, k := range l.ordered(f, path, v) {
			l.member(f, sub, keyJoin(path, k), k, v[k])
		}
	case []map[string]any:
		l.chain(f, g, path, key, v)
	case []any:
		tables := make([]map[string]any, 0, len(v))
		for _, e := range v {
			m, ok := e.(map[string]any)
			if !ok {
				l.errAt(r, full, "a quantity is a text such as \"3 dB\"; an array is only for chains of stages", "arrays are not quantities")
				return
			}
			tables = append(tables, m)
		}
		l.chain(f, g, path, key, tables)
	default:
		// A quantity written as its value alone is read as its long form { is = … }; one
		// map serves them all, since nothing keeps it.
		if l.short == nil {
			l.short = map[string]any{}
		}
		l.short["is"] = v
		l.quantity(f, g, path, key, l.short)
		l.short["is"] = nil
	}
}

// isName reports whether s is a valid name, as validName says (without the regexp: every
// key of a sheet is tested).
func isName(s string) bool {
	if s == "" || !(s[0] >= 'A' && s[0] <= 'Z' || s[0] >= 'a' && s[0] <= 'z') {
		return false
	}
	for i := 1; i < len(s); i++ {
		c := s[i]
		if !(c >= 'A' && c <= 'Z' || c >= 'a' && c <= 'z' || c >= '0' && c <= '9' || c == '_') {
			return false
		}
	}
	return true
}

// cIdent is what export = "NAME" may be: a C identifier.
var cIdent = regexp.MustCompile(`^[A-Za-z][A-Za-z0-9_]*$`)

// longForm reports whether a table is a quantity's long form rather than a group: it has
// "is", or it is an inline table with one of the long form's keys, or it has nothing but them.
// A group may hold quantities named like those keys ([path] with dist = "2 km").
func (l *loader) longForm(f *sheetFile, path string, m map[string]any) bool {
	if _, ok := m["is"]; ok {
		return true
	}
	if !hasAny(m, quantityKeys[1:]) {
		return false
	}
	if p, ok := f.ix.get(path); ok && p.Inline {
		return true
	}
	for k := range m {
		if !contains(quantityKeys, k) {
			return false
		}
	}
	return true
}

func hasAny(m map[string]any, keys []string) bool {
	for _, k := range keys {
		if _, ok := m[k]; ok {
			return true
		}
	}
	return false
}

func (l *loader) addNode(n *node) int {
	id := len(l.sh.nodes)
	l.sh.nodes = append(l.sh.nodes, n)
	l.sh.byName[n.name] = id
	return id
}

func (l *loader) quantity(f *sheetFile, g *Group, path, key string, m map[string]any) {
	full := join(g.Name, key)
	r := f.rangeOf(path)
	if _, dup := l.sh.byName[full]; dup {
		l.errAt(r, full, "", "%s is defined twice", full)
		return
	}
	l.nq++
	if l.nq > MaxQuantities {
		if l.nq == MaxQuantities+1 {
			l.errAt(r, full, "split the worksheet into parts", "more than %d quantities", MaxQuantities)
		}
		return
	}
	q := &Quantity{Name: full, Group: g.Name, Range: r}
	val, ok := l.quantityFields(f, q, path, m)
	n := &node{name: full, q: q, ok: ok, input: val}
	q.node = l.addNode(n)
	l.formulaSites = append(l.formulaSites, site{f: f, path: path + isPath(m), node: q.node, sc: scope{group: g.Name, part: f.prefix}})
	g.Quantities = append(g.Quantities, q)
}

func isPath(m map[string]any) string {
	if len(m) == 1 {
		if _, ok := m["is"]; ok {
			return ""
		}
	}
	return ".is"
}

// quantityKeysOK reports the keys of a quantity's long form that are not its keys, and
// whether there were none.
func (l *loader) quantityKeysOK(f *sheetFile, q *Quantity, path string, m map[string]any) bool {
	ok := true
	for _, k := range l.ordered(f, path, m) {
		if !contains(quantityKeys, k) {
			l.errAt(f.rangeOf(keyJoin(path, k)), q.Name, didYouMean(k, quantityKeys, "a quantity's keys are is, tol, sigma, dist, note, show, source, export"), "unknown key %q", k)
			ok = false
		}
	}
	return ok
}

// quantityFields reads the long form of a quantity and returns an input's value; it reports
// whether the quantity is usable.
func (l *loader) quantityFields(f *sheetFile, q *Quantity, path string, m map[string]any) (value units.Q, ok bool) {
	q.sh = l.sh
	// the short form (and a long form of "is" alone) has no key to check
	isv, has := m["is"]
	ok = (has && len(m) == 1) || l.quantityKeysOK(f, q, path, m)
	if !has {
		l.errAt(f.rangeOf(path), q.Name, "add is = \"<value>\"", "the long form needs \"is\"")
		return value, false
	}
	vr := f.valueRange(path + isPath(m))
	switch v := isv.(type) {
	case string:
		if rest, isFormula := strings.CutPrefix(strings.TrimSpace(v), "="); isFormula {
			q.Formula = strings.TrimSpace(rest)
			if q.Formula == "" {
				l.errAt(vr, q.Name, "write an expression after \"=\"", "empty formula")
				ok = false
			}
			break
		}
		val, u, err := units.Parse(v)
		if err != nil {
			l.errAt(vr, q.Name, unitHint(err), "%s", unitMsg(err))
			ok = false
			break
		}
		q.Text, q.Unit, value = strings.TrimSpace(v), u, val
	case int64:
		q.Text, value = strconv.FormatInt(v, 10), units.Num(float64(v))
	case float64:
		if math.IsInf(v, 0) || math.IsNaN(v) {
			l.errAt(vr, q.Name, "write a finite number", "%v is not a value a quantity can have", v)
			ok = false
			break
		}
		q.Text, value = strconv.FormatFloat(v, 'g', -1, 64), units.Num(v)
	default:
		l.errAt(vr, q.Name, "write a number, a number with a unit in quotes (\"3 dB\"), or \"= formula\"", "a %s is not a quantity", tomlType(v))
		ok = false
	}
	for _, k := range []string{"note", "source", "show", "dist"} {
		if v, has := m[k]; has {
			s, isStr := v.(string)
			if !isStr {
				l.errAt(f.valueRange(join(path, k)), q.Name, "", "%s must be a text in quotes", k)
				ok = false
				continue
			}
			switch k {
			case "note":
				q.Note = s
			case "source":
				q.Source = s
			case "show":
				u, err := units.ParseUnit(s)
				if err != nil {
					l.errAt(f.valueRange(join(path, k)), q.Name, unitHint(err), "show: %s", unitMsg(err))
					ok = false
				} else {
					l.shows = append(l.shows, shownAt{q, f.valueRange(join(path, k))})
				}
				q.Show = u
			}
		}
	}
	if v, has := m["export"]; has {
		switch x := v.(type) {
		case bool:
			q.Export = x
		case string:
			if !cIdent.MatchString(x) {
				l.errAt(f.valueRange(join(path, "export")), q.Name, "letters, digits and _, not starting with a digit", "export name %q is not a C macro name", x)
			}
			q.Export, q.ExportName = true, x
		default:
			l.errAt(f.valueRange(join(path, "export")), q.Name, "", "export must be true, false or a macro name")
		}
	}
	if v, has := m["tol"]; has {
		t, err := parseTol(v)
		if err != nil {
			l.errAt(f.valueRange(join(path, "tol")), q.Name, "write tol = \"1 dB\", \"10 %\" or [\"-0.5 dB\", \"+1.5 dB\"]", "tol: %v", err)
			ok = false
		} else {
			q.Tol = t
		}
	}
	if v, has := m["sigma"]; has {
		ok = l.sigma(f, q, path, v, m) && ok
	}
	if d, has := m["dist"].(string); has {
		if !contains(distNames, d) {
			l.errAt(f.valueRange(join(path, "dist")), q.Name, didYouMean(d, distNames, "dist is normal, uniform or triangular"), "unknown distribution %q", d)
			ok = false
		} else if q.Tol == nil {
			if m["sigma"] == nil {
				l.errAt(f.valueRange(join(path, "dist")), q.Name, "add tol = \"…\"", "dist without tol")
			}
		} else {
			q.Tol.Dist = d
		}
	}
	if q.Tol != nil && q.Formula != "" {
		l.errAt(f.valueRange(join(path, q.Tol.keyName())), q.Name, "put the tolerance on the inputs the formula uses", "a derived quantity cannot have a tolerance")
		ok = false
	}
	if q.Tol != nil && q.Tol.Dist == "" {
		q.Tol.Dist = "normal"
	}
	if ok && q.Tol != nil && q.Formula == "" {
		ok = l.checkTolerance(f, q, path, value)
	}
	return value, ok
}

func parseTol(v any) (*Tol, error) {
	switch v := v.(type) {
	case string:
		q, u, err := units.Parse(v)
		if err != nil {
			return nil, err
		}
		if err := absoluteLevelTol(u); err != nil {
			return nil, err
		}
		if q.V < 0 {
			return nil, fmt.Errorf("a symmetric tolerance is written without a sign, e.g. \"1 dB\"")
		}
		if u.HasOffset() {
			return nil, &units.Error{Msg: fmt.Sprintf("a tolerance in %s would be read from its zero point", u.Sym), Hint: "write a temperature tolerance in K (2 K is 2 °C of difference)"}
		}
		if u.Sym == "%" || u.Sym == "ppm" {
			return &Tol{Text: v, Relative: true, RelMinus: q.V, RelPlus: q.V}, nil
		}
		return &Tol{Text: v, Minus: q, Plus: q}, nil
	case []any:
		if len(v) != 2 {
			return nil, fmt.Errorf("an asymmetric tolerance has two entries, low and high")
		}
		var qs [2]units.Q
		var us [2]*units.Unit
		for i, e := range v {
			s, ok := e.(string)
			if !ok {
				return nil, fmt.Errorf("entries must be texts such as \"-0.5 dB\"")
			}
			q, u, err := units.Parse(s)
			if err != nil {
				return nil, err
			}
			if u.HasOffset() {
				return nil, &units.Error{Msg: fmt.Sprintf("a tolerance in %s would be read from its zero point", u.Sym), Hint: "write a temperature tolerance in K (2 K is 2 °C of difference)"}
			}
			if err := absoluteLevelTol(u); err != nil {
				return nil, err
			}
			qs[i], us[i] = q, u
		}
		if qs[0].V > 0 || qs[1].V < 0 {
			return nil, fmt.Errorf("write the low side with a minus and the high side with a plus, e.g. [\"-0.5 dB\", \"+1.5 dB\"]")
		}
		text := fmt.Sprint(v[0], " / ", v[1])
		if us[0].Sym == "%" && us[1].Sym == "%" {
			return &Tol{Text: text, Relative: true, RelMinus: -qs[0].V, RelPlus: qs[1].V}, nil
		}
		minus, err := units.Neg(qs[0])
		if err != nil {
			return nil, err
		}
		return &Tol{Text: text, Minus: minus, Plus: qs[1]}, nil
	}
	return nil, fmt.Errorf("a tolerance is a text such as \"1 dB\" or a pair [\"-0.5 dB\", \"+1.5 dB\"]")
}

func tomlType(v any) string {
	switch v.(type) {
	case bool:
		return "true/false value"
	case map[string]any:
		return "table"
	case []any, []map[string]any:
		return "array"
	}
	return "date or time"
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

func didYouMean(s string, candidates []string, otherwise string) string {
	if n := units.Nearest(s, candidates); n != "" {
		return fmt.Sprintf("did you mean %q?", n)
	}
	// A key written out in full where the format uses its short form ("tolerance" for "tol").
	best := ""
	for _, c := range candidates {
		if len(c) >= 3 && len(c) > len(best) && strings.HasPrefix(s, c) {
			best = c
		}
	}
	if best != "" {
		return fmt.Sprintf("did you mean %q?", best)
	}
	return otherwise
}

func unitMsg(err error) string {
	var ue *units.Error
	if errors.As(err, &ue) {
		return ue.Msg
	}
	return err.Error()
}

func unitHint(err error) string {
	var ue *units.Error
	if errors.As(err, &ue) {
		return ue.Hint
	}
	return ""
}

func (l *loader) chain(f *sheetFile, g *Group, path, key string, tables []map[string]any) {
	full := join(g.Name, key)
	r := f.rangeOf(path + "[0]")
	if _, dup := l.sh.byName[full]; dup {
		l.errAt(r, full, "", "%s is defined twice", full)
		return
	}
	ch := &Chain{Name: full, Range: r}
	n := &node{name: full, chain: ch, ok: true}
	ch.node = l.addNode(n)
	for i, t := range tables {
		sp := path + "[" + strconv.Itoa(i) + "]"
		st := &Stage{Label: fmt.Sprintf("stage %d", i+1), Values: map[string]*Quantity{}, Range: f.rangeOf(sp)}
		for _, k := range l.ordered(f, sp, t) {
			v := t[k]
			kr := f.rangeOf(keyJoin(sp, k))
			qname := fmt.Sprintf("%s[%d].%s", full, i+1, k)
			switch {
			case k == "stage" || k == "note":
				s, ok := v.(string)
				if !ok {
					l.errAt(kr, qname, "", "%s must be a text in quotes", k)
					continue
				}
				if k == "stage" {
					st.Label = s
				} else {
					st.Note = s
				}
			case contains(stageKeys, k):
				m, isMap := v.(map[string]any)
				if !isMap {
					m = map[string]any{"is": v}
				}
				q := &Quantity{Name: qname, Group: g.Name, Range: kr}
				val, ok := l.quantityFields(f, q, join(sp, k), m)
				qn := &node{name: qname, q: q, ok: ok, input: val}
				q.node = l.addNode(qn)
				l.formulaSites = append(l.formulaSites, site{f: f, path: keyJoin(sp, k) + isPath(m), node: q.node, sc: scope{group: g.Name, part: f.prefix}})
				st.Values[k] = q
				st.Keys = append(st.Keys, k)
				st.slots = append(st.slots, stageSlot{stageKeyIndex(k), q.node})
				n.deps = append(n.deps, q.node)
			default:
				l.errAt(kr, qname, didYouMean(k, stageAllKeys, "a stage's keys are stage, gain, nf, te, loss, iip3, oip3, iip2, oip2, ip1db, op1db, note"), "unknown stage key %q", k)
			}
		}
		if !l.checkStageKeys(full, st) {
			ch.broken = true
		}
		ch.Stages = append(ch.Stages, st)
	}
	g.Chains = append(g.Chains, ch)
}

func (l *loader) parts(f *sheetFile, v any, r Range) {
	m, ok := v.(map[string]any)
	if !ok {
		l.errAt(r, "", "write use = { name = \"parts/file.toml\" }", "use must be a table of part names and files")
		return
	}
	for _, name := range l.ordered(f, "use", m) {
		pr := f.valueRange(keyJoin("use", name))
		file, ok := m[name].(string)
		if !ok {
			l.errAt(pr, "", "", "use.%s must be a file name in quotes", name)
			continue
		}
		if !validName.MatchString(name) {
			l.errAt(pr, "", "names start with a letter and hold letters, digits and _", "%q is not a valid part name", name)
			continue
		}
		if path.IsAbs(file) || strings.HasPrefix(file, "\\") || strings.Contains(file, ":") {
			l.errAt(pr, "", "parts are given relative to the worksheet", "part %q: absolute paths are not allowed", file)
			continue
		}
		if strings.Contains(file, "\\") {
			// On Windows a backslash separates folders (..\x.toml would climb out); here it
			// would be part of a file name. Either way the sheet means something else on
			// another machine.
			l.errAt(pr, "", "write / between folders, on every system", "part %q: a backslash is not a folder separator in a worksheet", file)
			continue
		}
		p := path.Clean(path.Join(path.Dir(f.fsPath), file))
		if !fs.ValidPath(p) {
			l.errAt(pr, "", "parts must stay inside the worksheet's folder", "part %q leaves the worksheet's folder", file)
			continue
		}
		prefix := join(f.prefix, name)
		if _, dup := l.sh.byName[prefix]; dup {
			l.errAt(pr, "", "", "part name %q is already used", prefix)
			continue
		}
		l.sh.Parts = append(l.sh.Parts, p)
		display := path.Join(path.Dir(f.name), file)
		l.load(p, display, prefix, pr)
	}
}

func tableList(l *loader, f *sheetFile, key string, v any) []map[string]any {
	switch v := v.(type) {
	case []map[string]any:
		return v
	case []any:
		var out []map[string]any
		for _, e := range v {
			if m, ok := e.(map[string]any); ok {
				out = append(out, m)
			}
		}
		if len(out) == len(v) {
			return out
		}
	}
	l.errAt(f.rangeOf(key), "", fmt.Sprintf("write each entry as [[%s]]", key), "%s must be a list of tables", key)
	return nil
}

func (l *loader) checkKeys(f *sheetFile, path string, m map[string]any, allowed []string, what string) {
	for _, k := range l.ordered(f, path, m) {
		if !contains(allowed, k) {
			l.errAt(f.rangeOf(keyJoin(path, k)), "", didYouMean(k, allowed, what+" keys are "+strings.Join(allowed, ", ")), "unknown key %q", k)
		}
	}
}

func (l *loader) requires(f *sheetFile, v any) {
	for i, m := range tableList(l, f, "require", v) {
		p := fmt.Sprintf("require[%d]", i)
		l.checkKeys(f, p, m, requireKeys, "a requirement's")
		rq := &Require{Range: f.valueRange(join(p, "that"))}
		rq.Note = l.noteText(f, join(p, "note"), m)
		that, ok := m["that"].(string)
		if !ok {
			l.errAt(f.rangeOf(p), "", "write that = \"= link.margin >= 6 dB\"", "a requirement needs that = \"= formula\"")
			continue
		}
		rq.That = strings.TrimSpace(strings.TrimPrefix(strings.TrimSpace(that), "="))
		l.sh.Requires = append(l.sh.Requires, rq)
		l.reqSites = append(l.reqSites, site{f: f, path: join(p, "that"), req: rq})
	}
}

func (l *loader) qty(f *sheetFile, path string, v any) (units.Q, bool) {
	s, ok := v.(string)
	if !ok {
		if n, isNum := v.(int64); isNum {
			return units.Num(float64(n)), true
		}
		if x, isNum := v.(float64); isNum {
			return units.Num(x), true
		}
		l.errAt(f.valueRange(path), "", "", "%s must be a number with a unit in quotes, e.g. \"5 km\"", path)
		return units.Q{}, false
	}
	q, _, err := units.Parse(s)
	if err != nil {
		l.errAt(f.valueRange(path), "", unitHint(err), "%s", unitMsg(err))
		return units.Q{}, false
	}
	return q, true
}

func (l *loader) sweeps(f *sheetFile, v any) {
	for i, m := range tableList(l, f, "sweep", v) {
		p := fmt.Sprintf("sweep[%d]", i)
		l.checkKeys(f, p, m, sweepKeys, "a sweep's")
		sw := &Sweep{Range: f.rangeOf(p), Steps: 20}
		if missing := missingKeys(m, sweepNeeds...); len(missing) > 0 {
			l.errAt(sw.Range, "sweep", "a sweep needs vary, from and to", "missing %s", strings.Join(missing, ", "))
			continue
		}
		sw.Vary, _ = m["vary"].(string)
		var ok1, ok2 bool
		sw.From, ok1 = l.qty(f, join(p, "from"), m["from"])
		sw.To, ok2 = l.qty(f, join(p, "to"), m["to"])
		if v, has := m["steps"]; has {
			n, isInt := v.(int64)
			if !isInt || n < 2 || n > MaxSweepSteps {
				l.errAt(f.valueRange(join(p, "steps")), "sweep", "write steps = 40 (a whole number, not in quotes)", "steps must be a whole number from 2 to %d, not %s", MaxSweepSteps, tomlText(v))
				continue
			}
			sw.Steps = int(n)
		}
		if sw.Steps < 2 || sw.Steps > MaxSweepSteps {
			l.errAt(f.valueRange(join(p, "steps")), "", "", "steps must be between 2 and %d", MaxSweepSteps)
			continue
		}
		switch m["scale"] {
		case nil, "lin", "linear":
		case "log":
			sw.Log = true
		default:
			l.errAt(f.valueRange(join(p, "scale")), "", "", "scale is \"lin\" or \"log\"")
		}
		sw.Plot = l.plotNames(f, join(p, "plot"), m)
		if sw.Vary == "" || !ok1 || !ok2 {
			if sw.Vary == "" {
				l.errAt(sw.Range, "", "", "a sweep needs vary, from and to")
			}
			continue
		}
		if sw.Log && (sw.From.V <= 0 || sw.To.V <= 0 || sw.From.K != units.Linear) {
			l.errAt(f.valueRange(join(p, "scale")), "", "", "a log sweep needs positive linear from and to")
			continue
		}
		l.sh.Sweeps = append(l.sh.Sweeps, sw)
	}
}

func (l *loader) solves(f *sheetFile, v any) {
	for i, m := range tableList(l, f, "solve", v) {
		p := fmt.Sprintf("solve[%d]", i)
		l.checkKeys(f, p, m, solveKeys, "a solve's")
		so := &Solve{Range: f.rangeOf(p)}
		if missing := missingKeys(m, solveNeeds...); len(missing) > 0 {
			l.errAt(so.Range, "solve", "a solve needs name, vary, so_that, equals and within", "missing %s", strings.Join(missing, ", "))
			continue
		}
		so.Name, _ = m["name"].(string)
		so.Vary, _ = m["vary"].(string)
		so.SoThat, _ = m["so_that"].(string)
		eq, ok := l.qty(f, join(p, "equals"), m["equals"])
		so.Equals = eq
		so.equalsAt, so.withinAt = f.valueRange(join(p, "equals")), f.valueRange(join(p, "within"))
		w, isList := m["within"].([]any)
		if !isList || len(w) != 2 {
			l.errAt(f.rangeOf(p), "", "write within = [\"10 m\", \"100 km\"]", "a solve needs within = [low, high]")
			continue
		}
		lo, ok1 := l.qty(f, join(p, "within[0]"), w[0])
		hi, ok2 := l.qty(f, join(p, "within[1]"), w[1])
		so.Within = [2]units.Q{lo, hi}
		if so.Name == "" || so.Vary == "" || so.SoThat == "" {
			l.errAt(so.Range, "", "", "a solve needs name, vary, so_that, equals and within")
			continue
		}
		if ok && ok1 && ok2 {
			l.sh.Solves = append(l.sh.Solves, so)
		}
	}
}

func hashHex(b []byte) string {
	h := sha256.Sum256(b)
	return hex.EncodeToString(h[:])[:16]
}

// missingKeys lists the required keys a table lacks, in the order given.
func missingKeys(m map[string]any, keys ...string) []string {
	var out []string
	for _, k := range keys {
		if _, ok := m[k]; !ok {
			out = append(out, k)
		}
	}
	return out
}

// looksLikeQuantity reports whether a text reads as a formula or a number with a unit.
func looksLikeQuantity(text string) bool {
	if strings.HasPrefix(strings.TrimSpace(text), "=") {
		return true
	}
	_, _, err := units.Parse(text)
	return err == nil
}

// prevFile returns the earlier load's file of the same path and part prefix, or nil.
func (s *Sheet) prevFile(prev *Sheet, fsPath, prefix string) *sheetFile {
	if prev == nil {
		return nil
	}
	for _, f := range prev.files {
		if f.fsPath == fsPath && f.prefix == prefix {
			return f
		}
	}
	return nil
}
