package units

import (
	"math"
	"strconv"
	"strings"
)

// UnitName is the unit q is shown in when nothing else is asked for: the decibel unit its
// dimension and flavor give (dBm, dB/K, dBHz), dB per metre for rates, and the SI unit of its
// dimension for linear values (m, Hz, bit/s).
func (q Q) UnitName() string {
	switch q.K {
	case Level:
		if s, _, ok := levelSym(q.D, q.F); ok {
			return s
		}
		return "dB(" + q.D.String() + ")"
	case Rate:
		if q.D == Length.Pow(-1) {
			// Cable losses read in dB/m, path losses (rain, gases) in dB/km.
			if q.V != 0 && math.Abs(q.V) < 0.1 {
				return "dB/km"
			}
			return "dB/m"
		}
		return "dB*" + q.D.String()
	}
	if q.D == Frequency {
		switch q.F {
		case flavorBit:
			return "bit/s"
		case flavorSym:
			return "Bd"
		}
	}
	if q.D.IsNone() {
		if q.F == flavorAngle {
			return "deg"
		}
		return ""
	}
	return q.D.String()
}

// String formats q in its own unit: decibels with 2 decimals, linear values in engineering
// notation with 4 significant digits (345 mm, 868 MHz), small plain numbers as 1.23e-6.
func (q Q) String() string {
	switch q.K {
	case Level:
		sym, off, _ := levelSym(q.D, q.F)
		return joinUnit(FormatDB(q.V-off), sym)
	case Rate:
		name := q.UnitName()
		if name == "dB/km" {
			return joinUnit(FormatDB(q.V*1000), name)
		}
		return joinUnit(FormatDB(q.V), name)
	}
	name := q.UnitName()
	if name == "" {
		return FormatNum(q.V)
	}
	if name == "deg" {
		return joinUnit(FormatNum(q.V*180/math.Pi), name)
	}
	if !prefixable(name) {
		return joinUnit(FormatNum(q.V), name)
	}
	v, p := engineering(q.V, name)
	return joinUnit(FormatNum(v), p+name)
}

// In returns the number that q is in unit u. A level may be read in a linear unit of the same
// dimension and a linear value in a decibel unit (dBm of a power in W).
func (q Q) In(u *Unit) (float64, error) {
	if u.D != q.D {
		return 0, errf(ErrDimension, "", "cannot show %s in %s", q.UnitName(), u.Sym)
	}
	switch {
	case u.K == q.K && u.K == Level:
		return q.V - u.Offset, nil
	case u.K == q.K:
		return (q.V - u.Offset) / u.Scale, nil
	case u.K == Level && q.K == Linear:
		l, err := q.ToLevel()
		if err != nil {
			return 0, err
		}
		return l.V - u.Offset, nil
	case u.K == Linear && q.K == Level:
		return q.Linear().V / u.Scale, nil
	}
	return 0, errf(ErrLevel, "", "cannot show %s in %s", q.UnitName(), u.Sym)
}

// Format writes q in unit u ("2.4 km", "14.00 dBm"), falling back to q's own unit when q cannot
// be shown in u.
func (q Q) Format(u *Unit) string {
	if u == nil || u.Sym == "" && !q.IsNumber() {
		return q.String()
	}
	v, err := q.In(u)
	if err != nil {
		return q.String()
	}
	if u.K == Linear {
		return joinUnit(FormatNum(v), u.Sym)
	}
	return joinUnit(FormatDB(v), u.Sym)
}

func joinUnit(num, sym string) string {
	if sym == "" {
		return num
	}
	return num + " " + sym
}

// FormatDB writes a decibel number with 2 decimals.
func FormatDB(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return FormatNum(v)
	}
	s := strconv.FormatFloat(v, 'f', 2, 64)
	if s == "-0.00" {
		s = "0.00"
	}
	return s
}

// FormatNum writes a plain number with 4 significant digits, in positional notation from 1e-3
// to 1e6 and as 1.23e-6 outside that range.
func FormatNum(v float64) string {
	switch {
	case math.IsNaN(v):
		return "NaN"
	case math.IsInf(v, 1):
		return "+Inf"
	case math.IsInf(v, -1):
		return "-Inf"
	case v == 0:
		return "0"
	}
	a := math.Abs(v)
	if a >= 1e-3 && a < 1e6 {
		s := strconv.FormatFloat(v, 'g', 4, 64)
		if strings.ContainsAny(s, "e") {
			f, _ := strconv.ParseFloat(s, 64)
			s = strconv.FormatFloat(f, 'f', -1, 64)
		}
		return s
	}
	s := strconv.FormatFloat(v, 'e', 3, 64)
	mant, exp, _ := strings.Cut(s, "e")
	if strings.Contains(mant, ".") {
		mant = strings.TrimRight(strings.TrimRight(mant, "0"), ".")
	}
	n, _ := strconv.Atoi(exp)
	return mant + "e" + strconv.Itoa(n)
}

// prefixable units take an SI prefix in engineering notation.
func prefixable(name string) bool {
	switch name {
	case "m", "s", "Hz", "W", "J", "V", "A", "ohm", "bit/s", "Bd", "V/m", "A/m", "W/m^2", "W/Hz", "W/K", "m/s", "Pa":
		return true
	}
	return false
}

var engPrefixes = []struct {
	sym string
	exp int
}{{"p", -12}, {"n", -9}, {"u", -6}, {"m", -3}, {"", 0}, {"k", 3}, {"M", 6}, {"G", 9}, {"T", 12}}

// engineering scales v to a mantissa in [1, 1000) with an SI prefix. Lengths stop at km and
// times at s, the way the trade writes them.
func engineering(v float64, name string) (float64, string) {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return v, ""
	}
	// Round to 4 significant digits first so 999.96 becomes 1 k, not 1000. Rounding through
	// the decimal form stays exact for subnormal values, where 10^(e−3) underflows.
	r, err := strconv.ParseFloat(strconv.FormatFloat(v, 'e', 3, 64), 64)
	if err != nil || math.IsInf(r, 0) {
		r = v
	}
	e := int(math.Floor(math.Log10(math.Abs(r))))
	exp := int(math.Floor(float64(e)/3)) * 3
	maxExp, minExp := 12, -12
	switch name {
	case "m":
		maxExp = 3
	case "s":
		maxExp = 0
	}
	exp = max(min(exp, maxExp), minExp)
	for _, p := range engPrefixes {
		if p.exp == exp {
			return r / math.Pow(10, float64(exp)), p.sym
		}
	}
	return v, ""
}

// As converts q to the form (linear or decibel) of unit u and takes u's display family, so
// that dbw(p) shows in dBW and watts(x) in W. The dimension must match.
func (q Q) As(u *Unit) (Q, error) {
	if u.D != q.D || (u.K == Rate) != (q.K == Rate) {
		return Q{}, errf(ErrDimension, "", "cannot convert %s to %s", nameOrNumber(q), u.Sym)
	}
	var err error
	switch {
	case u.K == Level && q.K == Linear:
		q, err = q.ToLevel()
	case u.K == Linear && q.K == Level:
		q = q.Linear()
	}
	q.F = u.F
	return q, err
}

func nameOrNumber(q Q) string {
	if n := q.UnitName(); n != "" {
		return n
	}
	return "a plain number"
}
