package rflib

import (
	"fmt"
	"math"

	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/units"
)

var conversions = []*engine.Func{
	{
		Name: "db", Args: []engine.Arg{anyQ("x")}, ResultDoc: "dB (dBK, dBHz, dBm… by dimension)", Infer: inferDB,
		Doc:    "Decibel level of a linear value: 10·log10(x), or 20·log10 for voltage-like quantities; db(2) = 3.01 dB, db(290 K) = 24.62 dBK. A ratio of two voltages or field strengths is a plain number, so db() gives 10·log10 of it and warns: write 20 * log10(x) for such a ratio.",
		Source: "IEC 60027-3 (logarithmic quantities and units)",
		Call: func(c *engine.Call, a []engine.Value) (units.Q, error) {
			x := a[0].Q
			if x.K != units.Linear {
				return units.Q{}, fmt.Errorf("x: already in decibels (%s)", x.UnitName())
			}
			if x.IsRootRatio() {
				c.Warn("db: x is a ratio of root-power quantities (V/V, (V/m)/(V/m)), and db() of a plain ratio is 10·log10; for a voltage or field ratio write 20 * log10(x), or convert the field itself with to(x, 'dBuV/m')")
			}
			return x.ToLevel()
		},
	},
	{
		Name: "lin", Args: []engine.Arg{anyQ("x")}, ResultDoc: "linear value", Infer: inferLin,
		Doc:    "Linear value of a decibel level: 10^(x/10) (ratio for dB, watts for dBm); lin(3 dB) = 1.995.",
		Source: "IEC 60027-3 (logarithmic quantities and units)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			x := a[0].Q
			if x.K != units.Level {
				return units.Q{}, fmt.Errorf("x: got %s, want a value in decibels", nameOf(x))
			}
			return x.Linear(), nil
		},
	},
	convert("dbm", "p", units.Power, uDBm, "Power level in dBm of a power (in W or any dB power unit): 10·log10(p / 1 mW)."),
	convert("dbw", "p", units.Power, uDBW, "Power level in dBW of a power: 10·log10(p / 1 W)."),
	convert("watts", "x", units.Power, uW, "Power in watts of a power level: 10^((x − 30)/10) W for dBm."),
	convert("dbhz", "b", units.Frequency, uDBHz, "Bandwidth or rate as a level in dBHz: 10·log10(b / 1 Hz)."),
	convert("dbk", "t", units.Temperature, uDBK, "Temperature as a level in dBK: 10·log10(t / 1 K)."),
	{
		Name: "to", Args: []engine.Arg{anyQ("x"), text("unit")}, ResultDoc: "x in that unit", Infer: inferTo,
		Doc:    "Converts x to another unit of the same dimension, e.g. to(p, 'mW') or to(d, 'km'); between decibel and linear forms too.",
		Source: "SI Brochure, 9th edition (units and prefixes)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			u, err := units.ParseUnit(a[1].Text)
			if err != nil {
				return units.Q{}, err
			}
			return a[0].Q.As(u)
		},
	},
	{
		Name: "psum", Args: []engine.Arg{anyQ("p")}, Variadic: true, ResultDoc: "level of the sum", Infer: inferPowerSum,
		Doc:    "Power sum of levels: 10·log10(Σ 10^(pᵢ/10)), e.g. psum(-90 dBm, -90 dBm) = -86.99 dBm. Adds uncorrelated powers (noise plus interference).",
		Source: "common practice, no source (power addition of uncorrelated signals)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			if len(a) < 2 {
				return units.Q{}, fmt.Errorf("needs at least two levels")
			}
			return sumPowers(a, 1)
		},
	},
	{
		Name: "pdiff", Args: []engine.Arg{anyQ("a"), anyQ("b")}, ResultDoc: "level of the difference", Infer: inferPowerSum,
		Doc:    "Power difference of levels: 10·log10(10^(a/10) − 10^(b/10)), e.g. the signal left when noise b is removed from a measured a. a must exceed b.",
		Source: "common practice, no source (power subtraction of uncorrelated signals)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			return sumPowers(a, -1)
		},
	},
}

func convert(name, arg string, d units.Dim, u *units.Unit, doc string) *engine.Func {
	return &engine.Func{
		Name: name, Args: []engine.Arg{either(arg, d)}, Result: u.Sym, Doc: doc,
		Source: "IEC 60027-3 (logarithmic quantities and units)",
		Call: func(_ *engine.Call, a []engine.Value) (units.Q, error) {
			return a[0].Q.As(u)
		},
	}
}

// sumPowers adds (sign 1) or subtracts (sign −1, two terms) the linear values of levels of one
// dimension and returns the level of the result in the first term's unit family.
func sumPowers(a []engine.Value, sign float64) (units.Q, error) {
	first := a[0].Q
	total := 0.0
	for i, x := range a {
		v := x.Q
		if v.D != first.D || v.K == units.Rate {
			return units.Q{}, fmt.Errorf("term %d is %s, term 1 is %s", i+1, nameOf(v), nameOf(first))
		}
		s := 1.0
		if i > 0 {
			s = sign
		}
		total += s * v.Linear().V
	}
	if !(total > 0) || math.IsInf(total, 0) {
		return units.Q{}, fmt.Errorf("the result is not a positive power (the first level must be the larger)")
	}
	out := units.Lin(total, first.D)
	if first.K != units.Level {
		return out, nil
	}
	l, err := out.ToLevel()
	if err != nil {
		return units.Q{}, err
	}
	l.F = first.F
	return l, nil
}

func nameOf(q units.Q) string {
	if n := q.UnitName(); n != "" {
		return n
	}
	return "a plain number"
}
