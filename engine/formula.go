package engine

import (
	"errors"
	"fmt"
	"math"
	"reflect"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/expr-lang/expr/ast"
	"github.com/expr-lang/expr/builtin"
	"github.com/expr-lang/expr/checker"
	"github.com/expr-lang/expr/compiler"
	"github.com/expr-lang/expr/conf"
	"github.com/expr-lang/expr/file"
	"github.com/expr-lang/expr/parser"
	"github.com/expr-lang/expr/vm"

	"github.com/rfledger/rfledger/units"
)

// Limits on a single formula.
const (
	maxFormulaLen = 4000 // characters
	maxNodes      = 2000 // expr syntax-tree nodes
	maxDepth      = 64   // nesting of the syntax tree
)

// ferr is a problem in a formula at rune offsets [from, to) of its text.
type ferr struct {
	from, to  int
	msg, hint string
	isWarning bool
}

func (e ferr) Error() string { return e.msg }

// typ is the static type of a formula node.
type typ uint8

const (
	tQ typ = iota
	tBool
	tText
	tChain
)

func (t typ) String() string {
	return [...]string{"a quantity", "a true/false value", "a name", "a chain"}[t]
}

// predeclared constants: names no worksheet may redefine.
var predeclared = map[string]units.Q{
	"pi": units.Num(math.Pi),
	"c0": units.Lin(299792458, units.Speed),
	"kB": units.Lin(1.380649e-23, units.Boltzmann),
	"T0": units.Lin(290, units.Temperature),
}

// Names used inside compiled programs. They cannot clash with worksheet names, which never
// start with "@".
const ctxName = "@call"

// scope tells a formula where it stands: its group, and the part prefix it was loaded under.
type scope struct {
	group string // full name of the formula's group ("" for the top group)
	part  string // part prefix ("" for the main sheet)
}

// formulaCompiler turns formula text into an expr program over the sheet's names.
type formulaCompiler struct {
	sh    *Sheet
	lib   *Library
	funcs conf.FunctionsTable
	base  *conf.Config
}

func newFormulaCompiler(sh *Sheet, lib *Library) *formulaCompiler {
	return &formulaCompiler{sh: sh, lib: lib, funcs: lib.exprFuncs()}
}

// exprFuncs returns the library's functions and the operators as expr sees them. It is built
// once per library and only read afterwards, so every sheet loaded with the library shares it.
func (l *Library) exprFuncs() conf.FunctionsTable {
	if l == nil {
		return operatorTable()
	}
	l.once.Do(func() {
		t := operatorTable()
		for _, f := range l.Funcs() {
			ts := make([]reflect.Type, 0, 4)
			for _, ft := range f.exprTypes() {
				ts = append(ts, reflect.TypeOf(ft).Elem())
			}
			t[f.Name] = &builtin.Function{Name: f.Name, Func: f.invoke, Types: ts}
		}
		l.table = t
	})
	return l.table
}

func operatorTable() conf.FunctionsTable {
	t := conf.FunctionsTable{}
	for name, fn := range operatorFuncs {
		t[name] = fn
	}
	return t
}

// config returns the expr configuration for one formula: a copy of the sheet-wide base (built
// once; its tables are only read) with the types of the names the formula uses. Building a
// fresh configuration per formula costs more than compiling the formula itself.
func (fc *formulaCompiler) config(env map[string]any) *conf.Config {
	if fc.base == nil {
		c := conf.CreateNew()
		c.Functions = fc.funcs
		c.Builtins = conf.FunctionsTable{}
		for _, b := range builtin.Builtins {
			c.Disabled[b.Name] = true
		}
		c.MaxNodes = maxNodes
		c.Optimize = false
		fc.base = c
	}
	c := *fc.base
	if env != nil {
		c.WithEnv(env)
	}
	return &c
}

// compiled is a formula ready to run.
type compiled struct {
	prog *vm.Program
	deps []int // graph nodes it reads
	typ  typ
	tree ast.Node       // the rewritten syntax tree, for the budget breakdown
	env  map[string]any // the types of the names it reads
}

// compile parses and checks one formula. want is the type the formula must have.
func (fc *formulaCompiler) compile(text string, sc scope, want typ) (*compiled, []ferr) {
	if n := utf8.RuneCountInString(text); n > maxFormulaLen {
		return nil, []ferr{{0, 1, fmt.Sprintf("formula is %d characters long; the limit is %d", n, maxFormulaLen), "split it into named intermediate quantities", false}}
	}
	if strings.TrimSpace(text) == "" {
		return nil, []ferr{{0, 1, "empty formula", "write an expression after \"=\"", false}}
	}
	src, lits, errs := scanLiterals(text)
	if len(errs) > 0 {
		return nil, errs
	}
	cfg := fc.config(nil)
	tree, err := parser.ParseWithConfig(src, cfg)
	if err != nil {
		return nil, []ferr{exprErr(err, text)}
	}
	rw := &rewriter{fc: fc, sc: sc, lits: lits, env: map[string]any{ctxName: (*Call)(nil)}, seen: map[int]bool{}}
	node, t := rw.rewrite(tree.Node, 0)
	if len(rw.errs) > 0 {
		return nil, rw.errs
	}
	if t != want && !(want == tQ && t == tQ) {
		loc := tree.Node.Location()
		return nil, []ferr{{loc.From, loc.To, fmt.Sprintf("formula gives %s, want %s", t, want), wantHint(want), false}}
	}
	tree.Node = node
	cfg = fc.config(rw.env)
	if _, err := checker.Check(tree, cfg); err != nil {
		return nil, []ferr{exprErr(err, text)}
	}
	prog, err := compiler.Compile(tree, cfg)
	if err != nil {
		return nil, []ferr{exprErr(err, text)}
	}
	return &compiled{prog: prog, deps: rw.deps, typ: t, tree: node, env: rw.env}, nil
}

func wantHint(t typ) string {
	if t == tBool {
		return "a requirement is a comparison, e.g. \"= link.margin >= 6 dB\""
	}
	return "a quantity's formula must give a number with a unit"
}

// exprErr turns an expr error into a formula error at the same place.
func exprErr(err error, text string) ferr {
	var fe *file.Error
	if errors.As(err, &fe) {
		msg := fe.Message
		return ferr{from: fe.From, to: fe.To, msg: cleanExprMsg(msg)}
	}
	return ferr{from: 0, to: 1, msg: err.Error()}
}

func cleanExprMsg(msg string) string {
	msg = strings.ReplaceAll(msg, "units.Q", "quantity")
	msg = strings.ReplaceAll(msg, "*engine.ChainValue", "chain")
	return msg
}

// rewriter checks a parsed formula against the whitelist of what a formula may contain,
// resolves names, turns literals into constants and operators into unit-checked calls.
type rewriter struct {
	fc   *formulaCompiler
	sc   scope
	lits []units.Q
	env  map[string]any
	deps []int
	seen map[int]bool
	errs []ferr
}

func (rw *rewriter) fail(n ast.Node, hint, format string, args ...any) (ast.Node, typ) {
	loc := n.Location()
	rw.errs = append(rw.errs, ferr{from: loc.From, to: loc.To, msg: fmt.Sprintf(format, args...), hint: hint})
	return n, tQ
}

func constant(loc ast.Node, v any) ast.Node {
	c := &ast.ConstantNode{Value: v}
	c.SetLocation(loc.Location())
	return c
}

func call(loc ast.Node, name string, args ...ast.Node) ast.Node {
	callee := &ast.IdentifierNode{Value: name}
	callee.SetLocation(loc.Location())
	c := &ast.CallNode{Callee: callee, Arguments: args}
	c.SetLocation(loc.Location())
	return c
}

var arith = map[string]string{"+": "_add", "-": "_sub", "*": "_mul", "/": "_div", "**": "_pow", "^": "_pow"}
var compare = map[string]string{"<": "_lt", "<=": "_le", ">": "_gt", ">=": "_ge", "==": "_eq", "!=": "_ne"}

func (rw *rewriter) rewrite(n ast.Node, depth int) (ast.Node, typ) {
	if depth > maxDepth {
		return rw.fail(n, "use named intermediate quantities", "formula is nested more than %d deep", maxDepth)
	}
	switch n := n.(type) {
	case *ast.IntegerNode:
		return constant(n, units.Num(float64(n.Value))), tQ
	case *ast.FloatNode:
		return constant(n, units.Num(n.Value)), tQ
	case *ast.BoolNode:
		return n, tBool
	case *ast.IdentifierNode:
		return rw.name(n, n.Value)
	case *ast.MemberNode:
		name, ok := dotted(n)
		if !ok {
			return rw.fail(n, "only dotted names like tx.power are allowed", "indexing is not allowed in a formula")
		}
		return rw.name(n, name)
	case *ast.UnaryNode:
		x, t := rw.rewrite(n.Node, depth+1)
		switch n.Operator {
		case "-":
			if t != tQ {
				return rw.fail(n, "", "cannot negate %s", t)
			}
			return call(n, "_neg", x), tQ
		case "+":
			if t != tQ {
				return rw.fail(n, "", "cannot apply + to %s", t)
			}
			return x, tQ
		case "!", "not":
			if t != tBool {
				return rw.fail(n, "", "\"%s\" needs a true/false value, got %s", n.Operator, t)
			}
			n.Node = x
			return n, tBool
		}
		return rw.fail(n, "", "operator %q is not allowed in a formula", n.Operator)
	case *ast.BinaryNode:
		return rw.binary(n, depth)
	case *ast.ConditionalNode:
		c, tc := rw.rewrite(n.Cond, depth+1)
		a, ta := rw.rewrite(n.Exp1, depth+1)
		b, tb := rw.rewrite(n.Exp2, depth+1)
		if tc != tBool {
			return rw.fail(n.Cond, "write a comparison, e.g. d > 1 km", "the condition of ?: must be true/false, got %s", tc)
		}
		if ta != tb {
			return rw.fail(n, "", "the two branches of ?: differ: %s and %s", ta, tb)
		}
		n.Cond, n.Exp1, n.Exp2 = c, a, b
		return n, ta
	case *ast.CallNode:
		return rw.call(n, depth)
	case *ast.StringNode:
		return rw.fail(n, "names in quotes are only for function arguments such as ber('qpsk', x)", "a text is not allowed here")
	case *ast.ChainNode:
		return rw.fail(n, "write tx.power", "\"?.\" is not allowed in a formula")
	case *ast.BuiltinNode:
		return rw.fail(n, "see `rfledger funcs` for the functions a formula may call", "%s() is not a formula function", n.Name)
	}
	return rw.fail(n, "formulas hold numbers with units, names, + - * / ^, comparisons, && || !, ?: and function calls", "this construct is not allowed in a formula")
}

func (rw *rewriter) binary(n *ast.BinaryNode, depth int) (ast.Node, typ) {
	l, tl := rw.rewrite(n.Left, depth+1)
	r, tr := rw.rewrite(n.Right, depth+1)
	if fn, ok := arith[n.Operator]; ok {
		if tl != tQ || tr != tQ {
			return rw.fail(n, "", "%q needs quantities on both sides", n.Operator)
		}
		return call(n, fn, l, r), tQ
	}
	if fn, ok := compare[n.Operator]; ok {
		if tl == tBool && tr == tBool && (n.Operator == "==" || n.Operator == "!=") {
			n.Left, n.Right = l, r
			return n, tBool
		}
		if tl != tQ || tr != tQ {
			return rw.fail(n, "", "%q needs quantities on both sides", n.Operator)
		}
		return call(n, fn, l, r), tBool
	}
	switch n.Operator {
	case "&&", "||", "and", "or":
		if tl != tBool || tr != tBool {
			return rw.fail(n, "", "%q needs true/false values on both sides", n.Operator)
		}
		n.Left, n.Right = l, r
		return n, tBool
	case "%":
		return rw.fail(n, "", "the remainder operator %% is not allowed in a formula")
	}
	return rw.fail(n, "", "operator %q is not allowed in a formula", n.Operator)
}

func (rw *rewriter) call(n *ast.CallNode, depth int) (ast.Node, typ) {
	id, ok := n.Callee.(*ast.IdentifierNode)
	if !ok {
		return rw.fail(n, "", "only built-in functions can be called")
	}
	f, ok := rw.fc.lib.Lookup(id.Value)
	if !ok || strings.HasPrefix(id.Value, "_") {
		hint := "see `rfledger funcs` for the list"
		if s := units.Nearest(id.Value, rw.fc.lib.names()); s != "" {
			hint = fmt.Sprintf("did you mean %q?", s)
		}
		return rw.fail(n.Callee, hint, "unknown function %q", id.Value)
	}
	required := 0
	for _, a := range f.Args {
		if !a.Optional {
			required++
		}
	}
	if len(n.Arguments) < required || len(n.Arguments) > len(f.Args) && !f.Variadic {
		return rw.fail(n, "usage: "+f.Signature(), "%s takes %s, got %d", f.Name, argCount(required, len(f.Args), f.Variadic), len(n.Arguments))
	}
	args := []ast.Node{&ast.IdentifierNode{Value: ctxName}}
	args[0].SetLocation(n.Location())
	for i, a := range n.Arguments {
		decl := f.Args[min(i, len(f.Args)-1)]
		if s, ok := a.(*ast.StringNode); ok && decl.Kind == ArgText {
			args = append(args, s)
			continue
		}
		x, t := rw.rewrite(a, depth+1)
		want := map[ArgKind]typ{ArgQuantity: tQ, ArgText: tText, ArgChain: tChain}[decl.Kind]
		if t != want {
			hint := ""
			if decl.Kind == ArgText {
				hint = "write the name in single quotes, e.g. 'qpsk'"
			}
			rw.fail(a, hint, "%s: %s: got %s, want %s", f.Name, decl.Name, t, want)
			continue
		}
		args = append(args, x)
	}
	return call(n, f.Name, args...), tQ
}

func argCount(req, all int, variadic bool) string {
	switch {
	case variadic:
		return fmt.Sprintf("at least %d arguments", req)
	case req == all:
		return fmt.Sprintf("%d arguments", req)
	}
	return fmt.Sprintf("%d to %d arguments", req, all)
}

// name resolves a (possibly dotted) name to a constant, a literal, a quantity or a chain.
func (rw *rewriter) name(n ast.Node, name string) (ast.Node, typ) {
	if i, ok := placeholderIndex(name); ok && i < len(rw.lits) {
		return constant(n, rw.lits[i]), tQ
	}
	if q, ok := predeclared[name]; ok {
		return constant(n, q), tQ
	}
	id, ok := rw.fc.sh.resolve(name, rw.sc)
	if !ok {
		return rw.fail(n, rw.fc.sh.suggest(name, rw.sc), "unknown name %q", name)
	}
	nd := rw.fc.sh.nodes[id]
	if !rw.seen[id] {
		rw.seen[id] = true
		rw.deps = append(rw.deps, id)
	}
	ident := &ast.IdentifierNode{Value: nd.env}
	ident.SetLocation(n.Location())
	if nd.chain != nil {
		rw.env[nd.env] = (*ChainValue)(nil)
		return ident, tChain
	}
	rw.env[nd.env] = units.Q{}
	return ident, tQ
}

// dotted returns "a.b.c" for a member chain of plain names.
func dotted(n ast.Node) (string, bool) {
	switch n := n.(type) {
	case *ast.IdentifierNode:
		return n.Value, true
	case *ast.MemberNode:
		prop, ok := n.Property.(*ast.StringNode)
		if !ok || n.Optional || n.Method {
			return "", false
		}
		base, ok := dotted(n.Node)
		if !ok {
			return "", false
		}
		return base + "." + prop.Value, true
	}
	return "", false
}

// Unit literals. expr has no syntax for "6 dB", so before parsing, every number followed by a
// unit is replaced by a placeholder identifier of exactly the same length ("_3___"). Positions
// in expr's errors then still point into the original text, and the rewriter turns each
// placeholder into a constant quantity.

func placeholder(i, length int) (string, bool) {
	s := "_" + strconv.FormatInt(int64(i), 36)
	if len(s) > length {
		return "", false
	}
	return s + strings.Repeat("_", length-len(s)), true
}

func placeholderIndex(name string) (int, bool) {
	if len(name) < 2 || name[0] != '_' {
		return 0, false
	}
	i, err := strconv.ParseInt(strings.TrimRight(name[1:], "_"), 36, 32)
	if err != nil {
		return 0, false
	}
	return int(i), true
}

var keywords = map[string]bool{
	"and": true, "or": true, "not": true, "in": true, "matches": true, "contains": true,
	"startsWith": true, "endsWith": true, "let": true, "if": true, "else": true, "true": true,
	"false": true, "nil": true,
}

func isIdentRune(r rune) bool { return r == '_' || unicode.IsLetter(r) || unicode.IsDigit(r) }

func isUnitStart(r rune) bool {
	return unicode.IsLetter(r) || r == '%' || r == 'µ' || r == 'μ' || r == 'Ω'
}

func isUnitRune(r rune) bool {
	return isUnitStart(r) || unicode.IsDigit(r) || r == '/' || r == '^' || r == '*' || r == '-' || r == '_'
}

// scanLiterals replaces unit literals by placeholders and returns the literal values.
func scanLiterals(text string) (string, []units.Q, []ferr) {
	rs := []rune(text)
	out := make([]rune, 0, len(rs))
	var lits []units.Q
	var errs []ferr
	for i := 0; i < len(rs); {
		r := rs[i]
		switch {
		case r == '\'' || r == '"' || r == '`':
			j := i + 1
			for j < len(rs) && rs[j] != r {
				if rs[j] == '\\' {
					j++
				}
				j++
			}
			j = min(j+1, len(rs))
			out = append(out, rs[i:j]...)
			i = j
			continue
		case isIdentRune(r) && !unicode.IsDigit(r):
			j := i
			for j < len(rs) && (isIdentRune(rs[j]) || rs[j] == '.' && j+1 < len(rs) && isIdentRune(rs[j+1]) && !unicode.IsDigit(rs[j+1])) {
				j++
			}
			out = append(out, rs[i:j]...)
			i = j
			continue
		case unicode.IsDigit(r) || r == '.' && i+1 < len(rs) && unicode.IsDigit(rs[i+1]):
			start := i
			n := units.NumberLen(string(rs[i:min(len(rs), i+80)]))
			if n == 0 {
				n = 1
			}
			j := i + n
			for j < len(rs) && (isIdentRune(rs[j]) && unicode.IsDigit(rs[j]) || rs[j] == '_') {
				j++ // 1_000
			}
			numEnd := j
			k := j
			for k < len(rs) && (rs[k] == ' ' || rs[k] == '\t') {
				k++
			}
			q, ulen, e := unitAt(rs, numEnd, k)
			if e != nil {
				errs = append(errs, *e)
			}
			if ulen == 0 {
				out = append(out, rs[start:numEnd]...)
				i = numEnd
				continue
			}
			// Fold a unary minus into the literal: "-174 dBm/Hz" is a level, not the negation of one.
			litStart := start
			neg := false
			if m := len(out) - 1; m >= 0 {
				p := m
				for p >= 0 && (out[p] == ' ' || out[p] == '\t') {
					p--
				}
				if p >= 0 && out[p] == '-' && signIsUnary(out[:p]) {
					neg, litStart = true, start-(m-p)-1
					out = out[:p]
				}
			}
			end := k + ulen
			numText := strings.ReplaceAll(string(rs[start:numEnd]), "_", "")
			v, err := strconv.ParseFloat(numText, 64)
			if err != nil || math.IsInf(v, 0) {
				errs = append(errs, ferr{from: start, to: numEnd, msg: fmt.Sprintf("bad number %q", numText)})
			}
			if neg {
				v = -v
			}
			u, _ := units.ParseUnit(string(rs[k:end]))
			if u != nil {
				q = u.Of(v)
			}
			ph, ok := placeholder(len(lits), end-litStart)
			if !ok {
				errs = append(errs, ferr{from: litStart, to: end, msg: "too many short unit literals in one formula", hint: "write numbers with units as \"6 dB\" rather than \"6dB\", or split the formula"})
				ph = strings.Repeat("_", end-litStart)
			}
			lits = append(lits, q)
			out = append(out, []rune(ph)...)
			i = end
			continue
		}
		out = append(out, r)
		i++
	}
	return string(out), lits, errs
}

// signIsUnary reports whether a '-' after the text before it is a sign rather than a subtraction.
func signIsUnary(before []rune) bool {
	p := len(before) - 1
	for p >= 0 && (before[p] == ' ' || before[p] == '\t' || before[p] == '\n') {
		p--
	}
	if p < 0 {
		return true
	}
	switch before[p] {
	case '(', ',', '+', '-', '*', '/', '^', '<', '>', '=', '!', '?', ':', '&', '|', '[':
		return true
	}
	// after a keyword such as "and"
	q := p
	for q >= 0 && isIdentRune(before[q]) {
		q--
	}
	return keywords[string(before[q+1:p+1])]
}

// unitAt looks for a unit starting at rs[k] (after a number ending at numEnd). It returns the
// length of the longest unit text that parses, or 0 when there is no unit.
func unitAt(rs []rune, numEnd, k int) (units.Q, int, *ferr) {
	if k >= len(rs) || !isUnitStart(rs[k]) {
		return units.Q{}, 0, nil
	}
	j := k
	for j < len(rs) && isUnitRune(rs[j]) {
		if rs[j] == '-' && !(j+2 < len(rs) && string(rs[j+1:j+3]) == "Hz") {
			break
		}
		j++
	}
	word := string(rs[k:j])

	// The first plain word: a keyword ("1 and x") is not a unit.
	w := k
	for w < j && isIdentRune(rs[w]) {
		w++
	}
	if keywords[string(rs[k:w])] {
		return units.Q{}, 0, nil
	}
	for end := j; end > k; end-- {
		if end < j && !strings.ContainsRune("/*^-", rs[end]) {
			continue
		}
		if _, err := units.ParseUnit(string(rs[k:end])); err == nil {
			return units.Q{}, end - k, nil
		}
	}
	// Nothing parses. Report it when it plainly was meant as a unit: written against the
	// number ("6dQ") or close to a known unit ("6 dQ").
	_, err := units.ParseUnit(word)
	var ue *units.Error
	if errors.As(err, &ue) && (k == numEnd || ue.Hint != "") {
		return units.Q{}, 0, &ferr{from: k, to: j, msg: ue.Msg, hint: ue.Hint}
	}
	return units.Q{}, 0, nil
}
