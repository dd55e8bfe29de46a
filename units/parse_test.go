package units

import (
	"errors"
	"math"
	"slices"
	"strings"
	"testing"
)

func TestParse(t *testing.T) {
	// Expected SI values come from the definitions in SPEC §3 and the SI Brochure (9th edition)
	// for the prefixes; a level is stored in dB re 1 SI unit, so 14 dBm is 14 − 30 = −16 dB re 1 W.
	cases := []struct {
		in   string
		d    Dim
		k    Kind
		v    float64
		name string // UnitName, when worth checking
	}{
		{"14 dBm", Power, Level, -16, "dBm"},
		{"-174 dBm/Hz", PowerDensity, Level, -204, "dBm/Hz"},
		{"0.3 dB/m", Length.Pow(-1), Rate, 0.3, "dB/m"},
		{"2.4 km", Length, Linear, 2400, "m"},
		{"2.4km", Length, Linear, 2400, "m"},
		{"38.4 kbit/s", Frequency, Linear, 38400, "bit/s"},
		{"10 %", None, Linear, 0.1, ""},
		{"1.5 \u00b5s", Time, Linear, 1.5e-6, "s"}, // micro sign
		{"1.5 us", Time, Linear, 1.5e-6, "s"},
		{"1.5 \u03bcs", Time, Linear, 1.5e-6, "s"}, // Greek small mu
		{"50 ohm", Resistance, Linear, 50, "ohm"},
		{"50 \u03a9", Resistance, Linear, 50, "ohm"}, // Greek capital omega
		{"50 \u2126", Resistance, Linear, 50, "ohm"}, // ohm sign (canonically the same letter)
		{"3 dB/100m", Length.Pow(-1), Rate, 0.03, "dB/km"},
		{"3 dB/km", Length.Pow(-1), Rate, 0.003, "dB/km"},
		// 1 ft = 0.3048 m exactly (international yard and pound agreement, 1959).
		{"10 dB/ft", Length.Pow(-1), Rate, 10 / 0.3048, "dB/m"},
		// dBd = dBi − 2.15 dB (SPEC §3; half-wave dipole gain, common practice per IEEE Std 145
		// antenna definitions), so 5 dBd = 7.15 dBi.
		{"5 dBd", None, Level, 7.15, "dBi"},
		{"3 dBi", None, Level, 3, "dBi"},
		{"1 dB-Hz", Frequency, Level, 1, "dBHz"},
		{"1 dBHz", Frequency, Level, 1, "dBHz"},
		// Root-power: 1 µV = 1e-6 V is 20·log10(1e-6) = −120 dB re 1 V.
		{"40 dBuV/m", Voltage.Div(Length), Level, 40 - 120, "dBuV/m"},
		{"40 dB\u00b5V", Voltage, Level, -80, "dBuV"},
		{"40 dB\u03bcV", Voltage, Level, -80, "dBuV"},
		{"-30 dBV", Voltage, Level, -30, "dBV"},
		{"0 dBmV", Voltage, Level, -60, "dBV"}, // 1 mV = −60 dBV
		{"0 dBA", Current, Level, 0, "dBuA"},
		{"0 dBuA", Current, Level, -120, "dBuA"},
		{"0 dB\u00b5A", Current, Level, -120, "dBuA"},
		{"0 dB\u03bcA", Current, Level, -120, "dBuA"},
		{"290 K", Temperature, Linear, 290, "K"},
		{"24.6 dBK", Temperature, Level, 24.6, "dBK"},
		{"-228.6 dBW/K/Hz", Boltzmann, Level, -228.6, "dBW/K/Hz"},
		{"-198.6 dBm/K/Hz", Boltzmann, Level, -228.6, "dBm/K/Hz"},
		{"-20 dBW/K", Power.Div(Temperature), Level, -20, "dBW/K"},
		{"-20 dBW/Hz", PowerDensity, Level, -20, "dBW/Hz"},
		// 0 dBm/MHz = 1e-3 W / 1e6 Hz = 1e-9 W/Hz = −90 dBW/Hz.
		{"0 dBm/MHz", PowerDensity, Level, -90, "dBm/Hz"},
		{"-100 dBW/m^2", Power.Div(Area), Level, -100, "dBW/m^2"},
		{"10 dB/K", Temperature.Pow(-1), Level, 10, "dB/K"},
		{"2 bit/s/Hz", None, Linear, 2, ""},
		{"1 Mbps", Frequency, Linear, 1e6, "bit/s"},
		{"9600 Bd", Frequency, Linear, 9600, "Bd"},
		{"100 sym/s", Frequency, Linear, 100, "Bd"},
		{"25 mm/h", Speed, Linear, 25e-3 / 3600, "m/s"},
		{"1 W/m^2", Power.Div(Area), Linear, 1, "W/m^2"},
		{"3 ft", Length, Linear, 3 * 0.3048, "m"},
		// 1 mi = 5280 ft = 1609.344 m exactly (1959 international agreement).
		{"1 mi", Length, Linear, 1609.344, "m"},
		// 1 nmi = 1852 m exactly (international nautical mile).
		{"1 nmi", Length, Linear, 1852, "m"},
		{"90 deg", None, Linear, math.Pi / 2, "deg"}, // an angle shows in degrees (SI Brochure: the degree is accepted for use with the SI)
		{"1 rad", None, Linear, 1, "deg"},
		{"5 min", Time, Linear, 300, "s"},
		{"2 h", Time, Linear, 7200, "s"},
		{"1 ppm", None, Linear, 1e-6, ""},
		{"-20 dBc", None, Level, -20, "dBc"},
		// Phase noise: a level of 1/Hz, shown as the trade writes it.
		{"-100 dBc/Hz", Frequency.Pow(-1), Level, -100, "dBc/Hz"},
		{"-1 dBFS", None, Level, -1, "dB"},
		{"3 dB", None, Level, 3, "dB"},
		{"1e-4", None, Linear, 1e-4, ""},
		{"1.5e3 Hz", Frequency, Linear, 1500, "Hz"},
		{"1e3Hz", Frequency, Linear, 1000, "Hz"},
		{"+5 dB", None, Level, 5, "dB"},
		{".5 m", Length, Linear, 0.5, "m"},
		{"  7 W  ", Power, Linear, 7, "W"},
		{"2 J", Energy, Linear, 2, "J"},
		{"3 A", Current, Linear, 3, "A"},
		{"4 V", Voltage, Linear, 4, "V"},
		{"8 bit", None, Linear, 8, ""},
		{"1 kg", Dim{dimM: 1}, Linear, 1, "kg"},
		{"1 m^2", Area, Linear, 1, "m^2"},
		{"2 m*s", Length.Mul(Time), Linear, 2, "m*s"},
		{"3 1/K", Temperature.Pow(-1), Linear, 3, "1/K"},
		{"3 1/s", Frequency, Linear, 3, "Hz"},
		// U+2212 MINUS SIGN, as datasheets print it.
		{"\u2212174 dBm/Hz", PowerDensity, Level, -204, "dBm/Hz"},
	}
	for _, c := range cases {
		q, u, err := Parse(c.in)
		if err != nil {
			t.Errorf("Parse(%q): %v", c.in, err)
			continue
		}
		if q.D != c.d || q.K != c.k || !near(q.V, c.v, 1e-12) {
			t.Errorf("Parse(%q) = {V:%v D:%v K:%v}, want {V:%v D:%v K:%v}", c.in, q.V, q.D, q.K, c.v, c.d, c.k)
		}
		if u == nil {
			t.Errorf("Parse(%q): nil unit", c.in)
		}
		if c.name != "" || c.k == Linear && c.d.IsNone() {
			if got := q.UnitName(); got != c.name {
				t.Errorf("Parse(%q).UnitName() = %q, want %q", c.in, got, c.name)
			}
		}
	}
}

// Every SI prefix of SPEC §3 on every prefixable unit.
func TestParsePrefixes(t *testing.T) {
	prefixes := map[string]float64{
		"p": 1e-12, "n": 1e-9, "u": 1e-6, "\u00b5": 1e-6, "\u03bc": 1e-6, "m": 1e-3, "c": 1e-2,
		"k": 1e3, "M": 1e6, "G": 1e9, "T": 1e12,
	}
	atoms := map[string]Dim{
		"Hz": Frequency, "m": Length, "s": Time, "W": Power, "V": Voltage, "A": Current,
		"ohm": Resistance, "\u03a9": Resistance, "K": Temperature, "J": Energy, "bit/s": Frequency,
		"bps": Frequency, "Bd": Frequency, "bit": None,
	}
	for p, scale := range prefixes {
		for a, d := range atoms {
			s := "2 " + p + a
			q, _, err := Parse(s)
			if err != nil {
				t.Errorf("Parse(%q): %v", s, err)
				continue
			}
			if q.D != d || q.K != Linear || !near(q.V, 2*scale, 1e-12) {
				t.Errorf("Parse(%q) = %v %v, want %v %v", s, q.V, q.D, 2*scale, d)
			}
		}
	}
	// Units that take no prefix.
	for _, s := range []string{"k%", "kppm", "kdeg", "mrad", "kmin", "mh", "kft", "kmi", "knmi"} {
		if _, err := ParseUnit(s); err == nil {
			t.Errorf("ParseUnit(%q) succeeded, want an error (no prefix on this unit)", s)
		}
	}
}

func TestParseRejects(t *testing.T) {
	cases := []struct {
		unit string // the bad unit text, which the message must name
		hint string // did-you-mean suggestions accepted in the hint (separated by |), or ""
	}{
		{"dQ", "dB"},
		{"dBx", "dB"},
		{"kmm", "km|mm"},
		{"W/", "W"},
		{"m^x", "m"},
		{"dBm/", "dBm"},
		{"meters", "m"},
		{"mhz", "MHz"},
		{"dBmm", "dBm|dB/m"},
		{"m^0", ""},
		{"m^99", ""},
		{"dB/s", ""},      // neither a length (rate) nor K or Hz (density): SPEC §3
		{"dB/min", ""},    // same
		{"dBm/s", ""},     // no meaning
		{"dB/m^2", ""},    // not a rate, not a density
		{"dBm/100m", ""},  // a number factor only makes sense in a rate
		{"dB/0m", ""},     // zero length
		{"dB/1.2.3m", ""}, // bad factor
		{"dBuA/m", ""},
		{"m//s", ""},
		{"*m", ""},
		{"m*", ""},
		{"x\xffy", ""},
	}
	for _, c := range cases {
		for _, input := range []string{"", "1 "} {
			var err error
			if input == "" {
				_, err = ParseUnit(c.unit)
			} else {
				_, _, err = Parse(input + c.unit)
			}
			if err == nil {
				t.Errorf("parsing %q: no error", input+c.unit)
				continue
			}
			if !errors.Is(err, ErrUnit) {
				t.Errorf("parsing %q: error %v is not ErrUnit", input+c.unit, err)
			}
			if !strings.Contains(err.Error(), `"`+c.unit+`"`) {
				t.Errorf("parsing %q: message %q does not name the unit", input+c.unit, err)
			}
			var ue *Error
			if !errors.As(err, &ue) {
				t.Errorf("parsing %q: %T is not *Error", input+c.unit, err)
				continue
			}
			if c.hint != "" && !slices.Contains(strings.Split(c.hint, "|"), strings.TrimSuffix(strings.TrimPrefix(ue.Hint, `did you mean "`), `"?`)) {
				t.Errorf("parsing %q: hint %q, want did you mean %q", input+c.unit, ue.Hint, c.hint)
			}
		}
	}
	// Things that are not a number with a unit at all.
	for _, s := range []string{"", "   ", "dBm", "abc", "NaN", "Inf", "-", ".", "e5", "1e400 m", "1e300 Tm^8", "\u2212"} {
		if _, _, err := Parse(s); err == nil {
			t.Errorf("Parse(%q): no error", s)
		} else if f := strings.Fields(s); len(f) > 0 && !strings.Contains(err.Error(), f[0]) {
			t.Errorf("Parse(%q): message %q does not quote the input", s, err)
		}
	}
	// The messages say what is wrong.
	for s, want := range map[string]string{"": `got ""`, "1 W/": "nothing after /", "1 m^x": `bad exponent "x"`, "1 dBm/": "nothing after /"} {
		if _, _, err := Parse(s); err == nil || !strings.Contains(err.Error(), want) {
			t.Errorf("Parse(%q): %v, want a message with %q", s, err, want)
		}
	}
	// The empty unit is the plain number.
	if u, err := ParseUnit(""); err != nil || u.K != Linear || !u.D.IsNone() || u.Scale != 1 {
		t.Errorf("ParseUnit(\"\") = %+v, %v; want the plain number", u, err)
	}
}

// "3e" is 3 followed by the unit "e", not a number with a broken exponent.
func TestNumberLen(t *testing.T) {
	cases := map[string]int{
		"14 dBm": 2, "-174": 4, "1e3Hz": 3, "1.5e-3 s": 6, "3e": 1, "3e+": 1, "+.5": 3, "e5": 0, "-": 0, ".": 0, "": 0, "1.": 2,
	}
	for s, want := range cases {
		if got := NumberLen(s); got != want {
			t.Errorf("NumberLen(%q) = %d, want %d", s, got, want)
		}
	}
}

func TestUnitOf(t *testing.T) {
	// A value v in unit u is Of(v); In reads it back.
	for _, s := range []string{"dBm", "dBW", "dBd", "dBuV/m", "dB/km", "km", "mi", "%", "deg", "mm/h", "dBm/MHz", "h"} {
		u := mustUnit(t, s)
		for _, v := range []float64{-3.5, 0, 1, 42} {
			got, err := u.Of(v).In(u)
			if err != nil || !near(got, v, 1e-12) {
				t.Errorf("%s: Of(%v).In = %v, %v", s, v, got, err)
			}
		}
	}
}

// TestNearest: the suggestion for a misspelt name is the closest by edit distance; a
// difference in case alone wins outright; at the same distance the candidate that begins like
// the word wins (a slip is likelier at the end of what was typed: "dBmm" is "dBm" with a key
// pressed twice); nothing is suggested for a word too far from every candidate.
func TestNearest(t *testing.T) {
	for _, c := range []struct {
		word  string
		cands []string
		want  string
	}{
		{"mhz", []string{"MHz", "mHz", "Hz"}, "MHz"},
		{"dBmm", []string{"dB/m", "dBm"}, "dBm"},
		{"dBmm", []string{"dBm", "dB/m"}, "dBm"},
		{"furlongs", []string{"dB", "m", "Hz"}, ""},
	} {
		if got := Nearest(c.word, c.cands); got != c.want {
			t.Errorf("Nearest(%q, %q) = %q, want %q", c.word, c.cands, got, c.want)
		}
	}
}
