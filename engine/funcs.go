package engine

import (
	"fmt"
	"sort"
	"strings"
	"sync"

	"github.com/expr-lang/expr/conf"

	"github.com/rfledger/rfledger/units"
)

// ArgKind is what a function argument is: a quantity, a text (a scheme name), or a chain.
type ArgKind uint8

const (
	// ArgQuantity is a number with a unit.
	ArgQuantity ArgKind = iota
	// ArgText is a name in single quotes, such as 'qpsk'.
	ArgText
	// ArgChain is a chain of stages ([[rx.chain]]).
	ArgChain
)

// Arg describes one argument of a built-in function. For quantities, Dim and Form say what is
// wanted; the engine checks them before the call and converts between linear and decibel forms
// when Form allows both, so a function receives its arguments in the form it declares.
type Arg struct {
	Name     string    // as the signature shows it
	Kind     ArgKind   // a quantity, a text or a chain
	Dim      units.Dim // the dimension a quantity argument must have
	Form     Form      // the form a quantity argument is taken in
	Optional bool      // may be left out (Value.Given is then false); optional arguments come last
	// Angle says the argument is an angle: a plain number must carry deg or rad, since a
	// bare 30 could mean either.
	Angle bool
}

// Form is the form of a quantity argument.
type Form uint8

const (
	// AnyQuantity accepts any quantity as it is, whatever its dimension and form.
	AnyQuantity Form = iota
	// LinearOnly wants a linear value of the argument's dimension.
	LinearOnly
	// LevelOnly wants a decibel value of the argument's dimension (a dB ratio when dimensionless).
	LevelOnly
	// AsLinear takes either form and hands the function the linear value.
	AsLinear
	// AsLevel takes either form and hands the function the decibel value.
	AsLevel
)

// Value is one argument as a function receives it: a quantity already converted to the form
// its Arg declares, a text, or a chain. Given is false for an optional argument that was left
// out. When the checker asks a function's Infer rule for its result type, Q carries the
// argument's dimension, form and display family, and Const says whether Q.V is its value too
// (a literal such as 3 dB or 2).
type Value struct {
	Q     units.Q     // a quantity argument, in the form its Arg declares
	Text  string      // a text argument, without its quotes
	Chain *ChainValue // a chain argument
	Given bool        // the argument was written (false for an optional one left out)
	Const bool        // Q.V is a literal's value, when the checker asks Infer
}

// Func is a built-in function: its name, arguments, the unit of its result, documentation,
// published source, and the Go code that computes it.
//
// The result's unit is declared, so that formulas are unit-checked when the sheet loads:
// Result names a fixed unit ("dB", "dBm", "m", "bit/s"; "1" for a plain number), or, when the
// result's unit follows from the arguments' (sqrt, min, to), Infer computes it from the
// arguments' types and ResultDoc describes it for the signature.
//
// Call receives the arguments in declared order; a variadic function's last argument repeats.
// It reports out-of-validity inputs with c.Warn and impossible ones as errors. Its result
// must have the declared unit's dimension and form.
type Func struct {
	Name      string                              // what formulas call it by
	Args      []Arg                               // in call order
	Variadic  bool                                // the last argument repeats
	Result    string                              // the result's fixed unit, when Infer is nil
	Infer     func(args []Value) (units.Q, error) // the result's type from the arguments' types
	ResultDoc string                              // the result's unit for the signature, with Infer
	Doc       string                              // one line: what it computes, with the formula
	Source    string                              // the published source it follows
	Call      func(c *Call, args []Value) (units.Q, error)
}

// ResultType returns the type of f's result for arguments of the given types (converted to
// their declared forms). It fails when the arguments do not fit the rule.
func (f *Func) ResultType(args []Value) (units.Q, error) {
	if f.Infer != nil {
		return f.Infer(args)
	}
	return resultUnit(f.Result)
}

// resultUnit parses a fixed result unit.
func resultUnit(sym string) (units.Q, error) {
	if sym == "1" {
		return units.Num(0), nil
	}
	u, err := units.ParseUnit(sym)
	if err != nil {
		return units.Q{}, err
	}
	q := u.Of(0)
	q.V = 0
	return q, nil
}

// Call is the context of one function call: it collects validity warnings for the quantity
// being evaluated.
type Call struct {
	warnings []string
	quiet    bool
	tally    *tally // a scenario's count of the warnings at its points (see Scenario.Point)
}

// Warn records that the call went outside its model's validity; the report shows it against the quantity.
func (c *Call) Warn(format string, args ...any) {
	if c == nil {
		return
	}
	if c.tally != nil {
		c.tally.add(format, args)
	}
	if c.quiet {
		return
	}
	c.warnings = append(c.warnings, fmt.Sprintf(format, args...))
}

// Signature writes the function's call form with argument units, e.g.
// "fspl(d: length, f: frequency) -> dB".
func (f *Func) Signature() string {
	var parts []string
	for i, a := range f.Args {
		s := a.Name + ": " + a.describe()
		if f.Variadic && i == len(f.Args)-1 {
			s += ", ..."
		}
		if a.Optional {
			s = "[" + s + "]"
		}
		parts = append(parts, s)
	}
	sig := f.Name + "(" + strings.Join(parts, ", ") + ")"
	switch {
	case f.ResultDoc != "":
		sig += " -> " + f.ResultDoc
	case f.Result == "1":
		sig += " -> plain number"
	case f.Result != "":
		sig += " -> " + f.Result
	}
	return sig
}

func (a Arg) describe() string {
	if a.Angle {
		return "angle"
	}
	switch a.Kind {
	case ArgText:
		return "name"
	case ArgChain:
		return "chain"
	}
	what := dimWord(a.Dim)
	switch a.Form {
	case AnyQuantity:
		return "any"
	case LevelOnly:
		if a.Dim.IsNone() {
			return "dB"
		}
		return what + " in dB"
	case AsLevel, AsLinear:
		return what
	}
	return what
}

func dimWord(d units.Dim) string {
	switch d {
	case units.None:
		return "number"
	case units.Length:
		return "length"
	case units.Frequency:
		return "frequency"
	case units.Power:
		return "power"
	case units.Temperature:
		return "temperature"
	case units.Time:
		return "time"
	case units.PowerDensity:
		return "power density"
	case units.Speed:
		return "speed or rain rate (mm/h)"
	case units.Temperature.Pow(-1):
		return "G/T (per kelvin)"
	case units.Area:
		return "area"
	}
	return d.String()
}

func (a Arg) want() string {
	switch {
	case a.Form == LevelOnly && a.Dim.IsNone():
		return "a ratio in dB"
	case a.Form == LevelOnly:
		return dimArticle(a.Dim) + " in dB"
	case (a.Form == LinearOnly || a.Form == AsLinear) && a.Dim.IsNone():
		return "a plain number"
	}
	return dimArticle(a.Dim)
}

func dimArticle(d units.Dim) string {
	w := dimWord(d)
	if strings.ContainsAny(w[:1], "aeiou") {
		return "an " + w
	}
	return "a " + w
}

func unitOrNumber(q units.Q) string {
	if n := q.UnitName(); n != "" {
		return n
	}
	return "a plain number"
}

// Library is a set of built-in functions, looked up by name.
type Library struct {
	funcs  map[string]*Func
	once   sync.Once
	config *conf.Config // what expr's parser needs to know, built on first use
}

// NewLibrary returns a library holding the given functions. A later function with the same
// name replaces an earlier one.
func NewLibrary(fs ...*Func) *Library {
	l := &Library{funcs: map[string]*Func{}}
	for _, f := range fs {
		l.funcs[f.Name] = f
	}
	return l
}

// Lookup returns the named function.
func (l *Library) Lookup(name string) (*Func, bool) {
	if l == nil {
		return nil, false
	}
	f, ok := l.funcs[name]
	return f, ok
}

// Funcs returns the functions sorted by name.
func (l *Library) Funcs() []*Func {
	var out []*Func
	if l == nil {
		return out
	}
	for _, f := range l.funcs {
		out = append(out, f)
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Name < out[j].Name })
	return out
}

func (l *Library) names() []string {
	var out []string
	for _, f := range l.Funcs() {
		out = append(out, f.Name)
	}
	return out
}
