package engine

import (
	"reflect"

	"github.com/expr-lang/expr/builtin"

	"github.com/rfledger/rfledger/units"
)

// operatorFuncs are the unit-checked operators: the rewriter turns every + - * / ^ and
// comparison on quantities into a call of one of these.
var operatorFuncs = map[string]*builtin.Function{
	"_add": binary("_add", units.Add),
	"_sub": binary("_sub", units.Sub),
	"_mul": binary("_mul", units.Mul),
	"_div": binary("_div", units.Div),
	"_pow": binary("_pow", units.Pow),
	"_neg": {Name: "_neg", Func: func(p ...any) (any, error) {
		q, err := units.Neg(p[0].(units.Q))
		return q, err
	}, Types: []reflect.Type{reflect.TypeOf(func(units.Q) units.Q { return units.Q{} })}},
	"_lt": comparison("_lt", func(c int) bool { return c < 0 }),
	"_le": comparison("_le", func(c int) bool { return c <= 0 }),
	"_gt": comparison("_gt", func(c int) bool { return c > 0 }),
	"_ge": comparison("_ge", func(c int) bool { return c >= 0 }),
	"_eq": comparison("_eq", func(c int) bool { return c == 0 }),
	"_ne": comparison("_ne", func(c int) bool { return c != 0 }),
}

var (
	binaryType = reflect.TypeOf(func(units.Q, units.Q) units.Q { return units.Q{} })
	cmpType    = reflect.TypeOf(func(units.Q, units.Q) bool { return false })
)

func binary(name string, op func(a, b units.Q) (units.Q, error)) *builtin.Function {
	return &builtin.Function{Name: name, Types: []reflect.Type{binaryType}, Func: func(p ...any) (any, error) {
		q, err := op(p[0].(units.Q), p[1].(units.Q))
		if err != nil {
			return nil, err
		}
		return q, nil
	}}
}

func comparison(name string, ok func(int) bool) *builtin.Function {
	return &builtin.Function{Name: name, Types: []reflect.Type{cmpType}, Func: func(p ...any) (any, error) {
		c, err := units.Compare(p[0].(units.Q), p[1].(units.Q))
		if err != nil {
			return nil, err
		}
		return ok(c), nil
	}}
}
