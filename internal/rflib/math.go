package rflib

import (
	"fmt"
	"math"
	"strings"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/units"
)

var mathFuncs = []*engine.Func{
	{
		Name: "sqrt", Args: []engine.Arg{anyQ("x")}, ResultDoc: "half the dimension (m^2 → m)", Infer: inferSqrt,
		Doc: "Square root; the dimension's exponents halve, so sqrt(m^2) is a length.", Source: "ISO 80000-1 (quantities and units)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) { return units.Sqrt(a[0].Q) },
	},
	{
		Name: "abs", Args: []engine.Arg{anyQ("x")}, ResultDoc: "same unit", Infer: inferAbs,
		Doc: "Absolute value of a linear value, a ratio in dB or a rate.", Source: "ISO 80000-1",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			x := a[0].Q
			if x.K == units.Level && !x.D.IsNone() {
				return units.Q{}, fmt.Errorf("x: the absolute value of an absolute level (%s) has no meaning", nameOf(x))
			}
			x.V = math.Abs(x.V)
			return x, nil
		},
	},
	extreme("min", -1, "Smallest of its arguments, which must be comparable (same dimension; levels compare with linear values)."),
	extreme("max", 1, "Largest of its arguments, which must be comparable (same dimension; levels compare with linear values)."),
	plain("log10", math.Log10, "Base-10 logarithm of a plain number."),
	plain("ln", math.Log, "Natural logarithm of a plain number."),
	plain("exp", math.Exp, "Exponential of a plain number."),
}

func extreme(name string, want int, doc string) *engine.Func {
	return &engine.Func{
		Name: name, Args: []engine.Arg{anyQ("x")}, Variadic: true, ResultDoc: "one of the arguments", Infer: inferExtreme, Doc: doc, Source: "ISO 80000-1",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			best := a[0].Q
			for _, x := range a[1:] {
				c, err := units.Compare(x.Q, best)
				if err != nil {
					return units.Q{}, err
				}
				if c == want {
					best = x.Q
				}
			}
			// The result keeps the first argument's form (a level stays a level).
			if a[0].Q.K == units.Level && best.K == units.Linear {
				l, err := best.ToLevel()
				if err != nil {
					return units.Q{}, err
				}
				l.F = a[0].Q.F
				return l, nil
			}
			if a[0].Q.K == units.Linear && best.K == units.Level {
				return best.Linear(), nil
			}
			return best, nil
		},
	}
}

func plain(name string, f func(float64) float64, doc string) *engine.Func {
	return &engine.Func{
		Name: name, Args: []engine.Arg{lin("x", units.None)}, Result: "1", Doc: doc, Source: "ISO 80000-2 (mathematics)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			v := f(q(a, 0))
			if math.IsNaN(v) || math.IsInf(v, 0) {
				e := &units.Error{Msg: fmt.Sprintf("x = %s is outside the function's domain", units.FormatNum(q(a, 0)))}
				if name == "ln" || strings.HasPrefix(name, "log") {
					e.Hint = "a logarithm needs a plain number above 0"
				}
				return units.Q{}, e
			}
			return units.Num(v), nil
		},
	}
}
