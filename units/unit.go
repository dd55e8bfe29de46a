package units

import (
	"math"
	"sort"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"unicode/utf8"
)

// Unit is a unit a value can be written in. A value v in the unit stands for the quantity
// Q{V: v*Scale + Offset, D, K}: Scale converts linear and rate values to SI, Offset moves levels
// to "dB re 1 SI unit" (dBm has Offset −30, dBd +2.15). The one linear unit with an offset is
// the degree Celsius (degC, °C): 15 degC is the absolute temperature 288.15 K, so a °C value is
// converted to kelvin as it is read, and all arithmetic, differences and tolerances on it are in
// kelvin (a tolerance is written in K: "15 degC" ± "2 K").
type Unit struct {
	Sym    string
	D      Dim
	K      Kind
	Scale  float64
	Offset float64
	F      Flavor
	prefix bool // may take an SI prefix when shown
}

// Of returns the quantity that the number v in this unit stands for.
func (u *Unit) Of(v float64) Q {
	if u.K == Level {
		return Q{V: v + u.Offset, D: u.D, K: Level, F: u.F}
	}
	return Q{V: v*u.Scale + u.Offset, D: u.D, K: u.K, F: u.F}
}

// HasOffset reports whether the unit is a linear unit with an offset from zero (degC): its
// values are absolute and cannot stand for a difference or a tolerance.
func (u *Unit) HasOffset() bool { return u.K == Linear && u.Offset != 0 }

// celsius are the spellings of the degree Celsius, a temperature scale offset from the kelvin.
var celsius = map[string]bool{"degC": true, "°C": true, "\u2103": true}

// celsiusUnit returns the degree Celsius written as sym: an absolute temperature in K.
func celsiusUnit(sym string) *Unit {
	return &Unit{Sym: sym, D: Temperature, K: Linear, Scale: 1, Offset: 273.15}
}

// atom is a linear unit without prefix.
type atom struct {
	sym    string
	d      Dim
	scale  float64
	f      Flavor
	prefix bool // accepts SI prefixes
}

var atoms = []atom{
	{"m", Length, 1, 0, true},
	{"s", Time, 1, 0, true},
	{"Hz", Frequency, 1, 0, true},
	{"W", Power, 1, 0, true},
	{"J", Energy, 1, 0, true},
	{"V", Voltage, 1, 0, true},
	{"A", Current, 1, 0, true},
	{"ohm", Resistance, 1, 0, true},
	{"Ω", Resistance, 1, 0, true},
	{"\u2126", Resistance, 1, 0, true}, // OHM SIGN, canonically the same letter as Ω
	{"K", Temperature, 1, 0, true},
	{"g", Dim{dimM: 1}, 1e-3, 0, true},
	{"bit", None, 1, flavorBit, true},
	{"bps", Frequency, 1, flavorBit, true},
	{"sym", None, 1, flavorSym, true},
	{"Bd", Frequency, 1, flavorSym, true},
	{"%", None, 0.01, 0, false},
	{"ppm", None, 1e-6, 0, false},
	{"deg", None, math.Pi / 180, flavorAngle, false},
	{"rad", None, 1, flavorAngle, false},
	{"Pa", Pressure, 1, 0, true},
	{"hPa", Pressure, 100, 0, false}, // hectopascal, the meteorologists' unit (= mbar)
	{"min", Time, 60, 0, false},
	{"h", Time, 3600, 0, false},
	{"ft", Length, 0.3048, 0, false},
	{"mi", Length, 1609.344, 0, false},
	{"nmi", Length, 1852, 0, false},
}

var prefixes = []struct {
	sym   string
	scale float64
}{
	{"p", 1e-12}, {"n", 1e-9}, {"u", 1e-6}, {"µ", 1e-6}, {"μ", 1e-6}, {"m", 1e-3}, {"c", 1e-2},
	{"k", 1e3}, {"M", 1e6}, {"G", 1e9}, {"T", 1e12},
}

// levelRefs are what may follow "dB" in a level unit: the reference the level is taken against.
var levelRefs = []struct {
	sym    string
	d      Dim
	offset float64 // dB re 1 SI unit of one reference unit
	f      Flavor
}{
	{"FS", None, 0, 0}, {"-Hz", Frequency, 0, 0}, {"Hz", Frequency, 0, 0},
	{"uV", Voltage, -120, flavorMicro}, {"µV", Voltage, -120, flavorMicro}, {"μV", Voltage, -120, flavorMicro},
	{"mV", Voltage, -60, flavorVolt}, {"uA", Current, -120, flavorMicro}, {"µA", Current, -120, flavorMicro}, {"μA", Current, -120, flavorMicro},
	{"m", Power, -30, flavorMilli}, {"W", Power, 0, flavorWatt}, {"i", None, 0, flavorIso},
	{"d", None, 2.15, flavorIso}, {"c", None, 0, flavorCarrier}, {"K", Temperature, 0, 0}, {"V", Voltage, 0, flavorVolt},
	{"A", Current, 0, 0}, {"", None, 0, 0},
}

var (
	unitCache     sync.Map     // string -> *Unit
	unitCacheSize atomic.Int64 // entries stored, so that a stream of odd units cannot grow it without bound
)

const maxCachedUnits = 4096

// ParseUnit returns the unit written as s: a linear unit with an optional SI prefix, a compound
// of them with *, / and ^ (W/m^2, bit/s/Hz), or a decibel unit (dB, dBm, dBm/Hz, dB/km, dBW/K/Hz).
func ParseUnit(s string) (*Unit, error) {
	if u, ok := unitCache.Load(s); ok {
		return u.(*Unit), nil
	}
	u, err := parseUnit(s)
	if err != nil {
		return nil, err
	}
	if len(s) <= 32 && unitCacheSize.Load() < maxCachedUnits {
		if _, loaded := unitCache.LoadOrStore(s, u); !loaded {
			unitCacheSize.Add(1)
		}
	}
	return u, nil
}

func unknownUnit(s, why string) error {
	hint := ""
	n := spelledOut[strings.ToLower(s)]
	if n == "" {
		n = Nearest(s, KnownUnits())
	}
	if n != "" {
		hint = "did you mean \"" + n + "\"?"
	}
	msg := "unknown unit \"" + s + "\""
	if why != "" {
		msg += ": " + why
	}
	return &Error{Msg: msg, Hint: hint, kind: ErrUnit}
}

// spelledOut maps unit names written out in words to their symbols, for the did-you-mean hint.
var spelledOut = map[string]string{
	"meter": "m", "meters": "m", "metre": "m", "metres": "m", "second": "s", "seconds": "s", "sec": "s",
	"hertz": "Hz", "watt": "W", "watts": "W", "volt": "V", "volts": "V", "amp": "A", "amps": "A",
	"ampere": "A", "amperes": "A", "ohms": "ohm", "kelvin": "K", "joule": "J", "joules": "J",
	"bits": "bit", "baud": "Bd", "percent": "%", "degree": "deg", "degrees": "deg", "foot": "ft",
	"feet": "ft", "mile": "mi", "miles": "mi", "minute": "min", "minutes": "min", "hour": "h",
	"hours": "h", "hr": "h", "celsius": "degC", "degreesc": "degC", "mbar": "hPa", "millibar": "hPa",
	"hectopascal": "hPa", "pascal": "Pa",
}

func parseUnit(s string) (*Unit, error) {
	if s == "" {
		return &Unit{Sym: "", Scale: 1}, nil
	}
	if !utf8.ValidString(s) || len(s) > 64 {
		return nil, unknownUnit(s, "")
	}
	if strings.HasPrefix(s, "dB") {
		return parseLevelUnit(s)
	}
	if celsius[s] {
		return celsiusUnit(s), nil
	}
	d, scale, f, err := parseCompound(s, false)
	if err != nil {
		return nil, unknownUnit(s, err.Error())
	}
	if !finiteScale(scale) {
		return nil, unknownUnit(s, "its size is out of range")
	}
	return &Unit{Sym: s, D: d, Scale: scale, F: f, K: Linear}, nil
}

func parseLevelUnit(s string) (*Unit, error) {
	rest := s[2:]
	head, tail, _ := strings.Cut(rest, "/")
	if strings.HasPrefix(rest, "-Hz") {
		head, tail = "-Hz", strings.TrimPrefix(rest[3:], "/")
	}
	for _, r := range levelRefs {
		if head != r.sym {
			continue
		}
		u := &Unit{Sym: s, D: r.d, K: Level, Offset: r.offset, F: r.f}
		if tail == "" {
			if strings.HasSuffix(rest, "/") {
				return nil, unknownUnit(s, "nothing after /")
			}
			return u, nil
		}
		den, scale := None, 1.0
		for _, piece := range strings.Split(tail, "/") {
			pd, ps, _, err := parsePower(piece, true)
			if err != nil {
				return nil, unknownUnit(s, err.Error())
			}
			if pd[dimT] > 0 {
				// dB/s would read as dBHz; the trade means a change per second by it.
				return nil, unknownUnit(s, "a slash after dB takes a length (dB/km, a rate) or K or Hz (dBm/Hz, dB/K, a density)")
			}
			var ok bool
			if den, ok = mulDim(den, pd, 1); !ok {
				return nil, unknownUnit(s, "its dimension is out of range")
			}
			scale *= ps
		}
		if !finiteScale(scale) {
			return nil, unknownUnit(s, "its size is out of range")
		}
		if r.sym == "" && den == Length {
			// dB/km, dB/100m: a rate, decibels per length.
			return &Unit{Sym: s, D: Length.Pow(-1), K: Rate, Scale: 1 / scale}, nil
		}
		u.D = u.D.Div(den)
		if !hasLevelUnit(u.D) {
			return nil, unknownUnit(s, "a decibel unit of "+u.D.String()+" has no meaning here")
		}
		k := 10.0
		if u.D.root() {
			k = 20
		}
		u.Offset -= k * math.Log10(scale)
		return u, nil
	}
	return nil, unknownUnit(s, "")
}

// parseCompound parses a product/quotient of atoms: "W/m^2", "bit/s/Hz", "1/K", "100m" (when
// numbers are allowed, as in dB/100m). It returns the dimension and the scale to SI.
func parseCompound(s string, allowNumber bool) (Dim, float64, Flavor, error) {
	var d Dim
	scale := 1.0
	var f Flavor
	sign := 1
	for i := 0; s != ""; i++ {
		j := strings.IndexAny(s, "*/")
		part := s
		if j >= 0 {
			part = s[:j]
		}
		ad, as, af := None, 1.0, Flavor(0)
		if i > 0 || part != "1" || j < 0 || s[j] != '/' {
			// "1" stands only as the numerator of a reciprocal, as in 1/K.
			var err error
			if ad, as, af, err = parsePower(part, allowNumber); err != nil {
				return Dim{}, 0, 0, err
			}
		}
		var ok bool
		if d, ok = mulDim(d, ad, sign); !ok {
			return Dim{}, 0, 0, errStr("its dimension is out of range")
		}
		if sign > 0 {
			scale *= as
			if af != 0 {
				f = af
			}
		} else {
			scale /= as
		}
		if j < 0 {
			break
		}
		sign = 1
		if s[j] == '/' {
			sign = -1
		}
		op := s[j : j+1]
		s = s[j+1:]
		if s == "" {
			return Dim{}, 0, 0, errStr("nothing after " + op)
		}
	}
	switch {
	case d == Frequency && f != flavorAngle: // bit/s, Bd
	case d.IsNone() && f == flavorAngle: // deg, 2*rad
	default:
		f = 0
	}
	return d, scale, f, nil
}

// maxDimExp bounds the exponent of each base unit in a dimension, far beyond anything physical,
// so that products cannot wrap round the int8 exponents.
const maxDimExp = 32

// mulDim returns a·b (sign 1) or a/b (sign −1), or false when an exponent leaves ±maxDimExp.
func mulDim(a, b Dim, sign int) (Dim, bool) {
	var out Dim
	for i := range a {
		e := int(a[i]) + sign*int(b[i])
		if e < -maxDimExp || e > maxDimExp {
			return Dim{}, false
		}
		out[i] = int8(e)
	}
	return out, true
}

// powDim returns d^n, or false when an exponent leaves ±maxDimExp.
func powDim(d Dim, n int) (Dim, bool) {
	var out Dim
	for i := range d {
		e := int(d[i]) * n
		if e < -maxDimExp || e > maxDimExp {
			return Dim{}, false
		}
		out[i] = int8(e)
	}
	return out, true
}

// finiteScale reports whether a unit's size is a usable number.
func finiteScale(x float64) bool { return x != 0 && !math.IsInf(x, 0) && !math.IsNaN(x) }

type errStr string

func (e errStr) Error() string { return string(e) }

// parsePower parses one atom with optional SI prefix, number factor and ^exponent.
func parsePower(s string, allowNumber bool) (Dim, float64, Flavor, error) {
	if s == "" {
		return Dim{}, 0, 0, errStr("empty unit")
	}
	exp := 1
	if base, e, ok := strings.Cut(s, "^"); ok {
		n, err := strconv.Atoi(e)
		if err != nil || n == 0 || n < -maxDimExp || n > maxDimExp {
			return Dim{}, 0, 0, errStr("bad exponent \"" + e + "\"")
		}
		s, exp = base, n
	}
	factor := 1.0
	if allowNumber {
		k := 0
		for k < len(s) && (s[k] >= '0' && s[k] <= '9' || s[k] == '.') {
			k++
		}
		if k > 0 {
			v, err := strconv.ParseFloat(s[:k], 64)
			if err != nil || !(v > 0) || math.IsInf(v, 0) {
				return Dim{}, 0, 0, errStr("bad factor \"" + s[:k] + "\"")
			}
			factor, s = v, s[k:]
		}
	}
	a, pscale, ok := lookupAtom(s)
	if !ok {
		return Dim{}, 0, 0, errStr("\"" + s + "\" is not a unit")
	}
	d, ok := powDim(a.d, exp)
	if !ok {
		return Dim{}, 0, 0, errStr("its dimension is out of range")
	}
	return d, math.Pow(factor*pscale*a.scale, float64(exp)), a.f, nil
}

func lookupAtom(s string) (atom, float64, bool) {
	for _, a := range atoms {
		if a.sym == s {
			return a, 1, true
		}
	}
	for _, p := range prefixes {
		rest, ok := strings.CutPrefix(s, p.sym)
		if !ok || rest == "" {
			continue
		}
		for _, a := range atoms {
			if a.sym == rest && a.prefix {
				return a, p.scale, true
			}
		}
	}
	return atom{}, 0, false
}

// hasLevelUnit reports whether a level of dimension d has a decibel unit to be shown in.
func hasLevelUnit(d Dim) bool {
	_, _, ok := levelSym(d, flavorNone)
	return ok
}

// levelSym gives the decibel unit a level of dimension d is shown in, and its offset.
func levelSym(d Dim, f Flavor) (string, float64, bool) {
	switch d {
	case None:
		switch f {
		case flavorIso:
			return "dBi", 0, true
		case flavorCarrier:
			return "dBc", 0, true
		}
		return "dB", 0, true
	case Frequency.Pow(-1):
		return "dBc/Hz", 0, true
	case Frequency:
		return "dBHz", 0, true
	case Temperature:
		return "dBK", 0, true
	case Temperature.Pow(-1):
		return "dB/K", 0, true
	}
	if d.root() {
		ref, off := "uV", -120.0
		if f == flavorVolt {
			ref, off = "V", 0
		}
		switch d {
		case Voltage:
			return "dB" + ref, off, true
		case Voltage.Div(Length):
			return "dB" + ref + "/m", off, true
		case Current:
			return "dB" + ref[:len(ref)-1] + "A", off, true
		}
		return "", 0, false
	}
	ref, off := "m", -30.0
	if f == flavorWatt {
		ref, off = "W", 0
	}
	rem := Power.Div(d)
	for _, den := range []struct {
		d   Dim
		sym string
	}{
		{None, ""}, {Frequency, "/Hz"}, {Temperature, "/K"}, {Temperature.Mul(Frequency), "/K/Hz"}, {Area, "/m^2"},
	} {
		if rem == den.d {
			return "dB" + ref + den.sym, off, true
		}
	}
	return "", 0, false
}

// KnownUnits lists the unit symbols a user may write, for help and suggestions (without
// prefixed forms, which follow the prefix rule).
func KnownUnits() []string {
	var out []string
	for _, a := range atoms {
		out = append(out, a.sym)
	}
	out = append(out, "bit/s", "sym/s", "kbit/s", "Mbit/s", "km", "mm", "cm", "MHz", "GHz", "kHz", "mW", "uW", "us", "ms", "degC", "°C", "g/m^3", "mm/h")
	for _, r := range levelRefs {
		if r.sym != "" && r.sym[0] != '-' {
			out = append(out, "dB"+r.sym)
		}
	}
	out = append(out, "dB", "dB-Hz", "dBm/Hz", "dBW/Hz", "dBW/K", "dBW/K/Hz", "dB/K", "dBc/Hz", "dBuV/m", "dB/km", "dB/m", "dB/100m", "dB/ft")
	sort.Strings(out)
	return out
}

// Nearest returns the candidate that differs from word in letter case only, else the one
// closest by edit distance when it is close enough to be a likely typo (distance < 3, and less
// than half the word), or "".
func Nearest(word string, candidates []string) string {
	for _, c := range candidates {
		// A difference in case only is the likeliest slip (mhz for MHz).
		if c != word && strings.EqualFold(c, word) {
			return c
		}
	}
	// At the same distance the candidate that begins like the word wins: a slip is likelier
	// at the end of what was typed ("dBmm" is "dBm" with a key pressed twice, not "dB/m").
	best, bestD := "", 3
	for _, c := range candidates {
		if c == word {
			continue
		}
		d := editDistance(word, c)
		if d*2 > utf8.RuneCountInString(word)+1 {
			continue
		}
		if d < bestD || d == bestD && best != "" && commonPrefix(word, c) > commonPrefix(word, best) {
			best, bestD = c, d
		}
	}
	return best
}

// commonPrefix returns how many leading bytes a and b share.
func commonPrefix(a, b string) int {
	n := 0
	for n < len(a) && n < len(b) && a[n] == b[n] {
		n++
	}
	return n
}

func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	if len(ra) > 64 || len(rb) > 64 {
		return 99
	}
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
			c := prev[j-1]
			if ra[i-1] != rb[j-1] {
				c++
			}
			cur[j] = min(c, prev[j]+1, cur[j-1]+1)
		}
		prev, cur = cur, prev
	}
	return prev[len(rb)]
}
