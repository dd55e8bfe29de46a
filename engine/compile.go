package engine

import (
	"errors"
	"fmt"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/expr-lang/expr/ast"
	"github.com/expr-lang/expr/builtin"
	"github.com/expr-lang/expr/conf"
	"github.com/expr-lang/expr/file"
	"github.com/expr-lang/expr/parser"

	"github.com/rfledger/rfledger/units"
)

// A formula goes through three steps:
//
//  1. parse: unit literals become placeholders, expr's parser builds the syntax tree. This is
//     the costly step; it depends on the text alone, so its result is shared between sheets
//     (a reloaded sheet reuses the parses of the formulas that did not change).
//  2. lower: the syntax tree is checked against the whitelist of what a formula may contain
//     and turned into our own tree, with names resolved to graph nodes and literals to
//     constants. This gives the graph's edges.
//  3. check: in evaluation order, every node of the tree gets its type (dimension, decibel
//     form and display family, or true/false, text, chain), every unit rule is enforced, and
//     each node gets the closure that computes it over the result's value slots. Nothing is
//     checked and nothing is allocated per operator when the sheet is evaluated.

// parsed is the result of step 1.
type parsed struct {
	tree *parser.Tree
	lits []lit
	errs []ferr
}

// lit is a unit literal: its value and the rune offset where its placeholder starts.
type lit struct {
	q    units.Q
	from int
}

// parserConfig is what expr's parser needs to know: which names are our functions (so that
// min or max are calls, not expr's builtins) and that expr's builtins are off.
func (l *Library) parserConfig() *conf.Config {
	l.once.Do(func() {
		c := conf.CreateNew()
		c.Functions = conf.FunctionsTable{}
		if l.funcs != nil {
			for name := range l.funcs {
				c.Functions[name] = &builtin.Function{Name: name}
			}
		}
		for _, b := range builtin.Builtins {
			c.Disabled[b.Name] = true
		}
		c.MaxNodes = maxNodes
		c.Optimize = false
		l.config = c
	})
	return l.config
}

var emptyLibrary = &Library{funcs: map[string]*Func{}}

// parseFormula runs step 1 on one formula's text.
func parseFormula(lib *Library, text string) *parsed {
	if lib == nil {
		lib = emptyLibrary
	}
	if n := utf8.RuneCountInString(text); n > maxFormulaLen {
		return &parsed{errs: []ferr{{0, 1, fmt.Sprintf("formula is %d characters long; the limit is %d", n, maxFormulaLen), "split it into named intermediate quantities", false, ""}}}
	}
	if strings.TrimSpace(text) == "" {
		return &parsed{errs: []ferr{{0, 1, "empty formula", "write an expression after \"=\"", false, ""}}}
	}
	src, lits, errs := scanLiterals(text)
	if len(errs) > 0 {
		return &parsed{errs: errs}
	}
	tree, err := parser.ParseWithConfig(src, lib.parserConfig())
	if err != nil {
		e := exprErr(err, text)
		e.msg = unplace(e.msg, src, text, lits)
		return &parsed{errs: []ferr{e}}
	}
	return &parsed{tree: tree, lits: lits}
}

// exprErr turns an expr parse error into a formula error at the same place.
func exprErr(err error, text string) ferr {
	var fe *file.Error
	if errors.As(err, &fe) {
		if strings.HasPrefix(fe.Message, "unexpected token EOF") {
			return endedEarly(fe, text)
		}
		return ferr{from: fe.From, to: fe.To, msg: fe.Message}
	}
	return ferr{from: 0, to: 1, msg: err.Error()}
}

// unplace writes the unit literals back into a parse error's message where expr quotes
// their placeholders (unexpected token Identifier("_1__")): the message shows what was
// typed, never an internal name.
func unplace(msg, src, text string, lits []lit) string {
	if !strings.Contains(msg, "\"_") {
		return msg
	}
	rs, ts := []rune(src), []rune(text)
	for _, l := range lits {
		end := l.from
		for end < len(rs) && isIdentRune(rs[end]) {
			end++
		}
		if end > len(ts) {
			continue
		}
		ph, typed := strconv.Quote(string(rs[l.from:end])), strconv.Quote(string(ts[l.from:end]))
		msg = strings.ReplaceAll(msg, "Identifier("+ph+")", typed)
		msg = strings.ReplaceAll(msg, ph, typed)
	}
	return msg
}

// endedEarly explains a formula that ends before its expression does: most often an
// opening parenthesis that is never closed.
func endedEarly(fe *file.Error, text string) ferr {
	open := strings.Count(text, "(") - strings.Count(text, ")")
	if open > 0 {
		at := strings.LastIndex(text, "(")
		for depth, i := 0, len(text)-1; i >= 0; i-- {
			switch text[i] {
			case ')':
				depth++
			case '(':
				if depth == 0 {
					at = i
					i = -1
				} else {
					depth--
				}
			}
		}
		from := utf8.RuneCountInString(text[:at])
		return ferr{from: from, to: from + 1, msg: "this ( is never closed", hint: "add " + strings.Repeat(")", open) + " where the parenthesis should end"}
	}
	return ferr{from: fe.From, to: fe.To, msg: "the formula ends before its expression does", hint: "finish the expression after the last operator"}
}

// op is what a node of a lowered formula does.
type op uint8

const (
	opConst op = iota // a number with a unit
	opSlot            // the value of a quantity
	opChain           // a chain, as a function argument
	opStr             // a name in quotes, as a function argument
	opBool            // true or false
	opAdd
	opSub
	opMul
	opDiv
	opPow
	opNeg
	opLT
	opLE
	opGT
	opGE
	opEQ
	opNE
	opAnd
	opOr
	opNot
	opCond
	opCall
)

var opSym = [...]string{opAdd: "+", opSub: "-", opMul: "*", opDiv: "/", opPow: "^", opNeg: "-",
	opLT: "<", opLE: "<=", opGT: ">", opGE: ">=", opEQ: "==", opNE: "!=", opAnd: "&&", opOr: "||", opNot: "!"}

// inode is a node of a lowered formula. Step 2 fills the structure; step 3 the type and the
// closure.
type inode struct {
	op       op
	from, to int // rune offsets in the formula text
	kids     []*inode
	q        units.Q // opConst
	id       int     // opSlot, opChain: the graph node
	text     string  // opSym; the name as written for opSlot and opChain
	b        bool    // opBool
	fn       *Func   // opCall

	typ     typ     // step 3: what the node gives
	ty      units.Q // step 3, for quantities: dimension, form and family (V unused)
	isConst bool    // step 3: a quantity known at load (V in ty... see cval)
	cval    float64
	conv    []conv // step 3, opCall: how each argument reaches the function
	eval    evalFn // step 3, quantities
	test    testFn // step 3, true/false values
}

// start and end return where the text of x's whole subtree begins and ends.
func (x *inode) start() int {
	s := x.from
	for _, k := range x.kids {
		if k != nil {
			s = min(s, k.start())
		}
	}
	return s
}

func (x *inode) end() int {
	e := x.to
	for _, k := range x.kids {
		if k != nil {
			e = max(e, k.end())
		}
	}
	return e
}

// lowerer runs step 2 on one formula.
type lowerer struct {
	sh   *Sheet
	lib  *Library
	sc   scope
	lits []lit
	deps []int
	seen map[int]bool
	errs []ferr
}

func (lw *lowerer) fail(n ast.Node, hint, format string, args ...any) *inode {
	loc := n.Location()
	lw.errs = append(lw.errs, ferr{from: loc.From, to: loc.To, msg: fmt.Sprintf(format, args...), hint: hint})
	return nil
}

func at(o op, n ast.Node, kids ...*inode) *inode {
	loc := n.Location()
	return &inode{op: o, from: loc.From, to: max(loc.To, loc.From+1), kids: kids}
}

var arithOps = map[string]op{"+": opAdd, "-": opSub, "*": opMul, "/": opDiv, "**": opPow, "^": opPow}
var compareOps = map[string]op{"<": opLT, "<=": opLE, ">": opGT, ">=": opGE, "==": opEQ, "!=": opNE}

// sameClass reports whether a binary operator continues a flat chain of its parent's kind
// (a + b - c, a * b / c, a && b && c): such chains are long, not deep.
func sameClass(parent, child string) bool {
	class := func(o string) int {
		switch o {
		case "+", "-":
			return 1
		case "*", "/":
			return 2
		case "&&", "and":
			return 3
		case "||", "or":
			return 4
		}
		return 0
	}
	return class(parent) != 0 && class(parent) == class(child)
}

// lower turns an expr syntax tree into our own, within the whitelist. It returns nil after
// recording an error.
func (lw *lowerer) lower(n ast.Node, depth int) *inode {
	if depth > maxDepth {
		return lw.fail(n, "use named intermediate quantities", "formula is nested more than %d deep", maxDepth)
	}
	switch n := n.(type) {
	case *ast.IntegerNode:
		x := at(opConst, n)
		x.q = units.Num(float64(n.Value))
		return x
	case *ast.FloatNode:
		x := at(opConst, n)
		x.q = units.Num(n.Value)
		return x
	case *ast.BoolNode:
		x := at(opBool, n)
		x.b = n.Value
		return x
	case *ast.IdentifierNode:
		return lw.name(n, n.Value)
	case *ast.MemberNode:
		name, ok := dotted(n)
		if !ok {
			return lw.fail(n, "only dotted names like tx.power are allowed", "indexing is not allowed in a formula")
		}
		if head := chainHead(n); head != nil {
			if _, lit := lw.literal(head); lit {
				return lw.fail(n, "a dotted name starts with a letter: tx.power", "a number with a unit has no parts (.%s)", strings.TrimPrefix(name, head.Value+"."))
			}
		}
		return lw.name(n, name)
	case *ast.UnaryNode:
		x := lw.lower(n.Node, depth+1)
		switch n.Operator {
		case "-":
			return at(opNeg, n, x)
		case "+":
			if x == nil {
				return nil
			}
			return x
		case "!", "not":
			return at(opNot, n, x)
		}
		return lw.fail(n, "", "operator %q is not allowed in a formula", n.Operator)
	case *ast.BinaryNode:
		return lw.binary(n, depth)
	case *ast.ConditionalNode:
		c := lw.lower(n.Cond, depth+1)
		a := lw.lower(n.Exp1, depth+1)
		b := lw.lower(n.Exp2, depth+1)
		x := at(opCond, n, c, a, b)
		if c != nil && b != nil {
			x.from, x.to = c.start(), b.end() // the whole expression, from its condition on
		}
		return x
	case *ast.CallNode:
		return lw.call(n, depth)
	case *ast.StringNode:
		return lw.fail(n, "names in quotes are only for function arguments such as ber('qpsk', x)", "a text is not allowed here")
	case *ast.ChainNode:
		return lw.fail(n, "write tx.power", "\"?.\" is not allowed in a formula")
	case *ast.BuiltinNode:
		return lw.fail(n, "see `rfledger funcs` for the functions a formula may call", "%s() is not a formula function", n.Name)
	}
	return lw.fail(n, "formulas hold numbers with units, names, + - * / ^, comparisons, && || !, ?: and function calls", "this construct is not allowed in a formula")
}

func (lw *lowerer) binary(n *ast.BinaryNode, depth int) *inode {
	ld, rd := depth+1, depth+1
	if b, ok := n.Left.(*ast.BinaryNode); ok && sameClass(n.Operator, b.Operator) {
		ld = depth
	}
	if b, ok := n.Right.(*ast.BinaryNode); ok && sameClass(n.Operator, b.Operator) {
		rd = depth
	}
	l := lw.lower(n.Left, ld)
	r := lw.lower(n.Right, rd)
	if o, ok := arithOps[n.Operator]; ok {
		return at(o, n, l, r)
	}
	if o, ok := compareOps[n.Operator]; ok {
		return at(o, n, l, r)
	}
	switch n.Operator {
	case "&&", "and":
		return at(opAnd, n, l, r)
	case "||", "or":
		return at(opOr, n, l, r)
	case "%":
		return lw.fail(n, "", "the remainder operator %% is not allowed in a formula")
	}
	return lw.fail(n, "", "operator %q is not allowed in a formula", n.Operator)
}

func (lw *lowerer) call(n *ast.CallNode, depth int) *inode {
	id, ok := n.Callee.(*ast.IdentifierNode)
	if !ok {
		return lw.fail(n, "", "only built-in functions can be called")
	}
	if _, lit := lw.literal(id); lit {
		return lw.fail(n, "write an operator between a number and a parenthesis: 3 dB * (a + b)", "a number with a unit cannot be called like a function")
	}
	f, ok := lw.lib.Lookup(id.Value)
	if !ok {
		hint := "see `rfledger funcs` for the list"
		if s := units.Nearest(id.Value, lw.lib.names()); s != "" {
			hint = fmt.Sprintf("did you mean %q?", s)
		}
		return lw.fail(n.Callee, hint, "unknown function %q", id.Value)
	}
	required := 0
	for _, a := range f.Args {
		if !a.Optional {
			required++
		}
	}
	if len(n.Arguments) < required || len(n.Arguments) > len(f.Args) && !f.Variadic {
		return lw.fail(n, "usage: "+f.Signature(), "%s takes %s, got %d", f.Name, argCount(required, len(f.Args), f.Variadic), len(n.Arguments))
	}
	x := at(opCall, n)
	x.fn = f
	failed := false
	for i, a := range n.Arguments {
		decl := f.Args[min(i, len(f.Args)-1)]
		if s, ok := a.(*ast.StringNode); ok && decl.Kind == ArgText {
			t := at(opStr, s)
			t.text = s.Value
			x.kids = append(x.kids, t)
			continue
		}
		if id, ok := a.(*ast.IdentifierNode); ok && decl.Kind == ArgText {
			lw.fail(a, fmt.Sprintf("write the name in single quotes: '%s'", id.Value), "%s: %s: got a quantity, want a name", f.Name, decl.Name)
			failed = true
			continue
		}
		k := lw.lower(a, depth+1)
		if k == nil {
			failed = true
			continue
		}
		x.kids = append(x.kids, k)
	}
	if failed {
		return nil
	}
	return x
}

// name resolves a (possibly dotted) name to a literal, a constant, a quantity or a chain.
func (lw *lowerer) name(n ast.Node, name string) *inode {
	if id, ok := n.(*ast.IdentifierNode); ok {
		if i, ok := lw.literal(id); ok {
			x := at(opConst, n)
			x.q = lw.lits[i].q
			return x
		}
	}
	if q, ok := predeclared[name]; ok {
		x := at(opConst, n)
		x.q = q
		return x
	}
	id, ok := lw.sh.resolve(name, lw.sc)
	if !ok {
		lw.fail(n, "", "unknown name %q", name)
		lw.errs[len(lw.errs)-1].unknown = name
		return nil
	}
	if !lw.seen[id] {
		lw.seen[id] = true
		lw.deps = append(lw.deps, id)
	}
	o := opSlot
	if lw.sh.nodes[id].chain != nil {
		o = opChain
	}
	x := at(o, n)
	x.id, x.text = id, name
	return x
}

// literal returns the unit literal that id is the placeholder of, and false for any other
// name (one typed as "_0__" is just an unknown name).
func (lw *lowerer) literal(id *ast.IdentifierNode) (int, bool) {
	if id == nil {
		return 0, false
	}
	i, ok := placeholderIndex(id.Value)
	return i, ok && i < len(lw.lits) && lw.lits[i].from == id.Location().From
}

// chainHead returns the name a member chain starts with (tx in tx.power.x), or nil.
func chainHead(n ast.Node) *ast.IdentifierNode {
	for {
		switch m := n.(type) {
		case *ast.MemberNode:
			n = m.Node
		case *ast.IdentifierNode:
			return m
		default:
			return nil
		}
	}
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

func argCount(req, all int, variadic bool) string {
	switch {
	case variadic:
		return fmt.Sprintf("at least %d arguments", req)
	case req == all:
		return fmt.Sprintf("%d arguments", req)
	}
	return fmt.Sprintf("%d to %d arguments", req, all)
}
