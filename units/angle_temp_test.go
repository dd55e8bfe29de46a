package units

import (
	"math"
	"strings"
	"testing"
)

// TestAnglePressureCelsius checks the units added for the propagation functions: angles keep
// an angle flag, hPa and g/m^3 convert to SI, and °C is an absolute temperature in K.
func TestAnglePressureCelsius(t *testing.T) {
	cases := []struct {
		in   string
		d    Dim
		want float64 // SI value
		src  string
	}{
		{"30 deg", None, math.Pi / 6, "SI Brochure, 9th ed., Table 8: 1° = (π/180) rad"},
		{"1013.25 hPa", Pressure, 101325, "SI Brochure: 1 hPa = 100 Pa; standard atmosphere 101 325 Pa"},
		{"7.5 g/m^3", Density, 7.5e-3, "SI: 1 g = 1e-3 kg"},
		{"15 degC", Temperature, 288.15, "SI Brochure, 9th ed., 2.3.1: t/°C = T/K − 273.15"},
		{"-40 °C", Temperature, 233.15, "SI Brochure, 9th ed., 2.3.1: t/°C = T/K − 273.15"},
		{"0 \u2103", Temperature, 273.15, "SI Brochure, 9th ed., 2.3.1 (DEGREE CELSIUS sign)"},
	}
	for _, c := range cases {
		q, u, err := Parse(c.in)
		if err != nil {
			t.Errorf("%s: %v", c.in, err)
			continue
		}
		if q.D != c.d || math.Abs(q.V-c.want) > 1e-9*math.Abs(c.want) {
			t.Errorf("%s = %v %v, want %v %v (%s)", c.in, q.V, q.D, c.want, c.d, c.src)
		}
		// Read back in the unit it was written in, the offset undone.
		back, err := q.In(u)
		num, _, _ := Parse(strings.Fields(c.in)[0])
		if err != nil || math.Abs(back-num.V) > 1e-9 {
			t.Errorf("%s read back in %s = %v, %v", c.in, u.Sym, back, err)
		}
	}
	if q, _, _ := Parse("30 deg"); !q.IsAngle() || q.String() != "30 deg" {
		t.Errorf("30 deg: angle %v, shown %q", q.IsAngle(), q.String())
	}
	if q, _, _ := Parse("30"); q.IsAngle() {
		t.Errorf("a plain number is no angle")
	}
	two, _, _ := Parse("2")
	a, _, _ := Parse("30 deg")
	if p, _ := Mul(two, a); !p.IsAngle() || p.String() != "60 deg" {
		t.Errorf("2 × 30 deg = %q, want an angle of 60 deg", p.String())
	}
	if r, _ := Div(a, a); r.IsAngle() {
		t.Errorf("an angle over an angle is a plain ratio")
	}
	v1, _, _ := Parse("2 V")
	v2, _, _ := Parse("1 V")
	if r, _ := Div(v1, v2); !r.IsRootRatio() {
		t.Errorf("V/V should be flagged a root-power ratio")
	}
	w1, _, _ := Parse("2 W")
	if r, _ := Div(w1, w1); r.IsRootRatio() {
		t.Errorf("W/W is a power ratio")
	}
	// A difference of two Celsius temperatures is a kelvin difference (SI Brochure 2.3.1:
	// a temperature interval has the same size in °C and K).
	t1, _, _ := Parse("25 degC")
	t0, _, _ := Parse("15 degC")
	if d, _ := Sub(t1, t0); math.Abs(d.V-10) > 1e-9 || d.D != Temperature {
		t.Errorf("25 degC − 15 degC = %v, want 10 K", d)
	}
	if u, _ := ParseUnit("degC"); !u.HasOffset() {
		t.Errorf("degC has an offset")
	}
	if u, _ := ParseUnit("K"); u.HasOffset() {
		t.Errorf("K has no offset")
	}
	// °C does not enter compounds: W/degC would silently drop the offset.
	if _, err := ParseUnit("W/degC"); err == nil {
		t.Errorf("W/degC should be refused")
	}
}
