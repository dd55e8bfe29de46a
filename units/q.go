package units

import (
	"errors"
	"fmt"
	"math"
)

// Kind says how a quantity's number relates to the physical value it stands for.
type Kind uint8

const (
	// Linear values are in SI base units (a distance of 2.4 km is 2400 with the dimension of length).
	Linear Kind = iota
	// Level values are decibels of a linear value of dimension D, referred to 1 SI unit of D:
	// 14 dBm is -16 with the dimension of power. Root-power dimensions (voltage, field
	// strength) use 20·log10, all others 10·log10. A dimensionless level is a ratio (dB).
	Level
	// Rate values are decibels per unit of D⁻¹, stored per SI unit: 0.3 dB/m has D = 1/m.
	// A rate times a length is a ratio in dB.
	Rate
)

// Flavor records which of several equivalent units a value is best shown in: the algebra carries
// it along so that a sum of dBm terms prints in dBm and a net bit rate prints in bit/s.
type Flavor uint8

const (
	flavorNone      Flavor = iota
	flavorMilli            // power levels referred to 1 mW (dBm, dBm/Hz)
	flavorWatt             // power levels referred to 1 W (dBW, dBW/K)
	flavorMicro            // root-power levels referred to 1 µV (dBuV, dBuV/m)
	flavorVolt             // root-power levels referred to 1 V
	flavorIso              // antenna gain over isotropic (dBi)
	flavorBit              // bit rates (bit/s)
	flavorSym              // symbol rates (Bd)
	flavorAngle            // plane angles written in deg or rad (dimensionless, but not a plain number)
	flavorRootRatio        // a ratio of two root-power quantities (V/V): its decibels are 20·log10
)

// flavorCarrier marks ratios to a carrier (dBc) and phase-noise densities (dBc/Hz). It is
// numbered apart from the table above so that flavors added there cannot take its value.
const flavorCarrier Flavor = 0x80

// Q is a quantity: a number with a dimension and a kind (linear, decibel level, decibel rate).
// The zero Q is the dimensionless number 0. Q is a small value type; copy it freely.
type Q struct {
	V float64 // the number, in SI base units (Linear), dB re 1 SI unit (Level), dB per SI unit (Rate)
	D Dim
	K Kind
	F Flavor
}

// Num returns a dimensionless linear quantity.
func Num(v float64) Q { return Q{V: v} }

// Lin returns a linear quantity with value v in SI base units of dimension d.
func Lin(v float64, d Dim) Q { return Q{V: v, D: d} }

// DB returns a dimensionless decibel ratio.
func DB(v float64) Q { return Q{V: v, K: Level} }

// DBm returns a power level in dBm.
func DBm(v float64) Q { return Q{V: v - 30, D: Power, K: Level, F: flavorMilli} }

// IsLevel reports whether q is a decibel level (including a plain dB ratio).
func (q Q) IsLevel() bool { return q.K == Level }

// IsRatio reports whether q is a dimensionless decibel ratio (dB, dBi, dBc).
func (q Q) IsRatio() bool { return q.K == Level && q.D.IsNone() }

// IsAngle reports whether q is a plane angle, a value written in deg or rad (or derived from
// one by scaling or adding angles). Angles are dimensionless; the flag lets trigonometric
// functions refuse a bare number, which could be meant in either unit.
func (q Q) IsAngle() bool { return q.K == Linear && q.D.IsNone() && q.F == flavorAngle }

// IsRootRatio reports whether q is a dimensionless ratio of two root-power quantities (V/V,
// (V/m)/(V/m)), whose level in decibels is 20·log10, not 10·log10.
func (q Q) IsRootRatio() bool { return q.K == Linear && q.D.IsNone() && q.F == flavorRootRatio }

// IsNumber reports whether q is a plain dimensionless linear number.
func (q Q) IsNumber() bool { return q.K == Linear && q.D.IsNone() }

// Error is a unit-rule violation. Msg says what was wrong, Hint what to write instead.
type Error struct {
	Msg  string
	Hint string
	kind error
}

func (e *Error) Error() string {
	if e.Hint == "" {
		return e.Msg
	}
	return e.Msg + "; hint: " + e.Hint
}

// Unwrap lets errors.Is test the class of the violation.
func (e *Error) Unwrap() error { return e.kind }

// Classes of unit errors, for errors.Is.
var (
	ErrDimension = errors.New("dimension mismatch")
	ErrLogLinear = errors.New("decibel and linear values mixed")
	ErrLevel     = errors.New("invalid decibel arithmetic")
	ErrDomain    = errors.New("value outside the domain")
	ErrUnit      = errors.New("unknown unit")
)

// Hints for the broken unit rules, shown after the message.
const (
	hintPsum     = "psum(a, b) adds powers"
	hintConvert  = "convert first with dbm(), dbw() or watts() (or lin()/db() for ratios)"
	hintBareDB   = "write the unit, e.g. 3 dB"
	hintRate     = "multiply a rate in dB per length by a length to get dB"
	hintScale    = "only ratios (dB) may be scaled; an absolute level cannot"
	hintNegLevel = "subtract it from something instead, e.g. x - p"
)

func errf(kind error, hint, format string, args ...any) error {
	return &Error{Msg: fmt.Sprintf(format, args...), Hint: hint, kind: kind}
}

// Add returns a + b under the decibel rules: linear values of one dimension add; adding levels
// multiplies the linear values they stand for; rates of one dimension add.
func Add(a, b Q) (Q, error) { return addSub(a, b, 1) }

// Sub returns a − b: linear values subtract; subtracting levels divides the linear values.
func Sub(a, b Q) (Q, error) { return addSub(a, b, -1) }

func addSub(a, b Q, sign float64) (Q, error) {
	op := opName(sign)
	if a.K != b.K {
		return Q{}, mixErr(a, b, op)
	}
	switch a.K {
	case Linear, Rate:
		if a.D != b.D {
			return Q{}, errf(ErrDimension, "", "cannot %s %s and %s", op, a.UnitName(), b.UnitName())
		}
		f := a.F
		if f == flavorNone {
			f = b.F
		}
		return Q{V: a.V + sign*b.V, D: a.D, K: a.K, F: f}, nil
	}
	d := a.D.Mul(b.D)
	if sign < 0 {
		d = a.D.Div(b.D)
	}
	if !a.D.IsNone() && !b.D.IsNone() && a.D.root() != b.D.root() {
		return Q{}, errf(ErrLevel, "convert one of them first", "cannot %s a power level (%s) and a root-power level (%s)", op, a.UnitName(), b.UnitName())
	}
	if !d.IsNone() && !hasLevelUnit(d) {
		if a.D == b.D && sign > 0 {
			return Q{}, errf(ErrLevel, hintPsum, "cannot add %s and %s: adding levels multiplies the values they stand for", a.UnitName(), b.UnitName())
		}
		return Q{}, errf(ErrLevel, "check which terms are levels and which are ratios", "cannot %s %s and %s: the result would be a level of %s, which has no decibel unit", opName(sign), a.UnitName(), b.UnitName(), d)
	}
	return Q{V: a.V + sign*b.V, D: d, K: Level, F: levelFlavor(a, b, d, sign)}, nil
}

func opName(sign float64) string {
	if sign > 0 {
		return "add"
	}
	return "subtract"
}

func mixErr(a, b Q, op string) error {
	switch {
	case a.K == Rate || b.K == Rate:
		return errf(ErrLevel, hintRate, "cannot %s %s and %s", op, a.UnitName(), b.UnitName())
	case a.IsNumber() || b.IsNumber():
		return errf(ErrLogLinear, hintBareDB, "cannot %s a plain number and %s", op, pick(a, b).UnitName())
	}
	return errf(ErrLogLinear, hintConvert, "cannot %s %s and %s", op, a.UnitName(), b.UnitName())
}

// pick returns the operand that is not a plain number.
func pick(a, b Q) Q {
	if a.IsNumber() {
		return b
	}
	return a
}

// levelFlavor picks the display family of a level sum from its operands.
func levelFlavor(a, b Q, d Dim, sign float64) Flavor {
	fa, fb, da, db := a.F, b.F, a.D, b.D
	if d.IsNone() {
		// dBm - dBm is dB; dBi + dBi is dB; a gain over isotropic minus a loss stays dBi.
		if (fa == flavorIso) != (fb == flavorIso) && (fa == flavorIso || sign > 0) && da.IsNone() && db.IsNone() {
			return flavorIso
		}
		// dBc + dB and dBc/Hz + dBHz stay relative to the carrier; dBc − dBc is a plain dB.
		if (fa == flavorCarrier) != (fb == flavorCarrier) && (fa == flavorCarrier || sign > 0) {
			return flavorCarrier
		}
		return flavorNone
	}
	if d == Frequency.Pow(-1) {
		// A level per hertz without a power in it is a density relative to a carrier:
		// dBm/Hz − dBm is phase noise in dBc/Hz.
		return flavorCarrier
	}
	for _, f := range []Flavor{fa, fb} {
		switch {
		case (f == flavorMilli || f == flavorWatt) && d.powerLike() && !d.root():
			return f
		case (f == flavorMicro || f == flavorVolt) && d.root():
			return f
		}
	}
	return flavorNone
}

// Mul returns a × b. Linear values multiply with their dimensions; a ratio in dB may be scaled
// by a plain number; a rate in dB per length times a length is a ratio in dB.
func Mul(a, b Q) (Q, error) {
	if a.K == Linear && b.K == Linear {
		d, ok := mulDim(a.D, b.D, 1)
		if !ok {
			return Q{}, dimRangeErr("multiply", a, b)
		}
		f := linFlavor(a, b)
		if a.F == flavorAngle && b.F == flavorAngle {
			f = flavorNone // a product of angles is no angle
		}
		return Q{V: a.V * b.V, D: d, F: f}, nil
	}
	if a.K == Linear {
		a, b = b, a // the non-linear operand first
	}
	switch {
	case a.K == Level && b.K == Linear:
		if !b.D.IsNone() {
			return Q{}, errf(ErrLevel, hintConvert, "cannot multiply %s by %s", a.UnitName(), b.UnitName())
		}
		if !a.D.IsNone() {
			return Q{}, errf(ErrLevel, hintScale, "cannot scale %s", a.UnitName())
		}
		return Q{V: a.V * b.V, K: Level, F: a.F}, nil
	case a.K == Rate && b.K == Linear:
		d := a.D.Mul(b.D)
		if d.IsNone() {
			return Q{V: a.V * b.V, K: Level}, nil
		}
		if b.D.IsNone() {
			return Q{V: a.V * b.V, D: a.D, K: Rate}, nil
		}
		return Q{}, errf(ErrLevel, hintRate, "cannot multiply %s by %s", a.UnitName(), b.UnitName())
	}
	return Q{}, errf(ErrLevel, "decibels add where linear values multiply; use + instead", "cannot multiply %s by %s", a.UnitName(), b.UnitName())
}

// Div returns a ÷ b. Linear values divide; a ratio in dB divides by a plain number (giving dB)
// or by a length (giving a rate); dB ÷ dB is a plain number; a rate divides by a plain number.
func Div(a, b Q) (Q, error) {
	switch {
	case a.K == Linear && b.K == Linear:
		d, ok := mulDim(a.D, b.D, -1)
		if !ok {
			return Q{}, dimRangeErr("divide", a, b)
		}
		f := linFlavor(a, b)
		switch {
		case d.IsNone() && a.D.root() && b.D.root():
			f = flavorRootRatio
		case b.F == flavorAngle:
			f = flavorNone // angle/angle is a ratio, number/angle no angle
		}
		return Q{V: a.V / b.V, D: d, F: f}, nil
	case a.IsRatio() && b.K == Linear && b.D.IsNone():
		return Q{V: a.V / b.V, K: Level, F: a.F}, nil
	case a.IsRatio() && b.K == Linear && b.D == Length:
		return Q{V: a.V / b.V, D: Length.Pow(-1), K: Rate}, nil
	case a.IsRatio() && b.IsRatio():
		return Q{V: a.V / b.V}, nil
	case a.K == Rate && b.K == Linear && b.D.IsNone():
		return Q{V: a.V / b.V, D: a.D, K: Rate}, nil
	case a.K == Rate && b.K == Rate && a.D == b.D:
		return Q{V: a.V / b.V}, nil
	case a.K == Level && !a.D.IsNone() && b.K == Linear:
		return Q{}, errf(ErrLevel, hintScale, "cannot divide %s by %s", a.UnitName(), b.UnitName())
	}
	return Q{}, errf(ErrLevel, "decibels subtract where linear values divide; use - instead", "cannot divide %s by %s", a.UnitName(), b.UnitName())
}

// Pow returns a raised to the plain number b. A dimensioned base needs an integer exponent.
func Pow(a, b Q) (Q, error) {
	if !b.IsNumber() {
		return Q{}, errf(ErrDimension, "", "an exponent must be a plain number, not %s", b.UnitName())
	}
	if a.K != Linear {
		if b.V == 1 {
			return a, nil
		}
		return Q{}, errf(ErrLevel, "convert to linear first with lin() or watts()", "cannot raise %s to a power", a.UnitName())
	}
	if a.D.IsNone() {
		return Q{V: math.Pow(a.V, b.V)}, nil
	}
	n := math.Round(b.V)
	if n != b.V || math.Abs(n) > 8 {
		return Q{}, errf(ErrDimension, "", "cannot raise %s to the power %g (only whole powers up to 8 keep a dimension)", a.UnitName(), b.V)
	}
	d, ok := powDim(a.D, int(n))
	if !ok {
		return Q{}, errf(ErrDimension, "", "cannot raise %s to the power %g: the dimension would be out of range", a.UnitName(), b.V)
	}
	return Q{V: math.Pow(a.V, n), D: d}, nil
}

func dimRangeErr(op string, a, b Q) error {
	return errf(ErrDimension, "", "cannot %s %s by %s: the dimension would be out of range", op, a.UnitName(), b.UnitName())
}

// Neg returns −a. Absolute levels (dBm, dBK) cannot be negated: −14 dBm is not the reciprocal
// of a power that means anything.
func Neg(a Q) (Q, error) {
	if a.K == Level && !a.D.IsNone() {
		return Q{}, errf(ErrLevel, hintNegLevel, "cannot negate an absolute level (%s)", a.UnitName())
	}
	a.V = -a.V
	return a, nil
}

// Sqrt returns the square root; a dimension must have even exponents (m^2 → m).
func Sqrt(a Q) (Q, error) {
	if a.K != Linear {
		return Q{}, errf(ErrLevel, "convert to linear first with lin() or watts()", "cannot take the square root of %s", a.UnitName())
	}
	var d Dim
	for i, e := range a.D {
		if e%2 != 0 {
			return Q{}, errf(ErrDimension, "", "cannot take the square root of %s: its dimension has an odd power", a.UnitName())
		}
		d[i] = e / 2
	}
	return Q{V: math.Sqrt(a.V), D: d}, nil
}

// Compare returns -1, 0 or +1 as a is less than, equal to, or greater than b. A level compares
// with a linear value of the same dimension (p >= 25 mW where p is in dBm); a plain number does
// not compare with decibels, because 0 and 0 dB are different things.
func Compare(a, b Q) (int, error) {
	x, y := a.V, b.V
	switch {
	case a.K == b.K && a.D == b.D:
	case a.K == Level && b.K == Linear && a.D == b.D && !a.D.IsNone():
		x = a.Linear().V
	case a.K == Linear && b.K == Level && a.D == b.D && !a.D.IsNone():
		y = b.Linear().V
	case a.IsNumber() && b.IsRatio() || a.IsRatio() && b.IsNumber():
		return 0, errf(ErrLogLinear, hintBareDB, "cannot compare a plain number with %s", pick(a, b).UnitName())
	default:
		hint := ""
		if a.IsNumber() || b.IsNumber() {
			hint = "write the number with its unit, e.g. 0 " + pick(a, b).UnitName()
		}
		return 0, errf(ErrDimension, hint, "cannot compare %s with %s", nameOrNumber(a), nameOrNumber(b))
	}
	if math.IsNaN(x) || math.IsNaN(y) {
		return 0, errf(ErrDomain, "", "cannot compare a value that is not a number")
	}
	switch {
	case x < y:
		return -1, nil
	case x > y:
		return 1, nil
	}
	return 0, nil
}

// Linear returns the linear value a level stands for (10^(L/10) or 10^(L/20) of 1 SI unit).
// A linear value is returned as it is; a rate cannot be made linear and comes back unchanged.
func (q Q) Linear() Q {
	if q.K != Level {
		return q
	}
	div := 10.0
	if q.D.root() {
		div = 20
	}
	f := flavorNone
	return Q{V: math.Pow(10, q.V/div), D: q.D, F: f}
}

// ToLevel returns the level of a linear value (10·log10, or 20·log10 for root-power dimensions).
// Levels come back unchanged. Zero or negative values have no level, and neither have
// dimensions without a decibel unit (a length).
func (q Q) ToLevel() (Q, error) {
	if q.K != Linear {
		return q, nil
	}
	if !hasLevelUnit(q.D) {
		return Q{}, errf(ErrLevel, "", "%s has no decibel unit", q.D.kindName())
	}
	if !(q.V > 0) {
		return Q{}, errf(ErrDomain, "a level needs a positive linear value", "cannot take the decibel level of %s", q.String())
	}
	mul := 10.0
	if q.D.root() {
		mul = 20
	}
	f := flavorNone
	if q.D.powerLike() && !q.D.root() {
		f = flavorMilli
	} else if q.D.root() {
		f = flavorMicro
	}
	return Q{V: mul * math.Log10(q.V), D: q.D, K: Level, F: f}, nil
}

// linFlavor carries a bit-rate or symbol-rate flavor through a product or quotient with a plain number.
func linFlavor(a, b Q) Flavor {
	if a.F != flavorNone && b.D.IsNone() {
		return a.F
	}
	if b.F != flavorNone && a.D.IsNone() {
		return b.F
	}
	return flavorNone
}
