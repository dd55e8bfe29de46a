package units

import (
	"math"
	"strings"
	"testing"
)

func TestString(t *testing.T) {
	cases := []struct {
		q    Q
		want string
	}{
		// Decibels with 2 decimals.
		{DBm(14), "14.00 dBm"},
		{DBm(-0.001), "0.00 dBm"},
		{DB(-0.004), "0.00 dB"},
		{DB(-0.005001), "-0.01 dB"},
		{DB(3), "3.00 dB"},
		{Q{V: 2.15, K: Level, F: flavorIso}, "2.15 dBi"},
		{Q{V: -16, D: Power, K: Level, F: flavorWatt}, "-16.00 dBW"},
		{Q{V: -204, D: PowerDensity, K: Level, F: flavorMilli}, "-174.00 dBm/Hz"},
		{Q{V: -204, D: PowerDensity, K: Level}, "-174.00 dBm/Hz"},
		{Q{V: 50, D: Frequency, K: Level}, "50.00 dBHz"},
		{Q{V: 24.6, D: Temperature, K: Level}, "24.60 dBK"},
		{Q{V: 10, D: Temperature.Pow(-1), K: Level}, "10.00 dB/K"},
		{Q{V: 0, D: Voltage, K: Level}, "120.00 dBuV"},
		{Q{V: 0, D: Voltage, K: Level, F: flavorVolt}, "0.00 dBV"},
		{Q{V: -80, D: Voltage.Div(Length), K: Level, F: flavorMicro}, "40.00 dBuV/m"},
		{Q{V: 0.3, D: Length.Pow(-1), K: Rate}, "0.30 dB/m"},
		// Linear values in engineering notation, 4 significant digits.
		{Lin(0.345, Length), "345 mm"},
		{Lin(868e6, Frequency), "868 MHz"},
		{Q{V: 38400, D: Frequency, F: flavorBit}, "38.4 kbit/s"},
		{Q{V: 9600, D: Frequency, F: flavorSym}, "9.6 kBd"},
		{Lin(2400, Length), "2.4 km"},
		{Lin(999.96, Length), "1 km"},    // rounds to 4 digits before choosing the prefix
		{Lin(999.94, Length), "999.9 m"}, // and not when it stays below
		{Lin(0.99996, Power), "1 W"},
		{Lin(36e6, Length), "36000 km"}, // lengths stop at km
		{Lin(7200, Time), "7200 s"},     // times stop at s
		{Lin(1.5e-6, Time), "1.5 us"},
		{Lin(290, Temperature), "290 K"},
		{Lin(50, Resistance), "50 ohm"},
		{Lin(1e-3, Power.Div(Area)), "1 mW/m^2"},
		{Lin(-0.345, Length), "-345 mm"},
		{Lin(0, Length), "0 m"},
		{Lin(1234.5678, Frequency), "1.235 kHz"},
		{Lin(3, Area), "3 m^2"},
		{Lin(1e-320, Length), "1e-308 pm"}, // subnormal: still 4 significant digits, not "0 pm"
		{Lin(-1.5e-15, Power), "-0.0015 pW"},
		{Lin(2, Temperature.Pow(-1)), "2 1/K"},
		// Plain numbers: positional from 1e-3 to 1e6, else 1.23e-6.
		{Num(1.23e-6), "1.23e-6"},
		{Num(1e-4), "1e-4"},
		{Num(0.5), "0.5"},
		{Num(123456), "123500"},
		{Num(2.5e7), "2.5e7"},
		{Num(math.Copysign(0, -1)), "0"},
	}
	for _, c := range cases {
		if got := c.q.String(); got != c.want {
			t.Errorf("%+v.String() = %q, want %q", c.q, got, c.want)
		}
	}
}

func TestFormatNum(t *testing.T) {
	cases := map[float64]string{
		0: "0", 1: "1", -1: "-1", 0.001: "0.001", 0.0009999: "9.999e-4", 1.23e-6: "1.23e-6",
		1.2345e-6: "1.234e-6", 999999: "1000000", 1e6: "1e6", 3.14159: "3.142", -2.5e-7: "-2.5e-7",
		1e300: "1e300", 5e-324: "4.941e-324",
		math.NaN(): "NaN", math.Inf(1): "+Inf", math.Inf(-1): "-Inf",
	}
	for v, want := range cases {
		if got := FormatNum(v); got != want {
			t.Errorf("FormatNum(%v) = %q, want %q", v, got, want)
		}
	}
	dbs := map[float64]string{
		14: "14.00", -0.0: "0.00", -0.001: "0.00", -0.0049: "0.00", 0.005001: "0.01", -174: "-174.00",
		math.Inf(1): "+Inf", math.NaN(): "NaN",
	}
	for v, want := range dbs {
		if got := FormatDB(v); got != want {
			t.Errorf("FormatDB(%v) = %q, want %q", v, got, want)
		}
	}
}

// Odd values never panic and never print "-0.00".
func TestFormatOddValues(t *testing.T) {
	odd := []float64{math.NaN(), math.Inf(1), math.Inf(-1), 0, math.Copysign(0, -1), 5e-324, -5e-324,
		math.MaxFloat64, -math.MaxFloat64, 1e-320, 1e-15, 1e15, -1e-3}
	dims := []Dim{None, Length, Time, Power, Frequency, Voltage, Temperature, Area, Power.Div(Area)}
	for _, v := range odd {
		for _, d := range dims {
			for _, k := range []Kind{Linear, Level} {
				q := Q{V: v, D: d, K: k}
				s := q.String()
				if strings.HasPrefix(s, "-0.00 ") || s == "" {
					t.Errorf("%+v.String() = %q", q, s)
				}
				if k == Linear && !math.IsNaN(v) && !math.IsInf(v, 0) && math.Abs(v) < 1e300 {
					// A finite value prints as something Parse reads back.
					if _, _, err := Parse(s); err != nil {
						t.Errorf("%+v.String() = %q does not parse: %v", q, s, err)
					}
				}
				_ = q.Format(mustUnit(t, "dBm"))
				_ = q.Format(mustUnit(t, "km"))
				_ = q.UnitName()
			}
		}
	}
}

// TestRateDisplay: small rates (rain, gases) show per km, cable losses per metre.
func TestRateDisplay(t *testing.T) {
	for _, c := range []struct {
		in, want string
	}{
		{"2.75 dB/km", "2.75 dB/km"},
		{"0.22 dB/m", "0.22 dB/m"},
		{"3 dB/100m", "30.00 dB/km"},
		{"0 dB/m", "0.00 dB/m"},
	} {
		q, _, err := Parse(c.in)
		if err != nil {
			t.Fatal(err)
		}
		if got := q.String(); got != c.want {
			t.Errorf("%s shows as %q, want %q", c.in, got, c.want)
		}
	}
}
