package engine

import (
	"errors"
	"fmt"
	"math"

	"github.com/rfledger/rfledger/units"
)

// evalFn computes a quantity-valued node over a result's slots: the number in the node's
// type (SI units for linear values, dB re 1 SI unit for levels, dB per SI unit for rates).
type evalFn func(r *Result) (float64, error)

// testFn computes a true/false node.
type testFn func(r *Result) (bool, error)

// conv is how one argument reaches a function: as it is, converted from decibels to linear
// or from linear to decibels, or as a text or a chain.
type conv uint8

const (
	convNone conv = iota
	convToLinear
	convToLevel
	convText
	convChain
)

// checker runs step 3 on one formula: it types every node and builds its closure.
type checker struct {
	sh   *Sheet
	errs []ferr
}

func (c *checker) fail(x *inode, err error) {
	msg, hint := splitErr(err)
	c.errs = append(c.errs, ferr{from: x.from, to: x.to, msg: msg, hint: hint})
}

func (c *checker) failf(x *inode, hint, format string, args ...any) {
	c.errs = append(c.errs, ferr{from: x.from, to: x.to, msg: fmt.Sprintf(format, args...), hint: hint})
}

// splitErr separates a unit error's message from its hint.
func splitErr(err error) (msg, hint string) {
	var ue *units.Error
	if errors.As(err, &ue) {
		return ue.Msg, ue.Hint
	}
	return err.Error(), ""
}

// witness is a node's type as a quantity the unit algebra can work on: its value when it is a
// constant, else a positive stand-in.
func (x *inode) witness() units.Q {
	q := x.ty
	switch {
	case x.isConst:
		q.V = x.cval
	case q.K == units.Linear:
		q.V = 1
	default:
		q.V = 0
	}
	return q
}

// check types x and its children; it reports false after recording an error. Children are
// all checked, so that every independent error in a formula is reported.
func (c *checker) check(x *inode) bool {
	ok := true
	for _, k := range x.kids {
		if !c.check(k) {
			ok = false
		}
	}
	if !ok {
		return false
	}
	switch x.op {
	case opConst:
		x.typ, x.ty, x.isConst, x.cval = tQ, x.q, true, x.q.V
		x.ty.V = 0
		v := x.cval
		x.eval = func(*Result) (float64, error) { return v, nil }
		return true
	case opSlot:
		n := c.sh.nodes[x.id]
		if !n.typed {
			return false // reported where that quantity is defined
		}
		x.typ, x.ty = tQ, n.ty
		id := x.id
		x.eval = func(r *Result) (float64, error) { return r.vals[id], nil }
		return true
	case opChain:
		x.typ = tChain
		return true
	case opStr:
		x.typ = tText
		return true
	case opBool:
		x.typ = tBool
		b := x.b
		x.test = func(*Result) (bool, error) { return b, nil }
		return true
	case opAdd, opSub, opMul, opDiv, opPow:
		return c.arith(x)
	case opNeg:
		return c.neg(x)
	case opLT, opLE, opGT, opGE, opEQ, opNE:
		return c.compare(x)
	case opAnd, opOr:
		return c.logic(x)
	case opNot:
		a := x.kids[0]
		if a.typ != tBool {
			c.failf(x, "", "\"!\" needs a true/false value, got %s", a.typ)
			return false
		}
		x.typ = tBool
		t := a.test
		x.test = func(r *Result) (bool, error) {
			v, err := t(r)
			return !v, err
		}
		return true
	case opCond:
		return c.cond(x)
	case opCall:
		return c.call(x)
	}
	c.failf(x, "", "this construct is not allowed in a formula")
	return false
}

var arithFuncs = map[op]func(a, b units.Q) (units.Q, error){
	opAdd: units.Add, opSub: units.Sub, opMul: units.Mul, opDiv: units.Div, opPow: units.Pow,
}

func (c *checker) arith(x *inode) bool {
	a, b := x.kids[0], x.kids[1]
	if a.typ != tQ || b.typ != tQ {
		c.failf(x, "", "%q needs quantities on both sides", opSym[x.op])
		return false
	}
	if x.op == opPow && !b.isConst && !(a.ty.K == units.Linear && a.ty.D.IsNone()) {
		if b.ty.IsNumber() {
			c.failf(x, "write the exponent as a number, e.g. x^2", "the exponent of %s must be a constant", a.ty.UnitName())
			return false
		}
	}
	t, err := arithFuncs[x.op](a.witness(), b.witness())
	if err != nil {
		c.fail(x, err)
		return false
	}
	x.typ, x.ty = tQ, t
	x.ty.V = 0
	if a.isConst && b.isConst {
		x.isConst, x.cval = true, t.V
		v := t.V
		x.eval = func(*Result) (float64, error) { return v, nil }
		return true
	}
	x.eval = arithClosure(x.op, a.eval, b.eval)
	return true
}

// arithClosure builds the closure of an arithmetic operator. Every decibel rule was checked
// at load; what is left is plain arithmetic on the numbers: levels are held in dB re 1 SI
// unit, so a level plus a ratio is a sum, a ratio times a number a product, and so on.
func arithClosure(o op, fa, fb evalFn) evalFn {
	switch o {
	case opAdd:
		return func(r *Result) (float64, error) {
			x, err := fa(r)
			if err != nil {
				return 0, err
			}
			y, err := fb(r)
			return x + y, err
		}
	case opSub:
		return func(r *Result) (float64, error) {
			x, err := fa(r)
			if err != nil {
				return 0, err
			}
			y, err := fb(r)
			return x - y, err
		}
	case opMul:
		return func(r *Result) (float64, error) {
			x, err := fa(r)
			if err != nil {
				return 0, err
			}
			y, err := fb(r)
			return x * y, err
		}
	case opDiv:
		return func(r *Result) (float64, error) {
			x, err := fa(r)
			if err != nil {
				return 0, err
			}
			y, err := fb(r)
			return x / y, err
		}
	}
	return func(r *Result) (float64, error) {
		x, err := fa(r)
		if err != nil {
			return 0, err
		}
		y, err := fb(r)
		return math.Pow(x, y), err
	}
}

func (c *checker) neg(x *inode) bool {
	a := x.kids[0]
	if a.typ != tQ {
		c.failf(x, "", "cannot negate %s", a.typ)
		return false
	}
	t, err := units.Neg(a.witness())
	if err != nil {
		c.fail(x, err)
		return false
	}
	x.typ, x.ty = tQ, t
	x.ty.V = 0
	if a.isConst {
		x.isConst, x.cval = true, -a.cval
		v := x.cval
		x.eval = func(*Result) (float64, error) { return v, nil }
		return true
	}
	f := a.eval
	x.eval = func(r *Result) (float64, error) {
		v, err := f(r)
		return -v, err
	}
	return true
}

func (c *checker) compare(x *inode) bool {
	a, b := x.kids[0], x.kids[1]
	if a.typ == tBool && b.typ == tBool && (x.op == opEQ || x.op == opNE) {
		x.typ = tBool
		fa, fb, eq := a.test, b.test, x.op == opEQ
		x.test = func(r *Result) (bool, error) {
			p, err := fa(r)
			if err != nil {
				return false, err
			}
			q, err := fb(r)
			return (p == q) == eq, err
		}
		return true
	}
	if a.typ != tQ || b.typ != tQ {
		c.failf(x, "", "%q needs quantities on both sides", opSym[x.op])
		return false
	}
	if _, err := units.Compare(a.witness(), b.witness()); err != nil {
		c.fail(x, err)
		return false
	}
	x.typ = tBool
	// A level compares with a linear value of its dimension through the linear value.
	fa, fb := a.eval, b.eval
	if a.ty.K == units.Level && b.ty.K == units.Linear {
		fa = toLinearFn(fa, a.ty)
	} else if a.ty.K == units.Linear && b.ty.K == units.Level {
		fb = toLinearFn(fb, b.ty)
	}
	holds := cmpHolds(x.op)
	x.test = func(r *Result) (bool, error) {
		p, err := fa(r)
		if err != nil {
			return false, err
		}
		q, err := fb(r)
		if err != nil {
			return false, err
		}
		if math.IsNaN(p) || math.IsNaN(q) {
			return false, &units.Error{Msg: "cannot compare a value that is not a number"}
		}
		return holds(p, q), nil
	}
	return true
}

func cmpHolds(o op) func(p, q float64) bool {
	switch o {
	case opLT:
		return func(p, q float64) bool { return p < q }
	case opLE:
		return func(p, q float64) bool { return p <= q }
	case opGT:
		return func(p, q float64) bool { return p > q }
	case opGE:
		return func(p, q float64) bool { return p >= q }
	case opEQ:
		return func(p, q float64) bool { return p == q }
	}
	return func(p, q float64) bool { return p != q }
}

// toLinearFn wraps a level-valued closure so that it gives the linear value.
func toLinearFn(f evalFn, t units.Q) evalFn {
	return func(r *Result) (float64, error) {
		v, err := f(r)
		q := t // the closure is shared by every evaluation: never write to t
		q.V = v
		return q.Linear().V, err
	}
}

func (c *checker) logic(x *inode) bool {
	a, b := x.kids[0], x.kids[1]
	if a.typ != tBool || b.typ != tBool {
		c.failf(x, "", "%q needs true/false values on both sides", opSym[x.op])
		return false
	}
	x.typ = tBool
	fa, fb := a.test, b.test
	if x.op == opAnd {
		x.test = func(r *Result) (bool, error) {
			p, err := fa(r)
			if err != nil || !p {
				return false, err
			}
			return fb(r)
		}
		return true
	}
	x.test = func(r *Result) (bool, error) {
		p, err := fa(r)
		if err != nil || p {
			return p, err
		}
		return fb(r)
	}
	return true
}

// cond types a ?: expression. Both branches are checked whichever one a value takes, and
// they must have the same type (a level of the same dimension and family, say).
func (c *checker) cond(x *inode) bool {
	k, a, b := x.kids[0], x.kids[1], x.kids[2]
	if k.typ != tBool {
		c.failf(k, "write a comparison, e.g. d > 1 km", "the condition of ?: must be true/false, got %s", k.typ)
		return false
	}
	if a.typ != b.typ {
		c.failf(x, "", "the two branches of ?: differ: %s and %s", a.typ, b.typ)
		return false
	}
	test := k.test
	switch a.typ {
	case tBool:
		x.typ = tBool
		fa, fb := a.test, b.test
		x.test = func(r *Result) (bool, error) {
			p, err := test(r)
			if err != nil {
				return false, err
			}
			if p {
				return fa(r)
			}
			return fb(r)
		}
		return true
	case tQ:
	default:
		c.failf(x, "", "the branches of ?: must be quantities or true/false values, not %s", a.typ)
		return false
	}
	if a.ty.D != b.ty.D || a.ty.K != b.ty.K {
		c.failf(x, "write both branches in the same kind of unit", "the two branches of ?: differ: %s and %s", nameOfType(a.ty), nameOfType(b.ty))
		return false
	}
	x.typ, x.ty = tQ, a.ty
	if a.ty.F != b.ty.F {
		x.ty.F = 0
	}
	fa, fb := a.eval, b.eval
	x.eval = func(r *Result) (float64, error) {
		p, err := test(r)
		if err != nil {
			return 0, err
		}
		if p {
			return fa(r)
		}
		return fb(r)
	}
	return true
}

func nameOfType(t units.Q) string {
	if n := t.UnitName(); n != "" {
		return n
	}
	return "a plain number"
}

// call types a function call: each argument against its declaration, then the result by the
// function's declared rule.
func (c *checker) call(x *inode) bool {
	f := x.fn
	args := make([]Value, len(x.kids), max(len(x.kids), len(f.Args)))
	x.conv = make([]conv, len(x.kids))
	ok := true
	for i, k := range x.kids {
		decl := f.Args[min(i, len(f.Args)-1)]
		want := map[ArgKind]typ{ArgQuantity: tQ, ArgText: tText, ArgChain: tChain}[decl.Kind]
		if k.typ != want {
			hint := ""
			if decl.Kind == ArgText {
				hint = "write the name in single quotes, e.g. 'qpsk'"
			}
			c.failf(k, hint, "%s: %s: got %s, want %s", f.Name, decl.Name, k.typ, want)
			ok = false
			continue
		}
		args[i].Given = true
		switch decl.Kind {
		case ArgText:
			args[i].Text, args[i].Const, x.conv[i] = k.text, true, convText
			continue
		case ArgChain:
			x.conv[i] = convChain
			continue
		}
		t, cv, err := decl.checkType(k.witness())
		if err != nil {
			msg, hint := splitErr(err)
			c.errs = append(c.errs, ferr{from: k.from, to: k.to, msg: f.Name + ": " + msg, hint: hint})
			ok = false
			continue
		}
		args[i].Q, args[i].Const, x.conv[i] = t, k.isConst, cv
	}
	if !ok {
		return false
	}
	for len(args) < len(f.Args) {
		args = append(args, Value{})
	}
	t, err := f.ResultType(args)
	if err != nil {
		msg, hint := splitErr(err)
		c.errs = append(c.errs, ferr{from: x.from, to: x.to, msg: f.Name + ": " + msg, hint: hint})
		return false
	}
	x.typ, x.ty = tQ, t
	x.ty.V = 0
	x.eval = c.callClosure(x, args)
	return true
}

// checkType checks an argument's type against its declaration and says how to convert it.
func (a Arg) checkType(q units.Q) (units.Q, conv, error) {
	if a.Form == AnyQuantity {
		return q, convNone, nil
	}
	bad := func() error { return fmt.Errorf("%s: got %s, want %s", a.Name, unitOrNumber(q), a.want()) }
	if q.D != a.Dim || q.K == units.Rate {
		return q, convNone, bad()
	}
	if a.Angle && !q.IsAngle() {
		return q, convNone, &units.Error{Msg: fmt.Sprintf("%s: got %s, want an angle in deg or rad", a.Name, unitOrNumber(q)), Hint: "write the unit, e.g. 30 deg or 0.52 rad"}
	}
	switch a.Form {
	case LinearOnly:
		if q.K != units.Linear {
			return q, convNone, bad()
		}
	case LevelOnly:
		if q.K != units.Level {
			return q, convNone, bad()
		}
	case AsLinear:
		if q.K == units.Level {
			return q.Linear(), convToLinear, nil
		}
	case AsLevel:
		if q.K == units.Linear {
			if q.V <= 0 {
				q.V = 1
			}
			l, err := q.ToLevel()
			if err != nil {
				return q, convNone, fmt.Errorf("%s: %w", a.Name, err)
			}
			return l, convToLevel, nil
		}
	}
	return q, convNone, nil
}

// callError is a function's error at run time, with where the call stands in the formula.
type callError struct {
	from, to  int
	msg, hint string
}

func (e *callError) Error() string { return e.msg }

// callClosure builds the closure of a call. Arguments go through the result's argument stack
// (no allocation once it has grown); the function's result must have the declared type.
func (c *checker) callClosure(x *inode, types []Value) evalFn {
	f := x.fn
	n := len(x.kids)
	pad := max(0, len(f.Args)-n)
	kids := make([]evalFn, n)
	chains := make([]int, n)
	texts := make([]string, n)
	orig := make([]units.Q, n)
	for i, k := range x.kids {
		kids[i], orig[i] = k.eval, k.ty
		if x.conv[i] == convChain {
			chains[i] = c.sh.nodes[k.id].chainIdx
		}
		texts[i] = k.text
	}
	convs := x.conv
	want := x.ty
	from, to := x.from, x.to
	fail := func(err error) error {
		msg, hint := splitErr(err)
		return &callError{from: from, to: to, msg: f.Name + ": " + msg, hint: hint}
	}
	return func(r *Result) (float64, error) {
		base := len(r.args)
		for i := range n {
			v := Value{Given: true}
			switch convs[i] {
			case convText:
				v.Text = texts[i]
			case convChain:
				v.Chain = &r.chains[chains[i]]
			default:
				num, err := kids[i](r)
				if err != nil {
					r.args = r.args[:base]
					return 0, err
				}
				q := types[i].Q
				switch convs[i] {
				case convToLinear:
					l := orig[i]
					l.V = num
					q.V = l.Linear().V
				case convToLevel:
					lq := units.Q{V: num, D: q.D}
					l, err := lq.ToLevel()
					if err != nil {
						r.args = r.args[:base]
						return 0, fail(err)
					}
					q.V = l.V
				default:
					q.V = num
				}
				v.Q = q
			}
			r.args = append(r.args, v)
		}
		for range pad {
			r.args = append(r.args, Value{})
		}
		res, err := f.Call(&r.call, r.args[base:])
		r.args = r.args[:base]
		if err != nil {
			return 0, fail(err)
		}
		if res.D != want.D || res.K != want.K {
			return 0, &callError{from: from, to: to, msg: fmt.Sprintf("%s: gave %s where its declaration says %s", f.Name, nameOfType(res), nameOfType(want))}
		}
		return res.V, nil
	}
}
