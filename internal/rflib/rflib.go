// Package rflib is rfledger's library of built-in formula functions: conversions, math,
// propagation, noise, chains, linearity, modulation, antennas and satellite links. Each
// function declares its arguments' dimensions (checked by the engine before the call), a doc
// line with its formula and the published source it follows, and computes with the plain
// float64 models of package rfmath.
//
// Ratios that the trade writes in decibels (noise figure, SNR, Eb/N0, loss, return loss) must
// be given in dB: a bare number there is an error rather than a silent linear ratio. shannon is
// the exception: its snr may be a ratio in dB or a plain linear ratio. Plain-number arguments
// (availability, efficiency, overhead, BER) accept "%" (99 % = 0.99); so do the time
// percentages of the rain methods (0.01 % is 1e-4, a bare 0.01 means 1 %). tworay checks the
// crossover distance only when its optional frequency is given.
//
// Angles (elevation, latitude, pointing offset, the argument of sin) must carry deg or rad: a
// bare number is refused, since it could be meant in either. Temperatures may be given in degC,
// read as absolute temperatures in kelvin (15 degC = 288.15 K).
//
// Adding a function is one entry in the family file it belongs to: its name, arguments,
// result unit, doc, source and Call; then a sourced test in that family's test file.
package rflib

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/units"
)

// Library returns every built-in function.
func Library() *engine.Library {
	var fs []*engine.Func
	for _, family := range [][]*engine.Func{conversions, mathFuncs, propagation, noise, chains, linearity, modulation, antennas, satellite} {
		fs = append(fs, family...)
	}
	fs = append(fs, extra...)
	for i, f := range fs {
		fs[i] = refuseNegative(f)
	}
	return engine.NewLibrary(fs...)
}

// magnitudes names the arguments that are a distance, a frequency (or a rate) or an absolute
// temperature, none of which can be negative; heights are left out (a clearance may be).
var magnitudes = map[string]string{
	"d": "distance", "d0": "distance", "d1": "distance", "d2": "distance",
	"f": "frequency", "fs": "sample rate", "b": "bandwidth", "gross": "rate", "rate": "rate",
	"t": "temperature", "te": "noise temperature", "tm": "temperature",
}

// refuseNegative returns f with a Call that refuses a negative distance, frequency, rate or
// temperature by name ("d: a distance cannot be negative (got -2 km)"), before the model sees
// it and reports a number that is not finite, or a warning that does not fit.
func refuseNegative(f *engine.Func) *engine.Func {
	var idx []int
	for i, a := range f.Args {
		if _, ok := magnitudes[a.Name]; ok && a.Kind == engine.ArgQuantity && (a.Form == engine.LinearOnly || a.Form == engine.AsLinear) &&
			(a.Dim == units.Length || a.Dim == units.Frequency || a.Dim == units.Temperature) {
			idx = append(idx, i)
		}
	}
	if len(idx) == 0 || f.Call == nil {
		return f
	}
	g := *f
	call := f.Call
	g.Call = func(c *engine.Call, a []engine.Value) (units.Q, error) {
		for _, i := range idx {
			if i < len(a) && (i < len(f.Args) && !f.Args[i].Optional || has(a, i)) && a[i].Q.V < 0 {
				name := f.Args[i].Name
				return units.Q{}, fmt.Errorf("%s: a %s cannot be negative (got %s)", name, magnitudes[name], a[i].Q)
			}
		}
		return call(c, a)
	}
	return &g
}

// extra collects families registered from other files of this package.
var extra []*engine.Func

// Argument shorthands.
func lin(name string, d units.Dim) engine.Arg {
	return engine.Arg{Name: name, Dim: d, Form: engine.LinearOnly}
}

func either(name string, d units.Dim) engine.Arg {
	return engine.Arg{Name: name, Dim: d, Form: engine.AsLinear}
}

func level(name string, d units.Dim) engine.Arg {
	return engine.Arg{Name: name, Dim: d, Form: engine.AsLevel}
}

func ratio(name string) engine.Arg {
	return engine.Arg{Name: name, Dim: units.None, Form: engine.LevelOnly}
}

// angleArg is a plain-number argument that must carry an angle unit (deg or rad).
func angleArg(name string) engine.Arg {
	return engine.Arg{Name: name, Dim: units.None, Form: engine.LinearOnly, Angle: true}
}

func anyQ(name string) engine.Arg { return engine.Arg{Name: name} }

func optional(a engine.Arg) engine.Arg { a.Optional = true; return a }

func text(name string) engine.Arg { return engine.Arg{Name: name, Kind: engine.ArgText} }

func chainArg() engine.Arg { return engine.Arg{Name: "chain", Kind: engine.ArgChain} }

// q returns argument i as a quantity's number (dB for levels, SI for linear values).
func q(args []engine.Value, i int) float64 { return args[i].Q.V }

// has reports whether optional argument i was given.
func has(args []engine.Value, i int) bool { return i < len(args) && args[i].Given }

// unit returns the named unit; the names are constants of this package, so failure is a bug.
func unit(sym string) *units.Unit {
	u, err := units.ParseUnit(sym)
	if err != nil {
		panic(err)
	}
	return u
}

var (
	uDBm  = unit("dBm")
	uDBW  = unit("dBW")
	uW    = unit("W")
	uDBHz = unit("dBHz")
	uDBK  = unit("dBK")
	uK    = unit("K")
	uNum  = unit("")
)

// in returns v in unit u as a quantity ("in(-174, uDBm)").
func in(v float64, u *units.Unit) units.Q { return u.Of(v) }

// result checks a computed number: NaN or infinity means the inputs were outside the model.
func result(v float64, u *units.Unit, what string) (units.Q, error) {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return units.Q{}, fmt.Errorf("%s has no finite value for these inputs (a zero or an argument outside the model's range)", what)
	}
	return u.Of(v), nil
}

func warnAll(c *engine.Call, notes []string) {
	for _, n := range notes {
		c.Warn("%s", n)
	}
}

// warnFn records an rfmath validity note against the calling function's name.
func warnFn(c *engine.Call, fn string, notes []string) {
	for _, n := range notes {
		c.Warn("%s: %s", fn, n)
	}
}

// clean drops rfmath's package prefix from an error; the engine prefixes the function name.
func clean(err error) error {
	return errors.New(strings.TrimPrefix(err.Error(), "rfmath: "))
}
